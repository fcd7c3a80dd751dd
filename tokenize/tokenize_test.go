package tokenize

import (
	"bufio"
	"os"
	"reflect"
	"strconv"
	"strings"
	"testing"
	"unicode"
	"unicode/utf8"

	"github.com/bowline/bowline/internal/testkit"
)

func mustNew(t testing.TB, o Options) *Tokenizer {
	t.Helper()
	tk, err := New(o)
	if err != nil {
		t.Fatal(err)
	}
	return tk
}

func withOpts(f func(*Options)) Options {
	o := DefaultOptions()
	if f != nil {
		f(&o)
	}
	return o
}

// TestHandMade checks the tokens of typical and awkward text. The comment
// beside each case says what UAX #29 (Unicode Standard Annex #29, "Unicode
// Text Segmentation", word boundary rules WB1-WB999) gives and why bowline's
// output is right.
func TestHandMade(t *testing.T) {
	type tc struct {
		name string
		opt  func(*Options)
		in   string
		want string // tokens joined by "|"
	}
	cases := []tc{
		// Apostrophe (Single_Quote) and U+2019 (MidNumLet) between letters
		// do not break (WB6, WB7), so a contraction is one word; bowline
		// folds U+2019 to "'" so both spellings are one token.
		{"contraction", nil, "don't", "don't"},
		{"contraction U+2019", nil, "don\u2019t", "don't"},
		{"it's", nil, "It's here", "it's|here"},
		{"apostrophe not doubled", nil, "don''t", "don|t"}, // WB6 needs a letter after one MidLetter
		{"quoted", nil, "'quoted'", "quoted"},              // quote next to a space: WB999 breaks
		// Hyphen-minus is not MidLetter: WB999 breaks on both sides.
		{"hyphen", nil, "well-known", "well|known"},
		// MidNum and MidNumLet between digits do not break (WB11, WB12).
		{"decimal", nil, "pi is 3.14", "pi|is|3.14"},
		{"thousands", nil, "1,000 riders", "1,000|riders"},
		{"currency and time", nil, "$3.50 at 10:30", "3.50|at|10|30"}, // "$" is a symbol; ":" is MidLetter, not MidNum
		// Full stop (MidNumLet) between letters does not break (WB6,
		// WB7); the final period has no letter after it.
		{"abbreviation", nil, "U.S.A.", "u.s.a"},
		// URLs: ":" and "/" break (":" needs letters on both sides, WB6);
		// "." joins the host name (WB6, WB7); "?", "=", "&" break.
		{"url", nil, "https://pellwick.example/rides?id=42&x=y", "https|pellwick.example|rides|id|42|x|y"},
		// "@" is no MidLetter: an e-mail address splits at it; "." joins.
		{"email", nil, "help@pellwick.example", "help|pellwick.example"},
		// Emoji are pictographic symbols, not words: their segments
		// (WB3c, WB4 keep ZWJ sequences and modifiers together) are
		// dropped, so they cannot split or join words.
		{"emoji", nil, "bike 🚲 ride 👍🏽 👨\u200d👩\u200d👧 ok", "bike|ride|ok"},
		// Ideographs have no Word_Break value that joins them (WB999):
		// each is a segment of its own.
		{"cjk", nil, "東京都", "東|京|都"},
		// Hiragana likewise (WB999); katakana joins with katakana (WB13).
		{"japanese", nil, "東京に行く", "東|京|に|行|く"},
		{"katakana", nil, "カタカナー", "カタカナー"},
		{"halfwidth katakana nfkc", nil, "ｶﾀｶﾅ", "カタカナ"}, // NFKC maps halfwidth to standard kana
		// Thai has Line_Break=SA: UAX #29 gives one segment per
		// character and leaves words to dictionaries; bowline keeps the
		// run of Thai letters as one token so the text is not lost.
		{"thai", nil, "ภาษาไทย ok", "ภาษาไทย|ok"},
		{"thai then latin", nil, "ไทยbike", "ไทย|bike"},
		{"thai digits", nil, "๑๒", "๑๒"},                               // Thai digits are Numeric (WB8)
		{"mixed scripts", nil, "Привет, мир! Γειά", "привет|мир|γειά"}, // Cyrillic and Greek are ALetter (WB5)
		// Full case folding (CaseFolding.txt status F): ß folds to "ss",
		// so "Straße" and "STRASSE" are one token.
		{"sharp s fold", nil, "Straße STRASSE", "strasse|strasse"},
		{"sharp s lower", func(o *Options) { o.Case = CaseLower }, "Straße", "straße"}, // SpecialCasing.txt: ß lowercases to itself
		{"capital sharp s", nil, "ẞ", "ss"},                                            // CaseFolding.txt: 1E9E; F; 0073 0073
		// Turkish: without language tailoring "İ" folds and lowercases to
		// "i" + U+0307 (CaseFolding.txt 0130; F; SpecialCasing.txt 0130),
		// "I" to "i", and dotless "ı" has no folding, so it stays.
		{"turkish fold", nil, "İstanbul I ı", "i\u0307stanbul|i|ı"},
		{"turkish lower", func(o *Options) { o.Case = CaseLower }, "İ I ı", "i\u0307|i|ı"},
		{"turkish strip", func(o *Options) { o.Accents = AccentsStrip }, "İstanbul", "istanbul"},
		{"keep case", func(o *Options) { o.Case = CaseKeep }, "Straße İ", "Straße|İ"},
		// Greek final sigma: folding maps both sigmas to σ; lowercasing
		// applies the Final_Sigma condition of SpecialCasing.txt.
		{"sigma fold", nil, "ΌΣΟΣ", "όσοσ"},
		{"sigma lower", func(o *Options) { o.Case = CaseLower }, "ΌΣΟΣ", "όσος"},
		// NFKC (UAX #15) maps fullwidth forms and the ﬁ ligature to their
		// compatibility equivalents before segmentation.
		{"fullwidth nfkc", nil, "ＡＢＣ１２", "abc12"},
		{"fullwidth nfc", func(o *Options) { o.Unicode = NFC }, "ＡＢＣ", "ａｂｃ"},
		{"ligature nfkc", nil, "ﬁne", "fine"},
		{"ligature nfc", func(o *Options) { o.Unicode = NFC; o.Case = CaseKeep }, "ﬁne", "ﬁne"},
		{"ligature nfc fold", func(o *Options) { o.Unicode = NFC }, "ﬁne", "fine"}, // CaseFolding.txt: FB01; F; 0066 0069
		// NFC composes e + U+0301 to é; without normalization they differ.
		{"nfc composes", func(o *Options) { o.Unicode = NFC }, "cafe\u0301 café", "café|café"},
		{"no normalization", func(o *Options) { o.Unicode = NoNormalization }, "cafe\u0301", "cafe\u0301"},
		{"accents keep", nil, "naïve café", "naïve|café"},
		{"accents strip", func(o *Options) { o.Accents = AccentsStrip }, "naïve Ålesund crème", "naive|alesund|creme"},
		// ø has no canonical decomposition: nothing to strip.
		{"accents strip o slash", func(o *Options) { o.Accents = AccentsStrip }, "Ørsted", "ørsted"},
		// Letters with digits stay one word (WB9, WB10); underscore is
		// ExtendNumLet (WB13a, WB13b).
		{"alnum", nil, "2nd v8 snake_case", "2nd|v8|snake_case"},
		{"superscript nfkc", nil, "x²", "x2"},
		// Number rules apply to Numeric words only.
		{"numbers mask", func(o *Options) { o.Numbers = NumbersMask }, "3 bikes, 1,000 rides, 2nd dock", "<num>|bikes|<num>|rides|2nd|dock"},
		{"numbers drop", func(o *Options) { o.Numbers = NumbersDrop }, "3 bikes 4.5 km", "bikes|km"},
		{"arabic-indic digits", func(o *Options) { o.Numbers = NumbersMask }, "٣٤٥", "<num>"},
		{"min len", func(o *Options) { o.MinLen = 3 }, "a an the dock 7", "the|dock"},
		{"max len", func(o *Options) { o.MaxLen = 4 }, "dock station naïve", "dock"},
		{"mask exempt from length", func(o *Options) { o.Numbers = NumbersMask; o.MinLen = 6 }, "7 dock", "<num>"},
		{"length in runes", func(o *Options) { o.MaxLen = 5 }, "naïve ümlaut", "naïve"},
		// Invalid UTF-8: each bad byte is U+FFFD, which is no word.
		{"invalid utf8", nil, "ab\xffcd\xe2\x82", "ab|cd"},
		{"nul", nil, "ab\x00cd", "ab|cd"},
		{"empty", nil, "", ""},
		{"only punctuation", nil, " ,.;!? ", ""},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			tk := mustNew(t, withOpts(c.opt))
			toks, _ := collect(tk, c.in)
			if got := strings.Join(toks, "|"); got != c.want {
				t.Errorf("%q: got %q, want %q", c.in, got, c.want)
			}
		})
	}
}

