package svmlight

import (
	"bufio"
	"bytes"
	"fmt"
	"io"
	"strconv"
)

// A MapEntry is one line of a feature map: a column and the feature it
// stands for.
type MapEntry struct {
	Index   int    // 0-based column number
	Feature string // the feature key
	Docs    int64  // number of training documents that contain the feature
}

// WriteFeatureMap writes entries to w, in the given order, one line each:
//
//	index<TAB>feature<TAB>document count
//
// where index is Index+base. In the feature, backslash, tab, newline and
// carriage return are written as \\, \t, \n and \r so that every line has
// exactly three fields; ReadFeatureMap undoes this. Several entries may share
// an index (as features that collide in one hashing bucket do). base must be
// 0 or 1; negative indices and document counts are errors.
func WriteFeatureMap(w io.Writer, base int, entries []MapEntry) error {
	if base != 0 && base != 1 {
		return fmt.Errorf("svmlight: index base must be 0 or 1, not %d", base)
	}
	bw := bufio.NewWriterSize(w, 64<<10)
	var b []byte
	for i, e := range entries {
		if e.Index < 0 {
			return fmt.Errorf("svmlight: feature map entry %d (%q): index %d is negative", i, e.Feature, e.Index)
		}
		if e.Docs < 0 {
			return fmt.Errorf("svmlight: feature map entry %d (%q): document count %d is negative", i, e.Feature, e.Docs)
		}
		b = strconv.AppendInt(b[:0], int64(e.Index+base), 10)
		b = append(b, '\t')
		b = appendEscaped(b, e.Feature, false)
		b = append(b, '\t')
		b = strconv.AppendInt(b, e.Docs, 10)
		b = append(b, '\n')
		if _, err := bw.Write(b); err != nil {
			return err
		}
	}
	return bw.Flush()
}

// ReadFeatureMap reads a feature map written by WriteFeatureMap, with the
// same base. A malformed line is reported as a *ParseError naming the file
// (name), line and column: a line without exactly three tab-separated fields,
// an index that is not decimal digits or is below base, an unknown escape in
// the feature, or a document count that is not decimal digits. A trailing
// carriage return on a line is ignored.
func ReadFeatureMap(r io.Reader, name string, base int) ([]MapEntry, error) {
	if base != 0 && base != 1 {
		return nil, fmt.Errorf("svmlight: index base must be 0 or 1, not %d", base)
	}
	br := bufio.NewReaderSize(r, 64<<10)
	var (
		buf     []byte
		entries []MapEntry
		lineNo  int64
	)
	perr := func(col int, err error) error {
		return &ParseError{File: name, Line: lineNo, Column: col + 1, Err: err}
	}
	for {
		line, ok, err := readLine(br, buf)
		buf = line[:0]
		if err != nil {
			return entries, err
		}
		if !ok {
			return entries, nil
		}
		lineNo++
		t1 := bytes.IndexByte(line, '\t')
		if t1 < 0 {
			return entries, perr(len(line), fmt.Errorf("%w: want index<TAB>feature<TAB>document count", ErrFields))
		}
		t2 := bytes.IndexByte(line[t1+1:], '\t')
		if t2 < 0 {
			return entries, perr(len(line), fmt.Errorf("%w: want index<TAB>feature<TAB>document count", ErrFields))
		}
		t2 += t1 + 1
		if t3 := bytes.IndexByte(line[t2+1:], '\t'); t3 >= 0 {
			return entries, perr(t2+1+t3, fmt.Errorf("%w: more than three tab-separated fields", ErrFields))
		}
		ix, ok := parseIndex(line[:t1])
		if !ok {
			return entries, perr(0, fmt.Errorf("%w %q", ErrIndex, line[:t1]))
		}
		if ix < base {
			return entries, perr(0, fmt.Errorf("%w: %d < %d", ErrBase, ix, base))
		}
		feat, at, ok := unescape(line[t1+1:t2], false, true)
		if !ok {
			return entries, perr(t1+1+at, fmt.Errorf("%w in feature %q", ErrEscape, line[t1+1:t2]))
		}
		docs, ok := parseIndex(line[t2+1:])
		if !ok {
			return entries, perr(t2+1, fmt.Errorf("%w %q", ErrDocs, line[t2+1:]))
		}
		entries = append(entries, MapEntry{Index: ix - base, Feature: feat, Docs: int64(docs)})
	}
}
