package corpus

import (
	"errors"
	"fmt"
	"strings"
	"testing"

	"github.com/bowline/bowline/internal/jsonscan"
)

// show renders a record as one line, so that tables can compare exactly:
// the line number, the text fields quoted, and label and id ("nil" when
// absent).
func show(rec *Record) string {
	var b strings.Builder
	fmt.Fprintf(&b, "%d", rec.Line)
	for _, t := range rec.Text {
		fmt.Fprintf(&b, " %q", t)
	}
	for _, v := range []struct {
		name string
		b    []byte
	}{{"label", rec.Label}, {"id", rec.ID}} {
		if v.b == nil {
			fmt.Fprintf(&b, " %s=nil", v.name)
		} else {
			fmt.Fprintf(&b, " %s=%q", v.name, v.b)
		}
	}
	for _, f := range rec.Fields {
		if f == nil {
			b.WriteString(" f=nil")
		} else {
			fmt.Fprintf(&b, " f=%q", f)
		}
	}
	return b.String()
}

// readAll reads every record of input; err is the NewReader or Err error.
func readAll(t testing.TB, input string, o Options) (recs []string, err error) {
	t.Helper()
	r, err := NewReader(strings.NewReader(input), "in", o)
	if err != nil {
		return nil, err
	}
	defer r.Close()
	for r.Scan() {
		recs = append(recs, show(r.Record()))
	}
	if int64(len(recs)) != r.Records() {
		t.Errorf("Records() = %d, returned %d", r.Records(), len(recs))
	}
	return recs, r.Err()
}

type readCase struct {
	name string
	in   string
	o    Options
	want []string // records, rendered by show
	err  string   // wanted error text ("" for none)
}

func runCases(t *testing.T, cases []readCase) {
	t.Helper()
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			got, err := readAll(t, c.in, c.o)
			if c.err == "" && err != nil {
				t.Fatalf("unexpected error: %v", err)
			}
			if c.err != "" {
				if err == nil {
					t.Fatalf("no error, want %q", c.err)
				}
				if err.Error() != c.err {
					t.Errorf("error\n got %q\nwant %q", err.Error(), c.err)
				}
			}
			if strings.Join(got, "\n") != strings.Join(c.want, "\n") {
				t.Errorf("records\n got %q\nwant %q", got, c.want)
			}
		})
	}
}

func TestFormatNames(t *testing.T) {
	for _, f := range []Format{Lines, TSV, CSV, JSONL} {
		g, err := ParseFormat(f.String())
		if err != nil || g != f {
			t.Errorf("ParseFormat(%q) = %v, %v", f.String(), g, err)
		}
	}
	if _, err := ParseFormat("xlsx"); err == nil {
		t.Error("ParseFormat(xlsx): no error")
	}
	if s := Format(9).String(); s != "Format(9)" {
		t.Errorf("Format(9).String() = %q", s)
	}
	for _, c := range []struct {
		name string
		want Format
	}{
		{"a.txt", Lines}, {"a.text", Lines}, {"dir.v2/a.lines", Lines}, {"A.TXT.GZ", Lines},
		{"a.tsv", TSV}, {"a.tab", TSV}, {"a.tsv.gz", TSV},
		{"a.csv", CSV}, {"x/y.csv.gz", CSV},
		{"a.jsonl", JSONL}, {"a.ndjson", JSONL}, {"a.jsonl.gz", JSONL},
	} {
		if f, err := FormatFromName(c.name); err != nil || f != c.want {
			t.Errorf("FormatFromName(%q) = %v, %v; want %v", c.name, f, err, c.want)
		}
	}
	for _, name := range []string{"a.json", "a.gz", "a", "-", "a.tsv.bz2"} {
		_, err := FormatFromName(name)
		if err == nil || !strings.Contains(err.Error(), "--format") {
			t.Errorf("FormatFromName(%q) error = %v, want one asking for --format", name, err)
		}
	}
}

