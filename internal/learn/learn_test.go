package learn

import (
	"strings"
	"testing"

	"github.com/bowline/bowline/internal/testkit"
	"github.com/bowline/bowline/ngram"
	"github.com/bowline/bowline/spec"
	"github.com/bowline/bowline/tokenize"
	"github.com/bowline/bowline/vocab"
)

// TestWordIDCountingMatchesKeyCounting checks learn's counting by word ids
// (two workers, merged) against counting every key the analyzer emits by
// its bytes: the learned vocabularies must be equal, column for column.
func TestWordIDCountingMatchesKeyCounting(t *testing.T) {
	texts := testkit.WordCorpus(t, 400)
	for _, ng := range []ngram.Config{
		{Words: ngram.Range{Min: 1, Max: 2}},
		{Words: ngram.Range{Min: 2, Max: 3}, Chars: ngram.Range{Min: 3, Max: 3}},
	} {
		for _, fields := range []int{1, 2} {
			s := &Settings{
				Input: spec.Input{Format: "tsv"}, Tokens: tokenize.DefaultOptions(),
				Mode: spec.ModeVocabulary, Cutoffs: vocab.DefaultCutoffs(),
			}
			s.NGrams = ng
			s.Cutoffs.MinDocs = 2
			s.Input.Text = []string{"title", "body"}[:fields]
			l, err := New(s)
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
				z.Analyze(d, func(key []byte, code ngram.Order) { m++; ref.Add(key, int(code)) })
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

// TestExtendLabels: a refresh keeps the parent's label numbers and
// appends new labels only where the map stays sorted.
func TestExtendLabels(t *testing.T) {
	parent := spec.Labels{Kind: spec.LabelsString, Map: []string{"app", "bikes", "billing"}}
	got, err := extendLabels(parent, spec.Labels{Kind: spec.LabelsString, Values: []string{"bikes", "docks"}, Counts: []int64{3, 4}})
	if err != nil || strings.Join(got.Map, " ") != "app bikes billing docks" || strings.Join(got.Values, " ") != "bikes docks" {
		t.Errorf("labels %+v, %v", got, err)
	}
	if _, err := extendLabels(parent, spec.Labels{Kind: spec.LabelsString, Values: []string{"apps"}}); err == nil || !strings.Contains(err.Error(), `"apps"`) {
		t.Errorf("a label sorting inside the map: %v", err)
	}
	if _, err := extendLabels(spec.Labels{Kind: spec.LabelsNumber}, spec.Labels{Kind: spec.LabelsString, Values: []string{"1", "x"}}); err == nil {
		t.Error("a string label for a numeric spec was accepted")
	}
	if _, err := extendLabels(spec.Labels{Kind: spec.LabelsNone}, spec.Labels{Kind: spec.LabelsNumber}); err == nil {
		t.Error("labels for an unlabeled spec were accepted")
	}
}
