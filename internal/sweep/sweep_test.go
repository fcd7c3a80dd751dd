package sweep

import (
	"bytes"
	"errors"
	"math"
	"slices"
	"strings"
	"testing"

	"github.com/bowline/bowline/corpus"
	"github.com/bowline/bowline/hashing"
	"github.com/bowline/bowline/internal/analysis"
	"github.com/bowline/bowline/internal/encode"
	"github.com/bowline/bowline/internal/learn"
	"github.com/bowline/bowline/internal/logreg"
	"github.com/bowline/bowline/internal/pipeline"
	"github.com/bowline/bowline/internal/testkit"
	"github.com/bowline/bowline/ngram"
	"github.com/bowline/bowline/spec"
	"github.com/bowline/bowline/stopwords"
	"github.com/bowline/bowline/tokenize"
	"github.com/bowline/bowline/vocab"
	"github.com/bowline/bowline/weight"
)

func TestParseWidths(t *testing.T) {
	for _, c := range []struct {
		in   string
		want []uint64
	}{
		{"2^10..2^14", []uint64{1 << 10, 1 << 11, 1 << 12, 1 << 13, 1 << 14}},
		{"2^10..2^24", func() (w []uint64) {
			for k := 10; k <= 24; k++ {
				w = append(w, 1<<k)
			}
			return
		}()},
		{"1000..5000", []uint64{1000, 2000, 4000}},
		{"2^10..2^20*4", []uint64{1 << 10, 1 << 12, 1 << 14, 1 << 16, 1 << 18, 1 << 20}},
		{"2^12,2^16,100000", []uint64{1 << 12, 1 << 16, 100000}},
		{"100000, 2^12 ,2^12", []uint64{1 << 12, 100000}},
		{"2^8..2^8", []uint64{1 << 8}},
		{"2^8..2^9,2^20", []uint64{1 << 8, 1 << 9, 1 << 20}},
		{"2^39..2^40", []uint64{1 << 39, 1 << 40}},
	} {
		got, err := ParseWidths(c.in)
		if err != nil || !slices.Equal(got, c.want) {
			t.Errorf("ParseWidths(%q) = %v, %v; want %v", c.in, got, err, c.want)
		}
	}
	for _, bad := range []string{"", "0", "2^41", "2^14..2^10", "2^10..", "..2^10", "a,b", "2^10,,2^12", "2^10..2^20*1", "2^10..2^20*x", "1..2^63", "1..2^40*1"} {
		if got, err := ParseWidths(bad); err == nil {
			t.Errorf("ParseWidths(%q) = %v, want an error", bad, got)
		}
	}
}

func settings(t testing.TB, label string) *learn.Settings {
	t.Helper()
	words, err := stopwords.Builtin("en")
	if err != nil {
		t.Fatal(err)
	}
	w12, _ := ngram.ParseWords("1-2")
	return &learn.Settings{
		Input:         spec.Input{Format: "tsv", Text: []string{"text"}, Label: label},
		Tokens:        tokenize.DefaultOptions(),
		StopSources:   []string{"en"},
		StopWords:     words,
		KeepNegations: true,
		NGrams:        ngram.Config{Words: w12},
		Mode:          spec.ModeVocabulary,
		Cutoffs:       vocab.Cutoffs{MinDocs: 2, MaxDocShare: 0.5},
		TF:            weight.TFLog,
		IDF:           weight.IDFSmooth,
		Norm:          weight.NormL2,
	}
}

func reader(t testing.TB, b []byte, label string) *corpus.Reader {
	t.Helper()
	r, err := corpus.NewReader(bytes.NewReader(b), "corpus.tsv", corpus.Options{Format: corpus.TSV, Text: []string{"text"}, Label: label})
	if err != nil {
		t.Fatal(err)
	}
	return r
}

