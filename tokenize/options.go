package tokenize

import (
	"fmt"
)

// Normalization selects the Unicode normalization form applied to the whole
// text before it is segmented.
type Normalization uint8

const (
	// NFKC is compatibility composition: fullwidth letters, ligatures such
	// as "ﬁ" and other compatibility characters become their plain forms.
	NFKC Normalization = iota
	// NFC is canonical composition: only canonically equivalent sequences
	// (for example "e" + U+0301 and "é") are unified.
	NFC
	// NoNormalization leaves the text as it is.
	NoNormalization
)

// CaseMode selects how letter case is removed from each token.
type CaseMode uint8

const (
	// CaseFold applies full Unicode case folding without language tailoring
	// (CaseFolding.txt statuses C and F, as golang.org/x/text/cases.Fold
	// does): "ß" and "ẞ" become "ss", "İ" becomes "i" + U+0307, "ı" stays.
	CaseFold CaseMode = iota
	// CaseLower applies the full Unicode lowercase mapping without language
	// tailoring: "ß" stays "ß", "İ" becomes "i" + U+0307, and a final
	// capital sigma becomes "ς".
	CaseLower
	// CaseKeep leaves letter case as it is.
	CaseKeep
)

// AccentMode selects whether combining marks are removed from tokens.
type AccentMode uint8

const (
	// AccentsKeep leaves accents in place.
	AccentsKeep AccentMode = iota
	// AccentsStrip decomposes each token (NFD), removes nonspacing marks
	// (general category Mn) and composes the rest again.
	AccentsStrip
)

// NumberMode selects what happens to tokens that the segmenter types as
// numbers ("42", "3.14", "1,000"). Tokens that mix letters and digits, such
// as "2nd" or "v8", are words, not numbers.
type NumberMode uint8

const (
	// NumbersKeep keeps numbers as tokens.
	NumbersKeep NumberMode = iota
	// NumbersMask replaces every number by NumberMask.
	NumbersMask
	// NumbersDrop removes numbers.
	NumbersDrop
)

// NumberMask is the one token every number becomes under NumbersMask. It
// contains characters that never occur inside a token, so it can never equal
// a token taken from text.
const NumberMask = "<num>"

var (
	normNames   = [...]string{NFKC: "nfkc", NFC: "nfc", NoNormalization: "none"}
	caseNames   = [...]string{CaseFold: "fold", CaseLower: "lower", CaseKeep: "keep"}
	accentNames = [...]string{AccentsKeep: "keep", AccentsStrip: "strip"}
	numberNames = [...]string{NumbersKeep: "keep", NumbersMask: "mask", NumbersDrop: "drop"}
)

func enumString(names []string, v uint8, typ string) string {
	if int(v) < len(names) {
		return names[v]
	}
	return fmt.Sprintf("%s(%d)", typ, v)
}

func parseEnum(names []string, s, what string) (uint8, error) {
	for i, n := range names {
		if s == n {
			return uint8(i), nil
		}
	}
	return 0, fmt.Errorf("tokenize: unknown %s %q (want %s)", what, s, orList(names))
}

func orList(names []string) string {
	s := ""
	for i, n := range names {
		switch {
		case i == 0:
		case i == len(names)-1:
			s += " or "
		default:
			s += ", "
		}
		s += n
	}
	return s
}

// String returns the flag word for n: "nfkc", "nfc" or "none".
func (n Normalization) String() string { return enumString(normNames[:], uint8(n), "Normalization") }

// String returns the flag word for c: "fold", "lower" or "keep".
func (c CaseMode) String() string { return enumString(caseNames[:], uint8(c), "CaseMode") }

// String returns the flag word for a: "keep" or "strip".
func (a AccentMode) String() string { return enumString(accentNames[:], uint8(a), "AccentMode") }

// String returns the flag word for n: "keep", "mask" or "drop".
func (n NumberMode) String() string { return enumString(numberNames[:], uint8(n), "NumberMode") }

// ParseNormalization parses "nfkc", "nfc" or "none".
func ParseNormalization(s string) (Normalization, error) {
	v, err := parseEnum(normNames[:], s, "normalization")
	return Normalization(v), err
}

