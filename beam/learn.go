package beam

import (
	"bufio"
	"bytes"
	"compress/gzip"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"reflect"
	"sort"
	"strconv"
	"strings"

	"github.com/apache/beam/sdks/v2/go/pkg/beam"
	"github.com/apache/beam/sdks/v2/go/pkg/beam/io/filesystem"
	"github.com/apache/beam/sdks/v2/go/pkg/beam/register"
	"github.com/apache/beam/sdks/v2/go/pkg/beam/transforms/stats"

	"github.com/bowline/bowline/corpus"
	"github.com/bowline/bowline/hashing"
	"github.com/bowline/bowline/internal/analysis"
	"github.com/bowline/bowline/internal/learn"
	"github.com/bowline/bowline/ngram"
	"github.com/bowline/bowline/spec"
	"github.com/bowline/bowline/vocab"
	"github.com/bowline/bowline/weight"
)

// KeyCount is the count of one feature key over some documents: its n-gram
// order code, its occurrences and the documents holding it.
type KeyCount struct {
	Order int
	Count int64
	Docs  int64
}

// addKeyCounts is the combine of counting: counts of disjoint documents add.
func addKeyCounts(a, b KeyCount) KeyCount {
	return KeyCount{Order: a.Order, Count: a.Count + b.Count, Docs: a.Docs + b.Docs}
}

func addInt64(a, b int64) int64 { return a + b }

func init() {
	beam.RegisterType(reflect.TypeOf((*KeyCount)(nil)).Elem())
	register.Function2x1(addKeyCounts)
	register.Function2x1(addInt64)
	register.DoFn3x1[context.Context, Doc, func(string, KeyCount), error](&keysFn{})
	register.Emitter2[string, KeyCount]()
	register.DoFn3x1[context.Context, Doc, func(uint64, int64), error](&bucketsFn{})
	register.Emitter2[uint64, int64]()
	register.DoFn2x1[Doc, func(string), error](&labelFn{})
	register.Emitter1[string]()
	register.DoFn6x1[context.Context, []byte, int, func(*string, *int) bool, func(*string, *KeyCount) bool, func(string), error](&vocabSpecFn{})
	register.DoFn6x1[context.Context, []byte, int, func(*string, *int) bool, func(*uint64, *int64) bool, func(string), error](&hashSpecFn{})
	register.Iter2[string, int]()
	register.Iter2[string, KeyCount]()
	register.Iter2[uint64, int64]()
}

// Learn adds to s the learn pipeline: it reads the corpus files with in,
// analyses every record with the analysis chain of st, counts each feature
// key's occurrences and documents as a per-key combine (in hashing mode:
// each bucket's documents, when the settings weight by idf), tallies the
// labels, and then, in one single-worker step, applies the cutoffs and
// writes the spec to out (a path on any registered file system; gzipped
// when it ends in ".gz"). The spec is the one bowline learn writes for
// the same files, settings and cutoffs, fingerprint included. Learn
// returns a PCollection<string> holding the spec's fingerprint.
//
// in.Format, in.Text, in.Label, in.ID and in.NoHeader must agree with
// st.Input, as they do when both come from the same command line.
func Learn(s beam.Scope, files []string, in corpus.Options, st *learn.Settings, out string) (beam.PCollection, error) {
	if len(files) == 0 {
		return beam.PCollection{}, errors.New("no corpus files to learn from")
	}
	if out == "" {
		return beam.PCollection{}, errors.New("no spec file to write")
	}
	l, err := learn.New(st)
	if err != nil {
		return beam.PCollection{}, err
	}
	content := *l.Content()
	settings, err := json.Marshal(content)
	if err != nil {
		return beam.PCollection{}, err
	}
	s = s.Scope("bowline.Learn")
	docs := Read(s, files, in)
	ndocs := stats.CountElms(s, docs)
	labels := stats.Count(s, beam.ParDo(s, &labelFn{HasLabel: content.Input.Label != "", Files: files}, docs))
	fin := beam.Impulse(s)
	if content.Mode == spec.ModeVocabulary {
		// The settings a shard is counted under: no learned numbers,
		// cutoffs at their defaults (see learn.Learner.Shard).
		sh, err := l.Shard(l.NewWorker(), spec.Labels{})
		if err != nil {
			return beam.PCollection{}, err
		}
		shardSettings, err := json.Marshal(sh.Settings)
		if err != nil {
			return beam.PCollection{}, err
		}
		keys := beam.ParDo(s, &keysFn{Settings: settings}, docs)
		counts := beam.CombinePerKey(s, addKeyCounts, keys)
		return beam.ParDo(s, &vocabSpecFn{Settings: shardSettings, Cutoffs: st.Cutoffs, Out: out}, fin,
			beam.SideInput{Input: ndocs}, beam.SideInput{Input: labels}, beam.SideInput{Input: counts}), nil
	}
	// Bucket document counts are needed only for idf.
	off := st.IDF == weight.IDFNone
	buckets := beam.CombinePerKey(s, addInt64, beam.ParDo(s, &bucketsFn{Settings: settings, Off: off}, docs))
	return beam.ParDo(s, &hashSpecFn{Settings: settings, Out: out}, fin,
		beam.SideInput{Input: ndocs}, beam.SideInput{Input: labels}, beam.SideInput{Input: buckets}), nil
}

