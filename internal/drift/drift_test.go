package drift

import (
	"bytes"
	"encoding/json"
	"strings"
	"testing"

	"github.com/bowline/bowline/internal/analysis"
	"github.com/bowline/bowline/internal/learn"
	"github.com/bowline/bowline/internal/testkit"
	"github.com/bowline/bowline/report"
	"github.com/bowline/bowline/spec"
	"github.com/bowline/bowline/weight"
)

var linesInput = spec.Input{Format: "lines", Text: []string{"line"}}

func wordsOnly(t testing.TB, st *learn.Settings) *learn.Settings {
	t.Helper()
	st.NGrams.Words.Max = 1
	return st
}

// TestHandComputed checks the figures on a corpus small enough to work out
// by hand, with the OOV definitions of bowline's design (emitted features
// and distinct keys not in the vocabulary) and JSD/PSI over the documented
// bins.
func TestHandComputed(t *testing.T) {
	train := []byte("red bike\nred dock\nblue bike\nbike\n")
	s := learnSpec(t, train, wordsOnly(t, settings(t, linesInput, 1, weight.IDFNone)))
	// Vocabulary: bike (3 docs), red (2), blue (1), dock (1); N = 4.
	res := compare(t, s, []byte("red bike bike\ngreen bike\n"), 2)
	// Features: red bike bike green bike = 5, unseen: green = 1.
	// Distinct keys: red, bike, green = 3, unseen: green = 1.
	o := res.OOV
	if o.Features != 5 || o.Unseen != 1 || o.TokenShare != 0.2 || o.Keys != 3 || o.UnseenKeys != 1 || o.TypeShare != 1.0/3 {
		t.Errorf("OOV = %+v, want 5 features, 1 unseen (20%%), 3 keys, 1 unseen (1/3)", *o)
	}
	if len(res.ByOrder) != 1 || res.ByOrder[0].Order != "w1" || res.ByOrder[0].Columns != 4 || res.ByOrder[0].ColumnsSeen != 2 {
		t.Fatalf("ByOrder = %+v, want one w1 entry with 4 columns, 2 seen", res.ByOrder)
	}
	// Document shares: bike 2/2 vs 3/4 (+0.25), blue 0 vs 1/4 (−0.25),
	// dock 0 vs 1/4 (−0.25), red 1/2 vs 2/4 (0); ties by key bytes.
	want := []struct {
		key    string
		change float64
	}{{"bike", 0.25}, {"blue", -0.25}, {"dock", -0.25}, {"red", 0}}
	if len(res.Moved) != len(want) {
		t.Fatalf("Moved = %+v", res.Moved)
	}
	for i, w := range want {
		if m := res.Moved[i]; m.Key != w.key || m.Change != w.change {
			t.Errorf("Moved[%d] = %+v, want %s %+g", i, m, w.key, w.change)
		}
	}
	if len(res.TopUnseen) != 1 || res.TopUnseen[0] != (Unseen{Key: "green", Order: "w1", Count: 1, Docs: 1}) {
		t.Errorf("TopUnseen = %+v", res.TopUnseen)
	}
	// Bins: bike, red, blue, dock, unseen. Training document counts
	// (3, 2, 1, 1, 0); new (2, 1, 0, 0, 1), green being in one document.
	p := []float64{3, 2, 1, 1, 0}
	q := []float64{2, 1, 0, 0, 1}
	if got := *res.ByOrder[0].JSD; !testkit.Near(got, JSD(p, q), 1e-15) || got <= 0 {
		t.Errorf("JSD = %g, want %g", got, JSD(p, q))
	}
	if got := *res.ByOrder[0].PSI; !testkit.Near(got, PSI(p, q), 1e-12) {
		t.Errorf("PSI = %g, want %g", got, PSI(p, q))
	}
	if res.Labels != nil || res.Buckets != nil {
		t.Errorf("labels or buckets reported for an unlabeled vocabulary corpus: %+v %+v", res.Labels, res.Buckets)
	}
	var text bytes.Buffer
	if err := res.WriteText(&text); err != nil {
		t.Fatal(err)
	}
	for _, s := range []string{"token share  20.0%  (1 of 5 features)", "type share   33.3%  (1 of 3 distinct keys)", "+25.00 pp", "green"} {
		if !strings.Contains(text.String(), s) {
			t.Errorf("text output lacks %q:\n%s", s, text.String())
		}
	}
}

