package cli

import (
	"fmt"
	"math"
	"strconv"
	"strings"
)

// ParseSize reads a size: a number with an optional unit. KiB, MiB,
// GiB, TiB and the bare K, M, G, T are powers of 1024 (common practice,
// as GNU sort -S reads them); KB, MB, GB, TB are powers of 1000; B or no
// unit is bytes.
func ParseSize(s string) (int64, error) {
	t := strings.TrimSpace(s)
	i := 0
	for i < len(t) && (t[i] >= '0' && t[i] <= '9' || t[i] == '.') {
		i++
	}
	num, unit := t[:i], strings.ToUpper(strings.TrimSpace(t[i:]))
	v, err := strconv.ParseFloat(num, 64)
	if num == "" || err != nil {
		return 0, fmt.Errorf("%q is not a size (say 512MiB, 2GB or 100M)", s)
	}
	mult := map[string]float64{"": 1, "B": 1,
		"K": 1 << 10, "KIB": 1 << 10, "KB": 1e3,
		"M": 1 << 20, "MIB": 1 << 20, "MB": 1e6,
		"G": 1 << 30, "GIB": 1 << 30, "GB": 1e9,
		"T": 1 << 40, "TIB": 1 << 40, "TB": 1e12}
	m, ok := mult[unit]
	if !ok {
		return 0, fmt.Errorf("%q: unknown unit %q (use B, KiB, MiB, GiB, TiB, KB, MB, GB, TB, or K, M, G, T)", s, t[i:])
	}
	b := v * m
	if b >= math.MaxInt64 {
		return 0, fmt.Errorf("%q is too large", s)
	}
	return int64(b), nil
}

// FormatSize writes a size as ParseSize reads it, in GiB or MiB when it is
// a whole number of them.
func FormatSize(b int64) string {
	switch {
	case b >= 1<<30 && b%(1<<30) == 0:
		return fmt.Sprintf("%dGiB", b>>30)
	case b >= 1<<20 && b%(1<<20) == 0:
		return fmt.Sprintf("%dMiB", b>>20)
	}
	return fmt.Sprintf("%d bytes", b)
}

// SizeFlag is a flag holding a size in bytes, read by ParseSize.
type SizeFlag int64

// String returns the size as FormatSize writes it ("" for 0).
func (f *SizeFlag) String() string {
	if f == nil || *f == 0 {
		return ""
	}
	return FormatSize(int64(*f))
}

// Set reads a size.
func (f *SizeFlag) Set(s string) error {
	n, err := ParseSize(s)
	if err != nil {
		return err
	}
	*f = SizeFlag(n)
	return nil
}
