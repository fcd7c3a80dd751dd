package stopwords

import (
	"bufio"
	"bytes"
	"errors"
	"fmt"
	"io"
	"strconv"
	"unicode"
	"unicode/utf8"
)

// Errors reported inside a [ParseError].
var (
	ErrInvalidUTF8 = errors.New("invalid UTF-8")
	ErrTwoWords    = errors.New("more than one word on the line")
)

// A ParseError reports a problem in a stop list file, with its position.
// Line and Column are 1-based; Column counts bytes, like encoding/csv.
type ParseError struct {
	File   string // name given to ReadList
	Line   int    // line of the problem
	Column int    // byte column of the problem within the line
	Err    error  // what is wrong
}

// Error returns "file:line:col: msg".
func (e *ParseError) Error() string {
	pos := strconv.Itoa(e.Line) + ":" + strconv.Itoa(e.Column)
	if e.File != "" {
		pos = e.File + ":" + pos
	}
	return pos + ": " + e.Err.Error()
}

// Unwrap returns the underlying error.
func (e *ParseError) Unwrap() error { return e.Err }

// ReadList reads a stop list: UTF-8 text, one word per line. A '#' starts a
// comment that runs to the end of the line, space around a word is trimmed,
// and blank lines are ignored. A leading byte order mark is skipped. Words
// are returned in file order, duplicates included. name is used in errors.
//
// A line with invalid UTF-8 (even inside a comment) or with two words
// separated by space yields a *ParseError.
func ReadList(r io.Reader, name string) ([]string, error) {
	br := bufio.NewReader(r)
	var words []string
	for lineNo := 1; ; lineNo++ {
		line, err := br.ReadBytes('\n')
		if len(line) > 0 {
			if lineNo == 1 {
				line = bytes.TrimPrefix(line, []byte("\uFEFF"))
			}
			w, perr := parseLine(line)
			if perr != nil {
				perr.File, perr.Line = name, lineNo
				return words, perr
			}
			if w != "" {
				words = append(words, w)
			}
		}
		if err == io.EOF {
			return words, nil
		}
		if err != nil {
			return words, fmt.Errorf("%s:%d: %w", name, lineNo, err)
		}
	}
}

// parseLine returns the word on one line ("" for none), or an error with
// its column set.
func parseLine(line []byte) (string, *ParseError) {
	for i := 0; i < len(line); {
		r, size := utf8.DecodeRune(line[i:])
		if r == utf8.RuneError && size <= 1 {
			return "", &ParseError{Column: i + 1, Err: ErrInvalidUTF8}
		}
		i += size
	}
	body := line
	if i := bytes.IndexByte(body, '#'); i >= 0 {
		body = body[:i]
	}
	start := len(body) - len(bytes.TrimLeftFunc(body, unicode.IsSpace))
	w := bytes.TrimSpace(body)
	if i := bytes.IndexFunc(w, unicode.IsSpace); i >= 0 {
		return "", &ParseError{Column: start + i + 1, Err: ErrTwoWords}
	}
	return string(w), nil
}
