package spec

import (
	"fmt"
	"hash/maphash"
	"math/bits"
	"sort"

	"github.com/bowline/bowline/hashing"
	"github.com/bowline/bowline/tokenize"
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
