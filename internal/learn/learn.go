// Package learn fits a spec on a training corpus: counts, cutoffs and learned weights, index-stable refreshes, and count shards merged into one spec.
package learn

import (
	"fmt"
	"sort"
	"strconv"
	"strings"

	"github.com/bowline/bowline/hashing"
	"github.com/bowline/bowline/internal/analysis"
	"github.com/bowline/bowline/internal/tablefield"
	"github.com/bowline/bowline/ngram"
	"github.com/bowline/bowline/spec"
	"github.com/bowline/bowline/stopwords"
	"github.com/bowline/bowline/tokenize"
	"github.com/bowline/bowline/vocab"
	"github.com/bowline/bowline/weight"
)

// Settings are the choices a user makes before learning: everything in a
// spec except the numbers learned from the corpus.
type Settings struct {
	Input  spec.Input
	Tokens tokenize.Options
	// StopSources are the --stop arguments; StopWords the words they
	// contributed, before normalization.
	StopSources   []string
	StopWords     []string
	KeepNegations bool
	// Stem is a stemming language code, or "" / "none".
	Stem    string
	NGrams  ngram.Config
	Mode    spec.Mode
	Cutoffs vocab.Cutoffs
	Unseen  vocab.Unseen
	Hashing spec.Hashing
	TF      weight.TF
	IDF     weight.IDF
	Norm    weight.Norm
	// Fields are the table fields read beside the text, with their
	// settings only (see the tablefield package's ParseCategory,
	// ParseNumber and ParseTime).
	Fields []spec.TableField
}

// Content returns the spec content the settings describe, without learned
// numbers: the normalized stop list is computed here.
func (s *Settings) Content() (spec.Content, error) {
	c := spec.Content{
		Input:   s.Input,
		Tokens:  spec.TokensFrom(s.Tokens),
		Stem:    "none",
		NGrams:  spec.NGrams{Words: s.NGrams.Words.String(), Chars: s.NGrams.Chars.String()},
		Mode:    s.Mode,
		Weights: spec.Weights{TF: s.TF, IDF: s.IDF, Norm: s.Norm},
		Fields:  spec.CloneFields(s.Fields),
	}
	if s.Stem != "" && s.Stem != "none" {
		st, err := tokenize.NewStemmer(s.Stem)
		if err != nil {
			return c, err
		}
		c.Stem = st.Language()
	}
	if len(s.StopWords) > 0 {
		tok, err := tokenize.New(s.Tokens)
		if err != nil {
			return c, err
		}
		set := stopwords.NewSet(s.StopWords, tok.AppendNormalized, s.KeepNegations)
		c.Stop = spec.Stop{Sources: s.StopSources, KeepNegations: s.KeepNegations, Words: set.Words()}
	} else {
		c.Stop = spec.Stop{Sources: s.StopSources, KeepNegations: s.KeepNegations}
	}
	switch s.Mode {
	case spec.ModeVocabulary:
		if err := s.Cutoffs.Validate(); err != nil {
			return c, err
		}
		c.Vocabulary = &spec.Vocabulary{MinDocs: s.Cutoffs.MinDocs, MaxDocShare: s.Cutoffs.MaxDocShare,
			MaxTerms: s.Cutoffs.MaxTerms, Unseen: s.Unseen}
	case spec.ModeHashing:
		h := s.Hashing
		if _, err := hashing.New(h.Width, h.Seed, h.Signed); err != nil {
			return c, err
		}
		c.Hashing = &h
	default:
		return c, fmt.Errorf("unknown mode %q", s.Mode)
	}
	if err := c.ValidateFields(); err != nil {
		return c, err
	}
	return c, nil
}

// Learner fits a spec on a training corpus. Each goroutine observes
// documents through its own Worker; the workers are merged at the end.
type Learner struct {
	content  spec.Content
	analysis *analysis.Chain
	idf      weight.IDF
	cutoffs  vocab.Cutoffs
	capacity int        // most distinct keys counted at once (0: no limit)
	parent   *spec.Spec // the spec being extended (see NewExtend)
	ext      *Extension // filled by Finish when extending
	fields   *tablefield.Learner
	// extCut is what the cutoffs removed from the new corpus's keys
	// when extending a parent spec.
	extCut vocab.CutReport
}

