package bowline

import (
	"bytes"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"testing"

	"github.com/bowline/bowline/corpus"
	"github.com/bowline/bowline/internal/demo"
	"github.com/bowline/bowline/internal/encode"
	"github.com/bowline/bowline/internal/learn"
	"github.com/bowline/bowline/internal/pipeline"
	"github.com/bowline/bowline/ngram"
	"github.com/bowline/bowline/spec"
	"github.com/bowline/bowline/svmlight"
	"github.com/bowline/bowline/tokenize"
	"github.com/bowline/bowline/vocab"
	"github.com/bowline/bowline/weight"
)

func settings(t testing.TB, text []string, tf weight.TF, idf weight.IDF, norm weight.Norm) *learn.Settings {
	t.Helper()
	words, err := ngram.ParseWords("1-1")
	if err != nil {
		t.Fatal(err)
	}
	return &learn.Settings{
		Input:   spec.Input{Format: "tsv", Text: text},
		Tokens:  tokenize.DefaultOptions(),
		NGrams:  ngram.Config{Words: words},
		Mode:    spec.ModeVocabulary,
		Cutoffs: vocab.DefaultCutoffs(),
		TF:      tf, IDF: idf, Norm: norm,
	}
}

func learnSpec(t testing.TB, data string, st *learn.Settings) *spec.Spec {
	t.Helper()
	l, err := learn.New(st)
	if err != nil {
		t.Fatal(err)
	}
	r, err := corpus.NewReader(strings.NewReader(data), "train.tsv", corpus.Options{Format: corpus.TSV, Text: st.Input.Text, Label: st.Input.Label, ID: st.Input.ID})
	if err != nil {
		t.Fatal(err)
	}
	s, _, err := pipeline.Learn(r, l, pipeline.LearnOptions{Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	return s
}

const tiny = "text\ndock bike\nbike fee\nrefund fee\n"

func column(t *testing.T, e *Encoder, key string) int {
	t.Helper()
	for i, k := range e.Spec().Content.Vocabulary.Keys {
		if k == key {
			return i
		}
	}
	t.Fatalf("no column %q", key)
	return -1
}

// Raw counts and cosine (L2) normalization as defined in Manning, Raghavan
// and Schütze, Introduction to Information Retrieval (2008), sections 6.2
// (tf_t,d is the number of occurrences of t in d) and 6.3.1 (a vector
// divided by its Euclidean length).
func TestEncodeCountsAndNorm(t *testing.T) {
	for _, c := range []struct {
		norm       weight.Norm
		dock, bike float64
	}{
		{weight.NormNone, 2, 1},
		{weight.NormL2, 2 / math.Sqrt(5), 1 / math.Sqrt(5)},
		{weight.NormL1, 2.0 / 3, 1.0 / 3},
	} {
		e, err := New(learnSpec(t, tiny, settings(t, []string{"text"}, weight.TFCount, weight.IDFNone, c.norm)))
		if err != nil {
			t.Fatal(err)
		}
		row, err := e.Encode(Document{ID: "d", Text: "Dock dock BIKE lock"})
		if err != nil {
			t.Fatal(err)
		}
		got := map[int]float64{}
		for i, col := range row.Indices {
			got[col] = row.Values[i]
		}
		if len(got) != 2 || math.Abs(got[column(t, e, "dock")]-c.dock) > 1e-15 || math.Abs(got[column(t, e, "bike")]-c.bike) > 1e-15 {
			t.Errorf("norm %v: row %v %v, want dock=%v bike=%v", c.norm, row.Indices, row.Values, c.dock, c.bike)
		}
		if row.ID != "d" || row.Features != 4 || row.Unseen != 1 {
			t.Errorf("id %q features %d unseen %d, want d 4 1", row.ID, row.Features, row.Unseen)
		}
	}
}

func TestDocumentErrors(t *testing.T) {
	one, err := New(learnSpec(t, tiny, settings(t, []string{"text"}, weight.TFCount, weight.IDFNone, weight.NormNone)))
	if err != nil {
		t.Fatal(err)
	}
	two, err := New(learnSpec(t, "title\tbody\ndock\tbike\n", settings(t, []string{"title", "body"}, weight.TFCount, weight.IDFNone, weight.NormNone)))
	if err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		enc        *Encoder
		d          Document
		field, has string
	}{
		{one, Document{ID: "a", Text: "x", Fields: map[string]string{"text": "y"}}, "", "both"},
		{one, Document{ID: "a", Fields: map[string]string{"txt": "y"}}, "text", "missing"},
		{one, Document{ID: "a", Fields: map[string]string{"text": "y", "zz": "q", "aa": "r"}}, "aa", "not a text field"},
		{two, Document{ID: "a", Text: "x"}, "", "2 text fields"},
		{two, Document{ID: "a"}, "", "no text"},
		{two, Document{ID: "a", Fields: map[string]string{"body": "x"}}, "title", "missing"},
	}
	for i, c := range cases {
		row, err := c.enc.Encode(c.d)
		var de *DocumentError
		if !errors.As(err, &de) {
			t.Errorf("case %d: error %v, want a *DocumentError", i, err)
			continue
		}
		if de.ID != "a" || de.Field != c.field || !strings.Contains(err.Error(), c.has) || row.Indices != nil {
			t.Errorf("case %d: %+v (%v), want field %q and %q", i, de, err, c.field, c.has)
		}
	}
	// An empty text is an empty document, whether given as Text or named.
	for _, d := range []Document{{}, {Fields: map[string]string{"text": ""}}} {
		row, err := one.Encode(d)
		if err != nil || len(row.Indices) != 0 || row.Features != 0 {
			t.Errorf("empty text %+v: %+v %v", d, row, err)
		}
	}
	row, err := two.Encode(Document{Fields: map[string]string{"title": "", "body": ""}})
	if err != nil || len(row.Indices) != 0 {
		t.Errorf("two empty fields: %+v %v", row, err)
	}
	row, err = two.Encode(Document{Fields: map[string]string{"title": "dock", "body": "dock"}})
	if err != nil || len(row.Indices) != 1 || row.Unseen != 1 {
		t.Errorf("two fields: %+v %v (keys are per field: body has no dock)", row, err)
	}
	if _, err := one.EncodeTexts("x", [][]byte{[]byte("a"), []byte("b")}); err == nil {
		t.Error("EncodeTexts took two texts for a one-field spec")
	}
}

func TestLoad(t *testing.T) {
	s := learnSpec(t, tiny, settings(t, []string{"text"}, weight.TFCount, weight.IDFSmooth, weight.NormL2))
	dir := t.TempDir()
	for _, name := range []string{"spec.json", "spec.json.gz"} {
		p := filepath.Join(dir, name)
		if err := s.Save(p); err != nil {
			t.Fatal(err)
		}
		e, err := Load(p)
		if err != nil {
			t.Fatal(err)
		}
		if e.Fingerprint() != s.Fingerprint || !strings.HasPrefix(e.Fingerprint(), "sha256:") || len(e.Fingerprint()) != 7+64 {
			t.Errorf("%s: fingerprint %q, want %q", name, e.Fingerprint(), s.Fingerprint)
		}
		if e.Columns() != int(s.Columns()) || len(e.Fields()) != 1 {
			t.Errorf("%s: %d columns, fields %v", name, e.Columns(), e.Fields())
		}
	}
	raw, err := os.ReadFile(filepath.Join(dir, "spec.json"))
	if err != nil {
		t.Fatal(err)
	}
	tampered := bytes.Replace(raw, []byte(`"refund"`), []byte(`"refunds"`), 1)
	if bytes.Equal(tampered, raw) {
		t.Fatal("could not tamper")
	}
	p := filepath.Join(dir, "tampered.json")
	os.WriteFile(p, tampered, 0o644)
	for path, reason := range map[string]error{p: spec.ErrFingerprint, filepath.Join(dir, "none.json"): spec.ErrUnreadable} {
		_, err := Load(path)
		var le *spec.LoadError
		if !errors.As(err, &le) || le.Reason != reason || !errors.Is(err, reason) {
			t.Errorf("%s: %v, want a *spec.LoadError %q", path, err, reason)
		}
	}
	if _, err := New(nil); err == nil {
		t.Error("New(nil) accepted")
	}
	if _, err := New(&spec.Spec{Content: s.Content}); err == nil {
		t.Error("New accepted an unsealed spec")
	}
}

// The library gives the rows "bowline encode" writes (pipeline.Encode),
// read back with the svmlight package's Reader.
func TestParityWithEncode(t *testing.T) {
	var all bytes.Buffer
	if err := demo.WriteTSV(&all, demo.Options{Docs: 300, Seed: 3}); err != nil {
		t.Fatal(err)
	}
	st := settings(t, []string{"text"}, weight.TFLog, weight.IDFSmooth, weight.NormL2)
	st.Input.ID = "id"
	s := learnSpec(t, all.String(), st)
	senc, err := encode.New(s)
	if err != nil {
		t.Fatal(err)
	}
	var svm bytes.Buffer
	r, _ := corpus.NewReader(bytes.NewReader(all.Bytes()), "all.tsv", corpus.Options{Format: corpus.TSV, Text: []string{"text"}, ID: "id"})
	if _, err := pipeline.Encode(r, senc, &svm, pipeline.EncodeOptions{Base: 1, WithIDs: true, Workers: 2}); err != nil {
		t.Fatal(err)
	}
	e, _ := New(s)
	texts := map[string]string{}
	r, _ = corpus.NewReader(bytes.NewReader(all.Bytes()), "all.tsv", corpus.Options{Format: corpus.TSV, Text: []string{"text"}, ID: "id"})
	for r.Scan() {
		texts[string(r.Record().ID)] = string(r.Record().Text[0])
	}
	sr := svmlight.NewReader(&svm, "all.svm", 1)
	n := 0
	for sr.Scan() {
		want := sr.Row()
		got, err := e.Encode(Document{ID: want.ID, Text: texts[want.ID]})
		if err != nil {
			t.Fatal(err)
		}
		if fmt.Sprint(got.Indices, got.Values) != fmt.Sprint(want.Indices, want.Values) {
			t.Fatalf("%s: library %v %v, encode %v %v", want.ID, got.Indices, got.Values, want.Indices, want.Values)
		}
		n++
	}
	if sr.Err() != nil || n != 300 {
		t.Fatalf("%d rows, %v", n, sr.Err())
	}
}

func TestConcurrentEncode(t *testing.T) {
	var all bytes.Buffer
	demo.WriteTSV(&all, demo.Options{Docs: 200, Seed: 5})
	st := settings(t, []string{"text"}, weight.TFCount, weight.IDFSmooth, weight.NormL2)
	e, err := New(learnSpec(t, all.String(), st))
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(strings.TrimSpace(all.String()), "\n")[1:]
	want := make([]Row, len(lines))
	for i, l := range lines {
		want[i], _ = e.Encode(Document{Text: l})
	}
	var wg sync.WaitGroup
	errs := make(chan string, 8)
	for g := 0; g < 8; g++ {
		wg.Add(1)
		go func(g int) {
			defer wg.Done()
			for k := range lines {
				i := (k + g*25) % len(lines)
				got, _ := e.Encode(Document{Text: lines[i]})
				if fmt.Sprint(got) != fmt.Sprint(want[i]) {
					errs <- fmt.Sprintf("goroutine %d line %d differs", g, i)
					return
				}
			}
		}(g)
	}
	wg.Wait()
	close(errs)
	for e := range errs {
		t.Error(e)
	}
}

func BenchmarkEncode(b *testing.B) {
	var all bytes.Buffer
	demo.WriteTSV(&all, demo.Options{Docs: 500, Seed: 1})
	e, err := New(learnSpec(b, all.String(), settings(b, []string{"text"}, weight.TFCount, weight.IDFSmooth, weight.NormL2)))
	if err != nil {
		b.Fatal(err)
	}
	lines := strings.Split(strings.TrimSpace(all.String()), "\n")[1:]
	var size int
	for _, l := range lines {
		size += len(l)
	}
	b.SetBytes(int64(size / len(lines)))
	b.ReportAllocs()
	b.RunParallel(func(pb *testing.PB) {
		i := 0
		for pb.Next() {
			e.Encode(Document{Text: lines[i%len(lines)]})
			i++
		}
	})
}
