package tablefield_test

import (
	"errors"
	"math"
	"path/filepath"
	"reflect"
	"testing"

	"github.com/bowline/bowline/hashing"
	"github.com/bowline/bowline/internal/encode"
	"github.com/bowline/bowline/internal/learn"
	"github.com/bowline/bowline/internal/tablefield"
	"github.com/bowline/bowline/internal/testkit"
	"github.com/bowline/bowline/ngram"
	"github.com/bowline/bowline/spec"
	"github.com/bowline/bowline/tokenize"
	"github.com/bowline/bowline/vocab"
	"github.com/bowline/bowline/weight"
)

// tableRecord is one invented training record: text and the values of
// zone (category), age (number, standard), spend (number, log) and
// created (time); "nil" marks an absent value.
type tableRecord struct {
	text                      string
	zone, age, spend, created string
}

const absent = "\x00nil"

func (r tableRecord) values() [][]byte {
	var out [][]byte
	for _, v := range []string{r.zone, r.age, r.spend, r.created} {
		if v == absent {
			out = append(out, nil)
		} else {
			out = append(out, []byte(v))
		}
	}
	return out
}

// tableTrain is the training table of the hand computations below.
var tableTrain = []tableRecord{
	{"a", "Harbour", "20", "0", "2024-03-15T06:00:00Z"},
	{"a", "harbour ", "30", "0", ""},
	{"a", "Old Town", "40", "3", absent},
	{"a", "old town", "-1", "3", "2024-01-01T00:00:00Z"},
	{"a", "OLD TOWN", "", "NA", "2024-01-01T12:00:00Z"},
	{"a", "quay", "50", "", "2024-01-01T12:00:00Z"},
	{"a", "", "60", absent, "2024-01-01T12:00:00Z"},
	{"a", absent, absent, absent, "2024-01-01T12:00:00Z"},
}

func tableSettings(t *testing.T, mode spec.Mode) *learn.Settings {
	t.Helper()
	s := &learn.Settings{
		Input:  spec.Input{Format: "tsv", Text: []string{"text"}},
		Tokens: tokenize.DefaultOptions(),
		NGrams: ngram.Config{Words: ngram.Range{Min: 1, Max: 1}},
		Mode:   mode,
		TF:     weight.TFCount, IDF: weight.IDFNone, Norm: weight.NormNone,
		Cutoffs: vocab.Cutoffs{MinDocs: 2, MaxDocShare: 1},
	}
	if mode == spec.ModeHashing {
		s.Hashing = spec.Hashing{Width: 1 << 20, Seed: 3}
	}
	zone, _ := tablefield.ParseCategory("zone")
	age, err := tablefield.ParseNumber("age:standard", []string{"-1", "NA"})
	if err != nil {
		t.Fatal(err)
	}
	spend, err := tablefield.ParseNumber("spend:log", []string{"-1", "NA"})
	if err != nil {
		t.Fatal(err)
	}
	created, err := tablefield.ParseTime("created", "")
	if err != nil {
		t.Fatal(err)
	}
	s.Fields = []spec.TableField{zone, age, spend, created}
	return s
}

func learnTable(t *testing.T, s *learn.Settings, recs []tableRecord) *spec.Spec {
	t.Helper()
	l, err := learn.New(s)
	if err != nil {
		t.Fatal(err)
	}
	w := l.NewWorker()
	for _, r := range recs {
		if err := l.ObserveFields(r.values()); err != nil {
			t.Fatal(err)
		}
		w.Observe([][]byte{[]byte(r.text)})
	}
	sp, _, err := l.Finish(w, learn.LabelsFrom(nil, false))
	if err != nil {
		t.Fatal(err)
	}
	return sp
}

