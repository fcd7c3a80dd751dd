package report

import (
	"fmt"
	"html/template"
	"io"
)

// Page is one self-contained HTML page, the skeleton of every page bowline
// writes: a title, shown as the page's heading, then its sections in order.
type Page struct {
	Title    string
	Sections []Section
}

// Section is one block of a page. Its parts are shown in this order, each
// only when set: label/value pairs, tables, figures, notes and a caution.
type Section struct {
	// Title is the section's heading; a section without one has none.
	Title   string
	Pairs   []Pair
	Tables  []Table
	Figures []Figure
	// Notes are remarks shown as a list under the section.
	Notes []string
	// Caution is a warning shown set off under the section, as for strings
	// from the corpus that may carry personal data.
	Caution string
}

// Pair is one labelled value of a section.
type Pair struct {
	Label string
	Value string
}

// Figure is a plot with its caption.
type Figure struct {
	Caption string
	// SVG is an <svg> element, as SVG returns it; it is written to the
	// page as it is, so it must come from a renderer that escapes the
	// strings it draws (vgsvg does).
	SVG template.HTML
}

// WriteHTML writes p as one HTML document. The page loads nothing from
// elsewhere and has no script; every string is escaped except the figures'
// SVG markup.
func (p *Page) WriteHTML(w io.Writer) error {
	if err := pageTemplate.Execute(w, p); err != nil {
		return fmt.Errorf("report: writing HTML: %w", err)
	}
	return nil
}

// pageCSS lays out the page, its headings, tables (class "pairs" for
// label/value tables, class "num" for numeric cells), figures holding
// inline SVG, notes and cautions.
const pageCSS = `body { font-family: sans-serif; margin: 2em auto; max-width: 60em; padding: 0 1em; color: #222; }
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
ul.notes { color: #555; }
p.caution { border-left: 4px solid #c60; padding: .4em .8em; background: #fdf3e7; }
`

var pageTemplate = template.Must(template.New("page").Parse(`<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<title>{{.Title}}</title>
<style>
` + pageCSS + `</style>
</head>
<body>
<h1>{{.Title}}</h1>
{{- range .Sections}}
<section>
{{- if .Title}}
<h2>{{.Title}}</h2>
{{- end}}
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
{{- range .Figures}}
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
{{- if .Caution}}
<p class="caution">{{.Caution}}</p>
{{- end}}
</section>
{{- end}}
</body>
</html>
`))
