// Package atomicfile writes a file under a temporary name in its target
// folder and renames it into place only when it is complete.
//
// The temporary name of an output NAME is
//
//	.NAME.tmp-bowline-PID-HOST-RANDOM
//
// where PID is the writer's process id, HOST eight hex digits naming the
// machine (a hash of its host name) and RANDOM a decimal number. A process
// killed outright (SIGKILL, a power cut) cannot remove its temporary file;
// the next Create of the same output on the same machine removes every
// such leftover whose process is gone, and no other file.
package atomicfile

import (
	"errors"
	"fmt"
	"hash/fnv"
	"io"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"sync"
)

// File is an output file being written. Nothing appears at Path until Commit
// succeeds; Abort (or a failed Commit) removes the temporary file.
type File struct {
	// Path is the final name of the file.
	Path string
	f    *os.File
	done bool
	// direct is set for targets that are not regular files: written in
	// place, closed by Commit and Abort.
	direct bool
	// NoSync, set before Commit, skips flushing the file to disk before
	// the rename. The rename still replaces the old file whole, so a
	// reader sees the old file or the new one, never part of it; only a
	// power cut soon after can lose the new one. It is for large outputs
	// that can be made again, where the flush costs more than it saves.
	NoSync bool
}

var (
	mu   sync.Mutex
	open = map[*File]struct{}{}
)

// Create starts writing the file that will appear at path. The temporary
// file lives in the same folder so the final rename is atomic. The special
// path "-" is standard output: it is written directly and Commit only
// flushes.
func Create(path string) (*File, error) {
	if path == "-" {
		return &File{Path: path, f: os.Stdout}, nil
	}
	dir, base := filepath.Split(path)
	if dir == "" {
		dir = "."
	}
	if st, err := os.Stat(path); err == nil {
		if st.IsDir() {
			return nil, fmt.Errorf("%s: is a directory", path)
		}
		if !st.Mode().IsRegular() {
			// A device or a named pipe (/dev/null, a FIFO): write to it
			// directly; renaming over it would replace it.
			f, err := os.OpenFile(path, os.O_WRONLY, 0)
			if err != nil {
				return nil, fmt.Errorf("cannot write %s: %w", path, unwrapPath(err))
			}
			return &File{Path: path, f: f, direct: true}, nil
		}
	}
	prefix := tempPrefix(base)
	removeStale(dir, prefix)
	f, err := os.CreateTemp(dir, prefix+strconv.Itoa(os.Getpid())+"-"+hostTag()+"-*")
	if err != nil {
		return nil, fmt.Errorf("cannot write %s: %w", path, unwrapPath(err))
	}
	a := &File{Path: path, f: f}
	mu.Lock()
	open[a] = struct{}{}
	mu.Unlock()
	return a, nil
}

// maxTempBase is the longest part of an output's name kept in its
// temporary name, so that the temporary name stays within the 255 bytes
// file systems allow when the output's own name does.
const maxTempBase = 200

// tempPrefix returns the start of the temporary names of the output base:
// ".BASE.tmp-bowline-", BASE cut to maxTempBase bytes.
func tempPrefix(base string) string {
	if len(base) > maxTempBase {
		base = base[:maxTempBase]
	}
	return "." + base + ".tmp-bowline-"
}

// hostTag names this machine in temporary names: eight hex digits of the
// FNV-1a hash of its host name. Leftovers written by a process of another
// machine (a shared folder) carry another tag and are never removed here,
// where their process id means nothing.
func hostTag() string {
	hostOnce.Do(func() {
		name, _ := os.Hostname()
		h := fnv.New32a()
		h.Write([]byte(name))
		hostHex = fmt.Sprintf("%08x", h.Sum32())
	})
	return hostHex
}

var (
	hostOnce sync.Once
	hostHex  string
)

