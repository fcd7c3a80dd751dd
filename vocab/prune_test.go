package vocab

import (
	"fmt"
	"math/rand/v2"
	"runtime"
	"slices"
	"strconv"
	"strings"
	"testing"
)

// The Space-Saving checks below use the guarantees stated in Metwally,
// Agrawal and El Abbadi, "Efficient Computation of Frequent and Top-k
// Elements in Data Streams" (ICDT 2005), recalled from memory: a monitored
// element's counter overestimates its frequency by at most its recorded
// error ε; any element whose frequency exceeds the smallest counter is
// monitored; the counters sum to the stream length; and the smallest
// counter is at most N/m for a stream of N items and m counters.

// zipfDocs draws n documents of up to 12 keys from a Zipf-like law over
// vocabulary keys (exponent 1.1, seeded): many rare keys, a few common.
func zipfDocs(n int, vocab uint64, seed uint64) [][]string {
	r := rand.New(rand.NewPCG(seed, 1))
	z := rand.NewZipf(r, 1.1, 1, vocab-1)
	docs := make([][]string, n)
	for i := range docs {
		k := 1 + r.IntN(12)
		for j := 0; j < k; j++ {
			docs[i] = append(docs[i], "k"+strconv.FormatUint(z.Uint64(), 10))
		}
	}
	return docs
}

func countDocs(c *Counts, docs [][]string) {
	for _, d := range docs {
		for _, k := range d {
			c.Add([]byte(k), 1)
		}
		c.EndDoc()
	}
}

func TestSpaceSavingGuarantees(t *testing.T) {
	docs := zipfDocs(3000, 5000, 7)
	exact := NewCounts()
	countDocs(exact, docs)
	var pairs int64 // N: the (document, distinct key) stream length
	exact.Each(func(_ string, _ int, _, d int64) { pairs += d })
	for _, capacity := range []int{16, 100, 400} {
		c := NewBoundedCounts(capacity)
		countDocs(c, docs)
		if c.Len() != capacity {
			t.Fatalf("capacity %d: table holds %d keys", capacity, c.Len())
		}
		p := c.Pruning()
		min := c.stats[c.b.heap[0]].docs
		if p.MaxDocs != min {
			t.Errorf("capacity %d: MaxDocs %d, smallest counter %d", capacity, p.MaxDocs, min)
		}
		var sum, real int64
		for i, k := range c.keys {
			s, e := c.stats[i], c.b.errs[i]
			sum += s.docs
			real += s.docs - e
			tr, _ := exact.Term(k)
			// count_i - ε_i <= f_i <= count_i, and ε_i <= min.
			if !(s.docs-e <= tr.Docs && tr.Docs <= s.docs) || e > min {
				t.Errorf("capacity %d: key %s counter %d error %d, true %d (min %d)", capacity, k, s.docs, e, tr.Docs, min)
			}
		}
		if sum != pairs {
			t.Errorf("capacity %d: counters sum to %d, stream length %d", capacity, sum, pairs)
		}
		if min > pairs/int64(capacity) {
			t.Errorf("capacity %d: smallest counter %d above N/m = %d", capacity, min, pairs/int64(capacity))
		}
		// The pruned mass is exact: what entries really counted.
		if real+p.EvictedDocs != pairs {
			t.Errorf("capacity %d: kept %d + pruned %d documents != %d", capacity, real, p.EvictedDocs, pairs)
		}
		// Every key in more than min documents is monitored.
		exact.Each(func(k string, _ int, _, d int64) {
			if _, ok := c.index[k]; d > min && !ok {
				t.Errorf("capacity %d: key %s in %d > %d documents was pruned", capacity, k, d, min)
			}
		})
		// After Settle, counts are lower bounds short by at most MaxDocs.
		c.Settle()
		for i, k := range c.keys {
			tr, _ := exact.Term(k)
			if d := c.stats[i].docs; d > tr.Docs || tr.Docs-d > p.MaxDocs || d < 1 {
				t.Errorf("capacity %d: settled %s: %d for true %d, bound %d", capacity, k, d, tr.Docs, p.MaxDocs)
			}
		}
		if c.Pruning() != p {
			t.Errorf("capacity %d: Settle changed the pruning figures", capacity)
		}
	}
}

