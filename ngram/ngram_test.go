package ngram

// ngram has no outside reference implementation to compare against. The
// expected keys below are worked out by hand from the rules documented on
// Builder.Emit, and the character n-gram count check is plain arithmetic
// (a string of K characters has K-n+1 substrings of n characters), not a
// reference.

import (
	"fmt"
	"slices"
	"strings"
	"testing"
	"unicode/utf8"
)

type emitted struct {
	key   string
	kind  Kind
	order int
}

func (e emitted) String() string { return fmt.Sprintf("%s:%q", OrderOf(e.kind, e.order), e.key) }

func collect(c Config, prefix string, text string) []emitted {
	var toks [][]byte
	for _, f := range strings.Fields(text) {
		toks = append(toks, []byte(f))
	}
	var out []emitted
	NewBuilder(c).Emit([]byte(prefix), toks, func(key []byte, o Order) {
		out = append(out, emitted{string(key), o.Kind(), o.Len()})
	})
	return out
}

func keys(es []emitted) []string {
	var ks []string
	for _, e := range es {
		ks = append(ks, e.key)
	}
	return ks
}

func TestParseRange(t *testing.T) {
	good := []struct {
		in   string
		want Range
		str  string
	}{
		{"1-2", Range{1, 2}, "1-2"},
		{"3", Range{3, 3}, "3-3"},
		{" 2-5 ", Range{2, 5}, "2-5"},
		{"32", Range{32, 32}, "32-32"},
		{"off", Range{}, "off"},
		{"OFF", Range{}, "off"},
		{"", Range{}, "off"},
	}
	for _, tc := range good {
		got, err := ParseRange(tc.in)
		if err != nil || got != tc.want || got.String() != tc.str {
			t.Errorf("ParseRange(%q) = %v (%q), %v; want %v (%q)", tc.in, got, got.String(), err, tc.want, tc.str)
		}
		if back, _ := ParseRange(got.String()); back != got {
			t.Errorf("ParseRange(%q.String()) = %v", got, back)
		}
		if got.On() != (tc.str != "off") {
			t.Errorf("%v.On() = %v", got, got.On())
		}
	}
	bad := []struct {
		parse func(string) (Range, error)
		in    string
		msg   string
	}{
		{ParseRange, "3-1", `ngram: order range "3-1": lower order 3 is above upper order 1`},
		{ParseRange, "0-2", `ngram: order range "0-2": orders start at 1, not 0`},
		{ParseRange, "a-b", `ngram: order range "a-b": want N or A-B with whole numbers A <= B, or "off"`},
		{ParseRange, "1-", `ngram: order range "1-": want N or A-B with whole numbers A <= B, or "off"`},
		{ParseRange, "1-33", `ngram: order range "1-33": order 33 is above the limit 32`},
		{ParseWords, "1-17", `ngram: word order range "1-17": word order 17 is above the limit 16`},
		{ParseChars, "33", `ngram: character order range "33": character order 33 is above the limit 32`},
	}
	for _, tc := range bad {
		r, err := tc.parse(tc.in)
		if err == nil || err.Error() != tc.msg || r != (Range{}) {
			t.Errorf("parse %q = %v, %v; want error %q", tc.in, r, err, tc.msg)
		}
	}
	if r, err := ParseWords("16"); err != nil || r != (Range{16, 16}) {
		t.Errorf("ParseWords(16) = %v, %v", r, err)
	}
	if err := (Config{Words: Range{1, 17}}).Validate(); err == nil {
		t.Error("Validate accepted word order 17")
	}
	if err := (Config{Chars: Range{0, 3}}).Validate(); err == nil {
		t.Error("Validate accepted character range 0-3")
	}
}

func TestWordNgrams(t *testing.T) {
	// Worked by hand: unigrams left to right, then bigrams left to right.
	got := collect(Config{Words: Range{1, 2}}, "", "not good at all")
	want := []emitted{
		{"not", Word, 1}, {"good", Word, 1}, {"at", Word, 1}, {"all", Word, 1},
		{"not good", Word, 2}, {"good at", Word, 2}, {"at all", Word, 2},
	}
	if !slices.Equal(got, want) {
		t.Errorf("got  %v\nwant %v", got, want)
	}
	// Orders longer than the document yield nothing.
	got = collect(Config{Words: Range{2, 4}}, "", "dock full")
	if want := []emitted{{"dock full", Word, 2}}; !slices.Equal(got, want) {
		t.Errorf("got %v, want %v", got, want)
	}
	if got := collect(Config{Words: Range{1, 3}}, "", ""); got != nil {
		t.Errorf("empty document gave %v", got)
	}
}

