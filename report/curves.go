package report

import (
	"fmt"
	"html/template"
	"image/color"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
)

// CurvePlots draws the vocabulary's rank-frequency curve (log-log) and its
// document-count histogram with the cutoffs, as inline SVG with captions.
// Other reports (drift) embed them too.
func CurvePlots(c *VocabCurves) (captions []string, svgs []template.HTML, err error) {
	if c == nil {
		return nil, nil, nil
	}
	if len(c.RankDocs) > 1 {
		svg, err := svgOf(rankPlot(c))
		if err != nil {
			return nil, nil, fmt.Errorf("report: drawing the rank-frequency curve: %w", err)
		}
		captions = append(captions, "Rank-frequency curve of the kept keys, log-log: the document count of the key at each rank.")
		svgs = append(svgs, svg)
	}
	if len(c.DocHistogram) > 0 {
		svg, err := svgOf(histPlot(c))
		if err != nil {
			return nil, nil, fmt.Errorf("report: drawing the document-count histogram: %w", err)
		}
		captions = append(captions, "Every key learn saw, kept or cut, by document count (log-log; wide bins divided by their width); the dashed lines are the cutoffs --min-docs and --max-doc-share.")
		svgs = append(svgs, svg)
	}
	return captions, svgs, nil
}

func rankPlot(c *VocabCurves) (*plot.Plot, vg.Length, vg.Length, error) {
	p := plot.New()
	p.Title.Text = "Rank-frequency"
	p.X.Label.Text = "rank"
	p.Y.Label.Text = "documents"
	p.X.Scale, p.Y.Scale = plot.LogScale{}, plot.LogScale{}
	p.X.Tick.Marker, p.Y.Tick.Marker = plot.LogTicks{Prec: -1}, plot.LogTicks{Prec: -1}
	pts := make(plotter.XYs, 0, len(c.RankDocs))
	for _, r := range c.RankDocs {
		if r.Rank > 0 && r.Docs > 0 {
			pts = append(pts, plotter.XY{X: float64(r.Rank), Y: float64(r.Docs)})
		}
	}
	l, err := plotter.NewLine(pts)
	if err != nil {
		return nil, 0, 0, err
	}
	l.Color = Palette[0]
	l.Width = vg.Points(1.5)
	p.Add(l, plotter.NewGrid())
	return p, 16 * vg.Centimeter, 9 * vg.Centimeter, nil
}

func histPlot(c *VocabCurves) (*plot.Plot, vg.Length, vg.Length, error) {
	p := plot.New()
	p.Title.Text = "Keys by document count"
	p.X.Label.Text = "documents (bin start)"
	p.Y.Label.Text = "keys per document count"
	p.X.Scale, p.Y.Scale = plot.LogScale{}, plot.LogScale{}
	p.X.Tick.Marker, p.Y.Tick.Marker = plot.LogTicks{Prec: -1}, plot.LogTicks{Prec: -1}
	pts := make(plotter.XYs, 0, len(c.DocHistogram))
	ymax, ymin := 1.0, 1.0
	for _, b := range c.DocHistogram {
		if b.Keys > 0 && b.Lo > 0 {
			// Wide bins are divided by their width, so that the curve
			// keeps its shape where the bins start doubling.
			y := float64(b.Keys) / float64(b.Hi-b.Lo+1)
			pts = append(pts, plotter.XY{X: float64(b.Lo), Y: y})
			ymax, ymin = max(ymax, y), min(ymin, y)
		}
	}
	if len(pts) == 0 {
		pts = append(pts, plotter.XY{X: 1, Y: 1})
	}
	l, s, err := plotter.NewLinePoints(pts)
	if err != nil {
		return nil, 0, 0, err
	}
	l.Color, s.Color = Palette[0], Palette[0]
	p.Add(l, s, plotter.NewGrid())
	cut := func(x float64, name string, col color.Color) error {
		if x <= 0 {
			return nil
		}
		v, err := plotter.NewLine(plotter.XYs{{X: x, Y: ymin}, {X: x, Y: ymax}})
		if err != nil {
			return err
		}
		v.Color = col
		v.Dashes = []vg.Length{vg.Points(4), vg.Points(3)}
		p.Add(v)
		p.Legend.Add(name, v)
		return nil
	}
	if err := cut(float64(c.MinDocs), fmt.Sprintf("--min-docs %d", c.MinDocs), Palette[1]); err != nil {
		return nil, 0, 0, err
	}
	if err := cut(c.MaxDocs, fmt.Sprintf("--max-doc-share (%.0f docs)", c.MaxDocs), Palette[2]); err != nil {
		return nil, 0, 0, err
	}
	p.Legend.Top = true
	return p, 16 * vg.Centimeter, 9 * vg.Centimeter, nil
}
