package spec

import (
	"fmt"
	"sort"
	"strings"
	"testing"

	"github.com/bowline/bowline/ngram"
	"github.com/bowline/bowline/tokenize"
	"github.com/bowline/bowline/vocab"
	"github.com/bowline/bowline/weight"
)

// TestLongDocumentChunks: a document longer than one chunk gives exactly
// the keys of a single n-gram pass over all its tokens.
func TestLongDocumentChunks(t *testing.T) {
	for _, words := range []ngram.Range{{Min: 1, Max: 1}, {Min: 1, Max: 3}, {Min: 2, Max: 4}} {
		s := &Settings{
			Input: Input{Format: "lines", Text: []string{"line"}}, Tokens: tokenize.DefaultOptions(),
			NGrams: ngram.Config{Words: words, Chars: ngram.Range{Min: 3, Max: 3}},
			Mode:   ModeVocabulary, Cutoffs: vocab.DefaultCutoffs(), TF: weight.TFCount,
		}
		c, err := s.Content()
		if err != nil {
			t.Fatal(err)
		}
		a, err := c.Analysis()
		if err != nil {
			t.Fatal(err)
		}
		var b strings.Builder
		for i := 0; i < 3*chunkTokens+17; i++ {
			fmt.Fprintf(&b, "w%d ", i%97)
		}
		text := []byte(b.String())
		var got []string
		a.NewAnalyzer().Analyze([][]byte{text}, func(k []byte, _ int) { got = append(got, string(k)) })

		var toks [][]byte
		tok, _ := tokenize.New(tokenize.DefaultOptions())
		tok.Each(text, func(t []byte, _ tokenize.Kind) { toks = append(toks, append([]byte(nil), t...)) })
		var want []string
		ngram.NewBuilder(ngram.Config{Words: words, Chars: ngram.Range{Min: 3, Max: 3}}).Emit(nil, toks, func(k []byte, _ ngram.Kind, _ int) {
			want = append(want, string(k))
		})
		sort.Strings(got)
		sort.Strings(want)
		if len(got) != len(want) {
			t.Fatalf("words %v: %d keys, want %d", words, len(got), len(want))
		}
		for i := range got {
			if got[i] != want[i] {
				t.Fatalf("words %v: key %d is %q, want %q", words, i, got[i], want[i])
			}
		}
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
	s := &Settings{
		Input: Input{Format: "lines", Text: []string{"line"}}, Tokens: tokenize.DefaultOptions(),
		NGrams: ngram.Config{Words: ngram.Range{Min: 1, Max: 3}},
		Stem:   "en", Mode: ModeVocabulary, Cutoffs: vocab.DefaultCutoffs(), TF: weight.TFCount,
	}
	c, err := s.Content()
	if err != nil {
		t.Fatal(err)
	}
	a, err := c.Analysis()
	if err != nil {
		t.Fatal(err)
	}
	var b strings.Builder
	for i := 0; i < 3*chunkTokens+17; i++ {
		fmt.Fprintf(&b, "%s ", words[(i*7)%len(words)])
	}
	text := []byte(b.String())
	var got []string
	a.NewAnalyzer().Analyze([][]byte{text}, func(k []byte, _ int) { got = append(got, string(k)) })

	stem, err := tokenize.NewStemmer("en")
	if err != nil {
		t.Fatal(err)
	}
	var toks [][]byte
	tok, _ := tokenize.New(tokenize.DefaultOptions())
	tok.Each(text, func(t []byte, _ tokenize.Kind) { toks = append(toks, append([]byte(nil), stem.Stem(t)...)) })
	var want []string
	ngram.NewBuilder(ngram.Config{Words: ngram.Range{Min: 1, Max: 3}}).Emit(nil, toks, func(k []byte, _ ngram.Kind, _ int) {
		want = append(want, string(k))
	})
	sort.Strings(got)
	sort.Strings(want)
	if len(got) != len(want) {
		t.Fatalf("%d keys, want %d", len(got), len(want))
	}
	for i := range got {
		if got[i] != want[i] {
			t.Fatalf("key %d is %q, want %q", i, got[i], want[i])
		}
	}
}
