package serve

import (
	"bytes"
	"io"
	"net/http"
	"net/http/httptest"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/bowline/bowline"
	"github.com/bowline/bowline/corpus"
	"github.com/bowline/bowline/hashing"
	"github.com/bowline/bowline/internal/learn"
	"github.com/bowline/bowline/internal/pipeline"
	"github.com/bowline/bowline/internal/testkit"
	"github.com/bowline/bowline/ngram"
	"github.com/bowline/bowline/spec"
	"github.com/bowline/bowline/stopwords"
	"github.com/bowline/bowline/tokenize"
	"github.com/bowline/bowline/vocab"
	"github.com/bowline/bowline/weight"
)

// settings returns the demo's learn settings ("--stop en --words 1-2
// --min-docs 2 --idf smooth --norm l2") for the given input.
func settings(t testing.TB, in spec.Input) *learn.Settings {
	t.Helper()
	st := &learn.Settings{Input: in, Tokens: tokenize.DefaultOptions(), KeepNegations: true, Mode: spec.ModeVocabulary}
	words, err := stopwords.Builtin("en")
	if err != nil {
		t.Fatal(err)
	}
	st.StopSources, st.StopWords = []string{"en"}, words
	if st.NGrams.Words, err = ngram.ParseWords("1-2"); err != nil {
		t.Fatal(err)
	}
	st.Cutoffs = vocab.Cutoffs{MinDocs: 2, MaxDocShare: 1}
	st.TF, st.IDF, st.Norm = weight.TFCount, weight.IDFSmooth, weight.NormL2
	return st
}

// hashSettings switches st to signed hashing with width buckets.
func hashSettings(t testing.TB, st *learn.Settings, width string) *learn.Settings {
	t.Helper()
	w, err := hashing.ParseWidth(width)
	if err != nil {
		t.Fatal(err)
	}
	st.Mode = spec.ModeHashing
	st.Cutoffs = vocab.Cutoffs{}
	st.Hashing = spec.Hashing{Width: w, Seed: 7, Signed: true}
	return st
}

// learn learns a spec from a corpus held in memory.
func learnSpec(t testing.TB, data []byte, name string, st *learn.Settings) *spec.Spec {
	t.Helper()
	l, err := learn.New(st)
	if err != nil {
		t.Fatal(err)
	}
	r := openCorpus(t, data, name, st.Input)
	defer r.Close()
	s, _, err := pipeline.Learn(r, l, pipeline.LearnOptions{Name: name, Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	return s
}

func openCorpus(t testing.TB, data []byte, name string, in spec.Input) *corpus.Reader {
	t.Helper()
	f, err := corpus.ParseFormat(in.Format)
	if err != nil {
		t.Fatal(err)
	}
	r, err := corpus.NewReader(bytes.NewReader(data), name, corpus.Options{Format: f, Text: in.Text, Label: in.Label, ID: in.ID, NoHeader: in.NoHeader})
	if err != nil {
		t.Fatal(err)
	}
	return r
}

var demoInput = spec.Input{Format: "tsv", Text: []string{"text"}, Label: "team", ID: "id"}

// demoEncoder learns the demo spec on 300 invented records.
func demoEncoder(t testing.TB) *bowline.Encoder {
	t.Helper()
	train, _ := testkit.DemoSplit(t, 300)
	enc, err := bowline.New(learnSpec(t, train, "train.tsv", settings(t, demoInput)))
	if err != nil {
		t.Fatal(err)
	}
	return enc
}

// twoFieldEncoder learns a spec with the text fields title and body.
func twoFieldEncoder(t testing.TB) *bowline.Encoder {
	t.Helper()
	data := "title\tbody\n" +
		"Dock stuck\tDock 14 on Marrow Street kept my bike locked.\n" +
		"Double charge\tI was charged twice for one ride from Quill Square.\n" +
		"App crash\tThe app crashed when I scanned the dock code.\n" +
		"Dock stuck again\tThe dock at Quill Square would not release the bike.\n"
	st := settings(t, spec.Input{Format: "tsv", Text: []string{"title", "body"}})
	st.Cutoffs.MinDocs = 1
	enc, err := bowline.New(learnSpec(t, []byte(data), "two.tsv", st))
	if err != nil {
		t.Fatal(err)
	}
	return enc
}

func saveSpec(t testing.TB, s *spec.Spec, name string) string {
	t.Helper()
	p := filepath.Join(t.TempDir(), name)
	if err := s.Save(p); err != nil {
		t.Fatal(err)
	}
	return p
}

// do sends one request to h and returns the status code and body.
func do(t testing.TB, h http.Handler, method, path, contentType, body string) (int, http.Header, []byte) {
	t.Helper()
	req := httptest.NewRequest(method, path, strings.NewReader(body))
	if contentType != "" {
		req.Header.Set("Content-Type", contentType)
	}
	w := httptest.NewRecorder()
	h.ServeHTTP(w, req)
	res := w.Result()
	b, _ := io.ReadAll(res.Body)
	return res.StatusCode, res.Header, b
}

func readFile(t testing.TB, path string) []byte {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	return b
}
