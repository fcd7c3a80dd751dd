package stopwords

import (
	"cmp"
	"github.com/bowline/bowline/internal/wordpack"
	"math/bits"
	"slices"
)

// A Set is a fixed set of normalized stop words. It is safe for concurrent
// use; a nil *Set is empty.
type Set struct {
	words []string         // sorted by bytes
	index map[string]int32 // word -> position in words
	// short is an open-addressing table of the words of at most 16
	// bytes, looked up without hashing a string: most tokens are short,
	// and every token of a run is looked up.
	short  []shortSlot
	shift  uint
	maxLen int
}

// shortSlot holds one short word packed into two little-endian words.
type shortSlot struct {
	lo, hi uint64
	n      int32 // length in bytes; 0 = empty slot
	pos    int32 // position in words
}

// pack loads up to 16 bytes into two little-endian words.
func pack(b []byte) (lo, hi uint64) { return wordpack.Pack16(b) }

func (s *Set) slot(lo, hi uint64, n int) uint64 {
	return ((lo ^ hi*0x9e3779b97f4a7c15 ^ uint64(n)) * 0xff51afd7ed558ccd) >> s.shift
}

// lookup returns the position of tok in words.
func (s *Set) lookup(tok []byte) (int32, bool) {
	n := len(tok)
	if n > s.maxLen {
		return 0, false
	}
	if n > 16 || s.short == nil {
		i, ok := s.index[string(tok)]
		return i, ok
	}
	lo, hi := pack(tok)
	mask := uint64(len(s.short) - 1)
	for i := s.slot(lo, hi, n); ; i = (i + 1) & mask {
		e := &s.short[i]
		if e.n == 0 {
			return 0, false
		}
		if e.lo == lo && e.hi == hi && int(e.n) == n {
			return e.pos, true
		}
	}
}

// buildShort fills the short-word table.
func (s *Set) buildShort() {
	size := 16
	for size < 4*len(s.words) {
		size *= 2
	}
	s.short = make([]shortSlot, size)
	s.shift = uint(64 - bits.TrailingZeros(uint(size)))
	mask := uint64(size - 1)
	for pos, w := range s.words {
		if len(w) > s.maxLen {
			s.maxLen = len(w)
		}
		if len(w) > 16 || len(w) == 0 {
			continue
		}
		lo, hi := pack([]byte(w))
		i := s.slot(lo, hi, len(w))
		for s.short[i].n != 0 {
			i = (i + 1) & mask
		}
		s.short[i] = shortSlot{lo: lo, hi: hi, n: int32(len(w)), pos: int32(pos)}
	}
}

// NewSet builds a set from words. normalize (may be nil) appends the
// normalized form of a word to dst and returns it; it must map words
// exactly as the tokenizer maps tokens, so that list entries and tokens
// meet. A word that normalizes to nothing is skipped; duplicates collapse.
//
// When keepNegations is true, negation words are left out of the set so
// that they stay in the token stream. Which words count as negations:
//
//   - A built-in language contributes when every word of its built-in list
//     (normalized) is among the words. The negation lists ([Negations]) of
//     all contributing languages are kept, even where a word is a plain stop
//     word in another language (with lists fi and fr, the Finnish negation
//     "et" keeps the French "et" too).
//   - When no built-in language contributes (a custom list only), a word is
//     kept when it is in some language's negation list and is not a plain,
//     non-negating word of any built-in list. So a custom English list keeps
//     "not", "nor" and "don't", but not "no", which the Portuguese list has
//     as a plain word, nor "en" or "et".
//
// Comparisons are made between normalized forms.
func NewSet(words []string, normalize func(dst, word []byte) []byte, keepNegations bool) *Set {
	var buf []byte
	norm := func(w string) string {
		if normalize == nil {
			return w
		}
		buf = normalize(buf[:0], []byte(w))
		return string(buf)
	}
	present := make(map[string]bool, len(words))
	for _, w := range words {
		if n := norm(w); n != "" {
			present[n] = true
		}
	}
	if keepNegations {
		for w := range negationsToKeep(present, norm) {
			delete(present, w)
		}
	}
	s := &Set{words: make([]string, 0, len(present)), index: make(map[string]int32, len(present))}
	for w := range present {
		s.words = append(s.words, w)
	}
	slices.Sort(s.words)
	for i, w := range s.words {
		s.index[w] = int32(i)
	}
	s.buildShort()
	return s
}

