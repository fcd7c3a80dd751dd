package main

import (
	"fmt"
	"io"
	"strings"

	"github.com/bowline/bowline/atomicfile"
	"github.com/bowline/bowline/pipeline"
	"github.com/bowline/bowline/spec"
)

func runEncode(args []string, stdout, stderr io.Writer) error {
	c := newCommand("encode", "--spec SPEC CORPUS [-o ROWS] [flags]", "Applies a spec to a corpus and writes one SVMlight row per record, in input order.")
	var in inputFlags
	var rf runFlags
	var of outputFlags
	var specPath, fallback string
	var ef errorFlags
	ef.register(c.fs)
	in.register(c.fs)
	rf.register(c.fs)
	c.fs.StringVar(&specPath, "spec", "", "spec file written by bowline learn")
	c.fs.StringVar(&of.out, "o", "-", "rows file to write (- is standard output)")
	c.fs.IntVar(&of.indexBase, "index-base", 1, "index of the first column: 1 or 0")
	c.fs.BoolVar(&of.withIDs, "with-ids", false, "append \"# id\" to every row")
	c.fs.StringVar(&of.featureMap, "feature-map", "", "also write the feature map to FILE")
	c.fs.StringVar(&fallback, "label-fallback", "", "label for rows whose label the spec has not seen (default: error)")
	of.registerReport(c)
	if err := refuseLearnFlags(c, args, specPath); err != nil {
		return err
	}
	if err := c.parse(args); err != nil {
		return err
	}
	if specPath == "" {
		return usagef("bowline encode needs --spec SPEC, written by bowline learn")
	}
	if len(c.pos) != 1 {
		return usagef("bowline encode needs one corpus file (got %d); see bowline encode --help", len(c.pos))
	}
	if err := rf.check(); err != nil {
		return err
	}
	if err := parseIndexBase(of.indexBase); err != nil {
		return err
	}
	if err := checkReportPath(of.report); err != nil {
		return err
	}
	if err := ef.check(); err != nil {
		return err
	}
	fb, err := parseFloatFlag("label-fallback", fallback)
	if err != nil {
		return err
	}
	s, err := spec.Load(specPath)
	if err != nil {
		return err
	}
	if of.featureMap != "" && s.Content.Vocabulary == nil {
		return usagef("--feature-map: hashing mode stores no feature strings, so there is no map to write")
	}
	enc, err := spec.NewEncoder(s)
	if err != nil {
		return &spec.LoadError{File: specPath, Reason: "invalid", Err: err}
	}
	path := c.pos[0]
	copts, err := in.options(path, &s.Content.Input, c.set)
	if err != nil {
		return err
	}
	if n := len(specInput(copts).Text); n != len(s.Content.Input.Text) {
		return usagef("--text: the spec was learned on %d text field(s) (%s), got %d", len(s.Content.Input.Text), strings.Join(s.Content.Input.Text, ", "), n)
	}
	copts.Fields = fieldNames(s.Content.Fields)
	r, err := openCorpus(path, copts)
	if err != nil {
		return err
	}
	defer r.Close()
	out, err := atomicfile.Create(of.out)
	if err != nil {
		return &ioError{err}
	}
	defer out.Abort()
	rej, err := ef.open()
	if err != nil {
		return err
	}
	defer rej.abort()
	bw := newBufWriter(out)
	bar := newProgress(rf.progress, r.Size(), stderr, "encode")
	fig, err := pipeline.Encode(r, enc, bw, pipeline.EncodeOptions{Name: path, Workers: rf.workers, Base: of.indexBase, WithIDs: of.withIDs, LabelFallback: fb, Progress: bar.set, Rejects: rej.rejects()})
	bar.finish()
	if err != nil {
		return err
	}
	if err := bw.Flush(); err != nil {
		return &ioError{err}
	}
	if err := out.Commit(); err != nil {
		return &ioError{err}
	}
	if err := rej.commit(stderr); err != nil {
		return err
	}
	if of.featureMap != "" {
		if err := writeFeatureMap(of.featureMap, s, of.indexBase); err != nil {
			return err
		}
	}
	fig.WriteText(stderr)
	if of.out != "-" {
		fmt.Fprintf(stderr, "\n%d rows written to %s\n", fig.Docs, of.out)
	}
	rej.summary(stderr)
	return writeReport(of.report, fig)
}