func TestParseErrorString(t *testing.T) {
	base := errors.New("boom")
	for _, c := range []struct {
		e    ParseError
		want string
	}{
		{ParseError{"f.tsv", 3, 7, "body", base}, `f.tsv:3:7: field "body": boom`},
		{ParseError{"f.tsv", 3, 0, "", base}, `f.tsv:3: boom`},
		{ParseError{"", 3, 7, "", base}, `line 3:7: boom`},
		{ParseError{"f.tsv", 0, 0, "x", base}, `f.tsv: field "x": boom`},
		{ParseError{Err: base}, `boom`},
	} {
		if got := c.e.Error(); got != c.want {
			t.Errorf("Error() = %q, want %q", got, c.want)
		}
		if !errors.Is(&c.e, base) {
			t.Errorf("errors.Is(%v, base) = false", &c.e)
		}
	}
}

func TestLines(t *testing.T) {
	o := Options{Format: Lines}
	runCases(t, []readCase{
		{name: "plain", in: "a b\nc d\n", o: o,
			want: []string{`1 "a b" label=nil id=nil`, `2 "c d" label=nil id=nil`}},
		{name: "no final newline", in: "a\nb", o: o,
			want: []string{`1 "a" label=nil id=nil`, `2 "b" label=nil id=nil`}},
		{name: "CRLF", in: "a\r\nb\r\n", o: o,
			want: []string{`1 "a" label=nil id=nil`, `2 "b" label=nil id=nil`}},
		// A CR not followed by LF is text, not a line end.
		{name: "lone CR", in: "a\rb\r\nc\r", o: o,
			want: []string{`1 "a\rb" label=nil id=nil`, `2 "c\r" label=nil id=nil`}},
		{name: "empty docs", in: "\n\na\n\n", o: o,
			want: []string{`1 "" label=nil id=nil`, `2 "" label=nil id=nil`, `3 "a" label=nil id=nil`, `4 "" label=nil id=nil`}},
		{name: "empty file", in: "", o: o},
		{name: "BOM", in: "\ufeffa\n\ufeffb\n", o: o,
			want: []string{`1 "a" label=nil id=nil`, `2 "\ufeffb" label=nil id=nil`}},
		{name: "only BOM", in: "\ufeff", o: o},
	})
}

