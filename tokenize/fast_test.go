package tokenize

import (
	"encoding/binary"
	"math/rand/v2"
	"strings"
	"testing"
)

type tokKind struct {
	tok  string
	kind Kind
}

func tokensOf(tk *Tokenizer, text []byte) []tokKind {
	var out []tokKind
	tk.Each(text, func(tok []byte, k Kind) { out = append(out, tokKind{string(tok), k}) })
	return out
}

// sameAsSegmenter fails t unless Each with the ASCII fast path gives the
// same tokens and kinds, byte for byte, as Each with the segmenter alone.
func sameAsSegmenter(t *testing.T, o Options, text []byte) {
	t.Helper()
	fast := mustNew(t, o)
	slow := mustNew(t, o)
	slow.noFastPath = true
	a, b := tokensOf(fast, text), tokensOf(slow, text)
	if len(a) != len(b) {
		t.Fatalf("%q: fast path gives %d tokens %v, segmenter %d %v", text, len(a), a, len(b), b)
	}
	for i := range a {
		if a[i] != b[i] {
			t.Fatalf("%q: token %d: fast path %v, segmenter %v", text, i, a[i], b[i])
		}
	}
	if fast.Stats() != slow.Stats() {
		t.Fatalf("%q: stats differ: fast %+v, segmenter %+v", text, fast.Stats(), slow.Stats())
	}
}

// asciiAlphabet stresses every ASCII word break class and the characters
// around them.
const asciiAlphabet = "aZ09_:.,;'\" \n\r\t-/@#!?"

var mixedPieces = []string{"é", "\u0301", "\u00AD", "東", "カ", "ひ", "ภา", "\u2019", "\u200d", "👍", "１", "ﬁ", "\xff", "\x00", "٣", "İ"}

func randomText(rng *rand.Rand, n int, mixed bool) []byte {
	var b strings.Builder
	for b.Len() < n {
		if mixed && rng.IntN(8) == 0 {
			b.WriteString(mixedPieces[rng.IntN(len(mixedPieces))])
			continue
		}
		b.WriteByte(asciiAlphabet[rng.IntN(len(asciiAlphabet))])
	}
	return []byte(b.String())
}

// TestASCIIFastPath is the differential test of the fast path against the
// segmenter (github.com/blevesearch/segment, the UAX #29 implementation
// bowline relies on) on random ASCII and mixed text, hand-picked cases and
// long generated text.
func TestASCIIFastPath(t *testing.T) {
	opts := []Options{rawOptions(), DefaultOptions(), withOpts(func(o *Options) { o.Numbers = NumbersMask; o.MinLen = 2 })}
	for _, s := range []string{
		"", "_", "__init__", "a_1", "_1_", "1.5a", "a1.5", "a1.b", "a.1", "1:2", "a:b", "1;2", "a;b",
		"1'2", "a'b", "a''b", "a._b", "a_.b", "U.S.A.", "3.14.", "x.é", "é.x", "a é", "a\u0301b",
		"a \u0301b", "a\n\u0301", "a\r\nb", " \x00x", "it\u2019s", "1,000,000.50", "a'", "'a", ".a.", "a:",
	} {
		for _, o := range opts {
			sameAsSegmenter(t, o, []byte(s))
		}
	}
	rng := rand.New(rand.NewPCG(3, 5))
	for i := 0; i < 3000; i++ {
		sameAsSegmenter(t, opts[i%len(opts)], randomText(rng, 1+rng.IntN(40), i%2 == 1))
	}
	sameAsSegmenter(t, DefaultOptions(), pellwickText(100<<10))
}

// FuzzASCIIFastPath checks that the ASCII fast path gives the same tokens as
// the segmenter for any input. Seeds: testdata/fuzz/FuzzASCIIFastPath.
func FuzzASCIIFastPath(f *testing.F) {
	f.Add([]byte("Don't stop: 3.14, 1,000; U.S.A. a_b __x__"))
	f.Add([]byte("naïve caf\u00e9 it\u2019s 東京 ภาษา"))
	f.Fuzz(func(t *testing.T, text []byte) {
		sameAsSegmenter(t, rawOptions(), text)
		sameAsSegmenter(t, DefaultOptions(), text)
	})
}

// TestClassify8MatchesTable checks the eight-at-a-time classes against the
// per-character table, for every ASCII character in every position.
func TestClassify8MatchesTable(t *testing.T) {
	for c := 0; c < 128; c++ {
		for pos := 0; pos < 8; pos++ {
			var b [8]byte
			for j := range b {
				b[j] = byte((c + 37*j) % 128)
			}
			b[pos] = byte(c)
			word, letter, digit, upper := classify8(binary.LittleEndian.Uint64(b[:]))
			for j, ch := range b {
				bit := uint64(0x80) << (8 * j)
				cl := asciiClass[ch]
				if (word&bit != 0) != (cl&clWord != 0) || (letter&bit != 0) != (cl&clLetter != 0) ||
					(digit&bit != 0) != (cl&clDigit != 0) || (upper&bit != 0) != (cl&clUpper != 0) {
					t.Fatalf("character %#x at %d: word %v letter %v digit %v upper %v, table %08b",
						ch, j, word&bit != 0, letter&bit != 0, digit&bit != 0, upper&bit != 0, cl)
				}
			}
		}
	}
}

// TestASCIIPrefixes checks the eight-at-a-time prefix scans against plain
// byte loops, with the first non-ASCII or NUL byte at every position.
func TestASCIIPrefixes(t *testing.T) {
	for n := 0; n < 40; n++ {
		for pos := 0; pos <= n; pos++ {
			for _, bad := range []byte{0x80, 0xff, 0xc3, 0} {
				d := []byte(strings.Repeat("a\x01\x7f", n)[:n])
				if pos < n {
					d[pos] = bad
				}
				wantA, wantN := 0, 0
				for wantA < len(d) && d[wantA] < 0x80 {
					wantA++
				}
				for wantN < len(d) && d[wantN] < 0x80 && d[wantN] != 0 {
					wantN++
				}
				if got := asciiPrefix(d); got != wantA {
					t.Errorf("asciiPrefix(%q) = %d, want %d", d, got, wantA)
				}
				if got := asciiNoNULPrefix(d); got != wantN {
					t.Errorf("asciiNoNULPrefix(%q) = %d, want %d", d, got, wantN)
				}
			}
		}
	}
}
