// Package wordpack packs short tokens into integers, so that tables of
// words can compare them as numbers.
//
// A token is packed little endian and zero padded. The packing is exact
// for bowline's tokens, which hold no NUL byte (the tokenizer turns NUL
// into a space), so with the length it tells tokens apart. A token is
// usually a slice of a larger text: when its capacity allows, the bytes
// are loaded at once and those past its length cleared.
package wordpack

import "encoding/binary"

// Pack16 packs a token of at most 16 bytes into two words.
func Pack16(b []byte) (lo, hi uint64) {
	n := len(b)
	if cap(b) >= 16 {
		w := b[:16:16]
		lo, hi = binary.LittleEndian.Uint64(w[:8]), binary.LittleEndian.Uint64(w[8:])
		switch {
		case n < 8:
			lo &= 1<<(8*n) - 1
			hi = 0
		case n < 16:
			hi &= 1<<(8*(n-8)) - 1
		}
		return lo, hi
	}
	var a [16]byte
	copy(a[:], b)
	return binary.LittleEndian.Uint64(a[:8]), binary.LittleEndian.Uint64(a[8:])
}

// Pack8 packs a token of at most 8 bytes into one word (not 0 unless the
// token is empty).
func Pack8(b []byte) uint64 {
	if cap(b) >= 8 {
		k := binary.LittleEndian.Uint64(b[:8:8])
		if n := len(b); n < 8 {
			k &= 1<<(8*n) - 1
		}
		return k
	}
	var k uint64
	for i := len(b) - 1; i >= 0; i-- {
		k = k<<8 | uint64(b[i])
	}
	return k
}

// Pack8String is Pack8 for a string.
func Pack8String(s string) uint64 {
	var k uint64
	for i := len(s) - 1; i >= 0; i-- {
		k = k<<8 | uint64(s[i])
	}
	return k
}

// Pack16String is Pack16 for a string.
func Pack16String(s string) (lo, hi uint64) {
	var a [16]byte
	copy(a[:], s)
	return binary.LittleEndian.Uint64(a[:8]), binary.LittleEndian.Uint64(a[8:])
}