func TestKinds(t *testing.T) {
	tk := mustNew(t, DefaultOptions())
	_, kinds := collect(tk, "bike 42 東 ひ カナ ภาษา")
	want := []Kind{Letter, Number, Ideo, Kana, Kana, Letter}
	if !reflect.DeepEqual(kinds, want) {
		t.Errorf("kinds %v, want %v", kinds, want)
	}
}

func TestStats(t *testing.T) {
	tk := mustNew(t, withOpts(func(o *Options) { o.Numbers = NumbersDrop; o.MinLen = 2 }))
	in := "a bb 12 cc\x00dd \xff\xfe ee"
	toks, _ := collect(tk, in)
	if got := strings.Join(toks, "|"); got != "bb|cc|dd|ee" {
		t.Fatalf("tokens %q", got)
	}
	want := Stats{Texts: 1, Bytes: int64(len(in)), InvalidUTF8: 2, NULs: 1, Tokens: 4, DroppedNumbers: 1, DroppedLength: 1}
	if got := tk.Stats(); got != want {
		t.Errorf("stats %+v, want %+v", got, want)
	}
	var sum Stats
	sum.Add(want)
	sum.Add(want)
	if sum.Tokens != 8 || sum.InvalidUTF8 != 4 || sum.Texts != 2 || sum.DroppedLength != 2 {
		t.Errorf("Add: %+v", sum)
	}
	tk.ResetStats()
	if tk.Stats() != (Stats{}) {
		t.Errorf("ResetStats left %+v", tk.Stats())
	}
	// AppendNormalized counts nothing.
	tk.AppendNormalized(nil, []byte("\xff"))
	if tk.Stats() != (Stats{}) {
		t.Errorf("AppendNormalized counted %+v", tk.Stats())
	}
}

