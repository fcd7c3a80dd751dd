package corpus

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestHeaderErrorKinds: a file whose header does not fit the fields named
// gives an error errors.Is tells apart from a mistake in the options.
func TestHeaderErrorKinds(t *testing.T) {
	dir := t.TempDir()
	tsv := filepath.Join(dir, "t.tsv")
	os.WriteFile(tsv, []byte("id\tbody\tteam\tbody2\tbody2\nt1\tx\ty\tz\tw\n"), 0o644)
	empty := filepath.Join(dir, "empty.tsv")
	os.WriteFile(empty, nil, 0o644)
	for _, c := range []struct {
		name string
		path string
		o    Options
		kind error // nil: an options error, matching none of the kinds
	}{
		{"unknown field", tsv, Options{Format: TSV, Text: []string{"bodyy"}}, ErrNoField},
		{"unknown label", tsv, Options{Format: TSV, Text: []string{"body"}, Label: "sentiment"}, ErrNoField},
		{"column out of range", tsv, Options{Format: TSV, Text: []string{"6"}}, ErrNoField},
		{"column out of range no header", tsv, Options{Format: TSV, Text: []string{"9"}, NoHeader: true}, ErrNoField},
		{"ambiguous", tsv, Options{Format: TSV, Text: []string{"body2"}}, ErrAmbiguousField},
		{"empty", empty, Options{Format: TSV, Text: []string{"body"}}, ErrNoHeader},
		{"column zero", tsv, Options{Format: TSV, Text: []string{"0"}, NoHeader: true}, nil},
		{"name without header", tsv, Options{Format: TSV, Text: []string{"body"}, NoHeader: true}, nil},
	} {
		r, err := Open(c.path, c.o)
		if err == nil {
			r.Close()
			t.Errorf("%s: no error", c.name)
			continue
		}
		for _, k := range []error{ErrNoHeader, ErrNoField, ErrAmbiguousField, ErrHeaderName} {
			if errors.Is(err, k) != (k == c.kind) {
				t.Errorf("%s: errors.Is(%v, %v) = %v", c.name, err, k, !(k == c.kind))
			}
		}
	}
}

// TestHeaderNameNotUTF8: a field that names a header cell holding invalid
// UTF-8 is refused with the cell's position, in TSV (with and without a
// byte order mark) and CSV; the same column named by its number, and a
// cell no field names, are read as usual.
func TestHeaderNameNotUTF8(t *testing.T) {
	dir := t.TempDir()
	for _, c := range []struct {
		file, data string
		format     Format
		pos        string
	}{
		{"h.tsv", "text\tlab\xffel\nflat tyre\tbikes\n", TSV, ":1:6: "},
		{"bom.tsv", "\xef\xbb\xbftext\tlab\xffel\nflat tyre\tbikes\n", TSV, ":1:9: "},
		{"h.csv", "text,\"lab\xffel\"\nflat tyre,bikes\n", CSV, ":1:6: "},
	} {
		p := filepath.Join(dir, c.file)
		os.WriteFile(p, []byte(c.data), 0o644)
		_, err := Open(p, Options{Format: c.format, Text: []string{"text"}, Label: "lab\xffel"})
		var pe *ParseError
		if !errors.As(err, &pe) || !errors.Is(err, ErrHeaderName) || !strings.Contains(err.Error(), p+c.pos) ||
			!strings.Contains(err.Error(), "by its number, 2") {
			t.Errorf("%s: %v, want a *ParseError at %s naming column 2", c.file, err, c.pos)
		}
		for _, o := range []Options{
			{Format: c.format, Text: []string{"text"}, Label: "2"},
			{Format: c.format, Text: []string{"text"}},
		} {
			r, err := Open(p, o)
			if err != nil {
				t.Errorf("%s %+v: %v", c.file, o, err)
				continue
			}
			if !r.Scan() || string(r.Record().Text[0]) != "flat tyre" {
				t.Errorf("%s %+v: first record %q, %v", c.file, o, r.Record().Text, r.Err())
			}
			r.Close()
		}
	}
}
