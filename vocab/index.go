package vocab

import (
	"errors"
	"fmt"
	"github.com/bowline/bowline/internal/wordpack"
	"math"
	"runtime"
	"strings"

	"github.com/bowline/bowline/internal/hugemem"
)

// Index finds the columns of vocabulary keys without building key
// strings for word n-grams: a word unigram is found through the id of its
// word and a word bigram through the pair of ids of its words, so a
// document's tokens are each looked up once, and a bigram costs one probe
// of an integer table. Other keys (character n-grams, word n-grams of three
// or more words) are found by their bytes.
//
// An Index relies on what bowline's keys are made of: a word n-gram key is
// a field prefix followed by its tokens joined by one space, and tokens
// hold no space and no '|' (UAX #29 words never do). It is safe for
// concurrent use once built.
type Index struct {
	prefixes []string         // field prefixes, in field order ("" for one unprefixed field)
	short    pairTable        // words of up to 8 bytes, packed (see pack8) -> id
	medium   wordTable        // words of 9 to 16 bytes, packed in two words -> id
	words    map[string]int32 // longer words of word unigram and bigram keys -> id
	nwords   int
	uni      []int32          // [field*nwords + id] -> column, or -1
	pairs    pairTable        // pairKey(field, id1, id2) -> column
	packed   packedPairs      // the same in 8 bytes a pair, when it fits
	rest     map[string]int32 // every other key -> column
	odd      bool             // rest holds word unigram or bigram keys
}

// maxIndexWords and maxIndexFields bound what pairKey can pack.
const (
	maxIndexWords  = 1<<28 - 1
	maxIndexFields = 1 << 8
)

// NewIndex indexes the columns keys (with their order codes, a parallel
// slice) for documents whose text fields carry the given key prefixes (one
// per field, in order; nil or {""} for a single field without prefix).
// wordCode tells whether an order code is that of a word n-gram and of how
// many words (bowline: codes 1 to 16). A key given twice is an error.
func NewIndex(keys []string, orders []int, prefixes []string, wordCode func(code int) (n int, ok bool)) (*Index, error) {
	if len(orders) != len(keys) {
		return nil, fmt.Errorf("vocab: %d keys but %d order codes", len(keys), len(orders))
	}
	if len(keys) > math.MaxInt32 {
		return nil, errors.New("vocab: more than 2^31-1 terms")
	}
	if len(prefixes) == 0 {
		prefixes = []string{""}
	}
	x := &Index{prefixes: prefixes, words: map[string]int32{}, rest: map[string]int32{}}
	dup := func(key string, col int) error {
		return fmt.Errorf("vocab: term %d: key %q appears twice", col, key)
	}
	type pending struct { // 16 bytes: there is one per key
		field int32
		a, b  int32 // word ids; b is -1 for a unigram
		col   int32
	}
	found := make([]pending, 0, len(keys))
	split := len(prefixes) <= maxIndexFields
	for col, key := range keys {
		n, ok := wordCode(orders[col])
		placed := false
		if ok && split && (n == 1 || n == 2) {
			for f, p := range prefixes {
				if len(key) < len(p) || key[:len(p)] != p {
					continue
				}
				w := key[len(p):]
				var w1, w2 string
				if n == 1 {
					w1 = w
				} else {
					i := strings.IndexByte(w, ' ')
					if i < 0 {
						continue
					}
					w1, w2 = w[:i], w[i+1:]
				}
				if !plainWord(w1) || n == 2 && !plainWord(w2) {
					continue
				}
				a := x.wordID(w1)
				b := int32(-1)
				if n == 2 {
					b = x.wordID(w2)
				}
				found = append(found, pending{int32(f), a, b, int32(col)})
				placed = true
			}
		}
		if !placed {
			if _, ok := x.rest[key]; ok {
				return nil, dup(key, col)
			}
			x.rest[key] = int32(col)
			x.odd = x.odd || ok && (n == 1 || n == 2)
		}
	}
	if x.nwords > maxIndexWords {
		// Too many words to pack: look everything up by its bytes.
		x.words, x.short, x.medium, x.nwords, x.uni = map[string]int32{}, pairTable{}, wordTable{}, 0, nil
		for col, key := range keys {
			if _, ok := x.rest[key]; ok {
				return nil, dup(key, col)
			}
			x.rest[key] = int32(col)
		}
		return x, nil
	}
	x.uni = make([]int32, len(prefixes)*x.nwords)
	for i := range x.uni {
		x.uni[i] = -1
	}
	npairs := 0
	for _, p := range found {
		if p.b >= 0 {
			npairs++
		}
	}
	pack := len(prefixes) == 1 && x.nwords < packedMaxWords && len(keys) < packedMaxCols
	if pack {
		x.packed.init(npairs)
	} else {
		x.pairs.init(npairs)
	}
	for _, p := range found {
		if p.b < 0 {
			u := &x.uni[int(p.field)*x.nwords+int(p.a)]
			if *u >= 0 {
				return nil, dup(keys[p.col], int(p.col))
			}
			*u = p.col
			continue
		}
		added := false
		if pack {
			added = x.packed.insert(p.a, p.b, p.col)
		} else {
			added = x.pairs.Insert(pairKey(int(p.field), p.a, p.b), p.col)
		}
		if !added {
			return nil, dup(keys[p.col], int(p.col))
		}
	}
	// The tables may live outside the Go heap: give them back with x.
	runtime.AddCleanup(x, func(t [2]pairTable) { t[0].Free(); t[1].Free() }, [2]pairTable{x.short, x.pairs})
	runtime.AddCleanup(x, func(p []uint64) { hugemem.Free(p) }, x.packed.slots)
	return x, nil
}

