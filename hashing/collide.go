package hashing

import (
	"math"
	"slices"
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
// The zero Tally is not ready for use; call NewTally. A Tally is not safe for
// concurrent use: give each goroutine its own and Merge them.
type Tally struct {
	sums map[uint64]struct{}
}

// NewTally returns an empty Tally.
func NewTally() *Tally {
	return &Tally{sums: make(map[uint64]struct{})}
}

// Add records the hash sum of one key occurrence. Adding the same sum again
// changes nothing.
func (t *Tally) Add(sum uint64) {
	t.sums[sum] = struct{}{}
}

// Merge adds every sum recorded in o to t.
func (t *Tally) Merge(o *Tally) {
	for s := range o.sums {
		t.sums[s] = struct{}{}
	}
}

// Len returns the number of distinct sums recorded, that is the number of
// distinct keys seen (see the note on equal sums in the type's doc).
func (t *Tally) Len() int {
	return len(t.sums)
}

// denseLimit bounds the memory, in bytes, of the per-bucket counter array
// that Collisions uses when the width is small enough; wider widths are
// counted by sorting the buckets instead.
const denseLimit = 1 << 24

// Collisions counts exactly, from the recorded sums, how the distinct keys
// fall into width buckets, reducing each sum with BucketOf. It can be called
// for as many widths as needed. width must be at least 1.
func (t *Tally) Collisions(width uint64) Collisions {
	n := len(t.sums)
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
		for s := range t.sums {
			b := BucketOf(s, width)
			switch cnt[b] {
			case 0:
				c.Occupied++
				cnt[b] = 1
			case 1:
				cnt[b] = 2
			}
		}
		for s := range t.sums {
			if cnt[BucketOf(s, width)] == 2 {
				c.Colliding++
			}
		}
	} else {
		bs := make([]uint64, 0, n)
		for s := range t.sums {
			bs = append(bs, BucketOf(s, width))
		}
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
