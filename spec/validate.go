package spec

import (
	"fmt"
	"hash/maphash"
	"math"
	"math/bits"
	"slices"
	"sort"

	"github.com/bowline/bowline/hashing"
	"github.com/bowline/bowline/ngram"
	"github.com/bowline/bowline/tokenize"
	"github.com/bowline/bowline/vocab"
	"github.com/bowline/bowline/weight"
)

// Validate checks that the spec is complete and self-consistent.
func (s *Spec) Validate() error { return s.validate(true) }

// validate is Validate; without dupKeys it does not look for duplicate
// vocabulary keys.
func (s *Spec) validate(dupKeys bool) error {
	c := &s.Content
	if _, err := c.Tokens.Options(); err != nil {
		return err
	}
	if c.Stem != "" && c.Stem != "none" {
		if _, err := tokenize.NewStemmer(c.Stem); err != nil {
			return err
		}
	}
	if _, err := c.NGrams.Config(); err != nil {
		return err
	}
	if _, err := c.Weights.TF.MarshalText(); err != nil {
		return err
	}
	if _, err := c.Weights.IDF.MarshalText(); err != nil {
		return err
	}
	if _, err := c.Weights.Norm.MarshalText(); err != nil {
		return err
	}
	idf := c.Weights.IDF
	if len(c.Input.Text) == 0 {
		return fmt.Errorf("input: no text field")
	}
	switch c.Mode {
	case ModeVocabulary:
		v := c.Vocabulary
		if v == nil || c.Hashing != nil {
			return fmt.Errorf("vocabulary mode needs a vocabulary and no hashing settings")
		}
		if len(v.Orders) != len(v.Keys) || len(v.DocCounts) != len(v.Keys) {
			return fmt.Errorf("vocabulary: %d keys but %d orders and %d document counts", len(v.Keys), len(v.Orders), len(v.DocCounts))
		}
		if len(v.Retired) != 0 && len(v.Retired) != len(v.Keys) {
			return fmt.Errorf("vocabulary: %d keys but %d retired flags", len(v.Keys), len(v.Retired))
		}
		if _, err := v.Unseen.MarshalText(); err != nil {
			return err
		}
		if dupKeys {
			if i := firstDuplicate(v.Keys); i >= 0 {
				return fmt.Errorf("vocabulary: key %q appears twice (column %d)", v.Keys[i], i)
			}
		}
		if idf != weight.IDFNone && len(c.Weights.IDFValues) != len(v.Keys) {
			return fmt.Errorf("weights: %d idf values for %d columns", len(c.Weights.IDFValues), len(v.Keys))
		}
	case ModeHashing:
		h := c.Hashing
		if h == nil || c.Vocabulary != nil {
			return fmt.Errorf("hashing mode needs hashing settings and no vocabulary")
		}
		if _, err := hashing.New(h.Width, h.Seed, h.Signed); err != nil {
			return err
		}
		if len(c.Weights.IDFBuckets) != len(c.Weights.IDFBucketValues) {
			return fmt.Errorf("weights: %d idf buckets but %d values", len(c.Weights.IDFBuckets), len(c.Weights.IDFBucketValues))
		}
		for _, b := range c.Weights.IDFBuckets {
			if b >= h.Width {
				return fmt.Errorf("weights: idf bucket %d outside width %d", b, h.Width)
			}
		}
	default:
		return fmt.Errorf("unknown mode %q (want %s or %s)", c.Mode, ModeVocabulary, ModeHashing)
	}
	if err := c.ValidateFields(); err != nil {
		return err
	}
	if err := c.validateNumbers(); err != nil {
		return err
	}
	if len(c.Labels.Values) != len(c.Labels.Counts) {
		return fmt.Errorf("labels: %d values but %d counts", len(c.Labels.Values), len(c.Labels.Counts))
	}
	switch c.Labels.Kind {
	case LabelsNone, LabelsNumber:
		if len(c.Labels.Map) != 0 {
			return fmt.Errorf("labels: kind %q with a label map", c.Labels.Kind)
		}
	case LabelsString:
		if !sort.StringsAreSorted(c.Labels.Map) {
			return fmt.Errorf("labels: map not sorted")
		}
	default:
		return fmt.Errorf("labels: unknown kind %q", c.Labels.Kind)
	}
	return nil
}

