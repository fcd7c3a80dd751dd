package main

import (
	"bufio"
	"compress/flate"
	"compress/gzip"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"runtime"
	"strings"

	"github.com/bowline/bowline/corpus"
	"github.com/bowline/bowline/internal/atomicfile"
	"github.com/bowline/bowline/internal/cli"
	"github.com/bowline/bowline/internal/pipeline"
	"github.com/bowline/bowline/spec"
)

// command is one subcommand: its flags and arguments, with bowline's
// messages for a bad command line and its --help output.
type command struct{ *cli.Command }

func newCommand(name, args, about string) *command {
	return &command{cli.NewCommand(name, args, about)}
}

// parse parses flags and positional arguments in any order ("--" ends
// flags), then refuses outputs that would overwrite an input or one
// another (cli.Command.CheckFiles), before anything is read.
func (c *command) parse(args []string) error {
	if err := c.Parse(args); err != nil {
		if errors.Is(err, flag.ErrHelp) {
			c.usage(os.Stdout)
			return flag.ErrHelp
		}
		msg := err.Error()
		if name, ok := strings.CutPrefix(msg, "flag provided but not defined: -"); ok {
			msg = "unknown flag --" + strings.TrimLeft(name, "-")
		}
		return cli.Usagef("%s: %s (see bowline %s --help)", c.Name, msg, c.Name)
	}
	return c.CheckFiles()
}

func (c *command) usage(w io.Writer) {
	fmt.Fprintf(w, "usage: bowline %s %s\n\n%s\n\nflags:\n", c.Name, c.Synopsis, c.About)
	c.PrintFlags(w, nil)
}

// stdoutPath is the path of an output that goes to standard output, for
// commands that print their result there: another output given "-" would
// mix with it.
func stdoutPath() []string { return []string{"-"} }

// fieldNames lists the names of table fields.
func fieldNames(fs []spec.TableField) []string {
	var out []string
	for _, f := range fs {
		out = append(out, f.Name)
	}
	return out
}

// runFlags are the running flags.
type runFlags struct {
	workers  int
	progress string
}

func (f *runFlags) register(fs *flag.FlagSet) {
	fs.IntVar(&f.workers, "workers", runtime.NumCPU(), "worker goroutines")
	fs.StringVar(&f.progress, "progress", "auto", "progress bar on stderr auto|always|never")
}

func (f *runFlags) check() error {
	if f.workers < 1 {
		return cli.Usagef("--workers: %d is not a positive number", f.workers)
	}
	switch f.progress {
	case "auto", "always", "never":
	default:
		return cli.Usagef("--progress: %q is not one of auto, always, never", f.progress)
	}
	return nil
}

func parseIndexBase(n int) error {
	if n != 0 && n != 1 {
		return cli.Usagef("--index-base: %d is not 1 or 0", n)
	}
	return nil
}

// errorFlags choose what happens to records that cannot be read.
type errorFlags struct {
	onError string
	rejects string
}

func (f *errorFlags) register(c *command) {
	c.Flags.StringVar(&f.onError, "on-error", "stop", "a record that cannot be read: stop (exit 3) or skip (into --rejects)")
	c.OutputFlag(&f.rejects, "rejects", "", "with --on-error skip: write each skipped record, as read, to FILE")
}

func (f *errorFlags) check() error {
	switch f.onError {
	case "stop":
		if f.rejects != "" {
			return cli.Usagef("--rejects needs --on-error skip")
		}
	case "skip":
		if f.rejects == "" {
			return cli.Usagef("--on-error skip needs --rejects FILE, so that no skipped record is lost")
		}
	default:
		return cli.Usagef("--on-error: %q is not stop or skip", f.onError)
	}
	return nil
}

// open starts the rejects file (nil, nil without --on-error skip).
func (f *errorFlags) open() (*rejectsFile, error) {
	if f.onError != "skip" {
		return nil, nil
	}
	af, err := atomicfile.Create(f.rejects)
	if err != nil {
		return nil, &ioError{err}
	}
	bw := bufio.NewWriter(af)
	return &rejectsFile{file: af, buf: bw, Rejects: &pipeline.Rejects{W: bw}}, nil
}

// rejectsFile is the rejects output of a run.
type rejectsFile struct {
	file *atomicfile.File
	buf  *bufio.Writer
	*pipeline.Rejects
}

func (r *rejectsFile) rejects() *pipeline.Rejects {
	if r == nil {
		return nil
	}
	return r.Rejects
}

func (r *rejectsFile) abort() {
	if r != nil {
		r.file.Abort()
	}
}

// commit puts the rejects file in place.
func (r *rejectsFile) commit(stderr io.Writer) error {
	if r == nil {
		return nil
	}
	if err := r.buf.Flush(); err != nil {
		return &ioError{err}
	}
	if err := r.file.Commit(); err != nil {
		return &ioError{err}
	}
	return nil
}

// summary says what was skipped.
func (r *rejectsFile) summary(stderr io.Writer) {
	if r == nil {
		return
	}
	if r.N > 0 {
		fmt.Fprintf(stderr, "\n%d records skipped, written to %s; first errors:\n", r.N, r.file.Path)
		for _, e := range r.Errors {
			fmt.Fprintf(stderr, "  %s\n", e)
		}
	}
}

