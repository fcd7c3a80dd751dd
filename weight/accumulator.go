package weight

import (
	"cmp"
	"math"
	"math/bits"
	"slices"
)

// Row is one weighted sparse row.
type Row struct {
	Indices []int     // 0-based columns, strictly ascending
	Values  []float64 // Values[i] belongs to Indices[i]; never exactly 0
}

// Accumulator sums (column, value) pairs for one document and finishes
// them into a Row. It is reusable and not safe for concurrent use: keep
// one per goroutine. The zero value is ready to use. Once its internal tables have grown to the largest
// document seen, Add and Finish do not allocate.
//
// Repeated columns are summed in an open-addressing table keyed by column,
// so sorting at Finish handles each distinct column once.
type Accumulator struct {
	cols   []int     // distinct columns in first-touch order
	vals   []float64 // sums, parallel to cols
	slots  []uint64  // table: gen<<32 | position in cols; stale if gen differs
	gen    uint64    // current generation, 1..2^32-1
	shift  uint      // 64 - log2(len(slots))
	maxCol int       // largest column added since Reset
	keys   []uint64  // Finish scratch: col<<32 | position
	perm   []int32   // Finish scratch when a column does not fit 32 bits
	counts []int32   // Finish scratch: bucket counts
	tmp    []uint64  // Finish scratch: radix sort
	// One is made per worker, next to the others: the padding keeps the
	// fields it writes for every token off their cache lines.
	_ [64]byte
}

const minSlots = 64

// NewAccumulator returns an empty Accumulator.
func NewAccumulator() *Accumulator {
	a := &Accumulator{}
	a.grow(minSlots)
	return a
}

// grow replaces the table with one of n slots (a power of two) and
// re-inserts the columns collected so far.
func (a *Accumulator) grow(n int) {
	a.slots = make([]uint64, n)
	a.shift = uint(64 - log2(n))
	a.gen = 1
	for p, c := range a.cols {
		s := a.home(c)
		for a.slots[s]>>32 == a.gen {
			s = (s + 1) & (len(a.slots) - 1)
		}
		a.slots[s] = a.gen<<32 | uint64(p)
	}
}

func log2(n int) int {
	k := 0
	for 1<<k < n {
		k++
	}
	return k
}

// home is the first slot probed for column c (Fibonacci hashing).
func (a *Accumulator) home(c int) int {
	return int((uint64(c) * 0x9E3779B97F4A7C15) >> a.shift)
}

// Add adds v to column col of the current document. Adding to a column
// again sums the values (signed hashing may add -1). col must not be
// negative.
func (a *Accumulator) Add(col int, v float64) {
	if col < 0 {
		panic("weight: negative column")
	}
	if a.slots == nil {
		a.grow(minSlots)
	}
	mask := len(a.slots) - 1
	for s := a.home(col); ; s = (s + 1) & mask {
		e := a.slots[s]
		if e>>32 != a.gen {
			// Empty slot: a new column. Keep the table at most half full.
			p := len(a.cols)
			a.cols = append(a.cols, col)
			a.vals = append(a.vals, v)
			if col > a.maxCol {
				a.maxCol = col
			}
			if 2*len(a.cols) > len(a.slots) {
				a.grow(2 * len(a.slots))
			} else {
				a.slots[s] = a.gen<<32 | uint64(p)
			}
			return
		}
		if p := int(uint32(e)); a.cols[p] == col {
			a.vals[p] += v
			return
		}
	}
}

// bucketSort returns the current document's columns packed as col<<32 |
// position, in ascending order. The columns are first spread over about as
// many buckets as there are columns, by their leading bits below maxCol (a
// counting sort), which leaves each a few places at most from its place
// for hashed columns; an insertion sort finishes. When one bucket holds
// too many columns (vocabulary columns crowd the low, frequent end), the
// keys are sorted outright instead.
func (a *Accumulator) bucketSort() []uint64 {
	n := len(a.cols)
	keys := a.keys[:0]
	if n <= 24 {
		for p, c := range a.cols {
			keys = append(keys, uint64(c)<<32|uint64(p))
		}
		insertionSort(keys)
		return keys
	}
	lb := bits.Len(uint(n)) // 2^lb buckets, n < 2^lb <= 2n
	shift := max(0, bits.Len64(uint64(a.maxCol))-lb)
	nb := 1 << lb
	if cap(a.counts) < nb+1 {
		a.counts = make([]int32, nb+1)
	}
	counts := a.counts[:nb+1]
	clear(counts)
	var most int32
	for _, c := range a.cols {
		b := (c >> shift) + 1
		counts[b]++
		most = max(most, counts[b])
	}
	if cap(keys) < n {
		keys = make([]uint64, 0, n)
	}
	keys = keys[:n]
	if most > 32 {
		for p, c := range a.cols {
			keys[p] = uint64(c)<<32 | uint64(p)
		}
		return a.radixSort(keys)
	}
	for b := 1; b <= nb; b++ {
		counts[b] += counts[b-1]
	}
	for p, c := range a.cols {
		b := c >> shift
		keys[counts[b]] = uint64(c)<<32 | uint64(p)
		counts[b]++
	}
	insertionSort(keys)
	return keys
}