// New prepares learning with the given settings.
func New(s *Settings) (*Learner, error) {
	c, err := s.Content()
	if err != nil {
		return nil, err
	}
	a, err := analysis.New(&c)
	if err != nil {
		return nil, err
	}
	l := &Learner{content: c, analysis: a, idf: s.IDF, cutoffs: s.Cutoffs}
	if len(c.Fields) > 0 {
		if l.fields, err = tablefield.NewLearner(c.Fields, c.Mode, a.TokenOptions()); err != nil {
			return nil, err
		}
	}
	return l, nil
}

// ObserveFields takes the table-field values of one training record (one
// per Content.Fields field, nil or empty for missing; a nil slice for all
// missing). Call it once for every record observed, from one goroutine,
// in input order: the statistics are summed in that order, so the spec
// does not depend on the worker count. A value that cannot be read is a
// *tablefield.ValueError, and nothing of the record is counted then.
func (l *Learner) ObserveFields(values [][]byte) error {
	if l.fields == nil {
		if values == nil {
			return nil
		}
		return fmt.Errorf("%d table field values, but the spec has no table fields", len(values))
	}
	return l.fields.Observe(values)
}

// FieldStats returns the training figures of the table fields observed so
// far, one per field.
func (l *Learner) FieldStats() []tablefield.Stat {
	if l.fields == nil {
		return nil
	}
	var minDocs int64
	if l.content.Vocabulary != nil {
		minDocs = l.content.Vocabulary.MinDocs
	}
	return l.fields.Stats(minDocs)
}

// Content is the content being learned (settings only until Finish).
func (l *Learner) Content() *spec.Content { return &l.content }

// LimitKeys bounds the distinct keys the merged counts hold at once (a
// memory limit): past it, the keys with the lowest document counts are
// pruned with the Space-Saving algorithm (see vocab.NewBoundedCounts) and
// the spec records what was pruned in Vocabulary.Seen.Pruning. It applies
// to the counts made by NewTotal; only vocabulary mode counts keys.
func (l *Learner) LimitKeys(capacity int) error {
	if l.content.Mode != spec.ModeVocabulary {
		return fmt.Errorf("a key limit applies to vocabulary mode only; hashing mode keeps no per-key counts")
	}
	if capacity < vocab.MinCapacity {
		return fmt.Errorf("a key limit of %d is below %d", capacity, vocab.MinCapacity)
	}
	l.capacity = capacity
	return nil
}

// KeyLimit is the limit set by LimitKeys (0: none).
func (l *Learner) KeyLimit() int { return l.capacity }

// NewTotal returns an empty worker to merge other workers into: it has no
// analyzer, and its counts are bounded when LimitKeys was called.
func (l *Learner) NewTotal() *Worker {
	w := l.NewWorker()
	if l.capacity > 0 {
		w.counts = vocab.NewBoundedCounts(l.capacity)
	}
	return w
}

// Detach returns a worker that holds what w has counted so far (counts
// and documents, no analyzer) and leaves w with fresh, empty counts, so
// that one goroutine's counts can be merged batch by batch, in order.
// Vocabulary mode only.
func (w *Worker) Detach() *Worker {
	d := &Worker{l: w.l, counts: w.counts, docs: w.docs}
	w.counts = vocab.NewCounts()
	w.docs = 0
	return d
}

// Docs is the number of documents the worker has counted.
func (w *Worker) Docs() int64 { return w.docs }

// Worker counts the documents one goroutine sees.
type Worker struct {
	l      *Learner
	z      *analysis.Analyzer
	counts *vocab.Counts
	// ids counts word unigrams and bigrams by word ids (vocabulary mode
	// without a key limit); settle moves them into counts.
	ids     *vocab.IDCounts
	wordsFn func(int, []byte, [][]byte, int)
	charsFn func([]byte, ngram.Order)
	emitted int     // keys of the document being observed
	idbuf   []int32 // word ids of a chunk's tokens
	key     []byte  // a key of three or more words
	h       *hashing.Hasher
	tally   *hashing.Tally
	// bucket document frequencies (hashing mode with idf)
	bdf     map[uint64]int64
	touched map[uint64]struct{}
	docs    int64
	// One is made per worker, next to the others: the padding keeps the
	// fields it writes for every token off their cache lines.
	_ [64]byte
}

// NewWorker returns a worker for one goroutine.
func (l *Learner) NewWorker() *Worker {
	w := &Worker{l: l, z: l.analysis.NewAnalyzer()}
	if l.content.Mode == spec.ModeVocabulary {
		w.counts = vocab.NewCounts()
		p := l.analysis.Prefixes()
		if l.capacity == 0 && l.analysis.Words().On() && len(p) <= vocab.MaxIDFields {
			w.ids = vocab.NewIDCounts(p)
			w.wordsFn, w.charsFn = w.countWords, w.countKey
		}
	} else {
		h := l.content.Hashing
		w.h, _ = hashing.New(h.Width, h.Seed, h.Signed)
		w.tally = hashing.NewTally()
		if l.idf != weight.IDFNone {
			w.bdf = map[uint64]int64{}
			w.touched = map[uint64]struct{}{}
		}
	}
	return w
}

