package svmlight

import (
	"bufio"
	"fmt"
	"io"
	"math"
	"math/bits"
	"slices"
	"strconv"
)

// A Writer writes rows in the SVMlight text format, one line per row:
//
//	label index:value index:value ...
//
// optionally followed by " # id". Indices are written strictly ascending,
// shifted by the index base; labels and values are written in the shortest
// form that reads back to the same float64 (strconv's 'g' format with
// precision -1, for example 1, -0.5, 1e-300, 1e+21). Plain rows, without
// ids, are what liblinear's readers accept.
//
// Writes are buffered: call Flush when done, and check its error.
type Writer struct {
	bw      *bufio.Writer
	base    int
	withIDs bool
	buf     []byte
	rows    int64
}

// NewWriter returns a Writer that writes to w. base is the number written
// for column 0: 1 (the usual SVMlight and liblinear convention) or 0; any
// other value panics. When withIDs is true each row ends with " # " and the
// row's id (see WriteRow).
func NewWriter(w io.Writer, base int, withIDs bool) *Writer {
	checkBase(base)
	return &Writer{bw: bufio.NewWriterSize(w, 64<<10), base: base, withIDs: withIDs, buf: make([]byte, 0, 1024)}
}

func checkBase(base int) {
	if base != 0 && base != 1 {
		panic("svmlight: index base must be 0 or 1, not " + strconv.Itoa(base))
	}
}

// WriteRow writes one row. indices are 0-based column numbers and must be
// strictly ascending and non-negative; values holds the value of each index
// and must have the same length. Every given pair is written, zeros included:
// removing zeros is the caller's choice. The label and every value must be
// finite. An invalid row is reported as an error and nothing of it is
// written.
//
// When the Writer was made with withIDs, " # " and id follow the pairs (just
// " #" when id is empty). In id, backslash, tab, newline and carriage return
// are written as \\, \t, \n and \r, and every other ASCII control character
// as \xHH, so that the id stays on its line; Reader undoes this.
//
// WriteRow does not allocate once its internal buffer has grown to the
// longest row.
func (w *Writer) WriteRow(label float64, indices []int, values []float64, id string) error {
	if len(indices) != len(values) {
		return fmt.Errorf("svmlight: row %d: %d indices but %d values", w.rows+1, len(indices), len(values))
	}
	if math.IsNaN(label) || math.IsInf(label, 0) {
		return fmt.Errorf("svmlight: row %d: label %v is not finite", w.rows+1, label)
	}
	prev := -1
	for i, ix := range indices {
		if ix <= prev {
			if ix < 0 {
				return fmt.Errorf("svmlight: row %d: index %d is negative", w.rows+1, ix)
			}
			return fmt.Errorf("svmlight: row %d: index %d follows %d; indices must be strictly ascending", w.rows+1, ix, prev)
		}
		prev = ix
		if v := values[i]; math.IsNaN(v) || math.IsInf(v, 0) {
			return fmt.Errorf("svmlight: row %d: value %v of index %d is not finite", w.rows+1, v, ix)
		}
	}
	b := AppendRow(w.buf[:0], label, indices, values, w.base)
	if w.withIDs {
		b = append(b, " #"...)
		if id != "" {
			b = append(b, ' ')
			b = appendEscaped(b, id, true)
		}
	}
	b = append(b, '\n')
	w.buf = b
	if _, err := w.bw.Write(b); err != nil {
		return err
	}
	w.rows++
	return nil
}

// Flush writes any buffered rows to the underlying io.Writer.
func (w *Writer) Flush() error {
	return w.bw.Flush()
}

// Rows returns the number of rows written so far by WriteRow.
func (w *Writer) Rows() int64 {
	return w.rows
}

// AppendRow appends the SVMlight form of one row to dst, without a trailing
// newline, and returns the extended buffer: the label, then " index:value"
// for each pair with index+base as the number. It does not check its input;
// WriteRow does.
func AppendRow(dst []byte, label float64, indices []int, values []float64, base int) []byte {
	dst = appendValue(dst, label)
	// The common entry, a column of up to 20 digits and a count of 1 to
	// 9, is written in place: room for every entry is made once per row.
	const room = len(" :1") + 20
	if cap(dst)-len(dst) < len(indices)*room {
		dst = slices.Grow(dst, len(indices)*room)
	}
	b := dst[:cap(dst)]
	n := len(dst)
	for i, ix := range indices {
		c, v := ix+base, values[i]
		if c < 0 || !(v > 0 && v < 10 && v == float64(int(v))) {
			return appendEntries(b[:n], indices[i:], values[i:], base)
		}
		b[n] = ' '
		n = putUint(b, n+1, uint64(c))
		b[n] = ':'
		b[n+1] = '0' + byte(v)
		n += 2
	}
	return b[:n]
}

// appendEntries appends " index:value" for each entry, any index and value.
func appendEntries(dst []byte, indices []int, values []float64, base int) []byte {
	for i, ix := range indices {
		dst = append(dst, ' ')
		if c := ix + base; c >= 0 {
			dst = appendUint(dst, uint64(c))
		} else {
			dst = strconv.AppendInt(dst, int64(c), 10)
		}
		dst = append(dst, ':')
		if v := values[i]; v > 0 && v < 10 && v == float64(int(v)) {
			dst = append(dst, '0'+byte(v)) // a count of 1 to 9
		} else {
			dst = appendValue(dst, v)
		}
	}
	return dst
}

// digitPairs holds "00" to "99".
const digitPairs = "00010203040506070809101112131415161718192021222324252627282930313233343536373839" +
	"40414243444546474849505152535455565758596061626364656667686970717273747576777879" +
	"8081828384858687888990919293949596979899"

// pow10 holds 10^0 to 10^19.
var pow10 = [20]uint64{1, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12,
	1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19}

// decimalLen returns the number of decimal digits of u (1 for 0). 1233/4096
// is just above log10(2), so t is log10(u) rounded down or one less.
func decimalLen(u uint64) int {
	t := bits.Len64(u|1) * 1233 >> 12
	if u >= pow10[t] {
		t++
	}
	return max(t, 1)
}

// putUint writes u in decimal into b at n, two digits at a time from the
// right, and returns the index after it. b must have room.
func putUint(b []byte, n int, u uint64) int {
	end := n + decimalLen(u)
	i := end
	for u >= 100 {
		q := u / 100
		r := (u - q*100) * 2
		i -= 2
		b[i], b[i+1] = digitPairs[r], digitPairs[r+1]
		u = q
	}
	if u >= 10 {
		b[i-2], b[i-1] = digitPairs[u*2], digitPairs[u*2+1]
	} else {
		b[i-1] = '0' + byte(u)
	}
	return end
}

// appendUint appends u in decimal (as strconv.AppendUint does, without its
// general-base dispatch).
func appendUint(dst []byte, u uint64) []byte {
	n := len(dst)
	dst = slices.Grow(dst, 20)
	return dst[:putUint(dst[:cap(dst)], n, u)]
}

// appendValue appends v in shortest round-trip form, exactly as
// strconv.AppendFloat(dst, v, 'g', -1, 64) does. Whole numbers below 10^6
// in magnitude, which that form writes as plain integers, take a faster
// integer path: counts are the common case.
func appendValue(dst []byte, v float64) []byte {
	if v > -1e6 && v < 1e6 {
		if i := int64(v); float64(i) == v && (i != 0 || !math.Signbit(v)) {
			return strconv.AppendInt(dst, i, 10)
		}
	}
	return strconv.AppendFloat(dst, v, 'g', -1, 64)
}