// plainWord reports whether w can be a token: not empty, no space, no '|'
// and no NUL (the tokenizer turns NUL into a space; packed words are told
// apart by their zero padding).
func plainWord(w string) bool {
	if w == "" {
		return false
	}
	for i := 0; i < len(w); i++ {
		if w[i] == ' ' || w[i] == '|' || w[i] == 0 {
			return false
		}
	}
	return true
}

func (x *Index) wordID(w string) int32 {
	if len(w) <= 8 {
		k := pack8(w)
		if id, ok := x.short.Get(k); ok {
			return id
		}
		id := x.newID()
		x.short.Insert(k, id)
		return id
	}
	if len(w) <= 16 {
		lo, hi := wordpack.Pack16String(w)
		if id, ok := x.medium.get(lo, hi); ok {
			return id
		}
		id := x.newID()
		x.medium.insert(lo, hi, id)
		return id
	}
	if id, ok := x.words[w]; ok {
		return id
	}
	id := x.newID()
	x.words[w] = id
	return id
}

func (x *Index) newID() int32 {
	id := int32(x.nwords)
	if x.nwords < math.MaxInt32 {
		x.nwords++
	}
	return id
}

// pack8 packs a word of 1 to 8 bytes into a non-zero integer (see
// internal/wordpack).
func pack8(w string) uint64 { return wordpack.Pack8String(w) }

// packToken is pack8 for a token.
func packToken(w []byte) uint64 { return wordpack.Pack8(w) }

// Word returns the id of a token, or -1 when no word unigram or bigram key
// of the vocabulary holds it (then no such key holds the token). It does
// not allocate.
func (x *Index) Word(tok []byte) int32 {
	if len(tok) <= 8 {
		if len(tok) == 0 {
			return -1
		}
		if id, ok := x.short.Get(packToken(tok)); ok {
			return id
		}
		return -1
	}
	if len(tok) <= 16 {
		if id, ok := x.medium.get(wordpack.Pack16(tok)); ok {
			return id
		}
		return -1
	}
	if id, ok := x.words[string(tok)]; ok {
		return id
	}
	return -1
}

