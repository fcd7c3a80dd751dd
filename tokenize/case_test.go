package tokenize

import (
	"math/rand/v2"
	"testing"
	"unicode/utf8"

	"golang.org/x/text/cases"
	"golang.org/x/text/language"
)

// TestCaseTables checks the generated tables against golang.org/x/text/cases
// (Unicode 15.0 CaseFolding.txt, UnicodeData.txt and SpecialCasing.txt) for
// every code point, so a change of either shows.
func TestCaseTables(t *testing.T) {
	if caseUnicodeVersion != cases.UnicodeVersion {
		t.Fatalf("tables are Unicode %s, golang.org/x/text/cases is %s: run go generate", caseUnicodeVersion, cases.UnicodeVersion)
	}
	// Planes 2 and above hold no cased characters, so the check stops
	// at U+1FFFF to stay fast.
	var src []byte
	for r := rune(0x80); r <= 0x1FFFF; r++ {
		if r < 0xD800 || r >= 0xE000 {
			src = utf8.AppendRune(src, r)
			src = append(src, 0)
		}
	}
	for _, c := range []struct {
		mode CaseMode
		ref  cases.Caser
	}{{CaseFold, cases.Fold()}, {CaseLower, cases.Lower(language.Und)}} {
		tk := mustNew(t, withOpts(func(o *Options) { o.Case = c.mode }))
		got, _ := tk.appendCase(nil, src)
		if want := c.ref.Bytes(src); string(got) != string(want) {
			t.Errorf("%v: table differs from golang.org/x/text/cases; run go generate", c.mode)
		}
	}
}

// TestFinalSigma compares lowercasing of random Greek-like words with
// golang.org/x/text/cases, which implements the Final_Sigma condition of the
// Unicode Standard (Table 3-17).
func TestFinalSigma(t *testing.T) {
	alphabet := []rune("ΣσςΑαΒβ'.:\u0301\u00ADa1 ʰ\u0345")
	ref := cases.Lower(language.Und)
	tk := mustNew(t, withOpts(func(o *Options) { o.Case = CaseLower }))
	rng := rand.New(rand.NewPCG(1, 2))
	for i := 0; i < 50000; i++ {
		w := make([]rune, 1+rng.IntN(6))
		for j := range w {
			w[j] = alphabet[rng.IntN(len(alphabet))]
		}
		got, _ := tk.appendCase(nil, []byte(string(w)))
		if want := ref.String(string(w)); string(got) != want {
			t.Fatalf("lower(%q) = %q, golang.org/x/text/cases gives %q", string(w), got, want)
		}
	}
}
