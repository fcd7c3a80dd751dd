package pipeline

import (
	"errors"
	"fmt"
	"io"
	"math"
	"sort"
	"strconv"
	"sync"
	"time"

	"github.com/bowline/bowline/corpus"
	"github.com/bowline/bowline/hashing"
	"github.com/bowline/bowline/internal/analysis"
	"github.com/bowline/bowline/internal/encode"
	"github.com/bowline/bowline/internal/tablefield"
	"github.com/bowline/bowline/ngram"
	"github.com/bowline/bowline/report"
	"github.com/bowline/bowline/spec"
	"github.com/bowline/bowline/svmlight"
	"github.com/bowline/bowline/weight"
)

// EncodeOptions control an encode run.
type EncodeOptions struct {
	// Workers is the number of encoding goroutines (0 = all cores).
	Workers int
	// Base is the first column index written (1 or 0).
	Base int
	// WithIDs appends "# id" to every row.
	WithIDs bool
	// LabelFallback, when not nil, is the label of rows whose label the
	// spec cannot map.
	LabelFallback *float64
	// Name is the corpus name used in figures and errors.
	Name string
	// Progress, when not nil, is called from the reading goroutine with
	// the bytes read so far.
	Progress func(bytesRead int64)
	// TopUnseen is how many unseen keys the figures list.
	TopUnseen int
	// Crowded, when above 0, asks for the most crowded buckets (hashing
	// mode) in the figures' collision account, without their keys; see
	// spec.ExplainBuckets for the keys.
	Crowded int
	// Rejects, when not nil, takes records that cannot be read or whose
	// label cannot be mapped, instead of ending the run (--on-error skip).
	Rejects *Rejects
}

