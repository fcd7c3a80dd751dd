package corpus

import (
	"errors"
	"fmt"
	"strings"
	"testing"
)

// TestFields reads extra fields beside the text in every table format:
// bytes as stored, and in JSON Lines a number or boolean as its literal
// (RFC 8259 section 6 number grammar), null and an absent key as nil.
func TestFields(t *testing.T) {
	runCases(t, []readCase{
		{
			name: "tsv",
			in:   "id\tzone\ttext\tage\n1\tharbour\tflat tyre\t34\n2\t\tno dock\t\n",
			o:    Options{Format: TSV, Text: []string{"text"}, Fields: []string{"zone", "age"}},
			want: []string{`2 "flat tyre" label=nil id=nil f="harbour" f="34"`, `3 "no dock" label=nil id=nil f="" f=""`},
		},
		{
			name: "tsv by column number",
			in:   "1\tharbour\tflat tyre\n",
			o:    Options{Format: TSV, Text: []string{"3"}, Fields: []string{"2", "1"}, NoHeader: true},
			want: []string{`1 "flat tyre" label=nil id=nil f="harbour" f="1"`},
		},
		{
			name: "csv",
			in:   "zone,text,age\n\"old town\",\"a, b\",7.5\n",
			o:    Options{Format: CSV, Text: []string{"text"}, Fields: []string{"age", "zone"}},
			want: []string{`2 "a, b" label=nil id=nil f="7.5" f="old town"`},
		},
		{
			name: "jsonl values",
			in: `{"text":"a","zone":"harbour","age":34.50,"vip":true}` + "\n" +
				`{"text":"b","zone":null,"age":-1e3}` + "\n" +
				`{"text":"c","zone":"quay\u00e9","age":"","vip":false}` + "\n",
			o: Options{Format: JSONL, Text: []string{"text"}, Fields: []string{"zone", "age", "vip"}},
			want: []string{
				`1 "a" label=nil id=nil f="harbour" f="34.50" f="true"`,
				`2 "b" label=nil id=nil f=nil f="-1e3" f=nil`,
				`3 "c" label=nil id=nil f="quayé" f="" f="false"`,
			},
		},
		{
			name: "jsonl field repeated, refused",
			in:   `{"text":"a","zone":"x","zone":"y"}` + "\n",
			o:    Options{Format: JSONL, Text: []string{"text"}, Fields: []string{"zone"}},
			err:  `in:1:24: duplicate key "zone"`,
		},
		{
			name: "jsonl object value",
			in:   `{"text":"a","zone":{"x":1}}` + "\n",
			o:    Options{Format: JSONL, Text: []string{"text"}, Fields: []string{"zone"}},
			err:  `in:1:20: field "zone": wrong type: expected a string, number, boolean or null, found object`,
		},
		{
			name: "unknown field",
			in:   "text\tzone\nx\ty\n",
			o:    Options{Format: TSV, Text: []string{"text"}, Fields: []string{"plan"}},
			err:  `field "plan" not found in the header of in (columns: "text", "zone")`,
		},
		{
			name: "lines",
			in:   "x\n",
			o:    Options{Format: Lines, Fields: []string{"1"}},
			err:  "the lines format takes the whole line as the text; it has no text, label, id or other fields to choose",
		},
	})
}

// TestFieldsWrongTypeIsParseError checks the error is positioned and
// skippable like any other bad record.
func TestFieldsWrongTypeIsParseError(t *testing.T) {
	good, bad, errs := readSkipping(t, `{"text":"a","n":[1]}`+"\n"+`{"text":"b","n":2}`+"\n", Options{Format: JSONL, Text: []string{"text"}, Fields: []string{"n"}})
	if len(good) != 1 || len(bad) != 1 || len(errs) != 1 {
		t.Fatalf("good %v bad %v errs %v", good, bad, errs)
	}
	if !errors.Is(errs[0], ErrWrongType) || errs[0].Field != "n" || errs[0].Line != 1 {
		t.Errorf("error %v", errs[0])
	}
}

// Fields read beside the text: a JSON number keeps its literal, and an
// absent key or null gives nil (a missing value), not an error.
func ExampleOptions_fields() {
	in := `{"text":"flat tyre","zone":"Harbour","age":34.50}` + "\n" + `{"text":"dock full","zone":null}` + "\n"
	r, err := NewReader(strings.NewReader(in), "tickets.jsonl", Options{Format: JSONL, Text: []string{"text"}, Fields: []string{"zone", "age"}})
	if err != nil {
		panic(err)
	}
	for r.Scan() {
		rec := r.Record()
		fmt.Printf("%s: zone %q (nil %v), age %q (nil %v)\n", rec.Text[0], rec.Fields[0], rec.Fields[0] == nil, rec.Fields[1], rec.Fields[1] == nil)
	}
	// Output:
	// flat tyre: zone "Harbour" (nil false), age "34.50" (nil false)
	// dock full: zone "" (nil true), age "" (nil true)
}
