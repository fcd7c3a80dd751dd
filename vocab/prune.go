package vocab

import (
	"fmt"
	"math"
)

// Bounded counting.
//
// A bounded Counts holds at most a fixed number of distinct keys and prunes
// with the Space-Saving algorithm of Metwally, Agrawal and El Abbadi,
// "Efficient Computation of Frequent and Top-k Elements in Data Streams"
// (ICDT 2005), applied to document counts: the stream is the sequence of
// (document, distinct key) pairs, so a key's frequency is its document
// count. When a key that is not in the full table arrives, the entry with
// the smallest document count m is replaced: the new key takes document
// count m + w (w = the documents it arrives with, 1 for a single document)
// and remembers m as its possible overestimate. This gives, for every key
// and every moment (the paper's lemmas, recalled from memory):
//
//   - a kept key's true document count lies in [docs − err, docs];
//   - a key not in the table was found in at most m documents, m the
//     table's smallest document count, so every key found in more than m
//     documents is kept;
//   - the document counts in the table add up to the stream length, and
//     m ≤ stream length / capacity.
//
// Updates with weights w > 1 (merging a batch's exact counts) are the
// weighted form of the same step; the guarantees carry over. The paper
// finds the minimum with its Stream-Summary lists; here a binary min-heap
// ordered by document count does it, which is simpler and O(log capacity)
// per document-count change.
//
// Each table entry also knows the documents it really counted since it
// entered: its count less the overestimate it entered with. Settle turns
// the table into those counts, which are lower bounds: exact for a key that
// never replaced another, and short by at most the bound otherwise. Cutoffs
// applied to them never keep a key below a min-docs cutoff, and keep every
// key found in at least min-docs plus the bound documents; a key that
// merely arrived late, with an inflated count, is not mistaken for a
// frequent one.
//
// Occurrence counts (Term.Count) follow along the same way: a key that
// replaced another starts its occurrence count afresh.

// bounded is the pruning state of a bounded Counts.
type bounded struct {
	capacity int
	heap     []int32 // positions in keys and stats; min-heap by docs
	errs     []int64 // parallel to keys: the overestimate bound of docs
	doc      *Counts // new keys of the open document (exact)

	evicted      int64 // entries replaced
	evictedDocs  int64 // their document counts, summed
	evictedCount int64 // their occurrence counts, summed
	lost         int64 // bounds carried in from merged bounded Counts
	settled      *Pruning
}

// BoundedKeyBytes is the memory one key of a bounded Counts takes on the
// Go heap besides the key's own bytes: its map entry, string header,
// figures, overestimate and heap slot, all allocated up front
// (TestBoundedKeyBytes measures it with runtime.MemStats).
const BoundedKeyBytes = 136

// MinCapacity is the smallest capacity NewBoundedCounts accepts.
const MinCapacity = 16

// NewBoundedCounts returns a Counts that never holds more than capacity
// distinct keys: when a new key arrives at a full table, the key with the
// smallest document count is pruned (Space-Saving; see Pruning). Its
// memory is allocated up front. capacity must be at least MinCapacity.
//
// To merge a bounded Counts into another, the receiver must be bounded
// too; Merge panics otherwise.
func NewBoundedCounts(capacity int) *Counts {
	if capacity < MinCapacity || capacity > math.MaxInt32 {
		panic(fmt.Sprintf("vocab: bounded capacity %d is not in [%d, 2^31-1]", capacity, MinCapacity))
	}
	c := &Counts{
		index: make(map[string]int32, capacity),
		keys:  make([]string, 0, capacity),
		stats: make([]stat, 0, capacity),
	}
	c.b = &bounded{
		capacity: capacity,
		heap:     make([]int32, 0, capacity),
		errs:     make([]int64, 0, capacity),
		doc:      NewCounts(),
	}
	return c
}

// Pruning is what a bounded Counts pruned, so that a reader knows which
// document counts are exact.
type Pruning struct {
	// Capacity is the most distinct keys the table holds (0: unbounded).
	Capacity int
	// Evicted counts table entries replaced by a new key (a key pruned
	// twice counts twice).
	Evicted int64
	// EvictedDocs and EvictedCount are the documents and occurrences
	// those entries really counted (their counts less the overestimate
	// they entered with), summed: the count mass pruned, exactly. Kept
	// entries' counts less their overestimates plus EvictedDocs make the
	// number of (document, key) pairs counted.
	EvictedDocs  int64
	EvictedCount int64
	// MaxDocs bounds the error: no key missing from the table was found in
	// more than MaxDocs documents, and no kept document count is off by
	// more than MaxDocs (too high before Settle, too low after). 0 means
	// nothing was pruned and every count is exact.
	MaxDocs int64
	// InexactKeys counts kept keys whose document count may be off (those
	// that entered by replacing another key). The others are exact.
	InexactKeys int
}

