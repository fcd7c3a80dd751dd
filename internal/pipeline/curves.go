package pipeline

import (
	"cmp"
	"math"
	"slices"

	"github.com/bowline/bowline/report"
	"github.com/bowline/bowline/spec"
	"github.com/bowline/bowline/vocab"
)

// Curves describes a vocabulary-mode spec's vocabulary for the HTML plots:
// the rank-frequency curve of its columns (at about 60 ranks spaced evenly
// on a log scale) and the document-count histogram of every key learn saw
// (when the spec records it), with the cutoffs. It returns nil for a
// hashing spec.
func Curves(s *spec.Spec) *report.VocabCurves {
	v := s.Content.Vocabulary
	if v == nil {
		return nil
	}
	c := &report.VocabCurves{MinDocs: v.MinDocs, MaxDocs: v.MaxDocShare * float64(s.Content.Docs),
		RankDocs: []report.RankPoint{}, DocHistogram: []report.DocBin{}}
	docs := append([]int64(nil), v.DocCounts...)
	// Columns are in document-count order except after --extend.
	sortDesc(docs)
	n := len(docs)
	last := 0
	for i := 0; i < 64 && n > 0; i++ {
		r := int(math.Round(math.Pow(float64(n), float64(i)/63)))
		if r < 1 || r == last || r > n {
			continue
		}
		last = r
		c.RankDocs = append(c.RankDocs, report.RankPoint{Rank: int64(r), Docs: docs[r-1]})
	}
	if v.Seen != nil {
		for i, k := range v.Seen.DocHistogram {
			lo, hi := vocab.DocBucketBounds(i)
			c.DocHistogram = append(c.DocHistogram, report.DocBin{Lo: lo, Hi: hi, Keys: k})
		}
	}
	return c
}

func sortDesc(a []int64) {
	// Insertion into a heap would do; the slices are sorted already in
	// the common case, so check first.
	sorted := true
	for i := 1; i < len(a); i++ {
		if a[i] > a[i-1] {
			sorted = false
			break
		}
	}
	if sorted {
		return
	}
	slicesSortDesc(a)
}

func slicesSortDesc(a []int64) {
	slices.SortFunc(a, func(x, y int64) int { return cmp.Compare(y, x) })
}
