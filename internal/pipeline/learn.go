package pipeline

import (
	"errors"
	"fmt"
	"sort"
	"sync"
	"time"

	"github.com/bowline/bowline/corpus"
	"github.com/bowline/bowline/internal/analysis"
	"github.com/bowline/bowline/internal/learn"
	"github.com/bowline/bowline/ngram"
	"github.com/bowline/bowline/report"
	"github.com/bowline/bowline/spec"
	"github.com/bowline/bowline/vocab"
)

// LearnOptions control a learn run.
type LearnOptions struct {
	// Workers is the number of counting goroutines (0 = all cores).
	Workers int
	// Name is the corpus name used in figures and errors.
	Name string
	// Progress, when not nil, is called with the bytes read so far.
	Progress func(bytesRead int64)
	// TopTerms is how many top terms the figures list.
	TopTerms int
	// Rejects, when not nil, takes records that cannot be read or have an
	// empty label, instead of ending the run (--on-error skip).
	Rejects *Rejects
}

// maxLabels bounds the distinct label values a training corpus may have.
const maxLabels = 100000

// Learn counts every record of r with l and returns the sealed spec and the
// run's figures.
//
// When l has a key limit (learn.Learner.LimitKeys), each batch of records is
// counted exactly by one worker and the batches' counts are merged into the
// bounded counts in input order, so the pruning, and the spec, are the
// same for any worker count.
func Learn(r *corpus.Reader, l *learn.Learner, o LearnOptions) (*spec.Spec, *report.Figures, error) {
	s, _, fig, err := learnCorpus(r, l, o, false)
	return s, fig, err
}

// Count counts every record of r with l like Learn but applies no cutoff:
// it returns the exact counts as a shard (see learn.Shard), with the run's
// figures (no vocabulary figures). l must have no key limit.
func Count(r *corpus.Reader, l *learn.Learner, o LearnOptions) (*learn.Shard, *report.Figures, error) {
	if l.KeyLimit() > 0 {
		return nil, nil, errors.New("count shards hold exact counts; a key limit would prune them")
	}
	_, sh, fig, err := learnCorpus(r, l, o, true)
	return sh, fig, err
}

// part is one batch's counts waiting to be merged in order.
type part struct {
	w *learn.Worker
	b *batch
}

