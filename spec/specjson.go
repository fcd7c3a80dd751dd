package spec

import (
	"bytes"
	"encoding/json"
	"errors"
	"sync"
	"sync/atomic"
	"unsafe"

	"github.com/bowline/bowline/internal/jsonscan"
)

// This file is Read's fast path. A spec's content is mostly a few large
// arrays (vocabulary keys, orders and document counts, idf values);
// decoding them with encoding/json costs a scan of the whole file for the
// envelope, another for the content and reflection per element. fastDecode
// walks the file once with internal/jsonscan, reads those arrays with it
// and hands every other value to encoding/json.
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
// arrays, an element the scanner's typed readers do not take (null, a
// number with a fraction where an integer is wanted, bad syntax) hands the
// whole array to encoding/json.

// fastDecode decodes a spec file's bytes as Read's encoding/json path
// does: the envelope (unknown fields refused) and its content (unknown
// fields refused). It gives up on a key given twice in any object and on
// anything but white space after the envelope, which Read refuses (see
// checkJSON). ok is false when it gives up; fl and c are then
// meaningless. The strings of c may share data's bytes, so data must not
// change afterwards.
func fastDecode(data []byte) (fl fileLayout, c Content, ok bool) {
	d := &fastScan{s: jsonscan.New(data), b: data, async: new(asyncDecode)}
	d.s.UniqueKeys = true // Read refuses a key given twice (see checkJSON)
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
			start := d.s.Offset()
			if !d.content(&c) {
				return false
			}
			fl.Content = data[start:d.s.Offset():d.s.Offset()]
			return true
		}
		return false
	})
	ok = ok && d.s.End() == nil
	return fl, c, ok
}

