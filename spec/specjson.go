package spec

import (
	"bytes"
	"encoding/json"
	"math"
	"strconv"
	"sync"
	"sync/atomic"
	"unicode/utf8"
	"unsafe"
)

// This file is Read's fast path. A spec's content is mostly a few large
// arrays (vocabulary keys, orders and document counts, idf values);
// decoding them with encoding/json costs a scan of the whole file for the
// envelope, another for the content and reflection per element. fastDecode
// walks the file once, parses those arrays by hand and hands every other
// value to encoding/json.
//
// The fast path never decides anything on its own: it either produces
// exactly what Read's encoding/json path would (same envelope, same
// Content, compared with reflect.DeepEqual in the tests and the fuzz
// target FuzzFastDecode), or it gives up, and Read then runs the
// encoding/json path, which reports its own errors. It gives up on
// anything outside the plain shape bowline writes: a field name that is
// not spelled exactly as its tag (encoding/json would also match it
// case-insensitively, or refuse it as unknown), a field given twice
// (encoding/json would merge or overwrite), an envelope whose content is
// not an object, and any value encoding/json refuses. Within the large
// arrays, an element the hand parser does not take (null, a number with a
// fraction where an integer is wanted, bad syntax) hands the whole array to
// encoding/json.

// fastDecode decodes a spec file's bytes as Read's encoding/json path
// does: the envelope (unknown fields refused; bytes after the envelope's
// closing brace ignored, as json.Decoder does) and its content (unknown
// fields refused). ok is false when it gives up; fl and c are then
// meaningless. The strings of c may share data's bytes, so data must not
// change afterwards.
func fastDecode(data []byte) (fl fileLayout, c Content, ok bool) {
	d := &jsonScan{b: data, async: new(asyncDecode)}
	defer func() {
		// Arrays decoded on other goroutines must be done, and done well.
		d.async.wg.Wait()
		ok = ok && !d.async.failed.Load()
	}()
	var seen fieldSet
	ok = d.object(func(name []byte) bool {
		if !seen.first(name) {
			return false
		}
		switch string(name) {
		case "schema":
			return d.delegate(&fl.Schema)
		case "tool":
			return d.delegate(&fl.Tool)
		case "fingerprint":
			return d.delegate(&fl.Fingerprint)
		case "parent":
			return d.delegate(&fl.Parent)
		case "content":
			start := d.i
			if !d.content(&c) {
				return false
			}
			fl.Content = data[start:d.i:d.i]
			return true
		}
		return false
	})
	return fl, c, ok
}

// jsonScan is a position in JSON text.
type jsonScan struct {
	b []byte
	i int
	// async, when not nil, lets a large array of strings (the vocabulary's
	// keys) be decoded on its own goroutine while the scan goes on past
	// it, so that the keys and the integer arrays after them are parsed at
	// the same time.
	async *asyncDecode
}

// asyncDecode tracks the arrays a scan handed to other goroutines.
type asyncDecode struct {
	wg     sync.WaitGroup
	failed atomic.Bool // an array was not decoded where its scan expected
}

// asyncMinStrings is the smallest array of strings decoded on its own
// goroutine (a variable so that the tests can send every array there).
var asyncMinStrings = 1 << 14

// ws skips JSON white space.
func (d *jsonScan) ws() {
	for d.i < len(d.b) {
		switch d.b[d.i] {
		case ' ', '\t', '\n', '\r':
			d.i++
		default:
			return
		}
	}
}

// eat skips white space and then c, reporting whether c was there.
func (d *jsonScan) eat(c byte) bool {
	d.ws()
	if d.i < len(d.b) && d.b[d.i] == c {
		d.i++
		return true
	}
	return false
}

// peek skips white space and returns the next byte (0 at the end).
func (d *jsonScan) peek() byte {
	d.ws()
	if d.i < len(d.b) {
		return d.b[d.i]
	}
	return 0
}

