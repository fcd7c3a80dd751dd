package corpus

import (
	"bytes"
	"compress/gzip"
	"errors"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

const testdata = "../testdata/corpus/"

func readFile(t *testing.T, path string, o Options) (recs []string, r *Reader) {
	t.Helper()
	r, err := Open(path, o)
	if err != nil {
		t.Fatal(err)
	}
	defer r.Close()
	for r.Scan() {
		recs = append(recs, show(r.Record()))
	}
	if err := r.Err(); err != nil {
		t.Fatalf("%s: %v", path, err)
	}
	return recs, r
}

// pellwickOpts read the invented Pellwick export, which escapes tabs and
// line breaks inside fields as some databases do.
var pellwickOpts = Options{Format: TSV, Text: []string{"body"}, Label: "team", ID: "id", TSVEscapes: true}

func TestOpenPlainAndGzip(t *testing.T) {
	plain, r := readFile(t, testdata+"pellwick.tsv", pellwickOpts)
	st, err := os.Stat(testdata + "pellwick.tsv")
	if err != nil {
		t.Fatal(err)
	}
	if r.Size() != st.Size() || r.BytesRead() != st.Size() {
		t.Errorf("Size() = %d, BytesRead() = %d, want both %d", r.Size(), r.BytesRead(), st.Size())
	}
	if len(plain) != 7 {
		t.Fatalf("got %d records, want 7", len(plain))
	}
	// Hand-checked against the file: TSV escapes decoded, empty body kept.
	for i, want := range map[int]string{
		1: `3 "Charged two unlock fees for one ride\tplease refund." label="billing" id="t-0002"`,
		3: `5 "Front brake squeals on bike 3307.\nSaddle clamp loose too." label="bikes" id="t-0004"`,
		5: `7 "" label="app" id="t-0006"`,
	} {
		if plain[i] != want {
			t.Errorf("record %d = %s, want %s", i, plain[i], want)
		}
	}
	// The .gz files were made by GNU gzip 1.12 (see PROVENANCE.md); one
	// has two members (RFC 1952 section 2.2). Both must decode to the same
	// records as the plain file.
	for _, name := range []string{"pellwick.tsv.gz", "pellwick-members.tsv.gz"} {
		got, r := readFile(t, testdata+name, pellwickOpts)
		if strings.Join(got, "\n") != strings.Join(plain, "\n") {
			t.Errorf("%s: records differ from pellwick.tsv:\n%q", name, got)
		}
		st, _ := os.Stat(testdata + name)
		if r.BytesRead() != st.Size() || r.Size() != st.Size() {
			t.Errorf("%s: BytesRead() = %d, Size() = %d, want %d (compressed bytes)", name, r.BytesRead(), r.Size(), st.Size())
		}
	}
}

func TestGzipByMagicNotName(t *testing.T) {
	gz, err := os.ReadFile(testdata + "pellwick.tsv.gz")
	if err != nil {
		t.Fatal(err)
	}
	// RFC 1952 section 2.3.1: ID1 = 31 (0x1f), ID2 = 139 (0x8b).
	if gz[0] != 0x1f || gz[1] != 0x8b {
		t.Fatalf("test file does not start with the gzip magic bytes")
	}
	plainBytes, _ := os.ReadFile(testdata + "pellwick.tsv")
	dir := t.TempDir()
	disguised := filepath.Join(dir, "tickets.tsv")
	os.WriteFile(disguised, gz, 0o644)
	misnamed := filepath.Join(dir, "tickets.tsv.gz")
	os.WriteFile(misnamed, plainBytes, 0o644)
	a, _ := readFile(t, disguised, pellwickOpts)
	b, _ := readFile(t, misnamed, pellwickOpts)
	if len(a) != 7 || strings.Join(a, "\n") != strings.Join(b, "\n") {
		t.Errorf("gzip under a .tsv name and plain text under a .gz name should read the same:\n%q\n%q", a, b)
	}
}

func TestTruncatedGzip(t *testing.T) {
	gz, err := os.ReadFile(testdata + "pellwick.tsv.gz")
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	// RFC 1952 section 2.3: a member ends with CRC32 and ISIZE (8 bytes);
	// cutting anywhere must be an error, never a shorter clean read.
	for _, cut := range []int{5, 10, 20, len(gz) / 2, len(gz) - 8, len(gz) - 1} {
		path := filepath.Join(dir, "cut.tsv.gz")
		os.WriteFile(path, gz[:cut], 0o644)
		r, err := Open(path, pellwickOpts)
		if err == nil {
			for r.Scan() {
			}
			err = r.Err()
			r.Close()
		}
		if err == nil {
			t.Errorf("cut at %d of %d bytes: no error", cut, len(gz))
			continue
		}
		if !errors.Is(err, io.ErrUnexpectedEOF) || !strings.Contains(err.Error(), path) || strings.Contains(err.Error(), "\n") {
			t.Errorf("cut at %d: error %q should name the file on one line and wrap io.ErrUnexpectedEOF", cut, err)
		}
	}
	// A damaged CRC32 (RFC 1952 section 2.3.1) is reported too.
	bad := bytes.Clone(gz)
	bad[len(bad)-8] ^= 0xff
	r, err := NewReader(bytes.NewReader(bad), "bad.gz", pellwickOpts)
	if err != nil {
		t.Fatal(err)
	}
	for r.Scan() {
	}
	if err := r.Err(); !errors.Is(err, gzip.ErrChecksum) || !strings.Contains(err.Error(), "bad.gz") {
		t.Errorf("bad checksum: Err() = %v", err)
	}
}

func TestOpenErrors(t *testing.T) {
	dir := t.TempDir()
	tsv := filepath.Join(dir, "t.tsv")
	os.WriteFile(tsv, []byte("id\tbody\tteam\tbody2\tbody2\nt1\tx\ty\tz\tw\n"), 0o644)
	empty := filepath.Join(dir, "empty.csv")
	os.WriteFile(empty, nil, 0o644)
	missing := filepath.Join(dir, "nope.tsv")
	for _, c := range []struct {
		name, path string
		o          Options
		want       string // substring of the error
	}{
		{"missing file", missing, pellwickOpts, "open " + missing + ": no such file or directory"},
		{"directory", dir, pellwickOpts, dir + ": is a directory"},
		{"unknown field", tsv, Options{Format: TSV, Text: []string{"bodyy"}},
			`field "bodyy" not found in the header of ` + tsv + ` (columns: "id", "body", "team", "body2", "body2")`},
		{"unknown label", tsv, Options{Format: TSV, Text: []string{"body"}, Label: "sentiment"}, `field "sentiment" not found`},
		{"ambiguous", tsv, Options{Format: TSV, Text: []string{"body2"}}, `field "body2" is ambiguous: the header of ` + tsv + ` has it in columns 4 and 5`},
		{"column out of range", tsv, Options{Format: TSV, Text: []string{"6"}}, `field "6": column 6 is out of range; ` + tsv + ` has 5 columns`},
		{"column out of range no header", tsv, Options{Format: TSV, Text: []string{"9"}, NoHeader: true}, `column 9 is out of range`},
		{"column zero", tsv, Options{Format: TSV, Text: []string{"0"}, NoHeader: true}, `field "0": column numbers start at 1`},
		{"name without header", tsv, Options{Format: TSV, Text: []string{"body"}, NoHeader: true}, `field "body": without a header row, fields must be 1-based column numbers`},
		{"no text field", tsv, Options{Format: TSV}, "no text field given for a tsv file"},
		{"lines with fields", tsv, Options{Format: Lines, Label: "x"}, "lines format takes the whole line"},
		{"empty with header", empty, Options{Format: CSV, Text: []string{"body"}}, empty + ": empty file, expected a header row"},
		{"bad format", tsv, Options{Format: Format(7), Text: []string{"x"}}, "unknown format Format(7)"},
	} {
		r, err := Open(c.path, c.o)
		if err == nil {
			r.Close()
			t.Errorf("%s: no error", c.name)
			continue
		}
		if !strings.Contains(err.Error(), c.want) || strings.Contains(err.Error(), "\n") {
			t.Errorf("%s: error %q, want one line containing %q", c.name, err, c.want)
		}
	}
	if _, err := Open(missing, pellwickOpts); !errors.Is(err, fs.ErrNotExist) {
		t.Errorf("missing file: %v is not fs.ErrNotExist", err)
	}
	// Empty input without a header is simply zero records.
	for _, f := range []Format{Lines, JSONL, TSV, CSV} {
		o := Options{Format: f, Text: []string{"1"}, NoHeader: true}
		if f == Lines {
			o.Text = nil
		}
		recs, err := readAll(t, "", o)
		if err != nil || len(recs) != 0 {
			t.Errorf("%v: empty input gave %q, %v", f, recs, err)
		}
	}
}

func TestStdin(t *testing.T) {
	in := "t1\tDock 9 jammed\tdocks\nt2\tApp froze at checkout\tapp\n"
	want := []string{`1 "Dock 9 jammed" label="docks" id="t1"`, `2 "App froze at checkout" label="app" id="t2"`}
	o := Options{Format: TSV, Text: []string{"2"}, Label: "3", ID: "1", NoHeader: true}
	// Any io.Reader through NewReader: size unknown.
	r, err := NewReader(strings.NewReader(in), "-", o)
	if err != nil {
		t.Fatal(err)
	}
	var got []string
	for r.Scan() {
		got = append(got, show(r.Record()))
	}
	if r.Err() != nil || strings.Join(got, "\n") != strings.Join(want, "\n") || r.Size() != -1 || r.BytesRead() != int64(len(in)) {
		t.Errorf("NewReader: %q, %v, Size %d, BytesRead %d", got, r.Err(), r.Size(), r.BytesRead())
	}
	// Open("-") reads os.Stdin, and does not close it.
	f, err := os.CreateTemp(t.TempDir(), "stdin")
	if err != nil {
		t.Fatal(err)
	}
	f.WriteString(in)
	f.Seek(0, io.SeekStart)
	saved := os.Stdin
	os.Stdin = f
	defer func() { os.Stdin = saved; f.Close() }()
	got, r = readFile(t, "-", o)
	if strings.Join(got, "\n") != strings.Join(want, "\n") || r.Size() != int64(len(in)) {
		t.Errorf("Open(-): %q, Size %d", got, r.Size())
	}
	if _, err := f.Stat(); err != nil {
		t.Errorf("standard input was closed: %v", err)
	}
	// A parse error on standard input names it.
	f.Truncate(0)
	f.Seek(0, io.SeekStart)
	f.WriteString("a\tb\tc\nd\n")
	f.Seek(0, io.SeekStart)
	r, err = Open("-", o)
	if err == nil {
		for r.Scan() {
		}
		err = r.Err()
	}
	if err == nil || err.Error() != "standard input:2:1: wrong number of fields: found 1, expected 3" {
		t.Errorf("Open(-) error = %v", err)
	}
}

// TestLongLines reads single lines of many megabytes: there is no line
// length limit in any format.
func TestLongLines(t *testing.T) {
	big := bytes.Repeat([]byte("Pellwick bikes roll on; "), 20<<20/24+1) // just over 20 MB
	var lines bytes.Buffer
	lines.Write(big)
	lines.WriteString("\r\nshort\n")
	r, err := NewReader(&lines, "big.txt", Options{})
	if err != nil {
		t.Fatal(err)
	}
	if !r.Scan() || !bytes.Equal(r.Record().Text[0], big) {
		t.Fatalf("first record is not the %d-byte line (err %v)", len(big), r.Err())
	}
	if !r.Scan() || string(r.Record().Text[0]) != "short" || r.Record().Line != 2 || r.Scan() || r.Err() != nil {
		t.Fatalf("after the long line: %v", r.Err())
	}

	mid := big[:4<<20]
	cases := []struct {
		in string
		o  Options
	}{
		{"a\tb\nx\t" + string(mid) + "\n", Options{Format: TSV, Text: []string{"b"}}},
		{"a,b\nx,\"" + string(mid) + "\"\n", Options{Format: CSV, Text: []string{"b"}}},
		{`{"a":"x","b":"` + string(mid) + "\"}\n", Options{Format: JSONL, Text: []string{"b"}}},
	}
	for _, c := range cases {
		r, err := NewReader(strings.NewReader(c.in), "big", c.o)
		if err != nil {
			t.Fatal(err)
		}
		if !r.Scan() || !bytes.Equal(r.Record().Text[0], mid) || r.Scan() || r.Err() != nil {
			t.Errorf("%v: the %d-byte field did not come through whole (err %v)", c.o.Format, len(mid), r.Err())
		}
	}
}

// TestNoAllocs checks that reading a record allocates nothing in steady
// state (encoding/csv allocates one string per record).
func TestNoAllocs(t *testing.T) {
	for _, c := range []struct {
		f   Format
		max float64
	}{{Lines, 0}, {TSV, 0}, {CSV, 1}, {JSONL, 0}} {
		in, o := benchInput(c.f, 4000)
		r, err := NewReader(bytes.NewReader(in), "x", o)
		if err != nil {
			t.Fatal(err)
		}
		for range 100 {
			r.Scan()
		}
		allocs := testing.AllocsPerRun(1000, func() {
			if !r.Scan() {
				t.Fatalf("%v: ran out of records: %v", c.f, r.Err())
			}
		})
		if allocs > c.max {
			t.Errorf("%v: %.2f allocations per record, want at most %v", c.f, allocs, c.max)
		}
	}
}
