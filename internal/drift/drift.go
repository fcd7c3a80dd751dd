// Package drift compares a corpus with a frozen spec: out-of-vocabulary shares, unseen keys, document-share shifts, divergence scores and label shift.
package drift

import (
	"errors"
	"fmt"
	"math"
	"runtime"
	"slices"
	"sort"

	"github.com/bowline/bowline/corpus"
	"github.com/bowline/bowline/hashing"
	"github.com/bowline/bowline/internal/analysis"
	"github.com/bowline/bowline/internal/encode"
	"github.com/bowline/bowline/internal/pipeline"
	"github.com/bowline/bowline/ngram"
	"github.com/bowline/bowline/report"
	"github.com/bowline/bowline/spec"
	"github.com/bowline/bowline/vocab"
	"github.com/bowline/bowline/weight"
)

// DefaultTop is how many unseen and moved keys a Result lists when
// Options.Top is 0.
const DefaultTop = 20

// Options control a comparison.
type Options struct {
	// Workers is the number of analysing goroutines (0 = all cores). The
	// result does not depend on it.
	Workers int
	// Top is how many unseen keys and moved keys to list (0 = DefaultTop).
	Top int
	// Name is the corpus name used in the result and in errors.
	Name string
	// LabelField names the label field in the result (default: the
	// spec's label field).
	LabelField string
	// Progress, when not nil, is called from the reading goroutine with
	// the bytes read so far.
	Progress func(bytesRead int64)
	// Rejects, when not nil, takes each record that cannot be read (with
	// the record as stored) instead of ending the run (--on-error skip).
	Rejects *pipeline.Rejects
}

// Result is what Compare found. JSON field names are stable: scripts
// depend on them. Shares are fractions (0.05 is 5%); a share whose
// denominator is 0 is 0. A divergence that cannot be computed (no
// reference counts, or nothing on one side) is null in JSON.
type Result struct {
	// Spec is the fingerprint of the spec compared against.
	Spec string `json:"spec"`
	// Input names the corpus read.
	Input string `json:"input"`
	// Mode is the spec's mode, "vocabulary" or "hashing".
	Mode string `json:"mode"`
	// TrainingDocs is the number of training documents (from the spec);
	// Docs the number of records read now.
	TrainingDocs int64 `json:"training_docs"`
	Docs         int64 `json:"docs"`
	// EmptyDocs counts documents that produced no feature.
	EmptyDocs int64 `json:"empty_docs"`
	// Features counts feature keys emitted, every occurrence.
	Features int64 `json:"features"`
	// OOV is the out-of-vocabulary account over all orders; null in
	// hashing mode, where the spec stores no keys.
	OOV *OOV `json:"oov"`
	// ByOrder breaks the figures down per n-gram order, word orders first.
	ByOrder []Order `json:"by_order"`
	// TopUnseen lists the keys not in the vocabulary that occurred most
	// often (ties by key bytes); empty in hashing mode.
	TopUnseen []Unseen `json:"top_unseen"`
	// Moved lists the vocabulary keys whose document share moved most,
	// by |Change| (ties by key bytes); empty in hashing mode.
	Moved []Moved `json:"moved"`
	// Buckets is the bucket-level account of a hashing-mode spec (null in
	// vocabulary mode).
	Buckets *Buckets `json:"buckets"`
	// Labels is the label distribution shift (null when the corpus is read
	// without a label field).
	Labels *LabelShift `json:"labels"`
	// Notes say in words what could not be computed and why.
	Notes []string `json:"notes"`
	// Curves describe the spec's vocabulary (rank-frequency curve and
	// document-count histogram with the cutoffs) for the HTML plots.
	Curves *report.VocabCurves `json:"vocabulary_curves,omitempty"`
	// Fields are the figures of the spec's table fields over the corpus
	// (missing, unseen levels, numbers out of the training range, mean and
	// sd seen against frozen), in the spec's order; empty when it has none.
	Fields []report.FieldFigures `json:"fields"`
}

// OOV counts emitted features and distinct keys, all and not in the
// vocabulary (the definitions of bowline's run figures).
type OOV struct {
	// Features and Unseen count emitted features, all and not in the
	// vocabulary; TokenShare is Unseen/Features.
	Features   int64   `json:"features"`
	Unseen     int64   `json:"unseen"`
	TokenShare float64 `json:"token_share"`
	// Keys and UnseenKeys count distinct keys, all and not in the
	// vocabulary; TypeShare is UnseenKeys/Keys.
	Keys       int64   `json:"keys"`
	UnseenKeys int64   `json:"unseen_keys"`
	TypeShare  float64 `json:"type_share"`
}