// object parses an object, calling member with each field name (without
// quotes, which must hold no escape) once the scan stands at its value;
// member parses the value.
func (d *jsonScan) object(member func(name []byte) bool) bool {
	if !d.eat('{') {
		return false
	}
	if d.eat('}') {
		return true
	}
	for {
		if !d.eat('"') {
			return false
		}
		start := d.i
		for d.i < len(d.b) && d.b[d.i] != '"' {
			if c := d.b[d.i]; c == '\\' || c < 0x20 || c >= utf8.RuneSelf {
				return false
			}
			d.i++
		}
		if d.i == len(d.b) {
			return false
		}
		name := d.b[start:d.i]
		d.i++
		if !d.eat(':') {
			return false
		}
		d.ws()
		if !member(name) {
			return false
		}
		if d.eat(',') {
			continue
		}
		return d.eat('}')
	}
}

// skip moves past the value at the scan and returns its bytes. It only
// finds where the value ends (at the end of a string or of a bracket
// nesting, or before a delimiter or space after a scalar): delegate has
// encoding/json check the bytes.
func (d *jsonScan) skip() []byte {
	d.ws()
	start := d.i
	depth := 0
	for d.i < len(d.b) {
		switch c := d.b[d.i]; {
		case c == '"':
			d.i++
			for d.i < len(d.b) && d.b[d.i] != '"' {
				if d.b[d.i] == '\\' {
					d.i++
				}
				d.i++
			}
			d.i = min(d.i+1, len(d.b))
			if depth == 0 {
				return d.b[start:d.i]
			}
			continue
		case c == '{' || c == '[':
			depth++
		case c == '}' || c == ']':
			if depth == 0 {
				return d.b[start:d.i]
			}
			if depth--; depth == 0 {
				d.i++
				return d.b[start:d.i]
			}
		case depth == 0 && (c == ',' || c == ':' || c == ' ' || c == '\t' || c == '\n' || c == '\r'):
			return d.b[start:d.i]
		}
		d.i++
	}
	return d.b[start:d.i]
}

// delegate decodes the value at the scan into v with encoding/json,
// unknown fields refused, as Read's encoding/json path would.
func (d *jsonScan) delegate(v any) bool {
	raw := d.skip()
	dec := json.NewDecoder(bytes.NewReader(raw))
	dec.DisallowUnknownFields()
	return len(raw) > 0 && dec.Decode(v) == nil && dec.InputOffset() == int64(len(raw))
}

// fieldSet holds the field names met in one object, to refuse a name
// given twice: encoding/json would let the second overwrite the first, or
// merge the two objects into one struct.
type fieldSet struct {
	names [16][]byte
	n     int
}

// first reports whether name is met for the first time (and notes it).
func (s *fieldSet) first(name []byte) bool {
	for _, m := range s.names[:s.n] {
		if bytes.Equal(m, name) {
			return false
		}
	}
	if s.n == len(s.names) {
		return false
	}
	s.names[s.n] = name
	s.n++
	return true
}

// content decodes the content object.
func (d *jsonScan) content(c *Content) bool {
	var seen fieldSet
	return d.object(func(name []byte) bool {
		if !seen.first(name) {
			return false
		}
		switch string(name) {
		case "input":
			return d.delegate(&c.Input)
		case "tokens":
			return d.delegate(&c.Tokens)
		case "stop":
			return d.delegate(&c.Stop)
		case "stem":
			return d.delegate(&c.Stem)
		case "ngrams":
			return d.delegate(&c.NGrams)
		case "mode":
			return d.delegate(&c.Mode)
		case "docs":
			return d.delegate(&c.Docs)
		case "vocabulary":
			if d.peek() != '{' {
				return d.delegate(&c.Vocabulary)
			}
			c.Vocabulary = new(Vocabulary)
			return d.vocabulary(c.Vocabulary)
		case "hashing":
			return d.delegate(&c.Hashing)
		case "weights":
			if d.peek() != '{' {
				return d.delegate(&c.Weights)
			}
			return d.weights(&c.Weights)
		case "labels":
			return d.delegate(&c.Labels)
		case "fields":
			return d.delegate(&c.Fields)
		}
		return false
	})
}

