package sweep

import (
	"fmt"
	"image/color"
	"io"
	"math"
	"strings"

	"github.com/bowline/bowline/hashing"
	"github.com/bowline/bowline/report"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// WriteHTML writes the sweep as one self-contained HTML page: the summary,
// plots drawn as inline SVG by gonum/plot (collision rate measured and
// expected, held-out accuracy, memory, each against the width), the table
// and the crowded buckets. The page loads nothing from elsewhere and has
// no script.
func (r *Result) WriteHTML(w io.Writer) error {
	v := r.Vocabulary
	facts := report.Section{Pairs: []report.Pair{
		{Label: "training corpus", Value: fmt.Sprintf("%s: %d docs, %d feature occurrences, %d distinct keys", r.Train, r.Docs, r.Features, r.DistinctKeys)},
		{Label: "vocabulary", Value: fmt.Sprintf("%d terms kept (%s of occurrences); memory %s = weights %s + index %s (%d bytes per entry, an estimate, plus the key bytes)",
			v.Terms, pct(v.KeptShare), bytesText(v.Bytes), bytesText(v.ModelBytes), bytesText(v.IndexBytes), r.IndexEntryBytes)},
		{Label: "hashing", Value: fmt.Sprintf("seed %d, signed %v; model memory = width × 8 bytes × %d weight vector(s)", r.Seed, r.Signed, r.Classes)},
	}}
	if r.Holdout != "" && v.Eval != nil {
		f := fmt.Sprintf("%s: %d docs; L2-regularized logistic regression, C = %g", r.Holdout, r.HoldoutDocs, r.C)
		if v.HoldoutOOVShare != nil {
			f += fmt.Sprintf("; vocabulary OOV share %s", pct(*v.HoldoutOOVShare))
		}
		facts.Pairs = append(facts.Pairs, report.Pair{Label: "held out", Value: f})
	}
	if len(r.Labels) > 0 {
		facts.Pairs = append(facts.Pairs, report.Pair{Label: "labels", Value: strings.Join(r.Labels, ", ")})
	}
	plots := report.Section{Title: "plots"}
	for _, pl := range []struct {
		caption string
		draw    func() (*plot.Plot, error)
	}{
		{"Collision rate: share of distinct training keys whose bucket holds another key, measured (points) and expected under uniform hashing, 1 − (1 − 1/m)^(n−1) (line).", r.collisionPlot},
		{"Held-out accuracy of the logistic regression on each width's rows (points); the vocabulary's accuracy is the dashed line.", r.accuracyPlot},
		{"Memory: hashing model weights, width × 8 bytes per weight vector (points); the vocabulary's weights plus its key index is the dashed line. Log scale.", r.memoryPlot},
	} {
		p, err := pl.draw()
		if err != nil {
			return fmt.Errorf("sweep: drawing plot: %w", err)
		}
		if p == nil {
			continue
		}
		svg, err := report.SVG(p, 6.5*vg.Inch, 3.4*vg.Inch)
		if err != nil {
			return fmt.Errorf("sweep: drawing plot: %w", err)
		}
		plots.Figures = append(plots.Figures, report.Figure{Caption: pl.caption, SVG: svg})
	}
	head, rows := r.table()
	num := make([]bool, len(head))
	for i := range num {
		num[i] = true
	}
	table := report.Section{Title: "table", Tables: []report.Table{{Head: head, Num: num, Rows: rows}},
		Notes: []string{"collide: share of distinct keys sharing a bucket; expected: 1 − (1 − 1/m)^(n−1); shared occ.: share of feature occurrences in a shared bucket; memory: weights (plus the index for the vocabulary)."}}
	page := report.Page{Title: "bowline sweep: " + r.Train, Sections: []report.Section{facts, plots, table}}
	if e := r.Explain; e != nil {
		page.Sections = append(page.Sections, r.explainSection(e))
	}
	return page.WriteHTML(w)
}

// explainSection lists the most crowded buckets at the explained width,
// each with the keys sharing it and their occurrences.
func (r *Result) explainSection(e *Explain) report.Section {
	s := report.Section{Title: "most crowded buckets at width " + hashing.FormatWidth(e.Width)}
	if len(e.Buckets) == 0 {
		s.Notes = []string{"No bucket holds two keys at this width."}
		return s
	}
	t := report.Table{Head: []string{"bucket", "keys", "occurrences", "keys sharing it (occurrences)"}, Num: make([]bool, 4)}
	for _, b := range e.Buckets {
		var keys strings.Builder
		for i, k := range b.Keys {
			if i > 0 {
				keys.WriteString(", ")
			}
			fmt.Fprintf(&keys, "%q (%d)", k.Key, k.Count)
		}
		t.Rows = append(t.Rows, []string{fmt.Sprint(b.Bucket), fmt.Sprint(len(b.Keys)), fmt.Sprint(b.Occurrences), keys.String()})
	}
	s.Tables = []report.Table{t}
	return s
}

var blue, orange, green = report.Palette[0], report.Palette[1], report.Palette[2]

// widthAxis sets the x axis to log2 of the width, with "2^k" ticks.
func (r *Result) widthAxis(p *plot.Plot) (lo, hi float64) {
	lo = math.Log2(float64(r.Widths[0].Width))
	hi = math.Log2(float64(r.Widths[len(r.Widths)-1].Width))
	if hi-lo < 1 {
		lo, hi = lo-0.5, hi+0.5
	}
	step := math.Max(1, math.Ceil((hi-lo)/12))
	var ticks []plot.Tick
	for k := math.Ceil(lo); k <= hi; k++ {
		label := ""
		if math.Mod(k-math.Ceil(lo), step) == 0 {
			label = fmt.Sprintf("2^%d", int(k))
		}
		ticks = append(ticks, plot.Tick{Value: k, Label: label})
	}
	p.X.Tick.Marker = plot.ConstantTicks(ticks)
	p.X.Label.Text = "hashing width (buckets)"
	p.X.Min, p.X.Max = lo-0.3, hi+0.3
	return lo, hi
}

func (r *Result) collisionPlot() (*plot.Plot, error) {
	p := plot.New()
	p.Title.Text = "Collision rate against width"
	p.Y.Label.Text = "keys sharing a bucket (%)"
	r.widthAxis(p)
	pts := make(plotter.XYs, len(r.Widths))
	for i, x := range r.Widths {
		pts[i] = plotter.XY{X: math.Log2(float64(x.Width)), Y: 100 * x.CollisionRate}
	}
	sc, err := plotter.NewScatter(pts)
	if err != nil {
		return nil, err
	}
	sc.GlyphStyle = draw.GlyphStyle{Color: blue, Radius: vg.Points(3.5), Shape: draw.CircleGlyph{}}
	n := float64(r.DistinctKeys)
	f := plotter.NewFunction(func(x float64) float64 {
		return 100 * hashing.ExpectedCollisionRate(n, math.Exp2(x))
	})
	f.XMin, f.XMax = p.X.Min, p.X.Max
	f.Samples = 200
	f.Color = orange
	f.Width = vg.Points(1.5)
	p.Add(plotter.NewGrid(), f, sc)
	p.Legend.Add("measured", sc)
	p.Legend.Add("expected", f)
	p.Legend.Top = true
	p.Y.Min, p.Y.Max = 0, 105
	return p, nil
}

func (r *Result) accuracyPlot() (*plot.Plot, error) {
	if r.Vocabulary.Eval == nil {
		return nil, nil
	}
	p := plot.New()
	p.Title.Text = "Held-out accuracy against width"
	p.Y.Label.Text = "accuracy (%)"
	lo, hi := r.widthAxis(p)
	var pts plotter.XYs
	ymin, ymax := 100*r.Vocabulary.Eval.Accuracy, 100*r.Vocabulary.Eval.Accuracy
	for _, x := range r.Widths {
		if x.Eval == nil {
			continue
		}
		a := 100 * x.Eval.Accuracy
		pts = append(pts, plotter.XY{X: math.Log2(float64(x.Width)), Y: a})
		ymin, ymax = math.Min(ymin, a), math.Max(ymax, a)
	}
	line, sc, err := plotter.NewLinePoints(pts)
	if err != nil {
		return nil, err
	}
	line.Color = blue
	sc.GlyphStyle = draw.GlyphStyle{Color: blue, Radius: vg.Points(3.5), Shape: draw.CircleGlyph{}}
	vl, err := hline(lo-0.3, hi+0.3, 100*r.Vocabulary.Eval.Accuracy, green)
	if err != nil {
		return nil, err
	}
	p.Add(plotter.NewGrid(), vl, line, sc)
	p.Legend.Add("hashing", line, sc)
	p.Legend.Add("vocabulary", vl)
	p.Legend.Top = true
	p.Legend.Left = false
	pad := math.Max(1, (ymax-ymin)*0.15)
	p.Y.Min, p.Y.Max = math.Max(0, ymin-pad), math.Min(100, ymax+2*pad)
	return p, nil
}

func (r *Result) memoryPlot() (*plot.Plot, error) {
	p := plot.New()
	p.Title.Text = "Model memory against width"
	p.Y.Label.Text = "bytes"
	lo, hi := r.widthAxis(p)
	pts := make(plotter.XYs, len(r.Widths))
	ymin, ymax := float64(r.Vocabulary.Bytes), float64(r.Vocabulary.Bytes)
	for i, x := range r.Widths {
		b := float64(x.ModelBytes)
		pts[i] = plotter.XY{X: math.Log2(float64(x.Width)), Y: b}
		ymin, ymax = math.Min(ymin, b), math.Max(ymax, b)
	}
	if ymin <= 0 {
		ymin = 1
	}
	line, sc, err := plotter.NewLinePoints(pts)
	if err != nil {
		return nil, err
	}
	line.Color = blue
	sc.GlyphStyle = draw.GlyphStyle{Color: blue, Radius: vg.Points(3.5), Shape: draw.CircleGlyph{}}
	vl, err := hline(lo-0.3, hi+0.3, math.Max(1, float64(r.Vocabulary.Bytes)), green)
	if err != nil {
		return nil, err
	}
	p.Add(plotter.NewGrid(), vl, line, sc)
	p.Legend.Add("hashing weights", line, sc)
	p.Legend.Add("vocabulary weights + index", vl)
	p.Legend.Top = true
	p.Legend.Left = true
	p.Y.Scale = plot.LogScale{}
	p.Y.Tick.Marker = plot.LogTicks{Prec: -1}
	p.Y.Min, p.Y.Max = ymin/2, ymax*8
	return p, nil
}

// hline is a dashed horizontal line at y.
func hline(x0, x1, y float64, c color.Color) (*plotter.Line, error) {
	l, err := plotter.NewLine(plotter.XYs{{X: x0, Y: y}, {X: x1, Y: y}})
	if err != nil {
		return nil, err
	}
	l.Color = c
	l.Width = vg.Points(1.5)
	l.Dashes = []vg.Length{vg.Points(6), vg.Points(4)}
	return l, nil
}
