package main

import (
	"fmt"
	"io"
	"os"
	"runtime/debug"

	"github.com/bowline/bowline/corpus"
	"github.com/bowline/bowline/internal/atomicfile"
	"github.com/bowline/bowline/internal/cli"
	"github.com/bowline/bowline/internal/learn"
	"github.com/bowline/bowline/internal/pipeline"
	"github.com/bowline/bowline/report"
	"github.com/bowline/bowline/spec"
	"github.com/bowline/bowline/svmlight"
	"github.com/bowline/bowline/vocab"
)

type outputFlags struct {
	out        string
	indexBase  int
	withIDs    bool
	featureMap string
	report     string
}

func (f *outputFlags) registerReport(c *command) {
	c.OutputFlag(&f.report, "report", "", "also write the run's figures to FILE.json or FILE.html")
}

func runLearn(args []string, stdout, stderr io.Writer) error {
	c := newCommand("learn", "CORPUS -o SPEC.json [flags]", "Reads a training corpus, counts its features, applies the cutoffs and writes a spec.")
	var sf specFlags // the --extend spec
	sf.register(c.Flags)
	var in cli.InputFlags
	var an cli.AnalysisFlags
	var rf runFlags
	var of outputFlags
	in.Register(c.Flags)
	an.Register(c.Flags)
	an.RegisterTable(c.Flags)
	rf.register(c.Flags)
	var ef errorFlags
	ef.register(c)
	c.InputArgs("the corpus")
	c.Inputs("--stop", an.StopFiles)
	c.OutputFlag(&of.out, "o", "", "spec file to write (.json, or .json.gz for gzip)")
	c.OutputFlag(&of.featureMap, "feature-map", "", "also write the feature map (index, feature, document count) to FILE")
	of.registerReport(c)
	var lf lifecycleFlags
	lf.register(c)
	if err := c.parse(args); err != nil {
		return err
	}
	if len(c.Args) != 1 {
		return cli.Usagef("bowline learn needs one corpus file (got %d); see bowline learn --help", len(c.Args))
	}
	if err := lf.check(c.Given, &of); err != nil {
		return err
	}
	if lf.countsOut == "" && (of.out == "" || of.out == "-") {
		return cli.Usagef("bowline learn needs -o SPEC.json, the spec file to write")
	}
	if err := rf.check(); err != nil {
		return err
	}
	if err := ef.check(); err != nil {
		return err
	}
	if err := checkReportPath(of.report); err != nil {
		return err
	}
	path := c.Args[0]
	var old *spec.Spec
	var oldInput *spec.Input
	var err error
	if lf.extend != "" {
		if old, err = sf.load(lf.extend); err != nil {
			return err
		}
		oldInput = &old.Content.Input
	}
	copts, err := in.Options(path, oldInput, c.Given)
	if err != nil {
		return err
	}
	st, err := an.Settings(cli.SpecInput(copts), c.Given)
	if err != nil {
		return err
	}
	if len(st.Fields) > 0 {
		switch {
		case copts.Format == corpus.Lines:
			return cli.Usagef("--%s: the lines format has no fields besides the text; use tsv, csv or jsonl", st.Fields[0].Kind)
		case lf.countsOut != "":
			return cli.Usagef("--%s does not go with --counts-out: count shards hold text counts; learn table fields in one pass", st.Fields[0].Kind)
		case old != nil:
			return cli.Usagef("--%s does not go with --extend: table-field columns follow the vocabulary, where appended keys would go", st.Fields[0].Kind)
		}
		copts.Fields = fieldNames(st.Fields)
	}
	if st.Mode == spec.ModeHashing && of.featureMap != "" {
		return cli.Usagef("--feature-map: hashing mode stores no feature strings, so there is no map to write")
	}
	var learner *learn.Learner
	if old != nil {
		if err := checkExtendFlags(old, lf.extend, st, c.Given); err != nil {
			return err
		}
		// Cutoffs not given anew are the old spec's.
		cut, ov := st.Cutoffs, old.Content.Vocabulary
		if ov != nil && !c.Given["min-docs"] {
			cut.MinDocs = ov.MinDocs
		}
		if ov != nil && !c.Given["max-doc-share"] {
			cut.MaxDocShare = ov.MaxDocShare
		}
		if ov != nil && !c.Given["max-terms"] {
			cut.MaxTerms = ov.MaxTerms
		}
		learner, err = learn.NewExtend(old, cut, cli.SpecInput(copts))
		if err != nil {
			return cli.Usagef("--extend %s: %v", lf.extend, err)
		}
	} else if learner, err = learn.New(st); err != nil {
		return cli.Usagef("%v", err)
	}
	if lf.limit > 0 {
		if learner.Content().Mode != spec.ModeVocabulary {
			return cli.Usagef("--memory-limit: hashing mode keeps no per-key counts (its memory is set by --hash); the limit applies to vocabulary mode")
		}
		rss, nonGo := processMemory()
		capacity, workers := pipeline.KeyCapacity(lf.limit, rf.workers)
		if capacity < 4096 {
			least := lf.limit >> 20
			for c, _ := pipeline.KeyCapacity(least<<20, 1); c < 4096; c, _ = pipeline.KeyCapacity(least<<20, 1) {
				least++
			}
			return cli.Usagef("--memory-limit %s leaves too little room for counting keys: bowline holds %.0f MiB before counting, and a worker needs about 7 MiB; give at least %dMiB", lf.memoryLimit, float64(max(rss, pipeline.NonHeapBytes))/(1<<20), least)
		}
		learner.LimitKeys(capacity)
		rf.workers = workers
		// Hold the Go heap, and what the runtime holds besides, below the
		// limit less what lies outside the runtime (program pages), with a
		// sixteenth to spare for the collector's lag.
		debug.SetMemoryLimit(lf.limit - nonGo - lf.limit/16)
	}
	run, err := startCorpus(path, copts, &ef, &rf, stderr, "learn")
	if err != nil {
		return err
	}
	defer run.close()
	lo := pipeline.LearnOptions{Name: path, Workers: rf.workers, Progress: run.progress, Rejects: run.rejects()}
	if lf.countsOut != "" {
		sh, fig, err := pipeline.Count(run.r, learner, lo)
		if err != nil {
			return err
		}
		if err := sh.Save(lf.countsOut); err != nil {
			return &ioError{err}
		}
		if err := run.done(stderr); err != nil {
			return err
		}
		fig.WriteText(stderr)
		run.summary(stderr)
		fmt.Fprintf(stderr, "\ncount shard written to %s: %d documents, %d distinct keys, no cutoff applied (bowline merge applies them)\n", lf.countsOut, sh.Counts.Docs(), sh.Counts.Len())
		return writeReport(of.report, fig)
	}
	s, fig, err := pipeline.Learn(run.r, learner, lo)
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
	if err := run.done(stderr); err != nil {
		return err
	}
	fig.WriteText(stderr)
	run.summary(stderr)
	if x := learner.Extension(); x != nil {
		describeExtension(stderr, x, lf.extend)
	}
	if lf.limit > 0 {
		describePruning(stderr, lf.limit, learner.KeyLimit(), s.Content.Vocabulary.Seen.Pruning)
	}
	if v := s.Content.Vocabulary; v != nil && len(v.Keys) == 0 {
		fmt.Fprintf(stderr, "\nwarning: no key passed the cutoffs (--min-docs %d, --max-doc-share %g over %d documents): the spec has no vocabulary column\n", v.MinDocs, v.MaxDocShare, s.Content.Docs)
	}
	fmt.Fprintf(stderr, "\nspec %s written to %s\n", s.ShortFingerprint(), of.out)
	return writeReport(of.report, fig)
}