func TestCharNgrams(t *testing.T) {
	tests := []struct {
		chars Range
		text  string
		want  []string
	}{
		// é is two bytes, one character.
		{Range{3, 3}, "café", []string{"#<ca", "#caf", "#afé", "#fé>"}},
		// CJK: three bytes per character.
		{Range{2, 3}, "東京", []string{"#<東", "#東京", "#京>", "#<東京", "#東京>"}},
		// Boundary marks make single letters visible as word starts/ends.
		{Range{1, 2}, "ab", []string{"#<", "#a", "#b", "#>", "#<a", "#ab", "#b>"}},
		// Marked token shorter than Min: the whole marked token, once.
		{Range{4, 5}, "a", []string{"#<a>"}},
		// Marked token reached within the range: emitted as its K-gram only.
		{Range{3, 5}, "ab", []string{"#<ab", "#ab>", "#<ab>"}},
		// Token by token.
		{Range{3, 3}, "no app", []string{"#<no", "#no>", "#<ap", "#app", "#pp>"}},
	}
	for _, tc := range tests {
		got := collect(Config{Chars: tc.chars}, "", tc.text)
		if !slices.Equal(keys(got), tc.want) {
			t.Errorf("%v %q: got %q, want %q", tc.chars, tc.text, keys(got), tc.want)
		}
		for _, e := range got {
			if e.kind != Char || e.order < tc.chars.Min || e.order > tc.chars.Max {
				t.Errorf("%v %q: %v has kind/order outside the range", tc.chars, tc.text, e)
			}
			if e.order != utf8.RuneCountInString(e.key)-1 && e.key != "#<a>" {
				t.Errorf("%v: order %d but %d characters", e, e.order, utf8.RuneCountInString(e.key)-1)
			}
		}
	}
	// The short token is reported with order Min.
	if got := collect(Config{Chars: Range{4, 5}}, "", "a"); got[0].order != 4 {
		t.Errorf("short token order = %d, want 4", got[0].order)
	}
}

// Arithmetic, not a reference: a word of L characters marked with two
// boundary characters has L+2-n+1 character n-grams for n <= L+2.
func TestCharNgramCount(t *testing.T) {
	for _, word := range []string{"a", "ab", "dock", "naïve", "Ærøskøbing", "自転車", "rideshareoperator"} {
		L := utf8.RuneCountInString(word)
		for n := 1; n <= L+2 && n <= MaxCharOrder; n++ {
			got := len(collect(Config{Chars: Range{n, n}}, "", word))
			if want := L + 2 - n + 1; got != want {
				t.Errorf("%q (L=%d) n=%d: %d n-grams, want L+2-n+1 = %d", word, L, n, got, want)
			}
		}
	}
}

func TestWordCharDistinct(t *testing.T) {
	// The word "a" and the character 1-gram "a" of the token "a" have the
	// same letters but different keys.
	got := collect(Config{Words: Range{1, 1}, Chars: Range{1, 3}}, "", "a b")
	seen := map[string]Kind{}
	for _, e := range got {
		if k, dup := seen[e.key]; dup && k != e.kind {
			t.Errorf("key %q emitted as both word and char", e.key)
		}
		seen[e.key] = e.kind
		if (e.kind == Char) != strings.HasPrefix(e.key, string(CharPrefix)) {
			t.Errorf("%v: CharPrefix use does not match kind", e)
		}
	}
	want := []string{"a", "b", "#<", "#a", "#>", "#<a", "#a>", "#<a>", "#<", "#b", "#>", "#<b", "#b>", "#<b>"}
	if !slices.Equal(keys(got), want) {
		t.Errorf("got %q, want %q", keys(got), want)
	}
}

