package main

import (
	"io"
	"strings"

	"github.com/bowline/bowline/internal/cli"
	"github.com/bowline/bowline/internal/drift"
)

func init() {
	register("drift", "compare a new corpus with a spec: OOV shares, unseen terms, frequency shifts", runDrift)
}

func runDrift(args []string, stdout, stderr io.Writer) error {
	c := newCommand("drift", "--spec SPEC CORPUS [flags]", "Compares a new corpus with a spec: OOV shares per n-gram order, the top unseen keys, the keys whose\ndocument share moved most, a divergence per order (Jensen–Shannon and PSI) and the label shift.\nThe figures go to standard output.")
	var in cli.InputFlags
	var rf runFlags
	var specPath, reportPath string
	var top int
	in.Register(c.Flags)
	rf.register(c.Flags)
	var ef errorFlags
	ef.register(c)
	c.InputArgs("the corpus")
	c.InputFlag(&specPath, "spec", "", "spec file written by bowline learn")
	var sf specFlags
	sf.register(c.Flags)
	c.Flags.IntVar(&top, "top", drift.DefaultTop, "how many unseen and moved keys to list")
	c.OutputFlag(&reportPath, "report", "", "also write the figures to FILE.json or FILE.html")
	c.Outputs("the figures", stdoutPath)
	if err := c.parse(args); err != nil {
		return err
	}
	if specPath == "" {
		return cli.Usagef("bowline drift needs --spec SPEC, written by bowline learn")
	}
	if len(c.Args) != 1 {
		return cli.Usagef("bowline drift needs one corpus file (got %d); see bowline drift --help", len(c.Args))
	}
	if top < 1 {
		return cli.Usagef("--top: %d is not a positive number", top)
	}
	if err := rf.check(); err != nil {
		return err
	}
	if err := ef.check(); err != nil {
		return err
	}
	if err := checkReportPath(reportPath); err != nil {
		return err
	}
	s, err := sf.load(specPath)
	if err != nil {
		return err
	}
	path := c.Args[0]
	copts, err := in.Options(path, &s.Content.Input, c.Given)
	if err != nil {
		return err
	}
	if n := len(cli.SpecInput(copts).Text); n != len(s.Content.Input.Text) {
		return cli.Usagef("--text: the spec was learned on %d text field(s) (%s), got %d", len(s.Content.Input.Text), strings.Join(s.Content.Input.Text, ", "), n)
	}
	copts.Fields = fieldNames(s.Content.Fields)
	run, err := startCorpus(path, copts, &ef, &rf, stderr, "drift")
	if err != nil {
		return err
	}
	defer run.close()
	res, err := drift.Compare(s, run.r, drift.Options{Workers: rf.workers, Top: top, Name: path, LabelField: copts.Label, Progress: run.progress, Rejects: run.rejects()})
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
	return writeReport(reportPath, res)
}
