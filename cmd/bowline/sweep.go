package main

import (
	"fmt"
	"io"
	"time"

	"github.com/bowline/bowline/corpus"
	"github.com/bowline/bowline/hashing"
	"github.com/bowline/bowline/internal/cli"
	"github.com/bowline/bowline/internal/sweep"
	"github.com/bowline/bowline/spec"
)

func init() {
	register("sweep", "compare the vocabulary against a range of hashing widths", runSweep)
}

func runSweep(args []string, stdout, stderr io.Writer) error {
	c := newCommand("sweep", "TRAIN [--holdout TEST] [--widths 2^10..2^24] [flags]",
		"Compares the vocabulary with a range of hashing widths on one corpus: distinct keys, occupied buckets,\n"+
			"collision rate measured and expected, memory, and (with --label and --holdout) the held-out figures of\n"+
			"an L2-regularized logistic regression trained on each width's rows and on the vocabulary's.\n"+
			"--widths takes a range A..B (doubling; A..B*F multiplies by F) or a list 2^12,2^16,100000.\n"+
			"--explain-buckets N lists the keys sharing the N most crowded buckets at --explain-width (default: the widest).")
	var in cli.InputFlags
	var an cli.AnalysisFlags
	var rf runFlags
	var holdout, widths, report, explainWidth string
	var cval float64
	var explainN int
	in.Register(c.Flags)
	an.Register(c.Flags)
	an.RegisterTable(c.Flags)
	rf.register(c.Flags)
	var ef errorFlags
	ef.register(c)
	c.InputArgs("the training corpus")
	c.Inputs("--stop", an.StopFiles)
	c.InputFlag(&holdout, "holdout", "", "held-out corpus (same format and fields) for accuracy figures")
	c.Flags.StringVar(&widths, "widths", "2^10..2^24", "hashing widths: range A..B (step ×2) or list A,B,C")
	c.Flags.Float64Var(&cval, "c", 1, "regularization C of the logistic regression (as liblinear's -c)")
	c.Flags.IntVar(&explainN, "explain-buckets", 0, "list the keys of the N most crowded buckets")
	c.Flags.StringVar(&explainWidth, "explain-width", "", "width for --explain-buckets (default: the widest)")
	c.OutputFlag(&report, "report", "", "also write the sweep to FILE.json or FILE.html")
	c.Outputs("the figures", stdoutPath)
	if err := c.parse(args); err != nil {
		return err
	}
	if len(c.Args) != 1 {
		return cli.Usagef("bowline sweep needs one training corpus file (got %d); see bowline sweep --help", len(c.Args))
	}
	if c.Given["hash"] {
		return cli.Usagef("--hash: sweep measures many widths; give them with --widths")
	}
	if err := rf.check(); err != nil {
		return err
	}
	if err := ef.check(); err != nil {
		return err
	}
	ws, err := sweep.ParseWidths(widths)
	if err != nil {
		return cli.Usagef("--widths: %v", err)
	}
	if !(cval > 0) {
		return cli.Usagef("--c: %v is not a positive number", cval)
	}
	if explainN < 0 {
		return cli.Usagef("--explain-buckets: %d is negative", explainN)
	}
	var ew uint64
	if explainWidth != "" {
		if explainN == 0 {
			return cli.Usagef("--explain-width needs --explain-buckets N")
		}
		if ew, err = hashing.ParseWidth(explainWidth); err != nil {
			return cli.Usagef("--explain-width: %v", err)
		}
	}
	if err := checkReportPath(report); err != nil {
		return err
	}
	path := c.Args[0]
	copts, err := in.Options(path, nil, c.Given)
	if err != nil {
		return err
	}
	// --seed and --signed belong to hashing mode in learn; here they
	// apply to every width, so they are taken before the vocabulary
	// settings are checked.
	set := map[string]bool{}
	for k, v := range c.Given {
		if k != "seed" && k != "signed" {
			set[k] = v
		}
	}
	st, err := an.Settings(spec.Input{Format: copts.Format.String(), Text: copts.Text, Label: copts.Label, ID: copts.ID, NoHeader: copts.NoHeader}, set)
	if err != nil {
		return err
	}
	if holdout != "" && copts.Label == "" {
		return cli.Usagef("--holdout needs --label: accuracy is measured against the labels")
	}
	start := time.Now()
	run, err := startCorpus(path, copts, &ef, &rf, stderr, "sweep")
	if err != nil {
		return err
	}
	defer run.close()
	var hr *corpus.Reader
	if holdout != "" {
		hopts, err := in.Options(holdout, nil, c.Given)
		if err != nil {
			return err
		}
		if hr, err = openCorpus(holdout, hopts); err != nil {
			return err
		}
		defer hr.Close()
	}
	res, err := sweep.Run(run.r, path, hr, holdout, sweep.Options{Settings: st, Widths: ws, Seed: an.Seed, Signed: an.Signed,
		C: cval, Workers: rf.workers, Explain: explainN, ExplainWidth: ew, Rejects: run.rejects(), Progress: run.progress})
	if err != nil {
		return err
	}
	if err := run.done(stderr); err != nil {
		return err
	}
	if err := res.WriteText(stdout); err != nil {
		return &ioError{err}
	}
	run.summary(stderr)
	fmt.Fprintf(stderr, "\nelapsed %s\n", time.Since(start).Round(time.Millisecond))
	return writeReport(report, res)
}
