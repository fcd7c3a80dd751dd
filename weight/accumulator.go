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
// one per goroutine. The zero value is ready to use. Once its buffers have
// grown to the largest document seen, Add and Finish do not allocate.
//
// Add only appends; Finish sorts the pairs by column (a stable sort, so a
// column's values stay in the order they were added) and sums each
// column's run. Most of a document's keys are distinct, so this costs less
// than finding each column in a table as it is added; a long document
// whose columns repeat a lot is folded the same way as it grows, so memory
// follows its distinct columns.
type Accumulator struct {
	cols   []int     // columns in the order added (folded: see fold)
	vals   []float64 // values, parallel to cols
	maxCol int       // largest column added since Reset
	folded int       // len(cols) after the last fold; 0 if none
	keys   []uint64  // Finish scratch: col<<32 | position
	perm   []int32   // Finish scratch when a column does not fit 32 bits
	counts []int32   // Finish scratch: bucket counts
	tmp    []uint64  // Finish scratch: radix sort
	// One is made per worker, next to the others: the padding keeps the
	// fields it writes for every token off their cache lines.
	_ [64]byte
}

// NewAccumulator returns an empty Accumulator.
func NewAccumulator() *Accumulator { return &Accumulator{} }

// foldAt is how many pairs an Accumulator holds, beyond twice what it held
// after its last fold, before it folds repeated columns together.
const foldAt = 1 << 16

// Add adds v to column col of the current document. Adding to a column
// again sums the values (signed hashing may add -1), in the order they
// were added. col must not be negative.
func (a *Accumulator) Add(col int, v float64) {
	if col < 0 {
		panic("weight: negative column")
	}
	a.cols = append(a.cols, col)
	a.vals = append(a.vals, v)
	if col > a.maxCol {
		a.maxCol = col
	}
	if len(a.cols) >= 2*a.folded+foldAt {
		a.fold()
	}
}

// fold sums each column's values so far into one pair, at the column's
// first position, keeping first-added order; later values of the column
// are added after that sum, as they would have been.
func (a *Accumulator) fold() {
	order := a.sorted()
	for i := 0; i < len(order); {
		p := order[i]
		c, v := a.cols[p], a.vals[p]
		j := i + 1
		for ; j < len(order) && a.cols[order[j]] == c; j++ {
			v += a.vals[order[j]]
			a.cols[order[j]] = -1 // folded into p
		}
		a.vals[p] = v
		i = j
	}
	w := 0
	for p, c := range a.cols {
		if c >= 0 {
			a.cols[w], a.vals[w] = c, a.vals[p]
			w++
		}
	}
	a.cols, a.vals = a.cols[:w], a.vals[:w]
	a.folded = w
}

// sorted returns the positions of the pairs ordered by column, and by
// position within a column.
func (a *Accumulator) sorted() []int32 {
	perm := a.perm[:0]
	if a.maxCol <= math.MaxUint32 && len(a.cols) <= math.MaxUint32 {
		keys := a.bucketSort()
		for _, k := range keys {
			perm = append(perm, int32(uint32(k)))
		}
		a.keys = keys
	} else {
		for p := range a.cols {
			perm = append(perm, int32(p))
		}
		slices.SortStableFunc(perm, func(x, y int32) int { return cmp.Compare(a.cols[x], a.cols[y]) })
	}
	a.perm = perm
	return perm
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
	a.folded = 0
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
	order := a.sorted()
	for i := 0; i < len(order); {
		p := order[i]
		c, v := a.cols[p], a.vals[p]
		i++
		for ; i < len(order) && a.cols[order[i]] == c; i++ {
			v += a.vals[order[i]]
		}
		w := tf.Apply(v)
		if idf != nil {
			w *= idf[c]
		}
		if w != 0 {
			idx = append(idx, c)
			val = append(val, w)
		}
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
