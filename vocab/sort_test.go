package vocab

import (
	"math/rand/v2"
	"slices"
	"strings"
	"testing"
)

// TestSortColumnsAgainstPlainOrder checks the integer-prefix sort against
// the plain definition of column order on keys that share long prefixes,
// are prefixes of each other, and hold NUL and high bytes.
func TestSortColumnsAgainstPlainOrder(t *testing.T) {
	r := rand.New(rand.NewPCG(5, 6))
	alpha := []string{"a", "b", "\x00", "\xff", "é", " ", "ab"}
	c := NewCounts()
	seen := map[string]bool{}
	for len(c.keys) < parallelSortItems+5000 { // past the two-goroutine threshold
		var sb strings.Builder
		for range r.IntN(14) {
			sb.WriteString(alpha[r.IntN(len(alpha))])
		}
		k := sb.String()
		if seen[k] {
			continue
		}
		seen[k] = true
		c.insert(k, 1, 1, int64(1+r.IntN(3)), -1)
	}
	keep := make([]int32, len(c.keys))
	for i := range keep {
		keep[i] = int32(i)
	}
	want := slices.Clone(keep)
	slices.SortFunc(want, func(a, b int32) int {
		if da, db := c.stats[a].docs, c.stats[b].docs; da != db {
			return int(db - da)
		}
		return strings.Compare(c.keys[a], c.keys[b])
	})
	c.sortColumns(keep)
	if !slices.Equal(keep, want) {
		t.Fatal("column order differs from descending documents, ascending key bytes")
	}
}
