package analysis

import (
	"fmt"
	"sort"
	"strings"
	"testing"

	"github.com/bowline/bowline/ngram"
	"github.com/bowline/bowline/spec"
	"github.com/bowline/bowline/tokenize"
)

// longDocument returns the Chain of ng (and stem) for one "lines"
// field, and a text of 3 chunks and then some, its i-th word word(i).
func longDocument(t *testing.T, ng ngram.Config, stem string, word func(i int) string) (*Chain, []byte) {
	t.Helper()
	if stem == "" {
		stem = "none"
	}
	c := &spec.Content{
		Input: spec.Input{Format: "lines", Text: []string{"line"}}, Tokens: spec.TokensFrom(tokenize.DefaultOptions()),
		NGrams: spec.NGrams{Words: ng.Words.String(), Chars: ng.Chars.String()}, Stem: stem, Mode: spec.ModeVocabulary,
	}
	a, err := New(c)
	if err != nil {
		t.Fatal(err)
	}
	var b strings.Builder
	for i := 0; i < 3*chunkTokens+17; i++ {
		b.WriteString(word(i))
		b.WriteByte(' ')
	}
	return a, []byte(b.String())
}

// sameKeys fails unless got and want hold the same keys, in any order.
func sameKeys(t *testing.T, label string, got, want []string) {
	t.Helper()
	sort.Strings(got)
	sort.Strings(want)
	if len(got) != len(want) {
		t.Fatalf("%s: %d keys, want %d", label, len(got), len(want))
	}
	for i := range got {
		if got[i] != want[i] {
			t.Fatalf("%s: key %d is %q, want %q", label, i, got[i], want[i])
		}
	}
}

// TestLongDocumentChunks: a document longer than one chunk gives exactly
// the keys of a single n-gram pass over all its tokens.
func TestLongDocumentChunks(t *testing.T) {
	for _, words := range []ngram.Range{{Min: 1, Max: 1}, {Min: 1, Max: 3}, {Min: 2, Max: 4}} {
		ng := ngram.Config{Words: words, Chars: ngram.Range{Min: 3, Max: 3}}
		a, text := longDocument(t, ng, "", func(i int) string { return fmt.Sprintf("w%d", i%97) })
		var got []string
		a.NewAnalyzer().Analyze([][]byte{text}, func(k []byte, _ ngram.Order) { got = append(got, string(k)) })

		var toks [][]byte
		tok, _ := tokenize.New(tokenize.DefaultOptions())
		tok.Each(text, func(t []byte, _ tokenize.Kind) { toks = append(toks, append([]byte(nil), t...)) })
		var want []string
		ngram.NewBuilder(ng).Emit(nil, toks, func(k []byte, _ ngram.Order) { want = append(want, string(k)) })
		sameKeys(t, fmt.Sprintf("words %v", words), got, want)
	}
}

// TestLongDocumentChunksStemmed: with a stemmer, a document longer than
// one chunk gives the keys of its tokens each stemmed exactly once, the
// context carried from chunk to chunk included. The words are ones whose
// Porter2 stem stems again to something else (kljensen/snowball English,
// found by stemming the benchmark corpus twice: "representatives" gives
// "repres", then "repr"), so stemming a token twice would show.
func TestLongDocumentChunksStemmed(t *testing.T) {
	words := strings.Fields("representatives considerable purposes pleasing only increase provisional precise affectionate incursions")
	ng := ngram.Config{Words: ngram.Range{Min: 1, Max: 3}}
	a, text := longDocument(t, ng, "en", func(i int) string { return words[(i*7)%len(words)] })
	var got []string
	a.NewAnalyzer().Analyze([][]byte{text}, func(k []byte, _ ngram.Order) { got = append(got, string(k)) })

	stem, err := tokenize.NewStemmer("en")
	if err != nil {
		t.Fatal(err)
	}
	var toks [][]byte
	tok, _ := tokenize.New(tokenize.DefaultOptions())
	tok.Each(text, func(t []byte, _ tokenize.Kind) { toks = append(toks, append([]byte(nil), stem.Stem(t)...)) })
	var want []string
	ngram.NewBuilder(ng).Emit(nil, toks, func(k []byte, _ ngram.Order) { want = append(want, string(k)) })
	sameKeys(t, "stemmed", got, want)
}
