package drift

import (
	"bufio"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"github.com/bowline/bowline/report"
)

// WriteJSON writes r as indented JSON with the field names of the struct
// tags, followed by a newline. Lists are written as [] rather than null
// when empty; a divergence that cannot be computed is null.
func (r *Result) WriteJSON(w io.Writer) error {
	c := *r
	if c.ByOrder == nil {
		c.ByOrder = []Order{}
	}
	if c.TopUnseen == nil {
		c.TopUnseen = []Unseen{}
	}
	if c.Moved == nil {
		c.Moved = []Moved{}
	}
	if c.Notes == nil {
		c.Notes = []string{}
	}
	if c.Fields == nil {
		c.Fields = []report.FieldFigures{}
	}
	if c.Labels != nil && c.Labels.Labels == nil {
		l := *c.Labels
		l.Labels = []LabelShare{}
		c.Labels = &l
	}
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	enc.SetEscapeHTML(false)
	if err := enc.Encode(&c); err != nil {
		return fmt.Errorf("drift: writing JSON: %w", err)
	}
	return nil
}

// WriteText writes r for people: titled blocks, labels and values aligned,
// tables in aligned columns, shares as percentages and share changes in
// percentage points (pp).
func (r *Result) WriteText(w io.Writer) error {
	bw := bufio.NewWriter(w)
	for i, s := range r.sections() {
		if i > 0 {
			bw.WriteByte('\n')
		}
		bw.WriteString(s.Title + "\n")
		width := 0
		for _, p := range s.Pairs {
			width = max(width, runeLen(p.Label))
		}
		for _, p := range s.Pairs {
			bw.WriteString("  " + p.Label + strings.Repeat(" ", width-runeLen(p.Label)+2) + p.Value + "\n")
		}
		for _, t := range s.Tables {
			t.WriteText(bw)
		}
		for _, n := range s.Notes {
			bw.WriteString("  - " + n + "\n")
		}
	}
	return bw.Flush()
}

// section is one titled block shared by the text and HTML renderings.
type section struct {
	Title  string
	Pairs  []pair
	Tables []table
	Notes  []string
	// plots names the HTML plots drawn under the section.
	plots []string
}

type pair struct{ Label, Value string }

// table is a grid; Num marks right-aligned columns.
type table = report.Table

// caution is shown wherever strings from the corpus appear in the report.
const caution = "Caution: keys are strings from the text and can carry personal data " +
	"(e-mail addresses, names, phone and order numbers); handle this report like the text itself."

