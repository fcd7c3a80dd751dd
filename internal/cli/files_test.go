package cli

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// filesCommand is a command with the file flags of a typical bowline
// command: a corpus argument, --spec, a repeatable --trust, -o, --report
// and --stop-like inputs.
func filesCommand() *Command {
	c := NewCommand("test", "CORPUS", "")
	var spec, out, report string
	var trust ListFlag
	c.InputArgs("the corpus")
	c.InputFlag(&spec, "spec", "", "")
	c.InputListFlag(&trust, "trust", "")
	c.OutputFlag(&out, "o", "-", "")
	c.OutputFlag(&report, "report", "", "")
	return c
}

func TestCheckFiles(t *testing.T) {
	dir := t.TempDir()
	p := func(n string) string { return filepath.Join(dir, n) }
	for _, n := range []string{"in.tsv", "s.json", "key.pub", "other.tsv"} {
		if err := os.WriteFile(p(n), []byte(n), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	must := func(err error) {
		if err != nil {
			t.Fatal(err)
		}
	}
	must(os.Symlink("in.tsv", p("link.tsv")))
	must(os.Link(p("in.tsv"), p("hard.tsv")))
	must(os.Mkdir(p("real"), 0o755))
	must(os.Symlink("real", p("alias")))
	must(os.Symlink("missing-target", p("dangling")))
	wd, _ := os.Getwd()
	t.Cleanup(func() { os.Chdir(wd) })
	must(os.Chdir(dir))

	cases := []struct {
		name string
		args []string
		want string // "" for accepted; else words the message must hold
	}{
		{"output is the corpus", []string{"in.tsv", "-o", "in.tsv"}, "-o in.tsv is the same file as the corpus in.tsv"},
		{"output is the corpus by another path", []string{"in.tsv", "-o", "./in.tsv"}, "both are " + p("in.tsv")},
		{"output links to the corpus", []string{"in.tsv", "-o", "link.tsv"}, "-o link.tsv is the same file as the corpus in.tsv"},
		{"corpus links to the output", []string{"link.tsv", "-o", p("in.tsv")}, "the corpus link.tsv"},
		{"output is a hard link of the corpus", []string{"in.tsv", "-o", "hard.tsv"}, "one file under two names"},
		{"report is the spec", []string{"in.tsv", "--spec", "s.json", "--report", "s.json"}, "--report s.json is the same file as --spec s.json"},
		{"report is a trusted key", []string{"in.tsv", "--trust", "other.tsv", "--trust", "key.pub", "--report", "key.pub"}, "--report key.pub is the same file as --trust key.pub"},
		{"two outputs, new file", []string{"in.tsv", "-o", "v.json", "--report", "v.json"}, "-o v.json and --report v.json are the same file"},
		{"two outputs through a linked folder", []string{"in.tsv", "-o", "alias/v.json", "--report", "real/v.json"}, "both are " + filepath.Join(p("real"), "v.json")},
		{"a dangling link and its own name", []string{"in.tsv", "-o", "dangling", "--report", "./dangling"}, "are the same file"},
		{"two outputs on standard output", []string{"in.tsv", "--report", "-"}, "-o and --report both write to standard output"},
		{"distinct files", []string{"in.tsv", "--spec", "s.json", "-o", "rows.svm", "--report", "r.json"}, ""},
		{"a dangling link's target is another name", []string{"in.tsv", "-o", "dangling", "--report", "missing-target"}, ""},
		{"inputs may repeat", []string{"in.tsv", "--spec", "in.tsv", "--trust", "in.tsv"}, ""},
		{"standard output and the null device", []string{"in.tsv", "--report", os.DevNull}, ""},
		{"the null device twice", []string{"in.tsv", "-o", os.DevNull, "--report", os.DevNull}, ""},
		{"the null device as input and output", []string{os.DevNull, "-o", os.DevNull}, ""},
		{"standard input and a new output", []string{"-", "-o", "rows.svm"}, ""},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			c := filesCommand()
			must(c.Parse(tc.args))
			err := c.CheckFiles()
			switch {
			case tc.want == "" && err != nil:
				t.Fatalf("%q: %v, want it accepted", tc.args, err)
			case tc.want != "" && err == nil:
				t.Fatalf("%q accepted, want %q", tc.args, tc.want)
			case tc.want != "":
				var u *UsageError
				if !errors.As(err, &u) || !strings.Contains(err.Error(), tc.want) || !strings.Contains(err.Error(), "nothing was read or written") {
					t.Fatalf("%q: %v (%T), want a usage error with %q", tc.args, err, err, tc.want)
				}
			}
		})
	}
}

// TestCheckFilesStandardStreams: "-" is compared as the file standard
// input or output is, so a corpus read from standard input is refused as
// an output, and standard output redirected onto an input is refused.
func TestCheckFilesStandardStreams(t *testing.T) {
	dir := t.TempDir()
	corpus := filepath.Join(dir, "in.tsv")
	if err := os.WriteFile(corpus, []byte("text\na\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	f, err := os.OpenFile(corpus, os.O_RDWR, 0)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	stdin, stdout := os.Stdin, os.Stdout
	defer func() { os.Stdin, os.Stdout = stdin, stdout }()

	os.Stdin = f
	c := filesCommand()
	c.Parse([]string{"-", "-o", corpus})
	if err := c.CheckFiles(); err == nil || !strings.Contains(err.Error(), "the corpus (standard input)") {
		t.Errorf("standard input is the output: %v", err)
	}
	os.Stdin = stdin

	os.Stdout = f
	c = filesCommand()
	c.Parse([]string{corpus})
	if err := c.CheckFiles(); err == nil || !strings.Contains(err.Error(), "-o - is the same file as the corpus") {
		t.Errorf("standard output is the corpus: %v", err)
	}
}
