// Command bowline-beam runs bowline learn and bowline encode as Apache Beam
// pipelines, on Beam's local prism runner or on a cluster runner chosen
// with Beam's --runner flag.
//
// Usage:
//
//	bowline-beam learn [flags] CORPUS... -o SPEC.json
//	bowline-beam encode --spec SPEC.json [flags] CORPUS... -o PREFIX
//
// The analysis, cutoff and hashing flags are bowline learn's and mean the
// same; every flag of the Beam SDK (--runner, --endpoint, --project, ...)
// is accepted too. Run "bowline-beam learn --help" for the list.
package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"strings"

	"github.com/apache/beam/sdks/v2/go/pkg/beam"
	"github.com/apache/beam/sdks/v2/go/pkg/beam/io/filesystem"
	beamlog "github.com/apache/beam/sdks/v2/go/pkg/beam/log"
	"github.com/apache/beam/sdks/v2/go/pkg/beam/x/beamx"

	bowlinebeam "github.com/bowline/bowline/beam"
	"github.com/bowline/bowline/corpus"
	"github.com/bowline/bowline/internal/cli"
	"github.com/bowline/bowline/spec"
)

// Exit codes, as bowline's where they overlap.
const (
	exitOK      = 0
	exitFailure = 1
	exitUsage   = 2
)

func main() {
	args := os.Args[1:]
	if len(args) == 0 || strings.HasPrefix(args[0], "-") {
		// A cluster runner starts this binary as a worker with Beam's
		// flags only; beam.Init runs the worker and does not return.
		flag.CommandLine.SetOutput(io.Discard)
		if err := flag.CommandLine.Parse(args); err == nil {
			beam.Init()
		}
		usage(os.Stderr)
		os.Exit(exitUsage)
	}
	os.Exit(run(context.Background(), args, os.Stderr))
}

func usage(w io.Writer) {
	fmt.Fprint(w, `usage:
  bowline-beam learn [flags] CORPUS... -o SPEC.json
  bowline-beam encode --spec SPEC.json [flags] CORPUS... -o PREFIX

Runs bowline learn or encode as an Apache Beam pipeline (default runner:
prism, in this process). "bowline-beam CMD --help" lists the flags.
`)
}

// run runs one subcommand and returns the exit code.
func run(ctx context.Context, args []string, stderr io.Writer) int {
	var err error
	switch args[0] {
	case "learn":
		err = runLearn(ctx, args[1:], stderr)
	case "encode":
		err = runEncode(ctx, args[1:], stderr)
	case "help", "-h", "--help":
		usage(stderr)
		return exitOK
	default:
		err = cli.Usagef("unknown command %q", args[0])
	}
	if errors.Is(err, flag.ErrHelp) {
		return exitOK
	}
	if err != nil {
		fmt.Fprintf(stderr, "bowline-beam: %v\n", cause(err))
		var u *cli.UsageError
		if errors.As(err, &u) {
			return exitUsage
		}
		return exitFailure
	}
	return exitOK
}