// vocabulary decodes a vocabulary object.
func (d *jsonScan) vocabulary(v *Vocabulary) bool {
	var seen fieldSet
	return d.object(func(name []byte) bool {
		if !seen.first(name) {
			return false
		}
		switch string(name) {
		case "min_docs":
			return d.delegate(&v.MinDocs)
		case "max_doc_share":
			return d.delegate(&v.MaxDocShare)
		case "max_terms":
			return d.delegate(&v.MaxTerms)
		case "unseen":
			return d.delegate(&v.Unseen)
		case "keys":
			return d.strs(&v.Keys)
		case "orders":
			return d.ints(&v.Orders)
		case "doc_counts":
			return d.int64s(&v.DocCounts)
		case "retired":
			return d.bools(&v.Retired)
		case "parent_keys":
			return d.delegate(&v.ParentKeys)
		case "seen":
			return d.delegate(&v.Seen)
		}
		return false
	})
}

// weights decodes a weights object.
func (d *jsonScan) weights(w *Weights) bool {
	var seen fieldSet
	return d.object(func(name []byte) bool {
		if !seen.first(name) {
			return false
		}
		switch string(name) {
		case "tf":
			return d.delegate(&w.TF)
		case "idf":
			return d.delegate(&w.IDF)
		case "norm":
			return d.delegate(&w.Norm)
		case "idf_values":
			return d.float64s(&w.IDFValues)
		case "idf_buckets":
			return d.uint64s(&w.IDFBuckets)
		case "idf_bucket_values":
			return d.float64s(&w.IDFBucketValues)
		case "idf_default":
			return d.delegate(&w.IDFDefault)
		}
		return false
	})
}

// array parses an array at the scan, calling elem for each element with
// the scan at its first byte; elem returns false for an element it does
// not take. Anything but an array (null included), or an element not
// taken, sends the scan back and returns false: the caller then hands
// the value to encoding/json.
func (d *jsonScan) array(elem func() bool) bool {
	start := d.i
	if !d.eat('[') {
		d.i = start
		return false
	}
	if d.eat(']') {
		return true
	}
	for {
		d.ws()
		if !elem() {
			d.i = start
			return false
		}
		if d.eat(',') {
			continue
		}
		if d.eat(']') {
			return true
		}
		d.i = start
		return false
	}
}

// strs decodes an array of strings. The keys of a large vocabulary
// share the file's bytes: a string without escapes is a piece of them. A first pass finds the end of the array and counts
// its strings (it checks nothing); the second checks every byte as it
// fills the slice.
func (d *jsonScan) strs(dst *[]string) bool {
	start := d.i
	n, end := countStrings(d.b, start)
	if n < 0 {
		*dst = nil
		return d.delegate(dst)
	}
	if d.async != nil && n >= asyncMinStrings {
		// countStrings found where the array ends: the scan goes on from
		// there, and the array is decoded beside it. If that decoding
		// ends anywhere else, or fails, the whole fast path gives up.
		sub := &jsonScan{b: d.b, i: start}
		d.async.wg.Add(1)
		go func(a *asyncDecode) {
			defer a.wg.Done()
			if !sub.strsAt(dst, n, end) || sub.i != end {
				a.failed.Store(true)
			}
		}(d.async)
		d.i = end
		return true
	}
	return d.strsAt(dst, n, end)
}

