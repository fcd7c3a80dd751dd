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

var pageTemplate = template.Must(template.New("page").Parse(`<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<title>{{.Title}}</title>
<style>
` + PageCSS + `ul.notes { color: #555; }
p.caution { border-left: 4px solid #c60; padding: .4em .8em; background: #fdf3e7; }
</style>
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
