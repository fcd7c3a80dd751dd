package ngram

import (
	"strconv"
	"unicode/utf8"
)

// Kind tells word n-grams from character n-grams.
type Kind uint8

// The kinds of n-gram.
const (
	Word Kind = iota // tokens joined by one space
	Char             // characters inside one boundary-marked token
)

// String returns "word" or "char".
func (k Kind) String() string {
	switch k {
	case Word:
		return "word"
	case Char:
		return "char"
	}
	return "Kind(" + strconv.Itoa(int(k)) + ")"
}

// CharPrefix starts every character n-gram key (after the caller's prefix).
// Tokens never contain '#', so a word key and a character key made of the
// same letters always differ.
const CharPrefix = '#'

// BoundaryStart and BoundaryEnd mark the start and end of each token before
// its character n-grams are taken, so that "<ca" (a word start) differs
// from "ca" inside a word.
const BoundaryStart, BoundaryEnd = '<', '>'

// A Builder forms the n-gram keys of documents. It keeps scratch space
// between calls, so it is not safe for concurrent use: use one per
// goroutine.
type Builder struct {
	c      Config
	key    []byte // the key being built
	marked []byte // BoundaryStart + token + BoundaryEnd
	starts []int  // byte offset of each rune in marked, plus len(marked)
	// One is made per worker, next to the others: the padding keeps the
	// fields it writes for every token off their cache lines.
	_ [64]byte
}

// NewBuilder returns a Builder for c. It panics if c.Validate fails;
// validate configurations from users first.
func NewBuilder(c Config) *Builder {
	if err := c.Validate(); err != nil {
		panic(err)
	}
	return &Builder{c: c}
}

// Emit calls fn for every feature key of one document, given the
// document's kept tokens in order. prefix (may be empty) is prepended to
// every key, for field prefixes such as "title|". key is valid only during
// the call to fn; fn must copy it to keep it. In steady state Emit does not
// allocate.
//
// The keys come in this order:
//
//  1. Word n-grams, for n = Words.Min through Words.Max, left to right: the
//     n tokens joined by one ASCII space. A document with fewer than n
//     tokens has no n-grams of order n.
//  2. Character n-grams, token by token: for each token, the marked token
//     BoundaryStart+token+BoundaryEnd of K characters (runes) gives, for
//     n = Chars.Min through Chars.Max, its K-n+1 substrings of n characters,
//     left to right, each key being CharPrefix followed by the substring.
//     When n > K, the whole marked token is emitted once in place of the
//     n-grams: with order Chars.Min if K < Chars.Min, and not again for
//     larger n when it was already emitted as the K-gram.
//
// o is the key's Order: its kind and n (the number of tokens or characters).
// Tokens are expected to be valid UTF-8; an invalid byte counts as one
// character.
func (b *Builder) Emit(prefix []byte, tokens [][]byte, fn func(key []byte, o Order)) {
	b.EmitFrom(prefix, tokens, 0, fn)
}

// Context is the number of tokens before a chunk that EmitFrom needs to
// form the word n-grams that reach into it: the largest word order less one.
func (b *Builder) Context() int {
	if b.c.Words.On() {
		return b.c.Words.Max - 1
	}
	return 0
}

// EmitFrom is Emit for the part of a long token stream that starts at
// tokens[from]: tokens before from are context only. It emits the word
// n-grams that end at or after from and the character n-grams of
// tokens[from:], so that a stream cut into chunks, each passed with the
// previous Context() tokens in front, yields exactly the keys of one Emit
// over the whole stream (in another order).
func (b *Builder) EmitFrom(prefix []byte, tokens [][]byte, from int, fn func(key []byte, o Order)) {
	if w := b.c.Words; w.On() {
		for n := w.Min; n <= w.Max && n <= len(tokens); n++ {
			for i := max(0, from-n+1); i+n <= len(tokens); i++ {
				fn(WordKey(&b.key, prefix, tokens[i:i+n]), Order(n))
			}
		}
	}
	b.EmitCharsFrom(prefix, tokens, from, fn)
}

// EmitCharsFrom emits only the character n-grams of EmitFrom: those of
// tokens[from:], in the same order. With a caller that forms word n-grams
// itself it lets both kinds come out as EmitFrom gives them.
func (b *Builder) EmitCharsFrom(prefix []byte, tokens [][]byte, from int, fn func(key []byte, o Order)) {
	if c := b.c.Chars; c.On() {
		for _, tok := range tokens[from:] {
			b.mark(tok)
			K := len(b.starts) - 1
			for n := c.Min; n <= c.Max; n++ {
				if n > K {
					if n == c.Min {
						b.emitChar(prefix, b.marked, n, fn)
					}
					break
				}
				for i := 0; i+n <= K; i++ {
					b.emitChar(prefix, b.marked[b.starts[i]:b.starts[i+n]], n, fn)
				}
			}
		}
	}
}

// WordKey returns the key of the word n-gram of tokens: prefix, then the
// tokens joined by one space. Without a prefix, and with the tokens lying
// that way in one array (see Joined), it is a slice of that array;
// otherwise it is built in *buf, whose storage is kept for the next key.
func WordKey(buf *[]byte, prefix []byte, tokens [][]byte) []byte {
	if len(prefix) == 0 {
		if k, ok := Joined(tokens); ok {
			return k
		}
	}
	k := append((*buf)[:0], prefix...)
	k = append(k, tokens[0]...)
	for _, t := range tokens[1:] {
		k = append(k, ' ')
		k = append(k, t...)
	}
	*buf = k
	return k
}

// Joined returns the tokens joined by one space without copying them, when
// they lie that way in one array (each token's slice reaching, within its
// capacity, over the space and the next token, as the tokens of bowline's
// analyzer do); ok is false otherwise. tokens must not be empty, nor any
// token.
func Joined(tokens [][]byte) (key []byte, ok bool) {
	first := tokens[0]
	if len(first) == 0 {
		return nil, false
	}
	full := first[:cap(first)]
	end := len(first)
	for _, t := range tokens[1:] {
		if len(t) == 0 || end+len(t) >= len(full) || full[end] != ' ' || &full[end+1] != &t[0] {
			return nil, false
		}
		end += 1 + len(t)
	}
	return full[:end], true
}

// mark fills b.marked with the boundary-marked token and b.starts with its
// rune offsets.
func (b *Builder) mark(tok []byte) {
	m := append(b.marked[:0], BoundaryStart)
	m = append(m, tok...)
	m = append(m, BoundaryEnd)
	s := b.starts[:0]
	for i := 0; i < len(m); {
		s = append(s, i)
		_, size := utf8.DecodeRune(m[i:])
		i += size
	}
	b.marked, b.starts = m, append(s, len(m))
}

func (b *Builder) emitChar(prefix, gram []byte, n int, fn func([]byte, Order)) {
	k := append(b.key[:0], prefix...)
	k = append(k, CharPrefix)
	k = append(k, gram...)
	b.key = k
	fn(k, OrderOf(Char, n))
}
