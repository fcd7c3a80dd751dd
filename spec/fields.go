package spec

import (
	"bytes"
	"errors"
	"fmt"
	"math"
	"slices"
	"sort"
	"strconv"
	"strings"
	"time"
	_ "time/tzdata" // --time-zone works on machines without a zoneinfo database

	"github.com/bowline/bowline/tokenize"
	"github.com/cespare/xxhash/v2"
)

// Table field kinds.
const (
	KindCategory = "category"
	KindNumber   = "number"
	KindTime     = "time"
)

// Reserved level and feature names of table fields.
const (
	LevelOther   = "<other>"
	LevelMissing = "<missing>"
	LevelUnseen  = "<unseen>"
	// MissingSuffix ends the name of a number's or a time's missing
	// indicator ("age<missing>").
	MissingSuffix = "<missing>"
)

// TimeFeatures are the names of a time field's periodic features, in
// column order, after the field name and a colon ("created:hour_sin").
var TimeFeatures = [6]string{"hour_sin", "hour_cos", "dow_sin", "dow_cos", "doy_sin", "doy_cos"}

// MaxLevels bounds the distinct levels one category field may have in a
// training corpus.
const MaxLevels = 100000

// TableField is a field read beside the text: a category, a number or a
// timestamp, with its settings and the numbers frozen at learn time.
// Exactly the member named by Kind is set.
type TableField struct {
	// Name is the corpus field (header name, column number or JSON key).
	Name string `json:"name"`
	// Kind is KindCategory, KindNumber or KindTime.
	Kind     string    `json:"kind"`
	Category *Category `json:"category,omitempty"`
	Number   *Number   `json:"number,omitempty"`
	Time     *Time     `json:"time,omitempty"`
}

// Category is a categorical field: one column per level kept, then the
// reserved levels other, missing and unseen (vocabulary mode). In hashing
// mode no level is stored: each level is hashed as "name=level".
type Category struct {
	// MinDocs is the spec's --min-docs: levels found in fewer training
	// documents fold into other (vocabulary mode; 0 in hashing mode).
	MinDocs int64 `json:"min_docs"`
	// Levels are the kept levels, normalized like tokens, in column
	// order: descending training document count, ties by bytes.
	// LevelDocs are their training document counts.
	Levels    []string `json:"levels,omitempty"`
	LevelDocs []int64  `json:"level_docs,omitempty"`
	// OtherHashes are the XXH64 (seed 0) sums of the levels folded into
	// other, ascending: the spec keeps no string of a rare level, yet
	// tells it from a level never seen.
	OtherHashes []uint64 `json:"other_hashes,omitempty"`
	// OtherDocs and MissingDocs count training documents whose level
	// folded into other, and whose value was missing.
	OtherDocs   int64 `json:"other_docs"`
	MissingDocs int64 `json:"missing_docs"`
}

// Number is a numeric field: a value column and a missing indicator.
type Number struct {
	// Log applies ln(1+x) (x >= 0); Standard then subtracts Mean and
	// divides by SD.
	Log      bool `json:"log"`
	Standard bool `json:"standard"`
	// Sentinels are values that mean missing (--missing-value): a value
	// equal to one as text, or as a number, is missing.
	Sentinels []string `json:"sentinels,omitempty"`
	// Docs and MissingDocs count training documents with a value and
	// without one.
	Docs        int64 `json:"docs"`
	MissingDocs int64 `json:"missing_docs"`
	// Mean and SD are the mean and the population standard deviation
	// (divided by n) of the training values after Log, before Standard;
	// a missing value is replaced by Mean.
	Mean float64 `json:"mean"`
	SD   float64 `json:"sd"`
	// Min and Max are the smallest and largest training values, as read.
	Min float64 `json:"min"`
	Max float64 `json:"max"`
}

// Time is a timestamp field: sine and cosine of hour of day, day of week
// and day of year in Zone, and a missing indicator.
type Time struct {
	// Layout is a Go time layout (time.RFC3339 by default).
	Layout string `json:"layout"`
	// Zone is the IANA zone the periods are read in ("UTC").
	Zone string `json:"zone"`
	// Docs and MissingDocs count training documents with a time and
	// without one.
	Docs        int64 `json:"docs"`
	MissingDocs int64 `json:"missing_docs"`
}

// ParseCategory returns the settings of a category field (--category NAME).
func ParseCategory(arg string) (TableField, error) {
	if arg == "" {
		return TableField{}, errors.New("empty field name")
	}
	return TableField{Name: arg, Kind: KindCategory, Category: &Category{}}, nil
}

