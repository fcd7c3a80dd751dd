package ngram_test

import (
	"fmt"
	"strings"

	"github.com/bowline/bowline/ngram"
)

func tokens(s string) [][]byte {
	var toks [][]byte
	for _, f := range strings.Fields(s) {
		toks = append(toks, []byte(f))
	}
	return toks
}

func ExampleBuilder_Emit() {
	words, _ := ngram.ParseWords("1-2")
	b := ngram.NewBuilder(ngram.Config{Words: words})
	b.Emit(nil, tokens("not good at all"), func(key []byte, o ngram.Order) {
		fmt.Printf("%s %q\n", o, key)
	})
	// Output:
	// w1 "not"
	// w1 "good"
	// w1 "at"
	// w1 "all"
	// w2 "not good"
	// w2 "good at"
	// w2 "at all"
}

func ExampleBuilder_Emit_chars() {
	chars, _ := ngram.ParseChars("3")
	b := ngram.NewBuilder(ngram.Config{Chars: chars})
	b.Emit([]byte("title|"), tokens("café"), func(key []byte, o ngram.Order) {
		fmt.Printf("%s %s\n", o, key)
	})
	// Output:
	// c3 title|#<ca
	// c3 title|#caf
	// c3 title|#afé
	// c3 title|#fé>
}

func ExampleParseRange() {
	for _, s := range []string{"1-2", "3", "off", "3-1"} {
		r, err := ngram.ParseRange(s)
		fmt.Println(r, r.On(), err)
	}
	// Output:
	// 1-2 true <nil>
	// 3-3 true <nil>
	// off false <nil>
	// off false ngram: order range "3-1": lower order 3 is above upper order 1
}
