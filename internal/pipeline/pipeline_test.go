package pipeline

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"strings"
	"testing"

	"github.com/bowline/bowline/corpus"
	"github.com/bowline/bowline/hashing"
	"github.com/bowline/bowline/internal/analysis"
	"github.com/bowline/bowline/internal/encode"
	"github.com/bowline/bowline/internal/learn"
	"github.com/bowline/bowline/internal/testkit"
	"github.com/bowline/bowline/ngram"
	"github.com/bowline/bowline/report"
	"github.com/bowline/bowline/spec"
	"github.com/bowline/bowline/stopwords"
	"github.com/bowline/bowline/tokenize"
	"github.com/bowline/bowline/vocab"
	"github.com/bowline/bowline/weight"
)

var copts = corpus.Options{Format: corpus.TSV, Text: []string{"text"}, Label: "team", ID: "id"}

func settings(mode spec.Mode) *learn.Settings {
	en, _ := stopwords.Builtin("en")
	s := &learn.Settings{
		Input:  spec.Input{Format: "tsv", Text: copts.Text, Label: copts.Label, ID: copts.ID},
		Tokens: tokenize.DefaultOptions(), StopSources: []string{"en"}, StopWords: en, KeepNegations: true,
		NGrams: ngram.Config{Words: ngram.Range{Min: 1, Max: 2}, Chars: ngram.Range{Min: 3, Max: 4}},
		Mode:   mode, Cutoffs: vocab.Cutoffs{MinDocs: 2, MaxDocShare: 0.9},
		Unseen: vocab.Unseen{Mode: vocab.UnseenHash, Buckets: 16},
		TF:     weight.TFLog, IDF: weight.IDFSmooth, Norm: weight.NormL2,
	}
	if mode == spec.ModeHashing {
		s.Hashing = spec.Hashing{Width: 1 << 14, Seed: 3, Signed: true}
		s.Cutoffs, s.Unseen = vocab.Cutoffs{}, vocab.Unseen{}
	}
	return s
}

func reader(t testing.TB, data []byte) *corpus.Reader {
	t.Helper()
	r, err := corpus.NewReader(bytes.NewReader(data), "demo.tsv", copts)
	if err != nil {
		t.Fatal(err)
	}
	return r
}

func learnSpec(t testing.TB, data []byte, mode spec.Mode, workers int) *spec.Spec {
	t.Helper()
	l, err := learn.New(settings(mode))
	if err != nil {
		t.Fatal(err)
	}
	s, _, err := Learn(reader(t, data), l, LearnOptions{Name: "train.tsv", Workers: workers})
	if err != nil {
		t.Fatal(err)
	}
	return s
}

func encodeRows(t testing.TB, s *spec.Spec, data []byte, workers int) ([]byte, *report.Figures) {
	t.Helper()
	enc, err := encode.New(s)
	if err != nil {
		t.Fatal(err)
	}
	var out bytes.Buffer
	fig, err := Encode(reader(t, data), enc, &out, EncodeOptions{Name: "test.tsv", Workers: workers, WithIDs: true})
	if err != nil {
		t.Fatal(err)
	}
	return out.Bytes(), fig
}

// TestDeterministicAcrossWorkers: same input and spec give byte-identical
// specs, rows and figures whatever the worker count.
func TestDeterministicAcrossWorkers(t *testing.T) {
	train, test := testkit.DemoSplit(t, 3000)
	for _, mode := range []spec.Mode{spec.ModeVocabulary, spec.ModeHashing} {
		var firstSpec string
		var firstRows []byte
		var firstFig string
		for _, w := range []int{1, 2, 3, 7} {
			s := learnSpec(t, train, mode, w)
			rows, fig := encodeRows(t, s, test, w)
			fig.Throughput = report.Throughput{}
			figJSON, _ := json.Marshal(fig)
			figText := string(figJSON)
			if w == 1 {
				firstSpec, firstRows, firstFig = s.Fingerprint, rows, figText
				continue
			}
			if s.Fingerprint != firstSpec {
				t.Fatalf("%s: spec differs with %d workers", mode, w)
			}
			if !bytes.Equal(rows, firstRows) {
				t.Fatalf("%s: rows differ with %d workers", mode, w)
			}
			if figText != firstFig {
				t.Fatalf("%s: figures differ with %d workers:\n%s\n%s", mode, w, figText, firstFig)
			}
		}
	}
}

