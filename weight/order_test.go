package weight

import (
	"maps"
	"math/rand/v2"
	"slices"
	"testing"
)

// TestAccumulatorOrderAgainstMap sums random (column, value) pairs per
// document with an Accumulator and with a map, sorted afterwards: the rows
// must agree for small and huge columns (bucket sort, the sort for crowded
// buckets, the comparison sort past 32-bit columns, and documents mixing
// them), document after document, so that nothing of one document leaks
// into the next.
func TestAccumulatorOrderAgainstMap(t *testing.T) {
	r := rand.New(rand.NewPCG(7, 8))
	a := NewAccumulator()
	var row Row
	spans := []int{64, 1 << 12, 1 << 20, 1 << 26, 1 << 40}
	for doc := range 3000 {
		span := spans[r.IntN(len(spans))]
		n := r.IntN(200)
		if doc%97 == 0 {
			n = 5000
		}
		want := map[int]float64{}
		big := r.IntN(20) == 0 // a document with a column far past the others
		for i := range n {
			c := r.IntN(span)
			if big && i == n/2 {
				c = 1<<26 + r.IntN(1<<30)
			}
			v := float64(1 + r.IntN(3))
			a.Add(c, v)
			want[c] += v
		}
		a.Finish(TFCount, nil, NormNone, &row)
		cols := slices.Sorted(maps.Keys(want))
		if !slices.Equal(row.Indices, cols) {
			t.Fatalf("doc %d (span %d, %d adds): %d columns, want %d", doc, span, n, len(row.Indices), len(cols))
		}
		for i, c := range cols {
			if row.Values[i] != want[c] {
				t.Fatalf("doc %d: column %d is %v, want %v", doc, c, row.Values[i], want[c])
			}
		}
	}
}

// TestAccumulatorSumsInOrderAdded: each column's values are summed in the
// order they were added (floating-point sums depend on it), in a document
// with many pairs, and for columns past 32 bits.
func TestAccumulatorSumsInOrderAdded(t *testing.T) {
	r := rand.New(rand.NewPCG(9, 10))
	a := NewAccumulator()
	var row Row
	for _, span := range []int{1000, 1 << 40} {
		want := map[int]float64{}
		for range 200123 {
			c := r.IntN(1000) * (span / 1000)
			v := []float64{0.1, 1e16, -1e16, 3.3, 1e-9}[r.IntN(5)]
			a.Add(c, v)
			want[c] += v
		}
		a.Finish(TFCount, nil, NormNone, &row)
		cols := slices.Sorted(maps.Keys(want))
		var kept []int
		for _, c := range cols {
			if want[c] != 0 {
				kept = append(kept, c)
			}
		}
		if !slices.Equal(row.Indices, kept) {
			t.Fatalf("span %d: %d columns, want %d", span, len(row.Indices), len(kept))
		}
		for i, c := range kept {
			if row.Values[i] != want[c] {
				t.Fatalf("span %d: column %d sums to %v, want %v (the sum in the order added)", span, c, row.Values[i], want[c])
			}
		}
	}
}
