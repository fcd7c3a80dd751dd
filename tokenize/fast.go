package tokenize

import (
	"encoding/binary"
	"math/bits"
	"unicode/utf8"

	"github.com/blevesearch/segment"
)

// segmentFast splits data into stretches of ASCII text, which it segments
// itself (segmentASCII), and the rest, which goes to the segmenter. A
// stretch ends only where UAX #29 always has a boundary (see splitPoint):
// just after a line feed, or just after a space followed by an ASCII
// character, so no word can reach across it.
func (t *Tokenizer) segmentFast(data []byte, fn func([]byte, Kind)) {
	if t.noFastPath {
		t.segment(data, fn)
		return
	}
	for len(data) > 0 {
		// ASCII prefix [0, q).
		q := asciiPrefix(data)
		if q == len(data) {
			t.segmentASCII(data, fn)
			return
		}
		// Last safe cut at or before q: the ASCII text before it is
		// done here.
		c := q
		for c > 0 && !safeCut(data, c) {
			c--
		}
		if c > 0 {
			t.segmentASCII(data[:c], fn)
			data = data[c:]
			q -= c
		}
		// First safe cut after the non-ASCII byte at q: the text up to
		// it goes to the segmenter.
		e := q + 1
		for e < len(data) && !safeCut(data, e) {
			e++
		}
		t.segment(data[:e], fn)
		data = data[e:]
	}
}

// safeCut reports whether UAX #29 always puts a word boundary at i, 0 < i <
// len(data): after a line feed (WB3a), or after a space followed by an
// ASCII character (WB14; WB4 joins only Extend and Format characters, never
// ASCII, to a preceding space).
func safeCut(data []byte, i int) bool {
	c := data[i-1]
	return c == '\n' || c == ' ' && data[i] < utf8.RuneSelf
}

// asciiClass holds the UAX #29 word break classes of ASCII characters as the
// segmenter (Unicode 8.0) has them.
var asciiClass = func() (c [128]uint8) {
	for b := 'a'; b <= 'z'; b++ {
		c[b] = clLetter
		c[b-'a'+'A'] = clLetter | clUpper
	}
	for b := '0'; b <= '9'; b++ {
		c[b] = clDigit
	}
	c['_'] = clExtendNumLet
	c[':'] = clMidLetter                // MidLetter
	c[','], c[';'] = clMidNum, clMidNum // MidNum
	c['.'] = clMidLetter | clMidNum     // MidNumLet
	c['\''] = clMidLetter | clMidNum    // Single_Quote
	return c
}()

const (
	clLetter = 1 << iota
	clDigit
	clExtendNumLet
	clMidLetter
	clMidNum
	clUpper // an upper-case letter (with clLetter)
	clWord  = clLetter | clDigit | clExtendNumLet
)

// segmentASCII emits the words of ASCII text exactly as the segmenter would:
// letters, digits and underscores join (WB5, WB8, WB9, WB10, WB13a, WB13b);
// a MidLetter, MidNumLet or Single_Quote character joins two letters (WB6,
// WB7); a MidNum, MidNumLet or Single_Quote character joins two digits (WB11,
// WB12). A word without letters but with a digit is a Number, any other a
// Letter word (so a run of underscores is a Letter word, as the segmenter
// types it).
func (t *Tokenizer) segmentASCII(d []byte, fn func([]byte, Kind)) {
	n := len(d)
	for i := 0; i < n; {
		if asciiClass[d[i]]&clWord == 0 {
			i++
			continue
		}
		start := i
		var seen uint8
		for {
			// Eight characters at a time while the run goes on, then
			// one at a time.
			for i+8 <= n {
				word, letter, digit, upper := classify8(binary.LittleEndian.Uint64(d[i:]))
				k := 8
				if end := ^word & hiBits; end != 0 {
					k = bits.TrailingZeros64(end) / 8
					m := uint64(1)<<(8*k) - 1
					letter, digit, upper = letter&m, digit&m, upper&m
				}
				if letter != 0 {
					seen |= clLetter
				}
				if digit != 0 {
					seen |= clDigit
				}
				if upper != 0 {
					seen |= clUpper
				}
				i += k
				if k < 8 {
					break
				}
			}
			for i < n && asciiClass[d[i]]&clWord != 0 {
				seen |= asciiClass[d[i]]
				i++
			}
			if i+1 >= n {
				break
			}
			mid, prev, next := asciiClass[d[i]], asciiClass[d[i-1]]&^clUpper, asciiClass[d[i+1]]&^clUpper
			if mid&clMidLetter != 0 && prev == clLetter && next == clLetter ||
				mid&clMidNum != 0 && prev == clDigit && next == clDigit {
				i++
				continue
			}
			break
		}
		if seen&clLetter == 0 && seen&clDigit != 0 {
			t.emit(d[start:i], segment.Number, fn)
			continue
		}
		t.emitASCII(d[start:i], seen&clUpper != 0, fn)
	}
}