// collect runs the two passes of a sweep.
func collect(t testing.TB, s *learn.Settings, train, test []byte, seed uint64) (*keyTable, *vocab.Counts, *docSet, *docSet) {
	t.Helper()
	l, err := learn.New(s)
	if err != nil {
		t.Fatal(err)
	}
	an, err := analysis.New(l.Content())
	if err != nil {
		t.Fatal(err)
	}
	h, _ := hashing.New(1, seed, false)
	kt := &keyTable{ids: map[string]int32{}}
	c := &collector{t: kt, z: an.NewAnalyzer(), h: h, counts: vocab.NewCounts(), train: true}
	tr, err := c.read(reader(t, train, s.Input.Label), "train", s.Input.Label != "", nil, nil)
	if err != nil {
		t.Fatal(err)
	}
	kt.train = len(kt.keys)
	c.train = false
	te, err := c.read(reader(t, test, s.Input.Label), "test", s.Input.Label != "", nil, nil)
	if err != nil {
		t.Fatal(err)
	}
	return kt, c.counts, tr, te
}

// TestCollisionsMatchTally checks every width's collision figures against
// hashing.Tally, filled independently by bowline learn's hashing-mode
// counting (learn.Worker) over the same corpus.
func TestCollisionsMatchTally(t *testing.T) {
	train, test := testkit.DemoSplit(t, 1000)
	s := settings(t, "")
	const seed = 7
	kt, _, _, _ := collect(t, s, train, test, seed)

	hs := *s
	hs.Mode = spec.ModeHashing
	hs.Hashing = spec.Hashing{Width: 1 << 20, Seed: seed}
	l, err := learn.New(&hs)
	if err != nil {
		t.Fatal(err)
	}
	w := l.NewWorker()
	r := reader(t, train, "")
	for r.Scan() {
		w.Observe(r.Record().Text)
	}
	tally := w.Tally()
	if tally.Len() != kt.train {
		t.Fatalf("tally holds %d distinct keys, the sweep %d", tally.Len(), kt.train)
	}
	for _, width := range []uint64{1, 2, 3, 100, 1 << 8, 1 << 10, 1000, 1 << 12, 1 << 14, 12345, 1 << 16, 1 << 20, 1 << 24, 1 << 40} {
		got := collisions(kt, width)
		want := tally.Collisions(width)
		if got.Keys != want.Keys || got.Occupied != want.Occupied || got.CollidingKeys != want.Colliding ||
			got.CollisionRate != want.Rate || got.ExpectedCollisionRate != want.ExpectedRate || got.ExpectedOccupied != want.ExpectedOccupied {
			t.Errorf("width %d: sweep %+v, tally %+v", width, got, want)
		}
		if got.SharedShare < got.CollisionRate*0 || got.SharedShare > 1 || (got.CollidingKeys == 0) != (got.SharedShare == 0) {
			t.Errorf("width %d: shared occurrence share %v with %d colliding keys", width, got.SharedShare, got.CollidingKeys)
		}
	}
	if c := collisions(kt, 1); c.SharedShare != 1 || c.Occupied != 1 {
		t.Errorf("width 1: shared share %v, occupied %d; want 1 and 1", c.SharedShare, c.Occupied)
	}
}

// encoderRows encodes b with spec s, as bowline encode does.
func encoderRows(t *testing.T, s *spec.Spec, b []byte) []weight.Row {
	t.Helper()
	enc, err := encode.New(s)
	if err != nil {
		t.Fatal(err)
	}
	w := enc.NewWorker(false)
	var rows []weight.Row
	r := reader(t, b, "")
	for r.Scan() {
		var row weight.Row
		w.Encode(r.Record().Text, &row)
		rows = append(rows, row)
	}
	return rows
}

func learnSpec(t *testing.T, s *learn.Settings, train []byte) *spec.Spec {
	t.Helper()
	l, err := learn.New(s)
	if err != nil {
		t.Fatal(err)
	}
	sp, _, err := pipeline.Learn(reader(t, train, s.Input.Label), l, pipeline.LearnOptions{Workers: 2, Name: "train"})
	if err != nil {
		t.Fatal(err)
	}
	return sp
}

