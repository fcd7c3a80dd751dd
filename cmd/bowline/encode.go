package main

import (
	"bufio"
	"fmt"
	"io"
	"strings"

	"github.com/bowline/bowline/corpus"
	"github.com/bowline/bowline/internal/atomicfile"
	"github.com/bowline/bowline/internal/cli"
	"github.com/bowline/bowline/internal/encode"
	"github.com/bowline/bowline/internal/pipeline"
	"github.com/bowline/bowline/report"
)

func runEncode(args []string, stdout, stderr io.Writer) error {
	c := newCommand("encode", "--spec SPEC CORPUS [-o ROWS] [flags]", "Applies a spec to a corpus and writes one SVMlight row per record, in input order.")
	var in cli.InputFlags
	var rf runFlags
	var of outputFlags
	var specPath, fallback string
	var ef errorFlags
	ef.register(c)
	in.Register(c.Flags)
	rf.register(c.Flags)
	c.InputArgs("the corpus")
	c.InputFlag(&specPath, "spec", "", "spec file written by bowline learn")
	var sf specFlags
	sf.register(c.Flags)
	c.OutputFlag(&of.out, "o", "-", "rows file to write (- is standard output)")
	c.Flags.IntVar(&of.indexBase, "index-base", 1, "index of the first column: 1 or 0")
	c.Flags.BoolVar(&of.withIDs, "with-ids", false, "append \"# id\" to every row")
	c.OutputFlag(&of.featureMap, "feature-map", "", "also write the feature map to FILE")
	c.Flags.StringVar(&fallback, "label-fallback", "", "label for rows whose label the spec has not seen (default: error)")
	var explainN int
	var explainOut string
	c.Flags.IntVar(&explainN, "explain-buckets", 0, "hashing mode: name the keys of the N most crowded buckets")
	c.OutputFlag(&explainOut, "explain-out", "", "with --explain-buckets: also write column, keys in bucket and key to FILE")
	of.registerReport(c)
	if err := refuseLearnFlags(c, args, specPath); err != nil {
		return err
	}
	if err := c.parse(args); err != nil {
		return err
	}
	if specPath == "" {
		return cli.Usagef("bowline encode needs --spec SPEC, written by bowline learn")
	}
	if len(c.Args) != 1 {
		return cli.Usagef("bowline encode needs one corpus file (got %d); see bowline encode --help", len(c.Args))
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
	fb, err := cli.ParseFloat("label-fallback", fallback)
	if err != nil {
		return err
	}
	s, enc, err := encode.Load(specPath, sf.options())
	if err != nil {
		return err
	}
	if explainN < 0 {
		return cli.Usagef("--explain-buckets: %d is negative", explainN)
	}
	if explainN > 0 && s.Content.Hashing == nil {
		return cli.Usagef("--explain-buckets: the spec is in vocabulary mode, where every key has its own column")
	}
	if explainOut != "" && explainN == 0 {
		return cli.Usagef("--explain-out needs --explain-buckets N")
	}
	if explainN > 0 && len(c.Args) == 1 && c.Args[0] == "-" {
		return cli.Usagef("--explain-buckets reads the corpus a second time, so it needs a file, not standard input")
	}
	if of.featureMap != "" && s.Content.Vocabulary == nil {
		return cli.Usagef("--feature-map: hashing mode stores no feature strings, so there is no map to write")
	}
	path := c.Args[0]
	copts, err := in.Options(path, &s.Content.Input, c.Given)
	if err != nil {
		return err
	}
	if of.withIDs && copts.ID == "" {
		return cli.Usagef("--with-ids needs an id field: the spec was learned without --id; give --id NAME")
	}
	if n := len(cli.SpecInput(copts).Text); n != len(s.Content.Input.Text) {
		return cli.Usagef("--text: the spec was learned on %d text field(s) (%s), got %d", len(s.Content.Input.Text), strings.Join(s.Content.Input.Text, ", "), n)
	}
	copts.Fields = fieldNames(s.Content.Fields)
	out, err := atomicfile.Create(of.out)
	if err != nil {
		return &ioError{err}
	}
	defer out.Abort()
	out.NoSync = true // rows can be made again; see README "Exit codes"
	run, err := startCorpus(path, copts, &ef, &rf, stderr, "encode")
	if err != nil {
		return err
	}
	defer run.close()
	// The pipeline writes whole batches of rows (hundreds of KB); a
	// buffer in between would only copy them.
	fig, err := pipeline.Encode(run.r, enc, out, pipeline.EncodeOptions{Name: path, Workers: rf.workers, Base: of.indexBase, WithIDs: of.withIDs, LabelFallback: fb, Progress: run.progress, Rejects: run.rejects(), Crowded: explainN})
	if err != nil {
		return err
	}
	if err := out.Commit(); err != nil {
		return &ioError{err}
	}
	if err := run.done(stderr); err != nil {
		return err
	}
	if of.featureMap != "" {
		if err := writeFeatureMap(of.featureMap, s, of.indexBase); err != nil {
			return err
		}
	}
	if explainN > 0 && fig.Collisions != nil && len(fig.Collisions.Crowded) > 0 {
		if err := explainBuckets(path, copts, enc, fig.Collisions.Crowded, int64(of.indexBase), explainOut); err != nil {
			return err
		}
	}
	fig.WriteText(stderr)
	if of.out != "-" {
		fmt.Fprintf(stderr, "\n%d rows written to %s\n", fig.Docs, of.out)
	}
	run.summary(stderr)
	return writeReport(of.report, fig)
}

// explainBuckets reads the corpus again and names the keys that share the
// crowded buckets, writing them to out when it is not empty.
func explainBuckets(path string, copts corpus.Options, enc *encode.Encoder, crowded []report.CrowdedBucket, base int64, out string) error {
	buckets := make([]uint64, len(crowded))
	for i, b := range crowded {
		buckets[i] = uint64(b.Column - base)
	}
	bk := enc.NewBucketKeys(buckets, 1000)
	copts.StrictUTF8 = false
	r, err := openCorpus(path, copts)
	if err != nil {
		return err
	}
	defer r.Close()
	for {
		if !r.Scan() {
			if r.Err() != nil && r.Skip() {
				continue // already reported (or rejected) by the encode pass
			}
			break
		}
		bk.Observe(r.Record().Text)
	}
	for i := range crowded {
		crowded[i].Names = bk.Keys(buckets[i])
	}
	if out == "" {
		return nil
	}
	err = atomicfile.WriteFile(out, func(w io.Writer) error {
		bw := bufio.NewWriter(w)
		fmt.Fprintf(bw, "column\tkeys\tkey\n")
		for _, b := range crowded {
			for _, k := range b.Names {
				fmt.Fprintf(bw, "%d\t%d\t%s\n", b.Column, b.Keys, k)
			}
		}
		return bw.Flush()
	})
	if err != nil {
		return &ioError{err}
	}
	return nil
}
