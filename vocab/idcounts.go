package vocab

import (
	"github.com/bowline/bowline/internal/wordpack"
	"math"
	"slices"
	"sync"
	"unsafe"

	"github.com/bowline/bowline/internal/hugemem"
)

// IDCounts counts word unigrams and bigrams by the ids of their words, so
// that counting a token costs one lookup of the word and one probe of an
// integer table per n-gram, with no key built. It keeps the figures Counts
// keeps (occurrences, documents) and hands them over to a Counts, as keys,
// with AddTo. Keys are formed as bowline forms them: the field's prefix,
// then the words joined by one space; like Index, it relies on tokens
// holding no space and no '|'.
//
// IDCounts is not safe for concurrent use; give each goroutine its own and
// combine them with Merge.
type IDCounts struct {
	prefixes []string
	short    pairTable        // words of up to 8 bytes, packed -> id
	medium   wordTable        // words of 9 to 16 bytes, packed -> id
	long     map[string]int32 // longer words -> id
	text     []byte           // word bytes, one after another
	ends     []uint32         // word id i is text[ends[i-1]:ends[i]]
	slots    []idSlot         // open addressing on pairKey
	shift    uint
	n        int
	serial   int64     // current document
	buf      []idEntry // added, not yet counted in slots
	// One is made per worker, next to the others: the padding keeps the
	// fields it writes for every token off their cache lines.
	_ [64]byte
}

// idEntry is one occurrence waiting in the buffer: its key and document.
type idEntry struct {
	key, serial uint64
}

// idBuffer is how many occurrences an IDCounts buffers before counting
// them in its table: the probes of a buffer run in one tight loop, where
// the processor overlaps their cache misses, instead of one at a time
// between the tokenizer's work.
const idBuffer = 4096

// idSlot is one counted key: a word unigram (pairKey with b = -1) or
// bigram, its occurrences, documents, and the last document counted.
type idSlot struct {
	key               uint64
	count, docs, last int64
}

// maxIDWords is the most words an IDCounts gives ids to (pairKey packs ids
// below 2^28); later words get none and their keys must be counted by
// bytes.
const maxIDWords = maxIndexWords

// MaxIDFields is the most text fields an IDCounts tells apart.
const MaxIDFields = maxIndexFields

// NewIDCounts returns empty counts for documents whose text fields carry
// the given key prefixes (one per field; nil or {""} for one field without
// prefix). It panics with more than MaxIDFields prefixes.
func NewIDCounts(prefixes []string) *IDCounts {
	if len(prefixes) == 0 {
		prefixes = []string{""}
	}
	if len(prefixes) > MaxIDFields {
		panic("vocab: too many fields for IDCounts")
	}
	c := &IDCounts{prefixes: prefixes, long: map[string]int32{}}
	c.init(1 << 10)
	return c
}

func (c *IDCounts) init(size int) {
	hugemem.Free(c.slots)
	c.slots = hugemem.Make[idSlot](size)
	c.shift = uint(64 - log2(size))
	c.n = 0
}

// Word returns the id of a token, giving it one if it has none; -1 when
// the counts hold maxIDWords words already (count the token's keys by
// bytes then).
func (c *IDCounts) Word(tok []byte) int32 {
	if len(tok) <= 8 {
		if len(tok) == 0 {
			return -1
		}
		k := packToken(tok)
		if id, ok := c.short.Get(k); ok {
			return id
		}
		id := c.newWord(tok)
		if id >= 0 {
			c.short.Insert(k, id)
		}
		return id
	}
	if len(tok) <= 16 {
		lo, hi := wordpack.Pack16(tok)
		if id, ok := c.medium.get(lo, hi); ok {
			return id
		}
		id := c.newWord(tok)
		if id >= 0 {
			c.medium.insert(lo, hi, id)
		}
		return id
	}
	if id, ok := c.long[string(tok)]; ok {
		return id
	}
	id := c.newWord(tok)
	if id >= 0 {
		c.long[string(tok)] = id
	}
	return id
}

