package report

import (
	"fmt"
	"math"
	"math/bits"
	"strconv"
	"strings"
	"time"
)

// The text and HTML renderings share one view of the figures: a list of
// sections, each with label/value pairs and tables, and a caution that only
// the page shows. Building it once keeps both renderings showing the same
// numbers with the same formatting.

// topCount is how many stop words the run section lists inline.
const topCount = 5

// sections builds the view of f. Sections without content are left out.
func (f *Figures) sections() []Section {
	var out []Section
	if s := f.runSection(); len(s.Pairs) > 0 {
		out = append(out, s)
	}
	if f.OOV != nil {
		out = append(out, f.oovSection())
	}
	if f.Collisions != nil {
		out = append(out, f.collisionSection())
	}
	if s := f.Sparsity; s != nil && (s.Rows != 0 || s.NNZ != 0) {
		out = append(out, f.sparsitySection())
	}
	if f.Vocabulary != nil {
		out = append(out, f.vocabSection())
	}
	if len(f.Labels) > 0 {
		out = append(out, f.labelSection())
	}
	if len(f.Fields) > 0 {
		out = append(out, f.fieldSection())
	}
	if t := f.Throughput; t.Seconds != 0 || t.Bytes != 0 || t.MBPerSec != 0 || t.DocsPerSec != 0 {
		out = append(out, f.throughputSection())
	}
	return out
}

func (f *Figures) runSection() Section {
	s := Section{Title: "run"}
	add := func(label, value string) {
		if value != "" {
			s.Pairs = append(s.Pairs, Pair{label, value})
		}
	}
	add("command", f.Command)
	add("input", f.Input)
	add("spec", f.Spec)
	add("mode", f.Mode)
	if f.Docs == 0 && f.Tokens == 0 && f.Features == 0 && len(s.Pairs) == 0 {
		return s
	}
	add("docs", itoa(f.Docs))
	add("empty docs", join(itoa(f.EmptyDocs), share(f.EmptyDocs, f.Docs)))
	if f.Rejected != 0 {
		add("rejected", itoa(f.Rejected)+" records skipped (--on-error skip), kept in the rejects file")
	}
	add("tokens", itoa(f.Tokens))
	if f.StopDropped != 0 || len(f.TopStopWords) > 0 {
		v := itoa(f.StopDropped) + "  " + Percent(f.StopShare)
		if len(f.TopStopWords) > 0 {
			n := min(len(f.TopStopWords), topCount)
			words := make([]string, n)
			for i, c := range f.TopStopWords[:n] {
				words[i] = c.Name + " " + itoa(c.Count)
			}
			v += "  top: " + strings.Join(words, ", ")
		}
		add("stop words dropped", v)
	}
	add("features", itoa(f.Features))
	if f.InvalidUTF8 != 0 {
		add("invalid UTF-8", itoa(f.InvalidUTF8)+" bytes replaced by U+FFFD")
	}
	if f.NULs != 0 {
		add("NUL bytes", itoa(f.NULs)+" read as spaces")
	}
	return s
}

func (f *Figures) oovSection() Section {
	o := f.OOV
	s := Section{Title: "out-of-vocabulary"}
	s.Pairs = []Pair{
		{"token share", Percent(o.TokenShare) + "  (" + itoa(o.Unseen) + " of " + itoa(o.Features) + " features)"},
		{"type share", Percent(o.TypeShare) + "  (" + itoa(o.UnseenKeys) + " of " + itoa(o.Keys) + " distinct keys)"},
	}
	if len(o.ByOrder) > 0 {
		t := Table{
			Caption: "per n-gram order",
			Head:    []string{"order", "features", "unseen", "token share", "keys", "unseen keys", "type share"},
			Num:     []bool{false, true, true, true, true, true, true},
		}
		for _, r := range o.ByOrder {
			t.Rows = append(t.Rows, []string{r.Order, itoa(r.Features), itoa(r.Unseen), Percent(r.TokenShare),
				itoa(r.Keys), itoa(r.UnseenKeys), Percent(r.TypeShare)})
		}
		s.Tables = append(s.Tables, t)
	}
	if len(o.TopUnseen) > 0 {
		s.Tables = append(s.Tables, countTable("top unseen keys", "key", o.TopUnseen, 0))
		s.Caution = caution
	}
	return s
}

func (f *Figures) collisionSection() Section {
	c := f.Collisions
	s := Section{Title: "collisions"}
	rm, re := rates(c.Rate, c.ExpectedRate)
	s.Pairs = []Pair{
		{"buckets", width(c.Width)},
		{"distinct keys", itoa(c.Keys)},
		{"collision rate", rm + "  expected " + re},
		{"colliding keys", itoa(c.Colliding)},
		{"occupied buckets", itoa(c.Occupied) + "  expected " + strconv.FormatFloat(c.ExpectedOccupied, 'f', 1, 64)},
	}
	for i, b := range c.Crowded {
		label := ""
		if i == 0 {
			label = "crowded buckets"
		}
		s.Pairs = append(s.Pairs, Pair{label, "column " + itoa(b.Column) + ": " + strings.Join(b.Names, ", ")})
	}
	return s
}

