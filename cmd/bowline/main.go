// Command bowline turns free text into sparse feature rows for linear
// learners and keeps the transformation frozen between training and serving.
//
// Run "bowline help" for the commands and "bowline CMD --help" for flags.
package main

import (
	"compress/flate"
	"compress/gzip"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"os/signal"
	"runtime/debug"
	"runtime/pprof"
	"runtime/trace"
	"sort"
	"sync/atomic"
	"syscall"

	"github.com/bowline/bowline/corpus"
	"github.com/bowline/bowline/internal/atomicfile"
	"github.com/bowline/bowline/internal/cli"
	"github.com/bowline/bowline/internal/pipeline"
	"github.com/bowline/bowline/spec"
	"github.com/bowline/bowline/stopwords"
	"github.com/bowline/bowline/vocab"
)

// Exit codes.
const (
	exitOK      = 0
	exitFailure = 1 // anything not listed below
	exitUsage   = 2 // bad command line: unknown flag, impossible value
	exitData    = 3 // bad input data: a record that cannot be read or mapped
	exitIO      = 4 // a file that cannot be read or written
	exitSpec    = 5 // a spec that is refused (truncated, tampered, newer)
)

type commandFunc func(args []string, stdout, stderr io.Writer) error

type commandEntry struct {
	name  string
	about string
	run   commandFunc
}

// commands are the subcommands; files add theirs with register.
var commands []commandEntry

// commandOrder is the order "bowline help" lists commands in.
var commandOrder = []string{"learn", "encode", "inspect", "drift", "sweep", "merge", "serve", "demo", "version"}

// register adds a subcommand (called from init functions).
func register(name, about string, run commandFunc) {
	commands = append(commands, commandEntry{name, about, run})
	rank := func(n string) int {
		for i, o := range commandOrder {
			if o == n {
				return i
			}
		}
		return len(commandOrder)
	}
	sort.SliceStable(commands, func(i, j int) bool { return rank(commands[i].name) < rank(commands[j].name) })
}

func init() {
	register("learn", "read a training corpus, count, apply cutoffs, write a spec", runLearn)
	register("encode", "apply a spec to a corpus: SVMlight rows and the run's figures", runEncode)
	register("inspect", "show a spec: fingerprint, settings, size, top terms", runInspect)
	register("demo", "run the whole job on the invented Pellwick Bike Share corpus", runDemo)
	register("version", "print version and build information", runVersion)
}

// signalHook, when set, receives SIGINT or SIGTERM instead of the default
// handling (remove temporary files, exit 130). A long-running command such
// as serve sets it to shut down gracefully.
var signalHook atomic.Pointer[func(os.Signal)]

// stopping is set when the default handling of SIGINT or SIGTERM has
// begun: from then on the handler ends the process (exit 130), and a
// command that fails because its temporary files were removed under it
// neither reports that failure nor exits with its code.
var stopping atomic.Bool

func main() {
	// A closed stdout pipe (| head) makes writes fail with EPIPE instead of
	// killing the process, so deferred clean-up runs and the run ends
	// quietly (see exitCode).
	signal.Notify(make(chan os.Signal, 1), syscall.SIGPIPE)
	sigs := make(chan os.Signal, 1)
	signal.Notify(sigs, os.Interrupt, syscall.SIGTERM)
	go func() {
		s := <-sigs
		if h := signalHook.Load(); h != nil {
			(*h)(s)
			return
		}
		stopping.Store(true)
		atomicfile.AbortAll()
		fmt.Fprintf(os.Stderr, "bowline: stopped by %v; no partial output left\n", s)
		os.Exit(130)
	}()
	code := profiled(func() int { return run(os.Args[1:], os.Stdout, os.Stderr) })
	if stopping.Load() {
		select {} // the signal handler exits
	}
	os.Exit(code)
}

// profiled runs fn, writing a CPU profile to $BOWLINE_CPUPROFILE and a heap
// profile to $BOWLINE_MEMPROFILE and an execution trace to $BOWLINE_TRACE
// when they are set (for pprof and go tool trace; see DEVELOPERS.md).
func profiled(fn func() int) int {
	if p := os.Getenv("BOWLINE_CPUPROFILE"); p != "" {
		f, err := os.Create(p)
		if err == nil {
			pprof.StartCPUProfile(f)
			defer func() { pprof.StopCPUProfile(); f.Close() }()
		}
	}
	if p := os.Getenv("BOWLINE_TRACE"); p != "" {
		f, err := os.Create(p)
		if err == nil {
			trace.Start(f)
			defer func() { trace.Stop(); f.Close() }()
		}
	}
	code := fn()
	if p := os.Getenv("BOWLINE_MEMPROFILE"); p != "" {
		if f, err := os.Create(p); err == nil {
			pprof.WriteHeapProfile(f)
			f.Close()
		}
	}
	return code
}