func TestTSV(t *testing.T) {
	o := Options{Format: TSV, Text: []string{"body"}, Label: "team", ID: "id"}
	esc := o
	esc.TSVEscapes = true
	runCases(t, []readCase{
		{name: "header names", in: "id\tbody\tteam\nt1\tflat tyre\tbikes\nt2\tdouble charge\tbilling\n", o: o,
			want: []string{`2 "flat tyre" label="bikes" id="t1"`, `3 "double charge" label="billing" id="t2"`}},
		// The IANA text/tab-separated-values registration has no escapes:
		// by default a backslash is a backslash.
		{name: "literal backslashes", in: "id\tbody\tteam\nt1\tC:\\new\\table \\\tbikes\n", o: o,
			want: []string{`2 "C:\\new\\table \\" label="bikes" id="t1"`}},
		{name: "escapes", in: "id\tbody\tteam\nt1\ta\\tb\\nc\\rd\\\\e\\xf\\\tbikes\n", o: esc,
			want: []string{`2 "a\tb\nc\rd\\e\\xf\\" label="bikes" id="t1"`}},
		{name: "CRLF and BOM", in: "\ufeffid\tbody\tteam\r\nt1\tx\ty\r\n", o: o,
			want: []string{`2 "x" label="y" id="t1"`}},
		{name: "lone CR", in: "id\tbody\tteam\nt1\tx\ry\tz\n", o: o,
			want: []string{`2 "x\ry" label="z" id="t1"`}},
		{name: "empty field", in: "id\tbody\tteam\nt1\t\tz\n", o: o,
			want: []string{`2 "" label="z" id="t1"`}},
		{name: "column numbers", in: "id\tbody\tteam\nt1\tx\ty\n",
			o:    Options{Format: TSV, Text: []string{"2", "1"}, Label: "3"},
			want: []string{`2 "x" "t1" label="y" id=nil`}},
		{name: "no header", in: "t1\tx\ty\nt2\t\tz",
			o:    Options{Format: TSV, Text: []string{"2"}, Label: "3", NoHeader: true},
			want: []string{`1 "x" label="y" id=nil`, `2 "" label="z" id=nil`}},
		{name: "one column, empty lines are documents", in: "body\na\n\nb\n",
			o:    Options{Format: TSV, Text: []string{"body"}},
			want: []string{`2 "a" label=nil id=nil`, `3 "" label=nil id=nil`, `4 "b" label=nil id=nil`}},
		// Column = start of the first surplus field: "t2\tx\ty\t" is 7 bytes.
		{name: "too many fields", in: "id\tbody\tteam\nt1\tx\ty\nt2\tx\ty\tz\n", o: o,
			want: []string{`2 "x" label="y" id="t1"`},
			err:  `in:3:8: wrong number of fields: found 4, expected 3`},
		// Column = start of the last field present: "t2\t" is 3 bytes.
		{name: "too few fields", in: "id\tbody\tteam\nt2\tx\n", o: o,
			err: `in:2:4: wrong number of fields: found 2, expected 3`},
		{name: "blank line among three columns", in: "id\tbody\tteam\nt1\tx\ty\n\n", o: o,
			want: []string{`2 "x" label="y" id="t1"`},
			err:  `in:3:1: wrong number of fields: found 1, expected 3`},
		// The width comes from the first row; the BOM's 3 bytes count in
		// line 1's columns.
		{name: "no header after BOM", in: "\ufeffa\tb\tc\td\n",
			o:    Options{Format: TSV, Text: []string{"1"}, NoHeader: true},
			want: []string{`1 "a" label=nil id=nil`}},
		{name: "ragged no header", in: "\ufeffa\tb\nc\td\te\n",
			o:    Options{Format: TSV, Text: []string{"1"}, NoHeader: true},
			want: []string{`1 "a" label=nil id=nil`},
			err:  `in:2:5: wrong number of fields: found 3, expected 2`},
	})
}

func TestTSVFieldCountBOM(t *testing.T) {
	// A header longer than a first data line; the data line's column
	// counts file bytes, and the header's BOM (3 bytes) is on line 1.
	r, err := NewReader(strings.NewReader("\ufeffa\tb\tc\nx\ty\tz\tw\n"), "in", Options{Format: TSV, Text: []string{"a"}})
	if err != nil {
		t.Fatal(err)
	}
	if h := r.Header(); strings.Join(h, ",") != "a,b,c" {
		t.Fatalf("Header() = %q", h)
	}
	if r.Scan() {
		t.Fatal("Scan: true")
	}
	var pe *ParseError
	if !errors.As(r.Err(), &pe) || pe.Line != 2 || pe.Column != 7 || !errors.Is(pe, ErrFieldCount) {
		t.Fatalf("Err() = %v, want line 2 column 7 field count", r.Err())
	}
	// A BOM later in the file is data, not skipped: "\ufeffx,y" has y
	// at byte 6.
	_, err = readAll(t, "\ufeffa,b,c\n\ufeffx,y\n", Options{Format: CSV, Text: []string{"a"}})
	if err == nil || err.Error() != "in:2:6: wrong number of fields: found 2, expected 3" {
		t.Fatalf("err = %v", err)
	}
	// A CSV error on line 1 after a BOM: the stray quote is byte 7
	// (3 BOM bytes, "a,b").
	_, err = readAll(t, "\ufeffa,b\"c\n", Options{Format: CSV, Text: []string{"1"}, NoHeader: true})
	if err == nil || err.Error() != `in:1:7: bare " in non-quoted-field` {
		t.Fatalf("err = %v", err)
	}
}

