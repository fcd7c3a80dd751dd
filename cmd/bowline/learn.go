package main

import (
	"fmt"
	"io"
	"os"
	"strings"

	"github.com/bowline/bowline/atomicfile"
	"github.com/bowline/bowline/corpus"
	"github.com/bowline/bowline/pipeline"
	"github.com/bowline/bowline/report"
	"github.com/bowline/bowline/spec"
	"github.com/bowline/bowline/svmlight"
)

type outputFlags struct {
	out        string
	indexBase  int
	withIDs    bool
	featureMap string
	report     string
}

func (f *outputFlags) registerReport(c *command) {
	c.fs.StringVar(&f.report, "report", "", "also write the run's figures to FILE.json or FILE.html")
}

func runLearn(args []string, stdout, stderr io.Writer) error {
	c := newCommand("learn", "CORPUS -o SPEC.json [flags]", "Reads a training corpus, counts its features, applies the cutoffs and writes a spec.")
	var in inputFlags
	var an analysisFlags
	var rf runFlags
	var of outputFlags
	in.register(c.fs)
	an.register(c.fs)
	rf.register(c.fs)
	c.fs.StringVar(&of.out, "o", "", "spec file to write (.json, or .json.gz for gzip)")
	c.fs.StringVar(&of.featureMap, "feature-map", "", "also write the feature map (index, feature, document count) to FILE")
	of.registerReport(c)
	if err := c.parse(args); err != nil {
		return err
	}
	if len(c.pos) != 1 {
		return usagef("bowline learn needs one corpus file (got %d); see bowline learn --help", len(c.pos))
	}
	if of.out == "" || of.out == "-" {
		return usagef("bowline learn needs -o SPEC.json, the spec file to write")
	}
	if err := rf.check(); err != nil {
		return err
	}
	if err := checkReportPath(of.report); err != nil {
		return err
	}
	path := c.pos[0]
	copts, err := in.options(path, nil, c.set)
	if err != nil {
		return err
	}
	st, err := an.settings(specInput(copts), c.set)
	if err != nil {
		return err
	}
	if st.Mode == spec.ModeHashing && of.featureMap != "" {
		return usagef("--feature-map: hashing mode stores no feature strings, so there is no map to write")
	}
	learner, err := spec.NewLearner(st)
	if err != nil {
		return usagef("%v", err)
	}
	r, err := corpus.Open(path, copts)
	if err != nil {
		return err
	}
	defer r.Close()
	bar := newProgress(rf.progress, r.Size(), stderr, "learn")
	s, fig, err := pipeline.Learn(r, learner, pipeline.LearnOptions{Name: path, Workers: rf.workers, Progress: bar.set})
	bar.finish()
	if err != nil {
		return err
	}
	if err := s.Save(of.out); err != nil {
		return &ioError{err}
	}
	if of.featureMap != "" {
		if err := writeFeatureMap(of.featureMap, s, 1); err != nil {
			return err
		}
	}
	fig.WriteText(stderr)
	fmt.Fprintf(stderr, "\nspec %s written to %s\n", s.ShortFingerprint(), of.out)
	return writeReport(of.report, fig)
}

func checkReportPath(p string) error {
	if p == "" {
		return nil
	}
	if _, err := report.FormatFromPath(p); err != nil {
		return usagef("--report: %v", err)
	}
	return nil
}

func writeReport(path string, fig *report.Figures) error {
	if path == "" {
		return nil
	}
	format, err := report.FormatFromPath(path)
	if err != nil {
		return usagef("--report: %v", err)
	}
	if err := atomicfile.WriteFile(path, func(w io.Writer) error { return report.Write(w, format, fig) }); err != nil {
		return &ioError{err}
	}
	return nil
}

func writeFeatureMap(path string, s *spec.Spec, base int) error {
	v := s.Content.Vocabulary
	if v == nil {
		return usagef("--feature-map: hashing mode stores no feature strings, so there is no map to write")
	}
	entries := make([]svmlight.MapEntry, len(v.Keys))
	for i, k := range v.Keys {
		entries[i] = svmlight.MapEntry{Index: i, Feature: k, Docs: v.DocCounts[i]}
	}
	if u := v.Unseen; u != "drop" {
		n := len(v.Keys)
		cols := int(s.Columns()) - n
		for j := 0; j < cols; j++ {
			name := "(unseen)"
			if strings.HasPrefix(u, "hash:") {
				name = fmt.Sprintf("(unseen bucket %d)", j)
			}
			entries = append(entries, svmlight.MapEntry{Index: n + j, Feature: name, Docs: 0})
		}
	}
	err := atomicfile.WriteFile(path, func(w io.Writer) error { return svmlight.WriteFeatureMap(w, base, entries) })
	if err != nil {
		return &ioError{err}
	}
	return nil
}

func runEncode(args []string, stdout, stderr io.Writer) error {
	c := newCommand("encode", "--spec SPEC CORPUS [-o ROWS] [flags]", "Applies a spec to a corpus and writes one SVMlight row per record, in input order.")
	var in inputFlags
	var rf runFlags
	var of outputFlags
	var specPath, fallback string
	in.register(c.fs)
	rf.register(c.fs)
	c.fs.StringVar(&specPath, "spec", "", "spec file written by bowline learn")
	c.fs.StringVar(&of.out, "o", "-", "rows file to write (- is standard output)")
	c.fs.IntVar(&of.indexBase, "index-base", 1, "index of the first column: 1 or 0")
	c.fs.BoolVar(&of.withIDs, "with-ids", false, "append \"# id\" to every row")
	c.fs.StringVar(&of.featureMap, "feature-map", "", "also write the feature map to FILE")
	c.fs.StringVar(&fallback, "label-fallback", "", "label for rows whose label the spec has not seen (default: error)")
	of.registerReport(c)
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
	r, err := corpus.Open(path, copts)
	if err != nil {
		return err
	}
	defer r.Close()
	out, err := atomicfile.Create(of.out)
	if err != nil {
		return &ioError{err}
	}
	defer out.Abort()
	bw := newBufWriter(out)
	bar := newProgress(rf.progress, r.Size(), stderr, "encode")
	fig, err := pipeline.Encode(r, enc, bw, pipeline.EncodeOptions{Name: path, Workers: rf.workers, Base: of.indexBase, WithIDs: of.withIDs, LabelFallback: fb, Progress: bar.set})
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
	if of.featureMap != "" {
		if err := writeFeatureMap(of.featureMap, s, of.indexBase); err != nil {
			return err
		}
	}
	fig.WriteText(stderr)
	if of.out != "-" {
		fmt.Fprintf(stderr, "\n%d rows written to %s\n", fig.Docs, of.out)
	}
	return writeReport(of.report, fig)
}

var _ = os.Stdout