func run(args []string, stdout, stderr io.Writer) int {
	if len(args) == 0 {
		topUsage(stderr)
		return exitUsage
	}
	if args[0] == "help" || args[0] == "-h" || args[0] == "--help" {
		topUsage(stdout)
		return exitOK
	}
	if args[0] == "--version" || args[0] == "-version" {
		args = append([]string{"version"}, args[1:]...)
	}
	for _, c := range commands {
		if c.name == args[0] {
			err := c.run(args[1:], stdout, stderr)
			return exitCode(err, stderr)
		}
	}
	fmt.Fprintf(stderr, "bowline: unknown command %q (run bowline help)\n", args[0])
	return exitUsage
}

func topUsage(w io.Writer) {
	fmt.Fprintln(w, "bowline turns free text into sparse feature rows for linear learners.")
	fmt.Fprintln(w, "\nusage: bowline COMMAND [flags] [files]\n\ncommands:")
	for _, c := range commands {
		fmt.Fprintf(w, "  %-8s %s\n", c.name, c.about)
	}
	fmt.Fprintln(w, "\nbowline COMMAND --help lists the command's flags with their defaults.")
}

// exitCode prints err and returns the exit code it deserves.
func exitCode(err error, stderr io.Writer) int {
	if err == nil || errors.Is(err, flag.ErrHelp) {
		return exitOK
	}
	if errors.Is(err, syscall.EPIPE) {
		return exitOK // a closed stdout pipe ends quietly
	}
	if stopping.Load() {
		return exitFailure // the signal handler reports and exits
	}
	var ce *codeError
	if errors.As(err, &ce) {
		return ce.code // already reported
	}
	fmt.Fprintf(stderr, "bowline: %v\n", err)
	var u *cli.UsageError
	var pe *corpus.ParseError
	var re *pipeline.RecordError
	var le *spec.LoadError
	var se *stopwords.ParseError
	var she *vocab.ShardError
	var pathErr *os.PathError
	var flateErr flate.CorruptInputError
	switch {
	case errors.As(err, &u):
		return exitUsage
	case errors.As(err, &le):
		if errors.Is(le.Reason, spec.ErrUnreadable) {
			return exitIO
		}
		return exitSpec
	case errors.As(err, new(*dataError)):
		return exitData
	case errors.As(err, new(*ioError)):
		return exitIO
	case errors.As(err, &pe), errors.As(err, &re), errors.As(err, &se), errors.As(err, &she), errors.Is(err, pipeline.ErrNoRecords),
		errors.Is(err, corpus.ErrNoHeader), errors.Is(err, corpus.ErrNoField), errors.Is(err, corpus.ErrAmbiguousField):
		return exitData
	case errors.As(err, &pathErr):
		return exitIO
	case errors.Is(err, io.ErrUnexpectedEOF), errors.Is(err, gzip.ErrChecksum), errors.Is(err, gzip.ErrHeader), errors.As(err, &flateErr):
		// A file that was read but is damaged: a truncated or corrupt
		// archive.
		return exitData
	}
	return exitFailure
}

// ioError marks an input/output failure (exit code 4): a file that
// cannot be read or written.
type ioError struct{ err error }

func (e *ioError) Error() string { return e.err.Error() }
func (e *ioError) Unwrap() error { return e.err }

// dataError marks bad input data (exit code 3) that has no type of its
// own, such as count shards that do not go together.
type dataError struct{ err error }

func (e *dataError) Error() string { return e.err.Error() }
func (e *dataError) Unwrap() error { return e.err }

// codeError ends a command with an exit code whose reason has been
// reported already (demo's steps).
type codeError struct {
	code int
	err  error
}

func (e *codeError) Error() string { return e.err.Error() }
func (e *codeError) Unwrap() error { return e.err }

func runVersion(args []string, stdout, stderr io.Writer) error {
	c := newCommand("version", "", "print version and build information")
	if err := c.parse(args); err != nil {
		return err
	}
	fmt.Fprintf(stdout, "bowline %s (spec schema %d)\n", spec.ToolVersion, spec.SchemaVersion)
	if bi, ok := debug.ReadBuildInfo(); ok {
		fmt.Fprintf(stdout, "go %s\n", bi.GoVersion)
		for _, s := range bi.Settings {
			if s.Key == "vcs.revision" || s.Key == "vcs.time" || s.Key == "vcs.modified" {
				fmt.Fprintf(stdout, "%s %s\n", s.Key, s.Value)
			}
		}
	}
	return nil
}
