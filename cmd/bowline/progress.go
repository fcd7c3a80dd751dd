package main

import (
	"io"
	"os"
	"sync/atomic"
	"time"

	"github.com/schollz/progressbar/v3"
	"golang.org/x/term"
)

// progress shows bytes read of the corpus on stderr when it is a terminal
// (or always, when asked). Its set method is called from the reading
// goroutine; it only stores the number, and a ticker draws.
type progress struct {
	bar  *progressbar.ProgressBar
	done atomic.Int64
	stop chan struct{}
	exit chan struct{}
}

func newProgress(mode string, size int64, stderr io.Writer, what string) *progress {
	show := mode == "always"
	if mode == "auto" {
		if f, ok := stderr.(*os.File); ok && term.IsTerminal(int(f.Fd())) {
			show = true
		}
	}
	p := &progress{}
	if !show {
		return p
	}
	max := size
	if max <= 0 {
		max = -1
	}
	p.bar = progressbar.NewOptions64(max,
		progressbar.OptionSetWriter(stderr),
		progressbar.OptionSetDescription(what),
		progressbar.OptionShowBytes(true),
		progressbar.OptionSetPredictTime(true),
		progressbar.OptionShowElapsedTimeOnFinish(),
		progressbar.OptionThrottle(100*time.Millisecond),
		progressbar.OptionClearOnFinish(),
	)
	p.stop = make(chan struct{})
	p.exit = make(chan struct{})
	go func() {
		defer close(p.exit)
		t := time.NewTicker(100 * time.Millisecond)
		defer t.Stop()
		for {
			select {
			case <-t.C:
				p.bar.Set64(p.done.Load())
			case <-p.stop:
				return
			}
		}
	}()
	return p
}

func (p *progress) set(n int64) {
	if p.bar != nil {
		p.done.Store(n)
	}
}

// finish ends the bar; a second call does nothing.
func (p *progress) finish() {
	if p.bar == nil {
		return
	}
	close(p.stop)
	<-p.exit
	p.bar.Finish()
	p.bar.Clear()
	p.bar = nil
}