// fastScan is fastDecode's scan of a spec file.
type fastScan struct {
	s *jsonscan.Scanner
	b []byte // the file
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

// errGiveUp stops a scan where the fast path gives up.
var errGiveUp = errors.New("the fast path gives up")

// object reads an object, calling member with each field name (unquoted)
// once the scan stands at its value; member reads the value, or returns
// false to give up.
func (d *fastScan) object(member func(name []byte) bool) bool {
	return d.s.Object(func(name []byte) error {
		if !member(name) {
			return errGiveUp
		}
		return nil
	}) == nil
}

// delegate decodes the value at the scan into v with encoding/json,
// unknown fields refused, as Read's encoding/json path would.
func (d *fastScan) delegate(v any) bool {
	raw, err := d.s.Skip()
	if err != nil {
		return false
	}
	dec := json.NewDecoder(bytes.NewReader(raw))
	dec.DisallowUnknownFields()
	return dec.Decode(v) == nil
}

// fieldSet holds the field names met in one object, to refuse a name
// given twice: encoding/json would let the second overwrite the first, or
// merge the two objects into one struct.
type fieldSet struct {
	names [16][]byte
	n     int
}

// first reports whether name is met for the first time (and notes it;
// name must stay unchanged while the object is read, as the scanner's
// keys do).
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
func (d *fastScan) content(c *Content) bool {
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
			if d.s.Kind() != jsonscan.Object {
				return d.delegate(&c.Vocabulary)
			}
			c.Vocabulary = new(Vocabulary)
			return d.vocabulary(c.Vocabulary)
		case "hashing":
			return d.delegate(&c.Hashing)
		case "weights":
			if d.s.Kind() != jsonscan.Object {
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
func (d *fastScan) vocabulary(v *Vocabulary) bool {
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
func (d *fastScan) weights(w *Weights) bool {
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

// array reads the array at the scan with elem, which reads each element
// or returns an error for one it does not take. Anything but an array
// (null included), or an element not taken, sends the scan back and
// returns false: the caller then hands the value to encoding/json.
func (d *fastScan) array(elem func() error) bool {
	if d.s.Kind() != jsonscan.Array {
		return false
	}
	start := d.s.Offset()
	if err := d.s.Array(elem); err != nil {
		d.s.Seek(start)
		return false
	}
	return true
}

// strs decodes an array of strings. The keys of a large vocabulary share
// the file's bytes: a string without escapes is a piece of them. A first
// pass finds the end of the array and counts its strings (it checks
// nothing); the second checks every byte as it fills the slice.
func (d *fastScan) strs(dst *[]string) bool {
	start := d.s.Offset()
	n, end := countStrings(d.b, start)
	if n < 0 {
		*dst = nil
		return d.delegate(dst)
	}
	if d.async != nil && n >= asyncMinStrings {
		// countStrings found where the array ends: the scan goes on from
		// there, and the array is decoded beside it. If that decoding
		// ends anywhere else, or fails, the whole fast path gives up.
		sub := &fastScan{s: jsonscan.New(d.b), b: d.b}
		sub.s.Seek(start)
		d.async.wg.Add(1)
		go func(a *asyncDecode) {
			defer a.wg.Done()
			if !sub.strsAt(dst, n, end) || sub.s.Offset() != end {
				a.failed.Store(true)
			}
		}(d.async)
		d.s.Seek(end)
		return true
	}
	return d.strsAt(dst, n, end)
}

// strsAt decodes the array of n strings (as countStrings counted them)
// that starts at the scan and ends at end.
func (d *fastScan) strsAt(dst *[]string, n, end int) bool {
	start := d.s.Offset()
	out := make([]string, 0, n)
	var buf []byte
	ok := d.array(func() error {
		if len(out) == n {
			return errGiveUp
		}
		v, copied, err := d.s.String(buf[:0])
		switch {
		case err != nil:
			return err
		case copied:
			// An escape or bad UTF-8: decoded into buf.
			buf = v
			out = append(out, string(v))
		default:
			// The string points into the file's bytes: Read owns them and
			// nothing writes to them once they are read, so they can be
			// shared instead of copied (10 MB for 600,000 keys).
			out = append(out, unsafe.String(unsafe.SliceData(v), len(v)))
		}
		return nil
	})
	if !ok || d.s.Offset() != end || len(out) != n {
		d.s.Seek(start)
		*dst = nil
		return d.delegate(dst)
	}
	*dst = out
	return true
}

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

// scalars returns the length of the array of numbers or literals at the
// scan, to size the slice for it: the commas before its first closing
// bracket, plus one. (It is only a capacity; the array is parsed after.)
func (d *fastScan) scalars() int {
	if d.s.Kind() != jsonscan.Array {
		return 0
	}
	rest := d.b[d.s.Offset():]
	end := bytes.IndexByte(rest, ']')
	if end < 0 {
		return 0
	}
	return bytes.Count(rest[:end], []byte(",")) + 1
}

// ints decodes an array of int.
func (d *fastScan) ints(dst *[]int) bool {
	out := make([]int, 0, d.scalars())
	ok := d.array(func() error {
		v, err := d.s.Int64()
		if int64(int(v)) != v {
			return errGiveUp // beyond int on this platform
		}
		out = append(out, int(v))
		return err
	})
	if !ok {
		*dst = nil
		return d.delegate(dst)
	}
	*dst = out
	return true
}

// int64s decodes an array of int64.
func (d *fastScan) int64s(dst *[]int64) bool {
	out := make([]int64, 0, d.scalars())
	ok := d.array(func() error {
		v, err := d.s.Int64()
		out = append(out, v)
		return err
	})
	if !ok {
		*dst = nil
		return d.delegate(dst)
	}
	*dst = out
	return true
}

// uint64s decodes an array of uint64.
func (d *fastScan) uint64s(dst *[]uint64) bool {
	out := make([]uint64, 0, d.scalars())
	ok := d.array(func() error {
		v, err := d.s.Uint64()
		out = append(out, v)
		return err
	})
	if !ok {
		*dst = nil
		return d.delegate(dst)
	}
	*dst = out
	return true
}

// float64s decodes an array of float64.
func (d *fastScan) float64s(dst *[]float64) bool {
	out := make([]float64, 0, d.scalars())
	ok := d.array(func() error {
		v, err := d.s.Float64()
		out = append(out, v)
		return err
	})
	if !ok {
		*dst = nil
		return d.delegate(dst)
	}
	*dst = out
	return true
}

// bools decodes an array of bool.
func (d *fastScan) bools(dst *[]bool) bool {
	out := make([]bool, 0, d.scalars())
	ok := d.array(func() error {
		v, err := d.s.Bool()
		out = append(out, v)
		return err
	})
	if !ok {
		*dst = nil
		return d.delegate(dst)
	}
	*dst = out
	return true
}
