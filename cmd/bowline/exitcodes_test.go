package main

import (
	"bytes"
	"compress/gzip"
	"net"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestExitCodes walks every command through the kinds of failure it can
// meet (a bad command line, bad input data, a file that cannot be read or
// written, a refused spec) and checks the exit code of README "Exit
// codes", and that a failed run names what failed and leaves no output.
func TestExitCodes(t *testing.T) {
	dir := t.TempDir()
	p := func(n string) string { return filepath.Join(dir, n) }
	write := func(n string, b []byte) {
		if err := os.WriteFile(p(n), b, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	corpus := []byte("team\ttext\nbikes\tflat tyre\nbilling\tcharged twice\napp\tcrash on unlock\n")
	write("c.tsv", corpus)
	write("bad.tsv", []byte("team\ttext\nbikes\tflat tyre\tone field too many\n"))
	write("words.tsv", []byte("team\ttext\nbikes\tflat tyre\nnewteam\tunknown label\n"))
	write("empty.tsv", nil)
	write("header.tsv", []byte("team\ttext\n"))
	write("nofield.tsv", []byte("team\tbody\nbikes\tflat tyre\n"))
	write("file", []byte("a file, not a folder"))
	var gz bytes.Buffer
	zw := gzip.NewWriter(&gz)
	zw.Write(bytes.Repeat(corpus, 50))
	zw.Close()
	damaged := append([]byte(nil), gz.Bytes()...)
	for i := 20; i < 40; i++ {
		damaged[i] ^= 0x5a
	}
	write("corrupt.tsv.gz", damaged)
	write("truncated.tsv.gz", gz.Bytes()[:gz.Len()/2])
	write("bad.stop", []byte("a\n\xff\xfe\n"))
	write("notspec.json", []byte("hello"))
	mustRun(t, "learn", p("c.tsv"), "--label", "team", "-o", p("s.json"))
	mustRun(t, "learn", p("c.tsv"), "--counts-out", p("a.counts"))
	mustRun(t, "learn", p("c.tsv"), "--stop", "en", "--counts-out", p("b.counts"))
	s, _ := os.ReadFile(p("s.json"))
	write("tampered.json", bytes.Replace(s, []byte(`"tyre"`), []byte(`"tire"`), 1))
	if bytes.Equal(s, mustRead(t, p("tampered.json"))) {
		t.Fatal("tampering changed nothing")
	}
	busy, err := net.Listen("tcp", "127.0.0.1:0")
	if err != nil {
		t.Fatal(err)
	}
	defer busy.Close()
	out := p("no/such/folder/out")
	spec := []string{"--spec", p("s.json")}
	cases := []struct {
		kind string
		args []string
		code int
		want string // in stderr
	}{
		{"usage", []string{"learn", p("c.tsv")}, exitUsage, "-o"},
		{"usage", []string{"learn", p("c.tsv"), "-o", p("x.json"), "--text", "team", "--label", "team"}, exitUsage, "--label team"},
		{"usage", []string{"learn", p("c.tsv"), "-o", p("c.tsv")}, exitUsage, "the corpus"},
		{"usage", []string{"learn", p("c.tsv"), "-o", p("x.json"), "--stop", "klingon"}, exitUsage, "klingon"},
		{"data", []string{"learn", p("bad.tsv"), "-o", p("x.json")}, exitData, "bad.tsv:2:"},
		{"data", []string{"learn", p("empty.tsv"), "-o", p("x.json")}, exitData, "empty file"},
		{"data", []string{"learn", p("header.tsv"), "-o", p("x.json")}, exitData, "no records"},
		{"data", []string{"learn", p("nofield.tsv"), "-o", p("x.json")}, exitData, `"text" not found`},
		{"data", []string{"learn", p("corrupt.tsv.gz"), "-o", p("x.json")}, exitData, "corrupt gzip"},
		{"data", []string{"learn", p("truncated.tsv.gz"), "-o", p("x.json")}, exitData, "truncated gzip"},
		{"data", []string{"learn", p("c.tsv"), "-o", p("x.json"), "--stop", p("bad.stop")}, exitData, "bad.stop:2"},
		{"io", []string{"learn", p("missing.tsv"), "-o", p("x.json")}, exitIO, "missing.tsv"},
		{"io", []string{"learn", "--format", "tsv", dir, "-o", p("x.json")}, exitIO, "directory"},
		{"io", []string{"learn", p("c.tsv"), "-o", out}, exitIO, out},
		{"io", []string{"learn", p("c.tsv"), "-o", p("x.json"), "--stop", p("missing.stop")}, exitIO, "missing.stop"},
		{"io", []string{"learn", p("c.tsv"), "-o", p("x.json"), "--extend", p("missing.json")}, exitIO, "missing.json"},
		{"spec", []string{"learn", p("c.tsv"), "-o", p("x.json"), "--extend", p("notspec.json")}, exitSpec, "notspec.json"},

		{"usage", []string{"encode", p("c.tsv")}, exitUsage, "--spec"},
		{"usage", append([]string{"encode", p("c.tsv"), "--report", p("s.json")}, spec...), exitUsage, "--spec"},
		{"data", append([]string{"encode", p("words.tsv"), "-o", p("x.svm")}, spec...), exitData, "newteam"},
		{"data", append([]string{"encode", p("nofield.tsv"), "-o", p("x.svm")}, spec...), exitData, `"text" not found`},
		{"data", append([]string{"encode", p("corrupt.tsv.gz"), "-o", p("x.svm")}, spec...), exitData, "corrupt gzip"},
		{"io", append([]string{"encode", p("missing.tsv"), "-o", p("x.svm")}, spec...), exitIO, "missing.tsv"},
		{"io", append([]string{"encode", p("c.tsv"), "-o", out}, spec...), exitIO, out},
		{"io", []string{"encode", "--spec", p("missing.json"), p("c.tsv"), "-o", p("x.svm")}, exitIO, "missing.json"},
		{"spec", []string{"encode", "--spec", p("notspec.json"), p("c.tsv"), "-o", p("x.svm")}, exitSpec, "not a spec"},
		{"spec", []string{"encode", "--spec", p("tampered.json"), p("c.tsv"), "-o", p("x.svm")}, exitSpec, "tampered.json"},

		{"usage", []string{"inspect"}, exitUsage, "spec file"},
		{"usage", []string{"inspect", p("s.json"), "--feature-map", p("s.json")}, exitUsage, "the spec"},
		{"io", []string{"inspect", p("missing.json")}, exitIO, "missing.json"},
		{"io", []string{"inspect", p("s.json"), "--feature-map", out}, exitIO, out},
		{"spec", []string{"inspect", p("tampered.json")}, exitSpec, "tampered.json"},

		{"usage", append([]string{"drift", p("c.tsv"), "--top", "0"}, spec...), exitUsage, "--top"},
		{"usage", append([]string{"drift", p("c.tsv"), "--report", p("c.tsv")}, spec...), exitUsage, "the corpus"},
		{"data", append([]string{"drift", p("bad.tsv")}, spec...), exitData, "bad.tsv:2:"},
		{"data", append([]string{"drift", p("truncated.tsv.gz")}, spec...), exitData, "truncated gzip"},
		{"io", append([]string{"drift", p("missing.tsv")}, spec...), exitIO, "missing.tsv"},
		{"io", append([]string{"drift", p("c.tsv"), "--report", out + ".json"}, spec...), exitIO, out},
		{"spec", []string{"drift", "--spec", p("notspec.json"), p("c.tsv")}, exitSpec, "not a spec"},

		{"usage", []string{"sweep", p("c.tsv"), "--c", "0"}, exitUsage, "--c"},
		{"usage", []string{"sweep", p("c.tsv"), "--label", "team", "--holdout", p("c.tsv"), "--report", p("c.tsv")}, exitUsage, "the training corpus"},
		{"data", []string{"sweep", p("bad.tsv"), "--widths", "2^10"}, exitData, "bad.tsv:2:"},
		{"data", []string{"sweep", p("header.tsv"), "--widths", "2^10"}, exitData, "no records"},
		{"io", []string{"sweep", p("c.tsv"), "--widths", "2^10", "--label", "team", "--holdout", p("missing.tsv")}, exitIO, "missing.tsv"},
		{"io", []string{"sweep", p("c.tsv"), "--widths", "2^10", "--report", out + ".json"}, exitIO, out},

		{"usage", []string{"merge", p("a.counts")}, exitUsage, "-o"},
		{"usage", []string{"merge", p("a.counts"), "-o", p("a.counts")}, exitUsage, "the count shard"},
		{"data", []string{"merge", p("c.tsv"), "-o", p("x.json")}, exitData, "c.tsv"},
		{"data", []string{"merge", p("a.counts"), p("b.counts"), "-o", p("x.json")}, exitData, "other settings"},
		{"io", []string{"merge", p("missing.counts"), "-o", p("x.json")}, exitIO, "missing.counts"},
		{"io", []string{"merge", p("a.counts"), "-o", out}, exitIO, out},

		{"usage", []string{"serve"}, exitUsage, "--spec"},
		{"usage", []string{"serve", "--spec", p("s.json"), "--addr", busy.Addr().String()}, exitUsage, "--addr " + busy.Addr().String()},
		{"usage", []string{"serve", "--spec", p("s.json"), "--addr", "no-such-host.invalid:1"}, exitUsage, "--addr"},
		{"io", []string{"serve", "--spec", p("missing.json")}, exitIO, "missing.json"},
		{"spec", []string{"serve", "--spec", p("tampered.json")}, exitSpec, "tampered.json"},

		{"usage", []string{"demo", "--docs", "1"}, exitUsage, "--docs"},
		{"io", []string{"demo", "--dir", p("file/demo"), "--docs", "20"}, exitIO, "file"},

		{"usage", []string{"version", "--frobnicate"}, exitUsage, "frobnicate"},
		{"usage", []string{"frobnicate"}, exitUsage, "frobnicate"},
	}
	seen := map[string]map[string]bool{}
	for _, c := range cases {
		code, stderr := bowline(t, append(c.args, "--progress", "never")[:len(c.args)+progressFlag(c.args[0])]...)
		if code != c.code || !strings.Contains(stderr, c.want) {
			t.Errorf("%s: bowline %s: exit %d (want %d), stderr %q (want it to name %s)", c.kind, strings.Join(c.args, " "), code, c.code, stderr, c.want)
		}
		if seen[c.args[0]] == nil {
			seen[c.args[0]] = map[string]bool{}
		}
		seen[c.args[0]][c.kind] = true
	}
	for _, cmd := range commands {
		if !seen[cmd.name]["usage"] {
			t.Errorf("bowline %s: no case of a bad command line", cmd.name)
		}
	}
	for _, n := range []string{"x.json", "x.svm", "no"} {
		if _, err := os.Stat(p(n)); !os.IsNotExist(err) {
			t.Errorf("a failed run left %s", n)
		}
	}
	es, _ := os.ReadDir(dir)
	for _, e := range es {
		if strings.Contains(e.Name(), ".tmp-") {
			t.Errorf("temporary file left behind: %s", e.Name())
		}
	}
	if b := mustRead(t, p("c.tsv")); !bytes.Equal(b, corpus) {
		t.Errorf("c.tsv changed")
	}
}

// progressFlag is 2 for commands that take --progress (so the runs of
// the test stay quiet), else 0.
func progressFlag(cmd string) int {
	switch cmd {
	case "learn", "encode", "drift", "sweep", "demo":
		return 2
	}
	return 0
}

func mustRead(t *testing.T, p string) []byte {
	t.Helper()
	b, err := os.ReadFile(p)
	if err != nil {
		t.Fatal(err)
	}
	return b
}
