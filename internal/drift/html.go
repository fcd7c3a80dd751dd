package drift

import (
	"fmt"
	"html/template"
	"io"

	"github.com/bowline/bowline/report"
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
` + report.PageCSS + `ul.notes { color: #555; }
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
		svg, err := report.GroupedBars("OOV share per n-gram order", "share (%)", names, []report.Series{{Name: "token share", Values: tok}, {Name: "type share", Values: typ}})
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
		svg, err := report.GroupedBars("Jensen–Shannon divergence per n-gram order", "JSD (bits)", names, []report.Series{{Values: v}})
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
		svg, err := report.HorizontalBars("Keys whose document share moved most", "change of document share (percentage points)", labels, vals)
		return htmlPlot{"Change of each key's document share, new corpus minus training; bars right of zero grew.", svg}, err
	case "labels":
		if r.Labels == nil || len(r.Labels.Labels) == 0 {
			return htmlPlot{}, nil
		}
		var then, now []float64
		for _, l := range r.Labels.Labels {
			names = append(names, report.Shorten(l.Label))
			then = append(then, 100*l.TrainingShare)
			now = append(now, 100*l.Share)
		}
		svg, err := report.GroupedBars("Label shares", "share of labeled documents (%)", names, []report.Series{{Name: "training", Values: then}, {Name: "now", Values: now}})
		return htmlPlot{"Share of documents per label, training corpus and new corpus.", svg}, err
	}
	return htmlPlot{}, fmt.Errorf("unknown plot %q", name)
}
