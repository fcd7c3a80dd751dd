package learn

import (
	"fmt"
	"path/filepath"
	"sort"
	"strings"
	"testing"

	"github.com/bowline/bowline/internal/encode"
	"github.com/bowline/bowline/internal/testkit"
	"github.com/bowline/bowline/spec"
	"github.com/bowline/bowline/vocab"
	"github.com/bowline/bowline/weight"
)

// observe counts texts with l, as pipeline.Learn does, and returns the
// merged worker and the label tallies.
func observe(l *Learner, texts, labels []string) (*Worker, spec.Labels) {
	w := l.NewWorker()
	tally := map[string]int64{}
	for i, t := range texts {
		w.Observe([][]byte{[]byte(t)})
		tally[labels[i]]++
	}
	var values []string
	for v := range tally {
		values = append(values, v)
	}
	sort.Strings(values)
	lab := LabelsFrom(values, true)
	lab.Values = values
	for _, v := range values {
		lab.Counts = append(lab.Counts, tally[v])
	}
	return w, lab
}

func learnOn(t *testing.T, s *Settings, texts, labels []string) *spec.Spec {
	t.Helper()
	l, err := New(s)
	if err != nil {
		t.Fatal(err)
	}
	w, lab := observe(l, texts, labels)
	sp, _, err := l.Finish(w, lab)
	if err != nil {
		t.Fatal(err)
	}
	return sp
}

func extendOn(t *testing.T, parent *spec.Spec, cut vocab.Cutoffs, texts, labels []string) (*spec.Spec, *Extension) {
	t.Helper()
	l, err := NewExtend(parent, cut, parent.Content.Input)
	if err != nil {
		t.Fatal(err)
	}
	w, lab := observe(l, texts, labels)
	sp, _, err := l.Finish(w, lab)
	if err != nil {
		t.Fatal(err)
	}
	return sp, l.Extension()
}

// TestExtendModelView is the promise of an index-stable refresh, seen from
// a model trained on the old rows: every old column index holds the same
// key in the extended spec, and on any document the extended spec's row,
// restricted to the old columns, is the old spec's row (raw counts, so
// that the values themselves must agree, not only the keys).
func TestExtendModelView(t *testing.T) {
	texts, labels := testkit.DemoTexts(t, 1200)
	s := settings(spec.ModeVocabulary)
	s.TF, s.IDF, s.Norm = weight.TFCount, weight.IDFNone, weight.NormNone
	s.Cutoffs.MinDocs = 2
	old := learnOn(t, s, texts[:600], labels[:600])
	ext, x := extendOn(t, old, vocab.Cutoffs{MinDocs: 3, MaxDocShare: 1}, texts[600:], labels[600:])
	ov, nv := old.Content.Vocabulary, ext.Content.Vocabulary
	n := len(ov.Keys)
	if ext.Parent != old.Fingerprint || nv.ParentKeys != n || x.ParentKeys != n || x.Kept+x.Retired != n || len(nv.Keys) != n+x.Appended {
		t.Fatalf("parent %q keys %d/%d, account %+v", ext.Parent, nv.ParentKeys, len(nv.Keys), x)
	}
	if x.Retired == 0 || x.Appended == 0 {
		t.Fatalf("the test corpus should retire and append keys: %+v", x)
	}
	t.Logf("refresh: %d parent columns, %d kept, %d retired, %d appended", n, x.Kept, x.Retired, x.Appended)
	for i := 0; i < n; i++ {
		if nv.Keys[i] != ov.Keys[i] || nv.Orders[i] != ov.Orders[i] {
			t.Fatalf("column %d: %q became %q", i, ov.Keys[i], nv.Keys[i])
		}
	}
	oe, err := encode.New(old)
	if err != nil {
		t.Fatal(err)
	}
	ne, err := encode.New(ext)
	if err != nil {
		t.Fatal(err)
	}
	for _, d := range texts {
		or, _ := oe.Encode([][]byte{[]byte(d)})
		nr, _ := ne.Encode([][]byte{[]byte(d)})
		var got []string
		for j, c := range nr.Indices {
			if int(c) < n {
				got = append(got, fmt.Sprintf("%d:%g", c, nr.Values[j]))
			}
		}
		var want []string
		for j, c := range or.Indices {
			want = append(want, fmt.Sprintf("%d:%g", c, or.Values[j]))
		}
		if strings.Join(got, " ") != strings.Join(want, " ") {
			t.Fatalf("document %q: old columns of the new row %v, old row %v", d, got, want)
		}
	}
}