func TestCSV(t *testing.T) {
	o := Options{Format: CSV, Text: []string{"body"}, Label: "team", ID: "id"}
	runCases(t, []readCase{
		// RFC 4180 section 2 rule 1 and 2: CRLF-terminated records, the
		// last one may lack its line break.
		{name: "RFC 4180 rules 1-2", in: "id,body,team\r\naaa,bbb,ccc\r\nzzz,yyy,xxx", o: o,
			want: []string{`2 "bbb" label="ccc" id="aaa"`, `3 "yyy" label="xxx" id="zzz"`}},
		// Rule 6: fields holding line breaks (CRLF), double quotes and
		// commas must be quoted. encoding/csv reads the CRLF inside the
		// quotes as LF. The record starts on line 2.
		{name: "RFC 4180 rule 6 embedded CRLF and comma", in: "id,body,team\r\n\"aaa\",\"b\r\nbb\",\"c,cc\"\r\nzzz,yyy,xxx\r\n", o: o,
			want: []string{`2 "b\nbb" label="c,cc" id="aaa"`, `4 "yyy" label="xxx" id="zzz"`}},
		// Rule 7: a double quote inside a quoted field is doubled.
		{name: "RFC 4180 rule 7 doubled quote", in: "id,body,team\n\"aaa\",\"b\"\"bb\",\"ccc\"\n", o: o,
			want: []string{`2 "b\"bb" label="ccc" id="aaa"`}},
		{name: "BOM", in: "\ufeffid,body,team\n1,x,y\n", o: o,
			want: []string{`2 "x" label="y" id="1"`}},
		{name: "lone CR in field", in: "id,body,team\n1,x\ry,z\n", o: o,
			want: []string{`2 "x\ry" label="z" id="1"`}},
		{name: "empty docs", in: "id,body,team\n1,,z\n2,\"\",z\n", o: o,
			want: []string{`2 "" label="z" id="1"`, `3 "" label="z" id="2"`}},
		{name: "column numbers no header", in: "a,b\nc,d\n",
			o:    Options{Format: CSV, Text: []string{"2"}, ID: "1", NoHeader: true},
			want: []string{`1 "b" label=nil id="a"`, `2 "d" label=nil id="c"`}},
		// Ragged rows: column of the first surplus field ("1,x,y," is 6
		// bytes), or of the last field present.
		{name: "too many fields", in: "id,body,team\n1,x,y,extra\n", o: o,
			err: `in:2:7: wrong number of fields: found 4, expected 3`},
		{name: "too few fields", in: "id,body,team\n1,x,y\n2,\"xx\"\n", o: o,
			want: []string{`2 "x" label="y" id="1"`},
			err:  `in:3:3: wrong number of fields: found 2, expected 3`},
		// A surplus field after a quoted field spanning lines: line 3.
		{name: "too many fields after multi-line field", in: "id,body,team\n1,\"x\ny\",z,w\n", o: o,
			err: `in:3:6: wrong number of fields: found 4, expected 3`},
		// RFC 4180 rule 5: a field without enclosing quotes may not hold
		// a quote. Column of the stray quote.
		{name: "bare quote", in: "id,body,team\n1,x\"y,z\n", o: o,
			err: `in:2:4: bare " in non-quoted-field`},
		// Unbalanced quote: encoding/csv reports the end of the input.
		{name: "unbalanced quote", in: "id,body,team\n1,x,y\n2,\"open,z\n3,a,b\n", o: o,
			want: []string{`2 "x" label="y" id="1"`},
			err:  `in:4:7: extraneous or missing " in quoted-field (in the record that starts on line 3)`},
		{name: "quote then text", in: "id,body,team\n1,\"x\"y,z\n", o: o,
			err: `in:2:5: extraneous or missing " in quoted-field`},
	})
}

