package corpus

import (
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
)

func (r *Reader) nextCSV() error {
	r.csvStart = r.cr.InputOffset()
	r.tape.start = r.csvStart
	row, err := r.cr.Read()
	if errors.Is(err, ErrRecordTooLong) {
		return r.tooLong(r.csvLine + 1)
	}
	r.raw = r.tape.record(r.csvStart, r.cr.InputOffset())
	if err != nil {
		return r.csvError(err, row)
	}
	if int64(len(r.raw)) > r.maxRecord {
		first, _ := r.cr.FieldPos(0)
		return r.tooLong(int64(first))
	}
	if len(row) > 0 {
		last, _ := r.cr.FieldPos(len(row) - 1)
		r.csvLine = int64(last)
	}
	if r.width == 0 {
		r.width = len(row)
		r.cr.FieldsPerRecord = len(row)
	}
	line, _ := r.cr.FieldPos(0)
	r.rec.Line = int64(line)
	r.scratch = r.scratch[:0]
	r.offs = r.offs[:0]
	for _, f := range row {
		r.scratch = append(r.scratch, f...)
		r.offs = append(r.offs, len(r.scratch))
	}
	r.fields = r.fields[:0]
	start := 0
	for _, end := range r.offs {
		r.fields = append(r.fields, r.scratch[start:end:end])
		start = end
	}
	if r.textCols != nil {
		r.fill(r.fields)
	}
	return nil
}

// csvError turns an error from encoding/csv into a *ParseError with the
// file name, and passes read errors through.
func (r *Reader) csvError(err error, row []string) error {
	if err == io.EOF {
		return err
	}
	var pe *csv.ParseError
	if !errors.As(err, &pe) {
		return err
	}
	if pe.Err == csv.ErrFieldCount {
		// Point at the first surplus field, or at the last field
		// present when fields are missing.
		k := r.width
		if len(row) < r.width {
			k = len(row) - 1
		}
		line, col := r.cr.FieldPos(k)
		return &ParseError{
			File:   r.name,
			Line:   int64(line),
			Column: r.column(int64(line), col),
			Err:    fmt.Errorf("%w: found %d, expected %d", ErrFieldCount, len(row), r.width),
		}
	}
	e := pe.Err
	if pe.StartLine != pe.Line {
		// An unbalanced quote runs on to the end of the input; say
		// where the record began.
		e = fmt.Errorf("%w (in the record that starts on line %d)", e, pe.StartLine)
	}
	return &ParseError{
		File:   r.name,
		Line:   int64(pe.Line),
		Column: r.column(int64(pe.Line), pe.Column),
		Err:    e,
	}
}

// csvTape records the bytes encoding/csv reads, so that a record can be
// returned as stored (for rejects). Bytes before the current record are
// dropped now and then.
type csvTape struct {
	r    io.Reader
	buf  []byte
	base int64 // input offset of buf[0]
	// start is the input offset where the record being read starts, and
	// limit the most bytes a record may take: once the tape holds more
	// than that from start on, Read fails with ErrRecordTooLong, so that
	// an endless record stops within a buffer's length of the bound
	// (nextCSV checks the exact length of the records read).
	start, limit int64
}

func (t *csvTape) Read(p []byte) (int, error) {
	if t.base+int64(len(t.buf))-t.start > t.limit {
		return 0, ErrRecordTooLong
	}
	n, err := t.r.Read(p)
	t.buf = append(t.buf, p[:n]...)
	return n, err
}

// record returns the bytes from offset start to end without a final line
// break, and forgets what lies before start when that is a lot.
func (t *csvTape) record(start, end int64) []byte {
	if drop := start - t.base; drop > 1<<16 {
		n := copy(t.buf, t.buf[drop:])
		t.buf = t.buf[:n]
		t.base = start
	}
	lo, hi := start-t.base, end-t.base
	if lo < 0 {
		lo = 0
	}
	if hi > int64(len(t.buf)) {
		hi = int64(len(t.buf))
	}
	if hi < lo {
		hi = lo
	}
	b := t.buf[lo:hi]
	b = bytes.TrimSuffix(b, []byte("\n"))
	b = bytes.TrimSuffix(b, []byte("\r"))
	return b
}