// validateNumbers checks the learned numbers as numbers: counts are not
// negative and no document count exceeds the documents counted, figures
// that go together have the same lengths, the cutoffs are cutoffs, and
// every idf is finite and within what the formulas give for the spec's
// document count (0 to ln(1+N)+1), so that no row can hold an infinity or
// NaN.
func (c *Content) validateNumbers() error {
	if c.Docs < 0 {
		return fmt.Errorf("docs: %d is negative", c.Docs)
	}
	count := func(what string, n int64) error {
		if n < 0 || n > c.Docs {
			return fmt.Errorf("%s: %d is not a count of the spec's %d documents", what, n, c.Docs)
		}
		return nil
	}
	if v := c.Vocabulary; v != nil {
		if err := (vocab.Cutoffs{MinDocs: v.MinDocs, MaxDocShare: v.MaxDocShare, MaxTerms: v.MaxTerms}).Validate(); err != nil {
			return fmt.Errorf("vocabulary: %w", err)
		}
		for i, n := range v.DocCounts {
			if err := count(fmt.Sprintf("vocabulary: column %d's document count", i), n); err != nil {
				return err
			}
		}
		for i, o := range v.Orders {
			if _, word := ngram.Order(o).Words(); !word && !(o > 100 && o <= int(ngram.MaxOrder)) {
				return fmt.Errorf("vocabulary: column %d has no n-gram order %d", i, o)
			}
		}
		if v.ParentKeys < 0 || v.ParentKeys > len(v.Keys) {
			return fmt.Errorf("vocabulary: %d parent keys of %d columns", v.ParentKeys, len(v.Keys))
		}
		if sn := v.Seen; sn != nil {
			if sn.Keys < 0 || len(sn.Orders) != len(sn.OrderKeys) {
				return fmt.Errorf("vocabulary: seen figures: %d keys, %d orders but %d order counts", sn.Keys, len(sn.Orders), len(sn.OrderKeys))
			}
			for _, ns := range [][]int64{sn.OrderKeys, sn.DocHistogram} {
				for _, n := range ns {
					if n < 0 {
						return fmt.Errorf("vocabulary: seen figures: negative count %d", n)
					}
				}
			}
			for _, n := range sn.TopDocCounts {
				if err := count("vocabulary: seen figures: a top document count", n); err != nil {
					return err
				}
			}
		}
	}
	w := &c.Weights
	top := math.Log1p(float64(c.Docs)) + 1
	idfOK := func(x float64) bool { return x >= 0 && x <= top*(1+1e-12) }
	for i, x := range w.IDFValues {
		if !idfOK(x) {
			return fmt.Errorf("weights: idf %v of column %d is not between 0 and ln(1+%d)+1", x, i, c.Docs)
		}
	}
	for i, x := range w.IDFBucketValues {
		if !idfOK(x) {
			return fmt.Errorf("weights: idf %v of bucket %d is not between 0 and ln(1+%d)+1", x, w.IDFBuckets[i], c.Docs)
		}
	}
	if !idfOK(w.IDFDefault) {
		return fmt.Errorf("weights: default idf %v is not between 0 and ln(1+%d)+1", w.IDFDefault, c.Docs)
	}
	if !slices.IsSorted(w.IDFBuckets) || len(slices.Compact(slices.Clone(w.IDFBuckets))) != len(w.IDFBuckets) {
		return fmt.Errorf("weights: idf buckets are not ascending")
	}
	for i, n := range c.Labels.Counts {
		if err := count(fmt.Sprintf("labels: the count of label %q", c.Labels.Values[min(i, len(c.Labels.Values)-1)]), n); err != nil {
			return err
		}
	}
	for i := range c.Fields {
		f := &c.Fields[i]
		var ns []int64
		switch {
		case f.Category != nil:
			ns = append([]int64{f.Category.OtherDocs, f.Category.MissingDocs}, f.Category.LevelDocs...)
		case f.Number != nil:
			ns = []int64{f.Number.Docs, f.Number.MissingDocs}
		case f.Time != nil:
			ns = []int64{f.Time.Docs, f.Time.MissingDocs}
		}
		for _, n := range ns {
			if err := count(fmt.Sprintf("fields: %q: a document count", f.Name), n); err != nil {
				return err
			}
		}
	}
	return nil
}

// firstDuplicate returns the first index whose key equals an earlier key,
// or -1: what a map[string]struct{} check finds, with an open-addressing
// table (linear probing) of 8-byte slots holding a 32-bit hash tag and the
// index plus one, at most 2/3 full.
func firstDuplicate(keys []string) int {
	if len(keys) < 2 {
		return -1
	}
	if uint64(len(keys)) >= 1<<32-1 {
		seen := make(map[string]struct{}, len(keys))
		for i, k := range keys {
			if _, dup := seen[k]; dup {
				return i
			}
			seen[k] = struct{}{}
		}
		return -1
	}
	size := 1 << bits.Len(uint(len(keys)+len(keys)/2))
	mask := uint64(size - 1)
	slots := make([]uint64, size)
	seed := maphash.MakeSeed()
	for i, k := range keys {
		h := maphash.String(seed, k)
		tag := h >> 32
		for p := h & mask; ; p = (p + 1) & mask {
			s := slots[p]
			if s == 0 {
				slots[p] = tag<<32 | uint64(i+1)
				break
			}
			if s>>32 == tag && keys[s&(1<<32-1)-1] == k {
				return i
			}
		}
	}
	return -1
}
