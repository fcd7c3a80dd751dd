package spec

import (
	"fmt"
	"math"
	"slices"
	"time"

	"github.com/bowline/bowline/hashing"
	"github.com/bowline/bowline/tokenize"
	"github.com/bowline/bowline/weight"
)

// prepareFields readies the table fields of the encoder's spec: in
// vocabulary mode their columns follow e.columns; in hashing mode the
// fixed keys are hashed once.
func (e *Encoder) prepareFields() error {
	c := &e.spec.Content
	for i := range c.Fields {
		fc, err := newFieldCodec(&c.Fields[i])
		if err != nil {
			return err
		}
		if e.hasher != nil {
			name := fc.f.Name
			var keys []string
			switch fc.f.Kind {
			case KindCategory:
				keys = []string{name + "=" + LevelMissing}
			case KindNumber:
				keys = []string{name + "=", name + MissingSuffix}
			case KindTime:
				for _, t := range TimeFeatures {
					keys = append(keys, name+":"+t)
				}
				keys = append(keys, name+MissingSuffix)
			}
			for _, k := range keys {
				fc.keySums = append(fc.keySums, e.hasher.Sum([]byte(k)))
			}
		} else {
			fc.base = e.columns
			e.columns += fc.f.Columns()
		}
		e.fields = append(e.fields, fc)
	}
	return nil
}

// TableFields returns the names of the spec's table fields in the order
// EncodeFields takes their values.
func (e *Encoder) TableFields() []string {
	out := make([]string, len(e.fields))
	for i, fc := range e.fields {
		out[i] = fc.f.Name
	}
	return out
}