// Encode applies enc to every record of r and writes one SVMlight row per
// record, in input order, to out. Rows are byte-identical whatever the
// worker count.
func Encode(r *corpus.Reader, enc *encode.Encoder, out io.Writer, o EncodeOptions) (*report.Figures, error) {
	start := time.Now()
	nw := workerCount(o.Workers)
	if o.Base != 0 && o.Base != 1 {
		o.Base = 1
	}
	ntext := len(enc.Spec().Content.Input.Text)
	ntable := len(enc.Spec().Content.Fields)
	obs := enc.NewFieldObserver()
	br := &batchReader{r: r, nfield: ntext + ntable, rj: o.Rejects, onRecord: func(rec *corpus.Record) error {
		if o.Progress != nil {
			o.Progress(r.BytesRead())
		}
		if _, err := enc.Label(rec.Label, o.LabelFallback); err != nil {
			return &RecordError{File: o.Name, Line: rec.Line, Err: err}
		}
		return observeFields(o.Name, rec, ntable, obs.Observe)
	}}
	// Each worker encodes the batch it read and hands it to the ordered
	// commit, which writes every batch that is next in order: so a batch
	// is written from the cache of the core that encoded it, most of the
	// time.
	p := newPool(br, nw*3)

	// Hashing mode: the run keeps one collision tally. Each worker looks
	// its batch's key sums up in it (Tally.Unknown) and hands over only
	// those it does not hold yet, which the commit adds: so the lookups,
	// one per key occurrence less repeats, are spread over the workers,
	// and the commit, which cannot be parallel, inserts little more than
	// the distinct keys.
	var tally *hashing.Tally
	workers := make([]*encode.Worker, nw)
	for i := range workers {
		workers[i] = enc.NewWorker(true)
		if workers[i].Stats.Tally != nil {
			if tally == nil {
				tally = hashing.NewTally()
			}
			workers[i].CollectSums()
		}
	}

	// The ordered commit: batches wait in pending until every batch
	// before them is written.
	var commitMu sync.Mutex // guards everything below
	bw := newErrWriter(out)
	pending := map[int]*batch{}
	next := 0
	var firstErr error
	var st batchStats
	st.labelRows = map[float64]int64{}
	var rows, inBytes int64
	commit := func(b *batch) {
		commitMu.Lock()
		defer commitMu.Unlock()
		pending[b.seq] = b
		for firstErr == nil {
			nb, ok := pending[next]
			if !ok {
				break
			}
			delete(pending, next)
			next++
			if nb.err != nil {
				firstErr = nb.err
				p.halt()
				break
			}
			if _, err := bw.Write(nb.out); err != nil {
				firstErr = err
				p.halt()
				break
			}
			if tally != nil {
				tally.AddAll(nb.sums)
			}
			rows += int64(len(nb.lines))
			inBytes += nb.bytes
			st.merge(&nb.st)
			p.release(nb)
		}
	}

	// Each worker's row buffer, padded off the next one's cache lines.
	type rowBuf struct {
		weight.Row
		_ [64]byte
	}
	bufs := make([]rowBuf, nw)
	p.run(nw, func(i int, b *batch) {
		w := workers[i]
		encodeBatch(w, enc, b, &bufs[i].Row, o, ntext)
		b.sums = w.TakeSums(b.sums)
		if tally != nil {
			b.sums = tally.Unknown(b.sums)
		}
		commit(b)
	})
	readBytes := r.BytesRead()
	if firstErr == nil {
		firstErr = p.err()
	}
	if firstErr != nil {
		return nil, firstErr
	}
	elapsed := time.Since(start).Seconds()

	ws := workers[0].Stats
	for _, w := range workers[1:] {
		ws.Merge(&w.Stats)
	}
	if tally != nil {
		ws.Tally = tally
	}
	var as analysis.Stats
	var dropped []countPair
	for _, w := range workers {
		s := w.Analyzer().Stats()
		as.Tokenizer.Add(s.Tokenizer)
		as.StopDropped += s.StopDropped
		if f := w.Analyzer().Filter(); f != nil {
			for _, d := range f.Dropped() {
				dropped = append(dropped, countPair{d.Word, d.Count})
			}
		}
	}
	s := enc.Spec()
	fig := &report.Figures{
		Command: "encode",
		Input:   o.Name,
		Spec:    s.Fingerprint,
		Mode:    string(s.Content.Mode),
		Docs:    rows,
	}
	if o.Rejects != nil {
		fig.Rejected = o.Rejects.N
	}
	fillTokenFigures(fig, as, dropped, ws.Features[:])
	fig.EmptyDocs = st.empty
	cols := int64(enc.Columns())
	sp := sparsity(rows, cols, &st)
	fig.Sparsity = &sp
	fig.Labels = labelCounts(st.labelRows)
	fig.Fields = FieldFigures(&s.Content, obs.Stats())
	if s.Content.Mode == spec.ModeVocabulary {
		fig.OOV = oovFigures(&ws, o.TopUnseen)
		fig.Curves = Curves(s)
	} else if ws.Tally != nil {
		fig.Collisions = collisionFigures(ws.Tally, s.Content.Hashing.Width)
		if o.Crowded > 0 {
			for _, b := range ws.Tally.Crowded(s.Content.Hashing.Width, o.Crowded) {
				fig.Collisions.Crowded = append(fig.Collisions.Crowded, report.CrowdedBucket{Column: int64(b.Bucket) + int64(o.Base), Keys: b.Keys})
			}
		}
	}
	if readBytes == 0 {
		readBytes = inBytes
	}
	fig.Throughput = throughput(readBytes, rows, elapsed, nw)
	return fig, nil
}

func encodeBatch(w *encode.Worker, enc *encode.Encoder, b *batch, row *weight.Row, o EncodeOptions, ntext int) {
	b.out = b.out[:0]
	b.st.labelRows = map[float64]int64{}
	for i, fields := range b.texts {
		ds, err := w.EncodeFields(fields[:ntext], fields[ntext:], row)
		if err != nil {
			b.err = &RecordError{File: o.Name, Line: b.lines[i], Err: err}
			return
		}
		label, err := enc.Label(b.labels[i], o.LabelFallback)
		if err != nil {
			b.err = &RecordError{File: o.Name, Line: b.lines[i], Err: err}
			return
		}
		if b.labels[i] != nil {
			b.st.labelRows[label]++
		}
		b.out = svmlight.AppendRow(b.out, label, row.Indices, row.Values, o.Base)
		if o.WithIDs && b.ids[i] != nil {
			b.out = append(b.out, " # "...)
			b.out = appendID(b.out, b.ids[i])
		}
		b.out = append(b.out, '\n')
		nnz := int64(len(row.Indices))
		b.st.nnz += nnz
		if nnz > b.st.maxNNZ {
			b.st.maxNNZ = nnz
		}
		if ds.Features == 0 {
			b.st.empty++
		}
		h := 0
		for v := nnz + 1; v > 1; v >>= 1 {
			h++
		}
		for len(b.st.hist) <= h {
			b.st.hist = append(b.st.hist, 0)
		}
		b.st.hist[h]++
	}
}