// strsAt decodes the array of n strings (as countStrings counted them)
// that starts at the scan and ends at end.
func (d *jsonScan) strsAt(dst *[]string, n, end int) bool {
	start := d.i
	// The strings point into the file's bytes: Read owns them and nothing
	// writes to them once they are read, so they can be shared instead of
	// copied (10 MB for 600,000 keys).
	all := unsafe.String(&d.b[start], end-start)
	out := make([]string, 0, n)
	ok := d.array(func() bool {
		if d.i >= len(d.b) || d.b[d.i] != '"' || len(out) == n {
			return false
		}
		q := d.i
		d.i++
		var high byte
		for d.i < len(d.b) && plainByte[d.b[d.i]] {
			high |= d.b[d.i]
			d.i++
		}
		if d.i < end && d.b[d.i] == '"' && (high < utf8.RuneSelf || utf8.Valid(d.b[q+1:d.i])) {
			d.i++
			out = append(out, all[q+1-start:d.i-1-start])
			return true
		}
		// An escape, a control byte or bad UTF-8: encoding/json decides.
		d.i = q
		var s string
		if !d.delegate(&s) {
			return false
		}
		out = append(out, s)
		return true
	})
	if !ok || d.i != end || len(out) != n {
		d.i = start
		*dst = nil
		return d.delegate(dst)
	}
	*dst = out
	return true
}

// plainByte holds the bytes that may stand in a JSON string as they are,
// but for the quote and backslash: a string made of them needs no
// unquoting (bytes from 0x80 on still need a UTF-8 check).
var plainByte = func() (t [256]bool) {
	for c := 0x20; c < 256; c++ {
		t[c] = c != '"' && c != '\\'
	}
	return t
}()

// countStrings looks at the array at b[i:] as an array of strings and
// returns the number of elements and the offset just past its closing
// bracket, or n = -1 when it is not such an array. It does not check the
// strings' bytes.
func countStrings(b []byte, i int) (n, end int) {
	if i >= len(b) || b[i] != '[' {
		return -1, 0
	}
	i++
	for {
		for i < len(b) && (b[i] == ' ' || b[i] == '\t' || b[i] == '\n' || b[i] == '\r' || b[i] == ',') {
			i++
		}
		if i >= len(b) {
			return -1, 0
		}
		if b[i] == ']' {
			return n, i + 1
		}
		if b[i] != '"' {
			return -1, 0
		}
		// Keys are short: a plain loop beats bytes.IndexByte here.
		for i++; i < len(b) && b[i] != '"'; i++ {
			if b[i] == '\\' {
				i++
			}
		}
		if i >= len(b) {
			return -1, 0
		}
		i++
		n++
	}
}

// integer parses a JSON number without fraction or exponent at the scan
// whose value lies in [lo, hi], the numbers encoding/json stores in an
// integer field of that range (it refuses the others, and so does the
// caller then). It returns the magnitude and the sign. lo is 0 (unsigned)
// or negative, and hi is at most math.MaxInt64 unless lo is 0.
func (d *jsonScan) integer(lo int64, hi uint64) (mag uint64, neg, ok bool) {
	i := d.i
	if i < len(d.b) && d.b[i] == '-' {
		if lo == 0 {
			return 0, false, false
		}
		neg = true
		i++
	}
	first := i
	for i < len(d.b) && d.b[i] >= '0' && d.b[i] <= '9' {
		if i-first == 19 {
			// A 20th digit: only uint64 has room, strconv decides.
			return d.bigUnsigned(lo, hi)
		}
		mag = mag*10 + uint64(d.b[i]-'0')
		i++
	}
	if i == first || d.b[first] == '0' && i-first > 1 || i < len(d.b) && (d.b[i] == '.' || d.b[i] == 'e' || d.b[i] == 'E') {
		return 0, false, false
	}
	// uint64(-lo) is |lo|, math.MinInt64 included (two's complement).
	if neg && mag > uint64(-lo) || !neg && mag > hi {
		return 0, false, false
	}
	d.i = i
	return mag, neg, true
}

// bigUnsigned is integer for literals of 20 digits or more.
func (d *jsonScan) bigUnsigned(lo int64, hi uint64) (uint64, bool, bool) {
	i := d.i
	for i < len(d.b) && d.b[i] >= '0' && d.b[i] <= '9' {
		i++
	}
	if lo != 0 || d.b[d.i] == '0' || i < len(d.b) && (d.b[i] == '.' || d.b[i] == 'e' || d.b[i] == 'E') {
		return 0, false, false
	}
	u, err := strconv.ParseUint(string(d.b[d.i:i]), 10, 64)
	if err != nil || u > hi {
		return 0, false, false
	}
	d.i = i
	return u, false, true
}