// Order holds the figures of one n-gram order.
type Order struct {
	// Order is the order's label ("w1", "w2", "c3").
	Order string `json:"order"`
	// Features counts emitted features of this order; Keys distinct keys.
	Features int64 `json:"features"`
	Keys     int64 `json:"keys"`
	// OOV is the order's out-of-vocabulary account (null in hashing mode).
	OOV *OOV `json:"oov"`
	// Columns is the number of vocabulary columns of this order;
	// ColumnsSeen how many of them occur in the corpus.
	Columns     int64 `json:"columns"`
	ColumnsSeen int64 `json:"columns_seen"`
	// JSD (bits) and PSI compare the order's document-share distributions:
	// bins are its vocabulary keys plus one bin for all unseen keys, and
	// a bin's weight is the number of documents holding the key (for the
	// unseen bin, the sum over unseen keys). The training side takes the
	// spec's document counts and has an empty unseen bin. Null in hashing
	// mode.
	JSD *float64 `json:"jsd_bits"`
	PSI *float64 `json:"psi"`
}

// Unseen is a key not in the vocabulary.
type Unseen struct {
	Key   string `json:"key"`
	Order string `json:"order"`
	// Count is how often it was emitted; Docs how many documents held it.
	Count int64 `json:"count"`
	Docs  int64 `json:"docs"`
}

// Moved is a vocabulary key with its document share then and now.
type Moved struct {
	Key   string `json:"key"`
	Order string `json:"order"`
	// TrainingDocs and TrainingShare are the spec's document count and
	// that count over the training documents; Docs and Share the same for
	// the corpus read now. Change is Share − TrainingShare.
	TrainingDocs  int64   `json:"training_docs"`
	Docs          int64   `json:"docs"`
	TrainingShare float64 `json:"training_share"`
	Share         float64 `json:"share"`
	Change        float64 `json:"change"`
}

// Buckets is the bucket-level account of a hashing-mode spec. The spec
// stores no keys, so key OOV cannot be told. It stores no document counts
// either, but when it was learned with idf it stores each bucket's idf,
// from which the bucket's training document count follows exactly
// (TrainingCounts is then true): that gives the reference for a per-bucket
// divergence and tells which buckets no training key fell into. Without
// idf only the new corpus's own figures are available.
type Buckets struct {
	Width uint64 `json:"width"`
	// TrainingCounts says whether training bucket document counts could
	// be recovered from the spec's idf table.
	TrainingCounts bool `json:"training_counts"`
	// TrainingBuckets is the number of buckets training keys fell into
	// (0 when unknown).
	TrainingBuckets int64 `json:"training_buckets"`
	// Occupied is the number of buckets the corpus's keys fall into;
	// NewBuckets how many of those held no training key (0 when unknown).
	Occupied   int64 `json:"occupied"`
	NewBuckets int64 `json:"new_buckets"`
	// NewBucketFeatures counts emitted features that fell into a bucket no
	// training key fell into, and NewBucketShare is that over all
	// features: a lower bound of the OOV token share, since an unseen key
	// that lands in a training bucket cannot be told apart.
	NewBucketFeatures int64   `json:"new_bucket_features"`
	NewBucketShare    float64 `json:"new_bucket_share"`
	// JSD (bits) and PSI compare the per-bucket document-share
	// distributions, over all orders together (null when unknown).
	JSD *float64 `json:"jsd_bits"`
	PSI *float64 `json:"psi"`
}

// LabelShift compares the label distribution of the training corpus
// (stored in the spec) with the corpus read now.
type LabelShift struct {
	// Field is the label field read.
	Field string `json:"field"`
	// Labeled counts documents with a non-empty label; Unlabeled the rest.
	Labeled   int64 `json:"labeled"`
	Unlabeled int64 `json:"unlabeled"`
	// Labels lists every label of either side, sorted by bytes.
	Labels []LabelShare `json:"labels"`
	// Unknown counts labeled documents whose label training never saw.
	Unknown int64 `json:"unknown"`
	// JSD (bits) and PSI compare the two label distributions (null when
	// the spec stores no training label counts).
	JSD *float64 `json:"jsd_bits"`
	PSI *float64 `json:"psi"`
}

