// Package encode applies a spec to documents: rows, labels and the run's figures.
package encode

import (
	"fmt"
	"math"
	"math/bits"
	"strconv"
	"strings"
	"sync"

	"github.com/bowline/bowline/hashing"
	"github.com/bowline/bowline/internal/analysis"
	"github.com/bowline/bowline/internal/tablefield"
	"github.com/bowline/bowline/ngram"
	"github.com/bowline/bowline/spec"
	"github.com/bowline/bowline/vocab"
	"github.com/bowline/bowline/weight"
	"github.com/cespare/xxhash/v2"
)

// Encoder applies a frozen spec to documents. It is safe for concurrent use
// through Workers: each goroutine calls NewWorker once.
type Encoder struct {
	spec     *spec.Spec
	analysis *analysis.Chain
	index    *vocab.Index // vocabulary mode
	nterms   int          // vocabulary columns (before unseen columns)
	orders   []int        // order code of each vocabulary column
	wordIDs  bool         // word n-grams are looked up through word ids
	words    ngram.Range  // word n-gram orders
	unseen   vocab.Unseen
	hasher   *hashing.Hasher
	tf       weight.TF
	norm     weight.Norm
	idf      []float64 // per column, nil when idf is none
	idfMap   map[uint64]float64
	idfDef   float64
	labels   map[string]float64
	columns  int
	fields   *tablefield.Set // table fields, in spec order
	pool     sync.Pool
}

// Load loads the spec at path as o.Load does and makes its Encoder. The
// vocabulary's keys are checked for duplicates once, while the encoder
// indexes them; a duplicate key is then a *spec.LoadError matching
// spec.ErrInvalid, as with spec.Load.
func Load(path string, o spec.LoadOptions) (*spec.Spec, *Encoder, error) {
	o.KeysChecked = true
	s, err := o.Load(path)
	if err != nil {
		return nil, nil, err
	}
	enc, err := New(s)
	if err != nil {
		return nil, nil, &spec.LoadError{File: path, Reason: spec.ErrInvalid, Err: err}
	}
	return s, enc, nil
}

// New prepares an encoder for s.
func New(s *spec.Spec) (*Encoder, error) {
	c := &s.Content
	e := &Encoder{spec: s, tf: c.Weights.TF, norm: c.Weights.Norm}
	var err error
	if e.analysis, err = analysis.New(c); err != nil {
		return nil, err
	}
	idfMode := c.Weights.IDF
	switch c.Mode {
	case spec.ModeVocabulary:
		v := c.Vocabulary
		if v == nil {
			return nil, fmt.Errorf("vocabulary mode without a vocabulary")
		}
		if e.index, err = vocab.NewIndex(v.Keys, v.Orders, e.analysis.Prefixes(), wordCode); err != nil {
			return nil, err
		}
		e.nterms, e.orders = len(v.Keys), v.Orders
		e.words = e.analysis.Words()
		e.wordIDs = e.index.Packed() && e.words.On()
		e.unseen = v.Unseen
		e.columns = len(v.Keys) + e.unseen.Columns()
		if idfMode != weight.IDFNone {
			e.idf = make([]float64, e.columns)
			copy(e.idf, c.Weights.IDFValues)
			for i := len(v.Keys); i < e.columns; i++ {
				e.idf[i] = 1
			}
		}
	case spec.ModeHashing:
		h := c.Hashing
		if h == nil {
			return nil, fmt.Errorf("hashing mode without hashing settings")
		}
		if e.hasher, err = hashing.New(h.Width, h.Seed, h.Signed); err != nil {
			return nil, err
		}
		e.words = e.analysis.Words()
		e.columns = int(h.Width)
		if idfMode != weight.IDFNone {
			e.idfDef = c.Weights.IDFDefault
			if h.Width <= 1<<24 {
				e.idf = make([]float64, h.Width)
				for i := range e.idf {
					e.idf[i] = e.idfDef
				}
				for i, b := range c.Weights.IDFBuckets {
					e.idf[b] = c.Weights.IDFBucketValues[i]
				}
			} else {
				e.idfMap = make(map[uint64]float64, len(c.Weights.IDFBuckets))
				for i, b := range c.Weights.IDFBuckets {
					e.idfMap[b] = c.Weights.IDFBucketValues[i]
				}
			}
		}
	default:
		return nil, fmt.Errorf("unknown mode %q", c.Mode)
	}
	if e.fields, err = tablefield.NewSet(c, e.columns); err != nil {
		return nil, err
	}
	if e.hasher == nil {
		for i := range c.Fields {
			e.columns += c.Fields[i].Columns()
		}
	}
	if c.Labels.Kind == spec.LabelsString {
		e.labels = make(map[string]float64, len(c.Labels.Map))
		for i, l := range c.Labels.Map {
			e.labels[l] = float64(i + 1)
		}
	}
	return e, nil
}

