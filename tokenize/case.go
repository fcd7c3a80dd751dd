package tokenize

import (
	"unicode"
	"unicode/utf8"
)

//go:generate go run gen_casetables.go

// appendCase appends src with the case rule of t applied, rune by rune from
// foldTable or lowerTable, and reports whether anything changed. Lowercasing
// applies the Final_Sigma condition of the Unicode Standard (section 3.13)
// within the token: a capital sigma becomes "ς" when a cased letter precedes
// it and none follows, ignoring case-ignorable characters in between.
func (t *Tokenizer) appendCase(dst, src []byte) ([]byte, bool) {
	changed := false
	lower := t.opt.Case == CaseLower
	for i := 0; i < len(src); {
		c := src[i]
		if c < utf8.RuneSelf {
			if 'A' <= c && c <= 'Z' {
				c += 'a' - 'A'
				changed = true
			}
			dst = append(dst, c)
			i++
			continue
		}
		r, size := utf8.DecodeRune(src[i:])
		switch m, ok := t.caseTable[r]; {
		case lower && r == 'Σ':
			if finalSigma(src[:i], src[i+size:]) {
				dst = append(dst, "ς"...)
			} else {
				dst = append(dst, "σ"...)
			}
			changed = true
		case ok:
			dst = append(dst, m...)
			changed = true
		default:
			dst = append(dst, src[i:i+size]...)
		}
		i += size
	}
	return dst, changed
}

// finalSigma reports whether a capital sigma between before and after is in
// final position (Unicode Standard, Table 3-17, Final_Sigma).
func finalSigma(before, after []byte) bool {
	// Before: a cased letter, then zero or more case-ignorable ones.
	// A character may be both (e.g. U+02B0, Lm and Other_Lowercase).
	cased := false
	for len(before) > 0 {
		r, size := utf8.DecodeLastRune(before)
		before = before[:len(before)-size]
		if isCased(r) {
			cased = true
			break
		}
		if !caseIgnorable(r) {
			break
		}
	}
	if !cased {
		return false
	}
	// After: no cased letter once case-ignorable ones are skipped. A
	// character that is both counts as ignorable here, as
	// golang.org/x/text/cases decides.
	for len(after) > 0 {
		r, size := utf8.DecodeRune(after)
		after = after[size:]
		if !caseIgnorable(r) {
			return !isCased(r)
		}
	}
	return true
}

// isCased approximates the derived property Cased: Lowercase, Uppercase or
// Lt.
func isCased(r rune) bool {
	return unicode.IsLower(r) || unicode.IsUpper(r) || unicode.IsTitle(r) ||
		unicode.In(r, unicode.Other_Lowercase, unicode.Other_Uppercase)
}

// caseIgnorable approximates the derived property Case_Ignorable: general
// categories Mn, Me, Cf, Lm and Sk, and the word-break classes MidLetter,
// MidNumLet and Single_Quote.
func caseIgnorable(r rune) bool {
	switch r {
	case '\'', '.', ':', '\u00B7', '\u0387', '\u055F', '\u05F4', '\u2018', '\u2019', '\u2024', '\u2027', '\uFE13', '\uFE52', '\uFE55', '\uFF07', '\uFF0E', '\uFF1A':
		return true
	}
	return unicode.In(r, unicode.Mn, unicode.Me, unicode.Cf, unicode.Lm, unicode.Sk)
}