// TestTableFieldsRows encodes hand-made records with the frozen spec and
// compares every value with a computation by hand. Column 0 is the text
// key "a"; zone takes 1 old town, 2 harbour, 3 other, 4 missing, 5 unseen;
// age 6 and its indicator 7; spend 8 and 9; created 10-15 and 16.
func TestTableFieldsRows(t *testing.T) {
	sp := learnTable(t, tableSettings(t, spec.ModeVocabulary), tableTrain)
	enc, err := encode.New(sp)
	if err != nil {
		t.Fatal(err)
	}
	// 2024-03-15 was a Friday (util-linux "cal 3 2024"; GNU date
	// "date -d 2024-03-15 +%A" prints Friday): day of week 4 with Monday
	// 0. It is day 75 of the leap year 2024 (31 + 29 + 15), so y = 74 of
	// n = 366. Computed by hand (with a calculator): sin(2π·4/7) =
	// −0.4338837391175581, cos(2π·4/7) = −0.9009688679024191,
	// sin(2π·74/366) = 0.9552106508146316, cos(2π·74/366) =
	// 0.2959267013472893. 06:00 is a quarter of the day: sin(π/2) = 1,
	// cos(π/2) = 0 up to rounding (6.1e-17).
	friday := map[int]float64{10: 1, 11: 6.123233995736766e-17, 12: -0.4338837391175581, 13: -0.9009688679024191,
		14: 0.9552106508146316, 15: 0.2959267013472893}
	cases := []struct {
		name string
		rec  tableRecord
		want map[int]float64
	}{
		{
			// "Old town" folds to a kept level; age 30 is (30−40)/√200 =
			// −1/√2 ≈ −0.7071067811865475; spend 3 is ln 4 ≈
			// 1.3862943611198906 (log only, not standardized).
			name: "levels and values",
			rec:  tableRecord{"a", "Old town", "30", "3", "2024-03-15T06:00:00Z"},
			want: merge(map[int]float64{0: 1, 1: 1, 6: -0.7071067811865475, 8: 1.3862943611198906}, friday),
		},
		{
			// quay was below --min-docs: other. Age missing: imputed with
			// the mean, which standardizes to 0 (left out), indicator 1.
			// Spend "NA" is a sentinel: the training mean of ln(1+x),
			// ln 2 ≈ 0.6931471805599453, indicator 1. Time missing:
			// indicator only. A time with an offset is read in UTC:
			// 07:00+01:00 is 06:00.
			name: "other and missing",
			rec:  tableRecord{"a", "QUAY", "", "NA", absent},
			want: map[int]float64{0: 1, 3: 1, 7: 1, 8: 0.6931471805599453, 9: 1, 16: 1},
		},
		{
			// pier was never seen: unseen. Age 55: 15/√200 ≈
			// 1.0606601717798212. Spend 7 is ln 8 ≈ 2.0794415416798357,
			// above the training range. Absent zone would be missing;
			// here "" text gives no text column.
			name: "unseen and offset",
			rec:  tableRecord{"", "pier", "55", "7", "2024-03-15T07:00:00+01:00"},
			want: merge(map[int]float64{5: 1, 6: 1.0606601717798212, 8: 2.0794415416798357}, friday),
		},
		{
			name: "all absent",
			rec:  tableRecord{"a", absent, absent, absent, absent},
			want: map[int]float64{0: 1, 4: 1, 7: 1, 8: 0.6931471805599453, 9: 1, 16: 1},
		},
	}
	w := enc.NewWorker(false)
	obs := enc.NewFieldObserver()
	for _, c := range cases {
		var row weight.Row
		if _, err := w.EncodeFields([][]byte{[]byte(c.rec.text)}, c.rec.values(), &row); err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		got := map[int]float64{}
		for i, col := range row.Indices {
			got[col] = row.Values[i]
			if i > 0 && row.Indices[i-1] >= col {
				t.Errorf("%s: indices not ascending: %v", c.name, row.Indices)
			}
		}
		if len(got) != len(c.want) {
			t.Errorf("%s: row %v, want %v", c.name, got, c.want)
		}
		for col, v := range c.want {
			if !testkit.Near(got[col], v, 1e-12) {
				t.Errorf("%s: column %d = %v, want %v", c.name, col, got[col], v)
			}
		}
		if err := obs.Observe(c.rec.values()); err != nil {
			t.Fatal(err)
		}
	}
	// Figures over the four records, counted by hand: zone missing 1
	// (absent), other 1, unseen 1; spend out of range 1 (7 > 3); age seen
	// 30 and 55: mean 42.5, population sd 12.5.
	st := obs.Stats()
	if z := st[0]; z.Docs != 4 || z.Missing != 1 || z.Other != 1 || z.Unseen != 1 {
		t.Errorf("zone figures %+v", z)
	}
	if a := st[1]; a.Values != 2 || a.Missing != 2 || a.Mean != 42.5 || a.SD != 12.5 || a.OutOfRange != 0 {
		t.Errorf("age figures %+v", a)
	}
	if s := st[2]; s.OutOfRange != 1 || s.Missing != 2 {
		t.Errorf("spend figures %+v", s)
	}
	if c := st[3]; c.Missing != 2 || c.Values != 2 || !c.First.Equal(c.Last) {
		t.Errorf("created figures %+v", c)
	}
}

