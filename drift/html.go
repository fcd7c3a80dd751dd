package drift

import (
	"bytes"
	"fmt"
	"github.com/bowline/bowline/report"
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

// WriteHTML writes r as one self-contained HTML page: the sections and
// tables of WriteText, with plots as inline SVG (OOV share and JSD per
// order, the most moved keys, label shares). The page loads nothing from
// elsewhere and needs no script.
func (r *Result) WriteHTML(w io.Writer) error {
	page := htmlPage{Title: "bowline drift report"}
	for i, s := range r.sections() {
		hs := htmlSection{section: s}
		if i == 0 {
			// The spec's vocabulary, for comparison with what came.
			caps, svgs, err := report.CurvePlots(r.Curves)
			if err != nil {
				return err
			}
			for j := range caps {
				hs.Plots = append(hs.Plots, htmlPlot{caps[j], svgs[j]})
			}
		}
		for _, name := range s.plots {
			p, err := r.plot(name)
			if err != nil {
				return fmt.Errorf("drift: drawing %s plot: %w", name, err)
			}
			if p.SVG != "" {
				hs.Plots = append(hs.Plots, p)
			}
		}
		page.Sections = append(page.Sections, hs)
	}
	if err := pageTemplate.Execute(w, page); err != nil {
		return fmt.Errorf("drift: writing HTML: %w", err)
	}
	return nil
}

type htmlPage struct {
	Title    string
	Sections []htmlSection
}

type htmlSection struct {
	section
	Plots []htmlPlot
}

type htmlPlot struct {
	Caption string
	// SVG is markup drawn by vgsvg, which escapes every string it draws.
	SVG template.HTML
}

var pageTemplate = template.Must(template.New("page").Parse(`<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<title>{{.Title}}</title>
<style>
body { font-family: sans-serif; margin: 2em auto; max-width: 60em; padding: 0 1em; color: #222; }
h1 { font-size: 1.5em; }
h2 { font-size: 1.2em; border-bottom: 1px solid #ccc; padding-bottom: .2em; margin-top: 2em; }
table { border-collapse: collapse; margin: .8em 0; }
th, td { padding: .15em .8em .15em 0; text-align: left; vertical-align: top; }
thead th { border-bottom: 1px solid #ccc; }
table.pairs th { font-weight: normal; color: #555; }
td.num, th.num { text-align: right; font-variant-numeric: tabular-nums; }
figure { margin: 1em 0; }
figure svg { max-width: 100%; height: auto; }
figcaption { font-size: .9em; color: #555; }
ul.notes { color: #555; }
</style>
</head>
<body>
<h1>{{.Title}}</h1>
{{- range .Sections}}
<section>
<h2>{{.Title}}</h2>
{{- if .Pairs}}
<table class="pairs">
{{- range .Pairs}}
<tr><th>{{.Label}}</th><td>{{.Value}}</td></tr>
{{- end}}
</table>
{{- end}}
{{- range .Tables}}{{$num := .Num}}
<table>
<thead><tr>{{range $i, $h := .Head}}<th{{if index $num $i}} class="num"{{end}}>{{$h}}</th>{{end}}</tr></thead>
<tbody>
{{- range .Rows}}
<tr>{{range $i, $c := .}}<td{{if index $num $i}} class="num"{{end}}>{{$c}}</td>{{end}}</tr>
{{- end}}
</tbody>
</table>
{{- end}}
{{- range .Plots}}
<figure>
{{.SVG}}
<figcaption>{{.Caption}}</figcaption>
</figure>
{{- end}}
{{- if .Notes}}
<ul class="notes">
{{- range .Notes}}
<li>{{.}}</li>
{{- end}}
</ul>
{{- end}}
</section>
{{- end}}
</body>
</html>
`))

var palette = []color.Color{
	color.RGBA{R: 0x2b, G: 0x6c, B: 0xb0, A: 0xff},
	color.RGBA{R: 0xd9, G: 0x7a, B: 0x1e, A: 0xff},
}

type series struct {
	Name   string
	Values []float64
}

// plot draws the named plot; an empty SVG means there is nothing to draw.
func (r *Result) plot(name string) (htmlPlot, error) {
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
			return htmlPlot{}, nil
		}
		svg, err := svgOf(groupedPlot("OOV share per n-gram order", "share (%)", names, []series{{"token share", tok}, {"type share", typ}}))
		return htmlPlot{"Out-of-vocabulary share per n-gram order: emitted features (token share) and distinct keys (type share).", svg}, err
	case "jsd":
		var v []float64
		for _, o := range r.ByOrder {
			if o.JSD != nil {
				names = append(names, o.Order)
				v = append(v, *o.JSD)
			}
		}
		if len(names) == 0 {
			return htmlPlot{}, nil
		}
		svg, err := svgOf(groupedPlot("Jensen–Shannon divergence per n-gram order", "JSD (bits)", names, []series{{"", v}}))
		return htmlPlot{"Jensen–Shannon divergence (Lin 1991) between training and new document-share distributions, per order; 0 is no change, 1 bit is no overlap.", svg}, err
	case "moved":
		if len(r.Moved) == 0 {
			return htmlPlot{}, nil
		}
		labels := make([]string, len(r.Moved))
		vals := make([]float64, len(r.Moved))
		for i, m := range r.Moved {
			labels[i], vals[i] = m.Key, 100*m.Change
		}
		svg, err := svgOf(horizontalPlot("Keys whose document share moved most", "change of document share (percentage points)", labels, vals))
		return htmlPlot{"Change of each key's document share, new corpus minus training; bars right of zero grew.", svg}, err
	case "labels":
		if r.Labels == nil || len(r.Labels.Labels) == 0 {
			return htmlPlot{}, nil
		}
		var then, now []float64
		for _, l := range r.Labels.Labels {
			names = append(names, shorten(l.Label))
			then = append(then, 100*l.TrainingShare)
			now = append(now, 100*l.Share)
		}
		svg, err := svgOf(groupedPlot("Label shares", "share of labeled documents (%)", names, []series{{"training", then}, {"now", now}}))
		return htmlPlot{"Share of documents per label, training corpus and new corpus.", svg}, err
	}
	return htmlPlot{}, fmt.Errorf("unknown plot %q", name)
}