// radixSort sorts keys (col<<32 | position) by column, a byte at a time
// from the lowest (a stable counting sort per byte), and returns them; it
// may return the scratch buffer instead of keys.
func (a *Accumulator) radixSort(keys []uint64) []uint64 {
	if cap(a.tmp) < len(keys) {
		a.tmp = make([]uint64, len(keys))
	}
	tmp := a.tmp[:len(keys)]
	var count [256]int32
	for shift := uint(32); shift < 64 && a.maxCol>>(shift-32) > 0; shift += 8 {
		clear(count[:])
		for _, k := range keys {
			count[byte(k>>shift)]++
		}
		var sum int32
		for i, c := range count {
			count[i] = sum
			sum += c
		}
		for _, k := range keys {
			d := byte(k >> shift)
			tmp[count[d]] = k
			count[d]++
		}
		keys, tmp = tmp, keys
	}
	a.tmp = tmp
	return keys
}

func insertionSort(k []uint64) {
	for i := 1; i < len(k); i++ {
		x := k[i]
		j := i
		for j > 0 && k[j-1] > x {
			k[j] = k[j-1]
			j--
		}
		k[j] = x
	}
}

// Reset discards the current document.
func (a *Accumulator) Reset() {
	a.cols = a.cols[:0]
	a.vals = a.vals[:0]
	a.maxCol = 0
	a.gen++
	if a.gen >= 1<<32 {
		clear(a.slots)
		a.gen = 1
	}
}

// Finish writes the current document's row into dst and resets the
// Accumulator for the next document. For each distinct column it takes
// the summed value v, applies tf (to |v| with v's sign kept when v < 0,
// see TF.Apply), multiplies by idf[col] when idf is not nil, and drops the
// column if the result is exactly 0 (a signed sum that cancelled, or a
// plain idf of 0). Columns come out ascending. The norm applies last, over
// the kept values in column order; a row with no values stays empty.
//
// idf, when not nil, must have an entry for every column added. Finish
// reuses the capacity of dst.Indices and dst.Values.
func (a *Accumulator) Finish(tf TF, idf []float64, norm Norm, dst *Row) {
	idx, val := dst.Indices[:0], dst.Values[:0]
	emit := func(p int) {
		c := a.cols[p]
		w := tf.Apply(a.vals[p])
		if idf != nil {
			w *= idf[c]
		}
		if w != 0 {
			idx = append(idx, c)
			val = append(val, w)
		}
	}
	if a.maxCol <= math.MaxUint32 {
		// One packed key per column: col<<32 | position.
		keys := a.bucketSort()
		for _, k := range keys {
			emit(int(uint32(k)))
		}
		a.keys = keys
	} else {
		perm := a.perm[:0]
		for p := range a.cols {
			perm = append(perm, int32(p))
		}
		slices.SortFunc(perm, func(x, y int32) int { return cmp.Compare(a.cols[x], a.cols[y]) })
		for _, p := range perm {
			emit(int(p))
		}
		a.perm = perm
	}
	switch norm {
	case NormL1:
		var s float64
		for _, w := range val {
			s += math.Abs(w)
		}
		scale(val, s)
	case NormL2:
		var s float64
		for _, w := range val {
			s += w * w
		}
		scale(val, math.Sqrt(s))
	}
	dst.Indices, dst.Values = idx, val
	a.Reset()
}

func scale(val []float64, by float64) {
	if by == 0 || by == 1 {
		return
	}
	for i := range val {
		val[i] /= by
	}
}