func runLearn(ctx context.Context, args []string, stderr io.Writer) error {
	c := newCommand("learn", "CORPUS... -o SPEC.json [flags]", "Learns a spec from the corpus files (read as one corpus, in the order given) on a Beam runner.")
	var in cli.InputFlags
	var an cli.AnalysisFlags
	var out string
	in.Register(c.Flags)
	an.Register(c.Flags)
	c.Flags.StringVar(&out, "o", "", "spec file to write (.json, or .json.gz for gzip)")
	if err := c.parse(args, stderr); err != nil {
		return err
	}
	if len(c.Args) == 0 {
		return cli.Usagef("bowline-beam learn needs at least one corpus file")
	}
	if out == "" || out == "-" {
		return cli.Usagef("bowline-beam learn needs -o SPEC.json, the spec file to write")
	}
	copts, err := corpusOptions(&in, c.Args, nil, c.Given)
	if err != nil {
		return err
	}
	st, err := an.Settings(cli.SpecInput(copts), c.Given)
	if err != nil {
		return err
	}
	if err := checkLocal(c.Args, copts); err != nil {
		return err
	}
	initBeam()
	p, s := beam.NewPipelineWithRoot()
	if _, err := bowlinebeam.Learn(s, c.Args, copts, st, out); err != nil {
		return cli.Usagef("%v", err)
	}
	if err := beamx.Run(ctx, p); err != nil {
		return err
	}
	data, err := readAll(ctx, out)
	if err != nil {
		return err
	}
	sp, err := spec.Read(strings.NewReader(string(data)), out)
	if err != nil {
		return err
	}
	size := ""
	if v := sp.Content.Vocabulary; v != nil {
		size = fmt.Sprintf(", %d of %d keys kept", len(v.Keys), v.Seen.Keys)
	}
	fmt.Fprintf(stderr, "%d documents%s\nspec %s written to %s\n", sp.Content.Docs, size, sp.Fingerprint, out)
	return nil
}

func runEncode(ctx context.Context, args []string, stderr io.Writer) error {
	c := newCommand("encode", "--spec SPEC CORPUS... -o PREFIX [flags]", "Applies a spec to the corpus files on a Beam runner; rows go to shards PREFIX-FFFFF-BBBBBBBB (file and line-block numbers), whose concatenation in name order is the rows in record order.")
	var in cli.InputFlags
	var specPath, out, fallback string
	var o bowlinebeam.EncodeOptions
	in.Register(c.Flags)
	c.Flags.StringVar(&specPath, "spec", "", "spec file written by bowline learn or bowline-beam learn")
	c.Flags.StringVar(&out, "o", "", "prefix of the row shards to write")
	c.Flags.IntVar(&o.Base, "index-base", 1, "index of the first column: 1 or 0")
	c.Flags.BoolVar(&o.WithIDs, "with-ids", false, "append \"# id\" to every row")
	c.Flags.StringVar(&fallback, "label-fallback", "", "label for rows whose label the spec has not seen (default: error)")
	c.Flags.Int64Var(&o.ShardLines, "shard-lines", bowlinebeam.DefaultShardLines, "input lines of one file per row shard")
	if err := c.parse(args, stderr); err != nil {
		return err
	}
	if specPath == "" {
		return cli.Usagef("bowline-beam encode needs --spec SPEC, written by bowline learn")
	}
	if len(c.Args) == 0 {
		return cli.Usagef("bowline-beam encode needs at least one corpus file")
	}
	if out == "" || out == "-" {
		return cli.Usagef("bowline-beam encode needs -o PREFIX, the prefix of the row shards")
	}
	if o.Base != 0 && o.Base != 1 {
		return cli.Usagef("--index-base: %d is not 1 or 0", o.Base)
	}
	if o.ShardLines < 1 {
		return cli.Usagef("--shard-lines: %d is not a positive number", o.ShardLines)
	}
	var err error
	if o.LabelFallback, err = cli.ParseFloat("label-fallback", fallback); err != nil {
		return err
	}
	o.Out = out
	data, err := readAll(ctx, specPath)
	if err != nil {
		return err
	}
	sp, err := spec.Read(strings.NewReader(string(data)), specPath)
	if err != nil {
		return err
	}
	copts, err := corpusOptions(&in, c.Args, &sp.Content.Input, c.Given)
	if err != nil {
		return err
	}
	if n := len(cli.SpecInput(copts).Text); n != len(sp.Content.Input.Text) {
		return cli.Usagef("--text: the spec was learned on %d text field(s) (%s), got %d", len(sp.Content.Input.Text), strings.Join(sp.Content.Input.Text, ", "), n)
	}
	if err := checkLocal(c.Args, copts); err != nil {
		return err
	}
	initBeam()
	p, s := beam.NewPipelineWithRoot()
	if _, err := bowlinebeam.Encode(s, c.Args, copts, data, o); err != nil {
		return cli.Usagef("%v", err)
	}
	if err := beamx.Run(ctx, p); err != nil {
		return err
	}
	fmt.Fprintf(stderr, "rows of %d file(s) written to %s-* with spec %s\n", len(c.Args), out, sp.Fingerprint)
	return nil
}

