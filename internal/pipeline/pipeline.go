// Package pipeline runs learn and encode over a corpus with a pool of
// workers, keeping input order, and gathers the run's figures.
package pipeline

import (
	"errors"
	"fmt"
	"io"
	"runtime"

	"github.com/bowline/bowline/corpus"
)

// batchRecords and batchBytes bound one batch of records handed to a worker.
const (
	batchRecords = 1024
	batchBytes   = 256 << 10
)

// RecordError is a problem with one record found after it was read (a label
// the spec cannot map, say). It names the file and line.
type RecordError struct {
	File string
	Line int64
	Err  error
}

func (e *RecordError) Error() string { return fmt.Sprintf("%s:%d: %v", e.File, e.Line, e.Err) }

func (e *RecordError) Unwrap() error { return e.Err }

// batch is a run of records copied out of the reader, the unit of work.
type batch struct {
	seq    int
	lines  []int64
	texts  [][][]byte
	flat   [][]byte
	labels [][]byte
	ids    [][]byte
	arena  []byte
	spans  []span
	nfield int
	bytes  int64

	out  []byte
	sums []uint64 // hashing mode: key sums for the run's tally
	err  error
	st   batchStats
}

type span struct {
	start, end int
	null       bool
}

type batchStats struct {
	nnz       int64
	maxNNZ    int64
	empty     int64
	hist      []int64
	labelRows map[float64]int64
}

func (b *batch) reset(seq, nfield int) {
	b.seq = seq
	b.nfield = nfield
	b.lines = b.lines[:0]
	b.arena = b.arena[:0]
	b.spans = b.spans[:0]
	b.bytes = 0
	b.out = b.out[:0]
	b.err = nil
	b.st = batchStats{}
}

func (b *batch) add(r *corpus.Record) {
	b.lines = append(b.lines, r.Line)
	put := func(p []byte) {
		if p == nil {
			b.spans = append(b.spans, span{null: true})
			return
		}
		s := len(b.arena)
		b.arena = append(b.arena, p...)
		b.spans = append(b.spans, span{start: s, end: len(b.arena)})
		b.bytes += int64(len(p))
	}
	for _, t := range r.Text {
		put(t)
	}
	for _, f := range r.Fields { // table fields travel after the text fields
		put(f)
	}
	put(r.Label)
	put(r.ID)
}

// seal builds the per-record slices once the arena no longer moves.
func (b *batch) seal() {
	n := len(b.lines)
	per := b.nfield + 2
	b.texts = b.texts[:0]
	b.labels = b.labels[:0]
	b.ids = b.ids[:0]
	get := func(s span) []byte {
		if s.null {
			return nil
		}
		return b.arena[s.start:s.end:s.end]
	}
	b.flat = b.flat[:0]
	for i := 0; i < n; i++ {
		sp := b.spans[i*per : (i+1)*per]
		for f := 0; f < b.nfield; f++ {
			b.flat = append(b.flat, get(sp[f]))
		}
		b.labels = append(b.labels, get(sp[b.nfield]))
		b.ids = append(b.ids, get(sp[b.nfield+1]))
	}
	for i := 0; i < n; i++ {
		b.texts = append(b.texts, b.flat[i*b.nfield:(i+1)*b.nfield:(i+1)*b.nfield])
	}
}

func (b *batch) full() bool { return len(b.lines) >= batchRecords || len(b.arena) >= batchBytes }

// workerCount resolves a --workers value (0 = all cores).
func workerCount(n int) int {
	if n <= 0 {
		n = runtime.GOMAXPROCS(0)
	}
	return n
}

// Rejects collects the records skipped under --on-error skip.
type Rejects struct {
	// W receives each skipped record as stored in the file, one per line.
	W io.Writer
	// N counts skipped records.
	N int64
	// Errors holds the first few error messages.
	Errors []string
}

// MaxRejectErrors is how many error messages Rejects keeps.
const MaxRejectErrors = 10

// Add records one skipped record: err says why, raw is the record as
// stored in the file.
func (rj *Rejects) Add(err error, raw []byte) error {
	rj.N++
	if len(rj.Errors) < MaxRejectErrors {
		rj.Errors = append(rj.Errors, err.Error())
	}
	if _, werr := rj.W.Write(raw); werr != nil {
		return werr
	}
	_, werr := rj.W.Write([]byte{'\n'})
	return werr
}

// batchReader fills batches with the records of a corpus reader, in
// order. It is not safe for concurrent use.
type batchReader struct {
	r      *corpus.Reader
	nfield int
	// onRecord, when not nil, checks each record before it is added; see
	// readBatches.
	onRecord func(*corpus.Record) error
	rj       *Rejects
	seq      int  // number of the next batch
	done     bool // the reader is at its end, or failed
}

// fill resets b and fills it with the next records, up to a batch's
// bounds, numbering it. It reports whether b holds any record. An error
// ends the reading: records that cannot be read, or that onRecord refuses
// with a *RecordError, are skipped into the Rejects instead when there
// are some.
func (br *batchReader) fill(b *batch) (bool, error) {
	b.reset(br.seq, br.nfield)
	for !br.done && !b.full() {
		if !br.r.Scan() {
			err := br.r.Err()
			if err == nil {
				br.done = true
				break
			}
			raw := br.r.Raw()
			if br.rj == nil || !br.r.Skip() {
				br.done = true
				return false, err
			}
			if werr := br.rj.Add(err, raw); werr != nil {
				br.done = true
				return false, werr
			}
			continue
		}
		rec := br.r.Record()
		if br.onRecord != nil {
			if err := br.onRecord(rec); err != nil {
				var re *RecordError
				if br.rj == nil || !errors.As(err, &re) {
					br.done = true
					return false, err
				}
				if werr := br.rj.Add(err, br.r.Raw()); werr != nil {
					br.done = true
					return false, werr
				}
				continue
			}
		}
		b.add(rec)
	}
	if len(b.lines) == 0 {
		return false, nil
	}
	b.seal()
	br.seq++
	return true, nil
}