func TestAppendNormalized(t *testing.T) {
	tk := mustNew(t, withOpts(func(o *Options) { o.Accents = AccentsStrip }))
	for in, want := range map[string]string{
		"Don\u2019t": "don't",
		"ＣＡＦÉ":       "cafe",
		"Straße":     "strasse",
		"ab":         "ab",
		"":           "",
	} {
		if got := string(tk.AppendNormalized([]byte("x:"), []byte(in))); got != "x:"+want {
			t.Errorf("AppendNormalized(%q) = %q, want %q", in, got, "x:"+want)
		}
	}
	// The same word gives the same bytes as Each, even when called from
	// inside the callback.
	tk.Each([]byte("Crème Brûlée DON’T"), func(tok []byte, _ Kind) {
		before := string(tok)
		norm := tk.AppendNormalized(nil, []byte(strings.ToUpper(before)))
		if string(norm) != before || string(tok) != before {
			t.Errorf("token %q: AppendNormalized of upper case gave %q; token now %q", before, norm, tok)
		}
	})
}

// TestLongText checks that cutting a long text into pieces for the
// segmenter gives the same tokens as segmenting each line alone.
func TestLongText(t *testing.T) {
	tk := mustNew(t, DefaultOptions())
	var b strings.Builder
	var want []string
	for i := 0; b.Len() < 5*chunkSize; i++ {
		line := "Dock " + strconv.Itoa(i) + " naïve 東京 ภาษาไทย\u200d it’s  "
		b.WriteString(line)
		if i%7 == 0 {
			b.WriteString("\n")
		}
		toks, _ := collect(tk, line)
		want = append(want, toks...)
	}
	got, _ := collect(tk, b.String())
	if !reflect.DeepEqual(got, want) {
		t.Errorf("long text: %d tokens, want %d", len(got), len(want))
	}
	// A text with no place to cut is segmented whole.
	long := strings.Repeat("東", chunkSize)
	got, _ = collect(tk, long)
	if len(got) != chunkSize {
		t.Errorf("unbroken text: %d tokens, want %d", len(got), chunkSize)
	}
}