// wordCode tells whether an order code is that of a word n-gram, and of
// how many words.
func wordCode(code int) (int, bool) { return ngram.Order(code).Words() }

// Spec returns the spec the encoder applies.
func (e *Encoder) Spec() *spec.Spec { return e.spec }

// Columns is the number of columns of every row.
func (e *Encoder) Columns() int { return e.columns }

// Analysis returns the encoder's analysis chain.
func (e *Encoder) Analysis() *analysis.Chain { return e.analysis }

// LabelError is a label the spec cannot turn into a number.
type LabelError struct {
	Label  string
	Reason string
}

func (e *LabelError) Error() string { return fmt.Sprintf("label %q: %s", e.Label, e.Reason) }

// Label turns a label field into the row's label. An empty or absent label
// (nil) gives 0, the label of unlabeled rows; fallback, when not nil, is
// used for a string label the spec has not seen.
func (e *Encoder) Label(raw []byte, fallback *float64) (float64, error) {
	if raw == nil {
		return 0, nil
	}
	switch e.spec.Content.Labels.Kind {
	case spec.LabelsString:
		if v, ok := e.labels[string(raw)]; ok {
			return v, nil
		}
		if fallback != nil {
			return *fallback, nil
		}
		return 0, &LabelError{Label: string(raw), Reason: fmt.Sprintf("not one of the %d labels seen at learn time (%s); use --label-fallback N to map unseen labels", len(e.labels), strings.Join(firstN(e.spec.Content.Labels.Map, 8), ", "))}
	default:
		v, err := strconv.ParseFloat(strings.TrimSpace(string(raw)), 64)
		if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
			if fallback != nil {
				return *fallback, nil
			}
			return 0, &LabelError{Label: string(raw), Reason: "not a number, and the spec has no label map (learn saw numeric labels only)"}
		}
		return v, nil
	}
}

func firstN(s []string, n int) []string {
	if len(s) > n {
		return append(append([]string(nil), s[:n]...), "...")
	}
	return s
}

// DocStats are the figures of one document.
type DocStats struct {
	// Features is the number of feature keys emitted.
	Features int
	// Unseen is the number of emitted keys not in the vocabulary.
	Unseen int
}

// Worker encodes documents for one goroutine and gathers the run's figures.
type Worker struct {
	e       *Encoder
	z       *analysis.Analyzer
	acc     *weight.Accumulator
	h       *hashing.Hasher
	uh      *hashing.Hasher // unseen hash:K
	Stats   Stats
	doc     DocStats
	track   bool
	fs      fieldState
	addFn   func([]byte, ngram.Order)
	wordsFn func(int, []byte, [][]byte, int)
	// hashWordsFn hashes the word n-grams of a chunk (hashing mode).
	hashWordsFn func(int, []byte, [][]byte, int)
	sums        []uint64       // hashing mode, see CollectSums
	recent      hashing.Recent // repeats dropped from sums
	ids         []int32        // word ids of a chunk's tokens
	cols        []int32        // columns of a chunk's n-grams of one order, or -1
	key         []byte         // a key built for an n-gram looked up by ids
	// One is made per worker, next to the others: the padding keeps the
	// fields it writes for every token off their cache lines.
	_ [64]byte
}

