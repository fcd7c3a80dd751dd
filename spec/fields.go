package spec

import (
	"fmt"
	"math"
	"slices"
	"time"
	_ "time/tzdata" // time zones load on machines without a zoneinfo database
)

// FieldKind is the kind of a table field. In a spec file it is the word
// "category", "number" or "time".
type FieldKind string

// Table field kinds.
const (
	KindCategory FieldKind = "category"
	KindNumber   FieldKind = "number"
	KindTime     FieldKind = "time"
)

// MarshalText returns the kind's word; another kind (but unset, "") is an
// error.
func (k FieldKind) MarshalText() ([]byte, error) {
	switch k {
	case KindCategory, KindNumber, KindTime, "":
		return []byte(k), nil
	}
	return nil, fmt.Errorf("unknown field kind %q", string(k))
}

// UnmarshalText reads "category", "number" or "time" (or "", unset,
// which Validate refuses).
func (k *FieldKind) UnmarshalText(b []byte) error {
	v := FieldKind(b)
	if _, err := v.MarshalText(); err != nil {
		return err
	}
	*k = v
	return nil
}

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

// TableField is a field read beside the text: a category, a number or a
// timestamp, with its settings and the numbers frozen at learn time.
// Exactly the member named by Kind is set.
type TableField struct {
	// Name is the corpus field (header name, column number or JSON key).
	Name string `json:"name"`
	// Kind is KindCategory, KindNumber or KindTime.
	Kind     FieldKind `json:"kind"`
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

// ValidateFields checks the table fields of c.
func (c *Content) ValidateFields() error {
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

// CloneFields returns a deep copy of fields.
func CloneFields(fields []TableField) []TableField {
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
