package sweep

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"strconv"
	"sync"

	"github.com/bowline/bowline/corpus"
	"github.com/bowline/bowline/hashing"
	"github.com/bowline/bowline/internal/analysis"
	"github.com/bowline/bowline/internal/learn"
	"github.com/bowline/bowline/internal/logreg"
	"github.com/bowline/bowline/internal/pipeline"
	"github.com/bowline/bowline/spec"
	"github.com/bowline/bowline/vocab"
	"github.com/bowline/bowline/weight"
)

// IndexEntryBytes is the memory counted per vocabulary entry on top of its
// key bytes: a 16-byte string header, an 8-byte column number and about 16
// bytes of hash-table slack and control bytes (Go's map at its usual
// load). It is an estimate of a key-to-column index held in memory, not a
// measurement.
const IndexEntryBytes = 40

// WeightBytes is the memory of one model weight (a float64).
const WeightBytes = 8

// Options control a sweep.
type Options struct {
	// Settings are the analysis, vocabulary and weighting settings, in
	// vocabulary mode: the vocabulary they describe is the reference
	// row, and every hashing width uses the same analysis and weights.
	Settings *learn.Settings
	// Widths are the hashing widths to measure, ascending.
	Widths []uint64
	// Seed and Signed are the hashing settings shared by every width.
	Seed   uint64
	Signed bool
	// C is the learner's regularization (0 means 1).
	C float64
	// Workers is the number of models trained at once (0 means 1). The
	// result does not depend on it.
	Workers int
	// Explain is the number of most crowded buckets to list at
	// ExplainWidth (0: none). ExplainWidth 0 means the widest width.
	Explain      int
	ExplainWidth uint64
	// Rejects, when not nil, takes each record that cannot be read or has
	// an empty label (with the record as stored) instead of ending the run
	// (--on-error skip).
	Rejects *pipeline.Rejects
	// Progress, when not nil, is called with the bytes of the training
	// corpus read so far.
	Progress func(bytesRead int64)
}

// Result is everything a sweep measured. Field names in JSON are stable.
type Result struct {
	// Train and Holdout name the corpora.
	Train   string `json:"train"`
	Holdout string `json:"holdout,omitempty"`
	// Docs and HoldoutDocs count their documents.
	Docs        int64 `json:"docs"`
	HoldoutDocs int64 `json:"holdout_docs,omitempty"`
	// Features counts feature occurrences in the training text, and
	// DistinctKeys the distinct feature keys among them.
	Features     int64 `json:"features"`
	DistinctKeys int64 `json:"distinct_keys"`
	// Labels are the training label values in class order (class i+1 for
	// string labels; numeric labels are their own class ids), empty
	// without a label field.
	Labels []string `json:"labels,omitempty"`
	// Classes is the number of weight vectors a linear model keeps: 1 for
	// two classes or none, else the number of classes.
	Classes int `json:"classes"`
	// C is the learner's regularization; Seed and Signed the hashing
	// settings.
	C      float64 `json:"c"`
	Seed   uint64  `json:"seed"`
	Signed bool    `json:"signed"`
	// IndexEntryBytes is the per-entry overhead counted in the
	// vocabulary's index memory.
	IndexEntryBytes int `json:"index_entry_bytes"`
	// Vocabulary is the reference row.
	Vocabulary VocabRow `json:"vocabulary"`
	// Widths holds one row per hashing width, ascending.
	Widths []WidthRow `json:"widths"`
	// Explain lists the most crowded buckets at one width, when asked.
	Explain *Explain `json:"explain,omitempty"`
}

