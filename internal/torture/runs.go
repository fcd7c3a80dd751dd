package torture

import (
	"os"
	"path/filepath"
	"sort"
	"strings"
)

// A Run is a hostile command line: bowline run over files the case
// writes, with the exit code it must end with, the files it must leave
// as they were and the files it must not leave behind.
type Run struct {
	// Name names the case; About says what it tortures.
	Name, About string
	// Files are written into the case's folder before the run.
	Files map[string][]byte
	// Links are symbolic links made in the folder: name to target.
	Links map[string]string
	// Args is the command line; "{dir}" in an argument stands for the
	// case's folder.
	Args []string
	// Exit is the exit code the run must end with.
	Exit int
	// Unchanged lists files (of Files, or made by Setup) that must hold
	// the same bytes after the run as before it.
	Unchanged []string
	// Absent lists files that must not exist after the run.
	Absent []string
	// Stderr, when not empty, must be in what the run writes to stderr;
	// "{dir}" stands for the case's folder.
	Stderr []string
	// Setup, when not empty, is a bowline command line run first (its
	// exit code must be 0), for cases that need an output of bowline
	// itself, such as a learned spec.
	Setup [][]string
}

var runs []Run

// addRuns registers cases; each file of hostile runs calls it from init.
func addRuns(r ...Run) { runs = append(runs, r...) }

// Runs returns every hostile command line, sorted by name.
func Runs() []Run {
	out := append([]Run(nil), runs...)
	sort.Slice(out, func(i, j int) bool { return out[i].Name < out[j].Name })
	return out
}

// Prepare writes the run's files and links into dir and returns its
// command lines (setup first, then the run itself) with "{dir}" replaced.
func (r *Run) Prepare(dir string) (setup [][]string, args []string, err error) {
	for name, data := range r.Files {
		p := filepath.Join(dir, name)
		if err := os.MkdirAll(filepath.Dir(p), 0o755); err != nil {
			return nil, nil, err
		}
		if err := os.WriteFile(p, data, 0o644); err != nil {
			return nil, nil, err
		}
	}
	for name, target := range r.Links {
		if err := os.Symlink(strings.ReplaceAll(target, "{dir}", dir), filepath.Join(dir, name)); err != nil {
			return nil, nil, err
		}
	}
	sub := func(a []string) []string {
		out := make([]string, len(a))
		for i, s := range a {
			out[i] = strings.ReplaceAll(s, "{dir}", dir)
		}
		return out
	}
	for _, s := range r.Setup {
		setup = append(setup, sub(s))
	}
	return setup, sub(r.Args), nil
}

// Exit codes of bowline (README "Exit codes").
const (
	ExitOK    = 0
	ExitUsage = 2
	ExitData  = 3
	ExitIO    = 4
	ExitSpec  = 5
)
