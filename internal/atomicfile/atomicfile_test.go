package atomicfile

import (
	"errors"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
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

// deadPID returns the id of a process that has ended.
func deadPID(t *testing.T) int {
	t.Helper()
	cmd := exec.Command(os.Args[0], "-test.run=^$")
	if err := cmd.Run(); err != nil {
		t.Fatal(err)
	}
	return cmd.Process.Pid
}

// TestTempNameCarriesPID: the temporary file is named after the output,
// the writer's process id and the machine.
func TestTempNameCarriesPID(t *testing.T) {
	dir := t.TempDir()
	f, err := Create(filepath.Join(dir, "rows.svm"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Abort()
	n := entries(t, dir)
	want := ".rows.svm.tmp-bowline-" + strconv.Itoa(os.Getpid()) + "-" + hostTag() + "-"
	if len(n) != 1 || !strings.HasPrefix(n[0], want) {
		t.Fatalf("temporary files %v, want one named %s…", n, want)
	}
	if pid, ok := stalePID(n[0], tempPrefix("rows.svm")); !ok || pid != os.Getpid() {
		t.Fatalf("stalePID(%s) = %d, %v", n[0], pid, ok)
	}
}

// TestCreateRemovesLeftoversOfDeadWriters: a writer killed outright left
// its temporary file; the next Create of the same output removes it, and
// keeps the leftovers of live processes, of this process, of other
// machines, of other outputs and files that only look alike.
func TestCreateRemovesLeftoversOfDeadWriters(t *testing.T) {
	dir := t.TempDir()
	dead := strconv.Itoa(deadPID(t))
	live := exec.Command("sleep", "60")
	if err := live.Start(); err != nil {
		t.Skipf("cannot start a live process: %v", err)
	}
	defer func() { live.Process.Kill(); live.Wait() }()
	alive := strconv.Itoa(live.Process.Pid)
	self := strconv.Itoa(os.Getpid())
	host := hostTag()
	other := "0badf00d"
	if other == host {
		other = "0badf00e"
	}
	gone := []string{
		".rows.svm.tmp-bowline-" + dead + "-" + host + "-12345",
		".rows.svm.tmp-bowline-" + dead + "-" + host + "-678",
	}
	kept := []string{
		".rows.svm.tmp-bowline-" + alive + "-" + host + "-12345", // a live writer
		".rows.svm.tmp-bowline-" + self + "-" + host + "-12345",  // this process
		".rows.svm.tmp-bowline-" + dead + "-" + other + "-12345", // another machine
		".spec.json.tmp-bowline-" + dead + "-" + host + "-12345", // another output
		".rows.svm.tmp-bowline-" + dead + "-" + host + "-12345x", // not the pattern
		".rows.svm.tmp-bowline-" + dead + "-" + host + "-1-2",    // not the pattern
		".rows.svm.tmp-bowline-0-" + host + "-12345",             // no process id
		".rows.svm.tmp-123456",                                   // an older bowline's
		"rows.svm.tmp-bowline-" + dead + "-" + host + "-12345",   // not hidden
		"x.rows.svm.tmp-bowline-" + dead + "-" + host + "-12345", // another output
		".rows.svm.tmp-bowline--" + host + "-12345",              // empty id
		".rows.svm.tmp-bowline-" + dead + "-" + host + "-",       // empty random part
	}
	for _, n := range append(append([]string{}, gone...), kept...) {
		if err := os.WriteFile(filepath.Join(dir, n), []byte("partial"), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	// A folder with a leftover's name is not a file bowline wrote.
	dirLike := ".rows.svm.tmp-bowline-" + dead + "-" + host + "-999"
	if err := os.Mkdir(filepath.Join(dir, dirLike), 0o755); err != nil {
		t.Fatal(err)
	}
	kept = append(kept, dirLike)

	f, err := Create(filepath.Join(dir, "rows.svm"))
	if err != nil {
		t.Fatal(err)
	}
	io.WriteString(f, "1 1:1\n")
	if err := f.Commit(); err != nil {
		t.Fatal(err)
	}
	have := map[string]bool{}
	for _, n := range entries(t, dir) {
		have[n] = true
	}
	for _, n := range gone {
		if have[n] {
			t.Errorf("leftover of dead process %s kept: %s", dead, n)
		}
	}
	for _, n := range kept {
		if !have[n] {
			t.Errorf("removed %s, which is not a leftover of a dead writer of rows.svm here", n)
		}
	}
	if !have["rows.svm"] || len(have) != len(kept)+1 {
		t.Errorf("folder holds %v, want rows.svm and the %d kept files", have, len(kept))
	}
}

// TestLongNameTempName: an output whose name is as long as file systems
// allow still gets a temporary name within the limit.
func TestLongNameTempName(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, strings.Repeat("r", 250))
	if err := WriteFile(p, func(w io.Writer) error { _, err := io.WriteString(w, "x"); return err }); err != nil {
		t.Fatal(err)
	}
	if b, err := os.ReadFile(p); err != nil || string(b) != "x" {
		t.Fatalf("%q, %v", b, err)
	}
}
