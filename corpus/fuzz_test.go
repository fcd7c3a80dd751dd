package corpus

import (
	"bytes"
	"encoding/json"
	"errors"
	"strings"
	"testing"
)

// FuzzReaders feeds arbitrary bytes to the reader of each format. It must
// never panic, and must either yield records or stop with a *ParseError.
// For JSON Lines it also checks every decoded field against encoding/json
// (the reference decoder for RFC 8259 in the standard library).
func FuzzReaders(f *testing.F) {
	seeds := []struct {
		f    Format
		data string
	}{
		{Lines, "a\r\nb\rc\n\n\ufeffd"},
		{Lines, "\ufeffonly"},
		{TSV, "id\tbody\nt1\ta\\tb\\\\\nt2\n"},
		{TSV, "a\tb\n\tx\ty\n"},
		{CSV, "id,body\r\n\"a,b\",\"c\"\"d\r\ne\"\r\n"},
		{CSV, "a,b\n\"open,x\n"},
		{CSV, "a,b\nx\"y,z\n1,2,3\n"},
		{JSONL, `{"text":"a\u00e9\ud83d\ude00","label":3,"id":"x"}` + "\n\n" + `{"text":null,"label":"y","id":1e3}`},
		{JSONL, `{"text":5}` + "\n" + `{"text":"x"`},
		{JSONL, "{\"text\":\"\\ud800\xff\",\"label\":[],\"id\":{}}"},
		{JSONL, `{"te\u0078t":"k","text":"last","label":-0.5,"id":"i"}`},
	}
	for _, s := range seeds {
		f.Add(uint8(s.f), false, []byte(s.data))
		f.Add(uint8(s.f), true, []byte(s.data))
	}
	f.Fuzz(func(t *testing.T, format uint8, header bool, data []byte) {
		if len(data) >= 2 && data[0] == 0x1f && data[1] == 0x8b {
			t.Skip("gzip input: stream errors are not parse errors")
		}
		o := Options{Format: Format(format % 4)}
		switch o.Format {
		case TSV, CSV:
			o.Text = []string{"1"}
			o.NoHeader = !header
		case JSONL:
			o.Text = []string{"text"}
			o.Label = "label"
			o.ID = "id"
		}
		r, err := NewReader(bytes.NewReader(data), "fuzz", o)
		if err != nil {
			var pe *ParseError
			// Besides a bad header row, a header may be empty or name
			// the field "1" twice.
			if !errors.As(err, &pe) && !strings.Contains(err.Error(), "empty file, expected a header row") &&
				!strings.Contains(err.Error(), `field "1" is ambiguous`) {
				t.Fatalf("NewReader: unexpected error %v", err)
			}
			return
		}
		var lines []string
		if o.Format == JSONL {
			lines = strings.Split(strings.TrimPrefix(string(data), "\ufeff"), "\n")
		}
		var prev int64
		for r.Scan() {
			rec := r.Record()
			if rec.Line <= prev {
				t.Fatalf("record line %d after %d", rec.Line, prev)
			}
			prev = rec.Line
			if len(rec.Text) != max(1, len(o.Text)) {
				t.Fatalf("%d text fields", len(rec.Text))
			}
			if o.Format == JSONL {
				checkJSON(t, lines[rec.Line-1], rec)
			}
		}
		if err := r.Err(); err != nil {
			var pe *ParseError
			if !errors.As(err, &pe) {
				t.Fatalf("Err() = %v (%T), want a *ParseError", err, err)
			}
			if pe.Line < 1 || pe.Column < 0 || pe.File != "fuzz" {
				t.Fatalf("bad position in %#v", pe)
			}
		}
	})
}

// checkJSON compares a record with encoding/json's reading of its line.
func checkJSON(t *testing.T, line string, rec *Record) {
	t.Helper()
	d := json.NewDecoder(strings.NewReader(line))
	d.UseNumber()
	var m map[string]any
	if err := d.Decode(&m); err != nil {
		t.Fatalf("encoding/json rejects line %d that was read: %v", rec.Line, err)
	}
	for _, c := range []struct {
		key string
		got []byte
	}{{"text", rec.Text[0]}, {"label", rec.Label}, {"id", rec.ID}} {
		var want string
		switch v := m[c.key].(type) {
		case string:
			want = v
		case json.Number:
			want = string(v)
		case nil:
		default:
			t.Fatalf("field %q is %T in encoding/json but was read", c.key, v)
		}
		if string(c.got) != want {
			t.Fatalf("field %q = %q, encoding/json says %q", c.key, c.got, want)
		}
	}
}