// TestExtendCounts: document counts and idf come from the new corpus,
// including df 0 for a parent key the new corpus lacks (weight.IDF.Value
// handles it); retired marks follow the cutoffs on the new counts;
// appended keys follow bowline's column order and --max-terms limits only
// them; the spec saves and loads.
func TestExtendCounts(t *testing.T) {
	texts, labels := testkit.DemoTexts(t, 800)
	s := settings(spec.ModeVocabulary)
	old := learnOn(t, s, append([]string{"zyzzogeton sighting"}, texts[:400]...), append([]string{"bikes"}, labels[:400]...))
	cut := vocab.Cutoffs{MinDocs: 2, MaxDocShare: 0.5, MaxTerms: 7}
	ext, x := extendOn(t, old, cut, texts[400:], labels[400:])
	// The new corpus counted on its own, for the expected figures.
	l, _ := New(s)
	w, _ := observe(l, texts[400:], labels[400:])
	fresh := w.Counts()
	nv := ext.Content.Vocabulary
	sawZero := false
	for i, k := range nv.Keys {
		tm, _ := fresh.Term(k)
		if nv.DocCounts[i] != tm.Docs {
			t.Errorf("column %d %q: docs %d, new corpus %d", i, k, nv.DocCounts[i], tm.Docs)
		}
		pass := tm.Docs >= cut.MinDocs && float64(tm.Docs)/400 <= cut.MaxDocShare
		if i < nv.ParentKeys && nv.Retired[i] == pass {
			t.Errorf("column %d %q (docs %d): retired %v", i, k, tm.Docs, nv.Retired[i])
		}
		if i >= nv.ParentKeys && (!pass || nv.Retired[i]) {
			t.Errorf("appended column %d %q does not pass the cutoffs", i, k)
		}
		if want := weight.IDFSmooth.Value(400, tm.Docs); ext.Content.Weights.IDFValues[i] != want {
			t.Errorf("column %d: idf %v, want %v", i, ext.Content.Weights.IDFValues[i], want)
		}
		sawZero = sawZero || tm.Docs == 0
	}
	if !sawZero {
		t.Error("no parent column with document count 0 in the new corpus")
	}
	if x.Appended != cut.MaxTerms || x.OverMaxTerms == 0 || len(nv.Keys) != nv.ParentKeys+cut.MaxTerms {
		t.Errorf("--max-terms 7 should limit only the appended keys: %+v", x)
	}
	// Appended keys in column order: descending document count, then bytes.
	app := nv.ParentKeys
	for i := app + 1; i < len(nv.Keys); i++ {
		a, b := nv.DocCounts[i-1], nv.DocCounts[i]
		if a < b || (a == b && nv.Keys[i-1] >= nv.Keys[i]) {
			t.Errorf("appended columns %d, %d out of order", i-1, i)
		}
	}
	p := filepath.Join(t.TempDir(), "ext.json")
	if err := ext.Save(p); err != nil {
		t.Fatal(err)
	}
	back, err := spec.Load(p)
	if err != nil || back.Fingerprint != ext.Fingerprint || back.Parent != old.Fingerprint {
		t.Fatalf("load: %v", err)
	}
	// Extending the extension on the first corpus revives columns.
	_, x2 := extendOn(t, ext, vocab.Cutoffs{MinDocs: 2, MaxDocShare: 0.5}, texts[:400], labels[:400])
	if x2.Revived == 0 || x2.ParentKeys != len(nv.Keys) {
		t.Errorf("second refresh: %+v", x2)
	}
}

