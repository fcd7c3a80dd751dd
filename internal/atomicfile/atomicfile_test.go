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
	for _, noSync := range []bool{false, true} {
		dir := t.TempDir()
		p := filepath.Join(dir, "rows.svm")
		os.WriteFile(p, []byte("old\n"), 0o644)
		f, err := Create(p)
		if err != nil {
			t.Fatal(err)
		}
		f.NoSync = noSync
		io.WriteString(f, "1 1:2\n")
		if b, _ := os.ReadFile(p); string(b) != "old\n" {
			t.Fatalf("NoSync=%v: old file changed before commit: %q", noSync, b)
		}
		if err := f.Commit(); err != nil {
			t.Fatal(err)
		}
		b, err := os.ReadFile(p)
		if err != nil || string(b) != "1 1:2\n" {
			t.Fatalf("NoSync=%v: got %q, %v", noSync, b, err)
		}
		if n := entries(t, dir); len(n) != 1 {
			t.Fatalf("NoSync=%v: leftover files: %v", noSync, n)
		}
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
