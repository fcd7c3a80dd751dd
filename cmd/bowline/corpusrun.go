package main

import (
	"io"

	"github.com/bowline/bowline/corpus"
	"github.com/bowline/bowline/internal/pipeline"
)

// corpusRun is what every command that reads a corpus sets up: the reader
// (opened by openCorpus, so that a failure gets its exit code), the
// rejects file of --on-error skip and the progress bar.
type corpusRun struct {
	r   *corpus.Reader
	rej *rejectsFile
	bar *progress
}

// startCorpus opens the corpus at path and the rejects file; what names
// the command on the progress bar. Call close when done.
func startCorpus(path string, o corpus.Options, ef *errorFlags, rf *runFlags, stderr io.Writer, what string) (*corpusRun, error) {
	r, err := openCorpus(path, o)
	if err != nil {
		return nil, err
	}
	rej, err := ef.open()
	if err != nil {
		r.Close()
		return nil, err
	}
	return &corpusRun{r: r, rej: rej, bar: newProgress(rf.progress, r.Size(), stderr, what)}, nil
}

// progress is the progress bar's callback, for the pipeline's options.
func (c *corpusRun) progress(bytesRead int64) { c.bar.set(bytesRead) }

// rejects is where skipped records go (nil without --on-error skip).
func (c *corpusRun) rejects() *pipeline.Rejects { return c.rej.rejects() }

// done ends the progress bar and puts the rejects file in place; after a
// failed run, call close alone.
func (c *corpusRun) done(stderr io.Writer) error {
	c.bar.finish()
	return c.rej.commit(stderr)
}

// close closes the reader and removes an uncommitted rejects file.
func (c *corpusRun) close() {
	c.bar.finish()
	c.r.Close()
	c.rej.abort()
}

// summary says what was skipped.
func (c *corpusRun) summary(stderr io.Writer) { c.rej.summary(stderr) }
