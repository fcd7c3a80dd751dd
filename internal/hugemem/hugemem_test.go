package hugemem

import (
	"runtime"
	"testing"
)

type slot struct {
	key uint64
	val int32
}

func TestMakeZeroedUsableFree(t *testing.T) {
	for _, n := range []int{0, 10, MinBytes/16 - 1, MinBytes / 16, 3 * MinBytes / 16} {
		s := Make[slot](n)
		if len(s) != n || cap(s) != n {
			t.Fatalf("n=%d: len %d cap %d", n, len(s), cap(s))
		}
		for i := range s {
			if s[i] != (slot{}) {
				t.Fatalf("n=%d: element %d not zero", n, i)
			}
			s[i] = slot{uint64(i), int32(i)}
		}
		for i := range s {
			if s[i].key != uint64(i) {
				t.Fatalf("n=%d: element %d lost", n, i)
			}
		}
		Free(s)
	}
}

// TestReleaseReadsZero: a released table stays readable, as zeros for a
// mapped table, while a heap table keeps its values; Free still works
// after.
func TestReleaseReadsZero(t *testing.T) {
	for _, n := range []int{10, 3 * MinBytes / 8} {
		s := Make[uint64](n)
		for i := range s {
			s[i] = uint64(i) + 1
		}
		Release(s)
		mappedTable := n*8 >= MinBytes && !off && runtime.GOOS == "linux"
		for i := 0; i < n; i += 1 + n/1000 {
			if mappedTable && s[i] != 0 {
				t.Fatalf("n=%d: element %d reads %d after Release, want 0", n, i, s[i])
			}
			if !mappedTable && s[i] != uint64(i)+1 {
				t.Fatalf("n=%d: heap element %d changed", n, i)
			}
		}
		Free(s)
	}
}