// ParseNumber returns the settings of a number field from
// "NAME[:log|:standard|:log,standard]", with the missing-value sentinels.
func ParseNumber(arg string, sentinels []string) (TableField, error) {
	name, tr, _ := strings.Cut(arg, ":")
	if name == "" {
		return TableField{}, fmt.Errorf("%q: empty field name", arg)
	}
	n := &Number{Sentinels: append([]string(nil), sentinels...)}
	if tr != "" {
		for _, t := range strings.Split(tr, ",") {
			switch t {
			case "log":
				n.Log = true
			case "standard":
				n.Standard = true
			default:
				return TableField{}, fmt.Errorf("%q: unknown transform %q (want log, standard or log,standard)", arg, t)
			}
		}
	}
	return TableField{Name: name, Kind: KindNumber, Number: n}, nil
}

// ParseTime returns the settings of a time field from "NAME[:LAYOUT]"
// (RFC 3339 when no layout is given) read in the IANA zone.
func ParseTime(arg, zone string) (TableField, error) {
	name, layout, _ := strings.Cut(arg, ":")
	if name == "" {
		return TableField{}, fmt.Errorf("%q: empty field name", arg)
	}
	if layout == "" {
		layout = time.RFC3339
	}
	if zone == "" {
		zone = "UTC"
	}
	if _, err := time.LoadLocation(zone); err != nil {
		return TableField{}, fmt.Errorf("time zone %q: %v", zone, err)
	}
	return TableField{Name: name, Kind: KindTime, Time: &Time{Layout: layout, Zone: zone}}, nil
}

// Columns is the number of columns the field takes in vocabulary mode.
func (f *TableField) Columns() int {
	switch f.Kind {
	case KindCategory:
		return len(f.Category.Levels) + 3
	case KindNumber:
		return 2
	case KindTime:
		return len(TimeFeatures) + 1
	}
	return 0
}

// FieldColumn names one table-field column of a vocabulary spec.
type FieldColumn struct {
	// Feature is the column's name in the feature map ("zone=harbour",
	// "zone=<other>", "age", "age<missing>", "created:hour_sin").
	Feature string
	// Docs is the number of training documents with the column set.
	Docs int64
}

// FieldColumns lists the table-field columns in column order (they follow
// the text columns in vocabulary mode).
func (c *Content) FieldColumns() []FieldColumn {
	var out []FieldColumn
	for i := range c.Fields {
		f := &c.Fields[i]
		switch f.Kind {
		case KindCategory:
			g := f.Category
			for j, l := range g.Levels {
				out = append(out, FieldColumn{f.Name + "=" + l, g.LevelDocs[j]})
			}
			out = append(out, FieldColumn{f.Name + "=" + LevelOther, g.OtherDocs},
				FieldColumn{f.Name + "=" + LevelMissing, g.MissingDocs},
				FieldColumn{f.Name + "=" + LevelUnseen, 0})
		case KindNumber:
			out = append(out, FieldColumn{f.Name, f.Number.Docs}, FieldColumn{f.Name + MissingSuffix, f.Number.MissingDocs})
		case KindTime:
			for _, t := range TimeFeatures {
				out = append(out, FieldColumn{f.Name + ":" + t, f.Time.Docs})
			}
			out = append(out, FieldColumn{f.Name + MissingSuffix, f.Time.MissingDocs})
		}
	}
	return out
}

// fieldColumns is the number of table-field columns in vocabulary mode.
func (c *Content) fieldColumns() int {
	n := 0
	for i := range c.Fields {
		n += c.Fields[i].Columns()
	}
	return n
}

