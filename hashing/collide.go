package hashing

import (
	"math"
	"runtime"
	"slices"
	"sync/atomic"

	"github.com/bowline/bowline/internal/hugemem"
)

// ExpectedCollisionRate returns the share of n distinct keys, hashed uniformly
// into m buckets, that are expected to share their bucket with at least one
// other key: 1 − (1 − 1/m)^(n−1). A key collides unless each of the n−1 other
// keys lands in one of the m−1 other buckets (the birthday-problem occupancy
// formula). It is computed as −expm1((n−1)·log1p(−1/m)) so that it stays
// accurate when m is large. It returns 0 when n ≤ 1, and NaN when m < 1.
func ExpectedCollisionRate(n, m float64) float64 {
	if m < 1 || math.IsNaN(m) || math.IsNaN(n) {
		return math.NaN()
	}
	if n <= 1 {
		return 0
	}
	return -math.Expm1((n - 1) * math.Log1p(-1/m))
}

// ExpectedOccupied returns the expected number of non-empty buckets after
// hashing n distinct keys uniformly into m buckets: m·(1 − (1 − 1/m)^n),
// computed as −m·expm1(n·log1p(−1/m)). It returns 0 when n ≤ 0, and NaN when
// m < 1.
func ExpectedOccupied(n, m float64) float64 {
	if m < 1 || math.IsNaN(m) || math.IsNaN(n) {
		return math.NaN()
	}
	if n <= 0 {
		return 0
	}
	return -m * math.Expm1(n*math.Log1p(-1/m))
}

// Collisions is the exact collision account of a set of distinct keys hashed
// into Width buckets.
type Collisions struct {
	// Width is the number of buckets.
	Width uint64
	// Keys is the number of distinct keys.
	Keys int64
	// Occupied is the number of buckets holding at least one key.
	Occupied int64
	// Colliding is the number of distinct keys whose bucket holds at least
	// one other distinct key.
	Colliding int64
	// Rate is Colliding/Keys, or 0 when there are no keys.
	Rate float64
	// ExpectedRate is ExpectedCollisionRate(Keys, Width).
	ExpectedRate float64
	// ExpectedOccupied is ExpectedOccupied(Keys, Width).
	ExpectedOccupied float64
}

// A Tally records the distinct keys of a run, by their 64-bit seeded hash
// (Hasher.Sum), so that collisions can be counted exactly afterwards for any
// width. Feature keys themselves are not stored.
//
// Two distinct keys with equal 64-bit sums are counted once. Under uniform
// hashing the chance that this happens at all among n distinct keys is about
// n²/2^65: below 3·10⁻⁸ for a million keys.
//
// The sums live in an open-addressing table with linear probing, indexed
// by the sum itself (already uniformly distributed), at most half full: 8
// to 16 bytes per distinct key, and no hashing work beyond the sum. Large
// tables are backed by huge pages (see internal/hugemem), so that a probe
// costs a cache miss and not also a page walk. (Buffering added sums and
// inserting them ordered by region of the table was tried; on the
// benchmark corpus it cost more than it saved.)
//
// The zero Tally is not ready for use; call NewTally. A Tally is not safe
// for concurrent use, except Unknown: give each goroutine its own and
// Merge them, or let one goroutine add what the others gathered and did
// not find with Unknown.
type Tally struct {
	slots []uint64 // 0 = empty; len is a power of two
	// table is slots, published for Unknown: slots are stored atomically,
	// and a grown table replaces it only once it is filled.
	table atomic.Pointer[[]uint64]
	n     int      // non-zero sums in slots
	zero  bool     // the sum 0 was added
	buf   []uint64 // added by Add, not yet inserted
	held  *tallyHeld
	// recent holds the last sum added with each value of the top
	// tallyRecentBits bits (a direct-mapped cache of 128 KiB).
	recent []uint64
}

// tallyRecentBits sizes a Tally's cache of recent sums.
const tallyRecentBits = 14

// Recent is a direct-mapped cache of recently seen 64-bit sums (a slot per
// value of their top bits), to skip most repeats of frequent keys before
// they reach a Tally. Make one with NewRecent.
type Recent []uint64

