package stopwords_test

import (
	"bytes"
	"fmt"
	"strings"

	"github.com/bowline/bowline/stopwords"
)

// lower is a toy normalization for the examples; real callers pass the
// tokenizer's own.
func lower(dst, word []byte) []byte { return append(dst, bytes.ToLower(word)...) }

func ExampleBuiltin() {
	words, _ := stopwords.Builtin("en")
	fmt.Println(len(words), words[:5])
	fmt.Println(stopwords.Negations("de"))
	// Output:
	// 174 [i me my myself we]
	// [nicht nichts kein keine keinem keinen keiner keines]
}

func ExampleSource() {
	fmt.Println(stopwords.Source("sv"))
	// Output:
	// Snowball project stop list (Swedish), as carried by Debian liblingua-stopwords-perl 0.12-2 (Lingua/StopWords/SV.pm); licence BSD-3-Clause (Snowball)
}

func ExampleReadList() {
	list := `# Pellwick Bike Share: words too common in our tickets
pellwick
bike   # every ticket mentions it

dock
`
	words, err := stopwords.ReadList(strings.NewReader(list), "pellwick.txt")
	fmt.Println(words, err)

	_, err = stopwords.ReadList(strings.NewReader("dock\nbike share\n"), "bad.txt")
	fmt.Println(err)
	// Output:
	// [pellwick bike dock] <nil>
	// bad.txt:2:5: more than one word on the line
}

func ExampleFilter() {
	en, _ := stopwords.Builtin("en")
	set := stopwords.NewSet(en, lower, true) // negations stay
	f := set.NewFilter()
	var kept []string
	for _, tok := range strings.Fields("The dock was not working and the app was no help") {
		tok := lower(nil, []byte(tok))
		if !f.Drop(tok) {
			kept = append(kept, string(tok))
		}
	}
	fmt.Println(kept)
	fmt.Println(f.Total(), "of", f.Seen(), "dropped:", f.Dropped())
	// Output:
	// [dock not working app no help]
	// 5 of 11 dropped: [{the 2} {was 2} {and 1}]
}