// analyzer rebuilds the analysis chain from spec content sent as JSON.
func analyzer(settings []byte) (*spec.Content, *analysis.Analyzer, error) {
	var c spec.Content
	if err := json.Unmarshal(settings, &c); err != nil {
		return nil, nil, fmt.Errorf("bowline settings: %v", err)
	}
	a, err := analysis.New(&c)
	if err != nil {
		return nil, nil, err
	}
	return &c, a.NewAnalyzer(), nil
}

// maxBundleKeys bounds the distinct keys (or buckets) a counting DoFn
// holds before it emits its partial counts.
var maxBundleKeys = 1 << 20

// keysFn counts the feature keys of the documents of one bundle and emits
// each key's partial count (occurrences, documents) at the end of the
// bundle, or earlier when the bundle's keys pass maxBundleKeys: the
// per-bundle half of the counting combine.
type keysFn struct {
	Settings []byte // spec content without learned numbers, as JSON

	z      *analysis.Analyzer
	counts *vocab.Counts
}

func (f *keysFn) Setup() error {
	_, z, err := analyzer(f.Settings)
	f.z = z
	return err
}

func (f *keysFn) StartBundle(ctx context.Context, emit func(string, KeyCount)) {
	f.counts = vocab.NewCounts()
}

func (f *keysFn) ProcessElement(ctx context.Context, d Doc, emit func(string, KeyCount)) error {
	f.z.Analyze(d.Text, func(key []byte, o ngram.Order) { f.counts.Add(key, int(o)) })
	f.counts.EndDoc()
	if f.counts.Len() >= maxBundleKeys {
		f.flush(emit)
	}
	return nil
}

func (f *keysFn) FinishBundle(ctx context.Context, emit func(string, KeyCount)) {
	f.flush(emit)
}

func (f *keysFn) flush(emit func(string, KeyCount)) {
	f.counts.Each(func(key string, order int, count, docs int64) {
		emit(key, KeyCount{Order: order, Count: count, Docs: docs})
	})
	f.counts = vocab.NewCounts()
}

// bucketsFn counts, over the documents of one bundle, the documents whose
// keys fall into each hashing bucket, and emits the partial counts at the
// end of the bundle (or past maxBundleKeys buckets).
type bucketsFn struct {
	Settings []byte
	Off      bool // emit nothing (no idf to learn)

	z       *analysis.Analyzer
	h       *hashing.Hasher
	width   uint64
	touched map[uint64]struct{}
	df      map[uint64]int64
}

func (f *bucketsFn) Setup() error {
	c, z, err := analyzer(f.Settings)
	if err != nil {
		return err
	}
	if c.Hashing == nil {
		return errors.New("bowline settings: not in hashing mode")
	}
	f.z, f.width, f.touched, f.df = z, c.Hashing.Width, map[uint64]struct{}{}, map[uint64]int64{}
	f.h, err = hashing.New(c.Hashing.Width, c.Hashing.Seed, c.Hashing.Signed)
	return err
}

