package serve

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"mime"
	"net/http"
	"strings"
	"sync"
	"unicode/utf8"

	"github.com/bowline/bowline/internal/jsonscan"
)

// EncodeRequest is the body of POST /v1/encode.
type EncodeRequest struct {
	// Documents are encoded in order; the response has one row for each.
	Documents []WireDocument `json:"documents"`
}

// WireDocument is one document of a request: either text, for a spec with
// one text field, or fields, naming every text field of the spec.
type WireDocument struct {
	ID     string            `json:"id"`
	Text   *string           `json:"text"`
	Fields map[string]string `json:"fields"`
}

// A RequestError is a request the server refuses, with the HTTP status code
// it answers and the kind of error counted in the metrics.
type RequestError struct {
	// Status is the HTTP status code.
	Status int
	// Kind is the metrics label: "malformed", "too_large",
	// "too_many_documents", "content_type", "no_text", "method",
	// "not_found" or "internal".
	Kind string
	// Msg is the message sent to the client.
	Msg string
}

func (e *RequestError) Error() string { return e.Msg }

func requestErrorf(status int, kind, format string, a ...any) *RequestError {
	return &RequestError{Status: status, Kind: kind, Msg: fmt.Sprintf(format, a...)}
}

// checkContentType accepts application/json, with no charset or UTF-8.
func checkContentType(h string) *RequestError {
	if h == "" {
		return requestErrorf(http.StatusUnsupportedMediaType, "content_type", "Content-Type is missing; send application/json")
	}
	mt, params, err := mime.ParseMediaType(h)
	if err != nil || mt != "application/json" {
		return requestErrorf(http.StatusUnsupportedMediaType, "content_type", "Content-Type %q is not application/json", h)
	}
	if cs, ok := params["charset"]; ok && !strings.EqualFold(cs, "utf-8") {
		return requestErrorf(http.StatusUnsupportedMediaType, "content_type", "charset %q is not utf-8", cs)
	}
	return nil
}

func tooLarge(maxBody int64) *RequestError {
	return requestErrorf(http.StatusRequestEntityTooLarge, "too_large", "request body larger than %d bytes", maxBody)
}

func malformed(format string, a ...any) *RequestError {
	return requestErrorf(http.StatusBadRequest, "malformed", format, a...)
}

// DecodeRequest reads one JSON request body from r. It reads at most
// maxBody bytes (0: no limit) and accepts at most maxDocs documents
// (0: no limit). Errors are *RequestError values: 413 for a body or
// document list over its limit, 400 for anything that is not exactly one
// JSON object of the request's shape. A document without text is not an
// error here; the encoder finds it.
//
// The JSON is read as encoding/json's Decoder would read it into an
// EncodeRequest with unknown fields disallowed (RFC 8259 syntax, keys
// matched case-insensitively, a repeated key merged into or replacing
// what came before, invalid UTF-8 and lone surrogates replaced by U+FFFD),
// without reflection and with buffers reused between calls.
func DecodeRequest(r io.Reader, maxBody int64, maxDocs int) (*EncodeRequest, error) {
	d := decoders.Get().(*decoder)
	defer d.release()
	var rerr error
	d.data, d.end, rerr = readBody(d.data[:0], r, maxBody)
	d.maxDocs = maxDocs
	d.sc.Reset(d.data)

	if err := d.top(); err != nil {
		var pe *jsonscan.ParseError
		if !errors.As(err, &pe) {
			return nil, malformed("malformed JSON: %v", err)
		}
		if pe.Err != jsonscan.ErrEnd {
			return nil, malformed("malformed JSON at byte %d: %v", pe.Offset, pe.Err)
		}
		switch d.end {
		case endOver:
			return nil, tooLarge(maxBody)
		case endErr:
			return nil, readError(rerr, maxBody)
		}
		if len(bytes.TrimLeft(d.data, " \t\n\r")) == 0 {
			return nil, malformed("malformed JSON: empty body")
		}
		return nil, malformed("malformed JSON: body ends early")
	}
	if d.typeErr != nil {
		return nil, d.typeErr
	}
	// Exactly one value: anything but white space after it is malformed.
	if d.sc.End() != nil {
		switch d.data[d.sc.Offset()] {
		case '[', '{', ']', '}', ':', ',':
		default:
			// encoding/json reads a scalar that follows to its end: when
			// that end is beyond the limit, the body is too large.
			if d.end == endOver && errors.Is(d.scalarAtTop(), jsonscan.ErrEnd) {
				return nil, tooLarge(maxBody)
			}
		}
		return nil, malformed("malformed JSON: data after the request object")
	}
	switch d.end {
	case endOver:
		return nil, tooLarge(maxBody)
	case endErr:
		return nil, malformed("malformed JSON: data after the request object")
	}
	if !d.hasDocs {
		return nil, malformed("malformed request: no \"documents\" list")
	}
	if maxDocs > 0 && d.ndocs > maxDocs {
		return nil, requestErrorf(http.StatusRequestEntityTooLarge, "too_many_documents", "%d documents in one request; the limit is %d", d.ndocs, maxDocs)
	}
	return d.request(), nil
}

