package spec

import (
	"bytes"
	"fmt"
	"maps"
	"strings"
	"testing"

	"github.com/bowline/bowline/hashing"
	"github.com/bowline/bowline/internal/demo"
	"github.com/bowline/bowline/ngram"
	"github.com/bowline/bowline/vocab"
	"github.com/bowline/bowline/weight"
)

// wordIDTexts are texts whose tokens stress what the word-id lookup relies
// on (tokens hold no space and no '|'): every kind of space between words,
// separators, apostrophes, scripts without spaces, emoji, combining marks,
// and words of 8, 9, 16 and 17 bytes on both sides of the packed-word
// limits. The Unicode characters are chosen from the UAX #29 word-break
// classes (Unicode Standard Annex #29, table 3: WSegSpace, MidLetter,
// MidNumLet, ExtendNumLet, Extend).
var wordIDTexts = []string{
	"dock\u00a0bike dock\u3000bike dock\tbike dock\u2003bike dock|bike dock||bike",
	"don't don\u2019t U.S.A v8 snake_case ___ 3.14 1,000 e\u0301t\u00e9 na\u00efve",
	"\u0e2a\u0e27\u0e31\u0e2a\u0e14\u0e35 \u6771\u4eac \u30ab\u30bf\u30ab\u30ca \U0001F6B2 bike\u200dshare",
	"abcdefgh abcdefghi abcdefgh abcdefghi abcdefgh\u00e9 \u00e9\u00e9\u00e9\u00e9",
	"abcdefghijklmnop abcdefghijklmnopq abcdefghijklmnop abcdefghijklmnopq abcdefghijklmno\u00e9 abcdefghijklmnopq",
	"|| | a|b a | b  a  b",
	"",
}

// wordIDCorpus is the invented Pellwick demo corpus (text column) with
// wordIDTexts mixed in.
func wordIDCorpus(t *testing.T, n int) []string {
	t.Helper()
	var buf bytes.Buffer
	if err := demo.WriteTSV(&buf, demo.Options{Docs: n, Seed: 3}); err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(strings.TrimSpace(buf.String()), "\n")[1:]
	var out []string
	for i, l := range lines {
		out = append(out, strings.Split(l, "\t")[4])
		if i%50 == 0 {
			out = append(out, wordIDTexts[(i/50)%len(wordIDTexts)])
		}
	}
	return append(out, wordIDTexts...)
}

// TestWordIDLookupMatchesKeyLookup checks the encoder's word-id path (word
// unigrams and bigrams found through the ids of their words) against the
// plain definition: every key the analyzer emits, looked up by its bytes in
// a map of the spec's keys. Rows, unseen counts and distinct-key figures
// must agree for one and several text fields, word orders 1 to 3, with and
// without character n-grams.
func TestWordIDLookupMatchesKeyLookup(t *testing.T) {
	texts := wordIDCorpus(t, 600)
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
			s := settings(ModeVocabulary)
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
			l, err := NewLearner(s)
			if err != nil {
				t.Fatal(err)
			}
			lw := l.NewWorker()
			for i := range train {
				lw.Observe(doc(i, train))
			}
			sp, _, err := l.Finish(lw, LabelsFrom(nil, false))
			if err != nil {
				t.Fatal(err)
			}
			e, err := NewEncoder(sp)
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
			wantKeys := map[int]map[string]bool{}
			var row weight.Row
			for i := range test {
				d := doc(i, test)
				ds := w.Encode(d, &row)
				want := map[int]float64{}
				var feats, unseen int
				z.Analyze(d, func(key []byte, code int) {
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
					t.Errorf("%s: %d distinct keys, %d unseen; want %d, %d", OrderLabel(code), gk, gu, len(keys), u)
				}
			}
		})
	}
}

// TestWordIDCountingMatchesKeyCounting checks learn's counting by word ids
// (two workers, merged) against counting every key the analyzer emits by
// its bytes: the learned vocabularies must be equal, column for column.
func TestWordIDCountingMatchesKeyCounting(t *testing.T) {
	texts := wordIDCorpus(t, 400)
	for _, ng := range []ngram.Config{
		{Words: ngram.Range{Min: 1, Max: 2}},
		{Words: ngram.Range{Min: 2, Max: 3}, Chars: ngram.Range{Min: 3, Max: 3}},
	} {
		for _, fields := range []int{1, 2} {
			s := settings(ModeVocabulary)
			s.NGrams = ng
			s.Cutoffs.MinDocs = 2
			s.Input.Text = []string{"title", "body"}[:fields]
			l, err := NewLearner(s)
			if err != nil {
				t.Fatal(err)
			}
			w1, w2 := l.NewWorker(), l.NewWorker()
			if w1.ids == nil {
				t.Fatal("learn does not count by word ids")
			}
			ref := vocab.NewCounts()
			z := l.analysis.NewAnalyzer()
			for i := range texts {
				d := [][]byte{[]byte(texts[i])}
				if fields == 2 {
					d = append(d, []byte(texts[(i*7)%len(texts)]))
				}
				w := w1
				if i%2 == 1 {
					w = w2
				}
				n := w.Observe(d)
				m := 0
				z.Analyze(d, func(key []byte, code int) { m++; ref.Add(key, code) })
				ref.EndDoc()
				if n != m {
					t.Fatalf("doc %d: %d keys counted, %d emitted", i, n, m)
				}
			}
			w1.Merge(w2)
			sp, _, err := l.Finish(w1, LabelsFrom(nil, false))
			if err != nil {
				t.Fatal(err)
			}
			v, _ := ref.Build(s.Cutoffs)
			got := sp.Content.Vocabulary
			if len(got.Keys) != len(v.Terms) {
				t.Fatalf("%v %d fields: %d columns, want %d", ng, fields, len(got.Keys), len(v.Terms))
			}
			for i, tm := range v.Terms {
				if got.Keys[i] != tm.Key || got.Orders[i] != tm.Order || got.DocCounts[i] != tm.Docs {
					t.Fatalf("%v %d fields: column %d is %q/%d/%d, want %q/%d/%d", ng, fields, i,
						got.Keys[i], got.Orders[i], got.DocCounts[i], tm.Key, tm.Order, tm.Docs)
				}
			}
			if got.Seen.Keys != int64(ref.Len()) {
				t.Errorf("seen keys %d, want %d", got.Seen.Keys, ref.Len())
			}
		}
	}
}

// TestHashingChunkPathMatchesAnalyze checks the hashing encoder's loop over
// a chunk's word n-grams against hashing every key Analyze emits, one by
// one (signed buckets summed per column), for one and two text fields,
// word orders 1 to 3 and character n-grams.
func TestHashingChunkPathMatchesAnalyze(t *testing.T) {
	texts := wordIDCorpus(t, 300)
	for _, fields := range []int{1, 2} {
		for _, ng := range []ngram.Config{{Words: ngram.Range{Min: 1, Max: 3}}, {Words: ngram.Range{Min: 2, Max: 2}, Chars: ngram.Range{Min: 2, Max: 3}}} {
			s := settings(ModeHashing)
			s.NGrams = ng
			s.TF, s.IDF, s.Norm = weight.TFCount, weight.IDFNone, weight.NormNone
			s.Input.Text = []string{"title", "body"}[:fields]
			sp := learn(t, s)
			e, err := NewEncoder(sp)
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
				z.Analyze(d, func(key []byte, _ int) {
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