// wordTable maps words of 9 to 16 bytes, packed into two words (see
// internal/wordpack; the second is not 0), to ids: an open-addressing
// table with linear probing, at most half full, in the Go heap (it holds
// the distinct words of the vocabulary's unigram and bigram keys, tens of
// thousands). A Go map of strings costs three times as much per lookup,
// in hashing the token and comparing its bytes.
type wordTable struct {
	slots []wordSlot
	shift uint
	n     int
}

type wordSlot struct {
	lo, hi uint64 // hi == 0: empty
	id     int32
}

func (t *wordTable) home(lo, hi uint64) int {
	return int(((lo ^ hi*0x9E3779B97F4A7C15) * 0xff51afd7ed558ccd) >> t.shift)
}

func (t *wordTable) get(lo, hi uint64) (int32, bool) {
	if t.slots == nil {
		return 0, false
	}
	mask := len(t.slots) - 1
	for i := t.home(lo, hi); ; i = (i + 1) & mask {
		s := &t.slots[i]
		if s.lo == lo && s.hi == hi {
			return s.id, true
		}
		if s.hi == 0 {
			return 0, false
		}
	}
}

// insert adds a word that is not in the table (hi != 0).
func (t *wordTable) insert(lo, hi uint64, id int32) {
	if 2*(t.n+1) > len(t.slots) {
		old := t.slots
		size := max(64, 2*len(old))
		t.slots = make([]wordSlot, size)
		t.shift = uint(64 - log2(size))
		t.n = 0
		for _, s := range old {
			if s.hi != 0 {
				t.insert(s.lo, s.hi, s.id)
			}
		}
	}
	mask := len(t.slots) - 1
	i := t.home(lo, hi)
	for t.slots[i].hi != 0 {
		i = (i + 1) & mask
	}
	t.slots[i] = wordSlot{lo, hi, id}
	t.n++
}

// Unigram returns the column of the word unigram of field with word id
// (from Word), or -1 when there is none (always for id -1).
func (x *Index) Unigram(field int, id int32) int32 {
	if id < 0 {
		return -1
	}
	return x.uni[field*x.nwords+int(id)]
}

// Bigram returns the column of the word bigram of field with word ids a, b
// (from Word), or -1 when there is none (always when a or b is -1).
func (x *Index) Bigram(field int, a, b int32) int32 {
	if a < 0 || b < 0 {
		return -1
	}
	if x.packed.slots != nil {
		return x.packed.get(a, b)
	}
	if c, ok := x.pairs.Get(pairKey(field, a, b)); ok {
		return c
	}
	return -1
}

// packedPairs maps the word-id pairs of one field to columns in one 64-bit
// word a pair: the pair's 40 bits above the column's 24, open addressing
// with linear probing, at most half full. Half the size of a pairTable,
// it keeps more of a large vocabulary's bigrams in the cache.
type packedPairs struct {
	slots []uint64
	shift uint
}

// Limits of packedPairs: word ids below 2^20-1, columns below 2^24.
const (
	packedMaxWords = 1<<20 - 1
	packedMaxCols  = 1 << 24
)

func packedKey(a, b int32) uint64 { return uint64(a+1)<<20 | uint64(b+1) }

func (p *packedPairs) home(k uint64) int {
	return int((k * 0x9E3779B97F4A7C15) >> p.shift)
}

// init sizes p for n pairs.
func (p *packedPairs) init(n int) {
	size := tableSize(n)
	p.slots = hugemem.Make[uint64](size)
	p.shift = uint(64 - log2(size))
}

// insert adds the pair a, b with its column unless it is there already;
// it reports whether it added it.
func (p *packedPairs) insert(a, b, col int32) bool {
	k := packedKey(a, b)
	mask := len(p.slots) - 1
	i := p.home(k)
	for ; p.slots[i] != 0; i = (i + 1) & mask {
		if p.slots[i]>>24 == k {
			return false
		}
	}
	p.slots[i] = k<<24 | uint64(col)
	return true
}