// lifecycleFlags are learn's flags for refreshing, bounding and sharding.
type lifecycleFlags struct {
	extend      string
	memoryLimit string
	limit       int64
	countsOut   string
}

func (f *lifecycleFlags) register(c *command) {
	c.InputFlag(&f.extend, "extend", "", "refresh OLD_SPEC: keep its settings and every column at its index, append new keys")
	c.Flags.StringVar(&f.memoryLimit, "memory-limit", "", "count within SIZE of memory (512MiB, 2GB, 100M), pruning the rarest keys past it")
	c.OutputFlag(&f.countsOut, "counts-out", "", "write the exact counts, before cutoffs, to FILE (a count shard for bowline merge) instead of a spec")
}

// minMemoryLimit is the smallest --memory-limit accepted.
const minMemoryLimit = 16 << 20

func (f *lifecycleFlags) check(set map[string]bool, of *outputFlags) error {
	if f.memoryLimit != "" {
		n, err := cli.ParseSize(f.memoryLimit)
		if err != nil {
			return cli.Usagef("--memory-limit: %v", err)
		}
		if n < minMemoryLimit {
			return cli.Usagef("--memory-limit: %s is below the smallest limit, 16MiB", f.memoryLimit)
		}
		f.limit = n
	}
	if f.countsOut == "" {
		return nil
	}
	for _, other := range []string{"extend", "memory-limit", "min-docs", "max-doc-share", "max-terms", "feature-map", "o"} {
		if set[other] {
			why := map[string]string{
				"extend":        "a shard holds counts; extend the spec bowline merge writes",
				"memory-limit":  "a shard holds exact counts, and a memory limit would prune them; split the corpus into more shards instead",
				"min-docs":      "cutoffs apply when bowline merge writes the spec",
				"max-doc-share": "cutoffs apply when bowline merge writes the spec",
				"max-terms":     "cutoffs apply when bowline merge writes the spec",
				"feature-map":   "a shard has no columns yet; bowline merge writes the feature map",
				"o":             "--counts-out writes a count shard instead of a spec",
			}[other]
			flag := "--" + other
			if other == "o" {
				flag = "-o"
			}
			return cli.Usagef("%s does not go with --counts-out: %s", flag, why)
		}
	}
	if set["hash"] {
		return cli.Usagef("--counts-out: count shards hold vocabulary counts; hashing mode has none")
	}
	return nil
}

