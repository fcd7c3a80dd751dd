package main

import (
	"errors"
	"fmt"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"
)

// TestMain lets the test binary act as the bowline command in a
// subprocess (for signal tests).
func TestMain(m *testing.M) {
	if os.Getenv("BOWLINE_AS_COMMAND") == "1" {
		main()
		return
	}
	os.Exit(m.Run())
}

func subcommand(t *testing.T, args ...string) *exec.Cmd {
	t.Helper()
	cmd := exec.Command(os.Args[0], args...)
	cmd.Env = append(os.Environ(), "BOWLINE_AS_COMMAND=1")
	return cmd
}

// TestInterruptLeavesNothing delivers SIGINT and SIGTERM to a running
// encode that reads a slow standard input and writes a file and a report:
// no partial file may be left at the target paths, nor any temporary file.
func TestInterruptLeavesNothing(t *testing.T) {
	for _, sig := range []syscall.Signal{syscall.SIGINT, syscall.SIGTERM} {
		t.Run(sig.String(), func(t *testing.T) {
			dir := t.TempDir()
			p := func(n string) string { return filepath.Join(dir, n) }
			os.WriteFile(p("train.tsv"), []byte("team\ttext\nbikes\tflat tyre\nbilling\tcharged twice\n"), 0o644)
			mustRun(t, "learn", p("train.tsv"), "--label", "team", "-o", p("spec.json"))

			cmd := subcommand(t, "encode", "--spec", p("spec.json"), "-", "--format", "tsv", "-o", p("rows.svm"),
				"--on-error", "skip", "--rejects", p("rejects.tsv"), "--progress", "never")
			stdin, err := cmd.StdinPipe()
			if err != nil {
				t.Fatal(err)
			}
			var stderr strings.Builder
			cmd.Stderr = &stderr
			if err := cmd.Start(); err != nil {
				t.Fatal(err)
			}
			io.WriteString(stdin, "team\ttext\n")
			for i := 0; i < 5000; i++ {
				fmt.Fprintf(stdin, "bikes\tthe dock at Harlow Quay number %d would not release the bike\n", i)
			}
			// Wait until the temporary outputs exist: the run is under way.
			deadline := time.Now().Add(10 * time.Second)
			for {
				m, _ := filepath.Glob(p(".rows.svm.tmp-*"))
				if len(m) > 0 {
					break
				}
				if time.Now().After(deadline) {
					t.Fatal("encode never started writing")
				}
				time.Sleep(10 * time.Millisecond)
			}
			cmd.Process.Signal(sig)
			err = cmd.Wait()
			stdin.Close()
			var ee *exec.ExitError
			if !errors.As(err, &ee) || ee.ExitCode() != 130 {
				t.Fatalf("exit: %v (want 130)\n%s", err, stderr.String())
			}
			es, _ := os.ReadDir(dir)
			for _, e := range es {
				switch e.Name() {
				case "train.tsv", "spec.json":
				default:
					t.Errorf("left behind after %v: %s", sig, e.Name())
				}
			}
		})
	}
}

// TestClosedPipeIsQuiet: a reader that stops early (| head) ends the run
// with no message and exit 0.
func TestClosedPipeIsQuiet(t *testing.T) {
	dir := t.TempDir()
	p := func(n string) string { return filepath.Join(dir, n) }
	var b strings.Builder
	b.WriteString("team\ttext\n")
	for i := 0; i < 50000; i++ {
		fmt.Fprintf(&b, "bikes\tflat tyre number %d at the dock\n", i)
	}
	os.WriteFile(p("big.tsv"), []byte(b.String()), 0o644)
	mustRun(t, "learn", p("big.tsv"), "--label", "team", "-o", p("spec.json"))
	cmd := subcommand(t, "encode", "--spec", p("spec.json"), p("big.tsv"), "--progress", "never")
	out, err := cmd.StdoutPipe()
	if err != nil {
		t.Fatal(err)
	}
	var stderr strings.Builder
	cmd.Stderr = &stderr
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	buf := make([]byte, 100)
	io.ReadFull(out, buf)
	out.Close()
	err = cmd.Wait()
	if err != nil || stderr.Len() != 0 {
		t.Fatalf("exit %v, stderr %q; want a quiet exit 0", err, stderr.String())
	}
}

// TestKilledWriterLeftoverIsRemoved: SIGKILL leaves the temporary rows
// file of a running encode behind, named with the writer's process id;
// the next run writing the same output removes it, and keeps the
// temporary file of a writer that still runs.
func TestKilledWriterLeftoverIsRemoved(t *testing.T) {
	dir := t.TempDir()
	p := func(n string) string { return filepath.Join(dir, n) }
	os.WriteFile(p("train.tsv"), []byte("team\ttext\nbikes\tflat tyre\nbilling\tcharged twice\n"), 0o644)
	mustRun(t, "learn", p("train.tsv"), "--label", "team", "-o", p("spec.json"))

	cmd := subcommand(t, "encode", "--spec", p("spec.json"), "-", "--format", "tsv", "-o", p("rows.svm"), "--progress", "never")
	stdin, err := cmd.StdinPipe()
	if err != nil {
		t.Fatal(err)
	}
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	io.WriteString(stdin, "team\ttext\n")
	for i := 0; i < 5000; i++ {
		fmt.Fprintf(stdin, "bikes\tthe dock at Harlow Quay number %d would not release the bike\n", i)
	}
	pattern := p(fmt.Sprintf(".rows.svm.tmp-bowline-%d-*", cmd.Process.Pid))
	deadline := time.Now().Add(10 * time.Second)
	var left []string
	for len(left) == 0 {
		if time.Now().After(deadline) {
			t.Fatal("encode never started writing")
		}
		time.Sleep(10 * time.Millisecond)
		left, _ = filepath.Glob(pattern)
	}
	cmd.Process.Kill()
	cmd.Wait()
	stdin.Close()
	if _, err := os.Stat(left[0]); err != nil {
		t.Fatalf("SIGKILL left no temporary file: %v", err)
	}

	// A writer that still runs: its temporary file must stay.
	live := exec.Command("sleep", "60")
	if err := live.Start(); err != nil {
		t.Skipf("cannot start a live process: %v", err)
	}
	defer func() { live.Process.Kill(); live.Wait() }()
	liveTmp := strings.Replace(left[0], fmt.Sprintf("-%d-", cmd.Process.Pid), fmt.Sprintf("-%d-", live.Process.Pid), 1)
	os.WriteFile(liveTmp, []byte("partial"), 0o644)

	mustRun(t, "encode", "--spec", p("spec.json"), p("train.tsv"), "-o", p("rows.svm"))
	if _, err := os.Stat(left[0]); !os.IsNotExist(err) {
		t.Errorf("the killed writer's %s is still there (%v)", filepath.Base(left[0]), err)
	}
	if _, err := os.Stat(liveTmp); err != nil {
		t.Errorf("the live writer's %s was removed: %v", filepath.Base(liveTmp), err)
	}
	if b, err := os.ReadFile(p("rows.svm")); err != nil || strings.Count(string(b), "\n") != 2 {
		t.Errorf("rows.svm: %q, %v", b, err)
	}
}
