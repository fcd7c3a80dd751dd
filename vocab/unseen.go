package vocab

import (
	"fmt"
	"strconv"
	"strings"
)

// UnseenMode says what happens to a key that is not in the vocabulary.
type UnseenMode uint8

const (
	// UnseenDrop ignores unseen keys. No extra column.
	UnseenDrop UnseenMode = iota
	// UnseenCount counts a row's unseen keys in one extra column,
	// column Len() of the vocabulary.
	UnseenCount
	// UnseenHash spreads unseen keys over Buckets extra columns,
	// Len() to Len()+Buckets-1, by a hash of the key. The vocab package
	// does not hash; bowline's encoder uses the hashing package's seeded
	// XXH64 of the key modulo Buckets.
	UnseenHash
)

// MaxUnseenBuckets is the largest number of hash buckets for unseen keys.
const MaxUnseenBuckets = 1 << 24

// Unseen is the policy for keys outside the vocabulary.
type Unseen struct {
	Mode    UnseenMode
	Buckets int // number of extra columns for UnseenHash; ignored otherwise
}

// ParseUnseen parses the flag words "drop", "count" and "hash:K", where K
// is 1 to 2^24, written in decimal or as a power of two ("hash:2^10").
func ParseUnseen(s string) (Unseen, error) {
	switch s {
	case "drop":
		return Unseen{Mode: UnseenDrop}, nil
	case "count":
		return Unseen{Mode: UnseenCount}, nil
	}
	if rest, ok := strings.CutPrefix(s, "hash:"); ok {
		k, err := parseBuckets(rest)
		if err != nil {
			return Unseen{}, fmt.Errorf("vocab: unseen policy %q: %v", s, err)
		}
		return Unseen{Mode: UnseenHash, Buckets: k}, nil
	}
	return Unseen{}, fmt.Errorf("vocab: unknown unseen policy %q (want drop, count or hash:K)", s)
}

// parseBuckets reads K of "hash:K".
func parseBuckets(s string) (int, error) {
	var k int64
	if base, exp, ok := strings.Cut(s, "^"); ok {
		if base != "2" {
			return 0, fmt.Errorf("only powers of two may use ^")
		}
		e, err := strconv.ParseUint(exp, 10, 8)
		if err != nil || e > 24 {
			return 0, fmt.Errorf("exponent %q is not 0 to 24", exp)
		}
		k = 1 << e
	} else {
		n, err := strconv.ParseInt(s, 10, 64)
		if err != nil {
			return 0, fmt.Errorf("bucket count %q is not a whole number", s)
		}
		k = n
	}
	if k < 1 || k > MaxUnseenBuckets {
		return 0, fmt.Errorf("bucket count %d is not 1 to %d", k, MaxUnseenBuckets)
	}
	return int(k), nil
}

// String returns the flag word ParseUnseen reads: "drop", "count" or
// "hash:K" with K in decimal.
func (u Unseen) String() string {
	switch u.Mode {
	case UnseenDrop:
		return "drop"
	case UnseenCount:
		return "count"
	case UnseenHash:
		return "hash:" + strconv.Itoa(u.Buckets)
	}
	return "UnseenMode(" + strconv.Itoa(int(u.Mode)) + ")"
}

// Columns returns the number of extra columns after the vocabulary:
// 0 for drop, 1 for count, Buckets for hash.
func (u Unseen) Columns() int {
	switch u.Mode {
	case UnseenCount:
		return 1
	case UnseenHash:
		return u.Buckets
	}
	return 0
}

// MarshalText returns the flag word of u (see String); an unknown mode is
// an error.
func (u Unseen) MarshalText() ([]byte, error) {
	if u.Mode > UnseenHash {
		return nil, fmt.Errorf("vocab: unknown unseen mode %d", u.Mode)
	}
	return []byte(u.String()), nil
}

// UnmarshalText parses a flag word as ParseUnseen does.
func (u *Unseen) UnmarshalText(b []byte) error {
	v, err := ParseUnseen(string(b))
	*u = v
	return err
}
