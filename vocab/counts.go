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
	hpos  int32 // position in the pruning heap (bounded Counts only)
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
	b      *bounded         // pruning state of a bounded Counts (see prune.go)
	lazy   int              // keys at the end of keys not yet in index (see sync)
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
	if c.lazy > 0 {
		c.sync()
	}
	c.open = true
	if c.b != nil && c.b.doc.Len() > 0 {
		if _, ok := c.b.doc.index[string(key)]; ok {
			c.b.doc.Add(key, order)
			return
		}
	}
	if i, ok := c.index[string(key)]; ok {
		s := &c.stats[i]
		s.count++
		if s.last != c.serial {
			s.last = c.serial
			s.docs++
			if c.b != nil {
				if c.b.settled != nil {
					panic("vocab: counting on a settled Counts")
				}
				c.b.down(c, int(s.hpos))
			}
		}
		return
	}
	if c.b != nil {
		// A new key waits in the document's own counts until EndDoc, so
		// that it enters the table once per document (see prune.go).
		c.b.doc.Add(key, order)
		return
	}
	c.insert(string(key), order, 1, 1, c.serial)
}

// insert appends a new distinct key.
func (c *Counts) insert(key string, order int, count, docs, last int64) {
	c.sync()
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
	if c.b != nil {
		c.b.endDoc(c)
	}
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
	c.sync()
	n := len(o.keys)
	odocs := o.ndocs
	if o.open {
		odocs++
	}
	if o.b != nil && o.b.doc.Len() > 0 {
		// o's unfinished document: its new keys still wait in o.b.doc,
		// and merging them counts that document once.
		c.Merge(o.b.doc)
		odocs--
	}
	if c.b != nil || o.b != nil {
		c.mergePruned(o)
		c.ndocs += odocs
		return
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

// Term returns the figures of one counted key, and whether it was counted.
func (c *Counts) Term(key string) (Term, bool) {
	c.sync()
	i, ok := c.index[key]
	if !ok {
		return Term{Key: key}, false
	}
	s := c.stats[i]
	return Term{Key: key, Order: int(s.order), Docs: s.docs, Count: s.count}, true
}

// TopDocCounts returns the k largest document counts over all counted keys,
// in descending order (fewer when fewer keys were counted). With
// DocHistogram it lets Survivors tell exactly how many keys a cutoff on
// very common keys would remove.
func (c *Counts) TopDocCounts(k int) []int64 {
	d := make([]int64, len(c.stats))
	for i, s := range c.stats {
		d[i] = s.docs
	}
	slices.SortFunc(d, func(a, b int64) int {
		if a > b {
			return -1
		}
		if a < b {
			return 1
		}
		return 0
	})
	if len(d) > k {
		d = d[:k:k]
	}
	return d
}

// OrderKeys returns the order codes counted, ascending, and the number of
// distinct keys counted under each.
func (c *Counts) OrderKeys() (codes []int, keys []int64) {
	per := map[int32]int64{}
	for _, s := range c.stats {
		per[s.order]++
	}
	for k := range per {
		codes = append(codes, int(k))
	}
	slices.Sort(codes)
	for _, k := range codes {
		keys = append(keys, per[int32(k)])
	}
	return codes, keys
}

// Survivors tells how many keys would pass cut, from a document-count
// summary instead of the counts themselves: hist is DocHistogram, top is
// TopDocCounts (any k) and docs the number of documents. The answer is
// exact (lo == hi) when every cutoff threshold falls on an exact bucket of
// the histogram (document counts 1 to 16, or a bucket's lower bound) or
// among the counts listed in top; otherwise lo and hi bound it, because a
// wide bucket only says that its keys' counts lie between its bounds.
// MaxTerms caps both figures.
func Survivors(hist, top []int64, docs int64, cut Cutoffs) (lo, hi int64) {
	// Keep a key with document count d when d >= cut.MinDocs and, with
	// documents, d/docs <= cut.MaxDocShare, the predicate Build uses.
	keep := func(d int64) bool {
		if d < cut.MinDocs {
			return false
		}
		return docs <= 0 || float64(d)/float64(docs) <= cut.MaxDocShare
	}
	var total int64
	for _, n := range hist {
		total += n
	}
	// top holds every count when it lists every key; otherwise the keys
	// it does not list have counts at most its smallest entry.
	complete := int64(len(top)) >= total
	var tmin int64 = math.MaxInt64
	if len(top) > 0 {
		tmin = top[len(top)-1]
	}
	inTop := make([]int64, len(hist))
	for _, d := range top {
		if keep(d) {
			lo++
		}
		if b := docBucket(d); b < len(inTop) {
			inTop[b]++
		}
	}
	hi = lo
	for b, n := range hist {
		unknown := n - inTop[b]
		if unknown <= 0 || complete {
			continue
		}
		blo, bhi := DocBucketBounds(b)
		if bhi > tmin {
			bhi = tmin
		}
		if docs > 0 && bhi > docs {
			bhi = docs // no key is in more documents than there are
		}
		if blo > bhi {
			continue
		}
		// The unknown keys of bucket b have counts in [blo, bhi]; keep is
		// true on one interval of counts, so checking its ends and the
		// interval's meeting points is enough.
		all, none := true, true
		for _, d := range []int64{blo, bhi} {
			if keep(d) {
				none = false
			} else {
				all = false
			}
		}
		switch {
		case all:
			lo += unknown
			hi += unknown
		case none && !(blo < cut.MinDocs && cut.MinDocs <= bhi && keep(cut.MinDocs)):
			// no count in [blo, bhi] passes
		default:
			hi += unknown
		}
	}
	if m := int64(cut.MaxTerms); m > 0 {
		lo, hi = min(lo, m), min(hi, m)
	}
	return lo, hi
}

// addCounted adds count occurrences of key in docs documents that c has
// not counted (from another counter), inserting the key if it is new.
func (c *Counts) addCounted(key string, order int, count, docs int64) {
	if c.b != nil {
		panic("vocab: adding counted keys to bounded counts")
	}
	c.sync()
	if i, ok := c.index[key]; ok {
		s := &c.stats[i]
		s.count += count
		s.docs += docs
		return
	}
	c.insert(key, order, count, docs, -1)
}

// sync puts the keys added at the end of keys without the index
// (IDCounts.AddTo) into the index.
func (c *Counts) sync() {
	if c.lazy == 0 {
		return
	}
	for i := len(c.keys) - c.lazy; i < len(c.keys); i++ {
		c.index[c.keys[i]] = int32(i)
	}
	c.lazy = 0
}