// Stats accumulates a worker's figures.
type Stats struct {
	// Features and Unseen per n-gram order.
	Features [ngram.MaxOrder + 1]int64
	Unseen   [ngram.MaxOrder + 1]int64
	// Seen marks the vocabulary columns whose keys were emitted (a bit
	// per column; nil unless the worker tracks keys).
	Seen []uint64
	// UnseenKeys: distinct unseen keys (by 64-bit hash) per n-gram order
	// (nil unless the worker tracks keys).
	UnseenKeys *[ngram.MaxOrder + 1]*hashing.Tally
	// TopUnseen counts unseen keys (capped at MaxTrackedUnseen keys).
	TopUnseen *UnseenCounts
	// Tally is the hashing-mode collision account.
	Tally *hashing.Tally
	// orders is the order code of each vocabulary column.
	orders []int
}

// MaxTrackedUnseen caps how many distinct unseen keys a worker counts by
// name for the "top unseen keys" figure.
const MaxTrackedUnseen = 200000

// NewWorker returns a worker. When track is true it gathers per-key figures
// (distinct keys, unseen keys, collisions) as well as counts.
func (e *Encoder) NewWorker(track bool) *Worker {
	w := &Worker{e: e, z: e.analysis.NewAnalyzer(), acc: weight.NewAccumulator(), track: track}
	w.addFn, w.wordsFn, w.hashWordsFn = w.add, w.wordChunk, w.hashWords
	if track && e.index != nil {
		w.Stats.Seen = make([]uint64, (e.nterms+63)/64)
		w.Stats.orders = e.orders
		w.Stats.UnseenKeys = new([ngram.MaxOrder + 1]*hashing.Tally)
		w.Stats.TopUnseen = NewUnseenCounts()
	}
	if e.hasher != nil {
		w.h = e.hasher.Clone()
		if track {
			w.Stats.Tally = hashing.NewTally()
		}
	}
	if e.unseen.Mode == vocab.UnseenHash {
		w.uh, _ = hashing.New(uint64(e.unseen.Buckets), 0, false)
	}
	return w
}

// Analyzer returns the worker's analyzer (for its token figures).
func (w *Worker) Analyzer() *analysis.Analyzer { return w.z }

// Encode turns one document into a row (reusing dst's storage).
func (w *Worker) Encode(texts [][]byte, dst *weight.Row) DocStats {
	w.acc.Reset()
	w.doc = DocStats{}
	switch {
	case w.e.wordIDs:
		w.z.AnalyzeTokens(texts, w.wordsFn, w.addFn)
	case w.e.hasher != nil && w.e.words.On():
		w.z.AnalyzeTokens(texts, w.hashWordsFn, w.addFn)
	default:
		w.z.Analyze(texts, w.addFn)
	}
	e := w.e
	var idf []float64
	if e.idf != nil {
		idf = e.idf
	}
	if e.idfMap == nil {
		w.acc.Finish(e.tf, idf, e.norm, dst)
		return w.doc
	}
	w.acc.Finish(e.tf, nil, weight.NormNone, dst)
	for i, c := range dst.Indices {
		v, ok := e.idfMap[uint64(c)]
		if !ok {
			v = e.idfDef
		}
		dst.Values[i] *= v
	}
	normalize(e.norm, dst.Values)
	return w.doc
}