// ParseCase parses "fold", "lower" or "keep".
func ParseCase(s string) (CaseMode, error) {
	v, err := parseEnum(caseNames[:], s, "case mode")
	return CaseMode(v), err
}

// ParseAccents parses "keep" or "strip".
func ParseAccents(s string) (AccentMode, error) {
	v, err := parseEnum(accentNames[:], s, "accent mode")
	return AccentMode(v), err
}

// ParseNumbers parses "keep", "mask" or "drop".
func ParseNumbers(s string) (NumberMode, error) {
	v, err := parseEnum(numberNames[:], s, "number mode")
	return NumberMode(v), err
}

// Options are the settings of a Tokenizer. The zero value of each enum field
// is its default; use DefaultOptions for the length limits too.
type Options struct {
	Unicode Normalization // normalization of the whole text
	Case    CaseMode      // case rule per token
	Accents AccentMode    // accent rule per token
	Numbers NumberMode    // rule for number tokens
	// MinLen and MaxLen bound the length of a kept token in characters
	// (runes), counted after the case and accent rules. NumberMask is
	// exempt: a masked number is kept whatever its length.
	MinLen, MaxLen int
}

// DefaultOptions returns nfkc normalization, case folding, accents and
// numbers kept, and token lengths from 1 to 64 characters.
func DefaultOptions() Options {
	return Options{Unicode: NFKC, Case: CaseFold, Accents: AccentsKeep, Numbers: NumbersKeep, MinLen: 1, MaxLen: 64}
}

// Validate reports the first invalid setting in o.
func (o Options) Validate() error {
	switch {
	case int(o.Unicode) >= len(normNames):
		return fmt.Errorf("tokenize: unknown normalization %d", o.Unicode)
	case int(o.Case) >= len(caseNames):
		return fmt.Errorf("tokenize: unknown case mode %d", o.Case)
	case int(o.Accents) >= len(accentNames):
		return fmt.Errorf("tokenize: unknown accent mode %d", o.Accents)
	case int(o.Numbers) >= len(numberNames):
		return fmt.Errorf("tokenize: unknown number mode %d", o.Numbers)
	case o.MinLen < 1:
		return fmt.Errorf("tokenize: minimum token length %d is less than 1", o.MinLen)
	case o.MaxLen < o.MinLen:
		return fmt.Errorf("tokenize: maximum token length %d is less than minimum %d", o.MaxLen, o.MinLen)
	}
	return nil
}

func marshalEnum(names []string, v uint8, what string) ([]byte, error) {
	if int(v) >= len(names) {
		return nil, fmt.Errorf("tokenize: unknown %s %d", what, v)
	}
	return []byte(names[v]), nil
}

// MarshalText returns the flag word for n.
func (n Normalization) MarshalText() ([]byte, error) {
	return marshalEnum(normNames[:], uint8(n), "normalization")
}

// UnmarshalText parses a flag word as ParseNormalization does.
func (n *Normalization) UnmarshalText(b []byte) (err error) {
	*n, err = ParseNormalization(string(b))
	return err
}

// MarshalText returns the flag word for c.
func (c CaseMode) MarshalText() ([]byte, error) {
	return marshalEnum(caseNames[:], uint8(c), "case mode")
}

// UnmarshalText parses a flag word as ParseCase does.
func (c *CaseMode) UnmarshalText(b []byte) (err error) {
	*c, err = ParseCase(string(b))
	return err
}

// MarshalText returns the flag word for a.
func (a AccentMode) MarshalText() ([]byte, error) {
	return marshalEnum(accentNames[:], uint8(a), "accent mode")
}

// UnmarshalText parses a flag word as ParseAccents does.
func (a *AccentMode) UnmarshalText(b []byte) (err error) {
	*a, err = ParseAccents(string(b))
	return err
}

// MarshalText returns the flag word for n.
func (n NumberMode) MarshalText() ([]byte, error) {
	return marshalEnum(numberNames[:], uint8(n), "number mode")
}

// UnmarshalText parses a flag word as ParseNumbers does.
func (n *NumberMode) UnmarshalText(b []byte) (err error) {
	*n, err = ParseNumbers(string(b))
	return err
}