// readError is the answer to a body that could not be read to its end.
func readError(err error, maxBody int64) *RequestError {
	var mbe *http.MaxBytesError
	if errors.As(err, &mbe) {
		return tooLarge(maxBody)
	}
	return malformed("reading the request body: %v", err)
}

// How the bytes read from a body ended.
const (
	endEOF  = iota // the body ended
	endOver        // the body went on beyond the limit
	endErr         // reading failed
)

// readBody appends the body from r to dst: all of it, or maxBody bytes and
// one more probed (maxBody > 0), or what came before a read error.
func readBody(dst []byte, r io.Reader, maxBody int64) ([]byte, int, error) {
	for {
		room := int64(1 << 62)
		if maxBody > 0 {
			room = maxBody - int64(len(dst))
		}
		if room == 0 {
			// At the limit exactly is fine, beyond is not.
			var one [1]byte
			n, err := r.Read(one[:])
			switch {
			case n > 0:
				return dst, endOver, nil
			case err == io.EOF:
				return dst, endEOF, nil
			case err != nil:
				return dst, endErr, err
			}
			continue
		}
		if len(dst) == cap(dst) {
			grow := int64(max(cap(dst), 4096))
			dst = append(dst, make([]byte, min(grow, room))...)[:len(dst)]
		}
		free := dst[len(dst):cap(dst)]
		if int64(len(free)) > room {
			free = free[:room]
		}
		n, err := r.Read(free)
		dst = dst[:len(dst)+n]
		switch {
		case err == io.EOF:
			return dst, endEOF, nil
		case err != nil:
			return dst, endErr, err
		}
	}
}

// span is a string unquoted into the decoder's arena.
type span struct{ off, n int }

// fieldValue is one "name": "value" pair of a document's fields.
type fieldValue struct{ name, value span }

// docState is a document as decoded so far.
type docState struct {
	id      span
	text    span
	hasText bool
	// hasFields: "fields" was an object, later pairs replacing earlier
	// ones of the same name; a null drops them.
	hasFields bool
	fields    []fieldValue
}

// A decoder reads one request. The zero value is ready; decoders and their
// buffers are reused through a pool.
type decoder struct {
	data    []byte // the body as read
	end     int    // how it ended (endEOF, endOver, endErr)
	sc      jsonscan.Scanner
	maxDocs int

	arena []byte // unquoted strings

	// docs holds every document position written since "documents" was
	// last set to null or an empty list: a later "documents" list in the
	// same request decodes into the same positions, as encoding/json
	// decodes into the elements of a slice it already holds.
	docs    []docState
	written int  // positions of docs in use
	ndocs   int  // length of the documents list
	hasDocs bool // "documents" is a list (not absent or null)

	typeErr *RequestError // the first value of the wrong type or unknown key
}

var decoders = sync.Pool{New: func() any { return new(decoder) }}

// Buffers larger than these are not kept for the next request.
const (
	maxPooledBody  = 1 << 20
	maxPooledDocs  = 4096
	maxPooledArena = 1 << 20
)

