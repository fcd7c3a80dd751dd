package encode

import (
	"errors"
	"path/filepath"
	"reflect"
	"strconv"
	"strings"
	"testing"

	"github.com/bowline/bowline/internal/learn"
	"github.com/bowline/bowline/internal/learn/learntest"
	"github.com/bowline/bowline/ngram"
	"github.com/bowline/bowline/spec"
	"github.com/bowline/bowline/tokenize"
	"github.com/bowline/bowline/vocab"
	"github.com/bowline/bowline/weight"
)

// TestTFIDFHandComputed checks a whole row against arithmetic done by hand
// with the formulas of Manning, Raghavan, Schütze, Introduction to
// Information Retrieval (2008), ch. 6: log tf 1 + ln tf, smooth idf
// ln((1+N)/(1+df)) + 1, then L2 normalization.
func TestTFIDFHandComputed(t *testing.T) {
	s := &learn.Settings{
		Input:  spec.Input{Format: "lines", Text: []string{"1"}},
		Tokens: tokenize.DefaultOptions(),
		NGrams: ngram.Config{Words: ngram.Range{Min: 1, Max: 1}},
		Mode:   spec.ModeVocabulary, Cutoffs: vocab.DefaultCutoffs(),
		TF: weight.TFLog, IDF: weight.IDFSmooth, Norm: weight.NormL2,
	}
	l, err := learn.New(s)
	if err != nil {
		t.Fatal(err)
	}
	w := l.NewWorker()
	for _, d := range []string{"dock dock bike", "bike app", "dock"} {
		w.Observe([][]byte{[]byte(d)})
	}
	sp, _, err := l.Finish(w, spec.Labels{Kind: spec.LabelsNone})
	if err != nil {
		t.Fatal(err)
	}
	// df: dock 2, bike 2, app 1; N = 3. Column order: document count
	// descending, then key bytes: bike, dock, app.
	if got := strings.Join(sp.Content.Vocabulary.Keys, " "); got != "bike dock app" {
		t.Fatalf("columns %q", got)
	}
	enc, err := New(sp)
	if err != nil {
		t.Fatal(err)
	}
	row, _ := enc.Encode([][]byte{[]byte("dock dock bike")})
	// tf: bike 1 -> 1; dock 2 -> 1 + ln 2 = 1.693147.
	// idf: bike, dock ln(4/3) + 1 = 1.287682.
	// weights: bike 1.287682, dock 2.180233; L2 norm 2.532099.
	// normalized: bike 0.508543, dock 0.861037.
	want := []float64{0.508543, 0.861037}
	if len(row.Indices) != 2 || row.Indices[0] != 0 || row.Indices[1] != 1 {
		t.Fatalf("indices %v", row.Indices)
	}
	for i, v := range want {
		if d := row.Values[i] - v; d > 1e-6 || d < -1e-6 {
			t.Fatalf("value %d = %.6f, want %.6f", i, row.Values[i], v)
		}
	}
}

func TestLabels(t *testing.T) {
	sp := learntest.LearnDocs(t, learntest.Settings(spec.ModeVocabulary))
	enc, _ := New(sp)
	for raw, want := range map[string]float64{"app": 1, "bikes": 2, "billing": 3} {
		got, err := enc.Label([]byte(raw), nil)
		if err != nil || got != want {
			t.Fatalf("label %q = %v, %v; want %v", raw, got, err, want)
		}
	}
	if v, err := enc.Label(nil, nil); err != nil || v != 0 {
		t.Fatalf("unlabeled = %v, %v", v, err)
	}
	if _, err := enc.Label([]byte("docks"), nil); err == nil {
		t.Fatal("unseen label accepted")
	}
	fb := -1.0
	if v, err := enc.Label([]byte("docks"), &fb); err != nil || v != -1 {
		t.Fatalf("fallback = %v, %v", v, err)
	}
	if l := learn.LabelsFrom([]string{"1", "-1", "0.5"}, true); l.Kind != spec.LabelsNumber {
		t.Fatalf("numeric labels: %+v", l)
	}
}

// TestLoadEncoderRefusesDuplicateKeys: LoadEncoder leaves the duplicate
// check to the encoder's index, and still refuses a spec that has a key
// twice, as Load does, for a unigram, a bigram and a key of another kind
// (character n-grams); a good spec loads the same either way.
func TestLoadEncoderRefusesDuplicateKeys(t *testing.T) {
	st := learntest.Settings(spec.ModeVocabulary)
	st.NGrams.Chars = ngram.Range{Min: 3, Max: 3}
	good := learntest.LearnDocs(t, st)
	dir := t.TempDir()
	p := filepath.Join(dir, "spec.json")
	if err := good.Save(p); err != nil {
		t.Fatal(err)
	}
	s1, err := spec.Load(p)
	if err != nil {
		t.Fatal(err)
	}
	s2, enc, err := Load(p, spec.LoadOptions{})
	if err != nil || enc == nil || !reflect.DeepEqual(s1, s2) {
		t.Fatalf("LoadEncoder of a good spec: %v", err)
	}
	keys := good.Content.Vocabulary.Keys
	orders := good.Content.Vocabulary.Orders
	kinds := map[int][]int{} // order code -> columns
	for col, o := range orders {
		kinds[o] = append(kinds[o], col)
	}
	if len(kinds) < 3 {
		t.Fatalf("want unigrams, bigrams and character n-grams, got order codes %v", kinds)
	}
	tried := 0
	for code, cols := range kinds {
		if len(cols) < 2 {
			continue
		}
		tried++
		bad := learntest.LearnDocs(t, st)
		v := bad.Content.Vocabulary
		a, b := cols[0], cols[len(cols)-1]
		v.Keys[b] = keys[a]
		bad.Fingerprint = ""
		if err := bad.Save(p); err != nil {
			t.Fatal(err)
		}
		var le *spec.LoadError
		if _, err := spec.Load(p); !errors.As(err, &le) || !errors.Is(le.Reason, spec.ErrInvalid) {
			t.Fatalf("order %d: Load gave %v, want an invalid spec", code, err)
		}
		_, _, err := Load(p, spec.LoadOptions{})
		if !errors.As(err, &le) || !errors.Is(le.Reason, spec.ErrInvalid) || !strings.Contains(err.Error(), strconv.Quote(keys[a])) {
			t.Fatalf("order %d: LoadEncoder gave %v, want an invalid spec naming %q", code, err, keys[a])
		}
	}
	if tried < 3 {
		t.Fatalf("duplicated keys of %d kinds, want 3", tried)
	}
}