// sameRows compares the sweep's rows with the encoder's: the same values
// in the same order, the sweep's column c standing for the encoder's
// column cols[c].
func sameRows(t *testing.T, what string, got []logreg.Row, want []weight.Row, cols func(int) int) {
	t.Helper()
	if len(got) != len(want) {
		t.Fatalf("%s: %d rows, encoder %d", what, len(got), len(want))
	}
	for i := range got {
		g, w := got[i], want[i]
		ok := len(g.Indices) == len(w.Indices)
		for j := 0; ok && j < len(g.Indices); j++ {
			ok = cols(g.Indices[j]) == w.Indices[j] && math.Float64bits(g.Values[j]) == math.Float64bits(w.Values[j])
		}
		if !ok {
			t.Fatalf("%s: row %d differs:\nsweep   %v %v\nencoder %v %v", what, i, g.Indices, g.Values, w.Indices, w.Values)
		}
	}
}

// TestRowsMatchEncoder checks that the rows the sweep trains on are the
// rows bowline encode writes with a spec learned for that width (signed,
// log tf, smooth idf, L2 norm), and for the vocabulary (with hashed unseen
// columns).
func TestRowsMatchEncoder(t *testing.T) {
	train, test := testkit.DemoSplit(t, 600)
	s := settings(t, "")
	s.Unseen = vocab.Unseen{Mode: vocab.UnseenHash, Buckets: 16}
	const seed = 3
	kt, counts, tr, te := collect(t, s, train, test, seed)
	for _, width := range []uint64{64, 1000, 1 << 14} {
		hs := *s
		hs.Mode = spec.ModeHashing
		hs.Hashing = spec.Hashing{Width: width, Seed: seed, Signed: true}
		sp := learnSpec(t, &hs, train)
		a, b := hashedDatasets(kt, &hs, width, true, tr, te, nil, nil)
		// Column c of the sweep is the c-th smallest bucket in use.
		var buckets []uint64
		for _, sum := range kt.sums {
			buckets = append(buckets, hashing.BucketOf(sum, width))
		}
		slices.Sort(buckets)
		buckets = slices.Compact(buckets)
		cols := func(c int) int { return int(buckets[c]) }
		sameRows(t, "train, width "+hashing.FormatWidth(width), a.Rows, encoderRows(t, sp, train), cols)
		sameRows(t, "held out, width "+hashing.FormatWidth(width), b.Rows, encoderRows(t, sp, test), cols)
	}
	sp := learnSpec(t, s, train)
	vb := newVocabBuilder(kt, counts, s)
	if vb.columns != int(sp.Columns()) {
		t.Fatalf("vocabulary: %d columns, spec %d", vb.columns, sp.Columns())
	}
	a, b := vb.datasets(tr, te, nil, nil)
	same := func(c int) int { return c }
	sameRows(t, "vocabulary, train", a.Rows, encoderRows(t, sp, train), same)
	sameRows(t, "vocabulary, held out", b.Rows, encoderRows(t, sp, test), same)
}

// TestExplain checks the crowded buckets against Hasher.Bucket.
func TestExplain(t *testing.T) {
	train, test := testkit.DemoSplit(t, 400)
	s := settings(t, "")
	kt, _, _, _ := collect(t, s, train, test, 0)
	const width = 1 << 9
	e := explain(kt, width, 5)
	if len(e.Buckets) != 5 {
		t.Fatalf("%d buckets, want 5", len(e.Buckets))
	}
	h, _ := hashing.New(width, 0, false)
	for i, b := range e.Buckets {
		if i > 0 && len(b.Keys) > len(e.Buckets[i-1].Keys) {
			t.Errorf("bucket %d has more keys than the one before", i)
		}
		var occ int64
		for j, k := range b.Keys {
			if got, _ := h.Bucket([]byte(k.Key)); got != b.Bucket {
				t.Errorf("key %q is in bucket %d, listed under %d", k.Key, got, b.Bucket)
			}
			if j > 0 && k.Count > b.Keys[j-1].Count {
				t.Errorf("bucket %d: keys not by descending count", b.Bucket)
			}
			occ += k.Count
		}
		if occ != b.Occurrences {
			t.Errorf("bucket %d: occurrences %d, keys sum to %d", b.Bucket, b.Occurrences, occ)
		}
	}
	// The most crowded bucket really is: no bucket holds more keys.
	per := map[uint64]int{}
	for _, k := range kt.keys[:kt.train] {
		b, _ := h.Bucket([]byte(k))
		per[b]++
	}
	most := 0
	for _, n := range per {
		most = max(most, n)
	}
	if len(e.Buckets[0].Keys) != most {
		t.Errorf("top bucket has %d keys, the fullest bucket %d", len(e.Buckets[0].Keys), most)
	}
}

