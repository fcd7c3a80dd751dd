package tablefield

import (
	"fmt"
	"math"
	"slices"
	"time"

	"github.com/bowline/bowline/hashing"
	"github.com/bowline/bowline/spec"
	"github.com/bowline/bowline/tokenize"
)

// A Set is the frozen table fields of one spec, ready to turn records'
// values into columns. It is safe for concurrent use; each goroutine
// reads values through its own Encoder.
type Set struct {
	codecs []*codec
	tok    tokenize.Options
	hasher *hashing.Hasher // hashing mode
}

// NewSet prepares the table fields of c. In vocabulary mode their columns
// start at base (the first column after the text's) and follow one
// another in the spec's order; in hashing mode each feature is hashed
// into the spec's buckets like a key.
func NewSet(c *spec.Content, base int) (*Set, error) {
	tok, err := c.Tokens.Options()
	if err != nil {
		return nil, err
	}
	s := &Set{tok: tok}
	if c.Mode == spec.ModeHashing && c.Hashing != nil {
		if s.hasher, err = hashing.New(c.Hashing.Width, c.Hashing.Seed, c.Hashing.Signed); err != nil {
			return nil, err
		}
	}
	for i := range c.Fields {
		fc, err := newCodec(&c.Fields[i])
		if err != nil {
			return nil, err
		}
		if s.hasher != nil {
			for _, k := range hashedKeys(fc.f) {
				fc.keySums = append(fc.keySums, s.hasher.Sum([]byte(k)))
			}
		} else {
			fc.base = base
			base += fc.f.Columns()
		}
		s.codecs = append(s.codecs, fc)
	}
	return s, nil
}

// hashedKeys are the fixed feature keys of a field in hashing mode, in the
// order of the field's features: a category's missing level; a number's
// value and missing indicator; a time's periodic features and missing
// indicator. A category's levels are hashed as "name=level" when met.
func hashedKeys(f *spec.TableField) []string {
	name := f.Name
	switch f.Kind {
	case spec.KindCategory:
		return []string{name + "=" + spec.LevelMissing}
	case spec.KindNumber:
		return []string{name + "=", name + spec.MissingSuffix}
	case spec.KindTime:
		var keys []string
		for _, t := range spec.TimeFeatures {
			keys = append(keys, name+":"+t)
		}
		return append(keys, name+spec.MissingSuffix)
	}
	return nil
}

// Len is the number of table fields.
func (s *Set) Len() int { return len(s.codecs) }

// Names returns the fields' names in the spec's order, the order in which
// values are given.
func (s *Set) Names() []string {
	out := make([]string, len(s.codecs))
	for i, fc := range s.codecs {
		out[i] = fc.f.Name
	}
	return out
}

// An Entry is one column of a record's table fields and its value.
type Entry struct {
	// Col is the column (vocabulary mode) or the bucket (hashing mode).
	Col int
	// Value is the column's value, signed like a key's under sign
	// hashing.
	Value float64
}

// An Encoder turns records' table-field values into entries for one
// goroutine.
type Encoder struct {
	s   *Set
	tok *tokenize.Tokenizer
	buf []byte
	key []byte
	h   *hashing.Hasher
}

// NewEncoder returns an Encoder for one goroutine.
func (s *Set) NewEncoder() *Encoder {
	e := &Encoder{s: s}
	e.tok, _ = tokenize.New(s.tok) // validated in NewSet
	if s.hasher != nil {
		e.h = s.hasher.Clone()
	}
	return e
}

// Append appends the entries of one record's values (one per field, nil or
// empty for missing; a nil slice for all missing) to dst. In vocabulary
// mode they come in ascending column order and may hold zeros; in hashing
// mode in the order of the fields, with buckets that may repeat. A value
// that cannot be read is a *ValueError.
func (e *Encoder) Append(dst []Entry, values [][]byte) ([]Entry, error) {
	s := e.s
	if values != nil && len(values) != len(s.codecs) {
		return dst, fmt.Errorf("%d table field values for the spec's %d table fields", len(values), len(s.codecs))
	}
	hashed := s.hasher != nil
	add := func(fc *codec, k int, v float64) {
		if hashed {
			dst = e.appendHashed(dst, fc.keySums[k], v)
			return
		}
		dst = append(dst, Entry{fc.base + k, v})
	}
	for i, fc := range s.codecs {
		var v []byte
		if values != nil {
			v = values[i]
		}
		switch fc.f.Kind {
		case spec.KindCategory:
			e.buf = level(e.tok, e.buf, v)
			l := e.buf
			if hashed {
				if len(l) == 0 {
					add(fc, 0, 1)
					continue
				}
				e.key = append(append(append(e.key[:0], fc.f.Name...), '='), l...)
				dst = e.appendHashed(dst, e.h.Sum(e.key), 1)
				continue
			}
			class, idx := fc.classify(l)
			if class == classLevel {
				add(fc, idx, 1)
			} else {
				add(fc, len(fc.f.Category.Levels)+class-classOther, 1)
			}
		case spec.KindNumber:
			_, x, miss, err := fc.number(v)
			if err != nil {
				return dst, err
			}
			add(fc, 0, numberValue(fc.f.Number, x, miss))
			if miss {
				add(fc, 1, 1)
			}
		case spec.KindTime:
			t, miss, err := fc.when(v)
			if err != nil {
				return dst, err
			}
			if miss {
				add(fc, len(spec.TimeFeatures), 1)
				continue
			}
			for k, x := range Periodic(t) {
				add(fc, k, x)
			}
		}
	}
	return dst, nil
}

