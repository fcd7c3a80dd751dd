package ngram

import "strconv"

// Order is an n-gram's kind and length in one small integer, the order
// code stored with each vocabulary key: a word n-gram of n words is n, a
// character n-gram of n characters is 100+n.
type Order int

// MaxOrder is the largest Order (character n-grams of MaxCharOrder).
const MaxOrder = Order(charBase + MaxCharOrder)

const charBase = 100

// OrderOf returns the Order of n-grams of kind with n words or characters.
func OrderOf(kind Kind, n int) Order {
	if kind == Char {
		return Order(charBase + n)
	}
	return Order(n)
}

// Kind returns the order's kind.
func (o Order) Kind() Kind {
	if o > charBase {
		return Char
	}
	return Word
}

// Len returns the number of words or characters of the order's n-grams.
func (o Order) Len() int {
	if o > charBase {
		return int(o - charBase)
	}
	return int(o)
}

// Words returns the number of words of a word order, and whether o is
// one (1 to MaxWordOrder).
func (o Order) Words() (int, bool) { return int(o), o >= 1 && o <= MaxWordOrder }

// String names the order in reports: "w1", "w2", "c3", ...
func (o Order) String() string {
	if o.Kind() == Char {
		return "c" + strconv.Itoa(o.Len())
	}
	return "w" + strconv.Itoa(o.Len())
}