// openCorpus opens a corpus and classifies a failure (README "Exit
// codes"): a file that cannot be read, or a folder, is an I/O error
// (exit 4); a file read but damaged (a corrupt or truncated archive, a
// damaged first record), empty where a header row is due, or without a
// field that is named, is bad data (exit 3); options that no file could
// satisfy are a bad command line (exit 2).
func openCorpus(path string, o corpus.Options) (*corpus.Reader, error) {
	r, err := corpus.Open(path, o)
	if err == nil {
		return r, nil
	}
	var pe *corpus.ParseError
	var pathErr *os.PathError
	var flateErr flate.CorruptInputError
	switch {
	case errors.As(err, &pe), errors.Is(err, corpus.ErrNoHeader), errors.Is(err, corpus.ErrNoField), errors.Is(err, corpus.ErrAmbiguousField):
		return nil, err
	case errors.As(err, &pathErr):
		return nil, &ioError{fmt.Errorf("cannot read %s: %v", path, pathErr.Err)}
	case errors.Is(err, io.ErrUnexpectedEOF), errors.Is(err, gzip.ErrChecksum), errors.Is(err, gzip.ErrHeader), errors.As(err, &flateErr):
		return nil, &dataError{err}
	}
	if st, serr := os.Stat(path); serr == nil && st.IsDir() {
		return nil, &ioError{err}
	}
	return nil, &cli.UsageError{Msg: err.Error()}
}

// refuseLearnFlags refuses analysis flags given to a command that applies a
// spec: the spec's settings are frozen, so a different tokenizer, stop list,
// n-gram range or weighting would contradict it. The message names the flag
// and what the spec says.
func refuseLearnFlags(c *command, args []string, specPath string) error {
	var an cli.AnalysisFlags
	learnFS := flag.NewFlagSet("learn", flag.ContinueOnError)
	an.Register(learnFS)
	an.RegisterTable(learnFS)
	for _, a := range args {
		if a == "--" {
			break
		}
		if !strings.HasPrefix(a, "-") || a == "-" {
			continue
		}
		name := strings.TrimLeft(a, "-")
		name, _, _ = strings.Cut(name, "=")
		if c.Flags.Lookup(name) != nil || learnFS.Lookup(name) == nil {
			continue
		}
		sp := specPath
		for j, b := range args {
			if (b == "--spec" || b == "-spec") && j+1 < len(args) {
				sp = args[j+1]
			} else if v, ok := strings.CutPrefix(b, "--spec="); ok {
				sp = v
			}
		}
		said := ""
		if s, err := spec.Load(sp); err == nil {
			said = " (the spec says " + specSetting(name, &s.Content) + ")"
		}
		return cli.Usagef("--%s is a learn setting: bowline %s applies the spec's frozen settings%s; learn a new spec to change it", name, c.Name, said)
	}
	return nil
}

// specSetting describes the spec's value for an analysis flag.
func specSetting(name string, c *spec.Content) string {
	t := c.Tokens
	switch name {
	case "case":
		return "case " + t.Case.String()
	case "unicode":
		return "unicode " + t.Unicode.String()
	case "accents":
		return "accents " + t.Accents.String()
	case "numbers":
		return "numbers " + t.Numbers.String()
	case "min-len", "max-len":
		return fmt.Sprintf("token length %d-%d", t.MinLen, t.MaxLen)
	case "stop", "drop-negations":
		if len(c.Stop.Words) == 0 {
			return "no stop words"
		}
		neg := "negations kept"
		if !c.Stop.KeepNegations {
			neg = "negations dropped"
		}
		return fmt.Sprintf("stop %s, %d words, %s", strings.Join(c.Stop.Sources, " "), len(c.Stop.Words), neg)
	case "stem":
		return "stem " + c.Stem
	case "words", "chars":
		return "words " + c.NGrams.Words + ", chars " + c.NGrams.Chars
	case "tf", "idf", "norm":
		return "tf " + c.Weights.TF.String() + ", idf " + c.Weights.IDF.String() + ", norm " + c.Weights.Norm.String()
	case "category", "number", "time", "missing-value", "time-zone":
		if len(c.Fields) == 0 {
			return "no table fields"
		}
		var parts []string
		for _, f := range c.Fields {
			d := string(f.Kind) + " " + f.Name
			switch {
			case f.Number != nil:
				var tr []string
				if f.Number.Log {
					tr = append(tr, "log")
				}
				if f.Number.Standard {
					tr = append(tr, "standard")
				}
				if len(tr) > 0 {
					d += ":" + strings.Join(tr, ",")
				}
				if len(f.Number.Sentinels) > 0 {
					d += " (missing: " + strings.Join(f.Number.Sentinels, " ") + ")"
				}
			case f.Time != nil:
				d += ":" + f.Time.Layout + " in " + f.Time.Zone
			}
			parts = append(parts, d)
		}
		return strings.Join(parts, ", ")
	case "hash", "seed", "signed":
		if h := c.Hashing; h != nil {
			return fmt.Sprintf("hashing width %d, seed %d, signed %v", h.Width, h.Seed, h.Signed)
		}
		return "vocabulary mode"
	default:
		if v := c.Vocabulary; v != nil {
			return fmt.Sprintf("min-docs %d, max-doc-share %g, max-terms %d, unseen %s", v.MinDocs, v.MaxDocShare, v.MaxTerms, v.Unseen)
		}
		return "hashing mode"
	}
}
