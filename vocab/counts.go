package vocab

import (
	"math"
	"math/bits"
	"slices"
	"strings"
)

// stat holds the running figures of one distinct key. Keeping them in one
// struct puts everything Add touches in a single cache line.
type stat struct {
	count int64 // occurrences over all documents
	docs  int64 // documents holding the key at least once
	last  int64 // serial of the document that last counted the key
	order int32 // n-gram order code given with the first occurrence
}

// Counts accumulates term frequencies (occurrences) and document
// frequencies of feature keys over a stream of documents.
//
// A document is the run of Add calls up to the next EndDoc. Each distinct
// key is stored once. Counts is not safe for concurrent use: give each
// goroutine its own Counts and combine them with Merge.
type Counts struct {
	index  map[string]int32 // key -> position in keys and stats
	keys   []string         // distinct keys in first-seen order
	stats  []stat           // parallel to keys
	serial int64            // serial of the current document (only grows)
	ndocs  int64            // finished documents
	open   bool             // Add was called since the last EndDoc
}

// NewCounts returns an empty Counts.
func NewCounts() *Counts {
	return &Counts{index: make(map[string]int32)}
}

// Add records one occurrence of key in the current document. The order
// code is an n-gram order label chosen by the caller; it is stored with
// the key on its first occurrence and returned unchanged by Each and Build
// (bowline uses kind*100+n: 1..16 for word n-grams, 101..132 for character
// n-grams). Add does not retain key and does not allocate when the key has
// been seen before.
func (c *Counts) Add(key []byte, order int) {
	c.open = true
	if i, ok := c.index[string(key)]; ok {
		s := &c.stats[i]
		s.count++
		if s.last != c.serial {
			s.last = c.serial
			s.docs++
		}
		return
	}
	c.insert(string(key), order, 1, 1, c.serial)
}

// insert appends a new distinct key.
func (c *Counts) insert(key string, order int, count, docs, last int64) {
	if len(c.keys) >= math.MaxInt32 {
		panic("vocab: more than 2^31-1 distinct keys")
	}
	c.index[key] = int32(len(c.keys))
	c.keys = append(c.keys, key)
	c.stats = append(c.stats, stat{count: count, docs: docs, last: last, order: int32(order)})
}

// EndDoc closes the current document. A document with no keys still
// counts toward Docs.
func (c *Counts) EndDoc() {
	c.ndocs++
	c.serial++
	c.open = false
}

// Docs returns the number of finished documents.
func (c *Counts) Docs() int64 { return c.ndocs }

// Len returns the number of distinct keys.
func (c *Counts) Len() int { return len(c.keys) }

// Merge adds the documents and counts of o to c, as if c had also read
// o's documents. Keys new to c keep the order code they have in o. A
// document o has not finished (Add without a following EndDoc) is counted
// as a finished document of c. An unfinished document of c stays open and
// unaffected. o is not modified; c.Merge(c) doubles every figure.
func (c *Counts) Merge(o *Counts) {
	n := len(o.keys)
	odocs := o.ndocs
	if o.open {
		odocs++
	}
	for i := 0; i < n; i++ {
		k, s := o.keys[i], o.stats[i]
		if j, ok := c.index[k]; ok {
			t := &c.stats[j]
			t.count += s.count
			t.docs += s.docs
			continue
		}
		// last = -1: no document of c has counted this key yet.
		c.insert(k, int(s.order), s.count, s.docs, -1)
	}
	c.ndocs += odocs
}

// Each calls fn for every distinct key in ascending key byte order, with
// the key's order code, its occurrence count and its document count. The
// order is deterministic whatever the order of Add and Merge calls.
func (c *Counts) Each(fn func(key string, order int, count, docs int64)) {
	for _, i := range c.sorted() {
		s := c.stats[i]
		fn(c.keys[i], int(s.order), s.count, s.docs)
	}
}

// sorted returns the key positions in ascending key byte order.
func (c *Counts) sorted() []int32 {
	idx := make([]int32, len(c.keys))
	for i := range idx {
		idx[i] = int32(i)
	}
	slices.SortFunc(idx, func(a, b int32) int { return strings.Compare(c.keys[a], c.keys[b]) })
	return idx
}

// histExact is the number of exact buckets of DocHistogram.
const histExact = 16

// DocHistogram returns h where h[i] is the number of distinct keys whose
// document count falls in bucket i. Buckets 0 to 15 hold the document
// counts 1 to 16 exactly; bucket 16 holds 17..32, bucket 17 holds 33..64,
// and so on, each upper bound a power of two (see DocBucketBounds). The
// slice ends at the last non-empty bucket; it is empty when there are no
// keys. The histogram shows what a min-docs cutoff would remove.
func (c *Counts) DocHistogram() []int64 {
	h := []int64{}
	for _, s := range c.stats {
		b := docBucket(s.docs)
		for len(h) <= b {
			h = append(h, 0)
		}
		h[b]++
	}
	return h
}

// docBucket returns the DocHistogram bucket of a document count >= 1.
func docBucket(docs int64) int {
	if docs <= histExact {
		if docs < 1 {
			return 0
		}
		return int(docs - 1)
	}
	// 17..32 -> 16, 33..64 -> 17: bits.Len64(docs-1) is 5 for 17..32.
	return histExact + bits.Len64(uint64(docs-1)) - 5
}

// DocBucketBounds returns the smallest and largest document count held by
// bucket i of DocHistogram.
func DocBucketBounds(i int) (lo, hi int64) {
	if i < histExact {
		return int64(i + 1), int64(i + 1)
	}
	shift := i - histExact + 4 // bucket 16 -> 16 < d <= 32
	if shift >= 62 {
		return int64(1)<<62 + 1, math.MaxInt64
	}
	return int64(1)<<shift + 1, int64(1) << (shift + 1)
}
