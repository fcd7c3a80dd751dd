// Package hugemem allocates large tables of plain values in memory backed
// by transparent huge pages where the system offers them.
//
// bowline's hash tables (word-id pairs, distinct-key tallies) are probed
// at random over tens of megabytes. With 4 KiB pages nearly every probe
// also misses the TLB, which on a virtual machine costs a two-level page
// walk; 2 MiB pages make those misses rare. Tables from Make live
// outside the Go heap, so the garbage collector neither scans nor frees
// them: the element type must hold no pointers, and each table must be
// given back with Free. BOWLINE_HUGEPAGES=0 in the environment turns this
// off.
package hugemem

import (
	"os"
	"unsafe"
)

// off is set by BOWLINE_HUGEPAGES=0 in the environment: every table then
// comes from the Go heap (for measuring what huge pages bring).
var off = os.Getenv("BOWLINE_HUGEPAGES") == "0"

// MinBytes is the smallest table Make places outside the Go heap; smaller
// ones are ordinary slices.
const MinBytes = 4 << 20

// Make returns a zeroed slice of n elements of T (a type without pointers).
// Tables of MinBytes or more are mapped with huge pages requested, where
// the system supports it; others, and all where mapping fails, come from
// the Go heap.
func Make[T any](n int) []T {
	var zero T
	size := uintptr(n) * unsafe.Sizeof(zero)
	if n <= 0 || size < MinBytes || off {
		return make([]T, n)
	}
	b := mapHuge(int(size))
	if b == nil {
		return make([]T, n)
	}
	return unsafe.Slice((*T)(unsafe.Pointer(&b[0])), n)
}

// Release gives back the memory of a table from Make but keeps its
// addresses readable until Free: reads then return zeros. It is for a
// table that other goroutines may still be reading, where a zero reads as
// "empty". A heap slice is left alone.
func Release[T any](s []T) {
	if b := mappable(s); b != nil {
		release(b)
	}
}

// Free gives back a table from Make. Only the slice Make returned (not a
// re-slice of it) may be given, and not used again; a heap slice is left to
// the garbage collector.
func Free[T any](s []T) {
	if b := mappable(s); b != nil {
		unmap(b)
	}
}

// mappable returns the bytes of s when it is large enough that Make may
// have mapped it, else nil.
func mappable[T any](s []T) []byte {
	var zero T
	size := uintptr(cap(s)) * unsafe.Sizeof(zero)
	if cap(s) == 0 || size < MinBytes {
		return nil
	}
	return unsafe.Slice((*byte)(unsafe.Pointer(unsafe.SliceData(s))), int(size))
}
