package spec

import (
	"fmt"
	"hash/maphash"
	"math/bits"
	"sort"
	"strconv"
	"strings"

	"github.com/bowline/bowline/hashing"
	"github.com/bowline/bowline/vocab"
	"github.com/bowline/bowline/weight"
)

// Validate checks that the spec is complete and self-consistent.
func (s *Spec) Validate() error { return s.validate(true) }

// validate is Validate; without dupKeys it does not look for duplicate
// vocabulary keys.
func (s *Spec) validate(dupKeys bool) error {
	c := &s.Content
	if _, err := c.Analysis(); err != nil {
		return err
	}
	if _, err := weight.ParseTF(c.Weights.TF); err != nil {
		return err
	}
	idf, err := weight.ParseIDF(c.Weights.IDF)
	if err != nil {
		return err
	}
	if _, err := weight.ParseNorm(c.Weights.Norm); err != nil {
		return err
	}
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
		if _, err := vocab.ParseUnseen(v.Unseen); err != nil {
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
	if err := c.validateFields(); err != nil {
		return err
	}
	if len(c.Labels.Values) != len(c.Labels.Counts) {
		return fmt.Errorf("labels: %d values but %d counts", len(c.Labels.Values), len(c.Labels.Counts))
	}
	switch c.Labels.Kind {
	case "none", "number":
		if len(c.Labels.Map) != 0 {
			return fmt.Errorf("labels: kind %q with a label map", c.Labels.Kind)
		}
	case "string":
		if !sort.StringsAreSorted(c.Labels.Map) {
			return fmt.Errorf("labels: map not sorted")
		}
	default:
		return fmt.Errorf("labels: unknown kind %q", c.Labels.Kind)
	}
	return nil
}

func parseUnseenColumns(s string) (int, error) {
	u, err := vocab.ParseUnseen(s)
	if err != nil {
		return 0, err
	}
	return u.Columns(), nil
}

// LabelsFrom decides how labels become numbers from the distinct label
// values of the training corpus: all numeric means pass-through, anything
// else a sorted label map.
func LabelsFrom(values []string, hasLabel bool) Labels {
	if !hasLabel {
		return Labels{Kind: "none"}
	}
	numeric := true
	for _, v := range values {
		if _, err := strconv.ParseFloat(strings.TrimSpace(v), 64); err != nil {
			numeric = false
			break
		}
	}
	if numeric {
		return Labels{Kind: "number"}
	}
	m := append([]string(nil), values...)
	sort.Strings(m)
	return Labels{Kind: "string", Map: m}
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
