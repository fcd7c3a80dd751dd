package corpus

import (
	"encoding/json"
	"errors"
	"fmt"
	"unicode"
	"unicode/utf16"
	"unicode/utf8"
)

type span struct {
	start, end int // value bytes in the line, quotes included
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
	if !json.Valid(line) {
		return r.jsonSyntaxError(line, lead)
	}
	if line[0] != '{' {
		return &ParseError{File: r.name, Line: r.line, Column: r.column(r.line, lead+1),
			Err: fmt.Errorf("%w: found %s", ErrNotObject, kind(line[0]))}
	}
	for i := range r.spans {
		r.spans[i] = span{}
	}
	r.findKeys(line)

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
		r.decodeValue(line, sp)
	}
	if r.opt.Label != "" {
		if err := r.checkValue(line, lead, r.spans[nt], r.opt.Label, true); err != nil {
			return err
		}
		r.decodeValue(line, r.spans[nt])
	}
	if r.opt.ID != "" {
		if err := r.checkValue(line, lead, r.spans[nt+1], r.opt.ID, true); err != nil {
			return err
		}
		r.decodeValue(line, r.spans[nt+1])
	}
	for j, name := range r.opt.Fields {
		sp := r.spans[nt+2+j]
		if !sp.found {
			continue // absent: nil
		}
		if err := r.checkFieldValue(line, lead, sp, name); err != nil {
			return err
		}
		r.decodeValue(line, sp)
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
		case line[sp.start] == 'n':
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
	switch kind(line[sp.start]) {
	case "object", "array":
		return &ParseError{File: r.name, Line: r.line, Column: r.column(r.line, lead+sp.start+1), Field: name,
			Err: fmt.Errorf("%w: expected a string, number, boolean or null, found %s", ErrWrongType, kind(line[sp.start]))}
	}
	return nil
}

func isSpace(c byte) bool { return c == ' ' || c == '\t' || c == '\r' || c == '\n' }

func kind(c byte) string {
	switch c {
	case '"':
		return "string"
	case '{':
		return "object"
	case '[':
		return "array"
	case 't', 'f':
		return "boolean"
	case 'n':
		return "null"
	}
	return "number"
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
	switch k := kind(line[sp.start]); {
	case k == "string" || k == "null" || (k == "number" && numberOK):
	default:
		want := "a string"
		if numberOK {
			want = "a string or a number"
		}
		return &ParseError{File: r.name, Line: r.line, Column: r.column(r.line, lead+sp.start+1), Field: name,
			Err: fmt.Errorf("%w: expected %s, found %s", ErrWrongType, want, k)}
	}
	return nil
}

// decodeValue decodes a string value with escapes or invalid UTF-8 into
// scratch and notes its end in offs; other values are sliced from the line
// later (offs -1).
func (r *Reader) decodeValue(line []byte, sp span) {
	v := line[sp.start:sp.end]
	if v[0] == '"' && needsUnquote(v[1:len(v)-1]) {
		r.scratch = unquote(r.scratch, v[1:len(v)-1])
		r.offs = append(r.offs, len(r.scratch))
		return
	}
	r.offs = append(r.offs, -1)
}

// findKeys records the spans of the wanted top-level keys of the valid
// JSON object in line.
func (r *Reader) findKeys(line []byte) {
	nt := len(r.opt.Text)
	i := 1
	for {
		i = skipSpace(line, i)
		if line[i] == '}' {
			return
		}
		// key
		ks := i
		i = skipString(line, i)
		key := line[ks+1 : i-1]
		i = skipSpace(line, i)
		i++ // ':'
		i = skipSpace(line, i)
		vs := i
		i = skipValue(line, i)
		if needsUnquote(key) {
			r.scratch = unquote(r.scratch[:0], key)
			key = r.scratch
		}
		sp := span{vs, i, true}
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
		i = skipSpace(line, i)
		if line[i] == ',' {
			i++
			continue
		}
		return // '}'
	}
}

func skipSpace(b []byte, i int) int {
	for i < len(b) && isSpace(b[i]) {
		i++
	}
	return i
}

// skipString returns the index just past the string starting at b[i] == '"'.
func skipString(b []byte, i int) int {
	i++
	for {
		switch b[i] {
		case '"':
			return i + 1
		case '\\':
			i += 2 // the backslash and the byte after it
		default:
			i++
		}
	}
}

// skipValue returns the index just past the value starting at b[i].
func skipValue(b []byte, i int) int {
	switch b[i] {
	case '"':
		return skipString(b, i)
	case '{', '[':
		depth := 0
		for i < len(b) {
			switch b[i] {
			case '"':
				i = skipString(b, i)
				continue
			case '{', '[':
				depth++
			case '}', ']':
				depth--
				if depth == 0 {
					return i + 1
				}
			}
			i++
		}
		return i
	}
	for i < len(b) {
		switch b[i] {
		case ',', '}', ']', ' ', '\t', '\r', '\n':
			return i
		}
		i++
	}
	return i
}

// needsUnquote reports whether the raw string body s (valid JSON) holds
// an escape or a byte sequence that is not valid UTF-8.
func needsUnquote(s []byte) bool {
	for i := 0; i < len(s); {
		c := s[i]
		if c == '\\' {
			return true
		}
		if c < utf8.RuneSelf {
			i++
			continue
		}
		r, size := utf8.DecodeRune(s[i:])
		if r == utf8.RuneError && size == 1 {
			return true
		}
		i += size
	}
	return false
}

// unquote appends the decoded raw string body s (valid JSON) to dst, the
// way encoding/json decodes strings.
func unquote(dst, s []byte) []byte {
	for i := 0; i < len(s); {
		c := s[i]
		switch {
		case c == '\\':
			switch s[i+1] {
			case '"', '\\', '/':
				dst = append(dst, s[i+1])
			case 'b':
				dst = append(dst, '\b')
			case 'f':
				dst = append(dst, '\f')
			case 'n':
				dst = append(dst, '\n')
			case 'r':
				dst = append(dst, '\r')
			case 't':
				dst = append(dst, '\t')
			case 'u':
				rr := hex4(s[i+2:])
				i += 6
				if utf16.IsSurrogate(rr) {
					if i+6 <= len(s) && s[i] == '\\' && s[i+1] == 'u' {
						if dec := utf16.DecodeRune(rr, hex4(s[i+2:])); dec != unicode.ReplacementChar {
							dst = utf8.AppendRune(dst, dec)
							i += 6
							continue
						}
					}
					rr = unicode.ReplacementChar
				}
				dst = utf8.AppendRune(dst, rr)
				continue
			}
			i += 2
		case c < utf8.RuneSelf:
			dst = append(dst, c)
			i++
		default:
			r, size := utf8.DecodeRune(s[i:])
			if r == utf8.RuneError && size == 1 {
				dst = utf8.AppendRune(dst, unicode.ReplacementChar)
			} else {
				dst = append(dst, s[i:i+size]...)
			}
			i += size
		}
	}
	return dst
}

// hex4 decodes four hex digits (valid JSON guarantees them).
func hex4(b []byte) rune {
	var r rune
	for _, c := range b[:4] {
		switch {
		case '0' <= c && c <= '9':
			c -= '0'
		case 'a' <= c && c <= 'f':
			c = c - 'a' + 10
		default:
			c = c - 'A' + 10
		}
		r = r<<4 | rune(c)
	}
	return r
}
