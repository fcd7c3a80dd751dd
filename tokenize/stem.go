package tokenize

import (
	"fmt"
	"github.com/bowline/bowline/internal/wordpack"
	"strings"

	"github.com/kljensen/snowball/english"
	"github.com/kljensen/snowball/french"
	"github.com/kljensen/snowball/hungarian"
	"github.com/kljensen/snowball/norwegian"
	"github.com/kljensen/snowball/russian"
	"github.com/kljensen/snowball/spanish"
	"github.com/kljensen/snowball/swedish"
)

type stemLang struct {
	code, name string
	stem       func(word string, stemStopWords bool) string
}

// stemLangs lists every language of github.com/kljensen/snowball v0.10.0,
// sorted by code.
var stemLangs = []stemLang{
	{"en", "english", english.Stem},
	{"es", "spanish", spanish.Stem},
	{"fr", "french", french.Stem},
	{"hu", "hungarian", hungarian.Stem},
	{"no", "norwegian", norwegian.Stem},
	{"ru", "russian", russian.Stem},
	{"sv", "swedish", swedish.Stem},
}

// StemLanguages returns the language codes NewStemmer accepts, sorted:
// en, es, fr, hu, no, ru, sv.
func StemLanguages() []string {
	codes := make([]string, len(stemLangs))
	for i, l := range stemLangs {
		codes[i] = l.code
	}
	return codes
}

// DefaultStemCacheSize is the number of words a Stemmer remembers before it
// empties its cache and starts again.
const DefaultStemCacheSize = 1 << 16

// A Stemmer reduces tokens to their Snowball stems in one language. It
// remembers the stems of recent words, so it is not safe for concurrent use:
// use one per goroutine.
type Stemmer struct {
	lang  stemLang
	cache map[string][]byte // words longer than 16 bytes
	limit int
	// short caches words of at most 16 bytes in an open-addressing table
	// keyed by the packed bytes themselves, so that a hit hashes no
	// string; their stems live in arena.
	short  []stemSlot
	shift  uint // 64 - log2(len(short))
	nshort int
	arena  []byte
	// One is made per worker, next to the others: the padding keeps the
	// fields it writes for every token off their cache lines.
	_ [64]byte
}

// stemSlot is one cached short word: its bytes packed little-endian into
// lo and hi, its length, and where its stem lies in the arena.
type stemSlot struct {
	lo, hi uint64
	off    int32
	slen   uint16
	n      uint8 // 0 = empty
}

const stemTableSize = 2 * DefaultStemCacheSize // at most half full

// The short-word table starts at 2^minStemTableBits slots and doubles as
// it fills, up to stemTableSize: a table no larger than its words keeps
// the frequent ones in fewer cache lines, which matters most when several
// workers' tables share a cache.
const (
	minStemTableBits = 12
	minStemTable     = 1 << minStemTableBits
)

// growShort doubles the short-word table, placing every word again.
func (s *Stemmer) growShort() {
	old := s.short
	s.short = make([]stemSlot, 2*len(old))
	s.shift--
	mask := uint64(len(s.short) - 1)
	for _, e := range old {
		if e.n == 0 {
			continue
		}
		i := stemSlotOf(e.lo, e.hi, int(e.n), s.shift)
		for s.short[i].n != 0 {
			i = (i + 1) & mask
		}
		s.short[i] = e
	}
}

func packWord(b []byte) (lo, hi uint64) { return wordpack.Pack16(b) }

func stemSlotOf(lo, hi uint64, n int, shift uint) uint64 {
	return ((lo ^ hi*0x9e3779b97f4a7c15 ^ uint64(n)) * 0xff51afd7ed558ccd) >> shift
}

// entries is the number of words cached.
func (s *Stemmer) entries() int { return len(s.cache) + s.nshort }

// reset empties the cache. Stems returned earlier stay valid: the arena
// is replaced, not reused.
func (s *Stemmer) reset() {
	clear(s.cache)
	clear(s.short)
	s.nshort = 0
	s.arena = make([]byte, 0, 1<<16)
}

// NewStemmer returns a Stemmer for lang, given as a code from StemLanguages
// ("en") or as the language's English name ("english"), in any letter case.
func NewStemmer(lang string) (*Stemmer, error) {
	l := strings.ToLower(strings.TrimSpace(lang))
	for _, sl := range stemLangs {
		if l == sl.code || l == sl.name {
			return &Stemmer{lang: sl, cache: make(map[string][]byte), limit: DefaultStemCacheSize,
				short: make([]stemSlot, minStemTable), shift: 64 - minStemTableBits}, nil
		}
	}
	return nil, fmt.Errorf("tokenize: no stemmer for language %q (known: %s)", lang, strings.Join(StemLanguages(), ", "))
}

// Language returns the language code of s, as listed by StemLanguages.
func (s *Stemmer) Language() string { return s.lang.code }

// Stem returns the Snowball stem of tok. Stop words are stemmed like any
// other word, as the Snowball reference implementation does. For Russian,
// "ё" is read as "е" first, as Snowball 2.x does.
//
// The result belongs to the Stemmer and must not be modified. The Stemmer
// never writes to a slice it has returned, so the result stays valid for as
// long as the caller keeps it, even after the cache is emptied. A word seen
// before is answered from the cache without allocating; the cache holds at
// most DefaultStemCacheSize words and is emptied when full.
func (s *Stemmer) Stem(tok []byte) []byte {
	n := len(tok)
	var slot uint64
	var lo, hi uint64
	if n > 0 && n <= 16 {
		lo, hi = packWord(tok)
		mask := uint64(len(s.short) - 1)
		for slot = stemSlotOf(lo, hi, n, s.shift); ; slot = (slot + 1) & mask {
			e := &s.short[slot]
			if e.n == 0 {
				break
			}
			if e.lo == lo && e.hi == hi && int(e.n) == n {
				end := e.off + int32(e.slen)
				return s.arena[e.off:end:end]
			}
		}
	} else if st, ok := s.cache[string(tok)]; ok {
		return st
	}
	if s.entries() >= s.limit {
		s.reset()
		if n > 0 && n <= 16 {
			// The table was emptied: find the word's slot again.
			slot = stemSlotOf(lo, hi, n, s.shift)
		}
	}
	st := s.compute(tok)
	if n > 0 && n <= 16 && len(s.arena)+len(st) < 1<<31 && len(st) < 1<<16 {
		if 2*(s.nshort+1) > len(s.short) && len(s.short) < stemTableSize {
			s.growShort()
			mask := uint64(len(s.short) - 1)
			for slot = stemSlotOf(lo, hi, n, s.shift); s.short[slot].n != 0; slot = (slot + 1) & mask {
			}
		}
		off := len(s.arena)
		s.arena = append(s.arena, st...)
		s.short[slot] = stemSlot{lo: lo, hi: hi, n: uint8(n), off: int32(off), slen: uint16(len(st))}
		s.nshort++
		return s.arena[off : off+len(st) : off+len(st)]
	}
	s.cache[string(tok)] = st
	return st
}

// compute stems tok with the Snowball stemmer.
func (s *Stemmer) compute(tok []byte) []byte {
	w := string(tok)
	if s.lang.code == "ru" && strings.Contains(w, "ё") {
		// Snowball 2.x treats ё as е before stemming Russian;
		// kljensen/snowball v0.10.0 does not.
		w = strings.ReplaceAll(w, "ё", "е")
	}
	return []byte(s.lang.stem(w, true))
}