// stalePID returns the process id in name when name is a temporary name
// of this machine that starts with prefix: prefix, PID, "-", the host
// tag, "-", RANDOM, with nothing else.
func stalePID(name, prefix string) (int, bool) {
	rest, ok := strings.CutPrefix(name, prefix)
	if !ok {
		return 0, false
	}
	parts := strings.Split(rest, "-")
	if len(parts) != 3 || parts[1] != hostTag() || !digits(parts[0]) || !digits(parts[2]) {
		return 0, false
	}
	pid, err := strconv.Atoi(parts[0])
	if err != nil || pid <= 0 {
		return 0, false
	}
	return pid, true
}

func digits(s string) bool {
	if s == "" {
		return false
	}
	for i := 0; i < len(s); i++ {
		if s[i] < '0' || s[i] > '9' {
			return false
		}
	}
	return true
}

// removeStale removes the temporary files in dir that start with prefix
// and were left by a process of this machine that no longer runs. A file
// of this process, of a live process or of a process whose state cannot
// be told is kept, and so is anything that is not a regular file. It is
// best effort: a failure leaves the leftover and is not reported.
func removeStale(dir, prefix string) {
	es, err := os.ReadDir(dir)
	if err != nil {
		return
	}
	self := os.Getpid()
	for _, e := range es {
		pid, ok := stalePID(e.Name(), prefix)
		if !ok || pid == self || !e.Type().IsRegular() || !processGone(pid) {
			continue
		}
		os.Remove(filepath.Join(dir, e.Name()))
	}
}

func unwrapPath(err error) error {
	var pe *os.PathError
	if errors.As(err, &pe) {
		return pe.Err
	}
	return err
}

// Write writes to the temporary file.
func (a *File) Write(p []byte) (int, error) {
	n, err := a.f.Write(p)
	if err != nil {
		// A *os.PathError, so that callers can tell an output failure
		// ("writing rows.svm: no space left on device") from others.
		return n, &os.PathError{Op: "writing", Path: a.Path, Err: unwrapPath(err)}
	}
	return n, nil
}

// Commit syncs (unless NoSync) and closes the temporary file and renames it
// to Path.
func (a *File) Commit() error {
	if a.done {
		return nil
	}
	a.done = true
	if a.f == os.Stdout {
		return nil
	}
	if a.direct {
		return a.f.Close()
	}
	forget(a)
	tmp := a.f.Name()
	if err := a.sync(); err != nil {
		a.f.Close()
		os.Remove(tmp)
		return fmt.Errorf("writing %s: %w", a.Path, unwrapPath(err))
	}
	if err := a.f.Close(); err != nil {
		os.Remove(tmp)
		return fmt.Errorf("writing %s: %w", a.Path, unwrapPath(err))
	}
	if err := os.Chmod(tmp, 0o644); err != nil {
		os.Remove(tmp)
		return err
	}
	if err := os.Rename(tmp, a.Path); err != nil {
		os.Remove(tmp)
		return fmt.Errorf("cannot write %s: %w", a.Path, unwrapPath(err))
	}
	return nil
}

func (a *File) sync() error {
	if a.NoSync {
		return nil
	}
	return a.f.Sync()
}

// Abort removes the temporary file. It is safe to call after Commit, where
// it does nothing, so `defer f.Abort()` is the usual pattern.
func (a *File) Abort() {
	if a.done {
		return
	}
	a.done = true
	if a.f == os.Stdout {
		return
	}
	if a.direct {
		a.f.Close()
		return
	}
	forget(a)
	a.f.Close()
	os.Remove(a.f.Name())
}

func forget(a *File) {
	mu.Lock()
	delete(open, a)
	mu.Unlock()
}

// AbortAll removes the temporary files of every File not yet committed or
// aborted. A signal handler calls it before the process exits.
func AbortAll() {
	mu.Lock()
	files := make([]*File, 0, len(open))
	for a := range open {
		files = append(files, a)
	}
	mu.Unlock()
	for _, a := range files {
		a.Abort()
	}
}

// WriteFile writes the output of fn to path atomically.
func WriteFile(path string, fn func(w io.Writer) error) error {
	f, err := Create(path)
	if err != nil {
		return err
	}
	defer f.Abort()
	if err := fn(f); err != nil {
		return err
	}
	return f.Commit()
}