// TestSpaceSavingByHand follows the algorithm on four one-key documents
// with two counters: {a} {b} {c} {a}. c replaces a (counter 1): c=2, ε=1.
// a replaces b (counter 1): a=2, ε=1. Worked by hand from the paper's
// description of the replacement step.
func TestSpaceSavingByHand(t *testing.T) {
	c := NewBoundedCounts(MinCapacity)
	c.b.capacity = 2 // two counters, as in the worked example
	for _, k := range []string{"a", "b", "c", "a"} {
		c.Add([]byte(k), 1)
		c.EndDoc()
	}
	got := map[string][2]int64{}
	for i, k := range c.keys {
		got[k] = [2]int64{c.stats[i].docs, c.b.errs[i]}
	}
	want := map[string][2]int64{"c": {2, 1}, "a": {2, 1}}
	if fmt.Sprint(got) != fmt.Sprint(want) {
		t.Errorf("table %v, want %v", got, want)
	}
	p := c.Pruning()
	if p.Evicted != 2 || p.EvictedDocs != 2 || p.MaxDocs != 2 || p.InexactKeys != 2 {
		t.Errorf("pruning %+v, want 2 evicted holding 2 documents, bound 2, 2 inexact", p)
	}
}

// TestBoundedUnderCapacityIsExact: when every key fits, a bounded Counts
// gives Build the same vocabulary as an unbounded one, and reports nothing
// pruned, whether fed per document or by merging batches.
func TestBoundedUnderCapacityIsExact(t *testing.T) {
	docs := zipfDocs(500, 300, 3)
	exact := NewCounts()
	countDocs(exact, docs)
	perDoc := NewBoundedCounts(1000)
	countDocs(perDoc, docs)
	batched := NewBoundedCounts(1000)
	for i := 0; i < len(docs); i += 64 {
		part := NewCounts()
		countDocs(part, docs[i:min(i+64, len(docs))])
		batched.Merge(part)
	}
	want, wrep := exact.Build(Cutoffs{MinDocs: 2, MaxDocShare: 0.5})
	for name, c := range map[string]*Counts{"per document": perDoc, "batched": batched} {
		if p := c.Pruning(); p.Evicted != 0 || p.MaxDocs != 0 || p.InexactKeys != 0 {
			t.Errorf("%s: pruning %+v", name, p)
		}
		c.Settle()
		got, rep := c.Build(Cutoffs{MinDocs: 2, MaxDocShare: 0.5})
		if !slices.Equal(got.Terms, want.Terms) || rep != wrep || c.Docs() != exact.Docs() {
			t.Errorf("%s: build differs from the exact counts", name)
		}
	}
}

// TestBoundedDeterministic: the same stream gives the same table.
func TestBoundedDeterministic(t *testing.T) {
	docs := zipfDocs(2000, 4000, 11)
	snap := func() string {
		c := NewBoundedCounts(64)
		countDocs(c, docs)
		c.Settle()
		v, _ := c.Build(DefaultCutoffs())
		return fmt.Sprint(v.Terms, c.Pruning())
	}
	if a, b := snap(), snap(); a != b {
		t.Error("two runs over the same stream differ")
	}
}

// TestBoundedOpenDocument: a key added again in the same document counts
// that document once, whether it waits for EndDoc or is in the table.
func TestBoundedOpenDocument(t *testing.T) {
	c := NewBoundedCounts(MinCapacity)
	for _, d := range [][]string{{"x", "y", "x"}, {"x", "x", "z", "z"}} {
		for _, k := range d {
			c.Add([]byte(k), 1)
		}
		c.EndDoc()
	}
	x, _ := c.Term("x")
	z, _ := c.Term("z")
	if x.Docs != 2 || x.Count != 4 || z.Docs != 1 || z.Count != 2 {
		t.Errorf("x %+v, z %+v", x, z)
	}
}

func TestBoundedAddSeenAllocs(t *testing.T) {
	c := NewBoundedCounts(100)
	key := []byte("dock")
	c.Add(key, 1)
	c.EndDoc()
	if n := testing.AllocsPerRun(100, func() {
		c.Add(key, 1)
		c.EndDoc()
	}); n != 0 {
		t.Errorf("Add of a kept key allocates %.1f times", n)
	}
}