// LabelShare is one label's document count and share, then and now.
// Shares are over labeled documents; Change is Share − TrainingShare.
type LabelShare struct {
	Label         string  `json:"label"`
	TrainingDocs  int64   `json:"training_docs"`
	Docs          int64   `json:"docs"`
	TrainingShare float64 `json:"training_share"`
	Share         float64 `json:"share"`
	Change        float64 `json:"change"`
}

// Compare reads every record of r once and compares it with s. The corpus
// options of r decide which fields are text and label; they should match
// the spec's input fields. The result is the same for any worker count.
//
// Unseen keys are counted exactly, by name, so memory grows with the
// number of distinct unseen keys in the corpus.
func Compare(s *spec.Spec, r *corpus.Reader, o Options) (*Result, error) {
	c := &s.Content
	an, err := analysis.New(c)
	if err != nil {
		return nil, fmt.Errorf("drift: %w", err)
	}
	res := &Result{Spec: s.Fingerprint, Input: o.Name, Mode: string(c.Mode), TrainingDocs: c.Docs, Curves: pipeline.Curves(s)}
	top := o.Top
	if top <= 0 {
		top = DefaultTop
	}
	sh, err := newShared(c)
	if err != nil {
		return nil, err
	}

	nw := o.Workers
	if nw <= 0 {
		nw = runtime.GOMAXPROCS(0)
	}
	workers := make([]*worker, nw)
	for i := range workers {
		workers[i] = newWorker(sh, an.NewAnalyzer())
	}
	fobs, err := encode.NewFieldObserver(s)
	if err != nil {
		return nil, fmt.Errorf("drift: %w", err)
	}
	labels := map[string]int64{}
	var labeled, unlabeled int64
	hasLabel := false
	check := func(rec *corpus.Record) error {
		if err := observeFields(fobs, rec, len(c.Fields), o.Name); err != nil {
			return err
		}
		if rec.Label != nil {
			hasLabel = true
			if len(rec.Label) == 0 {
				unlabeled++
			} else {
				labeled++
				labels[string(rec.Label)]++
			}
		}
		return nil
	}
	res.Docs, err = pipeline.Scan(r, pipeline.ScanOptions{Workers: nw, Name: o.Name, Text: len(c.Input.Text), Fields: len(c.Fields),
		Check: check, Progress: o.Progress, Rejects: o.Rejects}, func(w int, texts [][]byte) { workers[w].doc(texts) })
	if err != nil {
		return nil, err
	}

	total := workers[0]
	for _, w := range workers[1:] {
		total.merge(w)
	}
	res.EmptyDocs = total.empty
	res.Fields = pipeline.FieldFigures(c, fobs.Stats())
	if sh.vocab != nil {
		vocabFigures(res, c, total, top)
	} else {
		hashFigures(res, c, sh, total)
	}
	if hasLabel {
		res.Labels = labelShift(c, labels, labeled, unlabeled, &res.Notes)
		res.Labels.Field = o.LabelField
		if res.Labels.Field == "" {
			res.Labels.Field = c.Input.Label
		}
	}
	if res.Notes == nil {
		res.Notes = []string{}
	}
	return res, nil
}

// shared is the read-only state every worker uses.
type shared struct {
	vocab        *vocab.Vocabulary
	hasher       *hashing.Hasher
	trainBuckets map[uint64]int64
	trainOK      bool
}

func newShared(c *spec.Content) (*shared, error) {
	sh := &shared{}
	var err error
	switch c.Mode {
	case spec.ModeVocabulary:
		v := c.Vocabulary
		if v == nil {
			return nil, errors.New("drift: vocabulary mode without a vocabulary")
		}
		terms := make([]vocab.Term, len(v.Keys))
		for i, k := range v.Keys {
			terms[i] = vocab.Term{Key: k, Order: v.Orders[i], Docs: v.DocCounts[i]}
		}
		if sh.vocab, err = vocab.New(terms); err != nil {
			return nil, fmt.Errorf("drift: %w", err)
		}
	case spec.ModeHashing:
		h := c.Hashing
		if h == nil {
			return nil, errors.New("drift: hashing mode without hashing settings")
		}
		if sh.hasher, err = hashing.New(h.Width, h.Seed, false); err != nil {
			return nil, fmt.Errorf("drift: %w", err)
		}
		sh.trainBuckets, sh.trainOK = trainingBuckets(c)
	default:
		return nil, fmt.Errorf("drift: unknown mode %q", c.Mode)
	}
	return sh, nil
}

