package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestMergeRefusesTheSameShardTwice: a shard given twice (or a copy of it)
// would count its documents twice.
func TestMergeRefusesTheSameShardTwice(t *testing.T) {
	dir := t.TempDir()
	p := func(n string) string { return filepath.Join(dir, n) }
	os.WriteFile(p("a.tsv"), []byte("text\ndock full\nflat tyre\n"), 0o644)
	mustRun(t, "learn", p("a.tsv"), "--counts-out", p("a.counts"))
	b, _ := os.ReadFile(p("a.counts"))
	os.WriteFile(p("copy.counts"), b, 0o644)
	for _, args := range [][]string{{p("a.counts"), p("a.counts")}, {p("a.counts"), p("copy.counts")}} {
		code, stderr := bowline(t, append([]string{"merge", "-o", p("s.json")}, args...)...)
		if code != exitUsage || !strings.Contains(stderr, "same shard") {
			t.Fatalf("merge %v: exit %d, %q", args, code, stderr)
		}
	}
	if _, err := os.Stat(p("s.json")); !os.IsNotExist(err) {
		t.Fatal("a refused merge wrote a spec")
	}
}
