package drift

import (
	"fmt"
	"io"

	"github.com/bowline/bowline/report"
)

// WriteHTML writes r as one self-contained HTML page: the sections and
// tables of WriteText, with plots as inline SVG (OOV share and JSD per
// order, the most moved keys, label shares). The page loads nothing from
// elsewhere and needs no script.
func (r *Result) WriteHTML(w io.Writer) error {
	page := report.Page{Title: "bowline drift report"}
	for i, s := range r.sections() {
		ps := report.Section{Title: s.Title, Tables: s.Tables, Notes: s.Notes}
		for _, p := range s.Pairs {
			ps.Pairs = append(ps.Pairs, report.Pair(p))
		}
		if i == 0 {
			// The spec's vocabulary, for comparison with what came.
			caps, svgs, err := report.CurvePlots(r.Curves)
			if err != nil {
				return err
			}
			for j := range caps {
				ps.Figures = append(ps.Figures, report.Figure{Caption: caps[j], SVG: svgs[j]})
			}
		}
		for _, name := range s.plots {
			f, err := r.plot(name)
			if err != nil {
				return fmt.Errorf("drift: drawing %s plot: %w", name, err)
			}
			if f.SVG != "" {
				ps.Figures = append(ps.Figures, f)
			}
		}
		page.Sections = append(page.Sections, ps)
	}
	return page.WriteHTML(w)
}

// plot draws the named plot; an empty SVG means there is nothing to draw.
func (r *Result) plot(name string) (report.Figure, error) {
	var names []string
	switch name {
	case "oov":
		var tok, typ []float64
		for _, o := range r.ByOrder {
			if o.OOV == nil {
				continue
			}
			names = append(names, o.Order)
			tok = append(tok, 100*o.OOV.TokenShare)
			typ = append(typ, 100*o.OOV.TypeShare)
		}
		if len(names) == 0 {
			return report.Figure{}, nil
		}
		svg, err := report.GroupedBars("OOV share per n-gram order", "share (%)", names, []report.Series{{Name: "token share", Values: tok}, {Name: "type share", Values: typ}})
		return report.Figure{Caption: "Out-of-vocabulary share per n-gram order: emitted features (token share) and distinct keys (type share).", SVG: svg}, err
	case "jsd":
		var v []float64
		for _, o := range r.ByOrder {
			if o.JSD != nil {
				names = append(names, o.Order)
				v = append(v, *o.JSD)
			}
		}
		if len(names) == 0 {
			return report.Figure{}, nil
		}
		svg, err := report.GroupedBars("Jensen–Shannon divergence per n-gram order", "JSD (bits)", names, []report.Series{{Values: v}})
		return report.Figure{Caption: "Jensen–Shannon divergence (Lin 1991) between training and new document-share distributions, per order; 0 is no change, 1 bit is no overlap.", SVG: svg}, err
	case "moved":
		if len(r.Moved) == 0 {
			return report.Figure{}, nil
		}
		labels := make([]string, len(r.Moved))
		vals := make([]float64, len(r.Moved))
		for i, m := range r.Moved {
			labels[i], vals[i] = m.Key, 100*m.Change
		}
		svg, err := report.HorizontalBars("Keys whose document share moved most", "change of document share (percentage points)", labels, vals)
		return report.Figure{Caption: "Change of each key's document share, new corpus minus training; bars right of zero grew.", SVG: svg}, err
	case "labels":
		if r.Labels == nil || len(r.Labels.Labels) == 0 {
			return report.Figure{}, nil
		}
		var then, now []float64
		for _, l := range r.Labels.Labels {
			names = append(names, report.Shorten(l.Label))
			then = append(then, 100*l.TrainingShare)
			now = append(now, 100*l.Share)
		}
		svg, err := report.GroupedBars("Label shares", "share of labeled documents (%)", names, []report.Series{{Name: "training", Values: then}, {Name: "now", Values: now}})
		return report.Figure{Caption: "Share of documents per label, training corpus and new corpus.", SVG: svg}, err
	}
	return report.Figure{}, fmt.Errorf("unknown plot %q", name)
}