// appendID writes an id for a "# id" comment: control characters become
// spaces so the row stays on one line.
func appendID(dst, id []byte) []byte {
	for _, c := range id {
		if c < 0x20 || c == 0x7f {
			c = ' '
		}
		dst = append(dst, c)
	}
	return dst
}

func (s *batchStats) merge(o *batchStats) {
	s.nnz += o.nnz
	if o.maxNNZ > s.maxNNZ {
		s.maxNNZ = o.maxNNZ
	}
	s.empty += o.empty
	for len(s.hist) < len(o.hist) {
		s.hist = append(s.hist, 0)
	}
	for i, v := range o.hist {
		s.hist[i] += v
	}
	if s.labelRows == nil {
		s.labelRows = map[float64]int64{}
	}
	for k, v := range o.labelRows {
		s.labelRows[k] += v
	}
}

type countPair struct {
	name  string
	count int64
}

func topCounts(pairs []countPair, n int) []report.Count {
	agg := map[string]int64{}
	for _, p := range pairs {
		agg[p.name] += p.count
	}
	out := make([]report.Count, 0, len(agg))
	for k, v := range agg {
		out = append(out, report.Count{Name: k, Count: v})
	}
	sort.Slice(out, func(i, j int) bool {
		if out[i].Count != out[j].Count {
			return out[i].Count > out[j].Count
		}
		return out[i].Name < out[j].Name
	})
	if n >= 0 && len(out) > n {
		out = out[:n]
	}
	return out
}

func fillTokenFigures(fig *report.Figures, as analysis.Stats, dropped []countPair, features []int64) {
	fig.Tokens = as.Tokenizer.Tokens
	fig.StopDropped = as.StopDropped
	if fig.Tokens > 0 {
		fig.StopShare = float64(fig.StopDropped) / float64(fig.Tokens)
	}
	fig.TopStopWords = topCounts(dropped, 10)
	for _, v := range features {
		fig.Features += v
	}
	fig.InvalidUTF8 = as.Tokenizer.InvalidUTF8
	fig.NULs = as.Tokenizer.NULs
}

func sparsity(rows, cols int64, st *batchStats) report.Sparsity {
	sp := report.Sparsity{Rows: rows, Columns: cols, NNZ: st.nnz, MaxNNZ: st.maxNNZ, NNZHistogram: st.hist}
	if sp.NNZHistogram == nil {
		sp.NNZHistogram = []int64{}
	}
	if rows > 0 {
		sp.MeanNNZ = float64(st.nnz) / float64(rows)
	}
	if rows > 0 && cols > 0 {
		sp.Density = float64(st.nnz) / (float64(rows) * float64(cols))
	}
	sp.Sparsity = 1 - sp.Density
	return sp
}