// TestDeterministicWorkers: the JSON is byte-identical for 1 and 2
// workers.
func TestDeterministicWorkers(t *testing.T) {
	train, test := testkit.DemoSplit(t, 500)
	s := settings(t, "team")
	var out [2]bytes.Buffer
	for i, workers := range []int{1, 2} {
		res, err := Run(reader(t, train, "team"), "train", reader(t, test, "team"), "test",
			Options{Settings: s, Widths: []uint64{1 << 8, 1 << 10, 1 << 12}, Workers: workers, Explain: 2})
		if err != nil {
			t.Fatal(err)
		}
		if err := res.WriteJSON(&out[i]); err != nil {
			t.Fatal(err)
		}
		if res.Vocabulary.Eval == nil || res.Widths[2].Eval == nil || res.Widths[2].Eval.MacroF1 == nil {
			t.Fatal("evaluation figures missing")
		}
	}
	if !bytes.Equal(out[0].Bytes(), out[1].Bytes()) {
		t.Errorf("1 and 2 workers give different results:\n%s\n%s", out[0].String(), out[1].String())
	}
}

// TestMemory: model memory is width × 8 bytes × weight vectors (1 for two
// classes), and the vocabulary's memory adds its index.
func TestMemory(t *testing.T) {
	train, test := testkit.DemoSplit(t, 300)
	for _, c := range []struct {
		label   string
		vectors int64
	}{{"channel", 1}, {"team", 4}, {"", 1}} {
		s := settings(t, c.label)
		var hr *corpus.Reader
		if c.label != "" {
			hr = reader(t, test, c.label)
		}
		res, err := Run(reader(t, train, c.label), "train", hr, "test", Options{Settings: s, Widths: []uint64{1000, 1 << 12}})
		if err != nil {
			t.Fatal(err)
		}
		for _, w := range res.Widths {
			if w.ModelBytes != int64(w.Width)*8*c.vectors {
				t.Errorf("%q: width %d: model bytes %d, want %d", c.label, w.Width, w.ModelBytes, int64(w.Width)*8*c.vectors)
			}
		}
		v := res.Vocabulary
		if v.ModelBytes != v.Columns*8*c.vectors || v.IndexBytes != v.KeyBytes+IndexEntryBytes*v.Terms || v.Bytes != v.ModelBytes+v.IndexBytes {
			t.Errorf("%q: vocabulary memory %+v", c.label, v)
		}
		if c.label == "channel" && (v.Eval == nil || v.Eval.AUC == nil || v.Eval.MacroF1 != nil) {
			t.Errorf("two classes: want ROC AUC and no macro-F1, got %+v", v.Eval)
		}
		if c.label == "" && v.Eval != nil {
			t.Errorf("no labels: want no evaluation, got %+v", v.Eval)
		}
	}
}

func TestHoldoutUnseenLabel(t *testing.T) {
	train, test := testkit.DemoSplit(t, 200)
	test = bytes.Replace(test, []byte("\tbikes\t"), []byte("\tferries\t"), 1)
	_, err := Run(reader(t, train, "team"), "train", reader(t, test, "team"), "test", Options{Settings: settings(t, "team"), Widths: []uint64{256}})
	var re *pipeline.RecordError
	if err == nil || !errors.As(err, &re) || !strings.Contains(err.Error(), "ferries") {
		t.Errorf("unseen held-out label: error %v, want a RecordError naming it", err)
	}
}