// Analyzer returns the worker's analyzer (for its token figures).
func (w *Worker) Analyzer() *analysis.Analyzer { return w.z }

// Observe counts one training document; it returns the number of feature
// keys the document produced.
func (w *Worker) Observe(texts [][]byte) int {
	n := 0
	w.docs++
	if w.ids != nil {
		w.emitted = 0
		w.z.AnalyzeTokens(texts, w.wordsFn, w.charsFn)
		w.counts.EndDoc()
		w.ids.EndDoc()
		return w.emitted
	}
	if w.counts != nil {
		w.z.Analyze(texts, func(key []byte, code ngram.Order) {
			n++
			w.counts.Add(key, int(code))
		})
		w.counts.EndDoc()
		return n
	}
	width := w.l.content.Hashing.Width
	w.z.Analyze(texts, func(key []byte, _ ngram.Order) {
		n++
		sum := w.h.Sum(key)
		w.tally.Add(sum)
		if w.touched != nil {
			w.touched[hashing.BucketOf(sum, width)] = struct{}{}
		}
	})
	for b := range w.touched {
		w.bdf[b]++
		delete(w.touched, b)
	}
	return n
}

// countWords counts the word n-grams of a chunk of tokens (see
// Analyzer.AnalyzeTokens): unigrams and bigrams by word ids, longer ones
// and those of words without an id by bytes.
func (w *Worker) countWords(field int, prefix []byte, tokens [][]byte, from int) {
	ids := w.idbuf[:0]
	for _, t := range tokens {
		ids = append(ids, w.ids.Word(t))
	}
	w.idbuf = ids
	r := w.l.analysis.Words()
	for n := r.Min; n <= r.Max && n <= len(tokens); n++ {
		for i := max(0, from-n+1); i+n <= len(tokens); i++ {
			w.emitted++
			switch {
			case n == 1 && ids[i] >= 0:
				w.ids.Add(field, ids[i], -1)
				continue
			case n == 2 && ids[i] >= 0 && ids[i+1] >= 0:
				w.ids.Add(field, ids[i], ids[i+1])
				continue
			}
			k := ngram.WordKey(&w.key, prefix, tokens[i:i+n])
			w.counts.Add(k, n)
		}
	}
}

// countKey counts a key by its bytes.
func (w *Worker) countKey(key []byte, code ngram.Order) {
	w.emitted++
	w.counts.Add(key, int(code))
}

// settle moves the keys counted by word ids into the counts.
func (w *Worker) settle() {
	if w.ids != nil && w.ids.Len() > 0 {
		w.ids.AddTo(w.counts)
	}
}

// Merge adds o's counts to w's.
func (w *Worker) Merge(o *Worker) {
	w.docs += o.docs
	if w.counts != nil {
		if w.ids != nil && o.ids != nil {
			w.ids.Merge(o.ids, w.counts)
		} else {
			w.settle()
			o.settle()
		}
		w.counts.Merge(o.counts)
		return
	}
	w.tally.Merge(o.tally)
	for b, n := range o.bdf {
		w.bdf[b] += n
	}
}

// Tally is the hashing-mode collision account (nil in vocabulary mode).
func (w *Worker) Tally() *hashing.Tally { return w.tally }

// Counts are the vocabulary-mode counts (nil in hashing mode).
func (w *Worker) Counts() *vocab.Counts {
	w.settle()
	return w.counts
}