func TestExtendLabels(t *testing.T) {
	parent := spec.Labels{Kind: "string", Map: []string{"app", "bikes", "billing"}}
	got, err := extendLabels(parent, spec.Labels{Kind: "string", Values: []string{"bikes", "docks"}, Counts: []int64{3, 4}})
	if err != nil || strings.Join(got.Map, " ") != "app bikes billing docks" || strings.Join(got.Values, " ") != "bikes docks" {
		t.Errorf("labels %+v, %v", got, err)
	}
	if _, err := extendLabels(parent, spec.Labels{Kind: "string", Values: []string{"apps"}}); err == nil || !strings.Contains(err.Error(), `"apps"`) {
		t.Errorf("a label sorting inside the map: %v", err)
	}
	if _, err := extendLabels(spec.Labels{Kind: "number"}, spec.Labels{Kind: "string", Values: []string{"1", "x"}}); err == nil {
		t.Error("a string label for a numeric spec was accepted")
	}
	if _, err := extendLabels(spec.Labels{Kind: spec.LabelsNone}, spec.Labels{Kind: "number"}); err == nil {
		t.Error("labels for an unlabeled spec were accepted")
	}
}

func TestExtendRefuses(t *testing.T) {
	hs := learnSpec(t, settings(spec.ModeHashing))
	if _, err := NewExtend(hs, vocab.DefaultCutoffs(), hs.Content.Input); err == nil || !strings.Contains(err.Error(), "hashing") {
		t.Errorf("hashing spec: %v", err)
	}
	s := settings(spec.ModeVocabulary)
	s.Unseen = vocab.Unseen{Mode: vocab.UnseenCount}
	us := learnSpec(t, s)
	if _, err := NewExtend(us, vocab.DefaultCutoffs(), us.Content.Input); err == nil || !strings.Contains(err.Error(), "unseen") {
		t.Errorf("unseen count spec: %v", err)
	}
	vs := learnSpec(t, settings(spec.ModeVocabulary))
	in := vs.Content.Input
	in.Text = []string{"title", "body"}
	if _, err := NewExtend(vs, vocab.DefaultCutoffs(), in); err == nil {
		t.Error("two text fields for a one-field spec were accepted")
	}
}

// TestShardsMergeToSameSpec: a corpus learned in one pass and the same
// corpus counted in three shards, saved, read back and merged, give the
// same spec, fingerprint included.
func TestShardsMergeToSameSpec(t *testing.T) {
	texts, labels := testkit.DemoTexts(t, 900)
	s := settings(spec.ModeVocabulary)
	cut := vocab.Cutoffs{MinDocs: 2, MaxDocShare: 0.9, MaxTerms: 500}
	s.Cutoffs = cut
	whole := learnOn(t, s, texts, labels)
	dir := t.TempDir()
	var paths []string
	for i, r := range [][2]int{{0, 250}, {250, 700}, {700, 900}} {
		l, _ := New(s)
		w, lab := observe(l, texts[r[0]:r[1]], labels[r[0]:r[1]])
		sh, err := l.Shard(w, lab)
		if err != nil {
			t.Fatal(err)
		}
		p := filepath.Join(dir, fmt.Sprintf("part%d.counts", i))
		if err := sh.Save(p); err != nil {
			t.Fatal(err)
		}
		paths = append(paths, p)
	}
	merged, err := MergeShards(paths)
	if err != nil {
		t.Fatal(err)
	}
	got, _, err := merged.Learn(cut)
	if err != nil {
		t.Fatal(err)
	}
	if got.Fingerprint != whole.Fingerprint {
		a, _ := whole.Content.Canonical()
		b, _ := got.Content.Canonical()
		t.Fatalf("merged %s, one pass %s\n%.300s\n%.300s", got.ShortFingerprint(), whole.ShortFingerprint(), a, b)
	}
	// A shard counted with other settings is refused, naming the field.
	s2 := settings(spec.ModeVocabulary)
	s2.Tokens.Case = 0
	if s2.Tokens.Case == s.Tokens.Case {
		s2.Tokens.MaxLen = 20
	}
	l, _ := New(s2)
	w, lab := observe(l, texts[:10], labels[:10])
	sh, _ := l.Shard(w, lab)
	odd := filepath.Join(dir, "odd.counts")
	sh.Save(odd)
	_, err = MergeShards([]string{paths[0], odd})
	if err == nil || !strings.Contains(err.Error(), "tokens.") || !strings.Contains(err.Error(), "odd.counts") {
		t.Errorf("odd shard: %v", err)
	}
}
