package corpus

import (
	"bytes"
	"fmt"
	"strings"
	"testing"
)

// benchInput returns n invented Pellwick Bike Share tickets in format f,
// with some escapes, and options that read body, team and id.
func benchInput(f Format, n int) ([]byte, Options) {
	var b bytes.Buffer
	bodies := []string{
		"Dock 14 on Marrow Street refused to release my bike twice this week.",
		"Charged two unlock fees for one ride, please refund the second one.",
		"The app map showed five bikes at Quillon Square; there were none at all.",
		`Front brake squeals on bike 3307 and the "comfort" saddle is loose.`,
		"Great ride along the canal — smooth gears, café stop, back by nine.",
	}
	teams := []string{"docks", "billing", "app", "bikes", "bikes"}
	o := Options{Format: f, Text: []string{"body"}, Label: "team", ID: "id"}
	switch f {
	case Lines:
		o = Options{}
	case TSV:
		b.WriteString("id\tbody\tteam\n")
	case CSV:
		b.WriteString("id,body,team\n")
	}
	for i := range n {
		body, team := bodies[i%len(bodies)], teams[i%len(teams)]
		switch f {
		case Lines:
			fmt.Fprintf(&b, "%s\n", body)
		case TSV:
			fmt.Fprintf(&b, "t-%05d\t%s\\tsee above\t%s\n", i, body, team)
		case CSV:
			fmt.Fprintf(&b, "t-%05d,\"%s\",%s\n", i, strings.ReplaceAll(body, `"`, `""`), team)
		case JSONL:
			fmt.Fprintf(&b, `{"id":%d,"body":%q,"team":%q,"stars":[1,2]}`+"\n", i, body+"\n", team)
		}
	}
	return b.Bytes(), o
}

func BenchmarkRead(b *testing.B) {
	for _, f := range []Format{Lines, TSV, CSV, JSONL} {
		b.Run(f.String(), func(b *testing.B) {
			in, o := benchInput(f, 10000)
			b.SetBytes(int64(len(in)))
			b.ReportAllocs()
			for b.Loop() {
				r, err := NewReader(bytes.NewReader(in), "bench", o)
				if err != nil {
					b.Fatal(err)
				}
				for r.Scan() {
				}
				if r.Err() != nil || r.Records() != 10000 {
					b.Fatal(r.Err(), r.Records())
				}
			}
		})
	}
}