func TestNoPanicOnBytes(t *testing.T) {
	tk := mustNew(t, withOpts(func(o *Options) { o.Accents = AccentsStrip; o.Numbers = NumbersMask }))
	for i := 0; i < 256; i++ {
		for _, s := range []string{"", "a", "1", "é", "\u0301", "東"} {
			in := []byte(s + string([]byte{byte(i)}) + s)
			tk.Each(in, func(tok []byte, _ Kind) {
				if !utf8.Valid(tok) {
					t.Fatalf("invalid UTF-8 token %q from %q", tok, in)
				}
			})
		}
	}
}

// TestAllocs checks that Each on a warm Tokenizer does not allocate for
// ASCII text, nor for text needing folding, normalization and repair.
func TestAllocs(t *testing.T) {
	for _, in := range []string{
		"The Pellwick dock on Harbour Street ate my card; 3 bikes, 1,000 rides. Don't!",
		"Crème brûlée at the ＤＯＣＫ, it’s ﬁne: Straße \xff\x00 東京 ภาษาไทย",
	} {
		tk := mustNew(t, withOpts(func(o *Options) { o.Accents = AccentsStrip; o.Numbers = NumbersMask }))
		text := []byte(in)
		n := 0
		fn := func(tok []byte, _ Kind) { n += len(tok) }
		tk.Each(text, fn)
		if a := testing.AllocsPerRun(100, func() { tk.Each(text, fn) }); a != 0 {
			t.Errorf("Each(%q) allocates %v times per call", in, a)
		}
	}
}