// TestRowCountsAndParity: one row per record, in order, and the rows of a
// saved-and-loaded spec equal the rows of the in-process spec.
func TestRowCountsAndParity(t *testing.T) {
	train, _ := testkit.DemoSplit(t, 1500)
	s := learnSpec(t, train, spec.ModeVocabulary, 2)
	rows, fig := encodeRows(t, s, train, 2)
	records := int64(bytes.Count(train, []byte("\n")) - 1)
	if got := int64(bytes.Count(rows, []byte("\n"))); got != records || fig.Docs != records {
		t.Fatalf("%d rows, figures say %d, for %d records", got, fig.Docs, records)
	}
	// Ids in input order.
	lines := strings.Split(strings.TrimSpace(string(rows)), "\n")
	recs := strings.Split(strings.TrimSpace(string(train)), "\n")[1:]
	for i := range lines {
		id, _, _ := strings.Cut(recs[i], "\t")
		if !strings.HasSuffix(lines[i], " # "+id) {
			t.Fatalf("row %d is %q, want id %s", i, lines[i], id)
		}
	}
	path := t.TempDir() + "/spec.json.gz"
	if err := s.Save(path); err != nil {
		t.Fatal(err)
	}
	loaded, err := spec.Load(path)
	if err != nil {
		t.Fatal(err)
	}
	again, _ := encodeRows(t, loaded, train, 1)
	if !bytes.Equal(rows, again) {
		t.Fatal("rows from the loaded spec differ from the in-process spec")
	}
	if fig.OOV == nil || fig.OOV.TokenShare <= 0 || fig.OOV.TokenShare >= 0.5 {
		t.Fatalf("OOV share on the training split with min-docs 2 should be small but non-zero: %+v", fig.OOV)
	}
}

// TestCollisionFigures: the run's collision figures equal an independent
// tally of every key's hash.
func TestCollisionFigures(t *testing.T) {
	train, test := testkit.DemoSplit(t, 1000)
	s := learnSpec(t, train, spec.ModeHashing, 2)
	_, fig := encodeRows(t, s, test, 2)
	a, _ := analysis.New(&s.Content)
	z := a.NewAnalyzer()
	h, _ := hashing.New(s.Content.Hashing.Width, s.Content.Hashing.Seed, false)
	// A plain map of every key's sum, its buckets counted by hand.
	sums := map[uint64]bool{}
	r := reader(t, test)
	for r.Scan() {
		z.Analyze(r.Record().Text, func(key []byte, _ ngram.Order) { sums[h.Sum(key)] = true })
	}
	per := map[uint64]int64{}
	for sum := range sums {
		per[hashing.BucketOf(sum, s.Content.Hashing.Width)]++
	}
	want := hashing.Collisions{Keys: int64(len(sums)), Occupied: int64(len(per))}
	for _, n := range per {
		if n > 1 {
			want.Colliding += n
		}
	}
	c := fig.Collisions
	if c == nil || c.Keys != want.Keys || c.Occupied != want.Occupied || c.Colliding != want.Colliding {
		t.Fatalf("figures %+v, independent tally %+v", c, want)
	}
	if c.Keys < 1000 || c.Rate <= 0 {
		t.Fatalf("implausible collision figures %+v", c)
	}
}

func TestLabelErrorNamesRecord(t *testing.T) {
	train, _ := testkit.DemoSplit(t, 300)
	s := learnSpec(t, train, spec.ModeVocabulary, 1)
	bad := []byte("id\tteam\ttext\n1\tbikes\tflat tyre\n2\tparking\tno space at the dock\n")
	enc, _ := encode.New(s)
	_, err := Encode(reader(t, bad), enc, &bytes.Buffer{}, EncodeOptions{Name: "new.tsv", Workers: 2})
	var re *RecordError
	if !errors.As(err, &re) || re.Line != 3 || re.File != "new.tsv" || !strings.Contains(err.Error(), "parking") {
		t.Fatalf("err = %v", err)
	}
}