// VocabRow describes the vocabulary with the settings' cutoffs.
type VocabRow struct {
	// Terms are the kept keys; Columns adds the unseen-key columns.
	Terms   int64 `json:"terms"`
	Columns int64 `json:"columns"`
	// BelowMinDocs, AboveMaxShare and OverMaxTerms count the keys each
	// cutoff removed.
	BelowMinDocs  int64 `json:"below_min_docs"`
	AboveMaxShare int64 `json:"above_max_doc_share"`
	OverMaxTerms  int64 `json:"over_max_terms"`
	// KeptShare is the share of training feature occurrences whose key
	// is kept.
	KeptShare float64 `json:"kept_share"`
	// HoldoutOOVShare is the share of held-out feature occurrences whose
	// key is not kept (with a holdout).
	HoldoutOOVShare *float64 `json:"holdout_oov_share,omitempty"`
	// KeyBytes sums the kept keys' bytes; IndexBytes adds
	// IndexEntryBytes per term.
	KeyBytes   int64 `json:"key_bytes"`
	IndexBytes int64 `json:"index_bytes"`
	// ModelBytes is Columns × 8 bytes × Classes; Bytes is ModelBytes +
	// IndexBytes.
	ModelBytes int64 `json:"model_bytes"`
	Bytes      int64 `json:"bytes"`
	// Eval is the held-out evaluation (with labels and a holdout).
	Eval *Eval `json:"eval,omitempty"`
}

// WidthRow describes one hashing width.
type WidthRow struct {
	Width uint64 `json:"width"`
	// Keys is the number of distinct training keys; Occupied the buckets
	// they fill, and ExpectedOccupied m·(1 − (1 − 1/m)^n).
	Keys             int64   `json:"keys"`
	Occupied         int64   `json:"occupied"`
	ExpectedOccupied float64 `json:"expected_occupied"`
	// CollidingKeys share their bucket with another key; CollisionRate
	// is CollidingKeys/Keys, ExpectedCollisionRate 1 − (1 − 1/m)^(n−1).
	CollidingKeys         int64   `json:"colliding_keys"`
	CollisionRate         float64 `json:"collision_rate"`
	ExpectedCollisionRate float64 `json:"expected_collision_rate"`
	// SharedShare is the share of training feature occurrences whose key
	// lands in a bucket shared with another key.
	SharedShare float64 `json:"shared_occurrence_share"`
	// ModelBytes is Width × 8 bytes × Classes.
	ModelBytes int64 `json:"model_bytes"`
	// Eval is the held-out evaluation (with labels and a holdout).
	Eval *Eval `json:"eval,omitempty"`
}

// Eval is a model's held-out figures.
type Eval struct {
	// Accuracy is the share of held-out rows predicted right.
	Accuracy float64 `json:"accuracy"`
	// LogLoss is the mean −ln p(true class).
	LogLoss float64 `json:"log_loss"`
	// AUC is the ROC AUC (two classes only).
	AUC *float64 `json:"roc_auc,omitempty"`
	// MacroF1 is the mean F1 over classes (more than two classes only).
	MacroF1 *float64 `json:"macro_f1,omitempty"`
	// Columns counts the columns that occur in the training rows.
	Columns int `json:"columns_used"`
	// Iterations sums the learner's iterations over its problems.
	Iterations int `json:"iterations"`
}

// Explain lists crowded buckets.
type Explain struct {
	Width   uint64   `json:"width"`
	Buckets []Bucket `json:"buckets"`
}

// Bucket is one bucket and the distinct training keys that share it,
// most frequent first.
type Bucket struct {
	Bucket      uint64     `json:"bucket"`
	Occurrences int64      `json:"occurrences"`
	Keys        []KeyCount `json:"keys"`
}

// KeyCount is a key with its training occurrences and documents.
type KeyCount struct {
	Key   string `json:"key"`
	Count int64  `json:"count"`
	Docs  int64  `json:"docs"`
}