func merge(a, b map[int]float64) map[int]float64 {
	out := map[int]float64{}
	for k, v := range a {
		out[k] = v
	}
	for k, v := range b {
		out[k] = v
	}
	return out
}

// TestTableFieldsBadData checks that unreadable values are *tablefield.ValueError
// values naming the field, and that nothing of such a record is counted.
func TestTableFieldsBadData(t *testing.T) {
	sp := learnTable(t, tableSettings(t, spec.ModeVocabulary), tableTrain)
	enc, _ := encode.New(sp)
	w := enc.NewWorker(false)
	obs := enc.NewFieldObserver()
	for _, c := range []struct {
		rec   tableRecord
		field string
	}{
		{tableRecord{"a", "x", "1", "-2", ""}, "spend"},            // negative under log
		{tableRecord{"a", "x", "ten", "1", ""}, "age"},             // not a number
		{tableRecord{"a", "x", "NaN", "1", ""}, "age"},             // not finite
		{tableRecord{"a", "x", "1", "1", "15/03/2024"}, "created"}, // not RFC 3339
	} {
		var row weight.Row
		_, err := w.EncodeFields([][]byte{[]byte("a")}, c.rec.values(), &row)
		var fe *tablefield.ValueError
		if !errors.As(err, &fe) || fe.Field != c.field {
			t.Errorf("%+v: error %v, want a FieldError for %s", c.rec, err, c.field)
		}
		if err := obs.Observe(c.rec.values()); !errors.As(err, &fe) {
			t.Errorf("observer: %v", err)
		}
	}
	if st := obs.Stats(); st[0].Docs != 0 {
		t.Errorf("bad records counted: %+v", st[0])
	}
	l, _ := learn.New(tableSettings(t, spec.ModeVocabulary))
	if err := l.ObserveFields(tableRecord{"a", "x", "1", "-1.5", ""}.values()); err == nil {
		t.Error("learner took a negative value under log")
	}
	if st := l.FieldStats(); st[0].Docs != 0 {
		t.Errorf("learner counted a bad record: %+v", st[0])
	}
}

// TestTableFieldsSpecRoundTrip: save and load keep the rows; applying the
// spec twice gives the same rows; two identical learns give the same
// fingerprint.
func TestTableFieldsSpecRoundTrip(t *testing.T) {
	for _, mode := range []spec.Mode{spec.ModeVocabulary, spec.ModeHashing} {
		sp := learnTable(t, tableSettings(t, mode), tableTrain)
		if again := learnTable(t, tableSettings(t, mode), tableTrain); again.Fingerprint != sp.Fingerprint {
			t.Errorf("%s: two learns differ", mode)
		}
		p := filepath.Join(t.TempDir(), "s.json.gz")
		if err := sp.Save(p); err != nil {
			t.Fatal(err)
		}
		back, err := spec.Load(p)
		if err != nil {
			t.Fatal(err)
		}
		e1, _ := encode.New(sp)
		e2, _ := encode.New(back)
		for _, r := range append(tableTrain, tableRecord{"dock", "pier", "99", "12", "2023-12-31T23:59:00Z"}) {
			r1, _, err1 := e1.EncodeFields([][]byte{[]byte(r.text)}, r.values())
			r2, _, err2 := e2.EncodeFields([][]byte{[]byte(r.text)}, r.values())
			r3, _, _ := e1.EncodeFields([][]byte{[]byte(r.text)}, r.values())
			if err1 != nil || err2 != nil || !reflect.DeepEqual(r1, r2) || !reflect.DeepEqual(r1, r3) {
				t.Errorf("%s %+v: %v %v / %v %v", mode, r, r1, err1, r2, err2)
			}
		}
	}
}

