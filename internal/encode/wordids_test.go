package encode

import (
	"fmt"
	"maps"
	"testing"

	"github.com/bowline/bowline/hashing"
	"github.com/bowline/bowline/internal/learn"
	"github.com/bowline/bowline/internal/learn/learntest"
	"github.com/bowline/bowline/internal/testkit"
	"github.com/bowline/bowline/ngram"
	"github.com/bowline/bowline/spec"
	"github.com/bowline/bowline/vocab"
	"github.com/bowline/bowline/weight"
)

// TestWordIDLookupMatchesKeyLookup checks the encoder's word-id path (word
// unigrams and bigrams found through the ids of their words) against the
// plain definition: every key the analyzer emits, looked up by its bytes in
// a map of the spec's keys. Rows, unseen counts and distinct-key figures
// must agree for one and several text fields, word orders 1 to 3, with and
// without character n-grams.
func TestWordIDLookupMatchesKeyLookup(t *testing.T) {
	texts := testkit.WordCorpus(t, 600)
	train, test := texts[:len(texts)/2], texts[len(texts)/2:]
	cases := []struct {
		name   string
		fields int
		ng     ngram.Config
	}{
		{"w1", 1, ngram.Config{Words: ngram.Range{Min: 1, Max: 1}}},
		{"w1-2", 1, ngram.Config{Words: ngram.Range{Min: 1, Max: 2}}},
		{"w2", 1, ngram.Config{Words: ngram.Range{Min: 2, Max: 2}}},
		{"w1-3 c2-3", 1, ngram.Config{Words: ngram.Range{Min: 1, Max: 3}, Chars: ngram.Range{Min: 2, Max: 3}}},
		{"two fields w1-2", 2, ngram.Config{Words: ngram.Range{Min: 1, Max: 2}}},
		{"three fields w1-3", 3, ngram.Config{Words: ngram.Range{Min: 1, Max: 3}}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			s := learntest.Settings(spec.ModeVocabulary)
			s.NGrams = tc.ng
			s.TF, s.IDF, s.Norm = weight.TFCount, weight.IDFNone, weight.NormNone
			s.Cutoffs.MinDocs = 2
			s.Unseen = vocab.Unseen{Mode: vocab.UnseenCount}
			s.Input.Text = nil
			for f := range tc.fields {
				s.Input.Text = append(s.Input.Text, fmt.Sprintf("f%d", f))
			}
			doc := func(i int, set []string) [][]byte {
				var d [][]byte
				for f := range tc.fields {
					d = append(d, []byte(set[(i+f*7)%len(set)]))
				}
				return d
			}
			l, err := learn.New(s)
			if err != nil {
				t.Fatal(err)
			}
			lw := l.NewWorker()
			for i := range train {
				lw.Observe(doc(i, train))
			}
			sp, _, err := l.Finish(lw, learn.LabelsFrom(nil, false))
			if err != nil {
				t.Fatal(err)
			}
			e, err := New(sp)
			if err != nil {
				t.Fatal(err)
			}
			if !e.wordIDs {
				t.Fatal("the encoder does not use word ids")
			}
			cols := map[string]int{}
			for i, k := range sp.Content.Vocabulary.Keys {
				cols[k] = i
			}
			w := e.NewWorker(true)
			z := e.Analysis().NewAnalyzer()
			wantUnseen := map[string]int64{}
			wantKeys := map[ngram.Order]map[string]bool{}
			var row weight.Row
			for i := range test {
				d := doc(i, test)
				ds := w.Encode(d, &row)
				want := map[int]float64{}
				var feats, unseen int
				z.Analyze(d, func(key []byte, code ngram.Order) {
					feats++
					if wantKeys[code] == nil {
						wantKeys[code] = map[string]bool{}
					}
					wantKeys[code][string(key)] = true
					if c, ok := cols[string(key)]; ok {
						want[c]++
						return
					}
					unseen++
					wantUnseen[string(key)]++
					want[len(cols)]++
				})
				got := map[int]float64{}
				for j, c := range row.Indices {
					got[c] = row.Values[j]
				}
				if !maps.Equal(got, want) || ds.Features != feats || ds.Unseen != unseen {
					t.Fatalf("doc %d %q: row %v features %d unseen %d, want %v %d %d", i, d, got, ds.Features, ds.Unseen, want, feats, unseen)
				}
			}
			gotUnseen := map[string]int64{}
			w.Stats.TopUnseen.Each(func(k string, n int64) { gotUnseen[k] = n })
			if !maps.Equal(gotUnseen, wantUnseen) {
				t.Errorf("unseen keys differ: %d vs %d", len(gotUnseen), len(wantUnseen))
			}
			for code, keys := range wantKeys {
				var u int64
				for k := range keys {
					if _, ok := cols[k]; !ok {
						u++
					}
				}
				gk, gu := w.Stats.Keys(code)
				if gk != int64(len(keys)) || gu != u {
					t.Errorf("%s: %d distinct keys, %d unseen; want %d, %d", code, gk, gu, len(keys), u)
				}
			}
		})
	}
}

// TestHashingChunkPathMatchesAnalyze checks the hashing encoder's loop over
// a chunk's word n-grams against hashing every key Analyze emits, one by
// one (signed buckets summed per column), for one and two text fields,
// word orders 1 to 3 and character n-grams.
func TestHashingChunkPathMatchesAnalyze(t *testing.T) {
	texts := testkit.WordCorpus(t, 300)
	for _, fields := range []int{1, 2} {
		for _, ng := range []ngram.Config{{Words: ngram.Range{Min: 1, Max: 3}}, {Words: ngram.Range{Min: 2, Max: 2}, Chars: ngram.Range{Min: 2, Max: 3}}} {
			s := learntest.Settings(spec.ModeHashing)
			s.NGrams = ng
			s.TF, s.IDF, s.Norm = weight.TFCount, weight.IDFNone, weight.NormNone
			s.Input.Text = []string{"title", "body"}[:fields]
			sp := learntest.LearnDocs(t, s)
			e, err := New(sp)
			if err != nil {
				t.Fatal(err)
			}
			w := e.NewWorker(false)
			z := e.Analysis().NewAnalyzer()
			h := e.hasher
			var row weight.Row
			for i := range texts {
				d := [][]byte{[]byte(texts[i])}
				if fields == 2 {
					d = append(d, []byte(texts[(i*5)%len(texts)]))
				}
				ds := w.Encode(d, &row)
				want := map[int]float64{}
				n := 0
				z.Analyze(d, func(key []byte, _ ngram.Order) {
					n++
					sum := h.Sum(key)
					v := 1.0
					if h.Signed && sum>>63 == 1 {
						v = -1
					}
					want[int(hashing.BucketOf(sum, h.Width))] += v
				})
				maps.DeleteFunc(want, func(_ int, v float64) bool { return v == 0 })
				got := map[int]float64{}
				for j, c := range row.Indices {
					got[c] = row.Values[j]
				}
				if !maps.Equal(got, want) || ds.Features != n {
					t.Fatalf("%d fields %v doc %d: row %v (%d keys), want %v (%d)", fields, ng, i, got, ds.Features, want, n)
				}
			}
		}
	}
}
