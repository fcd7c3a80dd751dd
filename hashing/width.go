package hashing

import (
	"errors"
	"fmt"
	"math/bits"
	"strconv"
	"strings"
)

// MaxWidth is the largest hashing width accepted by ParseWidth and New: 2^40
// buckets.
const MaxWidth uint64 = 1 << 40

// ParseWidth parses a hashing width written either as a power of two, "2^K"
// (for example "2^20"), or as a plain decimal count of buckets (for example
// "1048576"). Surrounding white space is ignored. The width must lie between
// 1 and MaxWidth (2^40) inclusive; zero, negative numbers, numbers above the
// limit and anything else are rejected with an error that says why.
func ParseWidth(s string) (uint64, error) {
	orig := s
	s = strings.TrimSpace(s)
	if s == "" {
		return 0, errors.New("hashing: empty width; write a bucket count such as 2^20 or 1048576")
	}
	if strings.HasPrefix(s, "-") {
		return 0, fmt.Errorf("hashing: width %q is negative; it must be at least 1", orig)
	}
	if base, exp, ok := strings.Cut(s, "^"); ok {
		if strings.TrimSpace(base) != "2" {
			return 0, fmt.Errorf("hashing: width %q: only powers of two may be written with ^ (as in 2^20)", orig)
		}
		exp = strings.TrimSpace(exp)
		if !allDigits(exp) {
			return 0, fmt.Errorf("hashing: width %q: exponent %q is not a whole number", orig, exp)
		}
		k, err := strconv.ParseUint(exp, 10, 8)
		if err != nil || k > 40 {
			return 0, fmt.Errorf("hashing: width %q is above the limit of 2^40 buckets", orig)
		}
		return 1 << k, nil
	}
	if !allDigits(s) {
		return 0, fmt.Errorf("hashing: width %q is not a number; write a bucket count such as 2^20 or 1048576", orig)
	}
	m, err := strconv.ParseUint(s, 10, 64)
	if err != nil {
		return 0, fmt.Errorf("hashing: width %q is above the limit of 2^40 buckets", orig)
	}
	if err := checkWidth(m); err != nil {
		return 0, err
	}
	return m, nil
}

func allDigits(s string) bool {
	if s == "" {
		return false
	}
	for i := 0; i < len(s); i++ {
		if s[i] < '0' || s[i] > '9' {
			return false
		}
	}
	return true
}

func checkWidth(m uint64) error {
	switch {
	case m == 0:
		return errors.New("hashing: width 0 is invalid; it must be at least 1 bucket")
	case m > MaxWidth:
		return fmt.Errorf("hashing: width %d is above the limit of 2^40 buckets", m)
	}
	return nil
}

// FormatWidth formats a width the way ParseWidth reads it: "2^K" for a power of
// two and the decimal number otherwise.
func FormatWidth(m uint64) string {
	if m != 0 && m&(m-1) == 0 {
		return "2^" + strconv.Itoa(bits.TrailingZeros64(m))
	}
	return strconv.FormatUint(m, 10)
}
