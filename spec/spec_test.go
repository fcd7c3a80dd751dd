package spec

import (
	"bytes"
	"compress/gzip"
	"encoding/json"
	"errors"
	"os"
	"path/filepath"
	"reflect"
	"strconv"
	"strings"
	"testing"

	"github.com/bowline/bowline/ngram"
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

func settings(mode string) *Settings {
	en, _ := stopwords.Builtin("en")
	s := &Settings{
		Input:         Input{Format: "tsv", Text: []string{"text"}, Label: "team"},
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
	if mode == ModeHashing {
		s.Hashing = Hashing{Width: 1 << 10, Seed: 7, Signed: true}
	}
	return s
}

func learn(t *testing.T, s *Settings) *Spec {
	t.Helper()
	l, err := NewLearner(s)
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

func TestSaveLoadRoundTrip(t *testing.T) {
	for _, mode := range []string{ModeVocabulary, ModeHashing} {
		for _, name := range []string{"spec.json", "spec.json.gz"} {
			sp := learn(t, settings(mode))
			p := filepath.Join(t.TempDir(), name)
			if err := sp.Save(p); err != nil {
				t.Fatal(err)
			}
			got, err := Load(p)
			if err != nil {
				t.Fatalf("%s %s: %v", mode, name, err)
			}
			if got.Fingerprint != sp.Fingerprint {
				t.Fatalf("fingerprint changed: %s vs %s", got.Fingerprint, sp.Fingerprint)
			}
			a, _ := sp.Content.Canonical()
			b, _ := got.Content.Canonical()
			if !bytes.Equal(a, b) {
				t.Fatalf("%s: content differs after round trip", mode)
			}
			// Encoding with the loaded spec gives the same rows.
			e1, _ := NewEncoder(sp)
			e2, err := NewEncoder(got)
			if err != nil {
				t.Fatal(err)
			}
			for _, d := range docs {
				r1, _ := e1.Encode([][]byte{[]byte(d)})
				r2, _ := e2.Encode([][]byte{[]byte(d)})
				if !equalRows(r1, r2) {
					t.Fatalf("%s: rows differ for %q", mode, d)
				}
			}
		}
	}
}

func equalRows(a, b weight.Row) bool {
	if len(a.Indices) != len(b.Indices) {
		return false
	}
	for i := range a.Indices {
		if a.Indices[i] != b.Indices[i] || a.Values[i] != b.Values[i] {
			return false
		}
	}
	return true
}

func TestFingerprintIsDeterministic(t *testing.T) {
	a := learn(t, settings(ModeVocabulary))
	b := learn(t, settings(ModeVocabulary))
	if a.Fingerprint != b.Fingerprint {
		t.Fatal("same corpus and settings gave different fingerprints")
	}
	s := settings(ModeVocabulary)
	s.Norm = weight.NormL1
	if c := learn(t, s); c.Fingerprint == a.Fingerprint {
		t.Fatal("a different norm kept the fingerprint")
	}
}

func writeSpec(t *testing.T, sp *Spec) (string, []byte) {
	t.Helper()
	var buf bytes.Buffer
	if err := sp.Write(&buf); err != nil {
		t.Fatal(err)
	}
	return filepath.Join(t.TempDir(), "spec.json"), buf.Bytes()
}

func reason(t *testing.T, p string, data []byte) string {
	t.Helper()
	if err := os.WriteFile(p, data, 0o644); err != nil {
		t.Fatal(err)
	}
	_, err := Load(p)
	var le *LoadError
	if !errors.As(err, &le) {
		t.Fatalf("want a LoadError, got %v", err)
	}
	if !strings.Contains(err.Error(), p) {
		t.Fatalf("error does not name the file: %v", err)
	}
	return le.Reason
}

func TestLoadRefuses(t *testing.T) {
	sp := learn(t, settings(ModeVocabulary))
	p, good := writeSpec(t, sp)

	// A changed document count: the content no longer hashes to the
	// recorded fingerprint.
	i := bytes.Index(good, []byte(`"doc_counts":[`))
	j := i + bytes.IndexAny(good[i:], "0123456789")
	tampered := append([]byte(nil), good...)
	tampered[j]++
	if bytes.Equal(tampered, good) {
		t.Fatal("test did not tamper")
	}
	if r := reason(t, p, tampered); r != "fingerprint mismatch" {
		t.Fatalf("tampered: reason %q", r)
	}
	if r := reason(t, p, good[:len(good)/2]); r != "truncated" {
		t.Fatalf("truncated: reason %q", r)
	}
	newer := bytes.Replace(good, []byte(`"schema": 1`), []byte(`"schema": 99`), 1)
	if r := reason(t, p, newer); r != "newer schema" {
		t.Fatalf("newer: reason %q", r)
	}
	if r := reason(t, p, []byte(`{"hello": "world"}`)); r != "not a spec" {
		t.Fatalf("not a spec: reason %q", r)
	}
	var gz bytes.Buffer
	zw := gzip.NewWriter(&gz)
	zw.Write(good)
	zw.Close()
	if r := reason(t, p, gz.Bytes()[:gz.Len()-10]); r != "truncated" {
		t.Fatalf("truncated gzip: reason %q", r)
	}
	if _, err := Load(filepath.Join(t.TempDir(), "missing.json")); err == nil {
		t.Fatal("missing file loaded")
	}
}

// TestTFIDFHandComputed checks a whole row against arithmetic done by hand
// with the formulas of Manning, Raghavan, Schütze, Introduction to
// Information Retrieval (2008), ch. 6: log tf 1 + ln tf, smooth idf
// ln((1+N)/(1+df)) + 1, then L2 normalization.
func TestTFIDFHandComputed(t *testing.T) {
	s := &Settings{
		Input:  Input{Format: "lines", Text: []string{"1"}},
		Tokens: tokenize.DefaultOptions(),
		NGrams: ngram.Config{Words: ngram.Range{Min: 1, Max: 1}},
		Mode:   ModeVocabulary, Cutoffs: vocab.DefaultCutoffs(),
		TF: weight.TFLog, IDF: weight.IDFSmooth, Norm: weight.NormL2,
	}
	l, err := NewLearner(s)
	if err != nil {
		t.Fatal(err)
	}
	w := l.NewWorker()
	for _, d := range []string{"dock dock bike", "bike app", "dock"} {
		w.Observe([][]byte{[]byte(d)})
	}
	sp, _, err := l.Finish(w, Labels{Kind: "none"})
	if err != nil {
		t.Fatal(err)
	}
	// df: dock 2, bike 2, app 1; N = 3. Column order: document count
	// descending, then key bytes: bike, dock, app.
	if got := strings.Join(sp.Content.Vocabulary.Keys, " "); got != "bike dock app" {
		t.Fatalf("columns %q", got)
	}
	enc, err := NewEncoder(sp)
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
	sp := learn(t, settings(ModeVocabulary))
	enc, _ := NewEncoder(sp)
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
	if l := LabelsFrom([]string{"1", "-1", "0.5"}, true); l.Kind != "number" {
		t.Fatalf("numeric labels: %+v", l)
	}
}

// TestReindentedSpecLoads: whitespace does not change a spec's meaning, so a
// spec whose content was re-indented still loads with its fingerprint.
func TestReindentedSpecLoads(t *testing.T) {
	sp := learn(t, settings(ModeVocabulary))
	p, good := writeSpec(t, sp)
	var pretty bytes.Buffer
	if err := json.Indent(&pretty, good, "", "\t"); err != nil {
		t.Fatal(err)
	}
	os.WriteFile(p, pretty.Bytes(), 0o644)
	got, err := Load(p)
	if err != nil || got.Fingerprint != sp.Fingerprint {
		t.Fatalf("re-indented spec: %v", err)
	}
}

// TestLoadEncoderRefusesDuplicateKeys: LoadEncoder leaves the duplicate
// check to the encoder's index, and still refuses a spec that has a key
// twice, as Load does, for a unigram, a bigram and a key of another kind
// (character n-grams); a good spec loads the same either way.
func TestLoadEncoderRefusesDuplicateKeys(t *testing.T) {
	st := settings(ModeVocabulary)
	st.NGrams.Chars = ngram.Range{Min: 3, Max: 3}
	good := learn(t, st)
	dir := t.TempDir()
	p := filepath.Join(dir, "spec.json")
	if err := good.Save(p); err != nil {
		t.Fatal(err)
	}
	s1, err := Load(p)
	if err != nil {
		t.Fatal(err)
	}
	s2, enc, err := LoadEncoder(p)
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
		bad := learn(t, st)
		v := bad.Content.Vocabulary
		a, b := cols[0], cols[len(cols)-1]
		v.Keys[b] = keys[a]
		bad.Fingerprint, bad.canon = "", nil
		if err := bad.Save(p); err != nil {
			t.Fatal(err)
		}
		var le *LoadError
		if _, err := Load(p); !errors.As(err, &le) || le.Reason != "invalid" {
			t.Fatalf("order %d: Load gave %v, want an invalid spec", code, err)
		}
		_, _, err := LoadEncoder(p)
		if !errors.As(err, &le) || le.Reason != "invalid" || !strings.Contains(err.Error(), strconv.Quote(keys[a])) {
			t.Fatalf("order %d: LoadEncoder gave %v, want an invalid spec naming %q", code, err, keys[a])
		}
	}
	if tried < 3 {
		t.Fatalf("duplicated keys of %d kinds, want 3", tried)
	}
}