// wordChunk looks up the word n-grams of a chunk of tokens through the ids
// of their words (see Analyzer.AnalyzeTokens), in the order Analyze emits
// them.
func (w *Worker) wordChunk(field int, prefix []byte, tokens [][]byte, from int) {
	x := w.e.index
	ids := w.ids[:0]
	for _, t := range tokens {
		ids = append(ids, x.Word(t))
	}
	w.ids = ids
	r := w.e.words
	for n := r.Min; n <= r.Max && n <= len(tokens); n++ {
		lo := max(0, from-n+1)
		// Columns first, in a loop of independent probes, so that the
		// processor overlaps their cache misses.
		cols := w.cols[:0]
		switch n {
		case 1:
			for _, id := range ids[lo:] {
				cols = append(cols, x.Unigram(field, id))
			}
		case 2:
			for i := lo; i+1 < len(ids); i++ {
				cols = append(cols, x.Bigram(field, ids[i], ids[i+1]))
			}
		}
		w.cols = cols
		for i := lo; i+n <= len(tokens); i++ {
			col, ok := -1, false
			if n <= 2 {
				col = int(cols[i-lo])
				ok = col >= 0
			}
			if ok {
				w.seen(col, ngram.Order(n))
				continue
			}
			k := ngram.WordKey(&w.key, prefix, tokens[i:i+n])
			if n > 2 || x.OddWordKeys() {
				if col, ok = x.Lookup(k); ok {
					w.seen(col, ngram.Order(n))
					continue
				}
			}
			w.unseenKey(k, ngram.Order(n))
		}
	}
}

func (w *Worker) add(key []byte, code ngram.Order) {
	e := w.e
	if e.index != nil {
		if col, ok := e.index.Lookup(key); ok {
			w.seen(col, code)
		} else {
			w.unseenKey(key, code)
		}
		return
	}
	w.hashKey(key, code)
}

// hashWords hashes the word n-grams of a chunk of tokens (see
// Analyzer.AnalyzeTokens) in the order Analyze emits them, without a call
// through the n-gram builder for each key.
func (w *Worker) hashWords(_ int, prefix []byte, tokens [][]byte, from int) {
	r := w.e.words
	for n := r.Min; n <= r.Max && n <= len(tokens); n++ {
		for i := max(0, from-n+1); i+n <= len(tokens); i++ {
			w.hashKey(ngram.WordKey(&w.key, prefix, tokens[i:i+n]), ngram.Order(n))
		}
	}
}

// hashKey counts a key in hashing mode.
func (w *Worker) hashKey(key []byte, code ngram.Order) {
	e := w.e
	w.doc.Features++
	w.Stats.Features[code]++
	sum := w.h.Sum(key)
	b := hashing.BucketOf(sum, e.hasher.Width)
	sign := 1.0
	if e.hasher.Signed && sum>>63 == 1 {
		sign = -1
	}
	w.acc.Add(int(b), sign)
	if w.recent != nil {
		if sum == 0 || !w.recent.Seen(sum) {
			w.sums = append(w.sums, sum)
		}
	} else if w.Stats.Tally != nil {
		w.Stats.Tally.Add(sum)
	}
}

// CollectSums makes a hashing-mode worker that tracks keys keep the hash
// sums of the keys it meets (fewer most repeats) for the caller to take
// with TakeSums, instead of recording them in its own Stats.Tally (which
// it drops): several workers' sums can then go to one Tally, in one
// place.
func (w *Worker) CollectSums() {
	if w.Stats.Tally == nil {
		return
	}
	w.Stats.Tally = nil
	w.recent = hashing.NewRecent()
}

// TakeSums returns the sums collected since the last call (see
// CollectSums), and keeps buf's storage for the next ones.
func (w *Worker) TakeSums(buf []uint64) []uint64 {
	s := w.sums
	w.sums = buf[:0]
	return s
}

// seen counts a key of the vocabulary, in column col.
func (w *Worker) seen(col int, code ngram.Order) {
	w.doc.Features++
	w.Stats.Features[code]++
	if w.Stats.Seen != nil {
		w.Stats.Seen[col>>6] |= 1 << (col & 63)
	}
	w.acc.Add(col, 1)
}

