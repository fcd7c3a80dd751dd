package report

import (
	"fmt"
	"html/template"
	"io"
)

// WriteHTML writes the figures as one self-contained HTML page: the same
// sections and tables as WriteText, with plots drawn as inline SVG. The
// page loads nothing from elsewhere and needs no script.
func (f *Figures) WriteHTML(w io.Writer) error {
	page := Page{Title: "bowline report", Sections: f.sections()}
	if f.Command != "" {
		page.Title = "bowline " + f.Command + " report"
	}
	for i := range page.Sections {
		s := &page.Sections[i]
		figs, err := f.plotsFor(s.Title)
		if err != nil {
			return err
		}
		s.Figures = figs
	}
	return page.WriteHTML(w)
}

// plotsFor draws the plots that belong to the section with the given title.
func (f *Figures) plotsFor(title string) ([]Figure, error) {
	var out []Figure
	add := func(caption string, svg template.HTML, err error) error {
		if err != nil {
			return fmt.Errorf("report: drawing %q: %w", caption, err)
		}
		if svg != "" {
			out = append(out, Figure{Caption: caption, SVG: svg})
		}
		return nil
	}
	var err error
	switch title {
	case "run":
		if len(f.TopStopWords) > 0 {
			svg, e := countPlot("Top stop words dropped", "tokens dropped", f.TopStopWords)
			err = add("Stop words dropped most often.", svg, e)
		}
	case "table fields":
		names := make([]string, len(f.Fields))
		miss := make([]float64, len(f.Fields))
		unseen := make([]float64, len(f.Fields))
		out := make([]float64, len(f.Fields))
		for i, x := range f.Fields {
			names[i], miss[i] = x.Name, 100*x.MissingShare
			if x.Category != nil {
				unseen[i] = 100 * x.Category.UnseenShare
			}
			if x.Number != nil {
				out[i] = 100 * x.Number.OutOfRangeShare
			}
		}
		svg, e := GroupedBars("Table fields", "share of records (%)", names,
			[]Series{{"missing", miss}, {"unseen level", unseen}, {"out of range", out}})
		err = add("Per table field: missing values, category levels never seen at learn time, numbers outside the training range.", svg, e)
	case "out-of-vocabulary":
		if f.Vocabulary == nil {
			// encode: the spec's vocabulary curves go with the OOV figures.
			if err = f.addCurves(add); err != nil {
				return out, err
			}
		}
		if o := f.OOV; len(o.ByOrder) > 0 {
			names := make([]string, len(o.ByOrder))
			tok := make([]float64, len(o.ByOrder))
			typ := make([]float64, len(o.ByOrder))
			for i, r := range o.ByOrder {
				names[i], tok[i], typ[i] = r.Order, 100*r.TokenShare, 100*r.TypeShare
			}
			svg, e := GroupedBars("OOV share per n-gram order", "share (%)", names,
				[]Series{{"token share", tok}, {"type share", typ}})
			err = add("Out-of-vocabulary share per n-gram order: emitted features (token share) and distinct keys (type share).", svg, e)
		}
		if err == nil && len(f.OOV.TopUnseen) > 0 {
			svg, e := countPlot("Top unseen keys", "features", f.OOV.TopUnseen)
			err = add("Most frequent keys not in the vocabulary.", svg, e)
		}
	case "collisions":
		c := f.Collisions
		svg, e := GroupedBars("Collision rate", "share of distinct keys (%)", []string{"measured", "expected"},
			[]Series{{"", []float64{100 * c.Rate, 100 * c.ExpectedRate}}})
		err = add("Share of distinct keys whose bucket holds another key, measured and expected under uniform hashing, 1 − (1 − 1/m)^(n−1).", svg, e)
	case "sparsity":
		if f.Sparsity == nil {
			break
		}
		if h := f.Sparsity.NNZHistogram; len(h) > 0 {
			names := make([]string, len(h))
			vals := make([]float64, len(h))
			for i, n := range h {
				names[i], vals[i] = binLabel(i), float64(n)
			}
			svg, e := GroupedBars("Rows by non-zeros", "rows", names, []Series{{"", vals}})
			err = add("Rows by number of non-zero features (bins double in width).", svg, e)
		}
	case "vocabulary":
		if len(f.Vocabulary.TopTerms) > 0 {
			svg, e := countPlot("Top terms", "documents", f.Vocabulary.TopTerms)
			err = add("Kept terms with the highest document counts.", svg, e)
		}
		if err == nil {
			err = f.addCurves(add)
		}
	case "labels":
		svg, e := countPlot("Rows per label", "rows", f.Labels)
		err = add("Rows written per label.", svg, e)
	}
	return out, err
}

// countPlot draws horizontal bars for named counts, the first on top.
func countPlot(title, xlabel string, cs []Count) (template.HTML, error) {
	names := make([]string, len(cs))
	vals := make([]float64, len(cs))
	for i, c := range cs {
		names[i], vals[i] = c.Name, float64(c.Count)
	}
	return HorizontalBars(title, xlabel, names, vals)
}

func (f *Figures) addCurves(add func(string, template.HTML, error) error) error {
	caps, svgs, err := CurvePlots(f.Curves)
	if err != nil {
		return err
	}
	for i := range caps {
		if err := add(caps[i], svgs[i], nil); err != nil {
			return err
		}
	}
	return nil
}