// TestTableFieldsHashing checks hashing mode by hand: each feature lands
// in the bucket of its key (hashing.Hasher, checked against xxhsum in
// package hashing) with its value, summed with any text key there.
func TestTableFieldsHashing(t *testing.T) {
	sp := learnTable(t, tableSettings(t, spec.ModeHashing), tableTrain)
	if g := sp.Content.Fields[0].Category; len(g.Levels) != 0 || len(g.OtherHashes) != 0 || g.MissingDocs != 2 {
		t.Errorf("hashing mode stored levels: %+v", g)
	}
	enc, _ := encode.New(sp)
	row, _, err := enc.EncodeFields([][]byte{[]byte("a")}, tableRecord{"a", "Harbour", "30", absent, "2024-03-15T06:00:00Z"}.values())
	if err != nil {
		t.Fatal(err)
	}
	h, _ := hashing.New(1<<20, 3, false)
	want := map[uint64]float64{}
	add := func(key string, v float64) { b, _ := h.Bucket([]byte(key)); want[b] += v }
	add("a", 1)
	add("zone=harbour", 1)
	add("age=", -0.7071067811865475)
	add("spend=", math.Ln2)
	add("spend<missing>", 1)
	for i, v := range []float64{1, 6.123233995736766e-17, -0.4338837391175581, -0.9009688679024191, 0.9552106508146316, 0.2959267013472893} {
		add("created:"+spec.TimeFeatures[i], v)
	}
	if len(row.Indices) != len(want) {
		t.Fatalf("row %v, want %v", row, want)
	}
	for i, c := range row.Indices {
		if !testkit.Near(row.Values[i], want[uint64(c)], 1e-12) {
			t.Errorf("bucket %d = %v, want %v", c, row.Values[i], want[uint64(c)])
		}
	}
}

// TestTableFieldsRefusals: a spec with table fields cannot be extended or
// sharded, and a tampered field is refused by Validate.
func TestTableFieldsRefusals(t *testing.T) {
	sp := learnTable(t, tableSettings(t, spec.ModeVocabulary), tableTrain)
	if _, err := learn.NewExtend(sp, vocab.DefaultCutoffs(), sp.Content.Input); err == nil {
		t.Error("extend accepted a spec with table fields")
	}
	l, _ := learn.New(tableSettings(t, spec.ModeVocabulary))
	if _, err := l.Shard(l.NewWorker(), spec.Labels{}); err == nil {
		t.Error("shard accepted table fields")
	}
	bad := *sp
	bad.Content.Fields = spec.CloneFields(sp.Content.Fields)
	bad.Content.Fields[1].Number.SD = -1
	if err := bad.Validate(); err == nil {
		t.Error("negative sd accepted")
	}
	bad.Content.Fields = spec.CloneFields(sp.Content.Fields)
	bad.Content.Fields[3].Time.Zone = "Nowhere/Else"
	if err := bad.Validate(); err == nil {
		t.Error("unknown zone accepted")
	}
	// A learner that saw the text of more records than their fields.
	l2, _ := learn.New(tableSettings(t, spec.ModeVocabulary))
	w := l2.NewWorker()
	w.Observe([][]byte{[]byte("a")})
	if _, _, err := l2.Finish(w, learn.LabelsFrom(nil, false)); err == nil {
		t.Error("Finish accepted records without their fields")
	}
	if _, err := tablefield.ParseNumber("age:cube", nil); err == nil {
		t.Error("unknown transform accepted")
	}
}
