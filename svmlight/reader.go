package svmlight

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
)

// Errors wrapped by ParseError.Err; test for them with errors.Is.
var (
	ErrLabel  = errors.New("bad label")
	ErrIndex  = errors.New("bad index")
	ErrOrder  = errors.New("index not ascending")
	ErrValue  = errors.New("bad value")
	ErrBase   = errors.New("index below the index base")
	ErrFields = errors.New("wrong number of fields")
	ErrEscape = errors.New("bad escape")
	ErrDocs   = errors.New("bad document count")
)

// A ParseError reports where in its input a row or feature-map line is
// malformed.
type ParseError struct {
	File   string // name given to NewReader or ReadFeatureMap
	Line   int64  // 1-based line number
	Column int    // 1-based byte column where the offending field starts
	Err    error  // what is wrong, wrapping one of the Err variables
}

// Error returns "file:line:col: message", or "line:col: message" when File
// is empty.
func (e *ParseError) Error() string {
	if e.File == "" {
		return fmt.Sprintf("%d:%d: %v", e.Line, e.Column, e.Err)
	}
	return fmt.Sprintf("%s:%d:%d: %v", e.File, e.Line, e.Column, e.Err)
}

// Unwrap returns e.Err.
func (e *ParseError) Unwrap() error { return e.Err }

// A Row is one parsed row.
type Row struct {
	Label   float64
	Indices []int     // 0-based column numbers, strictly ascending
	Values  []float64 // the value of each index
	ID      string    // the text after "#", unescaped; "" when absent
}

// A Reader reads SVMlight rows from an input, one per Scan, in the shape of
// bufio.Scanner. Lines may be of any length.
//
// A line is a label, then index:value pairs with strictly ascending indices
// of at least the index base, separated by spaces or tabs; an optional "#"
// starts the comment, which Reader returns, after one leading space and with
// Writer's escapes undone, as the row's ID. Labels and values are read with
// strconv.ParseFloat and must be finite; indices are decimal digits only. A
// trailing carriage return is ignored, and so are lines that are blank or
// begin with "#".
type Reader struct {
	br   *bufio.Reader
	name string
	base int
	line int64
	buf  []byte
	row  Row
	err  error
	done bool
}

// NewReader returns a Reader that reads rows from r. name is used in error
// messages. base is the number that stands for column 0 in the input: 1 or 0;
// any other value panics.
func NewReader(r io.Reader, name string, base int) *Reader {
	checkBase(base)
	return &Reader{br: bufio.NewReaderSize(r, 64<<10), name: name, base: base}
}

// readLine reads one line, of any length, into buf and returns it without
// its line ending. ok is false at the end of the input.
func readLine(br *bufio.Reader, buf []byte) (line []byte, ok bool, err error) {
	buf = buf[:0]
	for {
		frag, err := br.ReadSlice('\n')
		buf = append(buf, frag...)
		if err == bufio.ErrBufferFull {
			continue
		}
		if err == io.EOF {
			if len(buf) == 0 {
				return buf, false, nil
			}
			err = nil
		}
		if err != nil {
			return buf, false, err
		}
		n := len(buf)
		if n > 0 && buf[n-1] == '\n' {
			n--
		}
		if n > 0 && buf[n-1] == '\r' {
			n--
		}
		return buf[:n], true, nil
	}
}

// Scan advances to the next row, which is then available through Row. It
// returns false at the end of the input or at the first error; Err tells
// which.
func (r *Reader) Scan() bool {
	if r.done {
		return false
	}
	for {
		line, ok, err := readLine(r.br, r.buf)
		r.buf = line[:cap(line)][:0]
		if err != nil {
			r.err, r.done = err, true
			return false
		}
		if !ok {
			r.done = true
			return false
		}
		r.line++
		start := skipSpace(line, 0)
		if start == len(line) || line[start] == '#' {
			continue
		}
		if err := r.parse(line, start); err != nil {
			r.err, r.done = err, true
			return false
		}
		return true
	}
}

// Row returns the row read by the last successful Scan. The Row and its
// slices are reused by the next Scan.
func (r *Reader) Row() *Row { return &r.row }

// Err returns the first error met by Scan: a *ParseError for malformed input,
// or the error of the underlying reader. It is nil at a clean end of input.
func (r *Reader) Err() error { return r.err }

func isSpace(c byte) bool { return c == ' ' || c == '\t' }

func skipSpace(b []byte, i int) int {
	for i < len(b) && isSpace(b[i]) {
		i++
	}
	return i
}

func tokenEnd(b []byte, i int) int {
	for i < len(b) && !isSpace(b[i]) {
		i++
	}
	return i
}

func (r *Reader) perr(col int, err error) error {
	return &ParseError{File: r.name, Line: r.line, Column: col + 1, Err: err}
}

func parseFinite(b []byte) (float64, bool) {
	v, err := strconv.ParseFloat(string(b), 64)
	if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, false
	}
	return v, true
}

// parseIndex parses a non-empty run of decimal digits.
func parseIndex(b []byte) (int, bool) {
	if len(b) == 0 || len(b) > 18 {
		return 0, false
	}
	n := 0
	for _, c := range b {
		if c < '0' || c > '9' {
			return 0, false
		}
		n = n*10 + int(c-'0')
	}
	return n, true
}

func (r *Reader) parse(line []byte, i int) error {
	row := &r.row
	row.Indices = row.Indices[:0]
	row.Values = row.Values[:0]
	row.ID = ""
	data := line
	for j, c := range line {
		if c == '#' {
			data = line[:j]
			com := line[j+1:]
			if len(com) > 0 && com[0] == ' ' {
				com = com[1:]
			}
			row.ID, _, _ = unescape(com, true, false)
			break
		}
	}
	e := tokenEnd(data, i)
	label, ok := parseFinite(data[i:e])
	if !ok {
		return r.perr(i, fmt.Errorf("%w %q", ErrLabel, data[i:e]))
	}
	row.Label = label
	prev := -1
	for i = skipSpace(data, e); i < len(data); i = skipSpace(data, e) {
		e = tokenEnd(data, i)
		tok := data[i:e]
		colon := -1
		for k, c := range tok {
			if c == ':' {
				colon = k
				break
			}
		}
		if colon < 0 {
			return r.perr(i, fmt.Errorf("%w: %q is not index:value", ErrIndex, tok))
		}
		ix, ok := parseIndex(tok[:colon])
		if !ok {
			return r.perr(i, fmt.Errorf("%w %q", ErrIndex, tok[:colon]))
		}
		if ix < r.base {
			return r.perr(i, fmt.Errorf("%w: %d < %d", ErrBase, ix, r.base))
		}
		ix -= r.base
		if ix <= prev {
			return r.perr(i, fmt.Errorf("%w: %d after %d", ErrOrder, ix+r.base, prev+r.base))
		}
		v, ok := parseFinite(tok[colon+1:])
		if !ok {
			return r.perr(i+colon+1, fmt.Errorf("%w %q", ErrValue, tok[colon+1:]))
		}
		prev = ix
		row.Indices = append(row.Indices, ix)
		row.Values = append(row.Values, v)
	}
	return nil
}
