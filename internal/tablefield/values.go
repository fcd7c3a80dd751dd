package tablefield

import (
	"bytes"
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"
	"time"

	"github.com/bowline/bowline/spec"
	"github.com/bowline/bowline/tokenize"
	"github.com/cespare/xxhash/v2"
)

// A ValueError is a table-field value that cannot be read: not a number,
// a negative number under log, or not a time in the field's layout.
type ValueError struct {
	// Field is the field's name.
	Field string
	// Value is the value as read.
	Value string
	// Reason says what is wrong.
	Reason string
}

func (e *ValueError) Error() string {
	return fmt.Sprintf("field %q: %s: %s", e.Field, strconv.Quote(e.Value), e.Reason)
}

// codec reads the values of one table field.
type codec struct {
	f         *spec.TableField
	sentinels [][]byte
	sentNums  []float64
	loc       *time.Location
	levels    map[string]int // category level → index among its columns
	base      int            // first column (vocabulary mode)
	// hashing mode: fixed keys, hashed once
	keySums []uint64
}

func newCodec(f *spec.TableField) (*codec, error) {
	fc := &codec{f: f}
	switch f.Kind {
	case spec.KindNumber:
		for _, s := range f.Number.Sentinels {
			fc.sentinels = append(fc.sentinels, []byte(s))
			if x, err := strconv.ParseFloat(strings.TrimSpace(s), 64); err == nil {
				fc.sentNums = append(fc.sentNums, x)
			}
		}
	case spec.KindTime:
		loc, err := time.LoadLocation(f.Time.Zone)
		if err != nil {
			return nil, err
		}
		fc.loc = loc
	case spec.KindCategory:
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
func (fc *codec) number(v []byte) (raw, x float64, missing bool, err error) {
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
		return 0, 0, false, &ValueError{Field: fc.f.Name, Value: string(v), Reason: "not a number (and not a --missing-value sentinel)"}
	}
	for _, s := range fc.sentNums {
		if raw == s {
			return 0, 0, true, nil
		}
	}
	x = raw
	if fc.f.Number.Log {
		if raw < 0 {
			return 0, 0, false, &ValueError{Field: fc.f.Name, Value: string(v), Reason: "negative; log (ln(1+x)) takes values >= 0"}
		}
		x = math.Log1p(raw)
	}
	return raw, x, false, nil
}

// when reads a time value in the field's zone.
func (fc *codec) when(v []byte) (t time.Time, missing bool, err error) {
	v = bytes.TrimSpace(v)
	if len(v) == 0 {
		return t, true, nil
	}
	t, perr := time.ParseInLocation(fc.f.Time.Layout, string(v), fc.loc)
	if perr != nil {
		return t, false, &ValueError{Field: fc.f.Name, Value: string(v), Reason: "not a time in the layout " + strconv.Quote(fc.f.Time.Layout)}
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
func (fc *codec) classify(l []byte) (class, index int) {
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
// spec.TimeFeatures: with h = hour + minute/60 + second/3600, d the day of the
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
