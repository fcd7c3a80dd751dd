package report

import (
	"bytes"
	"fmt"
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

// WriteHTML writes the figures as one self-contained HTML page: the same
// sections and tables as WriteText, with plots drawn as inline SVG. The
// page loads nothing from elsewhere and needs no script.
func (f *Figures) WriteHTML(w io.Writer) error {
	secs := f.sections()
	page := htmlPage{Title: "bowline report"}
	if f.Command != "" {
		page.Title = "bowline " + f.Command + " report"
	}
	for _, s := range secs {
		hs := htmlSection{section: s}
		plots, err := f.plotsFor(s.Title)
		if err != nil {
			return err
		}
		hs.Plots = plots
		page.Sections = append(page.Sections, hs)
	}
	if err := pageTemplate.Execute(w, page); err != nil {
		return fmt.Errorf("report: writing HTML: %w", err)
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
caption { text-align: left; font-style: italic; padding-bottom: .3em; }
th, td { padding: .15em .8em .15em 0; text-align: left; vertical-align: top; }
thead th { border-bottom: 1px solid #ccc; }
table.pairs th { font-weight: normal; color: #555; }
td.num, th.num { text-align: right; font-variant-numeric: tabular-nums; }
figure { margin: 1em 0; }
figure svg { max-width: 100%; height: auto; }
figcaption { font-size: .9em; color: #555; }
p.caution { border-left: 4px solid #c60; padding: .4em .8em; background: #fdf3e7; }
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
{{- if .Caption}}
<caption>{{.Caption}}</caption>
{{- end}}
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
{{- if .Note}}
<p class="caution">{{.Note}}</p>
{{- end}}
</section>
{{- end}}
</body>
</html>
`))

// plotsFor draws the plots that belong to the section with the given title.
func (f *Figures) plotsFor(title string) ([]htmlPlot, error) {
	var out []htmlPlot
	add := func(caption string, svg template.HTML, err error) error {
		if err != nil {
			return fmt.Errorf("report: drawing %q: %w", caption, err)
		}
		if svg != "" {
			out = append(out, htmlPlot{Caption: caption, SVG: svg})
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
		svg, e := groupedBars("Table fields", "share of records (%)", names,
			[]series{{"missing", miss}, {"unseen level", unseen}, {"out of range", out}})
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
			svg, e := groupedBars("OOV share per n-gram order", "share (%)", names,
				[]series{{"token share", tok}, {"type share", typ}})
			err = add("Out-of-vocabulary share per n-gram order: emitted features (token share) and distinct keys (type share).", svg, e)
		}
		if err == nil && len(f.OOV.TopUnseen) > 0 {
			svg, e := countPlot("Top unseen keys", "features", f.OOV.TopUnseen)
			err = add("Most frequent keys not in the vocabulary.", svg, e)
		}
	case "collisions":
		c := f.Collisions
		svg, e := groupedBars("Collision rate", "share of distinct keys (%)", []string{"measured", "expected"},
			[]series{{"", []float64{100 * c.Rate, 100 * c.ExpectedRate}}})
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
			svg, e := groupedBars("Rows by non-zeros", "rows", names, []series{{"", vals}})
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

type series struct {
	Name   string
	Values []float64
}

var palette = []color.Color{
	color.RGBA{R: 0x2b, G: 0x6c, B: 0xb0, A: 0xff},
	color.RGBA{R: 0xd9, G: 0x7a, B: 0x1e, A: 0xff},
	color.RGBA{R: 0x4a, G: 0x9a, B: 0x5b, A: 0xff},
}

// groupedBars draws vertical bars, one group per name and one bar per
// series in each group.
func groupedBars(title, ylabel string, names []string, ss []series) (template.HTML, error) {
	return svgOf(groupedPlot(title, ylabel, names, ss))
}

func groupedPlot(title, ylabel string, names []string, ss []series) (*plot.Plot, vg.Length, vg.Length, error) {
	p := plot.New()
	p.Title.Text = title
	p.Y.Label.Text = ylabel
	p.Y.Min = 0
	barW := vg.Points(math.Max(6, math.Min(28, 220/float64(len(names)*len(ss)))))
	for i, s := range ss {
		b, err := plotter.NewBarChart(plotter.Values(clean(s.Values)), barW)
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
	// Half a slot of room at each side, and head room for the legend.
	p.X.Min, p.X.Max = -0.5, float64(len(names))-0.5
	p.Y.Max = headroom(ss)
	return p, 6 * vg.Inch, 3.2 * vg.Inch, nil
}

// countPlot draws horizontal bars for named counts, the first on top.
func countPlot(title, xlabel string, cs []Count) (template.HTML, error) {
	return svgOf(horizontalPlot(title, xlabel, cs))
}

func horizontalPlot(title, xlabel string, cs []Count) (*plot.Plot, vg.Length, vg.Length, error) {
	n := len(cs)
	names := make([]string, n)
	vals := make([]float64, n)
	for i, c := range cs {
		// Reverse so the first count is drawn at the top.
		names[n-1-i], vals[n-1-i] = shorten(c.Name), float64(c.Count)
	}
	p := plot.New()
	p.Title.Text = title
	p.X.Label.Text = xlabel
	p.X.Min = 0
	b, err := plotter.NewBarChart(plotter.Values(vals), vg.Points(10))
	if err != nil {
		return nil, 0, 0, err
	}
	b.Horizontal = true
	b.Color = palette[0]
	b.LineStyle.Width = 0
	p.Add(b)
	p.NominalY(names...)
	p.Y.Min, p.Y.Max = -0.6, float64(n)-0.4
	p.X.Max = headroom([]series{{Values: vals}})
	h := vg.Length(math.Max(2.2, 0.8+0.2*float64(n))) * vg.Inch
	return p, 6 * vg.Inch, h, nil
}

// headroom returns an axis maximum a little above the largest value.
func headroom(ss []series) float64 {
	top := 0.0
	for _, s := range ss {
		for _, v := range clean(s.Values) {
			top = max(top, v)
		}
	}
	if top == 0 {
		return 1
	}
	return top * 1.2
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

// svgOf draws p on an SVG canvas and returns the <svg> element alone,
// without the XML declaration, ready to sit inside an HTML page.
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
