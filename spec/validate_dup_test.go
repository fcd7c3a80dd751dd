package spec

import (
	"fmt"
	"math/rand/v2"
	"testing"
)

// TestFirstDuplicate compares firstDuplicate with the plain map check on
// random key lists with and without repeats.
func TestFirstDuplicate(t *testing.T) {
	mapCheck := func(keys []string) int {
		seen := map[string]struct{}{}
		for i, k := range keys {
			if _, dup := seen[k]; dup {
				return i
			}
			seen[k] = struct{}{}
		}
		return -1
	}
	r := rand.New(rand.NewPCG(1, 2))
	for _, n := range []int{0, 1, 2, 3, 7, 100, 5000} {
		for _, space := range []int{n * n, n, n / 2} {
			keys := make([]string, n)
			for i := range keys {
				keys[i] = fmt.Sprint(r.IntN(space + 1))
			}
			if got, want := firstDuplicate(keys), mapCheck(keys); got != want {
				t.Fatalf("n %d space %d: firstDuplicate %d, map %d", n, space, got, want)
			}
		}
	}
}
