package hashing

import "github.com/cespare/xxhash/v2"

// A Hasher maps feature keys to buckets. Create one with New.
//
// A Hasher with a non-zero Seed keeps an internal XXH64 state that it reuses
// for every key so that hashing does not allocate; such a Hasher is therefore
// not safe for concurrent use. Give each goroutine its own copy with Clone.
// A Hasher with Seed 0 keeps no state, but Clone is cheap either way.
type Hasher struct {
	// Width is the number of buckets, between 1 and MaxWidth.
	Width uint64
	// Seed is the XXH64 seed. Seed 0 gives plain XXH64, the value that
	// "xxhsum -H1" prints.
	Seed uint64
	// Signed makes Bucket also return a sign of -1 or +1 derived from the
	// key's hash, for sign hashing.
	Signed bool

	d *xxhash.Digest // reused seeded state; nil until first needed
}

// New returns a Hasher for width buckets with the given seed. It reports an
// error when width is 0 or above MaxWidth.
func New(width, seed uint64, signed bool) (*Hasher, error) {
	if err := checkWidth(width); err != nil {
		return nil, err
	}
	h := &Hasher{Width: width, Seed: seed, Signed: signed}
	if seed != 0 {
		h.d = xxhash.NewWithSeed(seed)
	}
	return h, nil
}

// Clone returns an independent copy of h that can be used by another
// goroutine.
func (h *Hasher) Clone() *Hasher {
	c := &Hasher{Width: h.Width, Seed: h.Seed, Signed: h.Signed}
	if h.d != nil || h.Seed != 0 {
		c.d = xxhash.NewWithSeed(h.Seed)
	}
	return c
}

// Sum returns the 64-bit XXH64 hash of key with h.Seed. It does not allocate.
func (h *Hasher) Sum(key []byte) uint64 {
	if h.Seed == 0 {
		return xxhash.Sum64(key)
	}
	if h.d == nil {
		h.d = new(xxhash.Digest)
	}
	h.d.ResetWithSeed(h.Seed)
	h.d.Write(key)
	return h.d.Sum64()
}

// Bucket returns the bucket of key, in [0, Width), and its sign.
//
// The bucket is Sum(key) reduced modulo Width (a bit mask when Width is a
// power of two); see BucketOf. The sign is +1 unless h.Signed is set, in which
// case it is -1 when bit 63 of the same hash is set and +1 otherwise. Because
// Width is at most 2^40, that top bit is not among the bits that choose the
// bucket when Width is a power of two, so sign and bucket behave as two
// independent hash functions, as sign hashing requires (Weinberger et al.,
// "Feature Hashing for Large Scale Multitask Learning", ICML 2009). For other
// widths the modulo reads every bit, but the dependence between the sign and
// the bucket is of order Width/2^64 and negligible.
func (h *Hasher) Bucket(key []byte) (bucket uint64, sign float64) {
	s := h.Sum(key)
	sign = 1
	if h.Signed && s>>63 == 1 {
		sign = -1
	}
	return BucketOf(s, h.Width), sign
}

// BucketOf reduces a precomputed hash sum to a bucket in [0, width) exactly as
// Hasher.Bucket does: sum & (width-1) when width is a power of two, and
// sum % width otherwise. width must not be 0.
func BucketOf(sum, width uint64) uint64 {
	if width&(width-1) == 0 {
		return sum & (width - 1)
	}
	return sum % width
}