// appendHashed appends a hashed feature in its bucket, signed like any key
// under sign hashing.
func (e *Encoder) appendHashed(dst []Entry, sum uint64, v float64) []Entry {
	h := e.s.hasher
	if h.Signed && sum>>63 == 1 {
		v = -v
	}
	return append(dst, Entry{int(hashing.BucketOf(sum, h.Width)), v})
}

// numberValue is the column value of a number: after log (x), a missing
// value replaced by the training mean, then standardized when asked for
// (with a standard deviation of 0, only the mean is subtracted).
func numberValue(n *spec.Number, x float64, missing bool) float64 {
	if missing {
		x = n.Mean
	}
	if n.Standard {
		x -= n.Mean
		if n.SD > 0 {
			x /= n.SD
		}
	}
	return x
}

// Stat is the account of one table field over a run.
type Stat struct {
	// Name and Kind are the field's.
	Name string
	Kind spec.FieldKind
	// Docs counts records read; Missing those without a value.
	Docs, Missing int64
	// Other and Unseen count category values that fell into the other
	// level and values never seen at learn time (vocabulary mode).
	Other, Unseen int64
	// OutOfRange counts number values outside the training Min..Max.
	OutOfRange int64
	// Values counts number or time values present. Mean and SD are the
	// mean and population standard deviation of the present number
	// values after log, before standardization; Min and Max their range
	// as read.
	Values       int64
	Mean, SD     float64
	Min, Max     float64
	m2           float64
	First, Last  time.Time // earliest and latest time (in the field's zone)
	hasTime      bool
	distinct     map[string]struct{}
	DistinctSeen int64 // distinct category levels seen (vocabulary mode)
}

// An Observer checks and counts the table-field values of a run's records
// for the figures. Call Observe from one goroutine in input order: the sums
// are made in that order, so the figures do not depend on the worker
// count.
type Observer struct {
	s     *Set
	tok   *tokenize.Tokenizer
	buf   []byte
	stats []Stat
	// per record, before committing
	raws, xs []float64
	times    []time.Time
	miss     []bool
	class    []int
}

// NewObserver returns an observer of the set's fields.
func (s *Set) NewObserver() *Observer {
	n := len(s.codecs)
	o := &Observer{s: s, stats: make([]Stat, n), raws: make([]float64, n), xs: make([]float64, n),
		times: make([]time.Time, n), miss: make([]bool, n), class: make([]int, n)}
	for i, fc := range s.codecs {
		o.stats[i].Name, o.stats[i].Kind = fc.f.Name, fc.f.Kind
		if fc.f.Kind == spec.KindCategory {
			o.stats[i].distinct = map[string]struct{}{}
			if o.tok == nil {
				o.tok, _ = tokenize.New(s.tok)
			}
		}
	}
	return o
}

// Observe reads one record's table-field values (as for Encoder.Append).
// A value that cannot be read is a *ValueError, and nothing of the record
// is counted.
func (o *Observer) Observe(values [][]byte) error {
	codecs := o.s.codecs
	if values != nil && len(values) != len(codecs) {
		return fmt.Errorf("%d table field values for the spec's %d table fields", len(values), len(codecs))
	}
	hashed := o.s.hasher != nil
	for i, fc := range codecs {
		var v []byte
		if values != nil {
			v = values[i]
		}
		var err error
		switch fc.f.Kind {
		case spec.KindNumber:
			o.raws[i], o.xs[i], o.miss[i], err = fc.number(v)
		case spec.KindTime:
			o.times[i], o.miss[i], err = fc.when(v)
		case spec.KindCategory:
			o.buf = level(o.tok, o.buf, v)
			o.miss[i] = len(o.buf) == 0
			if !hashed {
				o.class[i], _ = fc.classify(o.buf)
				st := &o.stats[i]
				if !o.miss[i] && len(st.distinct) < MaxLevels {
					if _, ok := st.distinct[string(o.buf)]; !ok {
						st.distinct[string(o.buf)] = struct{}{}
					}
				}
			}
		}
		if err != nil {
			return err
		}
	}
	for i, fc := range codecs {
		st := &o.stats[i]
		st.Docs++
		if o.miss[i] {
			st.Missing++
			continue
		}
		switch fc.f.Kind {
		case spec.KindCategory:
			switch o.class[i] {
			case classOther:
				st.Other++
			case classUnseen:
				if !hashed {
					st.Unseen++
				}
			}
		case spec.KindNumber:
			st.add(o.raws[i], o.xs[i])
			n := fc.f.Number
			if n.Docs > 0 && (o.raws[i] < n.Min || o.raws[i] > n.Max) {
				st.OutOfRange++
			}
		case spec.KindTime:
			t := o.times[i]
			st.Values++
			if !st.hasTime || t.Before(st.First) {
				st.First = t
			}
			if !st.hasTime || t.After(st.Last) {
				st.Last = t
			}
			st.hasTime = true
		}
	}
	return nil
}

// add takes one number value into the running figures (Welford's method,
// Knuth, TAOCP vol. 2, 4.2.2).
func (st *Stat) add(raw, x float64) {
	st.Values++
	d := x - st.Mean
	st.Mean += d / float64(st.Values)
	st.m2 += d * (x - st.Mean)
	st.SD = math.Sqrt(st.m2 / float64(st.Values))
	if st.Values == 1 || raw < st.Min {
		st.Min = raw
	}
	if st.Values == 1 || raw > st.Max {
		st.Max = raw
	}
}

// Stats returns the figures gathered so far, one per table field.
func (o *Observer) Stats() []Stat {
	out := slices.Clone(o.stats)
	for i := range out {
		out[i].DistinctSeen = int64(len(out[i].distinct))
		out[i].distinct = nil
	}
	return out
}