// Run sweeps the training corpus train, and evaluates on holdout when it
// is not nil and the settings name a label field.
func Run(train *corpus.Reader, trainName string, holdout *corpus.Reader, holdoutName string, o Options) (*Result, error) {
	s := o.Settings
	if s == nil || s.Mode != spec.ModeVocabulary {
		return nil, errors.New("sweep: settings must be in vocabulary mode")
	}
	if len(o.Widths) == 0 {
		return nil, errors.New("sweep: no widths")
	}
	for i, w := range o.Widths {
		if w < 1 || w > hashing.MaxWidth || (i > 0 && w <= o.Widths[i-1]) {
			return nil, fmt.Errorf("sweep: widths must ascend within [1, 2^40]; got %v", o.Widths)
		}
	}
	if o.C == 0 {
		o.C = 1
	}
	if o.Workers < 1 {
		o.Workers = 1
	}
	ew := o.ExplainWidth
	if o.Explain > 0 && ew == 0 {
		ew = o.Widths[len(o.Widths)-1]
	}
	l, err := learn.New(s)
	if err != nil {
		return nil, err
	}
	an, err := analysis.New(l.Content())
	if err != nil {
		return nil, err
	}
	h, err := hashing.New(1, o.Seed, false)
	if err != nil {
		return nil, err
	}
	hasLabel := s.Input.Label != ""
	t := &keyTable{ids: map[string]int32{}}
	c := &collector{t: t, z: an.NewAnalyzer(), h: h, counts: vocab.NewCounts(), train: true}
	tr, err := c.read(train, trainName, hasLabel, o.Rejects, o.Progress)
	if err != nil {
		return nil, err
	}
	if tr.len() == 0 {
		return nil, fmt.Errorf("%s: %w", trainName, pipeline.ErrNoRecords)
	}
	t.train = len(t.keys)
	var te *docSet
	if holdout != nil {
		c.train = false
		if te, err = c.read(holdout, holdoutName, hasLabel, o.Rejects, nil); err != nil {
			return nil, err
		}
	}

	res := &Result{Train: trainName, Holdout: holdoutName, Docs: int64(tr.len()), Features: tr.occ,
		DistinctKeys: int64(t.train), C: o.C, Seed: o.Seed, Signed: o.Signed, IndexEntryBytes: IndexEntryBytes, Classes: 1}
	if te != nil {
		res.HoldoutDocs = int64(te.len())
	}

	// Labels.
	var trY, teY []float64
	if hasLabel {
		var distinct []string
		seen := map[string]bool{}
		for _, v := range tr.labels {
			if !seen[v] {
				seen[v] = true
				distinct = append(distinct, v)
			}
		}
		slices.Sort(distinct)
		lm := learn.LabelsFrom(distinct, true)
		toY := func(d *docSet) ([]float64, error) {
			y := make([]float64, len(d.labels))
			for i, v := range d.labels {
				f, err := labelValue(lm, v)
				if err != nil {
					return nil, &pipeline.RecordError{File: d.name, Line: d.lines[i], Err: err}
				}
				y[i] = f
			}
			return y, nil
		}
		if trY, err = toY(tr); err != nil {
			return nil, err
		}
		classes := distinctFloats(trY)
		if lm.Kind == "string" {
			res.Labels = lm.Map
		} else {
			for _, f := range classes {
				res.Labels = append(res.Labels, strconv.FormatFloat(f, 'g', -1, 64))
			}
		}
		if len(classes) > 2 {
			res.Classes = len(classes)
		}
		if te != nil {
			if teY, err = toY(te); err != nil {
				return nil, err
			}
		}
	}
	evaluate := hasLabel && te != nil

	// The vocabulary.
	vb := newVocabBuilder(t, c.counts, s)
	res.Vocabulary = vb.row(tr, te, res.Classes)

	// Widths.
	res.Widths = make([]WidthRow, len(o.Widths))
	for i, w := range o.Widths {
		res.Widths[i] = collisions(t, w)
		res.Widths[i].ModelBytes = satMul(int64(w), WeightBytes*int64(res.Classes))
	}
	if o.Explain > 0 {
		res.Explain = explain(t, ew, o.Explain)
	}

	if evaluate {
		type job struct {
			eval **Eval
			rows func() (*logreg.Dataset, *logreg.Dataset)
		}
		jobs := []job{{&res.Vocabulary.Eval, func() (*logreg.Dataset, *logreg.Dataset) { return vb.datasets(tr, te, trY, teY) }}}
		for i, w := range o.Widths {
			jobs = append(jobs, job{&res.Widths[i].Eval, func() (*logreg.Dataset, *logreg.Dataset) {
				return hashedDatasets(t, s, w, o.Signed, tr, te, trY, teY)
			}})
		}
		errs := make([]error, len(jobs))
		next := make(chan int)
		var wg sync.WaitGroup
		for g := 0; g < min(o.Workers, len(jobs)); g++ {
			wg.Add(1)
			go func() {
				defer wg.Done()
				for j := range next {
					a, b := jobs[j].rows()
					*jobs[j].eval, errs[j] = evalModel(a, b, o.C, len(distinctFloats(trY)))
				}
			}()
		}
		for j := range jobs {
			next <- j
		}
		close(next)
		wg.Wait()
		if err := errors.Join(errs...); err != nil {
			return nil, err
		}
	}
	return res, nil
}

