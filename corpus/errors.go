package corpus

import (
	"errors"
	"strconv"
	"strings"
)

// Errors wrapped by [ParseError].
var (
	// ErrFieldCount means a TSV or CSV row has more or fewer fields than
	// the header (or, without a header, the first row). The ParseError's
	// position is the start of the first surplus field, or of the last
	// field present when fields are missing; its message gives both counts.
	ErrFieldCount = errors.New("wrong number of fields")
	// ErrMissingField means a JSON object lacks a requested key.
	ErrMissingField = errors.New("missing field")
	// ErrNotObject means a JSON Lines line holds valid JSON that is not an object.
	ErrNotObject = errors.New("not a JSON object")
	// ErrWrongType means a JSON value has a type the field cannot take.
	ErrWrongType = errors.New("wrong type")
	// ErrRecordTooLong means a record holds more bytes than
	// Options.MaxRecord. Reading cannot go on past it.
	ErrRecordTooLong = errors.New("record too long")
)

// A ParseError reports a problem in a corpus file with its position.
// Line and Column are 1-based; Column counts bytes from the start of the
// line as stored in the file (after gzip decompression). A zero Line or
// Column, or an empty File or Field, means that part is not known.
type ParseError struct {
	File   string // file name as given to Open or NewReader
	Line   int64  // line of the problem
	Column int    // byte column of the problem
	Field  string // field name as requested in Options, if the problem is in one field
	Err    error  // the problem itself
}

// Error returns "file:line:col: field "x": msg", leaving out unknown parts.
func (e *ParseError) Error() string {
	var b strings.Builder
	b.WriteString(e.File)
	if e.Line > 0 {
		if e.File != "" {
			b.WriteByte(':')
		} else {
			b.WriteString("line ")
		}
		b.WriteString(strconv.FormatInt(e.Line, 10))
		if e.Column > 0 {
			b.WriteByte(':')
			b.WriteString(strconv.Itoa(e.Column))
		}
	}
	if b.Len() > 0 {
		b.WriteString(": ")
	}
	if e.Field != "" {
		b.WriteString("field ")
		b.WriteString(strconv.Quote(e.Field))
		b.WriteString(": ")
	}
	if e.Err != nil {
		b.WriteString(e.Err.Error())
	} else {
		b.WriteString("parse error")
	}
	return b.String()
}

// Unwrap returns the underlying error.
func (e *ParseError) Unwrap() error { return e.Err }
