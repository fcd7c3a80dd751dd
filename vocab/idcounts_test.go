package vocab

import (
	"fmt"
	"math/rand/v2"
	"slices"
	"testing"
)

type counted struct {
	key         string
	order       int
	count, docs int64
}

func allCounts(c *Counts) []counted {
	var out []counted
	c.Each(func(key string, order int, count, docs int64) {
		out = append(out, counted{key, order, count, docs})
	})
	return out
}

// TestIDCountsMatchCounts counts the unigrams and bigrams of random
// documents by word ids (two workers, merged) and by bytes (one Counts):
// every key's occurrences and documents must agree.
func TestIDCountsMatchCounts(t *testing.T) {
	r := rand.New(rand.NewPCG(3, 4))
	words := []string{"a", "dock", "abcdefgh", "abcdefghi", "bike", "\u00e9t\u00e9", "ride-share", "x"}
	for i := range 300 {
		words = append(words, fmt.Sprintf("w%d", i))
	}
	prefixes := []string{"title|", "body|"}
	ref := NewCounts()
	w1, w2 := NewIDCounts(prefixes), NewIDCounts(prefixes)
	for d := range 2000 {
		w := w1
		if d%3 == 0 {
			w = w2
		}
		for f, p := range prefixes {
			n := r.IntN(30)
			toks := make([]string, n)
			for i := range toks {
				toks[i] = words[int(r.ExpFloat64()*40)%len(words)]
			}
			for i, tk := range toks {
				ref.Add([]byte(p+tk), 1)
				w.Add(f, w.Word([]byte(tk)), -1)
				if i+1 < n {
					ref.Add([]byte(p+tk+" "+toks[i+1]), 2)
					w.Add(f, w.Word([]byte(tk)), w.Word([]byte(toks[i+1])))
				}
			}
		}
		ref.EndDoc()
		w.EndDoc()
	}
	got := NewCounts()
	w1.Merge(w2, got)
	if w2.Len() != 0 {
		t.Errorf("merged counts not emptied: %d keys", w2.Len())
	}
	w1.AddTo(got)
	a, b := allCounts(got), allCounts(ref)
	if !slices.Equal(a, b) {
		t.Fatalf("%d keys by word ids, %d by bytes; first: %v / %v", len(a), len(b), a[:min(3, len(a))], b[:min(3, len(b))])
	}
	// The keys added lazily are found again.
	if tm, ok := got.Term("body|dock bike"); ok != slices.ContainsFunc(b, func(c counted) bool { return c.key == "body|dock bike" }) || ok && tm.Order != 2 {
		t.Errorf("Term after AddTo: %v %v", tm, ok)
	}
}
