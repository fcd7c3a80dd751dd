package testkit

import (
	"bytes"
	"strings"
	"testing"

	"github.com/bowline/bowline/internal/demo"
)

// WordTexts are texts whose tokens stress what bowline's word-id lookups rely
// on (tokens hold no space and no '|'): every kind of space between words,
// separators, apostrophes, scripts without spaces, emoji, combining marks,
// and words of 8, 9, 16 and 17 bytes on both sides of the packed-word
// limits. The Unicode characters are chosen from the UAX #29 word-break
// classes (Unicode Standard Annex #29, table 3: WSegSpace, MidLetter,
// MidNumLet, ExtendNumLet, Extend).
var WordTexts = []string{
	"dock\u00a0bike dock\u3000bike dock\tbike dock\u2003bike dock|bike dock||bike",
	"don't don\u2019t U.S.A v8 snake_case ___ 3.14 1,000 e\u0301t\u00e9 na\u00efve",
	"\u0e2a\u0e27\u0e31\u0e2a\u0e14\u0e35 \u6771\u4eac \u30ab\u30bf\u30ab\u30ca \U0001F6B2 bike\u200dshare",
	"abcdefgh abcdefghi abcdefgh abcdefghi abcdefgh\u00e9 \u00e9\u00e9\u00e9\u00e9",
	"abcdefghijklmnop abcdefghijklmnopq abcdefghijklmnop abcdefghijklmnopq abcdefghijklmno\u00e9 abcdefghijklmnopq",
	"|| | a|b a | b  a  b",
	"",
}

// WordCorpus is the text column of n records of the invented demo corpus
// (seed 3) with WordTexts mixed in.
func WordCorpus(t testing.TB, n int) []string {
	t.Helper()
	var buf bytes.Buffer
	if err := demo.WriteTSV(&buf, demo.Options{Docs: n, Seed: 3}); err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(strings.TrimSpace(buf.String()), "\n")[1:]
	var out []string
	for i, l := range lines {
		out = append(out, strings.Split(l, "\t")[4])
		if i%50 == 0 {
			out = append(out, WordTexts[(i/50)%len(WordTexts)])
		}
	}
	return append(out, WordTexts...)
}
