package encode

import (
	"fmt"
	"maps"
	"math/rand/v2"
	"testing"

	"github.com/cespare/xxhash/v2"
)

// TestUnseenCountsAgainstMap counts random keys in two UnseenCounts, merged,
// and in a map of strings: the counts must agree, the cap must hold, and
// Each must list keys in ascending order.
func TestUnseenCountsAgainstMap(t *testing.T) {
	r := rand.New(rand.NewPCG(11, 12))
	a, b := NewUnseenCounts(), NewUnseenCounts()
	want := map[string]int64{}
	for i := range 300000 {
		k := fmt.Sprintf("key %d", int(r.ExpFloat64()*20000))
		u := a
		if i%3 == 0 {
			u = b
		}
		u.Add(xxhash.Sum64String(k), []byte(k), 1)
		want[k]++
	}
	a.Merge(b)
	got := map[string]int64{}
	prev := ""
	a.Each(func(k string, n int64) {
		if k <= prev && prev != "" {
			t.Fatalf("Each out of order: %q after %q", k, prev)
		}
		prev = k
		got[k] = n
	})
	if !maps.Equal(got, want) {
		t.Fatalf("%d keys counted, want %d", len(got), len(want))
	}

	// Past the cap: the one-off keys are forgotten, a key frequent late in
	// the stream is counted exactly from its first occurrence, and a key
	// frequent early keeps its count.
	c := NewUnseenCounts()
	add := func(k string, n int64) { c.Add(xxhash.Sum64String(k), []byte(k), n) }
	add("early", 50)
	for i := range 3 * MaxTrackedUnseen {
		add(fmt.Sprint(i), 1)
	}
	for range 1000 {
		add("late", 1)
	}
	if c.Len() > MaxTrackedUnseen {
		t.Fatalf("Len %d past the cap %d", c.Len(), MaxTrackedUnseen)
	}
	found := map[string]int64{}
	c.Each(func(k string, v int64) {
		if k == "early" || k == "late" {
			found[k] = v
		}
	})
	if found["early"] != 50 || found["late"] != 1000 {
		t.Fatalf("frequent keys after pruning: %v, want early 50 and late 1000", found)
	}
}