func (f *Figures) sparsitySection() Section {
	p := *f.Sparsity
	s := Section{Title: "sparsity"}
	s.Pairs = []Pair{
		{"rows x columns", itoa(p.Rows) + " x " + itoa(p.Columns)},
		{"non-zeros", itoa(p.NNZ)},
		{"per row", "mean " + strconv.FormatFloat(p.MeanNNZ, 'f', 1, 64) + "  max " + itoa(p.MaxNNZ)},
		{"density", sig(p.Density)},
		{"sparsity", pctNearOne(p.Sparsity)},
	}
	if len(p.NNZHistogram) > 0 {
		t := Table{
			Caption: "rows by non-zeros",
			Head:    []string{"non-zeros", "rows", "share"},
			Num:     []bool{false, true, true},
		}
		for i, n := range p.NNZHistogram {
			t.Rows = append(t.Rows, []string{binLabel(i), itoa(n), share(n, p.Rows)})
		}
		s.Tables = append(s.Tables, t)
	}
	return s
}

func (f *Figures) vocabSection() Section {
	v := f.Vocabulary
	s := Section{Title: "vocabulary"}
	s.Pairs = []Pair{
		{"keys seen", itoa(v.Seen)},
		{"kept", join(itoa(v.Kept), share(v.Kept, v.Seen))},
		{"cut by --min-docs", itoa(v.BelowMinDocs)},
		{"cut by --max-doc-share", itoa(v.AboveMaxShare)},
		{"cut by --max-terms", itoa(v.OverMaxTerms)},
	}
	if len(v.ByOrder) > 0 {
		t := Table{Caption: "kept per n-gram order", Head: []string{"order", "kept", "share"}, Num: []bool{false, true, true}}
		for _, c := range v.ByOrder {
			t.Rows = append(t.Rows, []string{c.Name, itoa(c.Count), share(c.Count, v.Kept)})
		}
		s.Tables = append(s.Tables, t)
	}
	if len(v.TopTerms) > 0 {
		s.Tables = append(s.Tables, countTable("top terms by document count", "term", v.TopTerms, 0))
		s.Caution = caution
	}
	return s
}

func (f *Figures) labelSection() Section {
	var total int64
	for _, c := range f.Labels {
		total += c.Count
	}
	return Section{Title: "labels", Tables: []Table{countTable("", "label", f.Labels, total)}}
}

func (f *Figures) throughputSection() Section {
	t := f.Throughput
	s := Section{Title: "throughput"}
	s.Pairs = []Pair{
		{"speed", strconv.FormatFloat(t.MBPerSec, 'f', 2, 64) + " MB/s  " + strconv.FormatFloat(t.DocsPerSec, 'f', 0, 64) + " docs/s"},
		{"read", itoa(t.Bytes) + " bytes"},
		{"elapsed", elapsed(t.Seconds)},
	}
	if t.Workers > 0 {
		s.Pairs = append(s.Pairs, Pair{"workers", strconv.Itoa(t.Workers)})
	}
	return s
}

// countTable lists names with counts; with total > 0 it adds a share column.
func countTable(caption, name string, cs []Count, total int64) Table {
	t := Table{Caption: caption, Head: []string{name, "count"}, Num: []bool{false, true}}
	if total > 0 {
		t.Head = append(t.Head, "share")
		t.Num = append(t.Num, true)
	}
	for _, c := range cs {
		row := []string{c.Name, itoa(c.Count)}
		if total > 0 {
			row = append(row, share(c.Count, total))
		}
		t.Rows = append(t.Rows, row)
	}
	return t
}

// caution is shown wherever strings from the corpus appear in the report.
const caution = "Caution: a vocabulary memorizes strings from the training text. " +
	"Specs, feature maps and reports made from tickets or reviews can carry personal data " +
	"(e-mail addresses, names, phone and order numbers) and must be handled like the text itself. " +
	"--min-docs 2 or more drops most one-off strings; hashing mode stores no strings at all."

// join joins the non-empty values with two spaces.
func join(vs ...string) string {
	out := vs[:0:0]
	for _, v := range vs {
		if v != "" {
			out = append(out, v)
		}
	}
	return strings.Join(out, "  ")
}

func itoa(n int64) string { return strconv.FormatInt(n, 10) }

// share formats part/whole as a percentage; an empty whole gives "".
func share(part, whole int64) string {
	if whole == 0 {
		return ""
	}
	return Percent(float64(part) / float64(whole))
}