func (p *packedPairs) get(a, b int32) int32 {
	k := packedKey(a, b)
	mask := len(p.slots) - 1
	for i := p.home(k); ; i = (i + 1) & mask {
		e := p.slots[i]
		if e>>24 == k {
			return int32(e & (1<<24 - 1))
		}
		if e == 0 {
			return -1
		}
	}
}

// Lookup returns the column of a key that Unigram and Bigram do not find:
// a character n-gram or a word n-gram of three or more words (any key for
// an Index too large to pack word ids). It does not allocate.
func (x *Index) Lookup(key []byte) (int, bool) {
	c, ok := x.rest[string(key)]
	return int(c), ok
}

// OddWordKeys reports whether some word unigram or bigram keys could not
// be split into words (a prefix matching no field, a word with a space):
// Lookup finds those, so a caller must try Lookup when Unigram or Bigram
// find nothing.
func (x *Index) OddWordKeys() bool { return x.odd }

// Packed reports whether word unigrams and bigrams are looked up through
// word ids (false only for vocabularies of more than 2^28 words or more
// than 256 fields, where Lookup finds every key).
func (x *Index) Packed() bool { return x.uni != nil }

// pairKey packs a field (below 256) and two word ids (below 2^28) into the
// key of a pairTable. It is never 0.
func pairKey(field int, a, b int32) uint64 {
	return uint64(field)<<56 | uint64(a+1)<<28 | uint64(b+1)
}

// pairTable maps non-zero 64-bit keys to int32 values: an open-addressing
// table with linear probing, at most half full. Keys and values sit side by
// side, so a probe costs one cache line.
type pairTable struct {
	slots []pairSlot
	shift uint
	n     int
}

type pairSlot struct {
	key uint64
	val int32
}

// init sizes the table for n keys.
func (t *pairTable) init(n int) {
	size := tableSize(n)
	t.slots = hugemem.Make[pairSlot](size)
	t.shift = uint(64 - log2(size))
	t.n = 0
}

// Len returns the number of keys.
func (t *pairTable) Len() int { return t.n }

func (t *pairTable) home(k uint64) int {
	return int((k * 0x9E3779B97F4A7C15) >> t.shift)
}

// Get returns the value of k and whether k is in the table.
func (t *pairTable) Get(k uint64) (int32, bool) {
	if t.slots == nil {
		return 0, false
	}
	mask := len(t.slots) - 1
	for i := t.home(k); ; i = (i + 1) & mask {
		s := &t.slots[i]
		if s.key == k {
			return s.val, true
		}
		if s.key == 0 {
			return 0, false
		}
	}
}

// Insert adds k (not 0) with value v unless k is in the table already; it
// reports whether it added k. The table grows as needed.
func (t *pairTable) Insert(k uint64, v int32) bool {
	if t.slots == nil || 2*(t.n+1) > len(t.slots) {
		t.grow()
	}
	mask := len(t.slots) - 1
	for i := t.home(k); ; i = (i + 1) & mask {
		s := &t.slots[i]
		if s.key == k {
			return false
		}
		if s.key == 0 {
			s.key, s.val = k, v
			t.n++
			return true
		}
	}
}

func (t *pairTable) grow() {
	old := t.slots
	n := t.n
	t.init(max(8, 2*n))
	for _, s := range old {
		if s.key != 0 {
			t.Insert(s.key, s.val)
		}
	}
	hugemem.Free(old)
}

// Free gives the table's memory back (large tables live outside the Go
// heap, see internal/hugemem) and leaves it empty.
func (t *pairTable) Free() {
	hugemem.Free(t.slots)
	*t = pairTable{}
}

// tableSize is the number of slots of an open-addressing table for n keys:
// a power of two, at least 16, at most half full.
func tableSize(n int) int {
	size := 16
	for size < 2*n {
		size <<= 1
	}
	return size
}

func log2(n int) int {
	k := 0
	for 1<<k < n {
		k++
	}
	return k
}
