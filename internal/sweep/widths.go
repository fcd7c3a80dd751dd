package sweep

import (
	"fmt"
	"strings"

	"github.com/bowline/bowline/hashing"
)

// MaxWidths bounds the number of widths in one sweep.
const MaxWidths = 64

// ParseWidths reads a list of hashing widths: a range "A..B", which
// doubles from A until it passes B (B is included when the doubling hits
// it), a range with an explicit factor "A..B*F" (F an integer ≥ 2), or a
// comma-separated list of widths ("2^12,2^16,100000"). Each width is
// written as ParseWidth reads it. The result is ascending, without
// repeats.
func ParseWidths(s string) ([]uint64, error) {
	var out []uint64
	for _, part := range strings.Split(s, ",") {
		part = strings.TrimSpace(part)
		if part == "" {
			return nil, fmt.Errorf("widths %q: empty item", s)
		}
		lo, hi, isRange := strings.Cut(part, "..")
		if !isRange {
			w, err := hashing.ParseWidth(part)
			if err != nil {
				return nil, err
			}
			out = append(out, w)
			continue
		}
		factor := uint64(2)
		if h, f, ok := strings.Cut(hi, "*"); ok {
			hi = h
			var n uint64
			if _, err := fmt.Sscanf(strings.TrimSpace(f), "%d", &n); err != nil || n < 2 || fmt.Sprint(n) != strings.TrimSpace(f) {
				return nil, fmt.Errorf("range %q: factor %q is not an integer of at least 2", part, f)
			}
			factor = n
		}
		a, err := hashing.ParseWidth(lo)
		if err != nil {
			return nil, fmt.Errorf("range %q: %v", part, err)
		}
		b, err := hashing.ParseWidth(hi)
		if err != nil {
			return nil, fmt.Errorf("range %q: %v", part, err)
		}
		if a > b {
			return nil, fmt.Errorf("range %q: %s is above %s", part, hashing.FormatWidth(a), hashing.FormatWidth(b))
		}
		for w := a; w <= b; w *= factor {
			out = append(out, w)
			if len(out) > MaxWidths {
				break
			}
			if w > b/factor {
				break
			}
		}
	}
	out = sortUnique(out)
	if len(out) > MaxWidths {
		return nil, fmt.Errorf("widths %q: more than %d widths", s, MaxWidths)
	}
	return out, nil
}

func sortUnique(v []uint64) []uint64 {
	for i := 1; i < len(v); i++ {
		for j := i; j > 0 && v[j] < v[j-1]; j-- {
			v[j], v[j-1] = v[j-1], v[j]
		}
	}
	out := v[:0]
	for i, w := range v {
		if i == 0 || w != v[i-1] {
			out = append(out, w)
		}
	}
	return out
}
