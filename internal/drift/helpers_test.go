package drift

import (
	"bytes"
	"strings"
	"testing"

	"github.com/bowline/bowline/corpus"
	"github.com/bowline/bowline/internal/learn"
	"github.com/bowline/bowline/internal/pipeline"
	"github.com/bowline/bowline/ngram"
	"github.com/bowline/bowline/spec"
	"github.com/bowline/bowline/tokenize"
	"github.com/bowline/bowline/vocab"
	"github.com/bowline/bowline/weight"
)

// tsvInput is the demo corpus's text and label fields.
var tsvInput = spec.Input{Format: "tsv", Text: []string{"text"}, Label: "team", ID: "id"}

// settings returns vocabulary settings: words 1-2, no stop list, the given
// --min-docs, and the given idf.
func settings(t testing.TB, in spec.Input, minDocs int64, idf weight.IDF) *learn.Settings {
	t.Helper()
	st := &learn.Settings{Input: in, Tokens: tokenize.DefaultOptions(), KeepNegations: true, Mode: spec.ModeVocabulary}
	var err error
	if st.NGrams.Words, err = ngram.ParseWords("1-2"); err != nil {
		t.Fatal(err)
	}
	if st.NGrams.Chars, err = ngram.ParseChars("off"); err != nil {
		t.Fatal(err)
	}
	st.Cutoffs = vocab.Cutoffs{MinDocs: minDocs, MaxDocShare: 1}
	st.TF, st.IDF, st.Norm = weight.TFCount, idf, weight.NormNone
	return st
}

// hashSettings switches st to hashing mode with width buckets.
func hashSettings(st *learn.Settings, width uint64) *learn.Settings {
	st.Mode = spec.ModeHashing
	st.Cutoffs = vocab.Cutoffs{}
	st.Hashing = spec.Hashing{Width: width, Seed: 3}
	return st
}

func open(t testing.TB, data []byte, in spec.Input) *corpus.Reader {
	t.Helper()
	f, err := corpus.ParseFormat(in.Format)
	if err != nil {
		t.Fatal(err)
	}
	o := corpus.Options{Format: f, Text: in.Text, Label: in.Label, ID: in.ID, NoHeader: in.NoHeader}
	if f == corpus.Lines {
		o.Text, o.Label, o.ID = nil, "", ""
	}
	r, err := corpus.NewReader(bytes.NewReader(data), "mem."+in.Format, o)
	if err != nil {
		t.Fatal(err)
	}
	return r
}

func learnSpec(t testing.TB, data []byte, st *learn.Settings) *spec.Spec {
	t.Helper()
	l, err := learn.New(st)
	if err != nil {
		t.Fatal(err)
	}
	r := open(t, data, st.Input)
	defer r.Close()
	s, _, err := pipeline.Learn(r, l, pipeline.LearnOptions{Name: "train", Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	return s
}

func compare(t testing.TB, s *spec.Spec, data []byte, workers int) *Result {
	t.Helper()
	r := open(t, data, s.Content.Input)
	defer r.Close()
	res, err := Compare(s, r, Options{Workers: workers, Name: "new"})
	if err != nil {
		t.Fatal(err)
	}
	return res
}

// only keeps the TSV rows (and the header) whose column col equals value.
func only(data []byte, col int, value string) []byte {
	lines := strings.SplitAfter(string(data), "\n")
	out := lines[0]
	for _, l := range lines[1:] {
		f := strings.Split(strings.TrimSuffix(l, "\n"), "\t")
		if len(f) > col && f[col] == value {
			out += l
		}
	}
	return []byte(out)
}
