package main

import (
	"bytes"
	"encoding/json"
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/bowline/bowline/internal/cli"
	"github.com/bowline/bowline/internal/demo"
	"github.com/bowline/bowline/internal/sweep"
)

// sweepCorpus writes the invented demo corpus's training and held-out
// splits (docs records) into dir.
func sweepCorpus(t *testing.T, dir string, docs int) (train, test string) {
	t.Helper()
	var all bytes.Buffer
	o := demo.DefaultOptions()
	o.Docs = docs
	if err := demo.WriteTSV(&all, o); err != nil {
		t.Fatal(err)
	}
	lines := strings.SplitAfter(strings.TrimSuffix(all.String(), "\n"), "\n")
	n, _ := demo.Split(len(lines) - 1)
	train, test = filepath.Join(dir, "train.tsv"), filepath.Join(dir, "test.tsv")
	if err := os.WriteFile(train, []byte(lines[0]+strings.Join(lines[1:1+n], "")), 0o644); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(test, []byte(lines[0]+strings.Join(lines[1+n:], "")), 0o644); err != nil {
		t.Fatal(err)
	}
	return train, test
}

func TestSweepCommand(t *testing.T) {
	dir := t.TempDir()
	train, test := sweepCorpus(t, dir, 1000)
	js, page := filepath.Join(dir, "sweep.json"), filepath.Join(dir, "sweep.html")
	common := []string{train, "--holdout", test, "--label", "team", "--stop", "en", "--words", "1-2", "--min-docs", "2",
		"--widths", "2^8..2^14", "--explain-buckets", "3", "--explain-width", "2^10", "--progress", "never"}
	var stdout, stderr bytes.Buffer
	if err := runSweep(append(common, "--report", js), &stdout, &stderr); err != nil {
		t.Fatalf("sweep: %v\n%s", err, stderr.String())
	}
	text := stdout.String() // the table goes to stdout, as the issue asks
	t.Logf("\n%s", text)
	if !strings.Contains(text, "vocabulary") || !strings.Contains(text, "2^14") || !strings.Contains(text, "most crowded buckets at width 2^10") {
		t.Errorf("text table lacks the vocabulary row, the 2^14 row or the crowded buckets:\n%s", text)
	}
	b, err := os.ReadFile(js)
	if err != nil {
		t.Fatal(err)
	}
	var res sweep.Result
	if err := json.Unmarshal(b, &res); err != nil {
		t.Fatal(err)
	}
	if len(res.Widths) != 7 || res.Widths[0].Width != 256 || res.Widths[6].Width != 1<<14 {
		t.Fatalf("widths %+v, want 2^8..2^14", res.Widths)
	}
	if res.Vocabulary.Terms == 0 || res.Vocabulary.Eval == nil || res.Vocabulary.Eval.MacroF1 == nil {
		t.Fatalf("vocabulary row %+v lacks terms or held-out figures", res.Vocabulary)
	}
	// Four teams: a model better than always answering the commonest team
	// (at most 35% of the demo's records) at every width from 2^10 on.
	for _, w := range res.Widths {
		if w.Eval == nil {
			t.Fatalf("width %d: no held-out figures", w.Width)
		}
		if w.Width >= 1<<10 && w.Eval.Accuracy < 0.5 {
			t.Errorf("width %d: held-out accuracy %.3f", w.Width, w.Eval.Accuracy)
		}
	}
	if res.Explain == nil || res.Explain.Width != 1<<10 || len(res.Explain.Buckets) != 3 {
		t.Errorf("explain: %+v", res.Explain)
	}

	stderr.Reset()
	if err := runSweep(append(common, "--report", page, "--workers", "1"), &stdout, &stderr); err != nil {
		t.Fatalf("sweep: %v", err)
	}
	h, err := os.ReadFile(page)
	if err != nil {
		t.Fatal(err)
	}
	if n := strings.Count(string(h), "<svg"); n != 3 || strings.Contains(string(h), "<script") || strings.Contains(string(h), "http://") && !strings.Contains(string(h), "http://www.w3.org/") {
		t.Errorf("HTML page: %d plots (want 3), or it loads something", n)
	}
}

func TestSweepUsage(t *testing.T) {
	dir := t.TempDir()
	train, test := sweepCorpus(t, dir, 40)
	for _, args := range [][]string{
		{train, "--hash", "2^10"},
		{train, "--widths", "2^12..2^10"},
		{train, "--widths", "nope"},
		{train, "--holdout", test},
		{train, "--label", "team", "--c", "0"},
		{train, "--explain-width", "2^10"},
		{train, "--report", filepath.Join(dir, "x.txt")},
		{},
	} {
		var out, errb bytes.Buffer
		err := runSweep(args, &out, &errb)
		var u *cli.UsageError
		if !errors.As(err, &u) {
			t.Errorf("sweep %v: error %v, want a usage error", args, err)
		}
	}
	// --seed and --signed apply to every width in a sweep.
	var out, errb bytes.Buffer
	if err := runSweep([]string{train, "--seed", "5", "--signed", "--widths", "2^6,2^8", "--progress", "never"}, &out, &errb); err != nil {
		t.Errorf("sweep with --seed --signed: %v", err)
	}
}
