package tablefield

import (
	"fmt"
	"math"
	"slices"
	"sort"
	"time"

	"github.com/bowline/bowline/spec"
	"github.com/bowline/bowline/tokenize"
	"github.com/cespare/xxhash/v2"
)

// A Learner gathers the training statistics of a spec's table fields, one
// record at a time, in input order, and freezes them into the fields.
// It is not safe for concurrent use.
type Learner struct {
	hashing bool // levels are not counted in hashing mode
	fields  []spec.TableField
	codecs  []*codec
	tok     *tokenize.Tokenizer
	docs    int64
	stats   []learnStat
	// per record, before committing
	raws, xs []float64
	times    []time.Time
	miss     []bool
	lv       [][]byte
}

type learnStat struct {
	levels  map[string]int64
	n       int64
	missing int64
	mean    float64
	m2      float64
	min     float64
	max     float64
	first   time.Time
	last    time.Time
}

// NewLearner prepares learning the statistics of fields (their settings
// only) in mode; tok normalizes category levels as the spec's tokens are.
func NewLearner(fields []spec.TableField, mode spec.Mode, tok tokenize.Options) (*Learner, error) {
	fl := &Learner{fields: fields, stats: make([]learnStat, len(fields)), hashing: mode == spec.ModeHashing}
	for i := range fields {
		fc, err := newCodec(&fields[i])
		if err != nil {
			return nil, err
		}
		fl.codecs = append(fl.codecs, fc)
		if fields[i].Kind == spec.KindCategory {
			fl.stats[i].levels = map[string]int64{}
			if fl.tok == nil {
				if fl.tok, err = tokenize.New(tok); err != nil {
					return nil, err
				}
			}
		}
	}
	n := len(fields)
	fl.raws, fl.xs, fl.miss, fl.lv = make([]float64, n), make([]float64, n), make([]bool, n), make([][]byte, n)
	fl.times = make([]time.Time, n)
	return fl, nil
}

// Observe reads one record's values, one per field (nil or empty for
// missing; a nil slice for all missing). Call it for every record, in
// input order: the statistics are summed in that order. A value that
// cannot be read is a *ValueError, and nothing of the record is counted.
func (fl *Learner) Observe(values [][]byte) error {
	if len(values) != len(fl.fields) && values != nil {
		return fmt.Errorf("%d table field values for %d fields", len(values), len(fl.fields))
	}
	val := func(i int) []byte {
		if values == nil {
			return nil
		}
		return values[i]
	}
	for i, fc := range fl.codecs {
		var err error
		switch fc.f.Kind {
		case spec.KindNumber:
			fl.raws[i], fl.xs[i], fl.miss[i], err = fc.number(val(i))
		case spec.KindTime:
			fl.times[i], fl.miss[i], err = fc.when(val(i))
		case spec.KindCategory:
			fl.lv[i] = level(fl.tok, fl.lv[i], val(i))
			fl.miss[i] = len(fl.lv[i]) == 0
			st := &fl.stats[i]
			if !fl.miss[i] && !fl.hashing {
				if _, ok := st.levels[string(fl.lv[i])]; !ok && len(st.levels) >= MaxLevels {
					return fmt.Errorf("field %q: more than %d distinct levels; is it really a category?", fc.f.Name, MaxLevels)
				}
			}
		}
		if err != nil {
			return err
		}
	}
	fl.docs++
	for i, fc := range fl.codecs {
		st := &fl.stats[i]
		if fl.miss[i] {
			st.missing++
			continue
		}
		switch fc.f.Kind {
		case spec.KindCategory:
			if !fl.hashing {
				st.levels[string(fl.lv[i])]++
			}
		case spec.KindNumber:
			// Welford's running mean and sum of squared deviations
			// (Knuth, TAOCP vol. 2, 4.2.2), in input order.
			st.n++
			d := fl.xs[i] - st.mean
			st.mean += d / float64(st.n)
			st.m2 += d * (fl.xs[i] - st.mean)
			if st.n == 1 || fl.raws[i] < st.min {
				st.min = fl.raws[i]
			}
			if st.n == 1 || fl.raws[i] > st.max {
				st.max = fl.raws[i]
			}
		case spec.KindTime:
			st.n++
			if t := fl.times[i]; st.n == 1 || t.Before(st.first) {
				st.first = t
			}
			if t := fl.times[i]; st.n == 1 || t.After(st.last) {
				st.last = t
			}
		}
	}
	return nil
}

// Docs is the number of records observed.
func (fl *Learner) Docs() int64 { return fl.docs }

// Finish returns the fields with their statistics frozen: in vocabulary
// mode, category levels in fewer than minDocs records fold into the other
// level.
func (fl *Learner) Finish(mode spec.Mode, minDocs int64) []spec.TableField {
	out := make([]spec.TableField, len(fl.fields))
	for i, f := range fl.fields {
		st := &fl.stats[i]
		switch f.Kind {
		case spec.KindCategory:
			g := &spec.Category{MissingDocs: st.missing}
			if mode == spec.ModeVocabulary {
				g.MinDocs = minDocs
				type lc struct {
					l string
					n int64
				}
				var kept []lc
				for l, n := range st.levels {
					if n >= minDocs {
						kept = append(kept, lc{l, n})
					} else {
						g.OtherDocs += n
						g.OtherHashes = append(g.OtherHashes, xxhash.Sum64String(l))
					}
				}
				sort.Slice(kept, func(a, b int) bool {
					if kept[a].n != kept[b].n {
						return kept[a].n > kept[b].n
					}
					return kept[a].l < kept[b].l
				})
				for _, k := range kept {
					g.Levels = append(g.Levels, k.l)
					g.LevelDocs = append(g.LevelDocs, k.n)
				}
				slices.Sort(g.OtherHashes)
				g.OtherHashes = slices.Compact(g.OtherHashes)
			}
			f.Category = g
		case spec.KindNumber:
			n := *f.Number
			n.Docs, n.MissingDocs = st.n, st.missing
			n.Mean, n.Min, n.Max = st.mean, st.min, st.max
			if st.n > 0 {
				n.SD = math.Sqrt(st.m2 / float64(st.n))
			}
			f.Number = &n
		case spec.KindTime:
			t := *f.Time
			t.Docs, t.MissingDocs = st.n, st.missing
			f.Time = &t
		}
		out[i] = f
	}
	return out
}

// Stats returns the training figures of the fields observed so far, one
// per field; minDocs is the vocabulary's (0 in hashing mode).
func (fl *Learner) Stats(minDocs int64) []Stat {
	out := make([]Stat, len(fl.fields))
	for i, f := range fl.fields {
		st := &fl.stats[i]
		out[i] = Stat{Name: f.Name, Kind: f.Kind, Docs: fl.docs, Missing: st.missing, Values: st.n,
			Mean: st.mean, Min: st.min, Max: st.max, DistinctSeen: int64(len(st.levels))}
		if st.n > 0 && f.Kind == spec.KindNumber {
			out[i].SD = math.Sqrt(st.m2 / float64(st.n))
		}
		if f.Kind != spec.KindNumber {
			out[i].Mean, out[i].Min, out[i].Max = 0, 0, 0
		}
		if f.Kind == spec.KindTime {
			out[i].First, out[i].Last = st.first, st.last
		}
		if f.Kind == spec.KindCategory {
			for _, n := range st.levels {
				if n < minDocs {
					out[i].Other += n
				}
			}
		}
	}
	return out
}