func (d *decoder) release() {
	for i := range d.docs[:d.written] {
		d.docs[i].fields = d.docs[i].fields[:0]
	}
	sc := d.sc
	sc.Reset(nil)
	*d = decoder{data: d.data[:0], sc: sc, arena: d.arena[:0], docs: d.docs[:0]}
	if cap(d.data) > maxPooledBody || cap(d.arena) > maxPooledArena || cap(d.docs) > maxPooledDocs {
		return
	}
	decoders.Put(d)
}

// request builds the decoded request: all its strings share one
// allocation, and so do its text pointers.
func (d *decoder) request() *EncodeRequest {
	all := string(d.arena)
	str := func(s span) string { return all[s.off : s.off+s.n] }
	req := &EncodeRequest{Documents: make([]WireDocument, d.ndocs)}
	texts := make([]string, d.ndocs)
	for i := range req.Documents {
		if i >= d.written {
			continue // a null past the positions written: a zero document
		}
		ds, wd := &d.docs[i], &req.Documents[i]
		wd.ID = str(ds.id)
		if ds.hasText {
			texts[i] = str(ds.text)
			wd.Text = &texts[i]
		}
		if ds.hasFields {
			wd.Fields = make(map[string]string, len(ds.fields))
			for _, f := range ds.fields {
				wd.Fields[str(f.name)] = str(f.value)
			}
		}
	}
	return req
}

// wrongType records the first value of the wrong type (the one at the
// scan); decoding goes on to find syntax errors and the end of the body,
// as encoding/json does.
func (d *decoder) wrongType(where func() string, want string) {
	if d.typeErr == nil {
		d.typeErr = malformed("malformed request: %s must be %s, not %s (byte %d)", where(), want, d.sc.Kind(), d.sc.Offset())
	}
}

// unknownKey records the first unknown key, whose value is at the scan.
func (d *decoder) unknownKey(key []byte, where func() string) {
	if d.typeErr == nil {
		d.typeErr = malformed("malformed request: unknown field %q in %s (byte %d)", key, where(), d.sc.Offset())
	}
}

// skip checks and passes over the value at the scan.
func (d *decoder) skip() error {
	_, err := d.sc.Skip()
	return err
}

// top reads the request object.
func (d *decoder) top() error {
	where := func() string { return "the request" }
	switch d.sc.Kind() {
	case jsonscan.Object:
	case jsonscan.Null:
		// null leaves the request empty.
		return d.scalarAtTop()
	case jsonscan.Invalid:
		return d.skip()
	case jsonscan.Array:
		d.wrongType(where, "an object")
		return d.skip()
	default:
		d.wrongType(where, "an object")
		return d.scalarAtTop()
	}
	return d.sc.Object(func(k []byte) error {
		if !matchKey(k, "documents") {
			d.unknownKey(k, where)
			return d.skip()
		}
		return d.documents()
	})
}

// scalarAtTop reads a string, number or literal as the whole body. As in
// encoding/json's scanner, it is complete only when a byte follows it or
// the body ends there.
func (d *decoder) scalarAtTop() error {
	if err := d.skip(); err != nil {
		return err
	}
	if d.sc.Offset() == len(d.data) && d.end != endEOF {
		return &jsonscan.ParseError{Offset: len(d.data), Err: jsonscan.ErrEnd}
	}
	return nil
}

// matchKey reports whether key names the field name, as encoding/json
// matches keys to struct fields: exactly, or else under Unicode simple case
// folding (bytes.EqualFold).
func matchKey(key []byte, name string) bool {
	if string(key) == name {
		return true
	}
	// Only a key of the same length or one with non-ASCII bytes (a
	// folding such as K, U+212A, for k) can match.
	if len(key) == len(name) && asciiFold(key, name) {
		return true
	}
	for _, c := range key {
		if c >= utf8.RuneSelf {
			return strings.EqualFold(string(key), name)
		}
	}
	return false
}

// asciiFold reports whether key is name with some letters in upper case;
// name is lower case.
func asciiFold(key []byte, name string) bool {
	for i := range key {
		if key[i]|0x20 != name[i] {
			return false
		}
	}
	return true
}

