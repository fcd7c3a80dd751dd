// Package bowline is the library face of bowline: load a frozen spec and
// encode documents into sparse rows, safely from many goroutines.
//
// A spec is written by "bowline learn" (or by learn.Learner and pipeline.Learn
// in code). Load checks its schema version and fingerprint; the Encoder it
// returns gives, for the same text, exactly the rows "bowline encode" writes
// with the same spec, whatever the machine or the number of goroutines.
//
// Row indices are 0-based column numbers, like those of the weight and
// svmlight packages. "bowline encode" and the HTTP endpoint of "bowline
// serve" write them 1-based by default: add 1 to compare.
package bowline

import (
	"errors"
	"fmt"
	"slices"
	"sort"
	"strings"

	"github.com/bowline/bowline/internal/encode"
	"github.com/bowline/bowline/internal/tablefield"
	"github.com/bowline/bowline/spec"
)

// An Encoder applies a frozen spec to documents. It is safe for concurrent
// use by many goroutines.
type Encoder struct {
	spec   *spec.Spec
	enc    *encode.Encoder
	fields []string
	table  []string // table fields (categories, numbers, times)
}

// Load reads the spec file at path (plain or gzipped JSON), refuses it when
// its schema is newer than this build or its fingerprint does not match its
// content (the error is a *spec.LoadError), and returns an Encoder for it.
func Load(path string) (*Encoder, error) {
	s, err := spec.Load(path)
	if err != nil {
		return nil, err
	}
	e, err := New(s)
	if err != nil {
		return nil, &spec.LoadError{File: path, Reason: spec.ErrInvalid, Err: err}
	}
	return e, nil
}

// New returns an Encoder for a spec already in memory, such as one just
// learned. The spec must not be changed afterwards.
func New(s *spec.Spec) (*Encoder, error) {
	if s == nil {
		return nil, errors.New("bowline: nil spec")
	}
	if s.Fingerprint == "" {
		return nil, errors.New("bowline: spec is not sealed (no fingerprint)")
	}
	enc, err := encode.New(s)
	if err != nil {
		return nil, err
	}
	fields := s.Content.Input.Text
	if len(fields) == 0 {
		return nil, errors.New("bowline: spec names no text field")
	}
	return &Encoder{spec: s, enc: enc, fields: fields, table: enc.TableFields()}, nil
}

// Fingerprint is the spec's fingerprint: "sha256:" and 64 hex digits.
func (e *Encoder) Fingerprint() string { return e.spec.Fingerprint }

// Spec returns the spec the encoder applies. It must not be changed.
func (e *Encoder) Spec() *spec.Spec { return e.spec }

// Columns is the number of columns of every row.
func (e *Encoder) Columns() int { return e.enc.Columns() }

// Fields returns the names of the spec's text fields, in the order the spec
// reads them. The caller must not change the slice.
func (e *Encoder) Fields() []string { return e.fields }

// TableFields returns the names of the spec's table fields (categories,
// numbers, timestamps read beside the text), in the order the spec reads
// them; nil when it has none. The caller must not change the slice.
func (e *Encoder) TableFields() []string { return e.table }

// A Document is one text to encode.
type Document struct {
	// ID is copied to the row; bowline does not read it.
	ID string
	// Text is the text of a spec with a single text field. An empty Text
	// (with no Fields) is an empty document: it gives an empty row, as an
	// empty record does in "bowline encode". Text may come with Fields
	// that name table fields only.
	Text string
	// Fields holds the text of each field by name, for a spec with several
	// text fields (it may also name the single field of a one-field spec).
	// Every text field of the spec must be present; names the spec does
	// not know are refused. A field present with an empty value is an
	// empty text. Fields also carries the values of the spec's table
	// fields, as text ("harbour", "34", "2024-03-15T06:00:00Z"); a table
	// field that is absent or empty is missing.
	Fields map[string]string
}

// A Row is one encoded document: a sparse row and the document's figures.
type Row struct {
	// ID is the document's ID.
	ID string
	// Indices are 0-based column numbers, strictly ascending.
	Indices []int
	// Values[i] is the weight of column Indices[i]; never exactly 0.
	Values []float64
	// Unseen is the number of feature keys the document produced that are
	// not in the spec's vocabulary (always 0 in hashing mode).
	Unseen int
	// Features is the number of feature keys the document produced, seen
	// or not; Unseen/Features is the document's out-of-vocabulary share.
	Features int
}

// A DocumentError is a document that cannot be encoded with the spec.
type DocumentError struct {
	// ID is the document's ID.
	ID string
	// Field is the text field concerned ("" when none in particular).
	Field string
	// Reason says what is wrong.
	Reason string
}

func (e *DocumentError) Error() string {
	var b strings.Builder
	b.WriteString("document")
	if e.ID != "" {
		fmt.Fprintf(&b, " %q", e.ID)
	}
	if e.Field != "" {
		fmt.Fprintf(&b, ": field %q", e.Field)
	}
	b.WriteString(": ")
	b.WriteString(e.Reason)
	return b.String()
}

