package beam

import (
	"bytes"
	"context"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"testing"

	"github.com/apache/beam/sdks/v2/go/pkg/beam"
	"github.com/apache/beam/sdks/v2/go/pkg/beam/runners/prism"

	"github.com/bowline/bowline/corpus"
	"github.com/bowline/bowline/hashing"
	"github.com/bowline/bowline/internal/demo"
	"github.com/bowline/bowline/internal/encode"
	"github.com/bowline/bowline/internal/learn"
	"github.com/bowline/bowline/internal/pipeline"
	"github.com/bowline/bowline/ngram"
	"github.com/bowline/bowline/spec"
	"github.com/bowline/bowline/stopwords"
	"github.com/bowline/bowline/tokenize"
	"github.com/bowline/bowline/vocab"
	"github.com/bowline/bowline/weight"
)

// The reference for every check here is bowline's single-machine learn and
// encode (package pipeline, what the bowline command runs): the issue asks
// that the Beam pipelines give the same spec, fingerprint included, and the
// same rows, byte for byte.

func TestMain(m *testing.M) {
	beam.Init()
	os.Exit(m.Run())
}

// demoFiles writes the invented demo corpus (docs records) as one TSV file
// and as the same records split over two TSV files with a header each.
func demoFiles(t *testing.T, docs int) (whole string, parts []string) {
	t.Helper()
	var buf bytes.Buffer
	if err := demo.WriteTSV(&buf, demo.Options{Docs: docs, Seed: 1}); err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	whole = filepath.Join(dir, "all.tsv")
	if err := os.WriteFile(whole, buf.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	lines := strings.SplitAfter(strings.TrimSuffix(buf.String(), "\n"), "\n")
	head, rows := lines[0], lines[1:]
	if len(rows) != docs {
		t.Fatalf("demo corpus has %d rows, want %d", len(rows), docs)
	}
	cut := docs * 3 / 5
	for i, chunk := range [][]string{rows[:cut], rows[cut:]} {
		p := filepath.Join(dir, []string{"a.tsv", "b.tsv"}[i])
		body := head + strings.Join(chunk, "")
		if !strings.HasSuffix(body, "\n") {
			body += "\n"
		}
		if err := os.WriteFile(p, []byte(body), 0o644); err != nil {
			t.Fatal(err)
		}
		parts = append(parts, p)
	}
	return whole, parts
}

func vocabSettings(t *testing.T, label string) *learn.Settings {
	t.Helper()
	words, err := stopwords.Builtin("en")
	if err != nil {
		t.Fatal(err)
	}
	w, _ := ngram.ParseWords("1-2")
	return &learn.Settings{
		Input:         spec.Input{Format: "tsv", Text: []string{"text"}, Label: label},
		Tokens:        tokenize.DefaultOptions(),
		StopSources:   []string{"en"},
		StopWords:     words,
		KeepNegations: true,
		NGrams:        ngram.Config{Words: w},
		Mode:          spec.ModeVocabulary,
		Cutoffs:       vocab.Cutoffs{MinDocs: 2, MaxDocShare: 0.5, MaxTerms: 0},
		TF:            weight.TFLog,
		IDF:           weight.IDFSmooth,
		Norm:          weight.NormL2,
	}
}

func hashSettings(t *testing.T) *learn.Settings {
	t.Helper()
	width, err := hashing.ParseWidth("2^12")
	if err != nil {
		t.Fatal(err)
	}
	w, _ := ngram.ParseWords("1-1")
	c, _ := ngram.ParseChars("3-4")
	return &learn.Settings{
		Input:         spec.Input{Format: "tsv", Text: []string{"text"}, Label: "sentiment"},
		Tokens:        tokenize.DefaultOptions(),
		KeepNegations: true,
		NGrams:        ngram.Config{Words: w, Chars: c},
		Mode:          spec.ModeHashing,
		Hashing:       spec.Hashing{Width: width, Seed: 7, Signed: true},
		TF:            weight.TFCount,
		IDF:           weight.IDFPlain,
		Norm:          weight.NormL1,
	}
}

func corpusOptions(st *learn.Settings) corpus.Options {
	return corpus.Options{Format: corpus.TSV, Text: st.Input.Text, Label: st.Input.Label, ID: st.Input.ID}
}

// learnOne is the single-machine learn over one file.
func learnOne(t *testing.T, path string, st *learn.Settings) *spec.Spec {
	t.Helper()
	r, err := corpus.Open(path, corpusOptions(st))
	if err != nil {
		t.Fatal(err)
	}
	defer r.Close()
	l, err := learn.New(st)
	if err != nil {
		t.Fatal(err)
	}
	s, _, err := pipeline.Learn(r, l, pipeline.LearnOptions{Name: path, Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	return s
}

func run(t *testing.T, p *beam.Pipeline) {
	t.Helper()
	if _, err := prism.Execute(context.Background(), p); err != nil {
		t.Fatal(err)
	}
}

// learnBeam runs the Beam learn pipeline on prism.
func learnBeam(t *testing.T, files []string, st *learn.Settings) *spec.Spec {
	t.Helper()
	out := filepath.Join(t.TempDir(), "beam-spec.json")
	p, s := beam.NewPipelineWithRoot()
	if _, err := Learn(s, files, corpusOptions(st), st, out); err != nil {
		t.Fatal(err)
	}
	run(t, p)
	sp, err := spec.Load(out)
	if err != nil {
		t.Fatal(err)
	}
	return sp
}

func sameSpec(t *testing.T, beamSpec, one *spec.Spec) {
	t.Helper()
	t.Logf("fingerprints: beam %s, single machine %s", beamSpec.Fingerprint, one.Fingerprint)
	if beamSpec.Fingerprint != one.Fingerprint {
		a, _ := beamSpec.Content.Canonical()
		b, _ := one.Content.Canonical()
		i := 0
		for i < len(a) && i < len(b) && a[i] == b[i] {
			i++
		}
		t.Fatalf("Beam spec %s != single-machine spec %s; contents part at byte %d:\nbeam: %.200s\none:  %.200s",
			beamSpec.Fingerprint, one.Fingerprint, i, a[max(0, i-40):], b[max(0, i-40):])
	}
}

func TestLearnVocabularyTwoFiles(t *testing.T) {
	whole, parts := demoFiles(t, 1500)
	st := vocabSettings(t, "team")
	one := learnOne(t, whole, st)
	// Small partial counts, so that the combine merges many of them per
	// key (prism runs the workers in this process).
	defer func(n int) { maxBundleKeys = n }(maxBundleKeys)
	maxBundleKeys = 64
	got := learnBeam(t, parts, st)
	sameSpec(t, got, one)
	// The demo corpus has one record per line after the header: N is the
	// line count less one (counted here apart from both pipelines).
	if got.Content.Docs != 1500 {
		t.Errorf("docs = %d, want 1500", got.Content.Docs)
	}
	if len(got.Content.Labels.Map) == 0 || got.Content.Vocabulary == nil || len(got.Content.Vocabulary.Keys) == 0 {
		t.Errorf("spec has no labels or no vocabulary: %+v", got.Content.Labels)
	}
}

func TestLearnHashing(t *testing.T) {
	whole, _ := demoFiles(t, 800)
	st := hashSettings(t)
	one := learnOne(t, whole, st)
	got := learnBeam(t, []string{whole}, st)
	sameSpec(t, got, one)
	if len(got.Content.Weights.IDFBuckets) == 0 {
		t.Error("hashing spec learned no bucket idf")
	}
}

func TestEncodeShardsEqualRows(t *testing.T) {
	whole, parts := demoFiles(t, 1200)
	st := vocabSettings(t, "team")
	st.Input.ID = "id"
	sp := learnOne(t, whole, st)
	specPath := filepath.Join(t.TempDir(), "spec.json")
	if err := sp.Save(specPath); err != nil {
		t.Fatal(err)
	}
	data, err := os.ReadFile(specPath)
	if err != nil {
		t.Fatal(err)
	}
	in := corpusOptions(st)

	// Single machine, on the concatenated corpus.
	r, err := corpus.Open(whole, in)
	if err != nil {
		t.Fatal(err)
	}
	defer r.Close()
	enc, err := encode.New(sp)
	if err != nil {
		t.Fatal(err)
	}
	var want bytes.Buffer
	if _, err := pipeline.Encode(r, enc, &want, pipeline.EncodeOptions{Name: whole, Workers: 2, Base: 1, WithIDs: true}); err != nil {
		t.Fatal(err)
	}

	// Beam, on the two parts, 250 input lines per shard.
	prefix := filepath.Join(t.TempDir(), "rows")
	p, s := beam.NewPipelineWithRoot()
	if _, err := Encode(s, parts, in, data, EncodeOptions{Out: prefix, ShardLines: 250, Base: 1, WithIDs: true}); err != nil {
		t.Fatal(err)
	}
	run(t, p)
	names, err := filepath.Glob(prefix + "-*")
	if err != nil {
		t.Fatal(err)
	}
	sort.Strings(names)
	// Part a holds 720 records on lines 2..721 (blocks 0-2), part b 480
	// records on lines 2..481 (blocks 0-1).
	wantNames := []string{ShardName(prefix, 0, 0), ShardName(prefix, 0, 1), ShardName(prefix, 0, 2), ShardName(prefix, 1, 0), ShardName(prefix, 1, 1)}
	if strings.Join(names, " ") != strings.Join(wantNames, " ") {
		t.Fatalf("shards %q, want %q", names, wantNames)
	}
	var got bytes.Buffer
	for _, n := range names {
		b, err := os.ReadFile(n)
		if err != nil {
			t.Fatal(err)
		}
		got.Write(b)
	}
	if !bytes.Equal(got.Bytes(), want.Bytes()) {
		g, w := strings.Split(got.String(), "\n"), strings.Split(want.String(), "\n")
		for i := 0; i < len(g) && i < len(w); i++ {
			if g[i] != w[i] {
				t.Fatalf("row %d differs:\nbeam: %s\none:  %s", i+1, g[i], w[i])
			}
		}
		t.Fatalf("beam wrote %d rows, single machine %d", len(g)-1, len(w)-1)
	}
	if n := strings.Count(got.String(), "\n"); n != 1200 {
		t.Errorf("%d rows, want 1200", n)
	}
	if !strings.Contains(got.String(), " # ") {
		t.Error("rows carry no ids")
	}
}

func TestLearnRefusesEmptyLabel(t *testing.T) {
	dir := t.TempDir()
	a := filepath.Join(dir, "a.tsv")
	b := filepath.Join(dir, "b.tsv")
	os.WriteFile(a, []byte("text\tteam\nthe dock was full\tdocks\n"), 0o644)
	os.WriteFile(b, []byte("text\tteam\nbike chain broke\tbikes\napp froze\t\n"), 0o644)
	st := vocabSettings(t, "team")
	p, s := beam.NewPipelineWithRoot()
	out := filepath.Join(dir, "spec.json")
	if _, err := Learn(s, []string{a, b}, corpusOptions(st), st, out); err != nil {
		t.Fatal(err)
	}
	_, err := prism.Execute(context.Background(), p)
	// bowline learn refuses an empty label naming file and line
	// (pipeline.Learn); so does the Beam job.
	if err == nil || !strings.Contains(err.Error(), b+":3: the label field is empty") {
		t.Fatalf("err = %v, want the empty label at %s:3", err, b)
	}
	if _, err := os.Stat(out); !os.IsNotExist(err) {
		t.Errorf("a failed job left a spec: %v", err)
	}
}