// documents reads the value of "documents" at the scan.
func (d *decoder) documents() error {
	switch d.sc.Kind() {
	case jsonscan.Null:
		d.hasDocs, d.ndocs, d.written = false, 0, 0
		return d.skip()
	case jsonscan.Array:
	case jsonscan.Invalid:
		return d.skip()
	default:
		d.wrongType(func() string { return "documents" }, "a list")
		return d.skip()
	}
	d.hasDocs, d.ndocs = true, 0
	err := d.sc.Array(func() error {
		d.ndocs++
		return d.document(d.ndocs - 1)
	})
	if d.ndocs == 0 {
		// An empty list is a new, empty slice.
		d.written = 0
	}
	return err
}

// document reads documents[i] at the scan.
func (d *decoder) document(i int) error {
	where := func() string { return fmt.Sprintf("documents[%d]", i) }
	kind := d.sc.Kind()
	switch kind {
	case jsonscan.Object, jsonscan.Null:
	case jsonscan.Invalid:
		return d.skip()
	default:
		d.wrongType(where, "an object")
		return d.skip()
	}
	// Positions past maxDocs are only counted: such a request is refused.
	var ds *docState
	if d.maxDocs <= 0 || i < d.maxDocs {
		// Positions not written before start as zero documents.
		for d.written <= i {
			if d.written == len(d.docs) {
				d.docs = append(d.docs, docState{})
			}
			ds = &d.docs[d.written]
			*ds = docState{fields: ds.fields[:0]}
			d.written++
		}
		ds = &d.docs[i]
	}
	if kind == jsonscan.Null {
		return d.skip() // null leaves the document as it was
	}
	var scratch docState
	if ds == nil {
		ds = &scratch
	}
	return d.sc.Object(func(k []byte) error {
		switch {
		case matchKey(k, "text"):
			switch d.sc.Kind() {
			case jsonscan.String:
				ds.hasText = true
				return d.value(&ds.text)
			case jsonscan.Null:
				ds.hasText = false
				return d.skip()
			case jsonscan.Invalid:
				return d.skip()
			}
			d.wrongType(func() string { return where() + ".text" }, "a string")
			return d.skip()
		case matchKey(k, "id"):
			switch d.sc.Kind() {
			case jsonscan.String:
				return d.value(&ds.id)
			case jsonscan.Null, jsonscan.Invalid:
				return d.skip() // null leaves a string as it was
			}
			d.wrongType(func() string { return where() + ".id" }, "a string")
			return d.skip()
		case matchKey(k, "fields"):
			return d.fields(ds, where)
		}
		d.unknownKey(k, where)
		return d.skip()
	})
}

// fields reads a document's "fields" object at the scan.
func (d *decoder) fields(ds *docState, where func() string) error {
	switch d.sc.Kind() {
	case jsonscan.Null:
		ds.hasFields, ds.fields = false, ds.fields[:0]
		return d.skip()
	case jsonscan.Object:
	case jsonscan.Invalid:
		return d.skip()
	default:
		d.wrongType(func() string { return where() + ".fields" }, "an object")
		return d.skip()
	}
	// A second "fields" object adds to the first, as encoding/json
	// decodes into a map it already holds.
	ds.hasFields = true
	return d.sc.Object(func(k []byte) error {
		name := span{len(d.arena), len(k)}
		d.arena = append(d.arena, k...)
		switch d.sc.Kind() {
		case jsonscan.String:
			var v span
			if err := d.value(&v); err != nil {
				return err
			}
			ds.fields = append(ds.fields, fieldValue{name, v})
			return nil
		case jsonscan.Null:
			// null in a map of strings stores the empty string.
			ds.fields = append(ds.fields, fieldValue{name, span{}})
			return d.skip()
		case jsonscan.Invalid:
			return d.skip()
		}
		d.wrongType(func() string { return fmt.Sprintf("%s.fields[%q]", where(), k) }, "a string")
		return d.skip()
	})
}

// value unquotes the string at the scan into the arena.
func (d *decoder) value(s *span) error {
	off := len(d.arena)
	v, copied, err := d.sc.String(d.arena)
	if copied {
		d.arena = v
	} else {
		d.arena = append(d.arena, v...)
	}
	*s = span{off, len(d.arena) - off}
	return err
}
