package report

import (
	"bytes"
	"errors"
	"html/template"
	"image/color"
	"io"
	"math"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgsvg"
)

// This file holds the rendering pieces that every bowline report shares:
// aligned text tables and bar plots drawn as inline SVG. The page skeleton
// is Page.

// Table is a small grid of cells under a header; Num marks right-aligned
// (numeric) columns and has one entry per column. Caption, when set, is
// shown above the grid.
type Table struct {
	Caption string
	Head    []string
	Num     []bool
	Rows    [][]string
}

// WriteText writes t for people: the caption indented by two spaces, then
// the header and rows indented by four, columns two spaces apart, numeric
// columns right-aligned and the last text column left unpadded.
func (t Table) WriteText(w io.Writer) error {
	if t.Caption != "" {
		if _, err := io.WriteString(w, "  "+t.Caption+"\n"); err != nil {
			return err
		}
	}
	// tabwriter aligns a whole writer one way, so pad cells here.
	widths := make([]int, len(t.Head))
	for i, h := range t.Head {
		widths[i] = runeLen(h)
	}
	for _, r := range t.Rows {
		for i, c := range r {
			widths[i] = max(widths[i], runeLen(c))
		}
	}
	line := func(cells []string) error {
		var b strings.Builder
		b.WriteString("    ")
		for i, c := range cells {
			pad := strings.Repeat(" ", widths[i]-runeLen(c))
			if i > 0 {
				b.WriteString("  ")
			}
			switch {
			case t.Num[i]:
				b.WriteString(pad + c)
			case i == len(cells)-1:
				b.WriteString(c)
			default:
				b.WriteString(c + pad)
			}
		}
		b.WriteByte('\n')
		_, err := io.WriteString(w, b.String())
		return err
	}
	if err := line(t.Head); err != nil {
		return err
	}
	for _, r := range t.Rows {
		if err := line(r); err != nil {
			return err
		}
	}
	return nil
}

func runeLen(s string) int { return len([]rune(s)) }

// Palette holds the colors of bowline's plots, in the order series use
// them: blue, orange, green.
var Palette = []color.Color{
	color.RGBA{R: 0x2b, G: 0x6c, B: 0xb0, A: 0xff},
	color.RGBA{R: 0xd9, G: 0x7a, B: 0x1e, A: 0xff},
	color.RGBA{R: 0x4a, G: 0x9a, B: 0x5b, A: 0xff},
}

// Series is one named run of bar heights, one value per group.
type Series struct {
	Name   string // legend entry; empty for none
	Values []float64
}

// SVG draws p on a w × h SVG canvas and returns the <svg> element alone,
// without the XML declaration, ready to sit inside an HTML page. The markup
// comes from vgsvg, which escapes every string it draws.
func SVG(p *plot.Plot, w, h vg.Length) (template.HTML, error) {
	c := vgsvg.New(w, h)
	p.Draw(draw.New(c))
	var buf bytes.Buffer
	if _, err := c.WriteTo(&buf); err != nil {
		return "", err
	}
	s := buf.String()
	i := strings.Index(s, "<svg")
	if i < 0 {
		return "", errors.New("no <svg> element in plot output")
	}
	return template.HTML(strings.TrimSpace(s[i:])), nil
}

// GroupedBars draws vertical bars as SVG, 6 × 3.2 inches: one group per
// name and one bar per series in each group, colored from Palette, with a
// legend for the named series. The y axis starts at zero; values the
// plotter rejects (NaN, ±Inf) are drawn as zero.
func GroupedBars(title, ylabel string, names []string, ss []Series) (template.HTML, error) {
	p := plot.New()
	p.Title.Text = title
	p.Y.Label.Text = ylabel
	p.Y.Min = 0
	barW := vg.Points(math.Max(6, math.Min(28, 220/float64(len(names)*len(ss)))))
	top := 0.0
	for i, s := range ss {
		vals := clean(s.Values)
		for _, v := range vals {
			top = max(top, v)
		}
		b, err := plotter.NewBarChart(plotter.Values(vals), barW)
		if err != nil {
			return "", err
		}
		b.Color = Palette[i%len(Palette)]
		b.LineStyle.Width = 0
		b.Offset = barW * vg.Length(float64(i)-float64(len(ss)-1)/2)
		p.Add(b)
		if s.Name != "" {
			p.Legend.Add(s.Name, b)
		}
	}
	p.Legend.Top = true
	p.NominalX(names...)
	// Half a slot of room at each side, and head room for the legend.
	p.X.Min, p.X.Max = -0.5, float64(len(names))-0.5
	p.Y.Max = 1
	if top > 0 {
		p.Y.Max = top * 1.2
	}
	return SVG(p, 6*vg.Inch, 3.2*vg.Inch)
}

// HorizontalBars draws one horizontal bar per name as SVG, 6 inches wide
// and tall enough for the names, the first name on top. Values may be
// negative; the x axis spans them with a fifth of their range to spare and
// stops at zero on a side with no bars. Names longer than 32 characters
// are shortened as by Shorten.
func HorizontalBars(title, xlabel string, names []string, vals []float64) (template.HTML, error) {
	n := len(names)
	rn := make([]string, n)
	rv := make([]float64, n)
	lo, hi := 0.0, 0.0
	for i, v := range clean(vals[:n]) {
		// Reverse so the first name is drawn at the top.
		rn[n-1-i], rv[n-1-i] = Shorten(names[i]), v
		lo, hi = min(lo, v), max(hi, v)
	}
	p := plot.New()
	p.Title.Text = title
	p.X.Label.Text = xlabel
	b, err := plotter.NewBarChart(plotter.Values(rv), vg.Points(10))
	if err != nil {
		return "", err
	}
	b.Horizontal = true
	b.Color = Palette[0]
	b.LineStyle.Width = 0
	p.Add(b)
	p.NominalY(rn...)
	p.Y.Min, p.Y.Max = -0.6, float64(n)-0.4
	p.X.Min, p.X.Max = 0, 1
	if lo != 0 || hi != 0 {
		pad := 0.2 * (hi - lo)
		p.X.Min, p.X.Max = lo-pad, hi+pad
		if lo == 0 {
			p.X.Min = 0
		}
		if hi == 0 {
			p.X.Max = 0
		}
	}
	h := vg.Length(math.Max(2.2, 0.8+0.2*float64(n))) * vg.Inch
	return SVG(p, 6*vg.Inch, h)
}

// Shorten cuts s to 31 characters and an ellipsis when it is longer than
// 32, so long keys do not squeeze a plot's drawing area.
func Shorten(s string) string {
	r := []rune(s)
	if len(r) <= 32 {
		return s
	}
	return string(r[:31]) + "…"
}

// clean replaces values the plotter rejects (NaN, ±Inf) with zero.
func clean(vs []float64) []float64 {
	out := make([]float64, len(vs))
	for i, v := range vs {
		if !math.IsNaN(v) && !math.IsInf(v, 0) {
			out[i] = v
		}
	}
	return out
}

// svgOf is SVG for the plot builders that return their size and an error.
func svgOf(p *plot.Plot, w, h vg.Length, err error) (template.HTML, error) {
	if err != nil {
		return "", err
	}
	return SVG(p, w, h)
}
