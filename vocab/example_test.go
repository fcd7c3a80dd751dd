package vocab_test

import (
	"fmt"
	"strings"

	"github.com/bowline/bowline/vocab"
)

// Counting three invented Pellwick Bike Share reviews and keeping the
// keys found in at least two of them, in column order.
func ExampleCounts_Build() {
	docs := []string{
		"dock was full again",
		"app froze at the dock",
		"the app charged me twice",
	}
	c := vocab.NewCounts()
	for _, d := range docs {
		for _, w := range strings.Fields(d) {
			c.Add([]byte(w), 1) // order code 1: word unigrams
		}
		c.EndDoc()
	}
	v, rep := c.Build(vocab.Cutoffs{MinDocs: 2, MaxDocShare: 1})
	for col, t := range v.Terms {
		fmt.Printf("%d %s docs=%d\n", col, t.Key, t.Docs)
	}
	fmt.Printf("seen %d, below min docs %d, kept %d\n", rep.Seen, rep.BelowMinDocs, rep.Kept)
	col, ok := v.Lookup([]byte("dock"))
	fmt.Println("dock:", col, ok)
	// Output:
	// 0 app docs=2
	// 1 dock docs=2
	// 2 the docs=2
	// seen 11, below min docs 8, kept 3
	// dock: 1 true
}

func ExampleCounts_Merge() {
	a, b := vocab.NewCounts(), vocab.NewCounts()
	a.Add([]byte("brake"), 1)
	a.EndDoc()
	b.Add([]byte("brake"), 1)
	b.Add([]byte("bell"), 1)
	b.EndDoc()
	a.Merge(b)
	fmt.Println("docs", a.Docs())
	a.Each(func(key string, order int, count, docs int64) {
		fmt.Println(key, count, docs)
	})
	// Output:
	// docs 2
	// bell 1 1
	// brake 2 2
}

func ExampleParseUnseen() {
	for _, s := range []string{"drop", "count", "hash:2^8", "hash:0"} {
		u, err := vocab.ParseUnseen(s)
		if err != nil {
			fmt.Println(err)
			continue
		}
		fmt.Println(u, u.Columns())
	}
	// Output:
	// drop 0
	// count 1
	// hash:256 256
	// vocab: unseen policy "hash:0": bucket count 0 is not 1 to 16777216
}
