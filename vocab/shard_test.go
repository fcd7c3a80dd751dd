package vocab

import (
	"bytes"
	"compress/gzip"
	"errors"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"github.com/bowline/bowline/internal/testkit"
)

func shardBytes(t *testing.T, c *Counts, h ShardHeader) []byte {
	t.Helper()
	var buf bytes.Buffer
	if err := WriteShard(&buf, h, c); err != nil {
		t.Fatal(err)
	}
	return buf.Bytes()
}

func shardDump(c *Counts) string {
	var b strings.Builder
	c.Each(func(k string, o int, n, d int64) { fmt.Fprintf(&b, "%q %d %d %d\n", k, o, n, d) })
	return fmt.Sprintf("docs %d\n%s", c.Docs(), b.String())
}

// TestShardMergeEqualsWhole: three parts written as shards and read back
// into one Counts equal counting the whole stream at once.
func TestShardMergeEqualsWhole(t *testing.T) {
	docs := zipfDocs(900, 2000, 9)
	whole := NewCounts()
	countDocs(whole, docs)
	merged := NewCounts()
	for i := 0; i < 3; i++ {
		part := NewCounts()
		countDocs(part, docs[i*300:(i+1)*300])
		b := shardBytes(t, part, ShardHeader{Tool: "test", Settings: []byte(`{"x":1}`)})
		h, err := ReadShard(bytes.NewReader(b), "part", merged)
		if err != nil {
			t.Fatal(err)
		}
		if h.Docs != 300 || h.Keys != int64(part.Len()) || string(h.Settings) != `{"x":1}` {
			t.Errorf("header %+v", h)
		}
	}
	if shardDump(merged) != shardDump(whole) {
		t.Error("merged shards differ from the whole")
	}
}

// TestShardKeysNeedEscaping: keys with quotes, backslashes, control
// characters and non-ASCII letters survive the JSON lines.
func TestShardKeysNeedEscaping(t *testing.T) {
	c := NewCounts()
	for _, k := range []string{`say "hi"`, `back\slash`, "tab\there", "ñandú", "<b>&", "\u2028"} {
		c.Add([]byte(k), 1)
	}
	c.EndDoc()
	got := NewCounts()
	if _, err := ReadShard(bytes.NewReader(shardBytes(t, c, ShardHeader{})), "s", got); err != nil {
		t.Fatal(err)
	}
	if shardDump(got) != shardDump(c) {
		t.Errorf("got\n%s\nwant\n%s", shardDump(got), shardDump(c))
	}
}

