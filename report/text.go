package report

import (
	"bufio"
	"io"
	"strings"
	"text/tabwriter"
)

// WriteText writes the figures for people: one titled block per section,
// labels and values aligned, tables in aligned columns. Sections with
// nothing to report are left out.
func (f *Figures) WriteText(w io.Writer) error {
	bw := bufio.NewWriter(w)
	for i, s := range f.sections() {
		if i > 0 {
			bw.WriteByte('\n')
		}
		bw.WriteString(s.Title + "\n")
		if len(s.Pairs) > 0 {
			tw := tabwriter.NewWriter(bw, 0, 0, 2, ' ', 0)
			for _, p := range s.Pairs {
				io.WriteString(tw, "  "+p.Label+"\t"+p.Value+"\n")
			}
			tw.Flush()
		}
		for _, t := range s.Tables {
			writeTextTable(bw, t)
		}
	}
	return bw.Flush()
}

// writeTextTable writes t indented, numeric columns right-aligned.
func writeTextTable(w io.Writer, t table) {
	if t.Caption != "" {
		io.WriteString(w, "  "+t.Caption+"\n")
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
	line := func(cells []string) {
		var b strings.Builder
		b.WriteString("    ")
		for i, c := range cells {
			pad := strings.Repeat(" ", widths[i]-runeLen(c))
			if i > 0 {
				b.WriteString("  ")
			}
			if t.Num[i] {
				b.WriteString(pad + c)
			} else if i == len(cells)-1 {
				b.WriteString(c)
			} else {
				b.WriteString(c + pad)
			}
		}
		b.WriteByte('\n')
		io.WriteString(w, b.String())
	}
	line(t.Head)
	for _, r := range t.Rows {
		line(r)
	}
}

func runeLen(s string) int { return len([]rune(s)) }
