package sweep

import (
	"encoding/json"
	"fmt"
	"io"
	"strings"
	"text/tabwriter"

	"github.com/bowline/bowline/hashing"
)

// WriteJSON writes the result as indented JSON with stable field names.
func (r *Result) WriteJSON(w io.Writer) error {
	b, err := json.MarshalIndent(r, "", "  ")
	if err != nil {
		return err
	}
	_, err = w.Write(append(b, '\n'))
	return err
}

// table returns the sweep table: a header and one row of cells per line,
// the vocabulary first.
func (r *Result) table() (head []string, rows [][]string) {
	eval := r.Vocabulary.Eval != nil
	head = []string{"width", "keys", "occupied", "collide", "expected", "shared occ.", "memory"}
	if eval {
		head = append(head, "accuracy", "log loss")
		if r.Vocabulary.Eval.AUC != nil {
			head = append(head, "ROC AUC")
		} else if r.Vocabulary.Eval.MacroF1 != nil {
			head = append(head, "macro-F1")
		}
	}
	evalCells := func(e *Eval) []string {
		if !eval {
			return nil
		}
		if e == nil {
			return []string{"", "", ""}[:len(head)-7]
		}
		c := []string{pct(e.Accuracy), fmt.Sprintf("%.4f", e.LogLoss)}
		if e.AUC != nil {
			c = append(c, fmt.Sprintf("%.4f", *e.AUC))
		} else if e.MacroF1 != nil {
			c = append(c, fmt.Sprintf("%.4f", *e.MacroF1))
		}
		return c
	}
	v := r.Vocabulary
	rows = append(rows, append([]string{"vocabulary", fmt.Sprint(v.Terms), "", "", "", "", bytesText(v.Bytes)}, evalCells(v.Eval)...))
	for _, x := range r.Widths {
		rows = append(rows, append([]string{hashing.FormatWidth(x.Width), fmt.Sprint(x.Keys), fmt.Sprint(x.Occupied),
			pct(x.CollisionRate), pct(x.ExpectedCollisionRate), pct(x.SharedShare), bytesText(x.ModelBytes)}, evalCells(x.Eval)...))
	}
	return head, rows
}

// WriteText writes the sweep for people: a summary, the table, and the
// crowded buckets when asked for.
func (r *Result) WriteText(w io.Writer) error {
	var b strings.Builder
	fmt.Fprintf(&b, "sweep of %s: %d docs, %d feature occurrences, %d distinct keys\n", r.Train, r.Docs, r.Features, r.DistinctKeys)
	v := r.Vocabulary
	fmt.Fprintf(&b, "vocabulary: %d terms kept (%s of occurrences); removed %d below min-docs, %d above max-doc-share, %d over max-terms\n",
		v.Terms, pct(v.KeptShare), v.BelowMinDocs, v.AboveMaxShare, v.OverMaxTerms)
	fmt.Fprintf(&b, "vocabulary memory: %s = weights %s + index %s (%s of keys + %d bytes per entry, an estimate)\n",
		bytesText(v.Bytes), bytesText(v.ModelBytes), bytesText(v.IndexBytes), bytesText(v.KeyBytes), r.IndexEntryBytes)
	fmt.Fprintf(&b, "model memory: columns × 8 bytes × %d weight vector(s)", r.Classes)
	if len(r.Labels) > 0 {
		fmt.Fprintf(&b, "; labels %s", strings.Join(r.Labels, ", "))
	}
	b.WriteString("\n")
	if v.Eval != nil {
		fmt.Fprintf(&b, "held out: %s, %d docs; logistic regression with C = %g", r.Holdout, r.HoldoutDocs, r.C)
		if v.HoldoutOOVShare != nil {
			fmt.Fprintf(&b, "; vocabulary OOV share %s", pct(*v.HoldoutOOVShare))
		}
		b.WriteString("\n")
	}
	b.WriteString("\n")
	tw := tabwriter.NewWriter(&b, 0, 0, 2, ' ', tabwriter.AlignRight)
	head, rows := r.table()
	fmt.Fprintln(tw, strings.Join(head, "\t")+"\t")
	for _, row := range rows {
		fmt.Fprintln(tw, strings.Join(row, "\t")+"\t")
	}
	tw.Flush()
	b.WriteString("\ncollide: share of distinct keys sharing a bucket; expected: 1 − (1 − 1/m)^(n−1);\nshared occ.: share of feature occurrences in a shared bucket; memory: weights (+ index for the vocabulary)\n")
	if e := r.Explain; e != nil {
		fmt.Fprintf(&b, "\nmost crowded buckets at width %s:\n", hashing.FormatWidth(e.Width))
		if len(e.Buckets) == 0 {
			b.WriteString("  no bucket holds two keys\n")
		}
		for _, bk := range e.Buckets {
			fmt.Fprintf(&b, "  bucket %d: %d keys, %d occurrences:", bk.Bucket, len(bk.Keys), bk.Occurrences)
			for i, k := range bk.Keys {
				if i == 8 {
					fmt.Fprintf(&b, " … and %d more", len(bk.Keys)-8)
					break
				}
				fmt.Fprintf(&b, " %q (%d)", k.Key, k.Count)
			}
			b.WriteString("\n")
		}
	}
	_, err := io.WriteString(w, b.String())
	return err
}

func pct(f float64) string {
	switch {
	case f == 0:
		return "0%"
	case f < 0.0001:
		return fmt.Sprintf("%.2g%%", 100*f)
	default:
		return fmt.Sprintf("%.2f%%", 100*f)
	}
}

// bytesText writes a byte count with binary prefixes.
func bytesText(n int64) string {
	const unit = 1024
	if n < unit {
		return fmt.Sprintf("%d B", n)
	}
	f := float64(n)
	for _, p := range []string{"KiB", "MiB", "GiB", "TiB"} {
		f /= unit
		if f < unit || p == "TiB" {
			return fmt.Sprintf("%.1f %s", f, p)
		}
	}
	return ""
}
