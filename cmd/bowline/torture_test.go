package main

import (
	"bytes"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/bowline/bowline/internal/torture"
)

// TestTorture runs encode over every case of the torture corpus, plain,
// with --on-error skip, and with --strict-utf8, and checks the outcome the
// case states: rows out equal records in (plus rejects), errors name file,
// line and column, and a failed run leaves no output behind.
func TestTorture(t *testing.T) {
	dir := t.TempDir()
	p := func(n string) string { return filepath.Join(dir, n) }
	cases := torture.Cases(!testing.Short())
	if err := torture.Write(dir, cases); err != nil {
		t.Fatal(err)
	}
	os.WriteFile(p("train.tsv"), []byte("team\ttext\nbikes\tflat tyre\nbilling\tcharged twice\napp\tcrash on unlock\n"), 0o644)
	mustRun(t, "learn", p("train.tsv"), "-o", p("spec.json"), "--label", "team")

	check := func(t *testing.T, c torture.Case, want torture.Case, extra ...string) {
		tag := strings.Join(extra, "")
		out := p("out-" + c.Name + tag + ".svm")
		rej := p("rej-" + c.Name + tag)
		args := append([]string{"encode", "--spec", p("spec.json"), p(c.Name), "-o", out}, c.Args...)
		args = append(args, extra...)
		skip := false
		for _, a := range extra {
			if a == "skip" {
				skip = true
			}
		}
		if skip {
			args = append(args, "--rejects", rej)
		}
		code, stderr := bowline(t, args...)
		rows := func() int {
			b, err := os.ReadFile(out)
			if err != nil {
				t.Fatalf("%s: no output: %v", c.Name, err)
			}
			return bytes.Count(b, []byte("\n"))
		}
		switch {
		case want.Outcome == torture.Reads:
			if code != 0 {
				t.Fatalf("%s: exit %d\n%s", c.Name, code, stderr)
			}
			if n := rows(); n != want.Rows {
				t.Fatalf("%s: %d rows, want %d", c.Name, n, want.Rows)
			}
		case want.Outcome == torture.Fails && skip:
			if code != 0 {
				t.Fatalf("%s --on-error skip: exit %d\n%s", c.Name, code, stderr)
			}
			if n := rows(); n != want.Rows {
				t.Fatalf("%s: %d rows, want %d", c.Name, n, want.Rows)
			}
			b, _ := os.ReadFile(rej)
			if n := bytes.Count(b, []byte("\n")); n != want.Rejects {
				t.Fatalf("%s: %d rejects, want %d: %q", c.Name, n, want.Rejects, b)
			}
			if !bytes.Contains(c.Data, bytes.TrimSuffix(b, []byte("\n"))) {
				t.Fatalf("%s: rejects %q are not the records as read", c.Name, b)
			}
		default:
			wantCode := exitData // Fails and FailsWhole alike
			if code != wantCode {
				t.Fatalf("%s: exit %d, want %d\n%s", c.Name, code, wantCode, stderr)
			}
			if want.Line > 0 {
				pos := fmt.Sprintf("%s:%d:", p(c.Name), want.Line)
				if want.Column > 0 {
					pos += fmt.Sprintf("%d:", want.Column)
				}
				if !strings.Contains(stderr, pos) {
					t.Fatalf("%s: error %q does not name %s", c.Name, stderr, pos)
				}
			}
			if _, err := os.Stat(out); !os.IsNotExist(err) {
				t.Fatalf("%s: a failed run left %s", c.Name, out)
			}
		}
	}
	for _, c := range cases {
		t.Run(c.Name, func(t *testing.T) {
			check(t, c, c)
			if c.Outcome == torture.Fails {
				check(t, c, c, "--on-error", "skip")
			}
			if c.Strict != nil {
				check(t, c, *c.Strict, "--strict-utf8")
				check(t, c, *c.Strict, "--strict-utf8", "--on-error", "skip")
			}
		})
	}
	es, _ := os.ReadDir(dir)
	for _, e := range es {
		if strings.Contains(e.Name(), ".tmp-") {
			t.Errorf("temporary file left behind: %s", e.Name())
		}
	}
}

// TestTortureRuns runs every hostile command line of the torture corpus
// (internal/torture, Runs) in a folder of its own and checks the exit
// code, the message, the files that must be unchanged and those that
// must not be left behind (no temporary file either).
func TestTortureRuns(t *testing.T) {
	for _, r := range torture.Runs() {
		t.Run(r.Name, func(t *testing.T) {
			dir := t.TempDir()
			setup, args, err := r.Prepare(dir)
			if err != nil {
				t.Fatal(err)
			}
			for _, s := range setup {
				mustRun(t, s...)
			}
			before := map[string][]byte{}
			for _, f := range r.Unchanged {
				b, err := os.ReadFile(filepath.Join(dir, f))
				if err != nil {
					t.Fatalf("%s: %v", f, err)
				}
				before[f] = b
			}
			code, stderr := bowline(t, args...)
			if code != r.Exit {
				t.Fatalf("%s: exit %d, want %d\n%s", r.About, code, r.Exit, stderr)
			}
			for _, want := range r.Stderr {
				if w := strings.ReplaceAll(want, "{dir}", dir); !strings.Contains(stderr, w) {
					t.Errorf("%s: stderr lacks %q:\n%s", r.About, w, stderr)
				}
			}
			for f, b := range before {
				if after, err := os.ReadFile(filepath.Join(dir, f)); err != nil || !bytes.Equal(after, b) {
					t.Errorf("%s: %s changed (%v)", r.About, f, err)
				}
			}
			for _, f := range r.Absent {
				if _, err := os.Lstat(filepath.Join(dir, f)); !os.IsNotExist(err) {
					t.Errorf("%s: %s was left behind", r.About, f)
				}
			}
			es, _ := os.ReadDir(dir)
			for _, e := range es {
				if strings.Contains(e.Name(), ".tmp-") || strings.HasPrefix(e.Name(), ".bowline-") {
					t.Errorf("%s: temporary file left behind: %s", r.About, e.Name())
				}
			}
		})
	}
}
