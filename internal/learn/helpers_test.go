package learn

import (
	"testing"

	"github.com/bowline/bowline/ngram"
	"github.com/bowline/bowline/spec"
	"github.com/bowline/bowline/stopwords"
	"github.com/bowline/bowline/tokenize"
	"github.com/bowline/bowline/vocab"
	"github.com/bowline/bowline/weight"
)

// docs is a tiny invented Pellwick Bike Share corpus.
var docs = []string{
	"The dock at Harlow Quay did not release my bike",
	"Charged twice for one ride, please refund",
	"Great bike, smooth ride along the canal",
	"The app froze when I tried to unlock the bike",
}

// settings are English stop words, word 1-2-grams, log tf, smooth idf and
// L2 norm in mode.
func settings(mode spec.Mode) *Settings {
	en, _ := stopwords.Builtin("en")
	s := &Settings{
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

// learnSpec learns s on docs, labelled with three teams.
func learnSpec(t *testing.T, s *Settings) *spec.Spec {
	t.Helper()
	l, err := New(s)
	if err != nil {
		t.Fatal(err)
	}
	w := l.NewWorker()
	for _, d := range docs {
		w.Observe([][]byte{[]byte(d)})
	}
	sp, _, err := l.Finish(w, LabelsFrom([]string{"bikes", "billing", "app"}, true))
	if err != nil {
		t.Fatal(err)
	}
	return sp
}