func learnCorpus(r *corpus.Reader, l *learn.Learner, o LearnOptions, shard bool) (*spec.Spec, *learn.Shard, *report.Figures, error) {
	start := time.Now()
	nw := workerCount(o.Workers)
	bounded := l.KeyLimit() > 0
	nb := nw * 3
	if bounded {
		nb = nw + 1 // fewer batches in flight under a memory limit
	}
	c := l.Content()
	ntext, ntable := len(c.Input.Text), len(c.Fields)
	hasLabel := c.Input.Label != ""
	labelCount := map[string]int64{}
	var labelErr error

	br := &batchReader{r: r, nfield: ntext + ntable, rj: o.Rejects, onRecord: func(rec *corpus.Record) error {
		if o.Progress != nil {
			o.Progress(r.BytesRead())
		}
		if hasLabel && len(rec.Label) == 0 {
			return &RecordError{File: o.Name, Line: rec.Line, Err: fmt.Errorf("label field %q is empty", c.Input.Label)}
		}
		if err := observeFields(o.Name, rec, ntable, l.ObserveFields); err != nil {
			return err
		}
		if !hasLabel {
			return nil
		}
		if n, ok := labelCount[string(rec.Label)]; ok || len(labelCount) < maxLabels {
			labelCount[string(rec.Label)] = n + 1
		} else {
			return fmt.Errorf("%s:%d: more than %d distinct labels in field %q; is it really a label?", o.Name, rec.Line, maxLabels, c.Input.Label)
		}
		return nil
	}}
	p := newPool(br, nb)

	workers := make([]*learn.Worker, nw)
	var docs, empty, inBytes, emitted int64
	var mu sync.Mutex

	// With a key limit, batches' counts meet in input order.
	var total *learn.Worker
	parts := make(chan part, nw)
	mergeDone := make(chan struct{})
	if bounded {
		total = l.NewTotal()
		go func() {
			defer close(mergeDone)
			pending := map[int]part{}
			next := 0
			for pt := range parts {
				pending[pt.b.seq] = pt
				for q, ok := pending[next]; ok; q, ok = pending[next] {
					delete(pending, next)
					total.Merge(q.w)
					p.release(q.b)
					next++
				}
			}
		}()
	} else {
		close(mergeDone)
	}
	for i := range workers {
		workers[i] = l.NewWorker()
	}
	p.run(nw, func(i int, b *batch) {
		w := workers[i]
		var e, n int64
		for _, texts := range b.texts {
			k := w.Observe(texts[:ntext])
			if k == 0 {
				e++
			}
			n += int64(k)
		}
		mu.Lock()
		docs += int64(len(b.lines))
		empty += e
		inBytes += b.bytes
		emitted += n
		mu.Unlock()
		if bounded {
			parts <- part{w.Detach(), b}
		} else {
			p.release(b)
		}
	})
	close(parts)
	<-mergeDone
	if err := p.err(); err != nil {
		return nil, nil, nil, err
	}
	if labelErr != nil {
		return nil, nil, nil, labelErr
	}
	if docs == 0 {
		return nil, nil, nil, fmt.Errorf("%s: %w", o.Name, ErrNoRecords)
	}
	merged := total
	if !bounded {
		merged = workers[0]
		for _, w := range workers[1:] {
			merged.Merge(w)
		}
	}
	labels := make([]string, 0, len(labelCount))
	for k := range labelCount {
		labels = append(labels, k)
	}
	sort.Strings(labels)
	lab := learn.LabelsFrom(labels, hasLabel)
	if hasLabel {
		lab.Values = labels
		for _, k := range labels {
			lab.Counts = append(lab.Counts, labelCount[k])
		}
	}
	var s *spec.Spec
	var sh *learn.Shard
	var cut vocab.CutReport
	var err error
	if shard {
		sh, err = l.Shard(merged, lab)
	} else {
		s, cut, err = l.Finish(merged, lab)
	}
	if err != nil {
		return nil, nil, nil, err
	}
	elapsed := time.Since(start).Seconds()

	var as analysis.Stats
	var dropped []countPair
	for _, w := range workers {
		st := w.Analyzer().Stats()
		as.Tokenizer.Add(st.Tokenizer)
		as.StopDropped += st.StopDropped
		if f := w.Analyzer().Filter(); f != nil {
			for _, d := range f.Dropped() {
				dropped = append(dropped, countPair{d.Word, d.Count})
			}
		}
	}
	fig := &report.Figures{Command: "learn", Input: o.Name, Mode: string(c.Mode), Docs: docs, EmptyDocs: empty}
	if o.Rejects != nil {
		fig.Rejected = o.Rejects.N
	}
	fillTokenFigures(fig, as, dropped, nil)
	// Every feature key the analysers emitted, in either mode.
	fig.Features = emitted
	if s != nil {
		fig.Spec = s.Fingerprint
		if s.Content.Mode == spec.ModeVocabulary {
			fig.Vocabulary = vocabFigures(s, cut, o.TopTerms)
			fig.Curves = Curves(s)
		}
	}
	if t := merged.Tally(); t != nil {
		fig.Collisions = collisionFigures(t, s.Content.Hashing.Width)
	}
	for _, k := range labels {
		fig.Labels = append(fig.Labels, report.Count{Name: k, Count: labelCount[k]})
	}
	if s != nil {
		fig.Fields = FieldFigures(&s.Content, l.FieldStats())
	}
	fig.Throughput = throughput(maxInt64(r.BytesRead(), inBytes), docs, elapsed, nw)
	return s, sh, fig, nil
}

func maxInt64(a, b int64) int64 {
	if a > b {
		return a
	}
	return b
}

