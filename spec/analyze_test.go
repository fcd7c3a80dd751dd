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
