package main

import (
	"bytes"
	"context"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"sync"
	"testing"

	"github.com/bowline/bowline/internal/demo"
	"github.com/bowline/bowline/spec"
)

// The reference here is the bowline command itself (cmd/bowline of the
// core module, built from this repository): the issue asks that the Beam
// spec have the fingerprint of bowline learn on the same files with the
// same flags, and that the Beam rows equal bowline encode's.

var (
	buildOnce sync.Once
	bowline   string
	buildErr  error
	buildOut  []byte
)

// bowlineBin builds the core module's bowline command once per test run.
func bowlineBin(t *testing.T) string {
	t.Helper()
	buildOnce.Do(func() {
		dir, err := os.MkdirTemp("", "bowline-beam-test")
		if err != nil {
			buildErr = err
			return
		}
		bowline = filepath.Join(dir, "bowline")
		root, _ := filepath.Abs("../../..")
		cmd := exec.Command("go", "build", "-o", bowline, "./cmd/bowline")
		cmd.Dir = root
		buildOut, buildErr = cmd.CombinedOutput()
	})
	if buildErr != nil {
		t.Fatalf("building bowline: %v\n%s", buildErr, buildOut)
	}
	return bowline
}

func TestMain(m *testing.M) {
	code := m.Run()
	if bowline != "" {
		os.RemoveAll(filepath.Dir(bowline))
	}
	os.Exit(code)
}