// TestShardVersion1 reads the hand-written version 1 fixture (see
// testdata/lifecycle/PROVENANCE.md) so later versions keep reading it.
func TestShardVersion1(t *testing.T) {
	f, err := os.Open(filepath.Join("..", "testdata", "lifecycle", "v1.counts.gz"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	c := NewCounts()
	h, err := ReadShard(f, "v1.counts.gz", c)
	if err != nil {
		t.Fatal(err)
	}
	// Counted by hand from the three documents in PROVENANCE.md.
	want := "docs 3\n\"app\" 1 2 2\n\"dock\" 1 4 3\n\"dock full\" 2 1 1\n\"full\" 1 1 1\n"
	if shardDump(c) != want || fmt.Sprint(h.LabelValues, h.LabelCounts) != "[app docks] [2 1]" {
		t.Errorf("read\n%s%v %v\nwant\n%s", shardDump(c), h.LabelValues, h.LabelCounts, want)
	}
}

// TestShardGNUGzip: GNU gzip (Debian package gzip) reads what WriteShard
// writes, and the fixture's compressed and plain forms agree.
func TestShardGNUGzip(t *testing.T) {
	gz := testkit.NeedTool(t, "gzip", "gzip")
	c := NewCounts()
	countDocs(c, [][]string{{"dock", "app"}, {"dock"}})
	p := filepath.Join(t.TempDir(), "s.counts")
	os.WriteFile(p, shardBytes(t, c, ShardHeader{Tool: "test", Settings: []byte(`{}`)}), 0o644)
	out, err := exec.Command(gz, "-dc", p).Output()
	if err != nil {
		t.Fatalf("gzip -dc: %v", err)
	}
	want := `{"format":"bowline-counts","version":1,"tool":"test","settings":{},"docs":2,"keys":2}` + "\n" +
		`["app",1,1,1]` + "\n" + `["dock",1,2,2]` + "\n" + `{"end":2}` + "\n"
	if string(out) != want {
		t.Errorf("gzip -dc gave\n%s\nwant\n%s", out, want)
	}
	dir := filepath.Join("..", "testdata", "lifecycle")
	plain, _ := os.ReadFile(filepath.Join(dir, "v1.counts.txt"))
	out, err = exec.Command(gz, "-dc", filepath.Join(dir, "v1.counts.gz")).Output()
	if err != nil || !bytes.Equal(out, plain) {
		t.Errorf("gzip -dc v1.counts.gz differs from v1.counts.txt (%v)", err)
	}
}

func gzipLines(lines ...string) []byte {
	var buf bytes.Buffer
	zw := gzip.NewWriter(&buf)
	zw.Write([]byte(strings.Join(lines, "")))
	zw.Close()
	return buf.Bytes()
}

// TestShardRefusals: damaged shards are refused with the line at fault,
// and nothing is merged from them.
func TestShardRefusals(t *testing.T) {
	head := `{"format":"bowline-counts","version":1,"tool":"t","settings":{},"docs":2,"keys":2}` + "\n"
	good := shardBytes(t, func() *Counts { c := NewCounts(); countDocs(c, [][]string{{"a", "b"}, {"b"}}); return c }(), ShardHeader{})
	cases := []struct {
		name string
		data []byte
		line int64
		msg  string
	}{
		{"not gzip", []byte("hello"), 0, "not a gzip stream"},
		{"cut gzip", good[:len(good)-12], -1, ""},
		{"not a shard", gzipLines("{\"a\":1}\n"), 1, "not a bowline count shard"},
		{"newer", gzipLines(`{"format":"bowline-counts","version":2,"tool":"later"}` + "\n"), 1, "version 2"},
		{"missing keys", gzipLines(head, `["a",1,1,1]`+"\n"), 3, "truncated: 1 of 2"},
		{"no end", gzipLines(head, `["a",1,1,1]`+"\n", `["b",1,2,2]`+"\n"), 4, "truncated"},
		{"wrong end", gzipLines(head, `["a",1,1,1]`+"\n", `["b",1,2,2]`+"\n", `{"end":3}`+"\n"), 4, "damaged"},
		{"after end", gzipLines(head, `["a",1,1,1]`+"\n", `["b",1,2,2]`+"\n", `{"end":2}`+"\n", "x\n"), 5, "after the end"},
		{"unsorted", gzipLines(head, `["b",1,1,1]`+"\n", `["a",1,2,2]`+"\n", `{"end":2}`+"\n"), 3, "ascending"},
		{"duplicate", gzipLines(head, `["a",1,1,1]`+"\n", `["a",1,2,2]`+"\n", `{"end":2}`+"\n"), 3, "ascending"},
		{"docs above count", gzipLines(head, `["a",1,1,2]`+"\n", `["b",1,2,2]`+"\n", `{"end":2}`+"\n"), 2, "docs <= count"},
		{"docs above N", gzipLines(head, `["a",1,3,3]`+"\n", `["b",1,2,2]`+"\n", `{"end":2}`+"\n"), 2, "docs <= 2"},
		{"bad line", gzipLines(head, `["a",1,1]`+"\n", `["b",1,2,2]`+"\n", `{"end":2}`+"\n"), 2, "not a [key"},
		{"no final newline", gzipLines(head, `["a",1,1,1]`+"\n", `["b",1,2,2]`+"\n", `{"end":2}`), 4, "truncated"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			into := NewCounts()
			_, err := ReadShard(bytes.NewReader(tc.data), "x.counts", into)
			var se *ShardError
			if !errors.As(err, &se) {
				t.Fatalf("err %v, want a *ShardError", err)
			}
			if (tc.line >= 0 && se.Line != tc.line) || !strings.Contains(err.Error(), tc.msg) || se.File != "x.counts" {
				t.Errorf("err %q at line %d, want line %d containing %q", err, se.Line, tc.line, tc.msg)
			}
			if into.Len() != 0 || into.Docs() != 0 {
				t.Errorf("a refused shard merged %d keys", into.Len())
			}
		})
	}
}

func TestWriteShardRefusesBounded(t *testing.T) {
	c := NewBoundedCounts(MinCapacity)
	if err := WriteShard(&bytes.Buffer{}, ShardHeader{}, c); err == nil {
		t.Error("a bounded Counts was written as a shard")
	}
	o := NewCounts()
	o.Add([]byte("a"), 1)
	if err := WriteShard(&bytes.Buffer{}, ShardHeader{}, o); err == nil {
		t.Error("a Counts with an open document was written as a shard")
	}
}

// Two parts of a corpus counted apart, written as count shards and merged
// back: the counts of the whole.
func ExampleReadShard() {
	var files [2]bytes.Buffer
	for i, part := range [][]string{{"dock full", "app froze"}, {"dock full again"}} {
		c := NewCounts()
		for _, d := range part {
			for _, k := range strings.Fields(d) {
				c.Add([]byte(k), 1)
			}
			c.EndDoc()
		}
		WriteShard(&files[i], ShardHeader{Tool: "example", Settings: []byte(`{}`)}, c)
	}
	whole := NewCounts()
	for i := range files {
		ReadShard(&files[i], fmt.Sprintf("part%d.counts", i), whole)
	}
	fmt.Println("documents", whole.Docs())
	whole.Each(func(key string, _ int, count, docs int64) { fmt.Println(key, count, docs) })
	// Output:
	// documents 3
	// again 1 1
	// app 1 1
	// dock 2 2
	// froze 1 1
	// full 2 2
}