// cause shortens a failed job's error, which carries the runner's
// execution plan, to the DoFn's own error (its last line).
func cause(err error) string {
	msg := err.Error()
	if i := strings.LastIndex(msg, "caused by:\n"); i >= 0 {
		lines := strings.Split(strings.TrimSpace(msg[i:]), "\n")
		return "job failed: " + lines[len(lines)-1]
	}
	return msg
}

// checkLocal opens the local corpus files before the job starts, so that a
// missing file or field is reported as bowline reports it (remote files
// are checked by the job itself).
func checkLocal(paths []string, o corpus.Options) error {
	for _, p := range paths {
		if strings.Contains(p, "://") {
			continue
		}
		r, err := corpus.Open(p, o)
		if err != nil {
			var pe *corpus.ParseError
			var pathErr *os.PathError
			if errors.As(err, &pe) || errors.As(err, &pathErr) {
				return err
			}
			return cli.Usagef("%v", err)
		}
		r.Close()
	}
	return nil
}

// initBeam initializes the SDK for launching a pipeline; the SDK's and the
// local runner's progress messages are shown from warnings up.
func initBeam() {
	beam.Init()
	beamlog.SetupLogging("warn", "text")
}

// readAll reads a file through the Beam file systems (local paths, and
// gs:// and others the SDK registers).
func readAll(ctx context.Context, path string) ([]byte, error) {
	fs, err := filesystem.New(ctx, path)
	if err != nil {
		return nil, err
	}
	defer fs.Close()
	return filesystem.Read(ctx, fs, path)
}

// command is one subcommand's flags: bowline's, then the Beam SDK's
// (registered on flag.CommandLine by the SDK's packages), sharing their
// values.
type command struct {
	*cli.Command
	ours map[string]bool // bowline's flags
}

func newCommand(name, args, about string) *command {
	return &command{Command: cli.NewCommand(name, args, about)}
}

// parse parses flags and positional arguments in any order; "--" ends
// flags.
func (c *command) parse(args []string, stderr io.Writer) error {
	c.ours = map[string]bool{}
	c.Flags.VisitAll(func(f *flag.Flag) { c.ours[f.Name] = true })
	flag.CommandLine.VisitAll(func(f *flag.Flag) {
		if c.Flags.Lookup(f.Name) == nil {
			c.Flags.Var(f.Value, f.Name, f.Usage)
		}
	})
	if err := c.Parse(args); err != nil {
		if errors.Is(err, flag.ErrHelp) {
			c.usage(stderr)
			return flag.ErrHelp
		}
		return cli.Usagef("bowline-beam %s: %v (see bowline-beam %s --help)", c.Name, err, c.Name)
	}
	return nil
}

func (c *command) usage(w io.Writer) {
	fmt.Fprintf(w, "usage: bowline-beam %s %s\n\n%s\n\nbowline flags:\n", c.Name, c.Synopsis, c.About)
	c.PrintFlags(w, func(name string) bool { return c.ours[name] })
	fmt.Fprintf(w, "\nBeam flags (the SDK's; the common ones):\n")
	for _, n := range []string{"runner", "endpoint", "environment_type", "environment_config", "job_name", "project", "region", "staging_location", "temp_location", "worker_binary"} {
		if f := c.Flags.Lookup(n); f != nil {
			fmt.Fprintf(w, "  --%-16s %s\n", n, firstLine(f.Usage))
		}
	}
}

func firstLine(s string) string {
	s, _, _ = strings.Cut(s, "\n")
	return s
}
