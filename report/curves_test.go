package report

import (
	"strings"
	"testing"
)

// TestCurvePlots: the rank-frequency curve and the histogram with both
// cutoffs drawn and named.
func TestCurvePlots(t *testing.T) {
	c := &VocabCurves{
		RankDocs:     []RankPoint{{1, 900}, {2, 500}, {10, 80}, {100, 9}, {1000, 1}},
		DocHistogram: []DocBin{{1, 1, 5000}, {2, 2, 1200}, {3, 3, 600}, {17, 32, 90}, {513, 1024, 3}},
		MinDocs:      2, MaxDocs: 450,
	}
	caps, svgs, err := CurvePlots(c)
	if err != nil {
		t.Fatal(err)
	}
	if len(caps) != 2 || len(svgs) != 2 {
		t.Fatalf("%d plots, want 2", len(svgs))
	}
	if !strings.Contains(string(svgs[1]), "--min-docs 2") || !strings.Contains(string(svgs[1]), "--max-doc-share (450 docs)") {
		t.Fatal("the histogram does not name both cutoffs")
	}
	if _, s, _ := CurvePlots(nil); s != nil {
		t.Fatal("plots drawn for a hashing spec")
	}
}
