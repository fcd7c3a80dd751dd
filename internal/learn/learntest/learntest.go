// Package learntest holds what tests that learn specs share: the tiny invented corpus, the usual settings, and learning or extending a spec on texts.
package learntest

import (
	"sort"
	"testing"

	"github.com/bowline/bowline/internal/learn"
	"github.com/bowline/bowline/ngram"
	"github.com/bowline/bowline/spec"
	"github.com/bowline/bowline/stopwords"
	"github.com/bowline/bowline/tokenize"
	"github.com/bowline/bowline/vocab"
	"github.com/bowline/bowline/weight"
)

// Docs is a tiny invented Pellwick Bike Share corpus.
var Docs = []string{
	"The dock at Harlow Quay did not release my bike",
	"Charged twice for one ride, please refund",
	"Great bike, smooth ride along the canal",
	"The app froze when I tried to unlock the bike",
}

// Settings are English stop words (negations kept), word 1- and 2-grams,
// log tf, smooth idf and L2 norm in mode, for a TSV corpus with text and
// team fields; in hashing mode 2^10 signed buckets with seed 7.
func Settings(mode spec.Mode) *learn.Settings {
	en, _ := stopwords.Builtin("en")
	s := &learn.Settings{
		Input:         spec.Input{Format: "tsv", Text: []string{"text"}, Label: "team"},
		Tokens:        tokenize.DefaultOptions(),
		StopSources:   []string{"en"},
		StopWords:     en,
		KeepNegations: true,
		NGrams:        ngram.Config{Words: ngram.Range{Min: 1, Max: 2}},
		Mode:          mode,
		Cutoffs:       vocab.DefaultCutoffs(),
		TF:            weight.TFLog,
		IDF:           weight.IDFSmooth,
		Norm:          weight.NormL2,
	}
	if mode == spec.ModeHashing {
		s.Hashing = spec.Hashing{Width: 1 << 10, Seed: 7, Signed: true}
	}
	return s
}

// LearnDocs learns s on Docs, with the label map of three teams.
func LearnDocs(t testing.TB, s *learn.Settings) *spec.Spec {
	t.Helper()
	l, err := learn.New(s)
	if err != nil {
		t.Fatal(err)
	}
	w := l.NewWorker()
	for _, d := range Docs {
		w.Observe([][]byte{[]byte(d)})
	}
	sp, _, err := l.Finish(w, learn.LabelsFrom([]string{"bikes", "billing", "app"}, true))
	if err != nil {
		t.Fatal(err)
	}
	return sp
}

// Observe counts texts with l, as pipeline.Learn does, and returns the
// worker and the labels with their tallies (labels[i] is text i's).
func Observe(l *learn.Learner, texts, labels []string) (*learn.Worker, spec.Labels) {
	w := l.NewWorker()
	tally := map[string]int64{}
	for i, t := range texts {
		w.Observe([][]byte{[]byte(t)})
		tally[labels[i]]++
	}
	var values []string
	for v := range tally {
		values = append(values, v)
	}
	sort.Strings(values)
	lab := learn.LabelsFrom(values, true)
	lab.Values = values
	for _, v := range values {
		lab.Counts = append(lab.Counts, tally[v])
	}
	return w, lab
}

// LearnOn learns s on texts labelled labels.
func LearnOn(t testing.TB, s *learn.Settings, texts, labels []string) *spec.Spec {
	t.Helper()
	l, err := learn.New(s)
	if err != nil {
		t.Fatal(err)
	}
	return finish(t, l, texts, labels)
}

// ExtendOn refreshes parent on texts labelled labels with the cutoffs cut.
func ExtendOn(t testing.TB, parent *spec.Spec, cut vocab.Cutoffs, texts, labels []string) (*spec.Spec, *learn.Extension) {
	t.Helper()
	l, err := learn.NewExtend(parent, cut, parent.Content.Input)
	if err != nil {
		t.Fatal(err)
	}
	return finish(t, l, texts, labels), l.Extension()
}

func finish(t testing.TB, l *learn.Learner, texts, labels []string) *spec.Spec {
	t.Helper()
	w, lab := Observe(l, texts, labels)
	sp, _, err := l.Finish(w, lab)
	if err != nil {
		t.Fatal(err)
	}
	return sp
}
