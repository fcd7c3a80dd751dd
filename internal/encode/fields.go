package encode

import (
	"slices"

	"github.com/bowline/bowline/internal/tablefield"
	"github.com/bowline/bowline/spec"
	"github.com/bowline/bowline/weight"
)

// TableFields returns the names of the spec's table fields in the order
// EncodeFields takes their values.
func (e *Encoder) TableFields() []string { return e.fields.Names() }

// NewFieldObserver returns an observer of the spec's table fields for a
// run's figures.
func (e *Encoder) NewFieldObserver() *tablefield.Observer { return e.fields.NewObserver() }

// NewFieldObserver returns an observer of the table fields of s without
// building a whole encoder (for drift figures).
func NewFieldObserver(s *spec.Spec) (*tablefield.Observer, error) {
	set, err := tablefield.NewSet(&s.Content, 0)
	if err != nil {
		return nil, err
	}
	return set.NewObserver(), nil
}

// fieldState is a worker's scratch for table fields.
type fieldState struct {
	enc     *tablefield.Encoder
	entries []tablefield.Entry
	merged  weight.Row
}

// EncodeFields turns one document into a row like Encode, with the values
// of the spec's table fields (one per field, in the order of
// Content.Fields; nil or empty for missing, and a nil slice for all
// missing) after the text columns. Table-field values are not weighted by
// tf or idf, and the row norm applies to the text columns only. A value
// that cannot be read is a *tablefield.ValueError, and dst is then
// undefined.
func (w *Worker) EncodeFields(texts, values [][]byte, dst *weight.Row) (DocStats, error) {
	ds := w.Encode(texts, dst)
	if w.e.fields.Len() == 0 {
		return ds, nil
	}
	fs := &w.fs
	if fs.enc == nil {
		fs.enc = w.e.fields.NewEncoder()
	}
	var err error
	if fs.entries, err = fs.enc.Append(fs.entries[:0], values); err != nil {
		return ds, err
	}
	if w.e.hasher == nil {
		// Field columns follow every text column, in ascending order.
		for _, en := range fs.entries {
			if en.Value != 0 {
				dst.Indices = append(dst.Indices, en.Col)
				dst.Values = append(dst.Values, en.Value)
			}
		}
		return ds, nil
	}
	w.mergeEntries(dst)
	return ds, nil
}

// mergeEntries adds the hashed field entries to the finished text row: a
// bucket the text row has already gets the sum; sums of exactly 0 are
// left out.
func (w *Worker) mergeEntries(dst *weight.Row) {
	fs := &w.fs
	en := fs.entries
	slices.SortStableFunc(en, func(a, b tablefield.Entry) int { return a.Col - b.Col })
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
		if j == len(en) || (i < len(dst.Indices) && dst.Indices[i] <= en[j].Col) {
			push(dst.Indices[i], dst.Values[i])
			i++
		} else {
			push(en[j].Col, en[j].Value)
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