func vocabFigures(s *spec.Spec, cut vocab.CutReport, top int) *report.VocabFigures {
	v := s.Content.Vocabulary
	vf := &report.VocabFigures{Seen: int64(cut.Seen), Kept: int64(len(v.Keys)), BelowMinDocs: int64(cut.BelowMinDocs),
		AboveMaxShare: int64(cut.AboveMaxShare), OverMaxTerms: int64(cut.OverMaxTerms)}
	per := map[int]int64{}
	for _, o := range v.Orders {
		per[o]++
	}
	codes := make([]int, 0, len(per))
	for k := range per {
		codes = append(codes, k)
	}
	sort.Ints(codes)
	for _, k := range codes {
		vf.ByOrder = append(vf.ByOrder, report.Count{Name: ngram.Order(k).String(), Count: per[k]})
	}
	if top == 0 {
		top = 10
	}
	// Columns are in document-count order, except after --extend, where
	// the parent's columns come first: rank them again.
	idx := make([]int, len(v.Keys))
	for i := range idx {
		idx[i] = i
	}
	sort.SliceStable(idx, func(a, b int) bool {
		da, db := v.DocCounts[idx[a]], v.DocCounts[idx[b]]
		if da != db {
			return da > db
		}
		return v.Keys[idx[a]] < v.Keys[idx[b]]
	})
	for _, i := range idx[:min(top, len(idx))] {
		vf.TopTerms = append(vf.TopTerms, report.Count{Name: v.Keys[i], Count: v.DocCounts[i]})
	}
	return vf
}

// Memory model of a learn run under a memory limit (see KeyCapacity).
const (
	// NonHeapBytes is what a learn run holds before counting: program
	// text and data touched, goroutine stacks, runtime structures (the
	// resident set of bowline at start, rounded up).
	NonHeapBytes = 15 << 20
	// baseHeapBytes is the heap a run needs besides workers and keys: the
	// reader's buffers, label tallies, the figures.
	baseHeapBytes = 2 << 20
	// workerHeapBytes is the heap one worker adds under a key limit: a
	// batch being read and one being counted (up to batchBytes of text
	// each, with their record slices), that batch's exact counts and one
	// waiting to be merged, the analyzer's buffers.
	workerHeapBytes = 2*batchBytes + 5<<20
	// keyHeapBytes is the heap one counted key costs over the whole run:
	// its table entry in the bounded counts (vocab.BoundedKeyBytes plus
	// about 24 bytes of key text, common practice for word n-grams) and,
	// when learn finishes, its column in the vocabulary, the spec and the
	// spec's JSON.
	keyHeapBytes = vocab.BoundedKeyBytes + 24 + finishKeyBytes
	// finishKeyBytes is the heap one kept key costs while learn finishes
	// (TestMemoryLimitRSS checks it with a corpus of one-off keys).
	finishKeyBytes = 200
)

// reservedWorkers is how many workers' memory KeyCapacity sets aside at
// most, whatever the machine, so that the capacity depends on the limit
// alone.
const reservedWorkers = 8

// KeyCapacity turns a memory limit in bytes into the number of distinct
// keys the bounded counts may hold, and the number of workers (at most
// workers) that fit beside them. The capacity depends on the limit alone,
// never on the worker count or the machine, so a learn under a given limit
// writes the same spec everywhere. A sixteenth of the limit is left for
// the garbage collector's lag, NonHeapBytes for what lies outside the Go
// heap, and up to half of the rest (at most reservedWorkers workers) for
// the workers. The capacity is below vocab.MinCapacity when the limit is
// too small to count anything.
func KeyCapacity(limit int64, workers int) (capacity, nworkers int) {
	heap := limit - limit/16 - NonHeapBytes - baseHeapBytes
	reserve := min(heap/2, reservedWorkers*workerHeapBytes)
	keys := (heap - reserve) / keyHeapBytes
	keys = max(0, min(keys, 1<<31-1))
	nw := min(workerCount(workers), max(1, int(reserve/workerHeapBytes)))
	return int(keys), nw
}
