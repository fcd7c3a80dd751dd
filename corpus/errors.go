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

// Errors of a TSV or CSV file whose header does not fit the fields named
// in Options: problems of the file, not of the options (an option no
// file could satisfy, such as column number 0, is a plain error).
var (
	// ErrNoHeader means a TSV or CSV file read with a header row is empty.
	ErrNoHeader = errors.New("empty file, expected a header row")
	// ErrNoField means the header lacks a named field, or a column
	// number is past the file's last column.
	ErrNoField = errors.New("field not in the file")
	// ErrAmbiguousField means the header has a named field twice.
	ErrAmbiguousField = errors.New("field in the header twice")
	// ErrHeaderName means a field names a header cell that is not valid
	// UTF-8. Field names are kept in specs as text, where such a name
	// cannot be written as it is; it comes as a *ParseError with the
	// cell's position, and the column can be named by its number.
	ErrHeaderName = errors.New("header name is not valid UTF-8")
)

// headerError is an error of the header with its own message; errors.Is
// matches its kind (ErrNoHeader, ErrNoField, ErrAmbiguousField).
type headerError struct {
	msg  string
	kind error
}

func (e *headerError) Error() string { return e.msg }
func (e *headerError) Unwrap() error { return e.kind }

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