// Finish turns the merged counts of w into a sealed spec; labels are the
// distinct training label values.
func (l *Learner) Finish(w *Worker, labels spec.Labels) (*spec.Spec, vocab.CutReport, error) {
	c := l.content
	c.Docs = w.docs
	c.Labels = labels
	if l.fields != nil {
		if l.fields.Docs() != w.docs {
			return nil, vocab.CutReport{}, fmt.Errorf("table fields were observed for %d records, the text for %d (call ObserveFields once per record)", l.fields.Docs(), w.docs)
		}
		var minDocs int64
		if c.Vocabulary != nil {
			minDocs = c.Vocabulary.MinDocs
		}
		c.Fields = l.fields.Finish(c.Mode, minDocs)
	}
	var rep vocab.CutReport
	if c.Mode == spec.ModeVocabulary {
		// Under a key limit the cutoffs apply to the documents each kept
		// key really counted (vocab.Counts.Settle).
		w.settle()
		w.counts.Settle()
		vv := *c.Vocabulary
		if l.parent != nil {
			if err := l.extend(&vv, w.counts); err != nil {
				return nil, rep, err
			}
			lab, err := extendLabels(l.parent.Content.Labels, labels)
			if err != nil {
				return nil, rep, err
			}
			c.Labels = lab
			if n := len(l.parent.Content.Labels.Map); len(lab.Map) > n {
				l.ext.NewLabels = lab.Map[n:]
			}
			// What the cutoffs removed from the new corpus's keys (some
			// of them stay as retired parent columns); Kept counts every
			// column, the parent's included.
			rep = vocab.CutReport{Seen: w.counts.Len(), Kept: len(vv.Keys), BelowMinDocs: l.extCut.BelowMinDocs,
				AboveMaxShare: l.extCut.AboveMaxShare, OverMaxTerms: l.ext.OverMaxTerms}
		} else {
			v, r := w.counts.Build(l.cutoffs)
			rep = r
			vv.Keys = make([]string, len(v.Terms))
			vv.Orders = make([]int, len(v.Terms))
			vv.DocCounts = make([]int64, len(v.Terms))
			for i, t := range v.Terms {
				vv.Keys[i], vv.Orders[i], vv.DocCounts[i] = t.Key, t.Order, t.Docs
			}
		}
		vv.Seen = seenFrom(w.counts)
		c.Vocabulary = &vv
		if l.idf != weight.IDFNone {
			c.Weights.IDFValues = weight.IDFTable(l.idf, c.Docs, vv.DocCounts)
		}
	} else if l.idf != weight.IDFNone {
		buckets := make([]uint64, 0, len(w.bdf))
		for b := range w.bdf {
			buckets = append(buckets, b)
		}
		sort.Slice(buckets, func(i, j int) bool { return buckets[i] < buckets[j] })
		c.Weights.IDFBuckets = buckets
		c.Weights.IDFBucketValues = make([]float64, len(buckets))
		for i, b := range buckets {
			c.Weights.IDFBucketValues[i] = l.idf.Value(c.Docs, w.bdf[b])
		}
		c.Weights.IDFDefault = l.idf.Value(c.Docs, 0)
	}
	s := &spec.Spec{Content: c}
	if l.parent != nil {
		s.Parent = l.parent.Fingerprint
	}
	// Sealing (the canonical encoding and its hash) and validating read
	// the content only: they run at once.
	verr := make(chan error, 1)
	go func() { verr <- s.Validate() }()
	serr := s.Seal()
	if err := <-verr; err != nil {
		return nil, rep, err
	}
	if serr != nil {
		return nil, rep, serr
	}
	return s, rep, nil
}

// seenFrom summarizes every counted key for the spec.
func seenFrom(c *vocab.Counts) *spec.Seen {
	sn := &spec.Seen{Keys: int64(c.Len()), DocHistogram: c.DocHistogram(), TopDocCounts: c.TopDocCounts(spec.TopDocCountsKept)}
	sn.Orders, sn.OrderKeys = c.OrderKeys()
	if sn.Orders == nil {
		sn.Orders, sn.OrderKeys = []int{}, []int64{}
	}
	if p := c.Pruning(); p.Evicted > 0 || p.MaxDocs > 0 {
		sn.Pruning = &spec.Pruning{Method: "space-saving", Capacity: int64(p.Capacity), Evicted: p.Evicted,
			EvictedDocs: p.EvictedDocs, EvictedCount: p.EvictedCount, MaxDocs: p.MaxDocs, InexactKeys: int64(p.InexactKeys)}
	}
	return sn
}

// LabelsFrom decides how labels become numbers from the distinct label
// values of the training corpus: all numeric means pass-through, anything
// else a sorted label map.
func LabelsFrom(values []string, hasLabel bool) spec.Labels {
	if !hasLabel {
		return spec.Labels{Kind: spec.LabelsNone}
	}
	numeric := true
	for _, v := range values {
		if _, err := strconv.ParseFloat(strings.TrimSpace(v), 64); err != nil {
			numeric = false
			break
		}
	}
	if numeric {
		return spec.Labels{Kind: spec.LabelsNumber}
	}
	m := append([]string(nil), values...)
	sort.Strings(m)
	return spec.Labels{Kind: spec.LabelsString, Map: m}
}