// unseenStat counts one unseen key.
type unseenStat struct {
	code  int
	count int64
	docs  int64
	last  int64
}

// worker gathers the counts of the documents one goroutine sees.
type worker struct {
	sh     *shared
	an     *analysis.Analyzer
	serial int64 // documents seen, the current one included
	empty  int64
	n      int // features of the current document
	// vocabulary mode
	count  []int64 // per column: features
	docs   []int64 // per column: documents
	last   []int64 // per column: serial of the last document counted
	unseen map[string]*unseenStat
	// hashing mode
	hasher     *hashing.Hasher
	features   map[int]int64               // per order code
	keys       map[int]map[uint64]struct{} // per order code: distinct keys by hash
	bdocs      map[uint64]int64            // per bucket: documents
	docBuckets []uint64
	newFeat    int64 // features in buckets without training keys
	emit       func(key []byte, o ngram.Order)
}

func newWorker(sh *shared, an *analysis.Analyzer) *worker {
	w := &worker{sh: sh, an: an}
	if sh.vocab != nil {
		n := sh.vocab.Len()
		w.count, w.docs, w.last = make([]int64, n), make([]int64, n), make([]int64, n)
		w.unseen = map[string]*unseenStat{}
		w.emit = w.emitVocab
	} else {
		w.hasher = sh.hasher.Clone()
		w.features = map[int]int64{}
		w.keys = map[int]map[uint64]struct{}{}
		w.bdocs = map[uint64]int64{}
		w.emit = w.emitHash
	}
	return w
}

func (w *worker) doc(texts [][]byte) {
	w.serial++
	w.n = 0
	w.docBuckets = w.docBuckets[:0]
	w.an.Analyze(texts, w.emit)
	if w.n == 0 {
		w.empty++
	}
	if w.bdocs != nil && len(w.docBuckets) > 0 {
		slices.Sort(w.docBuckets)
		for i, b := range w.docBuckets {
			if i == 0 || b != w.docBuckets[i-1] {
				w.bdocs[b]++
			}
		}
	}
}

func (w *worker) emitVocab(key []byte, o ngram.Order) {
	code := int(o)
	w.n++
	if i, ok := w.sh.vocab.Lookup(key); ok {
		w.count[i]++
		if w.last[i] != w.serial {
			w.last[i] = w.serial
			w.docs[i]++
		}
		return
	}
	u := w.unseen[string(key)]
	if u == nil {
		u = &unseenStat{code: code}
		w.unseen[string(key)] = u
	}
	u.count++
	if u.last != w.serial {
		u.last = w.serial
		u.docs++
	}
}

func (w *worker) emitHash(key []byte, o ngram.Order) {
	code := int(o)
	w.n++
	sum := w.hasher.Sum(key)
	w.features[code]++
	k := w.keys[code]
	if k == nil {
		k = map[uint64]struct{}{}
		w.keys[code] = k
	}
	k[sum] = struct{}{}
	b := hashing.BucketOf(sum, w.hasher.Width)
	w.docBuckets = append(w.docBuckets, b)
	if w.sh.trainOK {
		if _, ok := w.sh.trainBuckets[b]; !ok {
			w.newFeat++
		}
	}
}

// merge adds o's counts to w's. Document serials are per worker, so the
// per-document marks are not merged (they are no longer needed).
func (w *worker) merge(o *worker) {
	w.empty += o.empty
	for i := range w.count {
		w.count[i] += o.count[i]
		w.docs[i] += o.docs[i]
	}
	for k, u := range o.unseen {
		if t := w.unseen[k]; t != nil {
			t.count += u.count
			t.docs += u.docs
		} else {
			w.unseen[k] = u
		}
	}
	for c, n := range o.features {
		w.features[c] += n
	}
	for c, ks := range o.keys {
		t := w.keys[c]
		if t == nil {
			w.keys[c] = ks
			continue
		}
		for k := range ks {
			t[k] = struct{}{}
		}
	}
	for b, n := range o.bdocs {
		w.bdocs[b] += n
	}
	w.newFeat += o.newFeat
}

// orderAcc gathers one order's figures in vocabulary mode.
type orderAcc struct {
	oov                  OOV
	columns, columnsSeen int64
	train, now           []float64
	unseenDocs           int64
}