func TestJSONL(t *testing.T) {
	o := Options{Format: JSONL, Text: []string{"body"}, Label: "team", ID: "id"}
	runCases(t, []readCase{
		{name: "strings", in: `{"id":"t1","body":"flat tyre","team":"bikes"}` + "\n" + `{"team":"app","body":"map wrong","id":"t2","x":[1,{"body":2}]}`, o: o,
			want: []string{`1 "flat tyre" label="bikes" id="t1"`, `2 "map wrong" label="app" id="t2"`}},
		// RFC 8259 section 7: escapes, including a UTF-16 surrogate pair
		// for U+1F6B2 (bicycle).
		{name: "RFC 8259 escapes", in: `{"id":1,"body":"a\"b\\c\/d\b\f\n\r\t\u00e9\ud83d\udeb2","team":2.50}` + "\n", o: o,
			want: []string{`1 "a\"b\\c/d\b\f\n\r\té🚲" label="2.50" id="1"`}},
		// encoding/json turns an unpaired surrogate and invalid UTF-8 into
		// U+FFFD; the reader does the same.
		{name: "replacement", in: "{\"id\":1,\"body\":\"\\ud83d x \xff\",\"team\":2}\n", o: o,
			want: []string{`1 "` + "\ufffd x \ufffd" + `" label="2" id="1"`}},
		{name: "null is empty", in: `{"id":null,"body":null,"team":null}`, o: o,
			want: []string{`1 "" label="" id=""`}},
		{name: "number literal kept", in: `{"id":-1.5e+3,"body":"x","team":10}`, o: o,
			want: []string{`1 "x" label="10" id="-1.5e+3"`}},
		{name: "blank lines skipped", in: "\n  \n" + `{"id":1,"body":"x","team":2}` + "\r\n\t\n" + `  {"id":2,"body":"y","team":3}  `, o: o,
			want: []string{`3 "x" label="2" id="1"`, `5 "y" label="3" id="2"`}},
		{name: "BOM", in: "\ufeff" + `{"id":1,"body":"x","team":2}`, o: o,
			want: []string{`1 "x" label="2" id="1"`}},
		{name: "duplicate key refused", in: `{"id":1,"body":"x","team":2,"body":"y"}`, o: o,
			err: `in:1:29: duplicate key "body"`},
		{name: "escaped key", in: `{"i\u0064":1,"b\u006fdy":"x","team":2}`, o: o,
			want: []string{`1 "x" label="2" id="1"`}},
		{name: "two text fields", in: `{"a":"x","b":"y\u00e9"}`,
			o:    Options{Format: JSONL, Text: []string{"b", "a", "b"}},
			want: []string{`1 "yé" "x" "yé" label=nil id=nil`}},
		{name: "number where text should be", in: `{"id":1,"body":"x","team":2}` + "\n" + `{"id":2, "body": 42,"team":2}`, o: o,
			want: []string{`1 "x" label="2" id="1"`},
			err:  `in:2:18: field "body": wrong type: expected a string, found number`},
		{name: "object label", in: ` {"id":1,"body":"x","team":{"a":1}}`, o: o,
			err: `in:1:28: field "team": wrong type: expected a string or a number, found object`},
		{name: "bool id", in: `{"id":true,"body":"x","team":1}`, o: o,
			err: `in:1:7: field "id": wrong type: expected a string or a number, found boolean`},
		{name: "array text", in: `{"id":1,"body":["x"],"team":1}`, o: o,
			err: `in:1:16: field "body": wrong type: expected a string, found array`},
		{name: "missing field", in: `{"id":1,"team":1}`, o: o,
			err: `in:1: field "body": missing field`},
		{name: "missing label", in: `{"id":1,"body":"x"}`, o: o,
			err: `in:1: field "team": missing field`},
		// Broken JSON: the column is json.SyntaxError's offset, here the
		// '}' at byte 25 of line 3.
		{name: "broken line", in: `{"id":1,"body":"x","team":1}` + "\n\n" + `{"id":1,"body":"x","team":}`, o: o,
			want: []string{`1 "x" label="1" id="1"`},
			err:  `in:3:27: invalid character '}' looking for beginning of value`},
		{name: "truncated object", in: `{"id":1,"body":"x"`, o: o,
			err: `in:1:18: unexpected end of JSON input`},
		{name: "not an object", in: `["x"]`, o: o,
			err: `in:1:1: not a JSON object: found array`},
	})
}