// groupedPlot draws vertical bars, one group per name and one bar per
// series in each group.
func groupedPlot(title, ylabel string, names []string, ss []series) (*plot.Plot, vg.Length, vg.Length, error) {
	p := plot.New()
	p.Title.Text = title
	p.Y.Label.Text = ylabel
	barW := vg.Points(math.Max(6, math.Min(28, 220/float64(len(names)*len(ss)))))
	top := 0.0
	for i, s := range ss {
		vals := clean(s.Values)
		for _, v := range vals {
			top = max(top, v)
		}
		b, err := plotter.NewBarChart(plotter.Values(vals), barW)
		if err != nil {
			return nil, 0, 0, err
		}
		b.Color = palette[i%len(palette)]
		b.LineStyle.Width = 0
		b.Offset = barW * vg.Length(float64(i)-float64(len(ss)-1)/2)
		p.Add(b)
		if s.Name != "" {
			p.Legend.Add(s.Name, b)
		}
	}
	p.Legend.Top = true
	p.NominalX(names...)
	p.X.Min, p.X.Max = -0.5, float64(len(names))-0.5
	p.Y.Min, p.Y.Max = 0, 1
	if top > 0 {
		p.Y.Max = top * 1.25
	}
	return p, 6 * vg.Inch, 3.2 * vg.Inch, nil
}

// horizontalPlot draws one horizontal bar per name, the first on top;
// values may be negative.
func horizontalPlot(title, xlabel string, names []string, vals []float64) (*plot.Plot, vg.Length, vg.Length, error) {
	n := len(names)
	rn := make([]string, n)
	rv := make([]float64, n)
	lo, hi := 0.0, 0.0
	for i := range names {
		v := clean(vals[i : i+1])[0]
		rn[n-1-i], rv[n-1-i] = shorten(names[i]), v
		lo, hi = min(lo, v), max(hi, v)
	}
	p := plot.New()
	p.Title.Text = title
	p.X.Label.Text = xlabel
	b, err := plotter.NewBarChart(plotter.Values(rv), vg.Points(10))
	if err != nil {
		return nil, 0, 0, err
	}
	b.Horizontal = true
	b.Color = palette[0]
	b.LineStyle.Width = 0
	p.Add(b)
	p.NominalY(rn...)
	p.Y.Min, p.Y.Max = -0.6, float64(n)-0.4
	if lo == 0 && hi == 0 {
		hi = 1
	}
	pad := 0.1 * (hi - lo)
	p.X.Min, p.X.Max = lo-pad, hi+pad
	if lo == 0 {
		p.X.Min = 0
	}
	if hi == 0 {
		p.X.Max = 0
	}
	h := vg.Length(math.Max(2.2, 0.8+0.2*float64(n))) * vg.Inch
	return p, 6 * vg.Inch, h, nil
}

// shorten keeps long keys from squeezing the plot area.
func shorten(s string) string {
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

// svgOf draws p on an SVG canvas and returns the <svg> element alone.
func svgOf(p *plot.Plot, w, h vg.Length, err error) (template.HTML, error) {
	if err != nil {
		return "", err
	}
	c := vgsvg.New(w, h)
	p.Draw(draw.New(c))
	var buf bytes.Buffer
	if _, err := c.WriteTo(&buf); err != nil {
		return "", err
	}
	s := buf.String()
	i := strings.Index(s, "<svg")
	if i < 0 {
		return "", fmt.Errorf("no <svg> element in plot output")
	}
	return template.HTML(strings.TrimSpace(s[i:])), nil
}
