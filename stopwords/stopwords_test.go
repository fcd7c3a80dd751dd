package stopwords

import (
	"bytes"
	"errors"
	"os"
	"path/filepath"
	"regexp"
	"slices"
	"strings"
	"testing"
	"unicode/utf8"

	"github.com/bowline/bowline/internal/testkit"
	"golang.org/x/text/encoding"
	"golang.org/x/text/encoding/charmap"
)

// The outside source for the built-in lists: the Snowball project's stop
// lists as carried by Debian liblingua-stopwords-perl 0.12-2 (Romanian: the
// list that package adds itself), installed as Perl modules.
const (
	debianPackage = "liblingua-stopwords-perl 0.12-2"
	debianDir     = "/usr/share/perl5/Lingua/StopWords"
)

func readGolden(t *testing.T, lang string) []string {
	t.Helper()
	f, err := os.Open(filepath.Join("..", "testdata", "stopwords", lang+".txt"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	words, err := ReadList(f, f.Name())
	if err != nil {
		t.Fatal(err)
	}
	return words
}

func diffLists(t *testing.T, what string, got, want []string) {
	t.Helper()
	if slices.Equal(got, want) {
		return
	}
	for i := 0; i < len(got) || i < len(want); i++ {
		var g, w string
		if i < len(got) {
			g = got[i]
		}
		if i < len(want) {
			w = want[i]
		}
		if g != w {
			t.Errorf("%s: first difference at word %d: got %q, want %q (len %d vs %d)", what, i+1, g, w, len(got), len(want))
			return
		}
	}
}

// Check (a): the embedded lists equal the golden copies in
// testdata/stopwords, which scripts/gen-stopwords.sh writes by loading each
// Lingua::StopWords module of Debian liblingua-stopwords-perl 0.12-2 in Perl
// and printing its _stopwords() (a route independent of the one that wrote
// the embedded files, which parses the module text).
func TestBuiltinMatchesGolden(t *testing.T) {
	golden, err := filepath.Glob(filepath.Join("..", "testdata", "stopwords", "*.txt"))
	if err != nil {
		t.Fatal(err)
	}
	var goldenLangs []string
	for _, g := range golden {
		goldenLangs = append(goldenLangs, strings.TrimSuffix(filepath.Base(g), ".txt"))
	}
	if !slices.Equal(goldenLangs, Languages()) {
		t.Fatalf("golden languages %v, built-in %v", goldenLangs, Languages())
	}
	for _, lang := range Languages() {
		got, err := Builtin(lang)
		if err != nil {
			t.Fatal(err)
		}
		diffLists(t, lang+" vs testdata (from "+debianPackage+")", got, readGolden(t, lang))
	}
}

// Check (b): the embedded lists equal the word lists inside the installed
// Perl modules of Debian liblingua-stopwords-perl 0.12-2, parsed here in Go.
func TestBuiltinMatchesDebianModules(t *testing.T) {
	testkit.NeedFile(t, debianDir, "Debian package "+debianPackage)
	for _, lang := range Languages() {
		pm := filepath.Join(debianDir, strings.ToUpper(lang)+".pm")
		got, err := Builtin(lang)
		if err != nil {
			t.Fatal(err)
		}
		diffLists(t, lang+" vs "+pm, got, parsePerlModule(t, pm))
	}
}

var (
	qwBlock  = regexp.MustCompile(`(?s)sub _stopwords \{\s*return qw\((.*?)\);`)
	encodeAs = regexp.MustCompile(`encode\("([^"]+)"`)
)

// parsePerlModule extracts the qw() word list of a Lingua::StopWords module,
// decoding the source from the legacy charset its getStopWords names when
// the module is not marked "use utf8".
func parsePerlModule(t *testing.T, path string) []string {
	t.Helper()
	src, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Contains(src, []byte("\nuse utf8;")) {
		m := encodeAs.FindSubmatch(src)
		if m == nil {
			t.Fatalf("%s: neither 'use utf8' nor an encode(...) charset", path)
		}
		var enc encoding.Encoding
		switch strings.ToLower(string(m[1])) {
		case "iso-8859-1":
			enc = charmap.ISO8859_1
		case "iso-8859-2":
			enc = charmap.ISO8859_2
		case "koi8-r":
			enc = charmap.KOI8R
		default:
			t.Fatalf("%s: unknown charset %s", path, m[1])
		}
		if src, err = enc.NewDecoder().Bytes(src); err != nil {
			t.Fatal(err)
		}
	}
	if !utf8.Valid(src) {
		t.Fatalf("%s: not valid UTF-8", path)
	}
	m := qwBlock.FindSubmatch(src)
	if m == nil {
		t.Fatalf("%s: no qw() block in _stopwords", path)
	}
	return strings.Fields(string(m[1]))
}

func TestLanguages(t *testing.T) {
	langs := Languages()
	if !slices.IsSorted(langs) {
		t.Errorf("Languages() not sorted: %v", langs)
	}
	for _, want := range strings.Fields("da de en es fi fr hu it nl no pt ro ru sv") {
		if !slices.Contains(langs, want) {
			t.Errorf("Languages() lacks %s", want)
		}
	}
}

func TestBuiltinDetails(t *testing.T) {
	// Sizes of the lists in Debian liblingua-stopwords-perl 0.12-2, counted
	// with perl from the installed modules (the words, duplicates included).
	sizes := map[string]int{"da": 94, "de": 231, "en": 174, "es": 308, "fi": 235,
		"fr": 155, "hu": 199, "it": 279, "nl": 101, "no": 176, "pt": 203,
		"ro": 264, "ru": 159, "sv": 114}
	for lang, n := range sizes {
		w, err := Builtin(lang)
		if err != nil {
			t.Fatal(err)
		}
		if len(w) != n {
			t.Errorf("len(Builtin(%q)) = %d, want %d", lang, len(w), n)
		}
		src := Source(lang)
		if !strings.Contains(src, "liblingua-stopwords-perl 0.12-2") || strings.Contains(src, "\n") {
			t.Errorf("Source(%q) = %q: want one line naming the Debian package", lang, src)
		}
		wantLicence := "BSD-3-Clause"
		if lang == "ro" {
			wantLicence = "Artistic or GPL-1+"
		}
		if !strings.Contains(src, wantLicence) {
			t.Errorf("Source(%q) = %q: want licence %s", lang, src, wantLicence)
		}
	}
	// Case of the code does not matter; the caller owns the returned slice.
	a, _ := Builtin("EN")
	a[0] = "changed"
	b, _ := Builtin("en")
	if b[0] != "i" {
		t.Errorf("Builtin(\"en\")[0] = %q after a caller's change, want %q", b[0], "i")
	}
	if _, err := Builtin("xx"); err == nil || !strings.Contains(err.Error(), "da de en") {
		t.Errorf("Builtin(\"xx\") error = %v, want one listing the known codes", err)
	}
	if Source("xx") != "" || Negations("xx") != nil {
		t.Error("Source/Negations of an unknown language not empty")
	}
}

func TestNegations(t *testing.T) {
	// The English keep-list the design asks for, as far as the words occur
	// in the Snowball English list ("never" does not).
	wantEN := strings.Fields("no nor not isn't aren't wasn't weren't hasn't haven't hadn't " +
		"doesn't don't didn't won't wouldn't shan't shouldn't can't cannot couldn't mustn't")
	if got := Negations("en"); !slices.Equal(got, wantEN) {
		t.Errorf("Negations(en) = %q, want %q", got, wantEN)
	}
	for _, lang := range Languages() {
		neg := Negations(lang)
		if len(neg) == 0 {
			t.Errorf("Negations(%q) is empty", lang)
		}
		list, _ := Builtin(lang)
		for _, w := range neg {
			if !slices.Contains(list, w) {
				t.Errorf("negation %q of %s is not in its list", w, lang)
			}
		}
	}
	if !slices.Contains(Negations("de"), "nicht") || !slices.Contains(Negations("fr"), "pas") {
		t.Error("Negations(de) lacks nicht or Negations(fr) lacks pas")
	}
	// "nunca" is not in the Snowball Spanish list, so it cannot be a
	// negation to keep.
	if slices.Contains(Negations("es"), "nunca") {
		t.Error("Negations(es) has nunca, which is not in the list")
	}
}

func TestReadList(t *testing.T) {
	in := "\uFEFF# a custom list\n\n  the  \nand # trailing comment\r\n\t\nnot\n# end\nlast"
	got, err := ReadList(strings.NewReader(in), "custom.txt")
	if err != nil {
		t.Fatal(err)
	}
	if want := []string{"the", "and", "not", "last"}; !slices.Equal(got, want) {
		t.Errorf("ReadList = %q, want %q", got, want)
	}

	tests := []struct {
		in        string
		line, col int
		err       error
		msg       string
	}{
		{"ok\ncaf\xe9\n", 2, 4, ErrInvalidUTF8, "l.txt:2:4: invalid UTF-8"},
		{"ok\n\nnaïve # \xff\n", 3, 10, ErrInvalidUTF8, "l.txt:3:10: invalid UTF-8"},
		{"a\n  good bye\n", 2, 7, ErrTwoWords, "l.txt:2:7: more than one word on the line"},
	}
	for _, tc := range tests {
		_, err := ReadList(strings.NewReader(tc.in), "l.txt")
		var pe *ParseError
		if !errors.As(err, &pe) {
			t.Errorf("ReadList(%q) error = %v, want *ParseError", tc.in, err)
			continue
		}
		if pe.File != "l.txt" || pe.Line != tc.line || pe.Column != tc.col || !errors.Is(err, tc.err) {
			t.Errorf("ReadList(%q) = %+v, want line %d col %d err %v", tc.in, *pe, tc.line, tc.col, tc.err)
		}
		if err.Error() != tc.msg {
			t.Errorf("error text %q, want %q", err.Error(), tc.msg)
		}
	}
}

// fold is a stand-in for the tokenizer's normalization in these tests:
// ASCII lower case, the right single quotation mark U+2019 becomes an ASCII
// apostrophe, and hyphens vanish.
func fold(dst, word []byte) []byte {
	for _, r := range string(word) {
		switch {
		case r == '\u2019':
			r = '\''
		case r == '-':
			continue
		case 'A' <= r && r <= 'Z':
			r += 'a' - 'A'
		}
		dst = utf8.AppendRune(dst, r)
	}
	return dst
}

func TestNewSetNegations(t *testing.T) {
	en, _ := Builtin("en")
	keep := NewSet(en, nil, true)
	drop := NewSet(en, nil, false)
	for _, w := range Negations("en") {
		if keep.Contains([]byte(w)) {
			t.Errorf("keepNegations=true: set contains %q", w)
		}
		if !drop.Contains([]byte(w)) {
			t.Errorf("keepNegations=false: set lacks %q", w)
		}
	}
	if !keep.Contains([]byte("the")) || !drop.Contains([]byte("the")) {
		t.Error(`"the" missing`)
	}
	if got, want := drop.Len(), 174; got != want {
		t.Errorf("Len = %d, want %d (174 distinct English words)", got, want)
	}
	if got, want := keep.Len(), 174-len(Negations("en")); got != want {
		t.Errorf("Len with negations kept = %d, want %d", got, want)
	}

	// A custom list only: negations that are plain words elsewhere go.
	custom := NewSet([]string{"the", "not", "no", "don't", "nicht", "et"}, nil, true)
	if got, want := custom.Words(), []string{"et", "no", "the"}; !slices.Equal(got, want) {
		t.Errorf("custom set words = %q, want %q", got, want)
	}

	// Finnish with French: Finnish "et" (negation) keeps French "et" too.
	fi, _ := Builtin("fi")
	fr, _ := Builtin("fr")
	both := NewSet(append(fi, fr...), nil, true)
	if both.Contains([]byte("et")) || both.Contains([]byte("pas")) || !both.Contains([]byte("avec")) {
		t.Error("fi+fr set: want et and pas kept out, avec in")
	}
	// Duplicates in a list (the Finnish list has some) collapse.
	if got := NewSet(fi, nil, false).Len(); got != 229 {
		t.Errorf("fi set Len = %d, want 229 distinct words", got)
	}
}

func TestNewSetNormalize(t *testing.T) {
	list := []string{"Don\u2019t", "THE", "---", "Pell-wick"}
	s := NewSet(list, fold, false)
	if got, want := s.Words(), []string{"don't", "pellwick", "the"}; !slices.Equal(got, want) {
		t.Errorf("Words = %q, want %q", got, want)
	}
	if !s.Contains([]byte("don't")) || s.Contains([]byte("Don\u2019t")) {
		t.Error("normalized entry does not meet the normalized token")
	}
	// With negations kept, the folded "don't" is recognized as a negation.
	if NewSet(list, fold, true).Contains([]byte("don't")) {
		t.Error("keepNegations: folded \"don't\" still in the set")
	}
	var nilSet *Set
	if nilSet.Contains([]byte("a")) || nilSet.Len() != 0 || nilSet.NewFilter().Drop([]byte("a")) {
		t.Error("nil set not empty")
	}
}

func TestFilter(t *testing.T) {
	s := NewSet([]string{"the", "a", "of"}, nil, false)
	f, g := s.NewFilter(), s.NewFilter()
	for _, tok := range strings.Fields("the bike of the dock a the app") {
		f.Drop([]byte(tok))
	}
	for _, tok := range strings.Fields("a map of a") {
		g.Drop([]byte(tok))
	}
	if f.Total() != 5 || f.Seen() != 8 {
		t.Errorf("f: Total %d Seen %d, want 5 8", f.Total(), f.Seen())
	}
	want := []WordCount{{"the", 3}, {"a", 1}, {"of", 1}}
	if got := f.Dropped(); !slices.Equal(got, want) {
		t.Errorf("Dropped = %v, want %v", got, want)
	}
	f.Merge(g)
	want = []WordCount{{"a", 3}, {"the", 3}, {"of", 2}}
	if got := f.Dropped(); !slices.Equal(got, want) || f.Total() != 8 || f.Seen() != 12 {
		t.Errorf("after Merge: %v Total %d Seen %d, want %v 8 12", got, f.Total(), f.Seen(), want)
	}
	defer func() {
		if recover() == nil {
			t.Error("Merge of filters from different sets did not panic")
		}
	}()
	f.Merge(NewSet(nil, nil, false).NewFilter())
}

func TestAllocs(t *testing.T) {
	en, _ := Builtin("en")
	s := NewSet(en, nil, true)
	f := s.NewFilter()
	toks := [][]byte{[]byte("the"), []byte("bike"), []byte("not"), []byte("ourselves")}
	if n := testing.AllocsPerRun(100, func() {
		for _, tok := range toks {
			s.Contains(tok)
		}
	}); n != 0 {
		t.Errorf("Contains: %v allocations per run, want 0", n)
	}
	if n := testing.AllocsPerRun(100, func() {
		for _, tok := range toks {
			f.Drop(tok)
		}
	}); n != 0 {
		t.Errorf("Drop: %v allocations per run, want 0", n)
	}
}

func BenchmarkDrop(b *testing.B) {
	en, _ := Builtin("en")
	f := NewSet(en, nil, true).NewFilter()
	var toks [][]byte
	size := 0
	for _, w := range strings.Fields("the rider could not unlock the bike at the dock so she walked to the next one and it was empty") {
		toks = append(toks, []byte(w))
		size += len(w)
	}
	b.SetBytes(int64(size))
	for b.Loop() {
		for _, tok := range toks {
			f.Drop(tok)
		}
	}
}

// TestShortTableAgreesWithMap: the packed short-word table finds exactly
// the words of the set, for every built-in list and for near misses.
func TestShortTableAgreesWithMap(t *testing.T) {
	var all []string
	for _, l := range Languages() {
		w, _ := Builtin(l)
		all = append(all, w...)
	}
	all = append(all, "averyveryverylongstopword", "sixteen-bytes-ok")
	s := NewSet(all, nil, false)
	probe := append([]string(nil), all...)
	for _, w := range all {
		probe = append(probe, w+"x", "x"+w, strings.ToUpper(w), w[:len(w)/2])
	}
	for _, w := range probe {
		_, want := s.index[w]
		if got := s.Contains([]byte(w)); got != want {
			t.Fatalf("Contains(%q) = %v, want %v", w, got, want)
		}
	}
}
