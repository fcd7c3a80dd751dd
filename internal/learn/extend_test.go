package learn_test

import (
	"fmt"
	"path/filepath"
	"strings"
	"testing"

	"github.com/bowline/bowline/internal/encode"
	"github.com/bowline/bowline/internal/learn"
	"github.com/bowline/bowline/internal/learn/learntest"
	"github.com/bowline/bowline/internal/testkit"
	"github.com/bowline/bowline/spec"
	"github.com/bowline/bowline/vocab"
	"github.com/bowline/bowline/weight"
)

// TestExtendModelView is the promise of an index-stable refresh, seen from
// a model trained on the old rows: every old column index holds the same
// key in the extended spec, and on any document the extended spec's row,
// restricted to the old columns, is the old spec's row (raw counts, so
// that the values themselves must agree, not only the keys).
func TestExtendModelView(t *testing.T) {
	texts, labels := testkit.DemoTexts(t, 1200)
	s := learntest.Settings(spec.ModeVocabulary)
	s.TF, s.IDF, s.Norm = weight.TFCount, weight.IDFNone, weight.NormNone
	s.Cutoffs.MinDocs = 2
	old := learntest.LearnOn(t, s, texts[:600], labels[:600])
	ext, x := learntest.ExtendOn(t, old, vocab.Cutoffs{MinDocs: 3, MaxDocShare: 1}, texts[600:], labels[600:])
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
	s := learntest.Settings(spec.ModeVocabulary)
	old := learntest.LearnOn(t, s, append([]string{"zyzzogeton sighting"}, texts[:400]...), append([]string{"bikes"}, labels[:400]...))
	cut := vocab.Cutoffs{MinDocs: 2, MaxDocShare: 0.5, MaxTerms: 7}
	ext, x := learntest.ExtendOn(t, old, cut, texts[400:], labels[400:])
	// The new corpus counted on its own, for the expected figures.
	l, _ := learn.New(s)
	w, _ := learntest.Observe(l, texts[400:], labels[400:])
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
	_, x2 := learntest.ExtendOn(t, ext, vocab.Cutoffs{MinDocs: 2, MaxDocShare: 0.5}, texts[:400], labels[:400])
	if x2.Revived == 0 || x2.ParentKeys != len(nv.Keys) {
		t.Errorf("second refresh: %+v", x2)
	}
}

func TestExtendRefuses(t *testing.T) {
	hs := learntest.LearnDocs(t, learntest.Settings(spec.ModeHashing))
	if _, err := learn.NewExtend(hs, vocab.DefaultCutoffs(), hs.Content.Input); err == nil || !strings.Contains(err.Error(), "hashing") {
		t.Errorf("hashing spec: %v", err)
	}
	s := learntest.Settings(spec.ModeVocabulary)
	s.Unseen = vocab.Unseen{Mode: vocab.UnseenCount}
	us := learntest.LearnDocs(t, s)
	if _, err := learn.NewExtend(us, vocab.DefaultCutoffs(), us.Content.Input); err == nil || !strings.Contains(err.Error(), "unseen") {
		t.Errorf("unseen count spec: %v", err)
	}
	vs := learntest.LearnDocs(t, learntest.Settings(spec.ModeVocabulary))
	in := vs.Content.Input
	in.Text = []string{"title", "body"}
	if _, err := learn.NewExtend(vs, vocab.DefaultCutoffs(), in); err == nil {
		t.Error("two text fields for a one-field spec were accepted")
	}
}

// TestShardsMergeToSameSpec: a corpus learned in one pass and the same
// corpus counted in three shards, saved, read back and merged, give the
// same spec, fingerprint included.
func TestShardsMergeToSameSpec(t *testing.T) {
	texts, labels := testkit.DemoTexts(t, 900)
	s := learntest.Settings(spec.ModeVocabulary)
	cut := vocab.Cutoffs{MinDocs: 2, MaxDocShare: 0.9, MaxTerms: 500}
	s.Cutoffs = cut
	whole := learntest.LearnOn(t, s, texts, labels)
	dir := t.TempDir()
	var paths []string
	for i, r := range [][2]int{{0, 250}, {250, 700}, {700, 900}} {
		l, _ := learn.New(s)
		w, lab := learntest.Observe(l, texts[r[0]:r[1]], labels[r[0]:r[1]])
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
	merged, err := learn.MergeShards(paths)
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
	s2 := learntest.Settings(spec.ModeVocabulary)
	s2.Tokens.Case = 0
	if s2.Tokens.Case == s.Tokens.Case {
		s2.Tokens.MaxLen = 20
	}
	l, _ := learn.New(s2)
	w, lab := learntest.Observe(l, texts[:10], labels[:10])
	sh, _ := l.Shard(w, lab)
	odd := filepath.Join(dir, "odd.counts")
	sh.Save(odd)
	_, err = learn.MergeShards([]string{paths[0], odd})
	if err == nil || !strings.Contains(err.Error(), "tokens.") || !strings.Contains(err.Error(), "odd.counts") {
		t.Errorf("odd shard: %v", err)
	}
}