func BenchmarkEncodeHashing(b *testing.B) {
	train, test := testkit.DemoSplit(b, 5000)
	s := learnSpec(b, train, spec.ModeHashing, 2)
	enc, _ := encode.New(s)
	b.SetBytes(int64(len(test)))
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := Encode(reader(b, test), enc, ioDiscard{}, EncodeOptions{Workers: 2}); err != nil {
			b.Fatal(err)
		}
	}
}

type ioDiscard struct{}

func (ioDiscard) Write(p []byte) (int, error) { return len(p), nil }

// failAfter is a writer that fails once n bytes were written (a full disk).
type failAfter struct{ n int }

var errDiskFull = errors.New("no space left on device")

func (f *failAfter) Write(p []byte) (int, error) {
	if len(p) > f.n {
		w := f.n
		f.n = 0
		return w, errDiskFull
	}
	f.n -= len(p)
	return len(p), nil
}

// TestWriteErrorEndsRun: a write error ends the run with that error,
// whatever the worker count, and the reader and workers stop.
func TestWriteErrorEndsRun(t *testing.T) {
	train, test := testkit.DemoSplit(t, 3000)
	s := learnSpec(t, train, spec.ModeVocabulary, 2)
	enc, _ := encode.New(s)
	for _, w := range []int{1, 2, 4} {
		for _, n := range []int{0, 100, 50000} {
			_, err := Encode(reader(t, test), enc, &failAfter{n: n}, EncodeOptions{Workers: w})
			if !errors.Is(err, errDiskFull) {
				t.Fatalf("workers %d, fail after %d: err = %v", w, n, err)
			}
		}
	}
}

// TestFirstErrorInInputOrder: over many batches, with a label the spec
// cannot map early on and a record that cannot be read (a field too many)
// later, the run reports the first in input order, naming its line, for
// any worker count; without the early one, it reports the later.
func TestFirstErrorInInputOrder(t *testing.T) {
	train, test := testkit.DemoSplit(t, 30000)
	s := learnSpec(t, train, spec.ModeVocabulary, 2)
	enc, _ := encode.New(s)
	lines := strings.SplitAfter(string(test), "\n")
	if len(lines) < 5000 {
		t.Fatalf("only %d lines", len(lines))
	}
	badLabel, badRow := 2500, 4700 // 0-based line indexes; line numbers are one more
	withLabel := append([]string(nil), lines...)
	f := strings.Split(withLabel[badLabel], "\t") // id, channel, team, ...
	f[2] = "parking"
	withLabel[badLabel] = strings.Join(f, "\t")
	withLabel[badRow] = "9999\tbikes\ttext\textra field\n"
	onlyRow := append([]string(nil), lines...)
	onlyRow[badRow] = withLabel[badRow]
	for _, w := range []int{1, 2, 3, 4} {
		_, err := Encode(reader(t, []byte(strings.Join(withLabel, ""))), enc, ioDiscard{}, EncodeOptions{Name: "new.tsv", Workers: w})
		var re *RecordError
		if !errors.As(err, &re) || re.Line != int64(badLabel+1) || !strings.Contains(err.Error(), "parking") {
			t.Fatalf("workers %d: err = %v, want the label error on line %d", w, err, badLabel+1)
		}
		_, err = Encode(reader(t, []byte(strings.Join(onlyRow, ""))), enc, ioDiscard{}, EncodeOptions{Name: "new.tsv", Workers: w})
		var pe *corpus.ParseError
		if !errors.As(err, &pe) || !strings.Contains(err.Error(), fmt.Sprintf(":%d:", badRow+1)) {
			t.Fatalf("workers %d: err = %v, want the reading error on line %d", w, err, badRow+1)
		}
	}
}