// validateFields checks the table fields of c.
func (c *Content) validateFields() error {
	seen := map[string]bool{}
	for i := range c.Fields {
		f := &c.Fields[i]
		if f.Name == "" {
			return fmt.Errorf("fields: field %d has no name", i)
		}
		if seen[f.Name] {
			return fmt.Errorf("fields: %q appears twice", f.Name)
		}
		seen[f.Name] = true
		set := 0
		for _, p := range []bool{f.Category != nil, f.Number != nil, f.Time != nil} {
			if p {
				set++
			}
		}
		bad := func(format string, a ...any) error {
			return fmt.Errorf("fields: %q: "+format, append([]any{f.Name}, a...)...)
		}
		if set != 1 {
			return bad("needs exactly one of category, number, time")
		}
		switch f.Kind {
		case KindCategory:
			g := f.Category
			if g == nil {
				return bad("kind category without category settings")
			}
			if len(g.LevelDocs) != len(g.Levels) {
				return bad("%d levels but %d document counts", len(g.Levels), len(g.LevelDocs))
			}
			if c.Mode == ModeHashing && (len(g.Levels) > 0 || len(g.OtherHashes) > 0) {
				return bad("hashing mode stores no levels")
			}
			lv := map[string]bool{}
			for _, l := range g.Levels {
				if l == "" || lv[l] {
					return bad("level %q empty or repeated", l)
				}
				lv[l] = true
			}
			if !slices.IsSorted(g.OtherHashes) {
				return bad("other hashes not ascending")
			}
		case KindNumber:
			n := f.Number
			if n == nil {
				return bad("kind number without number settings")
			}
			for _, x := range []float64{n.Mean, n.SD, n.Min, n.Max} {
				if math.IsNaN(x) || math.IsInf(x, 0) {
					return bad("statistics must be finite")
				}
			}
			if n.SD < 0 {
				return bad("negative standard deviation")
			}
		case KindTime:
			t := f.Time
			if t == nil {
				return bad("kind time without time settings")
			}
			if t.Layout == "" {
				return bad("empty time layout")
			}
			if _, err := time.LoadLocation(t.Zone); err != nil {
				return bad("time zone %q: %v", t.Zone, err)
			}
		default:
			return bad("unknown kind %q", f.Kind)
		}
	}
	return nil
}

// A FieldError is a table-field value that cannot be read: not a number,
// a negative number under log, or not a time in the field's layout.
type FieldError struct {
	// Field is the field's name.
	Field string
	// Value is the value as read.
	Value string
	// Reason says what is wrong.
	Reason string
}

func (e *FieldError) Error() string {
	return fmt.Sprintf("field %q: %s: %s", e.Field, strconv.Quote(e.Value), e.Reason)
}

// fieldCodec reads the values of one table field.
type fieldCodec struct {
	f         *TableField
	sentinels [][]byte
	sentNums  []float64
	loc       *time.Location
	levels    map[string]int // category level → index among its columns
	base      int            // first column (vocabulary mode)
	// hashing mode: fixed keys, hashed once
	keySums []uint64
}

func newFieldCodec(f *TableField) (*fieldCodec, error) {
	fc := &fieldCodec{f: f}
	switch f.Kind {
	case KindNumber:
		for _, s := range f.Number.Sentinels {
			fc.sentinels = append(fc.sentinels, []byte(s))
			if x, err := strconv.ParseFloat(strings.TrimSpace(s), 64); err == nil {
				fc.sentNums = append(fc.sentNums, x)
			}
		}
	case KindTime:
		loc, err := time.LoadLocation(f.Time.Zone)
		if err != nil {
			return nil, err
		}
		fc.loc = loc
	case KindCategory:
		fc.levels = make(map[string]int, len(f.Category.Levels))
		for i, l := range f.Category.Levels {
			fc.levels[l] = i
		}
	default:
		return nil, fmt.Errorf("unknown field kind %q", f.Kind)
	}
	return fc, nil
}

// number reads a number value: missing, or the value as read (raw) and
// after the log transform (x).
func (fc *fieldCodec) number(v []byte) (raw, x float64, missing bool, err error) {
	v = bytes.TrimSpace(v)
	if len(v) == 0 {
		return 0, 0, true, nil
	}
	for _, s := range fc.sentinels {
		if bytes.Equal(v, s) {
			return 0, 0, true, nil
		}
	}
	raw, perr := strconv.ParseFloat(string(v), 64)
	if perr != nil || math.IsNaN(raw) || math.IsInf(raw, 0) {
		return 0, 0, false, &FieldError{Field: fc.f.Name, Value: string(v), Reason: "not a number (and not a --missing-value sentinel)"}
	}
	for _, s := range fc.sentNums {
		if raw == s {
			return 0, 0, true, nil
		}
	}
	x = raw
	if fc.f.Number.Log {
		if raw < 0 {
			return 0, 0, false, &FieldError{Field: fc.f.Name, Value: string(v), Reason: "negative; log (ln(1+x)) takes values >= 0"}
		}
		x = math.Log1p(raw)
	}
	return raw, x, false, nil
}

// when reads a time value in the field's zone.
func (fc *fieldCodec) when(v []byte) (t time.Time, missing bool, err error) {
	v = bytes.TrimSpace(v)
	if len(v) == 0 {
		return t, true, nil
	}
	t, perr := time.ParseInLocation(fc.f.Time.Layout, string(v), fc.loc)
	if perr != nil {
		return t, false, &FieldError{Field: fc.f.Name, Value: string(v), Reason: "not a time in the layout " + strconv.Quote(fc.f.Time.Layout)}
	}
	return t.In(fc.loc), false, nil
}