// scalars returns the length of the array of numbers or literals at the
// scan, to size the slice for it: the commas before its first closing
// bracket, plus one. (It is only a capacity; the array is parsed after.)
func (d *jsonScan) scalars() int {
	if d.peek() != '[' {
		return 0
	}
	end := bytes.IndexByte(d.b[d.i:], ']')
	if end < 0 {
		return 0
	}
	return bytes.Count(d.b[d.i:d.i+end], []byte(",")) + 1
}

// ints decodes an array of int.
func (d *jsonScan) ints(dst *[]int) bool {
	out := make([]int, 0, d.scalars())
	ok := d.array(func() bool {
		v, neg, ok := d.integer(math.MinInt, math.MaxInt)
		if neg {
			out = append(out, -int(v))
		} else {
			out = append(out, int(v))
		}
		return ok
	})
	if !ok {
		*dst = nil
		return d.delegate(dst)
	}
	*dst = out
	return true
}

// int64s decodes an array of int64.
func (d *jsonScan) int64s(dst *[]int64) bool {
	out := make([]int64, 0, d.scalars())
	ok := d.array(func() bool {
		v, neg, ok := d.integer(math.MinInt64, math.MaxInt64)
		if neg {
			out = append(out, -int64(v))
		} else {
			out = append(out, int64(v))
		}
		return ok
	})
	if !ok {
		*dst = nil
		return d.delegate(dst)
	}
	*dst = out
	return true
}

// uint64s decodes an array of uint64.
func (d *jsonScan) uint64s(dst *[]uint64) bool {
	out := make([]uint64, 0, d.scalars())
	ok := d.array(func() bool {
		v, _, ok := d.integer(0, math.MaxUint64)
		out = append(out, v)
		return ok
	})
	if !ok {
		*dst = nil
		return d.delegate(dst)
	}
	*dst = out
	return true
}

// float64s decodes an array of float64.
func (d *jsonScan) float64s(dst *[]float64) bool {
	out := make([]float64, 0, d.scalars())
	ok := d.array(func() bool {
		v, ok := d.number()
		out = append(out, v)
		return ok
	})
	if !ok {
		*dst = nil
		return d.delegate(dst)
	}
	*dst = out
	return true
}

// number parses a JSON number at the scan as encoding/json does for a
// float64 field: strconv.ParseFloat of the literal, refused when out of
// range.
func (d *jsonScan) number() (float64, bool) {
	i := d.i
	digits := func() bool {
		from := i
		for i < len(d.b) && d.b[i] >= '0' && d.b[i] <= '9' {
			i++
		}
		return i > from
	}
	if i < len(d.b) && d.b[i] == '-' {
		i++
	}
	if i < len(d.b) && d.b[i] == '0' {
		i++
	} else if !digits() {
		return 0, false
	}
	if i < len(d.b) && d.b[i] == '.' {
		i++
		if !digits() {
			return 0, false
		}
	}
	if i < len(d.b) && (d.b[i] == 'e' || d.b[i] == 'E') {
		i++
		if i < len(d.b) && (d.b[i] == '+' || d.b[i] == '-') {
			i++
		}
		if !digits() {
			return 0, false
		}
	}
	v, err := strconv.ParseFloat(string(d.b[d.i:i]), 64)
	if err != nil {
		return 0, false
	}
	d.i = i
	return v, true
}

// bools decodes an array of bool.
func (d *jsonScan) bools(dst *[]bool) bool {
	out := make([]bool, 0, d.scalars())
	ok := d.array(func() bool {
		switch {
		case bytes.HasPrefix(d.b[d.i:], []byte("true")):
			d.i += 4
			out = append(out, true)
		case bytes.HasPrefix(d.b[d.i:], []byte("false")):
			d.i += 5
			out = append(out, false)
		default:
			return false
		}
		return true
	})
	if !ok {
		*dst = nil
		return d.delegate(dst)
	}
	*dst = out
	return true
}