func (f *bucketsFn) ProcessElement(ctx context.Context, d Doc, emit func(uint64, int64)) error {
	if f.Off {
		return nil
	}
	f.z.Analyze(d.Text, func(key []byte, _ ngram.Order) {
		f.touched[hashing.BucketOf(f.h.Sum(key), f.width)] = struct{}{}
	})
	for b := range f.touched {
		f.df[b]++
	}
	clear(f.touched)
	if len(f.df) >= maxBundleKeys {
		f.FinishBundle(ctx, emit)
	}
	return nil
}

func (f *bucketsFn) FinishBundle(ctx context.Context, emit func(uint64, int64)) {
	for b, n := range f.df {
		emit(b, n)
	}
	clear(f.df)
}

// labelFn emits each record's label; a labelled corpus must have no empty
// label, as in bowline learn.
type labelFn struct {
	HasLabel bool
	Files    []string
}

func (f *labelFn) ProcessElement(d Doc, emit func(string)) error {
	if !f.HasLabel {
		return nil
	}
	if len(d.Label) == 0 {
		return fmt.Errorf("%s:%d: the label field is empty", f.Files[d.File], d.Line)
	}
	emit(string(d.Label))
	return nil
}

// labelsOf turns label tallies into the spec's labels, as bowline learn
// does: values sorted by bytes, with their document counts.
func labelsOf(hasLabel bool, iter func(*string, *int) bool) spec.Labels {
	tally := map[string]int64{}
	var v string
	var n int
	for iter(&v, &n) {
		tally[v] += int64(n)
	}
	values := make([]string, 0, len(tally))
	for k := range tally {
		values = append(values, k)
	}
	sort.Strings(values)
	lab := learn.LabelsFrom(values, hasLabel)
	if hasLabel {
		lab.Values = values
		for _, k := range values {
			lab.Counts = append(lab.Counts, tally[k])
		}
	}
	return lab
}

// vocabSpecFn is the single-worker step of a vocabulary-mode learn: it
// gathers the combined key counts into a count shard (package vocab's
// documented format), applies the cutoffs with learn.Shard.Learn and
// writes the spec.
type vocabSpecFn struct {
	Settings []byte // shard settings (learn.Shard.Settings) as JSON
	Cutoffs  vocab.Cutoffs
	Out      string
}

func (f *vocabSpecFn) ProcessElement(ctx context.Context, _ []byte, ndocs int, labels func(*string, *int) bool, keys func(*string, *KeyCount) bool, emit func(string)) error {
	var c spec.Content
	if err := json.Unmarshal(f.Settings, &c); err != nil {
		return fmt.Errorf("bowline settings: %v", err)
	}
	if ndocs == 0 {
		return errors.New("no records to learn from")
	}
	type entry struct {
		key string
		kc  KeyCount
	}
	var all []entry
	var k string
	var kc KeyCount
	for keys(&k, &kc) {
		all = append(all, entry{k, kc})
	}
	sort.Slice(all, func(i, j int) bool { return all[i].key < all[j].key })
	lab := labelsOf(c.Input.Label != "", labels)

	// The merged counts travel to vocab.Counts through a count shard,
	// the format made for counts from other programs.
	var buf bytes.Buffer
	zw, _ := gzip.NewWriterLevel(&buf, gzip.BestSpeed)
	bw := bufio.NewWriter(zw)
	head, err := json.Marshal(vocab.ShardHeader{Format: vocab.ShardFormat, Version: vocab.ShardVersion,
		Tool: "bowline-beam " + spec.ToolVersion, Settings: f.Settings, Docs: int64(ndocs), Keys: int64(len(all)),
		LabelValues: lab.Values, LabelCounts: lab.Counts})
	if err != nil {
		return err
	}
	bw.Write(head)
	bw.WriteByte('\n')
	var line []byte
	for _, e := range all {
		q, _ := json.Marshal(e.key)
		line = append(line[:0], '[')
		line = append(line, q...)
		line = append(line, ',')
		line = strconv.AppendInt(line, int64(e.kc.Order), 10)
		line = append(line, ',')
		line = strconv.AppendInt(line, e.kc.Count, 10)
		line = append(line, ',')
		line = strconv.AppendInt(line, e.kc.Docs, 10)
		line = append(line, "]\n"...)
		bw.Write(line)
	}
	fmt.Fprintf(bw, "{\"end\":%d}\n", len(all))
	if err := bw.Flush(); err != nil {
		return err
	}
	if err := zw.Close(); err != nil {
		return err
	}
	counts := vocab.NewCounts()
	if _, err := vocab.ReadShard(&buf, "merged counts", counts); err != nil {
		return err
	}
	sh := &learn.Shard{Settings: c, Counts: counts, Labels: spec.Labels{Values: lab.Values, Counts: lab.Counts}}
	sp, _, err := sh.Learn(f.Cutoffs)
	if err != nil {
		return err
	}
	if err := saveSpec(ctx, sp, f.Out); err != nil {
		return err
	}
	emit(sp.Fingerprint)
	return nil
}