func checkReportPath(p string) error {
	if p == "" {
		return nil
	}
	if _, err := report.FormatFromPath(p); err != nil {
		return cli.Usagef("--report: %v", err)
	}
	return nil
}

// writeReport writes a run's result to path, in the format its name says
// (nothing when path is empty).
func writeReport(path string, res report.Renderer) error {
	if path == "" {
		return nil
	}
	format, err := report.FormatFromPath(path)
	if err != nil {
		return cli.Usagef("--report: %v", err)
	}
	if err := atomicfile.WriteFile(path, func(w io.Writer) error { return report.Write(w, format, res) }); err != nil {
		return &ioError{err}
	}
	return nil
}

func writeFeatureMap(path string, s *spec.Spec, base int) error {
	v := s.Content.Vocabulary
	if v == nil {
		return cli.Usagef("--feature-map: hashing mode stores no feature strings, so there is no map to write")
	}
	entries := make([]svmlight.MapEntry, len(v.Keys))
	for i, k := range v.Keys {
		entries[i] = svmlight.MapEntry{Index: i, Feature: k, Docs: v.DocCounts[i]}
	}
	if u := v.Unseen; u.Mode != vocab.UnseenDrop {
		n := len(v.Keys)
		for j := 0; j < u.Columns(); j++ {
			name := "(unseen)"
			if u.Mode == vocab.UnseenHash {
				name = fmt.Sprintf("(unseen bucket %d)", j)
			}
			entries = append(entries, svmlight.MapEntry{Index: n + j, Feature: name, Docs: 0})
		}
	}
	// Table-field columns follow the text columns.
	for _, fc := range s.Content.FieldColumns() {
		entries = append(entries, svmlight.MapEntry{Index: len(entries), Feature: fc.Feature, Docs: fc.Docs})
	}
	err := atomicfile.WriteFile(path, func(w io.Writer) error { return svmlight.WriteFeatureMap(w, base, entries) })
	if err != nil {
		return &ioError{err}
	}
	return nil
}

var _ = os.Stdout