// negationsToKeep applies the rule documented on NewSet.
func negationsToKeep(present map[string]bool, norm func(string) string) map[string]bool {
	keep := make(map[string]bool)
	contributed := false
	for _, lang := range Languages() {
		l := builtins()[lang]
		all, some := true, false
		for _, w := range l.words {
			if n := norm(w); n != "" {
				some = true
				if !present[n] {
					all = false
					break
				}
			}
		}
		if all && some {
			contributed = true
			for _, w := range l.negations {
				if n := norm(w); n != "" {
					keep[n] = true
				}
			}
		}
	}
	if contributed {
		return keep
	}
	plain := make(map[string]bool)
	for _, lang := range Languages() {
		l := builtins()[lang]
		neg := make(map[string]bool, len(l.negations))
		for _, w := range l.negations {
			if n := norm(w); n != "" {
				neg[n] = true
				keep[n] = true
			}
		}
		for _, w := range l.words {
			if n := norm(w); !neg[n] {
				plain[n] = true
			}
		}
	}
	for w := range plain {
		delete(keep, w)
	}
	return keep
}

// Contains reports whether tok (already normalized) is in the set.
// It does not allocate.
func (s *Set) Contains(tok []byte) bool {
	if s == nil {
		return false
	}
	_, ok := s.lookup(tok)
	return ok
}

// Len returns the number of words in the set.
func (s *Set) Len() int {
	if s == nil {
		return 0
	}
	return len(s.words)
}

// Words returns the set's words sorted by bytes.
func (s *Set) Words() []string {
	if s == nil {
		return nil
	}
	return slices.Clone(s.words)
}

// A WordCount is a stop word and the number of tokens dropped as it.
type WordCount struct {
	Word  string
	Count int64
}

// A Filter drops stop words from a token stream and counts what it drops.
// A Filter is not safe for concurrent use: give each goroutine its own and
// combine them with Merge.
type Filter struct {
	_      cacheLinePad
	set    *Set
	counts []int64 // per word of set, in set order
	total  int64   // tokens dropped
	seen   int64   // tokens looked at
	_      cacheLinePad
}

// cacheLinePad keeps the counters of one goroutine's Filter off the cache
// lines of another's: filters are small and made together, one per
// worker, and a counter written for every token on a line shared with
// another worker's costs both of them the line each time.
type cacheLinePad [64]byte

// NewFilter returns a Filter for s with zero counts.
func (s *Set) NewFilter() *Filter {
	return &Filter{set: s, counts: make([]int64, s.Len())}
}

// Drop reports whether tok is a stop word and, if so, counts it.
// It does not allocate.
func (f *Filter) Drop(tok []byte) bool {
	f.seen++
	if f.set == nil {
		return false
	}
	i, ok := f.set.lookup(tok)
	if ok {
		f.counts[i]++
		f.total++
	}
	return ok
}

// Total returns the number of tokens dropped.
func (f *Filter) Total() int64 { return f.total }

// Seen returns the number of tokens passed to Drop, dropped or not.
func (f *Filter) Seen() int64 { return f.seen }

// Dropped returns the words dropped at least once with their counts,
// sorted by count (highest first), then by word.
func (f *Filter) Dropped() []WordCount {
	var out []WordCount
	for i, c := range f.counts {
		if c > 0 {
			out = append(out, WordCount{f.set.words[i], c})
		}
	}
	slices.SortFunc(out, func(a, b WordCount) int {
		if c := cmp.Compare(b.Count, a.Count); c != 0 {
			return c
		}
		return cmp.Compare(a.Word, b.Word)
	})
	return out
}

// Merge adds the counts of o to f. Both must come from the same Set;
// Merge panics otherwise.
func (f *Filter) Merge(o *Filter) {
	if f.set != o.set {
		panic("stopwords: Merge of filters from different sets")
	}
	for i, c := range o.counts {
		f.counts[i] += c
	}
	f.total += o.total
	f.seen += o.seen
}
