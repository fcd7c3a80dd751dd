package main

import (
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/bowline/bowline/hashing"
	"github.com/bowline/bowline/spec"
)

// TestExplainBuckets: encode --explain-buckets names keys that really share
// the column (checked by hashing each key again) and lists the most crowded
// buckets first.
func TestExplainBuckets(t *testing.T) {
	dir := t.TempDir()
	p := func(n string) string { return filepath.Join(dir, n) }
	os.WriteFile(p("t.tsv"), []byte("text\nthe dock at Harlow Quay was full\nrefund for a double charge\nbike with a flat tyre and loose brakes\napp froze at unlock\n"), 0o644)
	mustRun(t, "learn", p("t.tsv"), "--hash", "2^4", "--words", "1-2", "-o", p("s.json"))
	mustRun(t, "encode", "--spec", p("s.json"), p("t.tsv"), "-o", p("r.svm"), "--explain-buckets", "3", "--explain-out", p("x.tsv"))
	s, err := spec.Load(p("s.json"))
	if err != nil {
		t.Fatal(err)
	}
	h, _ := hashing.New(16, s.Content.Hashing.Seed, false)
	b, _ := os.ReadFile(p("x.tsv"))
	lines := strings.Split(strings.TrimSpace(string(b)), "\n")[1:]
	if len(lines) < 6 {
		t.Fatalf("too few lines: %q", b)
	}
	last := int64(1 << 62)
	for _, l := range lines {
		f := strings.Split(l, "\t")
		col, _ := strconv.ParseInt(f[0], 10, 64)
		keys, _ := strconv.ParseInt(f[1], 10, 64)
		if keys > last {
			t.Fatalf("buckets not in crowding order: %q", b)
		}
		last = keys
		if bucket, _ := h.Bucket([]byte(f[2])); int64(bucket)+1 != col {
			t.Fatalf("key %q is in column %d, not %d", f[2], bucket+1, col)
		}
	}
}
