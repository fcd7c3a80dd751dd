package wordpack

import (
	"encoding/binary"
	"testing"
)

// TestPackIgnoresBytesPastLength: a token inside a larger buffer (as
// tokens are) packs as its own bytes alone, the reference being a copy
// into a zeroed array read little endian.
func TestPackIgnoresBytesPastLength(t *testing.T) {
	buf := []byte("abcdefghijklmnopQRSTUVWXYZQRSTUV")
	for n := 0; n <= 16; n++ {
		var a [16]byte
		copy(a[:], buf[:n])
		wlo, whi := binary.LittleEndian.Uint64(a[:8]), binary.LittleEndian.Uint64(a[8:])
		for _, tok := range [][]byte{buf[:n], buf[:n:n], append([]byte(nil), buf[:n]...)} {
			if lo, hi := Pack16(tok); lo != wlo || hi != whi {
				t.Errorf("Pack16 n=%d cap=%d: %x %x, want %x %x", n, cap(tok), lo, hi, wlo, whi)
			}
			if lo, hi := Pack16String(string(tok)); lo != wlo || hi != whi {
				t.Errorf("Pack16String n=%d: %x %x, want %x %x", n, lo, hi, wlo, whi)
			}
			if n <= 8 {
				if k := Pack8(tok); k != wlo {
					t.Errorf("Pack8 n=%d cap=%d: %x, want %x", n, cap(tok), k, wlo)
				}
				if k := Pack8String(string(tok)); k != wlo {
					t.Errorf("Pack8String n=%d: %x, want %x", n, k, wlo)
				}
			}
		}
	}
}
