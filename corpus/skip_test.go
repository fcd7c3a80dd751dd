package corpus

import (
	"errors"
	"strings"
	"testing"
)

// readAll reads every record, skipping bad ones, and returns the text of
// the good ones and the raw bytes and positions of the bad ones.
func readSkipping(t *testing.T, data string, o Options) (good, bad []string, errs []*ParseError) {
	t.Helper()
	r, err := NewReader(strings.NewReader(data), "t", o)
	if err != nil {
		t.Fatal(err)
	}
	for {
		for r.Scan() {
			good = append(good, string(r.Record().Text[0]))
		}
		if r.Err() == nil {
			return
		}
		var pe *ParseError
		if !errors.As(r.Err(), &pe) {
			t.Fatalf("not a ParseError: %v", r.Err())
		}
		errs = append(errs, pe)
		bad = append(bad, string(r.Raw()))
		if !r.Skip() {
			t.Fatalf("cannot skip %v", pe)
		}
	}
}

func TestSkipAndRaw(t *testing.T) {
	cases := []struct {
		name      string
		data      string
		o         Options
		good, bad []string
		lines     []int64
	}{
		{"tsv ragged", "id\ttext\n1\tfine\n2\ttoo\tmany\n3\tok\\tstill\n", Options{Format: TSV, Text: []string{"text"}},
			[]string{"fine", "ok\\tstill"}, []string{"2\ttoo\tmany"}, []int64{3}},
		// RFC 4180 section 2, rule 5: a field with a quote must be
		// enclosed in quotes; a bare quote is an error.
		{"csv bare quote", "id,text\n1,fine\n2,bad \"quote\n3,\"multi\nline\"\n", Options{Format: CSV, Text: []string{"text"}},
			[]string{"fine", "multi\nline"}, []string{"2,bad \"quote"}, []int64{3}},
		{"csv ragged", "id,text\n1,fine\n2,a,b\n3,ok\n", Options{Format: CSV, Text: []string{"text"}},
			[]string{"fine", "ok"}, []string{"2,a,b"}, []int64{3}},
		{"jsonl broken", "{\"text\":\"fine\"}\n{\"text\": oops}\n{\"text\":\"ok\"}\n", Options{Format: JSONL, Text: []string{"text"}},
			[]string{"fine", "ok"}, []string{"{\"text\": oops}"}, []int64{2}},
		{"jsonl number", "{\"text\":\"fine\"}\n{\"text\": 42}\n", Options{Format: JSONL, Text: []string{"text"}},
			[]string{"fine"}, []string{"{\"text\": 42}"}, []int64{2}},
		{"strict utf8", "good\nbad \xff byte\nnul\x00here\nfine\n", Options{Format: Lines, StrictUTF8: true},
			[]string{"good", "fine"}, []string{"bad \xff byte", "nul\x00here"}, []int64{2, 3}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			good, bad, errs := readSkipping(t, c.data, c.o)
			if strings.Join(good, "|") != strings.Join(c.good, "|") {
				t.Errorf("good %q, want %q", good, c.good)
			}
			if strings.Join(bad, "|") != strings.Join(c.bad, "|") {
				t.Errorf("bad %q, want %q", bad, c.bad)
			}
			for i, e := range errs {
				if i < len(c.lines) && e.Line != c.lines[i] {
					t.Errorf("error %d at line %d, want %d: %v", i, e.Line, c.lines[i], e)
				}
			}
		})
	}
}

func TestStrictColumn(t *testing.T) {
	_, _, errs := readSkipping(t, "ok\nab\xffc\n", Options{Format: Lines, StrictUTF8: true})
	if len(errs) != 1 || errs[0].Line != 2 || errs[0].Column != 3 {
		t.Fatalf("errs %v", errs)
	}
}

func TestGzipErrorNotSkippable(t *testing.T) {
	r, err := NewReader(strings.NewReader("\x1f\x8b\x08\x00\x00\x00\x00\x00\x00\x03"), "t.gz", Options{Format: Lines})
	if err != nil {
		return // refused at open: fine
	}
	for r.Scan() {
	}
	if r.Err() == nil {
		t.Fatal("truncated gzip read cleanly")
	}
	if r.Skip() {
		t.Fatal("a truncated gzip stream must not be skippable")
	}
}