// TestTrainingAgainstItself: the training corpus compared with a spec
// learned on it at --min-docs 1 has no OOV key, and every divergence is 0
// (Lin 1991: JSD is 0 exactly when the distributions are equal; PSI too).
func TestTrainingAgainstItself(t *testing.T) {
	train, _ := testkit.DemoSplit(t, 600)
	s := learnSpec(t, train, settings(t, tsvInput, 1, weight.IDFNone))
	res := compare(t, s, train, 3)
	if res.Docs != s.Content.Docs {
		t.Errorf("docs = %d, spec says %d", res.Docs, s.Content.Docs)
	}
	if res.OOV.Unseen != 0 || res.OOV.UnseenKeys != 0 || len(res.TopUnseen) != 0 {
		t.Errorf("OOV = %+v, top unseen %v; want none", *res.OOV, res.TopUnseen)
	}
	if len(res.ByOrder) != 2 {
		t.Fatalf("ByOrder = %+v, want w1 and w2", res.ByOrder)
	}
	for _, o := range res.ByOrder {
		if o.JSD == nil || *o.JSD != 0 || o.PSI == nil || *o.PSI != 0 || o.ColumnsSeen != o.Columns {
			t.Errorf("order %s: JSD %v PSI %v, %d of %d columns seen; want 0, 0, all", o.Order, div(o.JSD), div(o.PSI), o.ColumnsSeen, o.Columns)
		}
	}
	if res.Moved[0].Change != 0 {
		t.Errorf("a key moved: %+v", res.Moved[0])
	}
	l := res.Labels
	if l == nil || *l.JSD != 0 || *l.PSI != 0 || l.Unknown != 0 || len(l.Labels) != 4 || l.Field != "team" {
		t.Fatalf("labels = %+v, want 4 labels, no shift", l)
	}
}

// TestHeldOutAndShift: the held-out split of the invented demo corpus has
// keys training never saw, and a corpus of billing tickets only shifts the
// labels and the word distribution more than the held-out split does.
func TestHeldOutAndShift(t *testing.T) {
	train, test := testkit.DemoSplit(t, 2000)
	s := learnSpec(t, train, settings(t, tsvInput, 2, weight.IDFSmooth))
	held := compare(t, s, test, 2)
	if held.OOV.TokenShare <= 0 || held.OOV.TypeShare <= held.OOV.TokenShare {
		t.Errorf("held-out OOV = %+v: want a positive token share below the type share", *held.OOV)
	}
	if len(held.TopUnseen) != DefaultTop {
		t.Errorf("%d unseen keys listed, want %d", len(held.TopUnseen), DefaultTop)
	}
	for i := 1; i < len(held.TopUnseen); i++ {
		a, b := held.TopUnseen[i-1], held.TopUnseen[i]
		if a.Count < b.Count || (a.Count == b.Count && a.Key >= b.Key) {
			t.Errorf("top unseen keys out of order: %+v before %+v", a, b)
		}
	}
	billing := only(test, 2, "billing")
	shifted := compare(t, s, billing, 2)
	hl, sl := held.Labels, shifted.Labels
	if *sl.JSD <= *hl.JSD || *sl.PSI <= *hl.PSI {
		t.Errorf("label JSD/PSI: billing only %g/%g, held-out %g/%g; want the billing corpus larger", *sl.JSD, *sl.PSI, *hl.JSD, *hl.PSI)
	}
	for _, l := range sl.Labels {
		if l.Label == "billing" && l.Share != 1 {
			t.Errorf("billing share %g in a billing-only corpus", l.Share)
		}
	}
	for i := range held.ByOrder {
		h, b := held.ByOrder[i], shifted.ByOrder[i]
		if *b.JSD <= *h.JSD {
			t.Errorf("order %s: JSD billing only %g, held-out %g; want the billing corpus larger", h.Order, *b.JSD, *h.JSD)
		}
	}
	t.Logf("held-out: OOV %.4f, w1 JSD %.4f, label JSD %.5f; billing only: w1 JSD %.4f, label JSD %.4f",
		held.OOV.TokenShare, *held.ByOrder[0].JSD, *hl.JSD, *shifted.ByOrder[0].JSD, *sl.JSD)
}

// TestWorkersDeterministic: the result does not depend on the worker count.
func TestWorkersDeterministic(t *testing.T) {
	train, test := testkit.DemoSplit(t, 1200)
	for _, hash := range []bool{false, true} {
		st := settings(t, tsvInput, 2, weight.IDFSmooth)
		if hash {
			hashSettings(st, 1<<12)
		}
		s := learnSpec(t, train, st)
		var first []byte
		for _, w := range []int{1, 2, 5} {
			var buf bytes.Buffer
			if err := compare(t, s, test, w).WriteJSON(&buf); err != nil {
				t.Fatal(err)
			}
			if first == nil {
				first = buf.Bytes()
			} else if !bytes.Equal(first, buf.Bytes()) {
				t.Errorf("hashing %v: %d workers give a different result", hash, w)
			}
		}
	}
}

