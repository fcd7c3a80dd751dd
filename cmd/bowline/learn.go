package main

import (
	"fmt"
	"io"
	"os"
	"strings"

	"github.com/bowline/bowline/atomicfile"
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
	r, err := openCorpus(path, copts)
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

var _ = os.Stdout