func vocabFigures(res *Result, c *spec.Content, w *worker, top int) {
	v := c.Vocabulary
	acc := map[int]*orderAcc{}
	get := func(code int) *orderAcc {
		a := acc[code]
		if a == nil {
			a = &orderAcc{}
			acc[code] = a
		}
		return a
	}
	for i := range v.Keys {
		a := get(v.Orders[i])
		a.columns++
		a.oov.Features += w.count[i]
		if w.docs[i] > 0 {
			a.columnsSeen++
			a.oov.Keys++
		}
		a.train = append(a.train, float64(v.DocCounts[i]))
		a.now = append(a.now, float64(w.docs[i]))
	}
	for _, u := range w.unseen {
		a := get(u.code)
		a.oov.Features += u.count
		a.oov.Unseen += u.count
		a.oov.Keys++
		a.oov.UnseenKeys++
		a.unseenDocs += u.docs
	}
	all := &OOV{}
	for _, code := range sortedCodes(acc) {
		a := acc[code]
		a.oov.shares()
		o := a.oov
		all.Features += o.Features
		all.Unseen += o.Unseen
		all.Keys += o.Keys
		all.UnseenKeys += o.UnseenKeys
		a.train = append(a.train, 0)
		a.now = append(a.now, float64(a.unseenDocs))
		res.ByOrder = append(res.ByOrder, Order{
			Order: ngram.Order(code).String(), Features: o.Features, Keys: o.Keys, OOV: &o,
			Columns: a.columns, ColumnsSeen: a.columnsSeen,
			JSD: finite(JSD(a.train, a.now)), PSI: finite(PSI(a.train, a.now)),
		})
	}
	all.shares()
	res.OOV = all
	res.Features = all.Features

	// Top unseen keys.
	us := make([]Unseen, 0, len(w.unseen))
	for k, u := range w.unseen {
		us = append(us, Unseen{Key: k, Order: ngram.Order(u.code).String(), Count: u.count, Docs: u.docs})
	}
	sort.Slice(us, func(i, j int) bool {
		if us[i].Count != us[j].Count {
			return us[i].Count > us[j].Count
		}
		return us[i].Key < us[j].Key
	})
	res.TopUnseen = us[:min(top, len(us))]

	// Keys whose document share moved most.
	ms := make([]Moved, len(v.Keys))
	for i, k := range v.Keys {
		m := Moved{Key: k, Order: ngram.Order(v.Orders[i]).String(), TrainingDocs: v.DocCounts[i], Docs: w.docs[i],
			TrainingShare: ratio(v.DocCounts[i], c.Docs), Share: ratio(w.docs[i], res.Docs)}
		m.Change = m.Share - m.TrainingShare
		ms[i] = m
	}
	sort.Slice(ms, func(i, j int) bool {
		a, b := math.Abs(ms[i].Change), math.Abs(ms[j].Change)
		if a != b {
			return a > b
		}
		return ms[i].Key < ms[j].Key
	})
	res.Moved = ms[:min(top, len(ms))]
	if res.Docs == 0 {
		res.Notes = append(res.Notes, "the corpus holds no documents: shares and divergences are not defined")
	}
}

func hashFigures(res *Result, c *spec.Content, sh *shared, w *worker) {
	codes := make([]int, 0, len(w.features))
	for code := range w.features {
		codes = append(codes, code)
	}
	sortCodes(codes)
	for _, code := range codes {
		res.ByOrder = append(res.ByOrder, Order{Order: ngram.Order(code).String(), Features: w.features[code], Keys: int64(len(w.keys[code]))})
		res.Features += w.features[code]
	}
	b := &Buckets{Width: c.Hashing.Width, Occupied: int64(len(w.bdocs)), TrainingCounts: sh.trainOK}
	res.Notes = append(res.Notes, "hashing mode: the spec stores no keys, so out-of-vocabulary shares, unseen keys and moved keys are not available")
	if sh.trainOK {
		b.TrainingBuckets = int64(len(sh.trainBuckets))
		ids := make([]uint64, 0, len(sh.trainBuckets)+len(w.bdocs))
		for id := range sh.trainBuckets {
			ids = append(ids, id)
		}
		for id := range w.bdocs {
			if _, ok := sh.trainBuckets[id]; !ok {
				ids = append(ids, id)
				b.NewBuckets++
			}
		}
		slices.Sort(ids)
		p, q := make([]float64, len(ids)), make([]float64, len(ids))
		for i, id := range ids {
			p[i], q[i] = float64(sh.trainBuckets[id]), float64(w.bdocs[id])
		}
		b.JSD, b.PSI = finite(JSD(p, q)), finite(PSI(p, q))
		b.NewBucketFeatures = w.newFeat
		b.NewBucketShare = ratio(w.newFeat, res.Features)
		res.Notes = append(res.Notes, "training bucket document counts recovered from the spec's idf table; divergence is per bucket over all orders together")
	} else {
		res.Notes = append(res.Notes, "the spec was learned without idf, so it holds no training bucket counts: only the new corpus's figures are shown, no divergence")
	}
	res.Buckets = b
}

