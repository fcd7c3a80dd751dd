package main

import (
	"crypto/sha256"
	"errors"
	"fmt"
	"io"
	"os"
	"runtime"
	"strconv"
	"strings"

	"github.com/bowline/bowline/internal/cli"
	"github.com/bowline/bowline/internal/learn"
	"github.com/bowline/bowline/spec"
	"github.com/bowline/bowline/vocab"
)

func init() {
	register("merge", "merge count shards (learn --counts-out) into one spec", runMerge)
}

// cutoffFlags are the vocabulary cutoffs merge applies.
type cutoffFlags struct {
	minDocs     int64
	maxDocShare float64
	maxTerms    int
}

func (f *cutoffFlags) register(c *command) {
	c.Flags.Int64Var(&f.minDocs, "min-docs", 1, "keep keys seen in at least N documents")
	c.Flags.Float64Var(&f.maxDocShare, "max-doc-share", 1.0, "drop keys in more than this share of documents")
	c.Flags.IntVar(&f.maxTerms, "max-terms", 0, "keep at most K keys, by document count (0: no limit)")
}

func (f *cutoffFlags) cutoffs() (vocab.Cutoffs, error) {
	cut := vocab.Cutoffs{MinDocs: f.minDocs, MaxDocShare: f.maxDocShare, MaxTerms: f.maxTerms}
	if err := cut.Validate(); err != nil {
		return cut, cli.Usagef("%v", err)
	}
	return cut, nil
}

func runMerge(args []string, stdout, stderr io.Writer) error {
	c := newCommand("merge", "SHARD... -o SPEC.json [flags]", "Merges count shards written by bowline learn --counts-out, applies the cutoffs and writes a spec:\nthe same spec, fingerprint included, as bowline learn on the shards' corpora in one pass.")
	var cf cutoffFlags
	var out, fmap string
	cf.register(c)
	c.InputArgs("the count shard")
	c.OutputFlag(&out, "o", "", "spec file to write (.json, or .json.gz for gzip)")
	c.OutputFlag(&fmap, "feature-map", "", "also write the feature map (index, feature, document count) to FILE")
	if err := c.parse(args); err != nil {
		return err
	}
	if len(c.Args) == 0 {
		return cli.Usagef("bowline merge needs one or more count shards (written by bowline learn --counts-out)")
	}
	if out == "" || out == "-" {
		return cli.Usagef("bowline merge needs -o SPEC.json, the spec file to write")
	}
	cut, err := cf.cutoffs()
	if err != nil {
		return err
	}
	if err := distinctShards(c.Args); err != nil {
		return err
	}
	sh, err := learn.MergeShards(c.Args)
	if err != nil {
		var she *vocab.ShardError
		var pathErr *os.PathError
		if errors.As(err, &she) || errors.As(err, &pathErr) {
			return err
		}
		return &dataError{err} // shards counted with other settings
	}
	s, rep, err := sh.Learn(cut)
	if err != nil {
		return err
	}
	if err := s.Save(out); err != nil {
		return &ioError{err}
	}
	if fmap != "" {
		if err := writeFeatureMap(fmap, s, 1); err != nil {
			return err
		}
	}
	fmt.Fprintf(stderr, "merged %d count shard(s): %d documents, %d distinct keys\n", len(c.Args), sh.Counts.Docs(), rep.Seen)
	fmt.Fprintf(stderr, "cutoffs      below min-docs %d, above max-doc-share %d, over max-terms %d; kept %d\n", rep.BelowMinDocs, rep.AboveMaxShare, rep.OverMaxTerms, rep.Kept)
	fmt.Fprintf(stderr, "\nspec %s written to %s\n", s.ShortFingerprint(), out)
	return nil
}

// extendFlagFields names the spec setting each analysis flag sets; with
// --extend a flag may repeat the old spec's value but not change it.
var extendFlagFields = []struct{ flag, field string }{
	{"case", "tokens.case"}, {"unicode", "tokens.unicode"}, {"accents", "tokens.accents"},
	{"numbers", "tokens.numbers"}, {"min-len", "tokens.min_len"}, {"max-len", "tokens.max_len"},
	{"stop", "stop.words"}, {"drop-negations", "stop.keep_negations"}, {"stem", "stem"},
	{"words", "ngrams.words"}, {"chars", "ngrams.chars"}, {"unseen", "vocabulary.unseen"},
	{"tf", "weights.tf"}, {"idf", "weights.idf"}, {"norm", "weights.norm"},
}