func (r *Result) sections() []section {
	var out []section
	run := section{Title: "drift", Pairs: []pair{
		{"spec", r.Spec},
		{"input", r.Input},
		{"mode", r.Mode},
		{"docs", itoa(r.Docs) + "  (training: " + itoa(r.TrainingDocs) + ")"},
		{"empty docs", itoa(r.EmptyDocs) + share(r.EmptyDocs, r.Docs)},
		{"features", itoa(r.Features)},
	}}
	if r.Input == "" {
		run.Pairs = append(run.Pairs[:1:1], run.Pairs[2:]...)
	}
	out = append(out, run)
	if o := r.OOV; o != nil {
		out = append(out, section{Title: "out-of-vocabulary", Pairs: []pair{
			{"token share", pct(o.TokenShare) + "  (" + itoa(o.Unseen) + " of " + itoa(o.Features) + " features)"},
			{"type share", pct(o.TypeShare) + "  (" + itoa(o.UnseenKeys) + " of " + itoa(o.Keys) + " distinct keys)"},
		}})
	}
	if len(r.ByOrder) > 0 {
		s := section{Title: "per n-gram order"}
		if r.OOV != nil {
			t := table{
				Head: []string{"order", "features", "token OOV", "keys", "type OOV", "columns", "seen", "JSD (bits)", "PSI"},
				Num:  []bool{false, true, true, true, true, true, true, true, true},
			}
			for _, o := range r.ByOrder {
				row := []string{o.Order, itoa(o.Features), "", itoa(o.Keys), "", itoa(o.Columns), itoa(o.ColumnsSeen), div(o.JSD), div(o.PSI)}
				if o.OOV != nil {
					row[2], row[4] = pct(o.OOV.TokenShare), pct(o.OOV.TypeShare)
				}
				t.Rows = append(t.Rows, row)
			}
			s.Tables = append(s.Tables, t)
			s.Notes = []string{"JSD (Lin 1991) and PSI compare each order's document-share distribution over its vocabulary keys plus one bin for unseen keys; JSD lies in [0, 1] bit"}
			s.plots = []string{"oov", "jsd"}
		} else {
			t := table{Head: []string{"order", "features", "distinct keys"}, Num: []bool{false, true, true}}
			for _, o := range r.ByOrder {
				t.Rows = append(t.Rows, []string{o.Order, itoa(o.Features), itoa(o.Keys)})
			}
			s.Tables = append(s.Tables, t)
		}
		out = append(out, s)
	}
	if b := r.Buckets; b != nil {
		s := section{Title: "buckets", Pairs: []pair{{"width", strconv.FormatUint(b.Width, 10)}, {"occupied now", itoa(b.Occupied)}}}
		if b.TrainingCounts {
			s.Pairs = append(s.Pairs,
				pair{"occupied in training", itoa(b.TrainingBuckets)},
				pair{"new buckets", itoa(b.NewBuckets)},
				pair{"features in new buckets", pct(b.NewBucketShare) + "  (" + itoa(b.NewBucketFeatures) + " of " + itoa(r.Features) + "; a lower bound of OOV)"},
				pair{"JSD", div(b.JSD) + " bits"},
				pair{"PSI", div(b.PSI)})
		} else {
			s.Pairs = append(s.Pairs, pair{"training counts", "not stored (spec learned without idf)"})
		}
		out = append(out, s)
	}
	if len(r.TopUnseen) > 0 {
		t := table{Head: []string{"key", "order", "count", "docs"}, Num: []bool{false, false, true, true}}
		for _, u := range r.TopUnseen {
			t.Rows = append(t.Rows, []string{u.Key, u.Order, itoa(u.Count), itoa(u.Docs)})
		}
		out = append(out, section{Title: "top unseen keys", Tables: []table{t}, Notes: []string{caution}})
	}
	if len(r.Moved) > 0 {
		t := table{Head: []string{"key", "order", "training", "now", "change"}, Num: []bool{false, false, true, true, true}}
		for _, m := range r.Moved {
			t.Rows = append(t.Rows, []string{m.Key, m.Order, pct(m.TrainingShare), pct(m.Share), pp(m.Change)})
		}
		out = append(out, section{Title: "keys whose document share moved most", Tables: []table{t}, plots: []string{"moved"}})
	}
	if l := r.Labels; l != nil {
		s := section{Title: "labels"}
		if l.Field != "" {
			s.Title += " (" + l.Field + ")"
		}
		t := table{Head: []string{"label", "training docs", "docs", "training", "now", "change"}, Num: []bool{false, true, true, true, true, true}}
		for _, x := range l.Labels {
			t.Rows = append(t.Rows, []string{x.Label, itoa(x.TrainingDocs), itoa(x.Docs), pct(x.TrainingShare), pct(x.Share), pp(x.Change)})
		}
		s.Tables = append(s.Tables, t)
		s.Pairs = []pair{{"labeled docs", itoa(l.Labeled)}}
		if l.Unlabeled > 0 {
			s.Pairs = append(s.Pairs, pair{"unlabeled docs", itoa(l.Unlabeled)})
		}
		if l.Unknown > 0 {
			s.Pairs = append(s.Pairs, pair{"labels unseen in training", itoa(l.Unknown) + " docs"})
		}
		if l.JSD != nil {
			s.Pairs = append(s.Pairs, pair{"JSD", div(l.JSD) + " bits"}, pair{"PSI", div(l.PSI)})
		}
		s.plots = []string{"labels"}
		out = append(out, s)
	}
	if len(r.Fields) > 0 {
		out = append(out, r.fieldSection())
	}
	if len(r.Notes) > 0 {
		out = append(out, section{Title: "notes", Notes: r.Notes})
	}
	return out
}

func runeLen(s string) int { return len([]rune(s)) }

func itoa(n int64) string { return strconv.FormatInt(n, 10) }

// share formats part/whole as "  (x%)", or "" when whole is 0.
func share(part, whole int64) string {
	if whole == 0 {
		return ""
	}
	return "  (" + pct(float64(part)/float64(whole)) + ")"
}

// pct formats a fraction as a percentage, as report.Percent does.
func pct(x float64) string { return report.Percent(x) }

// pp formats a change of share in percentage points, with its sign.
func pp(x float64) string {
	v := x * 100
	if v == 0 {
		return "0 pp"
	}
	s := strconv.FormatFloat(v, 'f', 2, 64)
	if math.Abs(v) < 0.01 {
		s = strconv.FormatFloat(v, 'g', 2, 64)
	}
	if v > 0 {
		s = "+" + s
	}
	return s + " pp"
}

// div formats a divergence: four decimals, scientific below 0.001, "n/a"
// when it could not be computed.
func div(x *float64) string {
	switch {
	case x == nil:
		return "n/a"
	case *x == 0:
		return "0"
	case *x < 0.001:
		return strconv.FormatFloat(*x, 'e', 2, 64)
	}
	return strconv.FormatFloat(*x, 'f', 4, 64)
}