// Percent formats a fraction as a percentage with precision that suits its
// size: one decimal from 10%, two from 0.1%, three significant digits below;
// "n/a" for NaN or ±Inf.
func Percent(x float64) string {
	v := x * 100
	switch {
	case math.IsNaN(v) || math.IsInf(v, 0):
		return "n/a"
	case v == 0:
		return "0%"
	case v == 100:
		return "100%"
	case v >= 10:
		return strconv.FormatFloat(v, 'f', 1, 64) + "%"
	case v >= 0.1:
		return strconv.FormatFloat(v, 'f', 2, 64) + "%"
	default:
		return strconv.FormatFloat(v, 'g', 3, 64) + "%"
	}
}

// pctNearOne formats a fraction close to 1 (a sparsity) with enough
// decimals that it does not round to 100% unless it is 1.
func pctNearOne(x float64) string {
	if x >= 1 || x < 0.99 {
		return Percent(x)
	}
	gap := (1 - x) * 100
	d := int(math.Ceil(-math.Log10(gap))) + 1
	d = max(2, min(d, 12))
	return strconv.FormatFloat(x*100, 'f', d, 64) + "%"
}

// sig formats a figure with four significant digits.
func sig(x float64) string {
	return strconv.FormatFloat(x, 'g', 4, 64)
}

// rates formats a measured and an expected rate the same way so they can be
// read side by side: four decimals, or scientific notation when both are
// below 0.001.
func rates(a, b float64) (string, string) {
	if max(a, b) >= 0.001 || (a == 0 && b == 0) {
		return strconv.FormatFloat(a, 'f', 4, 64), strconv.FormatFloat(b, 'f', 4, 64)
	}
	return strconv.FormatFloat(a, 'e', 3, 64), strconv.FormatFloat(b, 'e', 3, 64)
}

// width formats a bucket count, naming the power of two when it is one.
func width(m uint64) string {
	s := strconv.FormatUint(m, 10)
	if m > 1 && m&(m-1) == 0 {
		s += " (2^" + strconv.Itoa(63-bits.LeadingZeros64(m)) + ")"
	}
	return s
}

// binLabel names histogram bin i, which holds non-zero counts in
// [2^i − 1, 2^(i+1) − 1).
func binLabel(i int) string {
	lo := int64(1)<<i - 1
	hi := int64(1)<<(i+1) - 2
	if lo == hi {
		return itoa(lo)
	}
	return fmt.Sprintf("%d–%d", lo, hi)
}

// elapsed formats seconds as a duration rounded to what a person reads.
func elapsed(sec float64) string {
	d := time.Duration(sec * float64(time.Second))
	switch {
	case d >= time.Minute:
		d = d.Round(time.Second)
	case d >= time.Second:
		d = d.Round(time.Millisecond)
	default:
		d = d.Round(time.Microsecond)
	}
	return d.String()
}

// fieldSection tabulates the table fields: one table for all fields
// (missing share), one for categories and one for numbers.
func (f *Figures) fieldSection() Section {
	s := Section{Title: "table fields"}
	all := Table{Caption: "per field", Head: []string{"field", "kind", "docs", "missing", "missing share"},
		Num: []bool{false, false, true, true, true}}
	cats := Table{Caption: "categories", Head: []string{"field", "levels", "seen", "other", "other share", "unseen", "unseen share"},
		Num: []bool{false, true, true, true, true, true, true}}
	nums := Table{Caption: "numbers (after log, before standardization; population sd)",
		Head: []string{"field", "mean", "frozen mean", "sd", "frozen sd", "min", "max", "frozen range", "out of range"},
		Num:  []bool{false, true, true, true, true, true, true, false, true}}
	times := Table{Caption: "times", Head: []string{"field", "first", "last", "zone"}, Num: []bool{false, false, false, false}}
	for _, x := range f.Fields {
		all.Rows = append(all.Rows, []string{x.Name, x.Kind, itoa(x.Docs), itoa(x.Missing), Percent(x.MissingShare)})
		if c := x.Category; c != nil {
			cats.Rows = append(cats.Rows, []string{x.Name, itoa(c.Levels), itoa(c.LevelsSeen), itoa(c.Other), Percent(c.OtherShare),
				itoa(c.Unseen), Percent(c.UnseenShare)})
		}
		if n := x.Number; n != nil {
			nums.Rows = append(nums.Rows, []string{x.Name, sig(n.Mean), sig(n.FrozenMean), sig(n.SD), sig(n.FrozenSD),
				sig(n.Min), sig(n.Max), sig(n.FrozenMin) + ".." + sig(n.FrozenMax),
				join(itoa(n.OutOfRange), Percent(n.OutOfRangeShare))})
		}
		if t := x.Time; t != nil {
			times.Rows = append(times.Rows, []string{x.Name, t.First, t.Last, t.Zone})
		}
	}
	s.Tables = append(s.Tables, all)
	for _, t := range []Table{cats, nums, times} {
		if len(t.Rows) > 0 {
			s.Tables = append(s.Tables, t)
		}
	}
	return s
}
