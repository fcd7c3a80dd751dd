package pipeline

import (
	"sync"

	"github.com/bowline/bowline/corpus"
)

// A pool is the loop every run shares: a fixed set of batches, and
// workers that each take a free batch, fill it with the next records
// themselves (one at a time, in input order, so batches are numbered in
// that order), and work on it. There is no goroutine that only reads:
// with N workers, N cores are busy and no more. A worker gives its batch
// back with release, at once or once the batch is written or merged.
type pool struct {
	br       *batchReader
	free     chan *batch
	stop     chan struct{}
	stopOnce sync.Once
	mu       sync.Mutex // guards br and readErr
	readErr  error
}

// newPool makes a pool of nbatch batches filled by br.
func newPool(br *batchReader, nbatch int) *pool {
	p := &pool{br: br, free: make(chan *batch, nbatch), stop: make(chan struct{})}
	for range nbatch {
		p.free <- &batch{}
	}
	return p
}

// halt stops the run: no batch is read after it.
func (p *pool) halt() { p.stopOnce.Do(func() { close(p.stop) }) }

// release gives a batch back. It never blocks: the pool holds room for
// every batch.
func (p *pool) release(b *batch) { p.free <- b }

// next waits for a free batch and fills it with the next records; nil at
// the end of the corpus, after a reading error (see err) or once halted.
func (p *pool) next() *batch {
	var b *batch
	select {
	case b = <-p.free:
	case <-p.stop:
		return nil
	}
	p.mu.Lock()
	defer p.mu.Unlock()
	select {
	case <-p.stop:
		p.free <- b
		return nil
	default:
	}
	ok, err := p.br.fill(b)
	if err != nil {
		p.readErr = err
	}
	if !ok {
		p.free <- b
		return nil
	}
	return b
}

// run starts nw workers, each calling work with its number (0 to nw-1)
// for every batch it fills, and waits for them all.
func (p *pool) run(nw int, work func(worker int, b *batch)) {
	var wg sync.WaitGroup
	for i := range nw {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for b := p.next(); b != nil; b = p.next() {
				work(i, b)
			}
		}()
	}
	wg.Wait()
	p.halt()
}

// err is the reading error that ended the run, if any.
func (p *pool) err() error {
	p.mu.Lock()
	defer p.mu.Unlock()
	return p.readErr
}

// ScanOptions control a Scan.
type ScanOptions struct {
	// Workers is the number of goroutines calling work (0 = all cores).
	Workers int
	// Name is the corpus name used in errors.
	Name string
	// Text and Fields are the numbers of text fields and of table fields
	// each record carries (see corpus.Options.Text and Fields).
	Text, Fields int
	// Check, when not nil, sees every record as it is read, in input
	// order, one at a time. An error ends the run; a *RecordError skips
	// the record into Rejects instead when there are some.
	Check func(*corpus.Record) error
	// Progress, when not nil, is called with the bytes read so far.
	Progress func(bytesRead int64)
	// Rejects, when not nil, takes records that cannot be read, or that
	// Check refuses with a *RecordError, instead of ending the run
	// (--on-error skip).
	Rejects *Rejects
}

// Scan reads every record of r once and calls work with each record's
// text fields on o.Workers goroutines; worker numbers the goroutine (0 to
// Workers-1) for state of its own. Which goroutine sees which record
// changes from run to run, so what work gathers must be merged by sums
// or sets to be the same for any worker count. Scan returns the number of
// records passed to work.
func Scan(r *corpus.Reader, o ScanOptions, work func(worker int, texts [][]byte)) (int64, error) {
	nw := workerCount(o.Workers)
	ntext := o.Text
	br := &batchReader{r: r, nfield: ntext + o.Fields, rj: o.Rejects, onRecord: func(rec *corpus.Record) error {
		if o.Progress != nil {
			o.Progress(r.BytesRead())
		}
		if o.Check != nil {
			return o.Check(rec)
		}
		return nil
	}}
	p := newPool(br, 2*nw)
	var mu sync.Mutex
	var docs int64
	p.run(nw, func(w int, b *batch) {
		for _, fields := range b.texts {
			work(w, fields[:ntext])
		}
		mu.Lock()
		docs += int64(len(b.lines))
		mu.Unlock()
		p.release(b)
	})
	if o.Progress != nil {
		o.Progress(r.BytesRead())
	}
	return docs, p.err()
}
