package weight

import (
	"fmt"
	"math"
	"strconv"
)

// TF is the term-frequency transform applied to a column's summed count.
type TF uint8

const (
	TFCount  TF = iota // the count itself
	TFBinary           // 1 for any non-zero count
	TFLog              // 1 + ln(count), sublinear
)

// IDF is the inverse-document-frequency weight, learned on the training
// documents (N documents, df of them holding the column's key).
type IDF uint8

const (
	IDFNone   IDF = iota // no idf weight (1 for every column)
	IDFSmooth            // ln((1+N)/(1+df)) + 1
	IDFPlain             // ln(N/df)
)

// Norm is the per-row normalization applied after tf and idf.
type Norm uint8

const (
	NormNone Norm = iota // values as weighted
	NormL1               // divide by the sum of absolute values
	NormL2               // divide by the Euclidean length
)

var (
	tfWords   = [...]string{TFCount: "count", TFBinary: "binary", TFLog: "log"}
	idfWords  = [...]string{IDFNone: "none", IDFSmooth: "smooth", IDFPlain: "plain"}
	normWords = [...]string{NormNone: "none", NormL1: "l1", NormL2: "l2"}
)

func parseWord(what, s string, words []string) (int, error) {
	for i, w := range words {
		if s == w {
			return i, nil
		}
	}
	return 0, fmt.Errorf("weight: unknown %s %q (want %s, %s or %s)", what, s, words[0], words[1], words[2])
}

func word(kind string, v uint8, words []string) string {
	if int(v) < len(words) {
		return words[v]
	}
	return kind + "(" + strconv.Itoa(int(v)) + ")"
}

// ParseTF parses the flag words count, binary and log.
func ParseTF(s string) (TF, error) {
	i, err := parseWord("tf", s, tfWords[:])
	return TF(i), err
}

// ParseIDF parses the flag words none, smooth and plain.
func ParseIDF(s string) (IDF, error) {
	i, err := parseWord("idf", s, idfWords[:])
	return IDF(i), err
}

// ParseNorm parses the flag words none, l1 and l2.
func ParseNorm(s string) (Norm, error) {
	i, err := parseWord("norm", s, normWords[:])
	return Norm(i), err
}

// String returns the flag word of t.
func (t TF) String() string { return word("TF", uint8(t), tfWords[:]) }

// String returns the flag word of i.
func (i IDF) String() string { return word("IDF", uint8(i), idfWords[:]) }

// String returns the flag word of n.
func (n Norm) String() string { return word("Norm", uint8(n), normWords[:]) }

// Apply returns the weight of a summed count tf. Apply(0) is 0 for every
// mode. Apply is odd: a negative tf (a signed-hashing sum) gets the
// weight of |tf| with its sign kept, so TFLog maps -2 to -(1 + ln 2) and
// TFBinary maps it to -1. TFLog expects counts of at least 1; for
// 0 < |tf| < 1 it still returns 1 + ln|tf|, which is below 1.
func (t TF) Apply(tf float64) float64 {
	switch t {
	case TFBinary:
		switch {
		case tf > 0:
			return 1
		case tf < 0:
			return -1
		}
		return 0
	case TFLog:
		switch {
		case tf > 0:
			return 1 + math.Log(tf)
		case tf < 0:
			return -(1 + math.Log(-tf))
		}
		return 0
	}
	return tf
}

// Value returns the idf of a column whose key is in df of n documents.
//
//	IDFNone:   1
//	IDFSmooth: ln((1+n)/(1+df)) + 1; df = 0 gives ln(1+n) + 1, and n = 0
//	           (so df = 0) gives 1. Always positive for 0 <= df <= n.
//	IDFPlain:  ln(n/df); df = 0 or n = 0 gives 0 (no information, and no
//	           infinity). A key in every document also gets 0, so plain
//	           idf removes it from every row.
func (i IDF) Value(n, df int64) float64 {
	switch i {
	case IDFSmooth:
		return math.Log(float64(1+n)/float64(1+df)) + 1
	case IDFPlain:
		if n <= 0 || df <= 0 {
			return 0
		}
		return math.Log(float64(n) / float64(df))
	}
	return 1
}

// IDFTable returns mode.Value(n, df[c]) for every column c. For IDFNone it
// returns nil, which Accumulator.Finish reads as "no idf".
func IDFTable(mode IDF, n int64, df []int64) []float64 {
	if mode == IDFNone {
		return nil
	}
	t := make([]float64, len(df))
	for c, d := range df {
		t[c] = mode.Value(n, d)
	}
	return t
}

// MarshalText returns the flag word of t.
func (t TF) MarshalText() ([]byte, error) { return marshalWord("tf", uint8(t), tfWords[:]) }

// UnmarshalText parses a flag word as ParseTF does.
func (t *TF) UnmarshalText(b []byte) error {
	v, err := ParseTF(string(b))
	*t = v
	return err
}

// MarshalText returns the flag word of i.
func (i IDF) MarshalText() ([]byte, error) { return marshalWord("idf", uint8(i), idfWords[:]) }

// UnmarshalText parses a flag word as ParseIDF does.
func (i *IDF) UnmarshalText(b []byte) error {
	v, err := ParseIDF(string(b))
	*i = v
	return err
}

// MarshalText returns the flag word of n.
func (n Norm) MarshalText() ([]byte, error) { return marshalWord("norm", uint8(n), normWords[:]) }

// UnmarshalText parses a flag word as ParseNorm does.
func (n *Norm) UnmarshalText(b []byte) error {
	v, err := ParseNorm(string(b))
	*n = v
	return err
}

func marshalWord(what string, v uint8, words []string) ([]byte, error) {
	if int(v) >= len(words) {
		return nil, fmt.Errorf("weight: no %s word for %d", what, v)
	}
	return []byte(words[v]), nil
}