// trainingBuckets recovers the training document count of every bucket
// from a hashing spec's idf table by inverting the idf formula, and checks
// each count by recomputing the stored idf from it. ok is false when the
// spec has no idf table or a value does not invert exactly.
func trainingBuckets(c *spec.Content) (map[uint64]int64, bool) {
	mode := c.Weights.IDF
	if mode == weight.IDFNone || len(c.Weights.IDFBuckets) != len(c.Weights.IDFBucketValues) {
		return nil, false
	}
	n := c.Docs
	out := make(map[uint64]int64, len(c.Weights.IDFBuckets))
	for i, b := range c.Weights.IDFBuckets {
		x := c.Weights.IDFBucketValues[i]
		var g float64
		switch mode {
		case weight.IDFSmooth: // x = ln((1+n)/(1+df)) + 1
			g = float64(1+n)/math.Exp(x-1) - 1
		case weight.IDFPlain: // x = ln(n/df)
			g = float64(n) / math.Exp(x)
		}
		df := int64(math.Round(g))
		found := false
		for _, d := range []int64{df, df - 1, df + 1} {
			if d >= 1 && d <= n && mode.Value(n, d) == x {
				df, found = d, true
				break
			}
		}
		if !found {
			return nil, false
		}
		out[b] = df
	}
	return out, true
}

func labelShift(c *spec.Content, now map[string]int64, labeled, unlabeled int64, notes *[]string) *LabelShift {
	ls := &LabelShift{Labeled: labeled, Unlabeled: unlabeled}
	train := map[string]int64{}
	var trainN int64
	for i, v := range c.Labels.Values {
		if i < len(c.Labels.Counts) {
			train[v] = c.Labels.Counts[i]
			trainN += c.Labels.Counts[i]
		}
	}
	names := make([]string, 0, len(train)+len(now))
	for k := range train {
		names = append(names, k)
	}
	for k := range now {
		if _, ok := train[k]; !ok {
			names = append(names, k)
		}
	}
	sort.Strings(names)
	p, q := make([]float64, len(names)), make([]float64, len(names))
	for i, k := range names {
		l := LabelShare{Label: k, TrainingDocs: train[k], Docs: now[k], TrainingShare: ratio(train[k], trainN), Share: ratio(now[k], labeled)}
		l.Change = l.Share - l.TrainingShare
		ls.Labels = append(ls.Labels, l)
		if _, ok := train[k]; !ok {
			ls.Unknown += now[k]
		}
		p[i], q[i] = float64(train[k]), float64(now[k])
	}
	if trainN == 0 {
		*notes = append(*notes, "the spec stores no training label counts: label shares are shown for the new corpus only")
		ls.Unknown = 0
		return ls
	}
	ls.JSD, ls.PSI = finite(JSD(p, q)), finite(PSI(p, q))
	return ls
}

func (o *OOV) shares() {
	o.TokenShare = ratio(o.Unseen, o.Features)
	o.TypeShare = ratio(o.UnseenKeys, o.Keys)
}

func ratio(a, b int64) float64 {
	if b == 0 {
		return 0
	}
	return float64(a) / float64(b)
}

func finite(x float64) *float64 {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return nil
	}
	return &x
}

func sortedCodes[T any](m map[int]T) []int {
	codes := make([]int, 0, len(m))
	for c := range m {
		codes = append(codes, c)
	}
	sortCodes(codes)
	return codes
}

// sortCodes orders n-gram order codes: word orders (below 100) first, then
// character orders, each ascending — which is plain ascending order.
func sortCodes(codes []int) { slices.Sort(codes) }