func (c *IDCounts) newWord(tok []byte) int32 {
	if len(c.ends) >= maxIDWords || len(c.text)+len(tok) > math.MaxUint32 {
		return -1
	}
	c.text = append(c.text, tok...)
	c.ends = append(c.ends, uint32(len(c.text)))
	return int32(len(c.ends) - 1)
}

// word returns the bytes of word id.
func (c *IDCounts) word(id int32) []byte {
	start := uint32(0)
	if id > 0 {
		start = c.ends[id-1]
	}
	return c.text[start:c.ends[id]]
}

// Len returns the number of distinct keys counted.
func (c *IDCounts) Len() int {
	c.flush()
	return c.n
}

// Add records one occurrence of the unigram of word a (b = -1) or the
// bigram of words a, b, in field, in the current document. a and b are
// ids from Word, not -1 (except b for a unigram).
func (c *IDCounts) Add(field int, a, b int32) {
	c.buf = append(c.buf, idEntry{pairKey(field, a, b), uint64(c.serial)})
	if len(c.buf) >= idBuffer {
		c.flush()
	}
}

// flush counts the buffered occurrences.
func (c *IDCounts) flush() {
	if len(c.buf) == 0 {
		return
	}
	// At most two thirds full: slots are 32 bytes, and memory touched for
	// the first time is slow.
	for 3*(c.n+len(c.buf)) > 2*len(c.slots) {
		c.grow()
	}
	mask := len(c.slots) - 1
	slots := c.slots
	for _, e := range c.buf {
		i := int((e.key * 0x9E3779B97F4A7C15) >> c.shift)
		for slots[i].key != e.key && slots[i].key != 0 {
			i = (i + 1) & mask
		}
		s := &slots[i]
		if s.key == 0 {
			s.key, s.count, s.docs, s.last = e.key, 1, 1, int64(e.serial)
			c.n++
			continue
		}
		s.count++
		if s.last != int64(e.serial) {
			s.last = int64(e.serial)
			s.docs++
		}
	}
	c.buf = c.buf[:0]
}

// addCounted adds count occurrences in docs documents other than c's own.
func (c *IDCounts) addCounted(key uint64, count, docs int64) {
	c.flush()
	s, fresh := c.slot(key)
	if fresh {
		s.last = -1
	}
	s.count += count
	s.docs += docs
}

// slot returns the slot of key, claiming an empty one (fresh) if key is
// new. The pointer is valid until the next call.
func (c *IDCounts) slot(key uint64) (s *idSlot, fresh bool) {
	if 3*(c.n+1) > 2*len(c.slots) {
		c.grow()
	}
	mask := len(c.slots) - 1
	for i := int((key * 0x9E3779B97F4A7C15) >> c.shift); ; i = (i + 1) & mask {
		s := &c.slots[i]
		if s.key == key {
			return s, false
		}
		if s.key == 0 {
			s.key = key
			c.n++
			return s, true
		}
	}
}

func (c *IDCounts) grow() {
	old := c.slots
	c.slots = nil
	defer hugemem.Free(old)
	c.init(2 * len(old))
	mask := len(c.slots) - 1
	for _, s := range old {
		if s.key == 0 {
			continue
		}
		i := int((s.key * 0x9E3779B97F4A7C15) >> c.shift)
		for c.slots[i].key != 0 {
			i = (i + 1) & mask
		}
		c.slots[i] = s
		c.n++
	}
}

// EndDoc closes the current document.
func (c *IDCounts) EndDoc() { c.serial++ }

