package hugemem

import "testing"

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