func TestPrefix(t *testing.T) {
	got := keys(collect(Config{Words: Range{1, 2}, Chars: Range{4, 4}}, "title|", "late bike"))
	want := []string{"title|late", "title|bike", "title|late bike",
		"title|#<lat", "title|#late", "title|#ate>", "title|#<bik", "title|#bike", "title|#ike>"}
	if !slices.Equal(got, want) {
		t.Errorf("got %q, want %q", got, want)
	}
}

func TestOrderString(t *testing.T) {
	for _, tc := range []struct {
		kind  Kind
		order int
		want  string
	}{{Word, 1, "w1"}, {Word, 2, "w2"}, {Char, 3, "c3"}, {Char, 12, "c12"}} {
		if got := OrderOf(tc.kind, tc.order).String(); got != tc.want {
			t.Errorf("OrderOf(%v, %d) = %q, want %q", tc.kind, tc.order, got, tc.want)
		}
		if o := OrderOf(tc.kind, tc.order); o.Kind() != tc.kind || o.Len() != tc.order {
			t.Errorf("OrderOf(%v, %d): Kind %v, Len %d", tc.kind, tc.order, o.Kind(), o.Len())
		}
	}
	if Word.String() != "word" || Char.String() != "char" {
		t.Error("Kind.String")
	}
}

func TestNewBuilderPanics(t *testing.T) {
	defer func() {
		if recover() == nil {
			t.Error("NewBuilder accepted an invalid Config")
		}
	}()
	NewBuilder(Config{Words: Range{3, 1}})
}

var sampleDoc = strings.Fields("the rider could not unlock the bike at the dock near the café so she walked to the next dock which was empty again")

func sampleTokens() ([][]byte, int) {
	var toks [][]byte
	size := 0
	for _, w := range sampleDoc {
		toks = append(toks, []byte(w))
		size += len(w) + 1
	}
	return toks, size
}

func TestEmitAllocs(t *testing.T) {
	toks, _ := sampleTokens()
	b := NewBuilder(Config{Words: Range{1, 3}, Chars: Range{2, 5}})
	prefix := []byte("body|")
	count := 0
	fn := func(key []byte, o Order) { count += len(key) }
	b.Emit(prefix, toks, fn) // warm-up grows the scratch space
	if n := testing.AllocsPerRun(50, func() { b.Emit(prefix, toks, fn) }); n != 0 {
		t.Errorf("Emit: %v allocations per document, want 0", n)
	}
	if count == 0 {
		t.Error("no keys emitted")
	}
}

func BenchmarkEmit(b *testing.B) {
	toks, size := sampleTokens()
	for _, c := range []Config{
		{Words: Range{1, 2}},
		{Words: Range{1, 2}, Chars: Range{3, 5}},
	} {
		b.Run("words="+c.Words.String()+",chars="+c.Chars.String(), func(b *testing.B) {
			bld := NewBuilder(c)
			nkeys := 0
			fn := func(key []byte, o Order) { nkeys++ }
			b.SetBytes(int64(size))
			for b.Loop() {
				bld.Emit(nil, toks, fn)
			}
		})
	}
}

// TestJoined: tokens lying one space apart in one array are joined without
// a copy; tokens from separate arrays, or apart by anything else, are not.
func TestJoined(t *testing.T) {
	arena := []byte("dock bike ride  x")
	a, b, c := arena[0:4], arena[5:9], arena[10:14]
	if k, ok := Joined([][]byte{a, b, c}); !ok || string(k) != "dock bike ride" || &k[0] != &arena[0] {
		t.Errorf("adjacent tokens: %q %v", k, ok)
	}
	if k, ok := Joined([][]byte{b}); !ok || string(k) != "bike" {
		t.Errorf("one token: %q %v", k, ok)
	}
	if _, ok := Joined([][]byte{c, arena[16:17]}); ok {
		t.Error("tokens two spaces apart joined")
	}
	if _, ok := Joined([][]byte{a, []byte("bike")}); ok {
		t.Error("tokens from different arrays joined")
	}
	if _, ok := Joined([][]byte{a, c}); ok {
		t.Error("non-neighbouring tokens joined")
	}
	capped := arena[0:4:4]
	if _, ok := Joined([][]byte{capped, b}); ok {
		t.Error("joined past a token's capacity")
	}
}