// Merge adds o's counts to c (o's documents are other documents than c's)
// and empties o. Words new to c get ids in c; a key whose words cannot get
// one is added to spill, by bytes, instead.
func (c *IDCounts) Merge(o *IDCounts, spill *Counts) {
	c.flush()
	o.flush()
	remap := make([]int32, len(o.ends))
	for id := range remap {
		remap[id] = c.Word(o.word(int32(id)))
	}
	var key []byte
	for _, s := range o.slots {
		if s.key == 0 {
			continue
		}
		field, a, b := unpackPair(s.key)
		na := remap[a]
		nb := int32(-1)
		if b >= 0 {
			nb = remap[b]
		}
		if na < 0 || b >= 0 && nb < 0 {
			key = o.appendKey(key[:0], field, a, b)
			spill.addCounted(string(key), order(b), s.count, s.docs)
			continue
		}
		c.addCounted(pairKey(field, na, nb), s.count, s.docs)
	}
	o.init(1 << 10)
}

// unpackPair reverses pairKey.
func unpackPair(k uint64) (field int, a, b int32) {
	return int(k >> 56), int32(k>>28&(1<<28-1)) - 1, int32(k&(1<<28-1)) - 1
}

func order(b int32) int {
	if b < 0 {
		return 1
	}
	return 2
}

func (c *IDCounts) appendKey(dst []byte, field int, a, b int32) []byte {
	dst = append(dst, c.prefixes[field]...)
	dst = append(dst, c.word(a)...)
	if b >= 0 {
		dst = append(dst, ' ')
		dst = append(dst, c.word(b)...)
	}
	return dst
}

// AddTo adds every key counted to dst, by bytes, with order code 1 for a
// unigram and 2 for a bigram (as if dst had counted the same documents),
// and empties c. dst's document total is not changed. dst must not hold
// the keys already: the keys an IDCounts counts (words with ids) and those
// its owner counts by bytes (other keys) are apart.
func (c *IDCounts) AddTo(dst *Counts) {
	c.flush()
	if c.n == 0 {
		c.init(1 << 10)
		return
	}
	if dst.b != nil {
		panic("vocab: adding counted keys to bounded counts")
	}
	if len(dst.keys)+c.n > math.MaxInt32 {
		panic("vocab: more than 2^31-1 distinct keys")
	}
	// The keys go to the end of dst's slices, in slot order; two
	// goroutines write them, each for half the table.
	base := len(dst.keys)
	dst.keys = slices.Grow(dst.keys, c.n)[:base+c.n]
	dst.stats = slices.Grow(dst.stats, c.n)[:base+c.n]
	half := len(c.slots) / 2
	before := 0 // keys in the first half
	for _, s := range c.slots[:half] {
		if s.key != 0 {
			before++
		}
	}
	var wg sync.WaitGroup
	wg.Add(1)
	go func() {
		defer wg.Done()
		c.materialize(c.slots[:half], dst.keys[base:base+before], dst.stats[base:base+before])
	}()
	c.materialize(c.slots[half:], dst.keys[base+before:base+c.n], dst.stats[base+before:base+c.n])
	wg.Wait()
	dst.lazy += c.n
	c.init(1 << 10)
}

// materialize writes the keys and figures of the used slots into keys and
// stats (as many as there are used slots). The keys are slices of one
// string.
func (c *IDCounts) materialize(slots []idSlot, keys []string, stats []stat) {
	size := 0
	for _, s := range slots {
		if s.key != 0 {
			field, a, b := unpackPair(s.key)
			size += len(c.prefixes[field]) + len(c.word(a))
			if b >= 0 {
				size += 1 + len(c.word(b))
			}
		}
	}
	if size == 0 {
		return
	}
	buf := make([]byte, 0, size)
	j := 0
	for _, s := range slots {
		if s.key == 0 {
			continue
		}
		field, a, b := unpackPair(s.key)
		start := len(buf)
		buf = c.appendKey(buf, field, a, b)
		// buf does not move (its capacity is exact) and is not written
		// again: the keys can be slices of it as it is.
		keys[j] = unsafe.String(&buf[start], len(buf)-start)
		stats[j] = stat{count: s.count, docs: s.docs, last: -1, order: int32(order(b))}
		j++
	}
}