// unseenKey counts a key the vocabulary lacks and applies the unseen-key
// policy.
func (w *Worker) unseenKey(key []byte, code ngram.Order) {
	e := w.e
	w.doc.Features++
	w.Stats.Features[code]++
	w.doc.Unseen++
	w.Stats.Unseen[code]++
	if w.track {
		sum := xxhash.Sum64(key)
		addKey(w.Stats.UnseenKeys, code, sum)
		w.Stats.TopUnseen.Add(sum, key, 1)
	}
	switch e.unseen.Mode {
	case vocab.UnseenCount:
		w.acc.Add(e.nterms, 1)
	case vocab.UnseenHash:
		b, _ := w.uh.Bucket(key)
		w.acc.Add(e.nterms+int(b), 1)
	}
}

func addKey(m *[ngram.MaxOrder + 1]*hashing.Tally, code ngram.Order, sum uint64) {
	t := m[code]
	if t == nil {
		t = hashing.NewTally()
		m[code] = t
	}
	t.Add(sum)
}

// Keys returns the number of distinct keys of order code emitted, and how
// many of them were unseen (vocabulary mode, when the worker tracks keys).
func (s *Stats) Keys(code ngram.Order) (keys, unseen int64) {
	if s.UnseenKeys != nil && s.UnseenKeys[code] != nil {
		unseen = int64(s.UnseenKeys[code].Len())
	}
	for i, word := range s.Seen {
		for word != 0 {
			b := bits.TrailingZeros64(word)
			word &= word - 1
			if ngram.Order(s.orders[i*64+b]) == code {
				keys++
			}
		}
	}
	return keys + unseen, unseen
}

// Merge adds o's figures to s's.
func (s *Stats) Merge(o *Stats) {
	for k, v := range o.Features {
		s.Features[k] += v
	}
	for k, v := range o.Unseen {
		s.Unseen[k] += v
	}
	mergeSets := func(dst, src *[ngram.MaxOrder + 1]*hashing.Tally) {
		for code, t := range src {
			if t == nil {
				continue
			}
			if dst[code] == nil {
				dst[code] = hashing.NewTally()
			}
			dst[code].Merge(t)
		}
	}
	if s.Seen != nil && o.Seen != nil {
		for i, b := range o.Seen {
			s.Seen[i] |= b
		}
		mergeSets(s.UnseenKeys, o.UnseenKeys)
		s.TopUnseen.Merge(o.TopUnseen)
	}
	if s.Tally != nil && o.Tally != nil {
		s.Tally.Merge(o.Tally)
	}
}

// Orders returns the n-gram orders present, ascending.
func (s *Stats) Orders() []ngram.Order {
	var codes []ngram.Order
	for k, n := range s.Features {
		if n > 0 {
			codes = append(codes, ngram.Order(k))
		}
	}
	return codes
}

// normalize scales values to unit L1 or L2 norm (used where idf is applied
// outside the accumulator).
func normalize(n weight.Norm, v []float64) {
	var t float64
	switch n {
	case weight.NormL1:
		for _, x := range v {
			t += math.Abs(x)
		}
	case weight.NormL2:
		for _, x := range v {
			t += x * x
		}
		t = math.Sqrt(t)
	default:
		return
	}
	if t == 0 {
		return
	}
	for i := range v {
		v[i] /= t
	}
}

// Encode encodes one document into a fresh row. Unlike Worker.Encode it is
// safe for concurrent use: workers are pooled inside the encoder. Figures
// gathered by pooled workers are not reported anywhere.
func (e *Encoder) Encode(texts [][]byte) (weight.Row, DocStats) {
	w, _ := e.pool.Get().(*Worker)
	if w == nil {
		w = e.NewWorker(false)
	}
	var row weight.Row
	ds := w.Encode(texts, &row)
	// Fresh slices: the caller owns the row.
	out := weight.Row{Indices: append([]int(nil), row.Indices...), Values: append([]float64(nil), row.Values...)}
	e.pool.Put(w)
	return out, ds
}