// NewRecent returns an empty cache of 2^14 sums (128 KiB).
func NewRecent() Recent { return make(Recent, 1<<tallyRecentBits) }

// Seen reports whether sum is the last sum seen in its slot, and makes it
// so. The sum 0 counts as seen at first: a Tally records it apart.
func (r Recent) Seen(sum uint64) bool {
	f := &r[sum>>(64-tallyRecentBits)]
	if *f == sum {
		return true
	}
	*f = sum
	return false
}

// AddAll records sums (as Add does each), for sums gathered elsewhere, say
// by several goroutines that each drop their own repeats with a Recent.
func (t *Tally) AddAll(sums []uint64) {
	for _, s := range sums {
		t.insert(s)
	}
}

// tallyHeld holds a Tally's current table for the clean-up that gives it
// back.
// tallyHeld holds a Tally's tables for the clean-up that gives them back:
// the current one, and those outside the Go heap it outgrew, which Unknown
// may still be reading.
type tallyHeld struct {
	slots []uint64
	old   [][]uint64
}

// NewTally returns an empty Tally.
//
// A large Tally's table lives outside the Go heap (see internal/hugemem);
// it is given back when the Tally is collected.
func NewTally() *Tally {
	t := &Tally{slots: make([]uint64, 1024), buf: make([]uint64, 0, tallyBuffer), held: new(tallyHeld),
		recent: NewRecent()}
	t.publish()
	runtime.AddCleanup(t, func(h *tallyHeld) {
		hugemem.Free(h.slots)
		for _, o := range h.old {
			hugemem.Free(o)
		}
	}, t.held)
	return t
}

// publish makes the current table the one Unknown reads.
func (t *Tally) publish() {
	s := t.slots
	t.table.Store(&s)
}

// Unknown removes from sums, in place and keeping their order, those that
// t holds, and returns what is left. It may run on other goroutines while
// one goroutine adds to t: it then sees the sums inserted so far, and may
// keep some added lately (still buffered by Add, or inserted while it
// looks), but it never removes a sum that was not added. So workers can
// drop the sums of keys seen before and send on the rest, for one
// goroutine to add. The sum 0 is always kept.
func (t *Tally) Unknown(sums []uint64) []uint64 {
	s := *t.table.Load()
	mask := uint64(len(s) - 1)
	out := sums[:0]
	for _, x := range sums {
		for i := x & mask; ; i = (i + 1) & mask {
			v := atomic.LoadUint64(&s[i])
			if v == x && x != 0 {
				break
			}
			if v == 0 {
				out = append(out, x)
				break
			}
		}
	}
	return out
}

// Add records the hash sum of one key occurrence. Adding the same sum again
// changes nothing.
func (t *Tally) Add(sum uint64) {
	// A sum seen lately is in the table already: most key
	// occurrences repeat a frequent key, and stop here.
	if Recent(t.recent).Seen(sum) {
		if sum == 0 {
			t.zero = true
		}
		return
	}
	t.buf = append(t.buf, sum)
	if len(t.buf) == cap(t.buf) {
		t.flush()
	}
}

// tallyBuffer is how many sums Add buffers before inserting them.
const tallyBuffer = 1 << 12

// flush inserts the sums Add buffered, in a loop of their own, so that
// the processor overlaps their cache misses.
func (t *Tally) flush() {
	for _, s := range t.buf {
		t.insert(s)
	}
	t.buf = t.buf[:0]
}

func (t *Tally) insert(sum uint64) {
	if sum == 0 {
		t.zero = true
		return
	}
	mask := uint64(len(t.slots) - 1)
	for i := sum & mask; ; i = (i + 1) & mask {
		switch t.slots[i] {
		case sum:
			return
		case 0:
			atomic.StoreUint64(&t.slots[i], sum)
			t.n++
			if 2*t.n > len(t.slots) {
				t.grow()
			}
			return
		}
	}
}

