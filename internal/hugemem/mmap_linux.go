package hugemem

import (
	"sync"
	"syscall"
	"unsafe"
)

// madvHugepage is MADV_HUGEPAGE from Linux's mman-common.h.
const madvHugepage = 14

// hugePage is the size of a transparent huge page on x86-64 and arm64.
const hugePage = 2 << 20

var (
	mu     sync.Mutex
	mapped = map[uintptr][]byte{} // start of each table -> its whole mapping
)

// mapHuge maps size bytes of zeroed memory aligned to a huge page and asks
// for huge pages; it returns nil when mapping fails.
func mapHuge(size int) []byte {
	// Map one huge page more, so the table can start on a boundary.
	b, err := syscall.Mmap(-1, 0, size+hugePage, syscall.PROT_READ|syscall.PROT_WRITE, syscall.MAP_ANON|syscall.MAP_PRIVATE)
	if err != nil {
		return nil
	}
	start := uintptr(unsafe.Pointer(&b[0]))
	off := int((hugePage - start%hugePage) % hugePage)
	t := b[off : off+size : off+size]
	// Advice is a request; without it the table works on small pages.
	_ = syscall.Madvise(t, madvHugepage)
	mu.Lock()
	mapped[uintptr(unsafe.Pointer(&t[0]))] = b
	mu.Unlock()
	return t
}

// unmap gives back a table from mapHuge; other memory is left alone.
func unmap(t []byte) {
	p := uintptr(unsafe.Pointer(&t[0]))
	mu.Lock()
	whole, ok := mapped[p]
	delete(mapped, p)
	mu.Unlock()
	if ok {
		_ = syscall.Munmap(whole)
	}
}

// release drops the pages of a table from mapHuge; the mapping stays, and
// reads of it return zeros. Other memory is left alone.
func release(t []byte) {
	p := uintptr(unsafe.Pointer(&t[0]))
	mu.Lock()
	_, ok := mapped[p]
	mu.Unlock()
	if ok {
		_ = syscall.Madvise(t, syscall.MADV_DONTNEED)
	}
}