// level normalizes a category value with tok into buf; an empty result is
// a missing value.
func level(tok *tokenize.Tokenizer, buf, v []byte) []byte {
	v = bytes.TrimSpace(v)
	if len(v) == 0 {
		return buf[:0]
	}
	return tok.AppendNormalized(buf[:0], v)
}

// Category classes of a value.
const (
	classLevel = iota
	classOther
	classMissing
	classUnseen
)

// classify places a normalized level (vocabulary mode).
func (fc *fieldCodec) classify(l []byte) (class, index int) {
	if len(l) == 0 {
		return classMissing, 0
	}
	if i, ok := fc.levels[string(l)]; ok {
		return classLevel, i
	}
	if _, ok := slices.BinarySearch(fc.f.Category.OtherHashes, xxhash.Sum64(l)); ok {
		return classOther, 0
	}
	return classUnseen, 0
}

// Periodic returns the six periodic features of t, in the order of
// TimeFeatures: with h = hour + minute/60 + second/3600, d the day of the
// week with Monday = 0, y the day of the year counted from 0 and n the
// number of days in t's year (365 or 366), the angles are 2π·h/24, 2π·d/7
// and 2π·y/n, each giving its sine and cosine. t is read in its own
// location.
func Periodic(t time.Time) [6]float64 {
	h := float64(t.Hour()) + float64(t.Minute())/60 + float64(t.Second())/3600
	d := float64((int(t.Weekday()) + 6) % 7)
	days := 365.0
	if y := t.Year(); y%4 == 0 && (y%100 != 0 || y%400 == 0) {
		days = 366
	}
	yd := float64(t.YearDay() - 1)
	a, b, c := 2*math.Pi*h/24, 2*math.Pi*d/7, 2*math.Pi*yd/days
	return [6]float64{math.Sin(a), math.Cos(a), math.Sin(b), math.Cos(b), math.Sin(c), math.Cos(c)}
}

// fieldLearner gathers the training statistics of the table fields, one
// record at a time, in input order.
type fieldLearner struct {
	hashing bool // levels are not counted in hashing mode
	fields  []TableField
	codecs  []*fieldCodec
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

func newFieldLearner(fields []TableField, mode string, tok tokenize.Options) (*fieldLearner, error) {
	fl := &fieldLearner{fields: fields, stats: make([]learnStat, len(fields)), hashing: mode == ModeHashing}
	for i := range fields {
		fc, err := newFieldCodec(&fields[i])
		if err != nil {
			return nil, err
		}
		fl.codecs = append(fl.codecs, fc)
		if fields[i].Kind == KindCategory {
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

// observe reads one record's values; nothing is counted when a value is
// bad.
func (fl *fieldLearner) observe(values [][]byte) error {
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
		case KindNumber:
			fl.raws[i], fl.xs[i], fl.miss[i], err = fc.number(val(i))
		case KindTime:
			fl.times[i], fl.miss[i], err = fc.when(val(i))
		case KindCategory:
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
		case KindCategory:
			if !fl.hashing {
				st.levels[string(fl.lv[i])]++
			}
		case KindNumber:
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
		case KindTime:
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

// finish freezes the statistics into the fields.
func (fl *fieldLearner) finish(mode string, minDocs int64) []TableField {
	out := make([]TableField, len(fl.fields))
	for i, f := range fl.fields {
		st := &fl.stats[i]
		switch f.Kind {
		case KindCategory:
			g := &Category{MissingDocs: st.missing}
			if mode == ModeVocabulary {
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
		case KindNumber:
			n := *f.Number
			n.Docs, n.MissingDocs = st.n, st.missing
			n.Mean, n.Min, n.Max = st.mean, st.min, st.max
			if st.n > 0 {
				n.SD = math.Sqrt(st.m2 / float64(st.n))
			}
			f.Number = &n
		case KindTime:
			t := *f.Time
			t.Docs, t.MissingDocs = st.n, st.missing
			f.Time = &t
		}
		out[i] = f
	}
	return out
}

// copyFields returns a deep copy of the settings of fields.
func copyFields(fields []TableField) []TableField {
	if fields == nil {
		return nil
	}
	out := make([]TableField, len(fields))
	for i, f := range fields {
		if f.Category != nil {
			g := *f.Category
			f.Category = &g
		}
		if f.Number != nil {
			n := *f.Number
			n.Sentinels = slices.Clone(n.Sentinels)
			f.Number = &n
		}
		if f.Time != nil {
			t := *f.Time
			f.Time = &t
		}
		out[i] = f
	}
	return out
}
