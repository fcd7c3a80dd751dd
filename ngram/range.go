package ngram

import (
	"fmt"
	"strconv"
	"strings"
)

// Largest orders a Config accepts.
const (
	MaxWordOrder = 16 // longest word n-gram, in tokens
	MaxCharOrder = 32 // longest character n-gram, in characters
)

// A Range is an inclusive range of n-gram orders, Min through Max.
// The zero Range is off: no n-grams of that kind.
type Range struct {
	Min, Max int
}

// ParseRange parses "A-B" (orders A through B), "N" (N through N), or
// "off" or "" (the zero Range). It accepts orders 1 through [MaxCharOrder];
// use [ParseWords] or [ParseChars] for the limit of one kind.
func ParseRange(s string) (Range, error) {
	return parseRange(s, MaxCharOrder, "")
}

// ParseWords is ParseRange with the word n-gram limit [MaxWordOrder].
func ParseWords(s string) (Range, error) {
	return parseRange(s, MaxWordOrder, "word ")
}

// ParseChars is ParseRange with the character n-gram limit [MaxCharOrder].
func ParseChars(s string) (Range, error) {
	return parseRange(s, MaxCharOrder, "character ")
}

func parseRange(s string, limit int, kind string) (Range, error) {
	t := strings.TrimSpace(s)
	if t == "" || strings.EqualFold(t, "off") {
		return Range{}, nil
	}
	lo, hi, found := strings.Cut(t, "-")
	if !found {
		hi = lo
	}
	a, err1 := strconv.Atoi(lo)
	b, err2 := strconv.Atoi(hi)
	if err1 != nil || err2 != nil {
		return Range{}, fmt.Errorf("ngram: %sorder range %q: want N or A-B with whole numbers A <= B, or \"off\"", kind, s)
	}
	r := Range{a, b}
	if err := r.check(limit, kind); err != nil {
		return Range{}, fmt.Errorf("ngram: %sorder range %q: %v", kind, s, err)
	}
	return r, nil
}

// check validates a non-zero range against limit.
func (r Range) check(limit int, kind string) error {
	switch {
	case r.Min < 1:
		return fmt.Errorf("orders start at 1, not %d", r.Min)
	case r.Min > r.Max:
		return fmt.Errorf("lower order %d is above upper order %d", r.Min, r.Max)
	case r.Max > limit:
		return fmt.Errorf("%sorder %d is above the limit %d", kind, r.Max, limit)
	}
	return nil
}

// String returns the range as ParseRange reads it: "1-2", "3-3" or "off".
func (r Range) String() string {
	if !r.On() {
		return "off"
	}
	return strconv.Itoa(r.Min) + "-" + strconv.Itoa(r.Max)
}

// On reports whether the range asks for any n-grams.
func (r Range) On() bool { return r != Range{} }

// Config selects the n-grams a Builder forms.
type Config struct {
	Words Range // word n-gram orders, in tokens
	Chars Range // character n-gram orders, in characters (runes) of the marked token
}

// Validate reports whether both ranges are off or well formed and within
// [MaxWordOrder] and [MaxCharOrder].
func (c Config) Validate() error {
	if c.Words.On() {
		if err := c.Words.check(MaxWordOrder, "word "); err != nil {
			return fmt.Errorf("ngram: word order range %d-%d: %v", c.Words.Min, c.Words.Max, err)
		}
	}
	if c.Chars.On() {
		if err := c.Chars.check(MaxCharOrder, "character "); err != nil {
			return fmt.Errorf("ngram: character order range %d-%d: %v", c.Chars.Min, c.Chars.Max, err)
		}
	}
	return nil
}