// emitASCII is emit for a Letter word of ASCII characters, upper telling
// whether it holds an upper-case letter: such a word needs no case table,
// accent rule or apostrophe folding, and its length in characters is its
// length in bytes.
func (t *Tokenizer) emitASCII(v []byte, upper bool, fn func([]byte, Kind)) {
	if n := len(v); n < t.opt.MinLen || n > t.opt.MaxLen {
		t.stats.DroppedLength++
		return
	}
	tok := v
	if upper && t.caseTable != nil {
		b := append(t.each.a[:0], v...)
		for i, c := range b {
			if 'A' <= c && c <= 'Z' {
				b[i] = c + 'a' - 'A'
			}
		}
		t.each.a = b
		tok = b
	}
	t.stats.Tokens++
	fn(tok, Letter)
}

// hiBits has the high bit of every byte of a word set.
const hiBits = 0x8080808080808080

// byteRange returns the high bit of each byte of x (all ASCII) that lies in
// [a, b]: adding 0x80-a sets a byte's high bit when it is at least a, and
// adding 0x7f-b when it is above b, without carries between bytes.
func byteRange(x uint64, a, b byte) uint64 {
	const ones = 0x0101010101010101
	return (x + ones*uint64(0x80-a)) &^ (x + ones*uint64(0x7f-b)) & hiBits
}

// classify8 returns, for eight ASCII characters, the high bit of each one
// that is a word character (letter, digit, underscore), a letter, a digit,
// and an upper-case letter: the classes of asciiClass that segmentASCII
// reads, eight at a time.
func classify8(x uint64) (word, letter, digit, upper uint64) {
	const ones = 0x0101010101010101
	letter = byteRange(x|ones*0x20, 'a', 'z')
	upper = byteRange(x, 'A', 'Z')
	digit = byteRange(x, '0', '9')
	z := x ^ ones*'_'
	under := ^(z + ones*0x7f | z) & hiBits
	return letter | digit | under, letter, digit, upper
}

// asciiPrefix returns the length of the ASCII prefix of d, looking at eight
// bytes at a time.
func asciiPrefix(d []byte) int {
	i := 0
	for ; i+8 <= len(d); i += 8 {
		if binary.LittleEndian.Uint64(d[i:])&hiBits != 0 {
			break
		}
	}
	for i < len(d) && d[i] < utf8.RuneSelf {
		i++
	}
	return i
}

// asciiNoNULPrefix returns the length of the prefix of d that is ASCII
// without NUL bytes, looking at eight bytes at a time.
func asciiNoNULPrefix(d []byte) int {
	const ones = 0x0101010101010101
	i := 0
	for ; i+8 <= len(d); i += 8 {
		w := binary.LittleEndian.Uint64(d[i:])
		// A byte with its high bit set, or a zero byte (w-ones borrows
		// into the high bit of a zero byte that had it clear).
		if (w|(w-ones)&^w)&hiBits != 0 {
			break
		}
	}
	for i < len(d) && d[i] < utf8.RuneSelf && d[i] != 0 {
		i++
	}
	return i
}