// numberValue is the column value of a number: after log (x), a missing
// value replaced by the training mean, then standardized when asked for
// (with a standard deviation of 0, only the mean is subtracted).
func numberValue(n *Number, x float64, missing bool) float64 {
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

type fieldEntry struct {
	col int
	v   float64
}

// fieldState is a worker's scratch for table fields.
type fieldState struct {
	tok     *tokenize.Tokenizer
	buf     []byte
	key     []byte
	entries []fieldEntry
	merged  weight.Row
}

// EncodeFields turns one document into a row like Encode, with the values
// of the spec's table fields (one per field, in the order of
// Content.Fields; nil or empty for missing, and a nil slice for all
// missing) after the text columns. Table-field values are not weighted by
// tf or idf, and the row norm applies to the text columns only. A value
// that cannot be read is a *FieldError, and dst is then undefined.
func (w *Worker) EncodeFields(texts, values [][]byte, dst *weight.Row) (DocStats, error) {
	ds := w.Encode(texts, dst)
	if len(w.e.fields) == 0 {
		return ds, nil
	}
	if values != nil && len(values) != len(w.e.fields) {
		return ds, fmt.Errorf("%d table field values for the spec's %d table fields", len(values), len(w.e.fields))
	}
	return ds, w.appendFields(values, dst)
}

func (w *Worker) appendFields(values [][]byte, dst *weight.Row) error {
	e := w.e
	fs := &w.fs
	if fs.tok == nil {
		fs.tok, _ = tokenize.New(e.analysis.tokOpts) // validated in Analysis
	}
	fs.entries = fs.entries[:0]
	hashed := e.hasher != nil
	add := func(fc *fieldCodec, k int, v float64) {
		if hashed {
			w.addHashed(fc.keySums[k], v)
			return
		}
		fs.entries = append(fs.entries, fieldEntry{fc.base + k, v})
	}
	for i, fc := range e.fields {
		var v []byte
		if values != nil {
			v = values[i]
		}
		switch fc.f.Kind {
		case KindCategory:
			fs.buf = level(fs.tok, fs.buf, v)
			l := fs.buf
			if hashed {
				if len(l) == 0 {
					add(fc, 0, 1)
					continue
				}
				fs.key = append(append(append(fs.key[:0], fc.f.Name...), '='), l...)
				w.addHashed(w.h.Sum(fs.key), 1)
				continue
			}
			class, idx := fc.classify(l)
			if class == classLevel {
				add(fc, idx, 1)
			} else {
				add(fc, len(fc.f.Category.Levels)+class-classOther, 1)
			}
		case KindNumber:
			_, x, miss, err := fc.number(v)
			if err != nil {
				return err
			}
			add(fc, 0, numberValue(fc.f.Number, x, miss))
			if miss {
				add(fc, 1, 1)
			}
		case KindTime:
			t, miss, err := fc.when(v)
			if err != nil {
				return err
			}
			if miss {
				add(fc, len(TimeFeatures), 1)
				continue
			}
			p := Periodic(t)
			for k, x := range p {
				add(fc, k, x)
			}
		}
	}
	if !hashed {
		// Field columns follow every text column, in ascending order.
		for _, en := range fs.entries {
			if en.v != 0 {
				dst.Indices = append(dst.Indices, en.col)
				dst.Values = append(dst.Values, en.v)
			}
		}
		return nil
	}
	w.mergeEntries(dst)
	return nil
}

// addHashed adds a table-field feature to its bucket (signed like any key
// under sign hashing).
func (w *Worker) addHashed(sum uint64, v float64) {
	h := w.e.hasher
	if h.Signed && sum>>63 == 1 {
		v = -v
	}
	w.fs.entries = append(w.fs.entries, fieldEntry{int(hashing.BucketOf(sum, h.Width)), v})
}

// mergeEntries adds the hashed field entries to the finished text row: a
// bucket the text row has already gets the sum; sums of exactly 0 are
// left out.
func (w *Worker) mergeEntries(dst *weight.Row) {
	fs := &w.fs
	en := fs.entries
	slices.SortStableFunc(en, func(a, b fieldEntry) int { return a.col - b.col })
	m := &fs.merged
	m.Indices, m.Values = m.Indices[:0], m.Values[:0]
	i, j := 0, 0
	push := func(c int, v float64) {
		if n := len(m.Indices); n > 0 && m.Indices[n-1] == c {
			m.Values[n-1] += v
			return
		}
		m.Indices = append(m.Indices, c)
		m.Values = append(m.Values, v)
	}
	for i < len(dst.Indices) || j < len(en) {
		if j == len(en) || (i < len(dst.Indices) && dst.Indices[i] <= en[j].col) {
			push(dst.Indices[i], dst.Values[i])
			i++
		} else {
			push(en[j].col, en[j].v)
			j++
		}
	}
	dst.Indices, dst.Values = dst.Indices[:0], dst.Values[:0]
	for k, c := range m.Indices {
		if m.Values[k] != 0 {
			dst.Indices = append(dst.Indices, c)
			dst.Values = append(dst.Values, m.Values[k])
		}
	}
}

// EncodeFields is EncodeFields of a pooled worker, returning a fresh row;
// it is safe for concurrent use.
func (e *Encoder) EncodeFields(texts, values [][]byte) (weight.Row, DocStats, error) {
	w, _ := e.pool.Get().(*Worker)
	if w == nil {
		w = e.NewWorker(false)
	}
	var row weight.Row
	ds, err := w.EncodeFields(texts, values, &row)
	out := weight.Row{Indices: append([]int(nil), row.Indices...), Values: append([]float64(nil), row.Values...)}
	e.pool.Put(w)
	if err != nil {
		return weight.Row{}, ds, err
	}
	return out, ds, nil
}

// FieldStat is the account of one table field over a run.
type FieldStat struct {
	// Name and Kind are the field's.
	Name, Kind string
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

// FieldObserver checks and counts the table-field values of a run's
// records for the figures. Call Observe from one goroutine in input order:
// the sums are made in that order, so the figures do not depend on the
// worker count.
type FieldObserver struct {
	e     *Encoder
	tok   *tokenize.Tokenizer
	buf   []byte
	stats []FieldStat
	// per record, before committing
	raws, xs []float64
	times    []time.Time
	miss     []bool
	class    []int
}

// maxDistinctTracked bounds the distinct category levels a FieldObserver
// remembers per field.
const maxDistinctTracked = MaxLevels

// NewFieldObserver returns an observer for the encoder's table fields.
func (e *Encoder) NewFieldObserver() *FieldObserver {
	n := len(e.fields)
	o := &FieldObserver{e: e, stats: make([]FieldStat, n), raws: make([]float64, n), xs: make([]float64, n),
		times: make([]time.Time, n), miss: make([]bool, n), class: make([]int, n)}
	for i, fc := range e.fields {
		o.stats[i].Name, o.stats[i].Kind = fc.f.Name, fc.f.Kind
		if fc.f.Kind == KindCategory {
			o.stats[i].distinct = map[string]struct{}{}
			if o.tok == nil {
				o.tok, _ = tokenize.New(e.analysis.tokOpts)
			}
		}
	}
	return o
}

// Observe reads one record's table-field values (as for
// Worker.EncodeFields). A value that cannot be read is a *FieldError, and
// nothing of the record is counted.
func (o *FieldObserver) Observe(values [][]byte) error {
	if values != nil && len(values) != len(o.e.fields) {
		return fmt.Errorf("%d table field values for the spec's %d table fields", len(values), len(o.e.fields))
	}
	hashed := o.e.hasher != nil
	for i, fc := range o.e.fields {
		var v []byte
		if values != nil {
			v = values[i]
		}
		var err error
		switch fc.f.Kind {
		case KindNumber:
			o.raws[i], o.xs[i], o.miss[i], err = fc.number(v)
		case KindTime:
			o.times[i], o.miss[i], err = fc.when(v)
		case KindCategory:
			o.buf = level(o.tok, o.buf, v)
			o.miss[i] = len(o.buf) == 0
			if !hashed {
				o.class[i], _ = fc.classify(o.buf)
				st := &o.stats[i]
				if !o.miss[i] && len(st.distinct) < maxDistinctTracked {
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
	for i, fc := range o.e.fields {
		st := &o.stats[i]
		st.Docs++
		if o.miss[i] {
			st.Missing++
			continue
		}
		switch fc.f.Kind {
		case KindCategory:
			switch o.class[i] {
			case classOther:
				st.Other++
			case classUnseen:
				if !hashed {
					st.Unseen++
				}
			}
		case KindNumber:
			st.add(o.raws[i], o.xs[i])
			n := fc.f.Number
			if n.Docs > 0 && (o.raws[i] < n.Min || o.raws[i] > n.Max) {
				st.OutOfRange++
			}
		case KindTime:
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
func (st *FieldStat) add(raw, x float64) {
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
func (o *FieldObserver) Stats() []FieldStat {
	out := slices.Clone(o.stats)
	for i := range out {
		out[i].DistinctSeen = int64(len(out[i].distinct))
		out[i].distinct = nil
	}
	return out
}

// NewFieldObserver returns an observer for the table fields of s without
// building a whole encoder (for drift figures).
func NewFieldObserver(s *Spec) (*FieldObserver, error) {
	c := &s.Content
	e := &Encoder{spec: s}
	var err error
	if e.analysis, err = c.Analysis(); err != nil {
		return nil, err
	}
	if c.Mode == ModeHashing && c.Hashing != nil {
		if e.hasher, err = hashing.New(c.Hashing.Width, c.Hashing.Seed, c.Hashing.Signed); err != nil {
			return nil, err
		}
	}
	if err := e.prepareFields(); err != nil {
		return nil, err
	}
	return e.NewFieldObserver(), nil
}
