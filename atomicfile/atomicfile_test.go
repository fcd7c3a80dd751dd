package atomicfile

import (
	"errors"
	"io"
	"os"
	"path/filepath"
	"testing"
)

func entries(t *testing.T, dir string) []string {
	t.Helper()
	es, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	var names []string
	for _, e := range es {
		names = append(names, e.Name())
	}
	return names
}

func TestCommitPutsFileInPlace(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "rows.svm")
	f, err := Create(p)
	if err != nil {
		t.Fatal(err)
	}
	io.WriteString(f, "1 1:2\n")
	if _, err := os.Stat(p); !os.IsNotExist(err) {
		t.Fatalf("file visible before commit: %v", err)
	}
	if err := f.Commit(); err != nil {
		t.Fatal(err)
	}
	b, err := os.ReadFile(p)
	if err != nil || string(b) != "1 1:2\n" {
		t.Fatalf("got %q, %v", b, err)
	}
	if n := entries(t, dir); len(n) != 1 {
		t.Fatalf("leftover files: %v", n)
	}
}

func TestAbortLeavesNothing(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "spec.json")
	err := WriteFile(p, func(w io.Writer) error {
		io.WriteString(w, "partial")
		return errors.New("boom")
	})
	if err == nil || err.Error() != "boom" {
		t.Fatalf("err = %v", err)
	}
	if n := entries(t, dir); len(n) != 0 {
		t.Fatalf("leftover files: %v", n)
	}
}

func TestAbortAll(t *testing.T) {
	dir := t.TempDir()
	for _, n := range []string{"a", "b"} {
		if _, err := Create(filepath.Join(dir, n)); err != nil {
			t.Fatal(err)
		}
	}
	AbortAll()
	if n := entries(t, dir); len(n) != 0 {
		t.Fatalf("leftover files: %v", n)
	}
}

func TestCreateInMissingFolder(t *testing.T) {
	_, err := Create(filepath.Join(t.TempDir(), "no", "such", "x"))
	if err == nil {
		t.Fatal("want error")
	}
}

// TestDeviceIsWrittenInPlace: /dev/null stays a device.
func TestDeviceIsWrittenInPlace(t *testing.T) {
	f, err := Create(os.DevNull)
	if err != nil {
		t.Skipf("cannot open %s: %v", os.DevNull, err)
	}
	io.WriteString(f, "rows\n")
	if err := f.Commit(); err != nil {
		t.Fatal(err)
	}
	st, err := os.Stat(os.DevNull)
	if err != nil || st.Mode().IsRegular() {
		t.Fatalf("%s is now %v (%v)", os.DevNull, st.Mode(), err)
	}
}
