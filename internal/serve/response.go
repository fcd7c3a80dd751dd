package serve

import (
	"math"
	"strconv"
	"unicode/utf8"
)

// rowOut is one row of a response.
type rowOut struct {
	id       string
	indices  []int
	values   []float64
	unseen   int
	features int
}

// appendResponse appends the JSON response for rows encoded with the spec
// of the given fingerprint. Indices are written from base.
func appendResponse(dst []byte, fingerprint string, rows []rowOut, base int) []byte {
	dst = append(dst, `{"spec":`...)
	dst = appendJSONString(dst, fingerprint)
	dst = append(dst, `,"rows":[`...)
	for i := range rows {
		r := &rows[i]
		if i > 0 {
			dst = append(dst, ',')
		}
		dst = append(dst, `{"id":`...)
		dst = appendJSONString(dst, r.id)
		dst = append(dst, `,"indices":[`...)
		for j, c := range r.indices {
			if j > 0 {
				dst = append(dst, ',')
			}
			dst = strconv.AppendInt(dst, int64(c+base), 10)
		}
		dst = append(dst, `],"values":[`...)
		// Weights repeat within a row (terms of equal count and document
		// frequency): the bytes of the value before are copied, not
		// formatted again.
		var prev uint64
		pstart, pend := 0, 0
		for j, v := range r.values {
			if j > 0 {
				dst = append(dst, ',')
			}
			if bits := math.Float64bits(v); j > 0 && bits == prev {
				dst = append(dst, dst[pstart:pend]...)
			} else {
				prev, pstart = bits, len(dst)
				dst = appendValue(dst, v)
				pend = len(dst)
			}
		}
		dst = append(dst, `],"unseen":`...)
		dst = strconv.AppendInt(dst, int64(r.unseen), 10)
		dst = append(dst, `,"features":`...)
		dst = strconv.AppendInt(dst, int64(r.features), 10)
		dst = append(dst, '}')
	}
	dst = append(dst, "]}\n"...)
	return dst
}

// appendValue appends v in shortest round-trip form, the bytes of
// strconv.AppendFloat(dst, v, 'g', -1, 64), which is also what the
// SVMlight writer writes; for every finite value it is a JSON number
// (RFC 8259 section 6). Whole values below 10^6 in magnitude, which that
// form writes as plain integers, take the cheaper integer path.
func appendValue(dst []byte, v float64) []byte {
	if v > -1e6 && v < 1e6 {
		if i := int64(v); float64(i) == v && (i != 0 || 1/v > 0) {
			return strconv.AppendInt(dst, i, 10)
		}
	}
	return strconv.AppendFloat(dst, v, 'g', -1, 64)
}

const hexDigits = "0123456789abcdef"

// safe marks the bytes a JSON string holds as they are: printable ASCII
// other than the quote and the backslash.
var safe = func() (t [256]bool) {
	for c := 0x20; c < 0x80; c++ {
		t[c] = c != '"' && c != '\\'
	}
	return t
}()

// appendJSONString appends s as a JSON string (RFC 8259 section 7) with
// the bytes encoding/json writes when it does not escape HTML: quote,
// backslash and control characters escaped, each byte of invalid UTF-8 as
// \ufffd, and U+2028 and U+2029 escaped for JavaScript readers.
func appendJSONString(dst []byte, s string) []byte {
	dst = append(dst, '"')
	start := 0
	for i := 0; i < len(s); {
		c := s[i]
		if c < utf8.RuneSelf {
			if safe[c] {
				i++
				continue
			}
			dst = append(dst, s[start:i]...)
			switch c {
			case '"', '\\':
				dst = append(dst, '\\', c)
			case '\b':
				dst = append(dst, '\\', 'b')
			case '\f':
				dst = append(dst, '\\', 'f')
			case '\n':
				dst = append(dst, '\\', 'n')
			case '\r':
				dst = append(dst, '\\', 'r')
			case '\t':
				dst = append(dst, '\\', 't')
			default:
				dst = append(dst, '\\', 'u', '0', '0', hexDigits[c>>4], hexDigits[c&0xf])
			}
			i++
			start = i
			continue
		}
		r, n := utf8.DecodeRuneInString(s[i:])
		switch {
		case r == utf8.RuneError && n == 1:
			dst = append(dst, s[start:i]...)
			dst = append(dst, `\ufffd`...)
		case r == '\u2028' || r == '\u2029':
			dst = append(dst, s[start:i]...)
			dst = append(dst, '\\', 'u', '2', '0', '2', hexDigits[r&0xf])
		default:
			i += n
			continue
		}
		i += n
		start = i
	}
	dst = append(dst, s[start:]...)
	return append(dst, '"')
}