func labelCounts(m map[float64]int64) []report.Count {
	keys := make([]float64, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	sort.Float64s(keys)
	var out []report.Count
	for _, k := range keys {
		out = append(out, report.Count{Name: strconv.FormatFloat(k, 'g', -1, 64), Count: m[k]})
	}
	return out
}

func share(a, b int64) float64 {
	if b == 0 {
		return 0
	}
	return float64(a) / float64(b)
}

func oovFigures(ws *encode.Stats, top int) *report.OOV {
	o := &report.OOV{}
	for _, code := range ws.Orders() {
		f, u := ws.Features[code], ws.Unseen[code]
		k, uk := ws.Keys(code)
		o.Features += f
		o.Unseen += u
		o.Keys += k
		o.UnseenKeys += uk
		o.ByOrder = append(o.ByOrder, report.OrderOOV{Order: ngram.Order(code).String(), Features: f, Unseen: u,
			Keys: k, UnseenKeys: uk, TokenShare: share(u, f), TypeShare: share(uk, k)})
	}
	o.TokenShare = share(o.Unseen, o.Features)
	o.TypeShare = share(o.UnseenKeys, o.Keys)
	if top == 0 {
		top = 10
	}
	var pairs []countPair
	if ws.TopUnseen != nil {
		pairs = make([]countPair, 0, ws.TopUnseen.Len())
		ws.TopUnseen.Each(func(k string, v int64) { pairs = append(pairs, countPair{k, v}) })
	}
	o.TopUnseen = topCounts(pairs, top)
	return o
}

func collisionFigures(t *hashing.Tally, width uint64) *report.Collisions {
	c := t.Collisions(width)
	return &report.Collisions{Width: c.Width, Keys: c.Keys, Occupied: c.Occupied, ExpectedOccupied: c.ExpectedOccupied,
		Colliding: c.Colliding, Rate: c.Rate, ExpectedRate: c.ExpectedRate}
}

func throughput(bytes, docs int64, secs float64, workers int) report.Throughput {
	t := report.Throughput{Bytes: bytes, Seconds: secs, Workers: workers}
	if secs > 0 {
		t.MBPerSec = float64(bytes) / 1e6 / secs
		t.DocsPerSec = float64(docs) / secs
	}
	if math.IsInf(t.MBPerSec, 0) {
		t.MBPerSec = 0
	}
	return t
}

// errWriter remembers the first write error.
type errWriter struct {
	w   io.Writer
	err error
}

func newErrWriter(w io.Writer) *errWriter { return &errWriter{w: w} }

func (e *errWriter) Write(p []byte) (int, error) {
	if e.err != nil {
		return 0, e.err
	}
	n, err := e.w.Write(p)
	if err != nil {
		e.err = err
	} else if n < len(p) {
		e.err = errors.New("short write")
	}
	return n, e.err
}

// observeFields checks that the reader gives the spec's table fields and
// passes them to observe; a value that cannot be read is a *RecordError
// (skippable under --on-error skip).
func observeFields(name string, rec *corpus.Record, n int, observe func([][]byte) error) error {
	if len(rec.Fields) != n {
		return fmt.Errorf("%s:%d: the corpus reader gives %d table fields, the spec has %d (set corpus.Options.Fields to the spec's fields)", name, rec.Line, len(rec.Fields), n)
	}
	if n == 0 {
		return nil
	}
	if err := observe(rec.Fields); err != nil {
		var fe *tablefield.ValueError
		if errors.As(err, &fe) {
			return &RecordError{File: name, Line: rec.Line, Err: err}
		}
		return fmt.Errorf("%s:%d: %w", name, rec.Line, err)
	}
	return nil
}

// FieldFigures turns the table-field figures of a run into report form,
// next to the numbers frozen in c. stats holds one entry per field of c.
func FieldFigures(c *spec.Content, stats []tablefield.Stat) []report.FieldFigures {
	if len(c.Fields) == 0 || len(stats) != len(c.Fields) {
		return nil
	}
	out := make([]report.FieldFigures, len(stats))
	for i, st := range stats {
		f := &c.Fields[i]
		ff := report.FieldFigures{Name: f.Name, Kind: string(f.Kind), Docs: st.Docs, Missing: st.Missing, MissingShare: share(st.Missing, st.Docs)}
		switch f.Kind {
		case spec.KindCategory:
			if c.Mode != spec.ModeVocabulary {
				break // hashing mode stores no levels to compare with
			}
			ff.Category = &report.CategoryFigures{Levels: int64(len(f.Category.Levels)), LevelsSeen: st.DistinctSeen,
				Other: st.Other, OtherShare: share(st.Other, st.Docs), Unseen: st.Unseen, UnseenShare: share(st.Unseen, st.Docs)}
		case spec.KindNumber:
			n := f.Number
			ff.Number = &report.NumberFigures{Values: st.Values, Mean: st.Mean, SD: st.SD, FrozenMean: n.Mean, FrozenSD: n.SD,
				Min: st.Min, Max: st.Max, FrozenMin: n.Min, FrozenMax: n.Max,
				OutOfRange: st.OutOfRange, OutOfRangeShare: share(st.OutOfRange, st.Docs)}
		case spec.KindTime:
			tf := &report.TimeFigures{Values: st.Values, Layout: f.Time.Layout, Zone: f.Time.Zone}
			if st.Values > 0 {
				tf.First, tf.Last = st.First.Format(time.RFC3339), st.Last.Format(time.RFC3339)
			}
			ff.Time = tf
		}
		out[i] = ff
	}
	return out
}
