package report

import (
	"bufio"
	"io"
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
			t.WriteText(bw)
		}
	}
	return bw.Flush()
}