// Pruning reports what c pruned; the zero Pruning (apart from Capacity)
// means every count is exact.
func (c *Counts) Pruning() Pruning {
	b := c.b
	if b == nil {
		return Pruning{}
	}
	if b.settled != nil {
		return *b.settled
	}
	p := Pruning{Capacity: b.capacity, Evicted: b.evicted, EvictedDocs: b.evictedDocs, EvictedCount: b.evictedCount}
	if b.evicted > 0 && len(b.heap) > 0 {
		p.MaxDocs = c.stats[b.heap[0]].docs
	}
	p.MaxDocs += b.lost
	for _, e := range b.errs {
		if e > 0 || b.lost > 0 {
			p.InexactKeys++
		}
	}
	return p
}

// Settle ends counting on a bounded Counts: every kept key's document
// count becomes the documents its entry really counted (a lower bound of
// the true count, see above), and its pruning figures are frozen. Further
// Add, EndDoc or Merge calls panic. Settle does nothing on an unbounded
// Counts or one settled already. It closes an unfinished document first.
func (c *Counts) Settle() {
	b := c.b
	if b == nil || b.settled != nil {
		return
	}
	if c.open {
		c.EndDoc()
	}
	p := c.Pruning()
	for i := range c.stats {
		c.stats[i].docs -= b.errs[i]
	}
	b.settled = &p
}

// endDoc moves the open document's new keys into the table, each once.
func (b *bounded) endDoc(c *Counts) {
	d := b.doc
	for i, k := range d.keys {
		s := d.stats[i]
		b.update(c, k, s.order, s.count, s.docs, 0)
	}
	clear(d.index)
	d.keys = d.keys[:0]
	d.stats = d.stats[:0]
	d.ndocs, d.serial, d.open = 0, 0, false
}

// mergePruned merges o into the bounded c, entry by entry in o's
// first-seen order (deterministic for a deterministic input).
func (c *Counts) mergePruned(o *Counts) {
	if c.b == nil {
		panic("vocab: Merge of a bounded Counts into an unbounded one")
	}
	keys, stats := o.keys, o.stats
	var errs []int64
	if o.b != nil {
		errs = o.b.errs
		c.b.lost += o.Pruning().MaxDocs
	}
	if o == c {
		keys, stats = append([]string(nil), keys...), append([]stat(nil), stats...)
		errs = append([]int64(nil), errs...)
	}
	for i, k := range keys {
		s := stats[i]
		var e int64
		if errs != nil {
			e = errs[i]
		}
		c.b.update(c, k, s.order, s.count, s.docs, e)
	}
}

// update is one (weighted) Space-Saving step: key arrives in docs more
// documents with count more occurrences; err is the overestimate it
// already carries.
func (b *bounded) update(c *Counts, key string, order int32, count, docs, err int64) {
	if b.settled != nil {
		panic("vocab: counting on a settled Counts")
	}
	if i, ok := c.index[key]; ok {
		s := &c.stats[i]
		s.count += count
		s.docs += docs
		b.errs[i] += err
		b.down(c, int(s.hpos))
		return
	}
	if len(c.keys) < b.capacity {
		c.insert(key, int(order), count, docs, -1)
		b.errs = append(b.errs, err)
		i := int32(len(c.keys) - 1)
		c.stats[i].hpos = int32(len(b.heap))
		b.heap = append(b.heap, i)
		b.up(c, len(b.heap)-1)
		return
	}
	// Replace the entry with the smallest document count.
	r := b.heap[0]
	s := &c.stats[r]
	m := s.docs
	b.evicted++
	b.evictedDocs += s.docs - b.errs[r] // the documents this entry really counted
	b.evictedCount += s.count
	delete(c.index, c.keys[r])
	c.keys[r] = key
	c.index[key] = r
	*s = stat{count: count, docs: m + docs, last: -1, order: order, hpos: 0}
	b.errs[r] = m + err
	b.down(c, 0)
}

func (b *bounded) less(c *Counts, i, j int) bool {
	return c.stats[b.heap[i]].docs < c.stats[b.heap[j]].docs
}

func (b *bounded) swap(c *Counts, i, j int) {
	h := b.heap
	h[i], h[j] = h[j], h[i]
	c.stats[h[i]].hpos = int32(i)
	c.stats[h[j]].hpos = int32(j)
}

// down restores the heap after the entry at heap position i grew.
func (b *bounded) down(c *Counts, i int) {
	n := len(b.heap)
	for {
		l := 2*i + 1
		if l >= n {
			return
		}
		j := l
		if r := l + 1; r < n && b.less(c, r, l) {
			j = r
		}
		if !b.less(c, j, i) {
			return
		}
		b.swap(c, i, j)
		i = j
	}
}

// up restores the heap after an entry was added at heap position i.
func (b *bounded) up(c *Counts, i int) {
	for i > 0 {
		p := (i - 1) / 2
		if !b.less(c, i, p) {
			return
		}
		b.swap(c, i, p)
		i = p
	}
}
