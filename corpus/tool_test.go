package corpus

import (
	"bytes"
	"os"
	"os/exec"
	"strings"
	"testing"

	"github.com/bowline/bowline/internal/testkit"
)

// TestGNUGzip checks the reader against GNU gzip (Debian package gzip),
// the reference implementation of RFC 1952: the committed test file is
// what `gzip -9 -n` makes today, and a larger corpus compressed by gzip
// reads back to exactly the records of the plain text.
func TestGNUGzip(t *testing.T) {
	gzipPath := testkit.NeedTool(t, "gzip", "gzip")
	run := func(in []byte) []byte {
		cmd := exec.Command(gzipPath, "-9", "-n", "-c")
		cmd.Stdin = bytes.NewReader(in)
		out, err := cmd.Output()
		if err != nil {
			t.Fatalf("gzip: %v", err)
		}
		return out
	}
	plain, err := os.ReadFile(testdata + "pellwick.tsv")
	if err != nil {
		t.Fatal(err)
	}
	committed, err := os.ReadFile(testdata + "pellwick.tsv.gz")
	if err != nil {
		t.Fatal(err)
	}
	if v, _ := exec.Command(gzipPath, "--version").Output(); bytes.HasPrefix(v, []byte("gzip 1.12")) {
		// Byte-identical output is only promised by the same gzip version.
		if !bytes.Equal(run(plain), committed) {
			t.Errorf("pellwick.tsv.gz differs from gzip -9 -n output; run testdata/corpus/regen.sh")
		}
	}
	for _, f := range []Format{Lines, TSV, CSV, JSONL} {
		in, o := benchInput(f, 3000)
		want, err := readAll(t, string(in), o)
		if err != nil || len(want) != 3000 {
			t.Fatalf("%v plain: %d records, %v", f, len(want), err)
		}
		got, err := readAll(t, string(run(in)), o)
		if err != nil {
			t.Fatalf("%v gzip: %v", f, err)
		}
		if strings.Join(got, "\n") != strings.Join(want, "\n") {
			t.Errorf("%v: gzip-compressed corpus reads differently from the plain one", f)
		}
	}
}
