package spec

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

	// The cap: keys past MaxTrackedUnseen are not counted, the others are.
	c := NewUnseenCounts()
	for i := range MaxTrackedUnseen + 10 {
		k := fmt.Sprint(i)
		c.Add(xxhash.Sum64String(k), []byte(k), 1)
	}
	c.Add(xxhash.Sum64String("7"), []byte("7"), 5)
	if c.Len() != MaxTrackedUnseen {
		t.Fatalf("Len %d past the cap %d", c.Len(), MaxTrackedUnseen)
	}
	n := int64(0)
	c.Each(func(k string, v int64) {
		if k == "7" {
			n = v
		}
	})
	if n != 6 {
		t.Fatalf("a key held before the cap counts %d, want 6", n)
	}
}
