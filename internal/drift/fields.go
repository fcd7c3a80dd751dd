package drift

import (
	"fmt"
	"strconv"

	"github.com/bowline/bowline/corpus"
	"github.com/bowline/bowline/internal/pipeline"
	"github.com/bowline/bowline/internal/tablefield"
)

// observeFields passes a record's table-field values to the observer; a
// value that cannot be read is a *pipeline.RecordError naming file and
// line.
func observeFields(o *tablefield.Observer, rec *corpus.Record, n int, name string) error {
	if n == 0 {
		return nil
	}
	if len(rec.Fields) != n {
		return fmt.Errorf("%s:%d: the corpus reader gives %d table fields, the spec has %d (set corpus.Options.Fields to the spec's fields)", name, rec.Line, len(rec.Fields), n)
	}
	if err := o.Observe(rec.Fields); err != nil {
		return &pipeline.RecordError{File: name, Line: rec.Line, Err: err}
	}
	return nil
}

// fieldSection tabulates the table fields as a drift signal: missing
// share, unseen-level share, numbers outside the training range, and the
// mean and standard deviation seen against the frozen ones.
func (r *Result) fieldSection() section {
	s := section{Title: "table fields"}
	t := table{Head: []string{"field", "kind", "missing", "unseen level", "out of range", "mean (frozen)", "sd (frozen)", "first..last"},
		Num: []bool{false, false, true, true, true, true, true, false}}
	g := func(x float64) string { return strconv.FormatFloat(x, 'g', 4, 64) }
	for _, f := range r.Fields {
		row := []string{f.Name, f.Kind, pctOf(f.MissingShare), "", "", "", "", ""}
		if c := f.Category; c != nil {
			row[3] = pctOf(c.UnseenShare)
		}
		if n := f.Number; n != nil {
			row[4] = pctOf(n.OutOfRangeShare)
			row[5] = g(n.Mean) + " (" + g(n.FrozenMean) + ")"
			row[6] = g(n.SD) + " (" + g(n.FrozenSD) + ")"
		}
		if tm := f.Time; tm != nil && tm.Values > 0 {
			row[7] = tm.First + ".." + tm.Last
		}
		t.Rows = append(t.Rows, row)
	}
	s.Tables = []table{t}
	s.Notes = []string{"means and sds are of the present values after log, before standardization (population sd)"}
	return s
}

func pctOf(x float64) string { return strconv.FormatFloat(100*x, 'f', 2, 64) + "%" }
