package encode

import "slices"

// UnseenCounts counts the occurrences of keys a vocabulary lacks, for the
// "top unseen keys" figure. Keys are told apart by their 64-bit XXH64 sum
// (the one the distinct-key tallies use), and each key's text is kept once,
// in one arena: counting an occurrence is one probe of an integer table,
// where a map of strings hashed and compared the key's text every time.
// Two distinct keys with equal sums would count as one (about n²/2^65 for
// n keys: below 10⁻⁹ at the MaxTrackedUnseen cap).
//
// It holds at most MaxTrackedUnseen keys. When a new key finds it full, it
// forgets the half of its keys with the lowest counts (those at or below
// the median of a sample of 4096 counts) and goes on: a key that is
// frequent late in a long corpus still gets in, and the counts it reports
// are exact for keys never forgotten and lower bounds for the others (they
// miss what was counted before a key was forgotten). Not safe for
// concurrent use.
type UnseenCounts struct {
	slots []unseenSlot // open addressing on sum, at most half full
	shift uint
	n     int
	text  []byte // key texts, one after another
}

type unseenSlot struct {
	sum      uint64 // 0 = empty (a sum of 0 is stored as 1)
	count    int64
	off, len uint32 // the key's text in the arena
}

// NewUnseenCounts returns empty counts.
func NewUnseenCounts() *UnseenCounts {
	u := &UnseenCounts{}
	u.init(1 << 10)
	return u
}

func (u *UnseenCounts) init(size int) {
	u.slots = make([]unseenSlot, size)
	u.shift = uint(64 - bitsLen(size-1))
	u.n = 0
}

func bitsLen(x int) int {
	n := 0
	for x > 0 {
		n++
		x >>= 1
	}
	return n
}

// Len returns the number of keys counted.
func (u *UnseenCounts) Len() int { return u.n }

// Add adds count occurrences of key, whose XXH64 sum is sum.
func (u *UnseenCounts) Add(sum uint64, key []byte, count int64) {
	if sum == 0 {
		sum = 1
	}
	mask := len(u.slots) - 1
	i := int((sum * 0x9E3779B97F4A7C15) >> u.shift)
	for ; u.slots[i].sum != 0; i = (i + 1) & mask {
		if u.slots[i].sum == sum {
			u.slots[i].count += count
			return
		}
	}
	if u.n >= MaxTrackedUnseen || len(u.text)+len(key) > 1<<32-1 {
		before := u.n
		u.prune()
		if u.n < before {
			u.Add(sum, key, count)
		}
		return
	}
	off := len(u.text)
	u.text = append(u.text, key...)
	u.slots[i] = unseenSlot{sum: sum, count: count, off: uint32(off), len: uint32(len(key))}
	u.n++
	if 2*u.n > len(u.slots) {
		old := u.slots
		u.init(2 * len(old))
		n := 0
		for _, s := range old {
			if s.sum == 0 {
				continue
			}
			j := int((s.sum * 0x9E3779B97F4A7C15) >> u.shift)
			for u.slots[j].sum != 0 {
				j = (j + 1) & (len(u.slots) - 1)
			}
			u.slots[j] = s
			n++
		}
		u.n = n
	}
}

// prune forgets the keys whose count is at most the (sampled) median
// count, and compacts the text arena.
func (u *UnseenCounts) prune() {
	// The median of an evenly spaced sample of the counts is close
	// enough, and costs a small sort instead of one over every key.
	step := max(1, u.n/4096)
	counts := make([]int64, 0, u.n/step+1)
	i := 0
	for _, s := range u.slots {
		if s.sum != 0 {
			if i%step == 0 {
				counts = append(counts, s.count)
			}
			i++
		}
	}
	slices.Sort(counts)
	median := counts[len(counts)/2]
	old, text := u.slots, u.text
	u.init(len(old))
	u.text = make([]byte, 0, len(text)/2+64)
	mask := len(u.slots) - 1
	for _, s := range old {
		if s.sum == 0 || s.count <= median {
			continue
		}
		off := len(u.text)
		u.text = append(u.text, text[s.off:s.off+s.len]...)
		s.off = uint32(off)
		j := int((s.sum * 0x9E3779B97F4A7C15) >> u.shift)
		for u.slots[j].sum != 0 {
			j = (j + 1) & mask
		}
		u.slots[j] = s
		u.n++
	}
}

// Merge adds o's counts to u (pruning as Add does).
func (u *UnseenCounts) Merge(o *UnseenCounts) {
	for _, s := range o.slots {
		if s.sum != 0 {
			u.Add(s.sum, o.text[s.off:s.off+s.len], s.count)
		}
	}
}

// Each calls fn for every key counted, in ascending key order.
func (u *UnseenCounts) Each(fn func(key string, count int64)) {
	type kc struct {
		key   string
		count int64
	}
	all := make([]kc, 0, u.n)
	for _, s := range u.slots {
		if s.sum != 0 {
			all = append(all, kc{string(u.text[s.off : s.off+s.len]), s.count})
		}
	}
	slices.SortFunc(all, func(a, b kc) int {
		switch {
		case a.key < b.key:
			return -1
		case a.key > b.key:
			return 1
		}
		return 0
	})
	for _, x := range all {
		fn(x.key, x.count)
	}
}