// hashSpecFn is the single-worker step of a hashing-mode learn: the
// document count, the labels and, with idf, each bucket's documents make
// the spec, as learn.Learner.Finish makes it.
type hashSpecFn struct {
	Settings []byte // spec content without learned numbers, as JSON
	Out      string
}

func (f *hashSpecFn) ProcessElement(ctx context.Context, _ []byte, ndocs int, labels func(*string, *int) bool, buckets func(*uint64, *int64) bool, emit func(string)) error {
	var c spec.Content
	if err := json.Unmarshal(f.Settings, &c); err != nil {
		return fmt.Errorf("bowline settings: %v", err)
	}
	if ndocs == 0 {
		return errors.New("no records to learn from")
	}
	c.Docs = int64(ndocs)
	c.Labels = labelsOf(c.Input.Label != "", labels)
	idf := c.Weights.IDF
	if idf != weight.IDFNone {
		df := map[uint64]int64{}
		var b uint64
		var n int64
		for buckets(&b, &n) {
			df[b] += n
		}
		list := make([]uint64, 0, len(df))
		for b := range df {
			list = append(list, b)
		}
		sort.Slice(list, func(i, j int) bool { return list[i] < list[j] })
		c.Weights.IDFBuckets = list
		c.Weights.IDFBucketValues = make([]float64, len(list))
		for i, b := range list {
			c.Weights.IDFBucketValues[i] = idf.Value(c.Docs, df[b])
		}
		c.Weights.IDFDefault = idf.Value(c.Docs, 0)
	}
	sp := &spec.Spec{Content: c}
	if err := sp.Seal(); err != nil {
		return err
	}
	if err := sp.Validate(); err != nil {
		return err
	}
	if err := saveSpec(ctx, sp, f.Out); err != nil {
		return err
	}
	emit(sp.Fingerprint)
	return nil
}

// saveSpec writes the spec to path: atomically through spec.Save on a
// local path, else through the Beam file system under a temporary name
// renamed into place.
func saveSpec(ctx context.Context, sp *spec.Spec, path string) error {
	if !strings.Contains(path, "://") {
		return sp.Save(path)
	}
	return writeFile(ctx, path, func(w io.Writer) error {
		if strings.HasSuffix(path, ".gz") {
			zw, _ := gzip.NewWriterLevel(w, gzip.BestCompression)
			if err := sp.Write(zw); err != nil {
				return err
			}
			return zw.Close()
		}
		return sp.Write(w)
	})
}

// writeFile writes path on its Beam file system under a temporary name and
// renames it into place once complete.
func writeFile(ctx context.Context, path string, fill func(io.Writer) error) error {
	fs, err := filesystem.New(ctx, path)
	if err != nil {
		return err
	}
	defer fs.Close()
	tmp := fmt.Sprintf("%s.tmp-%d", path, uniq())
	w, err := fs.OpenWrite(ctx, tmp)
	if err != nil {
		return err
	}
	bw := bufio.NewWriterSize(w, 256<<10)
	err = fill(bw)
	if err == nil {
		err = bw.Flush()
	}
	if cerr := w.Close(); err == nil {
		err = cerr
	}
	if err == nil {
		err = filesystem.Rename(ctx, fs, tmp, path)
	}
	if err != nil {
		if rm, ok := fs.(filesystem.Remover); ok {
			rm.Remove(ctx, tmp)
		}
		return fmt.Errorf("writing %s: %w", path, err)
	}
	return nil
}