// TestRecordBound: a record over Options.MaxRecord is a *ParseError
// wrapping ErrRecordTooLong that names its line and cannot be skipped; a
// record of exactly the bound is read. CSV counts a quoted record's line
// breaks as part of the record.
func TestRecordBound(t *testing.T) {
	long := strings.Repeat("x", 40)
	for _, c := range []struct {
		name string
		o    Options
		in   string
		line int64
	}{
		{"lines", Options{Format: Lines}, "short\n" + long + "\nafter\n", 2},
		{"tsv", Options{Format: TSV, Text: []string{"text"}}, "text\nshort\n" + long + "\n", 3},
		{"jsonl", Options{Format: JSONL, Text: []string{"text"}}, `{"text":"a"}` + "\n" + `{"text":"` + long + `"}` + "\n", 2},
		{"csv", Options{Format: CSV, Text: []string{"text"}}, "text\nshort\n\"" + long + "\n" + long + "\"\n", 3},
	} {
		t.Run(c.name, func(t *testing.T) {
			c.o.MaxRecord = 32
			r, err := NewReader(strings.NewReader(c.in), "big."+c.name, c.o)
			if err != nil {
				t.Fatal(err)
			}
			n := 0
			for r.Scan() {
				n++
			}
			var pe *ParseError
			if !errors.As(r.Err(), &pe) || !errors.Is(r.Err(), ErrRecordTooLong) || pe.Line != c.line {
				t.Fatalf("after %d records: %v, want ErrRecordTooLong on line %d", n, r.Err(), c.line)
			}
			if r.Skip() {
				t.Error("a record over the bound was skippable")
			}
		})
	}
	exact := strings.Repeat("y", 32)
	r, err := NewReader(strings.NewReader(exact+"\n"+exact), "exact.txt", Options{Format: Lines, MaxRecord: 32})
	if err != nil {
		t.Fatal(err)
	}
	n := 0
	for r.Scan() {
		n++
	}
	if r.Err() != nil || n != 2 {
		t.Errorf("records of exactly the bound: %d read, %v", n, r.Err())
	}
}

// TestJSONLDuplicateKey: a JSON Lines object holding a key twice (RFC 8259
// section 4: names SHOULD be unique; encoding/json would keep the last) is
// a positioned error at the second key, skippable, whether the key is one
// the reader takes or not.
func TestJSONLDuplicateKey(t *testing.T) {
	in := `{"text":"a"}` + "\n" + `{"text":"b", "team":"x", "text":"c"}` + "\n" + `  {"n":1,"n":2,"text":"d"}` + "\n" + `{"text":"e"}` + "\n"
	r, err := NewReader(strings.NewReader(in), "dup.jsonl", Options{Format: JSONL, Text: []string{"text"}})
	if err != nil {
		t.Fatal(err)
	}
	var got []string
	var errs []string
	for {
		if r.Scan() {
			got = append(got, string(r.Record().Text[0]))
			continue
		}
		if r.Err() == nil {
			break
		}
		errs = append(errs, r.Err().Error())
		if !errors.Is(r.Err(), jsonscan.ErrDuplicateKey) || !r.Skip() {
			t.Fatalf("%v: not a skippable duplicate key", r.Err())
		}
	}
	want := []string{`dup.jsonl:2:26: duplicate key "text"`, `dup.jsonl:3:10: duplicate key "n"`}
	if strings.Join(got, " ") != "a e" || strings.Join(errs, "|") != strings.Join(want, "|") {
		t.Errorf("records %q, errors %q; want a e and %q", got, errs, want)
	}
}