func labelValue(lm spec.Labels, v string) (float64, error) {
	if lm.Kind == "string" {
		if i, ok := slices.BinarySearch(lm.Map, v); ok {
			return float64(i + 1), nil
		}
		return 0, fmt.Errorf("label %q was not seen in the training corpus", v)
	}
	f, err := strconv.ParseFloat(v, 64)
	if err != nil || math.IsNaN(f) || math.IsInf(f, 0) {
		return 0, fmt.Errorf("label %q is not a number, and the training labels were all numbers", v)
	}
	return f, nil
}

func distinctFloats(v []float64) []float64 {
	s := slices.Clone(v)
	slices.Sort(s)
	return slices.Compact(s)
}

// satMul multiplies non-negative numbers, saturating at MaxInt64.
func satMul(a, b int64) int64 {
	if a != 0 && b > math.MaxInt64/a {
		return math.MaxInt64
	}
	return a * b
}

func evalModel(train, test *logreg.Dataset, c float64, classes int) (*Eval, error) {
	m, err := logreg.Train(train, logreg.Options{C: c})
	if err != nil {
		return nil, err
	}
	mt := logreg.Evaluate(m, test)
	e := &Eval{Accuracy: mt.Accuracy, LogLoss: mt.LogLoss}
	for _, n := range m.Iterations {
		e.Iterations += n
	}
	used := map[int]struct{}{}
	for _, r := range train.Rows {
		for _, c := range r.Indices {
			used[c] = struct{}{}
		}
	}
	e.Columns = len(used)
	if classes == 2 && !math.IsNaN(mt.AUC) {
		v := mt.AUC
		e.AUC = &v
	}
	if classes > 2 {
		v := mt.MacroF1
		e.MacroF1 = &v
	}
	return e, nil
}

// rowsOf builds learner rows for the documents of d: colOf maps a key id to
// its column (negative: no column) and its sign; idf is per column (nil:
// none).
func rowsOf(d *docSet, colOf func(id int32) (int, float64), tf weight.TF, idf []float64, norm weight.Norm) []logreg.Row {
	acc := weight.NewAccumulator()
	var wr weight.Row
	rows := make([]logreg.Row, d.len())
	for i := range rows {
		for j := d.start[i]; j < d.start[i+1]; j++ {
			col, sign := colOf(d.ids[j])
			if col >= 0 {
				acc.Add(col, sign*d.counts[j])
			}
		}
		acc.Finish(tf, idf, norm, &wr)
		rows[i] = logreg.Row{Indices: slices.Clone(wr.Indices), Values: slices.Clone(wr.Values)}
	}
	return rows
}