// demoCorpus writes the standard invented demo corpus (5000 records).
func demoCorpus(t *testing.T) string {
	t.Helper()
	var buf bytes.Buffer
	if err := demo.WriteTSV(&buf, demo.DefaultOptions()); err != nil {
		t.Fatal(err)
	}
	p := filepath.Join(t.TempDir(), "pellwick.tsv")
	if err := os.WriteFile(p, buf.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

func runBowline(t *testing.T, args ...string) {
	t.Helper()
	cmd := exec.Command(bowlineBin(t), args...)
	if out, err := cmd.CombinedOutput(); err != nil {
		t.Fatalf("bowline %s: %v\n%s", strings.Join(args, " "), err, out)
	}
}

func runBeam(t *testing.T, args ...string) string {
	t.Helper()
	var stderr bytes.Buffer
	if code := run(context.Background(), args, &stderr); code != exitOK {
		t.Fatalf("bowline-beam %s: exit %d\n%s", strings.Join(args, " "), code, stderr.String())
	}
	return stderr.String()
}

func load(t *testing.T, path string) *spec.Spec {
	t.Helper()
	s, err := spec.Load(path)
	if err != nil {
		t.Fatal(err)
	}
	return s
}

func TestLearnSameFingerprintAsBowline(t *testing.T) {
	corpusPath := demoCorpus(t)
	dir := t.TempDir()
	for _, tc := range []struct {
		name  string
		flags []string
	}{
		{"vocabulary", []string{"--text", "text", "--label", "team", "--stop", "en", "--words", "1-2", "--min-docs", "2", "--max-doc-share", "0.4", "--idf", "smooth", "--norm", "l2"}},
		{"hashing", []string{"--text", "text", "--label", "sentiment", "--chars", "3-5", "--hash", "2^16", "--seed", "3", "--idf", "plain", "--tf", "log"}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			one := filepath.Join(dir, tc.name+"-bowline.json")
			viaBeam := filepath.Join(dir, tc.name+"-beam.json")
			runBowline(t, append([]string{"learn", corpusPath, "-o", one, "--progress", "never"}, tc.flags...)...)
			// Flags after the file, and Beam's own --runner flag.
			msg := runBeam(t, append(append([]string{"learn", "--runner", "prism"}, tc.flags...), corpusPath, "-o", viaBeam)...)
			a, b := load(t, viaBeam), load(t, one)
			t.Logf("%s: bowline-beam %s, bowline %s", tc.name, a.Fingerprint, b.Fingerprint)
			if a.Fingerprint != b.Fingerprint {
				t.Fatalf("fingerprints differ: bowline-beam %s, bowline %s", a.Fingerprint, b.Fingerprint)
			}
			if a.Content.Docs != 5000 {
				t.Errorf("docs = %d, want the demo corpus's 5000 records", a.Content.Docs)
			}
			if !strings.Contains(msg, a.Fingerprint) {
				t.Errorf("bowline-beam did not report the fingerprint:\n%s", msg)
			}
		})
	}
}

func TestEncodeSameRowsAsBowline(t *testing.T) {
	corpusPath := demoCorpus(t)
	for _, tc := range []struct {
		name        string
		learn, both []string
		shards      int
	}{
		// 5000 records on lines 2..5001: blocks 0, 1 and 2 of 2000 lines.
		{"vocabulary", []string{"--text", "text", "--label", "team", "--id", "id", "--words", "1-2", "--min-docs", "3", "--idf", "smooth", "--norm", "l2"}, []string{"--with-ids"}, 3},
		{"hashing", []string{"--text", "text", "--label", "sentiment", "--chars", "2-4", "--hash", "2^14", "--signed", "--idf", "plain", "--norm", "l1"}, []string{"--index-base", "0"}, 3},
	} {
		t.Run(tc.name, func(t *testing.T) {
			dir := t.TempDir()
			specPath := filepath.Join(dir, "spec.json")
			runBowline(t, append([]string{"learn", corpusPath, "-o", specPath, "--progress", "never"}, tc.learn...)...)
			want := filepath.Join(dir, "rows.svm")
			runBowline(t, append([]string{"encode", "--spec", specPath, corpusPath, "-o", want, "--progress", "never"}, tc.both...)...)
			prefix := filepath.Join(dir, "beam", "rows")
			runBeam(t, append([]string{"encode", "--spec", specPath, corpusPath, "--shard-lines", "2000", "-o", prefix}, tc.both...)...)
			names, err := filepath.Glob(prefix + "-*")
			if err != nil {
				t.Fatal(err)
			}
			if len(names) != tc.shards {
				t.Fatalf("shards %q, want %d", names, tc.shards)
			}
			var got []byte
			for _, n := range names { // Glob sorts by name: record order
				b, err := os.ReadFile(n)
				if err != nil {
					t.Fatal(err)
				}
				got = append(got, b...)
			}
			w, err := os.ReadFile(want)
			if err != nil {
				t.Fatal(err)
			}
			if !bytes.Equal(got, w) {
				t.Fatalf("bowline-beam rows (%d bytes) differ from bowline encode's (%d bytes)", len(got), len(w))
			}
			if n := bytes.Count(got, []byte("\n")); n != 5000 {
				t.Errorf("%d rows, want 5000", n)
			}
		})
	}
}

func TestFailedJob(t *testing.T) {
	p := filepath.Join(t.TempDir(), "bad.tsv")
	os.WriteFile(p, []byte("text\tteam\ndock full\tdocks\nseat loose\t\n"), 0o644)
	var stderr bytes.Buffer
	code := run(context.Background(), []string{"learn", p, "--label", "team", "-o", p + ".json"}, &stderr)
	if code != exitFailure || !strings.Contains(stderr.String(), "bowline-beam: job failed: "+p+":3: the label field is empty") {
		t.Errorf("exit %d, want %d with the record's position:\n%s", code, exitFailure, stderr.String())
	}
	stderr.Reset()
	if code := run(context.Background(), []string{"learn", p, "--text", "body", "-o", p + ".json"}, &stderr); code != exitUsage || !strings.Contains(stderr.String(), `field "body" not found`) {
		t.Errorf("missing field: exit %d, want %d:\n%s", code, exitUsage, stderr.String())
	}
}

func TestUsage(t *testing.T) {
	for _, args := range [][]string{
		{"learn", "x.tsv"},        // no -o
		{"learn", "-o", "s.json"}, // no corpus
		{"learn", "x.tsv", "-o", "s.json", "--hash", "2^10", "--min-docs", "2"},
		{"encode", "x.tsv", "-o", "rows"}, // no --spec
		{"learn", "--no-such-flag", "x.tsv"},
		{"frobnicate"},
	} {
		var stderr bytes.Buffer
		if code := run(context.Background(), args, &stderr); code != exitUsage {
			t.Errorf("%q: exit %d, want %d\n%s", args, code, exitUsage, stderr.String())
		}
	}
	var stderr bytes.Buffer
	if code := run(context.Background(), []string{"learn", "--help"}, &stderr); code != exitOK {
		t.Errorf("--help: exit %d", code)
	}
	for _, want := range []string{"--min-docs", "--hash", "--runner"} {
		if !strings.Contains(stderr.String(), want) {
			t.Errorf("learn --help does not list %s:\n%s", want, stderr.String())
		}
	}
}