func TestOptions(t *testing.T) {
	d := DefaultOptions()
	if d != (Options{Unicode: NFKC, Case: CaseFold, Accents: AccentsKeep, Numbers: NumbersKeep, MinLen: 1, MaxLen: 64}) {
		t.Errorf("DefaultOptions = %+v", d)
	}
	for _, w := range []string{"nfkc", "nfc", "none"} {
		if v, err := ParseNormalization(w); err != nil || v.String() != w {
			t.Errorf("ParseNormalization(%q) = %v, %v", w, v, err)
		}
	}
	for _, w := range []string{"fold", "lower", "keep"} {
		if v, err := ParseCase(w); err != nil || v.String() != w {
			t.Errorf("ParseCase(%q) = %v, %v", w, v, err)
		}
	}
	for _, w := range []string{"keep", "strip"} {
		if v, err := ParseAccents(w); err != nil || v.String() != w {
			t.Errorf("ParseAccents(%q) = %v, %v", w, v, err)
		}
	}
	for _, w := range []string{"keep", "mask", "drop"} {
		if v, err := ParseNumbers(w); err != nil || v.String() != w {
			t.Errorf("ParseNumbers(%q) = %v, %v", w, v, err)
		}
	}
	if _, err := ParseCase("upper"); err == nil || !strings.Contains(err.Error(), `"upper"`) || !strings.Contains(err.Error(), "fold, lower or keep") {
		t.Errorf("ParseCase(upper) error %v", err)
	}
	if _, err := ParseNumbers(""); err == nil {
		t.Error("ParseNumbers accepted empty string")
	}
	bad := []Options{
		withOpts(func(o *Options) { o.MinLen = 0 }),
		withOpts(func(o *Options) { o.MaxLen = 0 }),
		withOpts(func(o *Options) { o.Unicode = 3 }),
		withOpts(func(o *Options) { o.Case = 3 }),
		withOpts(func(o *Options) { o.Accents = 2 }),
		withOpts(func(o *Options) { o.Numbers = 3 }),
	}
	for _, o := range bad {
		if _, err := New(o); err == nil {
			t.Errorf("New(%+v) accepted invalid options", o)
		}
	}
	if CaseMode(9).String() != "CaseMode(9)" {
		t.Errorf("unknown enum String: %q", CaseMode(9).String())
	}
	tk := mustNew(t, d)
	if tk.Options() != d {
		t.Errorf("Options() = %+v", tk.Options())
	}
}

// TestWordBreakPropertyCoverage takes every code point that the Unicode
// 15.0 WordBreakProperty.txt (Debian unicode-data) classes as a letter or
// digit of a word (ALetter, Hebrew_Letter, Katakana, Numeric) and checks that
// it gives a token on its own. The segmenter's tables are from Unicode 8.0;
// letters added later reach bowline through orphan. Digits added later are
// still lost: their count is asserted so that a change shows.
func TestWordBreakPropertyCoverage(t *testing.T) {
	const path = "/usr/share/unicode/auxiliary/WordBreakProperty.txt"
	testkit.NeedFile(t, path, "Debian package unicode-data")
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	tk := mustNew(t, withOpts(func(o *Options) { o.Unicode = NoNormalization; o.Case = CaseKeep }))
	lost := map[string]int{}
	total := 0
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		data, _, _ := strings.Cut(sc.Text(), "#")
		rng, prop, ok := strings.Cut(data, ";")
		prop = strings.TrimSpace(prop)
		if !ok || (prop != "ALetter" && prop != "Hebrew_Letter" && prop != "Katakana" && prop != "Numeric") {
			continue
		}
		lo, hi, _ := strings.Cut(strings.TrimSpace(rng), "..")
		a, _ := strconv.ParseUint(lo, 16, 32)
		b := a
		if hi != "" {
			b, _ = strconv.ParseUint(hi, 16, 32)
		}
		for r := rune(a); r <= rune(b); r++ {
			total++
			n := 0
			tk.Each([]byte(" "+string(r)+" "), func([]byte, Kind) { n++ })
			if n == 0 {
				// U+1CF2 and U+1CF3 VEDIC SIGN ARDHAVISARGA were
				// spacing marks (Extend) in Unicode 8.0, so the
				// segmenter attaches them to the space before them.
				if (unicode.IsLetter(r) || unicode.IsDigit(r)) && r != 0x1CF2 && r != 0x1CF3 {
					t.Errorf("lost %U (%s), a letter or digit", r, prop)
				}
				if testing.Verbose() {
					t.Logf("lost %U %s", r, prop)
				}
				lost[prop]++
			}
		}
	}
	// The characters still lost are 62 modifier symbols (Sk) and
	// Armenian punctuation marks (Po, Pd) that later Unicode versions moved
	// into ALetter, and the two Vedic signs above. The count was found by this
	// test with github.com/blevesearch/segment v0.9.1.
	want := map[string]int{"ALetter": 64}
	if !reflect.DeepEqual(lost, want) {
		t.Errorf("of %d word characters, lost %v, want %v", total, lost, want)
	}
}
