package corpus

import (
	"bytes"
	"fmt"
)

func (r *Reader) nextTSV() error {
	line, err := r.readLine()
	if err != nil {
		return err
	}
	r.fields = splitTab(line, r.fields[:0])
	if r.width == 0 {
		r.width = len(r.fields)
	}
	if len(r.fields) != r.width {
		return r.tsvFieldCount()
	}
	if r.opt.TSVEscapes && bytes.IndexByte(line, '\\') >= 0 {
		// Unescaping works in place: keep the record as stored.
		r.rawBuf = append(r.rawBuf[:0], line...)
		r.raw = r.rawBuf
		for i, f := range r.fields {
			r.fields[i] = unescapeTSV(f)
		}
	}
	r.rec.Line = r.line
	if r.textCols != nil {
		r.fill(r.fields)
	}
	return nil
}

// tsvFieldCount reports a row with the wrong number of fields. The column
// is where the first surplus field starts, or, when fields are missing,
// where the last field present starts.
func (r *Reader) tsvFieldCount() error {
	k := r.width
	if len(r.fields) < r.width {
		k = len(r.fields) - 1
	}
	col := 1
	for _, f := range r.fields[:k] {
		col += len(f) + 1
	}
	return &ParseError{
		File:   r.name,
		Line:   r.line,
		Column: r.column(r.line, col),
		Err:    fmt.Errorf("%w: found %d, expected %d", ErrFieldCount, len(r.fields), r.width),
	}
}

// splitTab appends the tab-separated fields of line to dst.
func splitTab(line []byte, dst [][]byte) [][]byte {
	for {
		i := bytes.IndexByte(line, '\t')
		if i < 0 {
			return append(dst, line)
		}
		dst = append(dst, line[:i:i])
		line = line[i+1:]
	}
}

// unescapeTSV decodes \t, \n, \r and \\ in place.
func unescapeTSV(b []byte) []byte {
	i := bytes.IndexByte(b, '\\')
	if i < 0 {
		return b
	}
	w := i
	for j := i; j < len(b); j++ {
		c := b[j]
		if c == '\\' && j+1 < len(b) {
			switch b[j+1] {
			case 't':
				c = '\t'
				j++
			case 'n':
				c = '\n'
				j++
			case 'r':
				c = '\r'
				j++
			case '\\':
				j++
			}
		}
		b[w] = c
		w++
	}
	return b[:w]
}