// TestBoundedKeyBytes measures the heap one key of a full bounded Counts
// takes (runtime.MemStats), besides its 16 bytes of key text (13-byte keys
// land in Go's 16-byte size class), against the BoundedKeyBytes estimate.
func TestBoundedKeyBytes(t *testing.T) {
	const n = 60000
	keys := make([][]byte, 2*n)
	for i := range keys {
		keys[i] = fmt.Appendf(nil, "key-%09d", i)
	}
	var m0, m1 runtime.MemStats
	runtime.GC()
	runtime.ReadMemStats(&m0)
	c := NewBoundedCounts(n)
	for _, k := range keys { // twice the capacity: the table is full, half replaced
		c.Add(k, 1)
		c.EndDoc()
	}
	runtime.GC()
	runtime.ReadMemStats(&m1)
	per := float64(int64(m1.HeapAlloc)-int64(m0.HeapAlloc))/n - 16
	t.Logf("bounded Counts: %.1f heap bytes per key besides the key text (estimate %d)", per, BoundedKeyBytes)
	if per > BoundedKeyBytes*1.1 || per < BoundedKeyBytes*0.7 {
		t.Errorf("measured %.1f bytes per key, estimate BoundedKeyBytes = %d is off by more than the margin", per, BoundedKeyBytes)
	}
	runtime.KeepAlive(c)
	runtime.KeepAlive(keys) // measured in m0 too
}

// TestSurvivors checks the cutoff-effect summary against Build on the
// same counts: equal where Survivors says exact, bracketing otherwise.
func TestSurvivors(t *testing.T) {
	c := NewCounts()
	countDocs(c, zipfDocs(4000, 20000, 5))
	hist := c.DocHistogram()
	for _, k := range []int{0, 8, 256, c.Len()} {
		top := c.TopDocCounts(k)
		if !slices.IsSortedFunc(top, func(a, b int64) int { return int(b - a) }) || len(top) != min(k, c.Len()) {
			t.Fatalf("TopDocCounts(%d) not %d descending counts", k, min(k, c.Len()))
		}
		exact := 0
		for _, m := range []int64{1, 2, 3, 5, 10, 16, 17, 20, 33, 50, 100, 1000} {
			for _, f := range []float64{1, 0.5, 0.2, 0.1, 0.05, 0.01, 0.001} {
				cut := Cutoffs{MinDocs: m, MaxDocShare: f}
				_, rep := c.Build(cut)
				lo, hi := Survivors(hist, top, c.Docs(), cut)
				if lo > int64(rep.Kept) || hi < int64(rep.Kept) || (k == c.Len() && lo != hi) {
					t.Errorf("top %d, min-docs %d, share %g: Survivors [%d, %d], Build keeps %d", k, m, f, lo, hi, rep.Kept)
				}
				if lo == hi {
					exact++
				}
				// Thresholds on exact buckets with no share cut are exact.
				if f == 1 && (m <= 17 || m == 33) && lo != hi {
					t.Errorf("min-docs %d: range [%d, %d] where the histogram is exact", m, lo, hi)
				}
			}
		}
		t.Logf("top %d: %d of 84 cutoff pairs exact", k, exact)
	}
	if lo, hi := Survivors(hist, nil, c.Docs(), Cutoffs{MinDocs: 1, MaxDocShare: 1, MaxTerms: 10}); lo != 10 || hi != 10 {
		t.Errorf("MaxTerms 10 caps to [%d, %d]", lo, hi)
	}
}

func TestOrderKeys(t *testing.T) {
	c := corpus("aa b cc", "ddd b")
	codes, keys := c.OrderKeys()
	if fmt.Sprint(codes, keys) != "[1 2 3] [1 2 1]" {
		t.Errorf("OrderKeys = %v %v", codes, keys)
	}
}

// Counting under a memory bound: with room for two keys, the rare key
// "fee" is pruned, and the figures say how far the counts can be off.
// bike entered twice: its settled count, 2, counts the documents since it
// last entered (it is in 3); no count is off by more than the bound, 3.
func ExampleNewBoundedCounts() {
	c := NewBoundedCounts(MinCapacity)
	c.b.capacity = 2 // room for two keys, to keep the example small
	for _, d := range []string{"dock bike", "dock fee", "dock bike", "bike"} {
		for _, k := range strings.Fields(d) {
			c.Add([]byte(k), 1)
		}
		c.EndDoc()
	}
	c.Settle()
	c.Each(func(key string, _ int, _, docs int64) { fmt.Println(key, docs) })
	p := c.Pruning()
	fmt.Printf("pruned %d, bound %d, inexact %d\n", p.Evicted, p.MaxDocs, p.InexactKeys)
	// Output:
	// bike 2
	// dock 3
	// pruned 2, bound 3, inexact 1
}

func BenchmarkBoundedCounts(b *testing.B) {
	docs := zipfDocs(2000, 50000, 3)
	var size int64
	for _, d := range docs {
		for _, k := range d {
			size += int64(len(k)) + 1
		}
	}
	b.SetBytes(size)
	b.ReportAllocs()
	for b.Loop() {
		c := NewBoundedCounts(1000)
		countDocs(c, docs)
	}
}
