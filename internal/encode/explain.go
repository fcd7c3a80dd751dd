package encode

import (
	"sort"

	"github.com/bowline/bowline/hashing"
	"github.com/bowline/bowline/internal/analysis"
	"github.com/bowline/bowline/ngram"
)

// BucketKeys collects, for a few hashing buckets, the distinct keys that
// fall into them: the answer to "which keys share this column". It is not
// safe for concurrent use.
type BucketKeys struct {
	z     *analysis.Analyzer
	h     *hashing.Hasher
	width uint64
	keys  map[uint64]map[string]struct{}
	limit int
}

// NewBucketKeys prepares collecting the keys of buckets (hashing mode only),
// keeping at most limit keys per bucket.
func (e *Encoder) NewBucketKeys(buckets []uint64, limit int) *BucketKeys {
	bk := &BucketKeys{z: e.analysis.NewAnalyzer(), h: e.hasher.Clone(), width: e.hasher.Width, keys: map[uint64]map[string]struct{}{}, limit: limit}
	for _, b := range buckets {
		bk.keys[b] = map[string]struct{}{}
	}
	return bk
}

// Observe analyses one document's text fields.
func (bk *BucketKeys) Observe(texts [][]byte) {
	bk.z.Analyze(texts, func(key []byte, _ ngram.Order) {
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
