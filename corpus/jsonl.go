package corpus

import (
	"encoding/json"
	"errors"
	"fmt"

	"github.com/bowline/bowline/internal/jsonscan"
)

type span struct {
	start, end int // value bytes in the line, quotes included
	kind       jsonscan.Kind
	found      bool
}

func (r *Reader) nextJSONL() error {
	var line []byte
	var lead int
	for {
		l, err := r.readLine()
		if err != nil {
			return err
		}
		lead = 0
		for lead < len(l) && isSpace(l[lead]) {
			lead++
		}
		end := len(l)
		for end > lead && isSpace(l[end-1]) {
			end--
		}
		if end > lead {
			line = l[lead:end]
			break
		}
	}
	r.rec.Line = r.line
	for i := range r.spans {
		r.spans[i] = span{}
	}
	sc := &r.scan
	sc.Reset(line)
	if k := sc.Kind(); k != jsonscan.Object {
		if _, err := sc.Skip(); err != nil || sc.End() != nil {
			return r.jsonSyntaxError(line, lead)
		}
		return &ParseError{File: r.name, Line: r.line, Column: r.column(r.line, lead+1),
			Err: fmt.Errorf("%w: found %s", ErrNotObject, kindName(k))}
	}
	if err := r.findKeys(); err != nil || sc.End() != nil {
		var pe *jsonscan.ParseError
		if errors.As(err, &pe) && errors.Is(err, jsonscan.ErrDuplicateKey) {
			return &ParseError{File: r.name, Line: r.line, Column: r.column(r.line, lead+pe.Offset+1), Err: pe.Err}
		}
		return r.jsonSyntaxError(line, lead)
	}

	r.scratch = r.scratch[:0]
	r.offs = r.offs[:0]
	// Decode into scratch first, slice afterwards: appends may move it.
	// offs holds, per field, -1 for a value sliced from the line, else
	// the end offset of its decoded bytes in scratch.
	nt := len(r.opt.Text)
	for i, name := range r.opt.Text {
		sp := r.spans[i]
		if err := r.checkValue(line, lead, sp, name, false); err != nil {
			return err
		}
		r.decodeValue(sp)
	}
	if r.opt.Label != "" {
		if err := r.checkValue(line, lead, r.spans[nt], r.opt.Label, true); err != nil {
			return err
		}
		r.decodeValue(r.spans[nt])
	}
	if r.opt.ID != "" {
		if err := r.checkValue(line, lead, r.spans[nt+1], r.opt.ID, true); err != nil {
			return err
		}
		r.decodeValue(r.spans[nt+1])
	}
	for j, name := range r.opt.Fields {
		sp := r.spans[nt+2+j]
		if !sp.found {
			continue // absent: nil
		}
		if err := r.checkFieldValue(line, lead, sp, name); err != nil {
			return err
		}
		r.decodeValue(sp)
	}
	k := 0
	start := 0
	take := func(sp span) []byte {
		o := r.offs[k]
		k++
		if o < 0 {
			v := line[sp.start:sp.end]
			if v[0] == '"' {
				return v[1 : len(v)-1]
			}
			if v[0] == 'n' {
				return v[:0]
			}
			return v
		}
		v := r.scratch[start:o:o]
		start = o
		return v
	}
	for i := range r.opt.Text {
		r.rec.Text[i] = take(r.spans[i])
	}
	if r.opt.Label != "" {
		r.rec.Label = take(r.spans[nt])
	}
	if r.opt.ID != "" {
		r.rec.ID = take(r.spans[nt+1])
	}
	for j := range r.opt.Fields {
		sp := r.spans[nt+2+j]
		switch {
		case !sp.found:
			r.rec.Fields[j] = nil
		case sp.kind == jsonscan.Null:
			take(sp)
			r.rec.Fields[j] = nil // null: missing
		default:
			r.rec.Fields[j] = take(sp)
		}
	}
	return nil
}

// checkFieldValue accepts a string, number, boolean or null for an extra
// field.
func (r *Reader) checkFieldValue(line []byte, lead int, sp span, name string) error {
	switch sp.kind {
	case jsonscan.Object, jsonscan.Array:
		return &ParseError{File: r.name, Line: r.line, Column: r.column(r.line, lead+sp.start+1), Field: name,
			Err: fmt.Errorf("%w: expected a string, number, boolean or null, found %s", ErrWrongType, kindName(sp.kind))}
	}
	return nil
}

func isSpace(c byte) bool { return c == ' ' || c == '\t' || c == '\r' || c == '\n' }

// kindName names a kind of value in an error message.
func kindName(k jsonscan.Kind) string {
	if k == jsonscan.Bool {
		return "boolean"
	}
	return k.String()
}

func (r *Reader) jsonSyntaxError(line []byte, lead int) error {
	err := json.Unmarshal(line, new(struct{}))
	var se *json.SyntaxError
	col := 0
	if errors.As(err, &se) {
		col = int(se.Offset)
		if col < 1 {
			col = 1
		}
		col += lead
	} else if err == nil {
		err = errors.New("invalid JSON")
	}
	return &ParseError{File: r.name, Line: r.line, Column: r.column(r.line, col), Err: err}
}

func (r *Reader) checkValue(line []byte, lead int, sp span, name string, numberOK bool) error {
	if !sp.found {
		return &ParseError{File: r.name, Line: r.line, Field: name, Err: ErrMissingField}
	}
	switch k := sp.kind; {
	case k == jsonscan.String || k == jsonscan.Null || (k == jsonscan.Number && numberOK):
	default:
		want := "a string"
		if numberOK {
			want = "a string or a number"
		}
		return &ParseError{File: r.name, Line: r.line, Column: r.column(r.line, lead+sp.start+1), Field: name,
			Err: fmt.Errorf("%w: expected %s, found %s", ErrWrongType, want, kindName(k))}
	}
	return nil
}

// decodeValue decodes a string value with escapes or invalid UTF-8 into
// scratch and notes its end in offs; other values are sliced from the line
// later (offs -1).
func (r *Reader) decodeValue(sp span) {
	if sp.kind == jsonscan.String {
		r.scan.Seek(sp.start)
		if v, copied, _ := r.scan.String(r.scratch); copied {
			r.scratch = v
			r.offs = append(r.offs, len(r.scratch))
			return
		}
	}
	r.offs = append(r.offs, -1)
}

// findKeys records the spans of the wanted members of the object at the
// scan, the last of a key given twice.
func (r *Reader) findKeys() error {
	nt := len(r.opt.Text)
	sc := &r.scan
	return sc.Object(func(key []byte) error {
		sp := span{start: sc.Offset(), kind: sc.Kind(), found: true}
		v, err := sc.Skip()
		sp.end = sp.start + len(v)
		for j, name := range r.opt.Text {
			if string(key) == name {
				r.spans[j] = sp
			}
		}
		if r.opt.Label != "" && string(key) == r.opt.Label {
			r.spans[nt] = sp
		}
		if r.opt.ID != "" && string(key) == r.opt.ID {
			r.spans[nt+1] = sp
		}
		for j, name := range r.opt.Fields {
			if string(key) == name {
				r.spans[nt+2+j] = sp
			}
		}
		return err
	})
}