// checkExtendFlags refuses analysis flags that contradict the spec being
// extended, naming the flag.
func checkExtendFlags(old *spec.Spec, oldPath string, st *learn.Settings, set map[string]bool) error {
	for _, f := range []string{"hash", "seed", "signed"} {
		if set[f] {
			return cli.Usagef("--%s: --extend keeps the vocabulary mode of %s; hashing specs cannot be extended", f, oldPath)
		}
	}
	nc, err := st.Content()
	if err != nil {
		return cli.Usagef("%v", err)
	}
	oldF := spec.SettingsFields(&old.Content, false)
	newF := spec.SettingsFields(&nc, false)
	for _, ef := range extendFlagFields {
		if !set[ef.flag] {
			continue
		}
		for i := range oldF {
			if oldF[i].Name == ef.field && oldF[i].Value != newF[i].Value {
				return cli.Usagef("--%s: %s was learned with %s %s, the flag asks for %s; --extend keeps every analysis setting of the spec it extends (leave the flag out, or learn a new spec)", ef.flag, oldPath, ef.field, oldF[i].Value, newF[i].Value)
			}
		}
	}
	return nil
}

// describeExtension prints the refresh account of learn --extend.
func describeExtension(w io.Writer, x *learn.Extension, oldPath string) {
	fmt.Fprintf(w, "\nextends      %s (%s)\n", oldPath, strings.TrimPrefix(x.Parent, "sha256:")[:12])
	fmt.Fprintf(w, "columns      %d from the parent at their index: %d kept, %d retired (now below the cutoffs)", x.ParentKeys, x.Kept, x.Retired)
	if x.Revived > 0 {
		fmt.Fprintf(w, ", %d of them revived", x.Revived)
	}
	fmt.Fprintf(w, "; %d appended", x.Appended)
	if x.OverMaxTerms > 0 {
		fmt.Fprintf(w, " (%d more left out by --max-terms)", x.OverMaxTerms)
	}
	fmt.Fprintln(w)
	if len(x.NewLabels) > 0 {
		fmt.Fprintf(w, "labels       appended %s\n", strings.Join(x.NewLabels, ", "))
	}
}

// describePruning prints what bounded counting dropped.
func describePruning(w io.Writer, limit int64, capacity int, p *spec.Pruning) {
	fmt.Fprintf(w, "\nmemory limit %s: at most %d distinct keys held at once", cli.FormatSize(limit), capacity)
	if peak := peakMemory(); peak > 0 {
		fmt.Fprintf(w, "; peak memory %.1f MiB (resident)", float64(peak)/(1<<20))
	}
	fmt.Fprintln(w)
	if p == nil {
		fmt.Fprintln(w, "pruned       nothing: every count is exact")
		return
	}
	fmt.Fprintf(w, "pruned       %d evictions (space-saving; a key can be evicted more than once), holding %d document counts and %d occurrences\n", p.Evicted, p.EvictedDocs, p.EvictedCount)
	fmt.Fprintf(w, "error bound  no pruned key was in more than %d documents; kept counts are never too high, exact but for\n", p.MaxDocs)
	fmt.Fprintf(w, "             %d keys, and at most %d too low: every key in --min-docs + %d documents or more is kept\n", p.InexactKeys, p.MaxDocs, p.MaxDocs)
}

// processMemory returns the process's resident set size and the part of
// it outside the Go runtime's own memory (program text and data), from
// /proc/self/statm on Linux; elsewhere both are 0.
func processMemory() (rss, nonGo int64) {
	b, err := os.ReadFile("/proc/self/statm")
	if err != nil {
		return 0, 0
	}
	f := strings.Fields(string(b))
	if len(f) < 2 {
		return 0, 0
	}
	pages, err := strconv.ParseInt(f[1], 10, 64)
	if err != nil {
		return 0, 0
	}
	rss = pages * int64(os.Getpagesize())
	var ms runtime.MemStats
	runtime.ReadMemStats(&ms)
	nonGo = rss - int64(ms.Sys-ms.HeapReleased)
	return rss, max(nonGo, 0)
}

// peakMemory returns the process's peak resident set size (VmHWM in
// /proc/self/status, Linux), or 0 when unknown.
func peakMemory() int64 {
	b, err := os.ReadFile("/proc/self/status")
	if err != nil {
		return 0
	}
	for _, line := range strings.Split(string(b), "\n") {
		if v, ok := strings.CutPrefix(line, "VmHWM:"); ok {
			f := strings.Fields(v)
			if len(f) == 2 && f[1] == "kB" {
				n, err := strconv.ParseInt(f[0], 10, 64)
				if err == nil {
					return n << 10
				}
			}
		}
	}
	return 0
}

// distinctShards refuses a shard given twice (the same file, or two files
// with the same bytes): merging it twice would count its documents twice.
func distinctShards(paths []string) error {
	seen := map[[32]byte]string{}
	for _, p := range paths {
		b, err := os.ReadFile(p)
		if err != nil {
			return &ioError{err}
		}
		sum := sha256.Sum256(b)
		if q, dup := seen[sum]; dup {
			return cli.Usagef("%s and %s are the same shard: merging it twice would count its documents twice", q, p)
		}
		seen[sum] = p
	}
	return nil
}