// Texts returns the document's text fields in the spec's order, followed
// by the values of its table fields in the order of TableFields (nil when
// absent): the form EncodeTexts takes. It returns a *DocumentError when a
// text field is missing or a field is unknown.
func (e *Encoder) Texts(d Document) ([][]byte, error) {
	texts, err := e.texts(d)
	if err != nil || len(e.table) == 0 {
		return texts, err
	}
	for _, f := range e.table {
		if v, ok := d.Fields[f]; ok {
			texts = append(texts, []byte(v))
		} else {
			texts = append(texts, nil)
		}
	}
	return texts, nil
}

func (e *Encoder) texts(d Document) ([][]byte, error) {
	texts := make([][]byte, len(e.fields), len(e.fields)+len(e.table))
	if len(e.fields) == 1 && e.onlyTable(d.Fields) {
		texts[0] = []byte(d.Text) // "" is an empty document
		return texts, nil
	}
	if d.Text != "" {
		if len(e.fields) > 1 {
			return nil, &DocumentError{ID: d.ID, Reason: fmt.Sprintf("the spec has %d text fields (%s); give them by name in Fields, not as Text", len(e.fields), strings.Join(e.fields, ", "))}
		}
		return nil, &DocumentError{ID: d.ID, Reason: "both Text and Fields given; give one"}
	}
	if len(d.Fields) == 0 {
		return nil, &DocumentError{ID: d.ID, Reason: fmt.Sprintf("no text: the spec reads the fields %s", strings.Join(e.fields, ", "))}
	}
	for i, f := range e.fields {
		v, ok := d.Fields[f]
		if !ok {
			return nil, &DocumentError{ID: d.ID, Field: f, Reason: "missing"}
		}
		texts[i] = []byte(v)
	}
	if len(d.Fields) > len(e.fields) {
		var unknown []string
		for k := range d.Fields {
			if !e.hasField(k) && !slices.Contains(e.table, k) {
				unknown = append(unknown, k)
			}
		}
		if len(unknown) > 0 {
			sort.Strings(unknown) // report the same field whatever the map order
			reason := fmt.Sprintf("not a text field of the spec (%s)", strings.Join(e.fields, ", "))
			if len(e.table) > 0 {
				reason = fmt.Sprintf("not a field of the spec (text: %s; table: %s)", strings.Join(e.fields, ", "), strings.Join(e.table, ", "))
			}
			return nil, &DocumentError{ID: d.ID, Field: unknown[0], Reason: reason}
		}
	}
	return texts, nil
}

// onlyTable reports whether every name in m is a table field (true for an
// empty m): the text of a one-field spec then comes from Document.Text.
func (e *Encoder) onlyTable(m map[string]string) bool {
	for k := range m {
		if !slices.Contains(e.table, k) {
			return false
		}
	}
	return true
}

func (e *Encoder) hasField(name string) bool {
	for _, f := range e.fields {
		if f == name {
			return true
		}
	}
	return false
}

// Encode encodes one document. The error is a *DocumentError when a text
// field the spec reads is missing from Fields, or Fields names a field the
// spec does not read. Encode is safe for concurrent use.
func (e *Encoder) Encode(d Document) (Row, error) {
	texts, err := e.Texts(d)
	if err != nil {
		return Row{ID: d.ID}, err
	}
	return e.EncodeTexts(d.ID, texts)
}

// EncodeTexts encodes one document given as its text fields in the order
// of Fields, optionally followed by the values of the table fields in the
// order of TableFields (nil or empty for missing; leaving them all out
// makes them all missing): the form Texts returns. id is copied to the
// row. A table-field value that cannot be read (not a number, a negative
// number under log, not a time in the field's layout) is a
// *DocumentError naming the field. It is safe for concurrent use.
func (e *Encoder) EncodeTexts(id string, texts [][]byte) (Row, error) {
	n := len(e.fields)
	if len(texts) != n && len(texts) != n+len(e.table) {
		return Row{ID: id}, &DocumentError{ID: id, Reason: fmt.Sprintf("%d text fields given; the spec reads %d (%s)", len(texts), len(e.fields), strings.Join(e.fields, ", "))}
	}
	var values [][]byte
	if len(texts) > n {
		values = texts[n:]
	}
	r, st, err := e.enc.EncodeFields(texts[:n], values)
	if err != nil {
		var fe *tablefield.ValueError
		if errors.As(err, &fe) {
			return Row{ID: id}, &DocumentError{ID: id, Field: fe.Field, Reason: fmt.Sprintf("%q: %s", fe.Value, fe.Reason)}
		}
		return Row{ID: id}, &DocumentError{ID: id, Reason: err.Error()}
	}
	return Row{ID: id, Indices: r.Indices, Values: r.Values, Unseen: st.Unseen, Features: st.Features}, nil
}
