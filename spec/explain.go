package spec

import (
	"sort"

	"github.com/bowline/bowline/hashing"
)

// BucketKeys collects, for a few hashing buckets, the distinct keys that
// fall into them: the answer to "which keys share this column". It is not
// safe for concurrent use.
type BucketKeys struct {
	z     *Analyzer
	h     *hashing.Hasher
	width uint64
	keys  map[uint64]map[string]struct{}
	limit int
}

// NewBucketKeys prepares collecting the keys of buckets (hashing mode only),
// keeping at most limit keys per bucket.
func (a *Analysis) NewBucketKeys(h Hashing, buckets []uint64, limit int) *BucketKeys {
	hs, _ := hashing.New(h.Width, h.Seed, h.Signed)
	bk := &BucketKeys{z: a.NewAnalyzer(), h: hs, width: h.Width, keys: map[uint64]map[string]struct{}{}, limit: limit}
	for _, b := range buckets {
		bk.keys[b] = map[string]struct{}{}
	}
	return bk
}

// Observe analyses one document's text fields.
func (bk *BucketKeys) Observe(texts [][]byte) {
	bk.z.Analyze(texts, func(key []byte, _ int) {
		set, ok := bk.keys[hashing.BucketOf(bk.h.Sum(key), bk.width)]
		if !ok || len(set) >= bk.limit {
			return
		}
		if _, seen := set[string(key)]; !seen {
			set[string(key)] = struct{}{}
		}
	})
}

// Keys returns the keys found in bucket b, sorted by bytes.
func (bk *BucketKeys) Keys(b uint64) []string {
	var out []string
	for k := range bk.keys[b] {
		out = append(out, k)
	}
	sort.Strings(out)
	return out
}