func (t *Tally) grow() {
	old := t.slots
	t.slots = hugemem.Make[uint64](2 * len(old))
	t.held.slots = t.slots
	mask := uint64(len(t.slots) - 1)
	for _, s := range old {
		if s == 0 {
			continue
		}
		i := s & mask
		for t.slots[i] != 0 {
			i = (i + 1) & mask
		}
		t.slots[i] = s
	}
	t.publish()
	// Unknown may still be reading the old table. One outside the Go heap
	// gives its pages back now and reads as empty (so Unknown keeps sums,
	// never wrongly drops them) until the clean-up unmaps it; a heap table
	// is kept by the garbage collector while it is read.
	if 8*len(old) >= hugemem.MinBytes {
		hugemem.Release(old)
		t.held.old = append(t.held.old, old)
	}
}

// each calls fn for every recorded sum.
func (t *Tally) each(fn func(uint64)) {
	t.flush()
	if t.zero {
		fn(0)
	}
	for _, s := range t.slots {
		if s != 0 {
			fn(s)
		}
	}
}

// Merge adds every sum recorded in o to t.
func (t *Tally) Merge(o *Tally) {
	o.each(t.Add)
}

// Len returns the number of distinct sums recorded, that is the number of
// distinct keys seen (see the note on equal sums in the type's doc).
func (t *Tally) Len() int {
	t.flush()
	if t.zero {
		return t.n + 1
	}
	return t.n
}

// denseLimit bounds the memory, in bytes, of the per-bucket counter array
// that Collisions uses when the width is small enough; wider widths are
// counted by sorting the buckets instead.
const denseLimit = 1 << 24

// Collisions counts exactly, from the recorded sums, how the distinct keys
// fall into width buckets, reducing each sum with BucketOf. It can be called
// for as many widths as needed. width must be at least 1.
func (t *Tally) Collisions(width uint64) Collisions {
	n := t.Len()
	c := Collisions{
		Width:            width,
		Keys:             int64(n),
		ExpectedRate:     ExpectedCollisionRate(float64(n), float64(width)),
		ExpectedOccupied: ExpectedOccupied(float64(n), float64(width)),
	}
	if n == 0 {
		return c
	}
	if width <= denseLimit || width <= 4*uint64(n) {
		// One saturating counter per bucket: 0, 1 or 2 (= more than one).
		cnt := make([]uint8, width)
		t.each(func(s uint64) {
			b := BucketOf(s, width)
			switch cnt[b] {
			case 0:
				c.Occupied++
				cnt[b] = 1
			case 1:
				cnt[b] = 2
			}
		})
		t.each(func(s uint64) {
			if cnt[BucketOf(s, width)] == 2 {
				c.Colliding++
			}
		})
	} else {
		bs := make([]uint64, 0, n)
		t.each(func(s uint64) { bs = append(bs, BucketOf(s, width)) })
		slices.Sort(bs)
		for i := 0; i < len(bs); {
			j := i + 1
			for j < len(bs) && bs[j] == bs[i] {
				j++
			}
			c.Occupied++
			if j-i > 1 {
				c.Colliding += int64(j - i)
			}
			i = j
		}
	}
	c.Rate = float64(c.Colliding) / float64(c.Keys)
	return c
}

// BucketLoad is a bucket and the number of distinct keys in it.
type BucketLoad struct {
	Bucket uint64
	Keys   int64
}

// Crowded returns the n buckets of width that hold the most distinct keys
// (at least two), most crowded first, ties by bucket number.
func (t *Tally) Crowded(width uint64, n int) []BucketLoad {
	counts := map[uint64]int64{}
	t.each(func(s uint64) { counts[BucketOf(s, width)]++ })
	var out []BucketLoad
	for b, k := range counts {
		if k > 1 {
			out = append(out, BucketLoad{b, k})
		}
	}
	slices.SortFunc(out, func(a, b BucketLoad) int {
		if a.Keys != b.Keys {
			return int(b.Keys - a.Keys)
		}
		if a.Bucket < b.Bucket {
			return -1
		}
		if a.Bucket > b.Bucket {
			return 1
		}
		return 0
	})
	if len(out) > n {
		out = out[:n]
	}
	return out
}