// TestHashing: with idf the training bucket counts come back from the
// spec exactly, so the training corpus against itself shows no new bucket
// and zero divergence; the held-out split's new-bucket share is a lower
// bound of its key OOV share measured in vocabulary mode at --min-docs 1.
// Without idf only the new corpus's figures are given, and a note says so.
func TestHashing(t *testing.T) {
	train, test := testkit.DemoSplit(t, 1000)
	for _, idf := range []weight.IDF{weight.IDFSmooth, weight.IDFPlain} {
		s := learnSpec(t, train, hashSettings(settings(t, tsvInput, 1, idf), 1<<14))
		self := compare(t, s, train, 2)
		b := self.Buckets
		if self.OOV != nil || !b.TrainingCounts || b.TrainingBuckets != int64(len(s.Content.Weights.IDFBuckets)) {
			t.Fatalf("idf %v: buckets = %+v, OOV %v", idf, b, self.OOV)
		}
		if b.NewBuckets != 0 || b.NewBucketFeatures != 0 || b.Occupied != b.TrainingBuckets || *b.JSD != 0 || *b.PSI != 0 {
			t.Errorf("idf %v: training against itself: %+v, JSD %s", idf, *b, div(b.JSD))
		}
		held := compare(t, s, test, 2)
		vs := learnSpec(t, train, settings(t, tsvInput, 1, weight.IDFNone))
		vheld := compare(t, vs, test, 2)
		if hb := held.Buckets; hb.NewBucketShare <= 0 || hb.NewBucketShare > vheld.OOV.TokenShare || *hb.JSD <= 0 {
			t.Errorf("idf %v: held-out new-bucket share %g, vocabulary OOV %g, JSD %s", idf, hb.NewBucketShare, vheld.OOV.TokenShare, div(hb.JSD))
		}
		if held.Features != vheld.Features {
			t.Errorf("features: hashing %d, vocabulary %d", held.Features, vheld.Features)
		}
	}
	s := learnSpec(t, train, hashSettings(settings(t, tsvInput, 1, weight.IDFNone), 1<<14))
	res := compare(t, s, test, 2)
	if res.Buckets.TrainingCounts || res.Buckets.JSD != nil || res.Buckets.Occupied == 0 || len(res.Notes) < 2 {
		t.Errorf("no idf: buckets %+v, notes %q", *res.Buckets, res.Notes)
	}
	var buf bytes.Buffer
	res.WriteJSON(&buf)
	if !strings.Contains(buf.String(), `"jsd_bits": null`) || !strings.Contains(buf.String(), `"oov": null`) {
		t.Errorf("JSON of a hashing spec without idf lacks null divergence or OOV:\n%s", buf.String())
	}
}

// TestRenderings checks the JSON field names scripts rely on and that the
// HTML page is self-contained with its plots.
func TestRenderings(t *testing.T) {
	train, test := testkit.DemoSplit(t, 500)
	s := learnSpec(t, train, settings(t, tsvInput, 2, weight.IDFNone))
	res := compare(t, s, test, 2)
	var js bytes.Buffer
	if err := report.Write(&js, "json", res); err != nil {
		t.Fatal(err)
	}
	var m map[string]any
	if err := json.Unmarshal(js.Bytes(), &m); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"spec", "input", "mode", "training_docs", "docs", "empty_docs", "features", "oov", "by_order", "top_unseen", "moved", "buckets", "labels", "notes"} {
		if _, ok := m[k]; !ok {
			t.Errorf("JSON lacks %q", k)
		}
	}
	order := m["by_order"].([]any)[0].(map[string]any)
	for _, k := range []string{"order", "features", "keys", "oov", "columns", "columns_seen", "jsd_bits", "psi"} {
		if _, ok := order[k]; !ok {
			t.Errorf("by_order entry lacks %q", k)
		}
	}
	var html bytes.Buffer
	if err := report.Write(&html, "html", res); err != nil {
		t.Fatal(err)
	}
	h := html.String()
	if n := strings.Count(h, "<svg"); n != 6 {
		t.Errorf("HTML has %d plots, want 6 (rank-frequency, document counts, OOV, JSD, moved keys, labels)", n)
	}
	for _, bad := range []string{"<script", " src=", "<link"} {
		if strings.Contains(h, bad) {
			t.Errorf("HTML page is not self-contained: it has %q", bad)
		}
	}
	if err := report.Write(&html, "xml", res); err == nil {
		t.Error("unknown format accepted")
	}
}

// TestNoAllocationPerDocument: analysing a document whose keys are all
// known, or already counted as unseen, allocates nothing once warm.
func TestNoAllocationPerDocument(t *testing.T) {
	train := []byte("red bike\nred dock\nblue bike\n")
	s := learnSpec(t, train, settings(t, linesInput, 1, weight.IDFNone))
	an, err := analysis.New(&s.Content)
	if err != nil {
		t.Fatal(err)
	}
	sh, err := newShared(&s.Content)
	if err != nil {
		t.Fatal(err)
	}
	w := newWorker(sh, an.NewAnalyzer())
	doc := [][]byte{[]byte("red bike and a green dock")}
	w.doc(doc)
	if n := testing.AllocsPerRun(100, func() { w.doc(doc) }); n != 0 {
		t.Errorf("%v allocations per document", n)
	}
	// One call before, and AllocsPerRun's warm-up run plus 100 runs.
	if w.unseen["green"].count != 102 {
		t.Errorf("green counted %d times, want 102", w.unseen["green"].count)
	}
}

func BenchmarkCompare(b *testing.B) {
	train, test := testkit.DemoSplit(b, 2000)
	s := learnSpec(b, train, settings(b, tsvInput, 2, weight.IDFNone))
	b.SetBytes(int64(len(test)))
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		r := open(b, test, s.Content.Input)
		if _, err := Compare(s, r, Options{Workers: 2}); err != nil {
			b.Fatal(err)
		}
		r.Close()
	}
}
