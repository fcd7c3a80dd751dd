package main

import (
	"bufio"
	"bytes"
	"io"
	"math"
	"net/http"
	"net/http/httptest"
	"os"
	"strings"
	"testing"
	"time"

	"github.com/bowline/bowline"
	"github.com/bowline/bowline/corpus"
	"github.com/bowline/bowline/internal/demo"
	"github.com/bowline/bowline/internal/learn"
	"github.com/bowline/bowline/internal/pipeline"
	"github.com/bowline/bowline/internal/serve"
	"github.com/bowline/bowline/ngram"
	"github.com/bowline/bowline/spec"
	"github.com/bowline/bowline/tokenize"
	"github.com/bowline/bowline/vocab"
)

// testServer learns a small spec on the invented demo corpus and serves it
// on a loopback port.
func testServer(t *testing.T, maxBody int64) (*bowline.Encoder, *httptest.Server) {
	t.Helper()
	var b bytes.Buffer
	if err := demo.WriteTSV(&b, demo.Options{Docs: 300, Seed: 1}); err != nil {
		t.Fatal(err)
	}
	st := &learn.Settings{Input: spec.Input{Format: "tsv", Text: []string{"text"}}, Tokens: tokenize.DefaultOptions(), Mode: spec.ModeVocabulary,
		Cutoffs: vocab.Cutoffs{MinDocs: 1, MaxDocShare: 1}}
	var err error
	if st.NGrams.Words, err = ngram.ParseWords("1-2"); err != nil { // --words 1-2
		t.Fatal(err)
	}
	l, err := learn.New(st)
	if err != nil {
		t.Fatal(err)
	}
	r, err := corpus.NewReader(&b, "demo.tsv", corpus.Options{Format: corpus.TSV, Text: []string{"text"}})
	if err != nil {
		t.Fatal(err)
	}
	s, _, err := pipeline.Learn(r, l, pipeline.LearnOptions{Name: "demo.tsv", Workers: 1})
	if err != nil {
		t.Fatal(err)
	}
	enc, err := bowline.New(s)
	if err != nil {
		t.Fatal(err)
	}
	h, err := serve.New(enc, serve.Options{MaxBody: maxBody})
	if err != nil {
		t.Fatal(err)
	}
	srv := httptest.NewServer(h)
	t.Cleanup(srv.Close)
	return enc, srv
}

// The pre-built requests are valid HTTP/1.1 requests (read back with
// net/http's own request reader) carrying the documents of the workload.
func TestWorkloadRequests(t *testing.T) {
	texts, err := demoTexts(50)
	if err != nil {
		t.Fatal(err)
	}
	if len(texts) != 50 || strings.Contains(texts[0], "\t") || strings.HasPrefix(texts[0], "20") {
		t.Fatalf("demo texts: %d, first %q", len(texts), texts[0])
	}
	w := newWorkload(texts, 7, "", "127.0.0.1:9", "sha256:ab")
	if len(w.raw) != 50/7 {
		t.Fatalf("%d requests, want %d", len(w.raw), 50/7)
	}
	for i, raw := range w.raw {
		req, err := http.ReadRequest(bufio.NewReader(bytes.NewReader(raw)))
		if err != nil {
			t.Fatal(err)
		}
		body, _ := io.ReadAll(req.Body)
		if req.Method != "POST" || req.URL.Path != "/v1/encode" || req.Host != "127.0.0.1:9" || req.Header.Get("Content-Type") != "application/json" || !bytes.Equal(body, w.bodies[i]) {
			t.Fatalf("request %d: %s %s host %q type %q, body %d bytes", i, req.Method, req.URL, req.Host, req.Header.Get("Content-Type"), len(body))
		}
		d, err := serve.DecodeRequest(bytes.NewReader(body), 0, 0)
		if err != nil || len(d.Documents) != 7 || *d.Documents[0].Text != w.docs[i][0].Text || d.Documents[6].ID != w.docs[i][6].ID {
			t.Fatalf("request %d does not carry its documents (%v)", i, err)
		}
	}
}

func TestCheckAnswer(t *testing.T) {
	w := &workload{spec: "sha256:ab", docs: [][]bowline.Document{make([]bowline.Document, 2)}}
	good := `{"spec":"sha256:ab","rows":[{"id":"pw-1","indices":[1],"values":[0.5],"unseen":0,"features":1},{"id":"pw-2","indices":[],"values":[],"unseen":0,"features":0}]}`
	if err := w.check(0, 200, []byte(good)); err != nil {
		t.Errorf("good answer: %v", err)
	}
	for _, c := range []struct {
		status int
		body   string
	}{
		{413, `{"error":"too large"}`},
		{200, strings.Replace(good, "sha256:ab", "sha256:cd", 1)},
		{200, `{"spec":"sha256:ab","rows":[{"id":"pw-1","indices":[1],"values":[0.5],"unseen":0,"features":1}]}`},
		{200, ``},
	} {
		if err := w.check(0, c.status, []byte(c.body)); err == nil {
			t.Errorf("%d %q accepted", c.status, c.body)
		}
	}
}

// A short run against a real server with each client: every request
// answered and checked, and the in-process stretches counted.
func TestRunLevel(t *testing.T) {
	enc, srv := testServer(t, 0)
	texts, err := demoTexts(200)
	if err != nil {
		t.Fatal(err)
	}
	for _, client := range []string{"raw", "std"} {
		c := &config{url: srv.URL, host: strings.TrimPrefix(srv.URL, "http://"), duration: 300 * time.Millisecond, slice: 100 * time.Millisecond,
			docsPer: 40, requests: 1000, timeout: 5 * time.Second, client: client, rssEvery: time.Second}
		w := newWorkload(texts, c.docsPer, "", c.host, enc.Fingerprint())
		r := runLevel(c, 3, w, enc)
		if r.errors != 0 || r.requests == 0 || r.windowed == 0 || r.windowed > r.requests || r.libDocs == 0 {
			t.Errorf("%s: %d requests (%d in the stretches), %d errors %q, %d documents in process", client, r.requests, r.windowed, r.errors, r.errorSamples, r.libDocs)
		}
		if d := r.elapsed; d != 300*time.Millisecond {
			t.Errorf("%s: HTTP time %v, want the 300ms asked for", client, d)
		}
	}
	// The request budget bounds a level.
	c := &config{url: srv.URL, host: strings.TrimPrefix(srv.URL, "http://"), duration: 10 * time.Second, docsPer: 10, requests: 25, timeout: 5 * time.Second, client: "raw", rssEvery: time.Second}
	r := runLevel(c, 4, newWorkload(texts, 10, "", c.host, enc.Fingerprint()), nil)
	if r.requests != 25 || r.errors != 0 {
		t.Errorf("budget of 25: %d requests, %d errors", r.requests, r.errors)
	}
}

// A refused request (the server closes the connection after a 413) is an
// error, and the raw client carries on over a new connection.
func TestRawClientAfterRefusal(t *testing.T) {
	enc, srv := testServer(t, 2000)
	texts, _ := demoTexts(100)
	host := strings.TrimPrefix(srv.URL, "http://")
	w := newWorkload(texts, 5, "", host, enc.Fingerprint())
	big := newWorkload(texts, 50, "", host, enc.Fingerprint())
	if len(w.bodies[0]) >= 2000 || len(big.bodies[0]) <= 2000 {
		t.Fatalf("bodies of %d and %d bytes do not straddle the 2000-byte limit", len(w.bodies[0]), len(big.bodies[0]))
	}
	w.raw, w.docs = append(w.raw, big.raw[0]), append(w.docs, big.docs[0])
	c := &rawClient{addr: host, timeout: 5 * time.Second, w: w}
	defer c.close()
	if err := c.send(1); err != nil {
		t.Fatal(err)
	}
	if err := c.send(len(w.raw) - 1); err == nil || !strings.Contains(err.Error(), "413") {
		t.Fatalf("oversized request: %v, want a 413 error", err)
	}
	if err := c.send(2); err != nil {
		t.Fatalf("after a refusal: %v", err)
	}
}

// The server's CPU time read from /proc/PID/stat (proc(5): utime and
// stime, fields 14 and 15, in 1/100 s) agrees with getrusage(2) for this
// process, to the clock tick.
func TestProcCPU(t *testing.T) {
	if _, err := os.Stat("/proc/self/stat"); err != nil {
		t.Skip("no /proc on this system")
	}
	x := 0.0
	for start := time.Now(); time.Since(start) < 80*time.Millisecond; {
		for i := range 1000 {
			x += math.Sqrt(float64(i))
		}
	}
	before := selfCPU()
	got, err := procCPU(os.Getpid())
	after := selfCPU()
	if err != nil {
		t.Fatal(err)
	}
	// Ticks truncate: the reading lies within two ticks below getrusage.
	if got > after+10*time.Millisecond || got < before-20*time.Millisecond || got == 0 {
		t.Errorf("/proc says %v, getrusage %v to %v (x %v)", got, before, after, x > 0)
	}
	if d, err := procCPU(0); d != 0 || err != nil {
		t.Errorf("pid 0: %v %v", d, err)
	}
	if _, err := procCPU(1 << 30); err == nil {
		t.Error("no error for a missing process")
	}
}

func TestRSSMedian(t *testing.T) {
	var s []rssSample
	for i, kib := range []int64{9, 50, 40, 60, 45, 70, 1} {
		s = append(s, rssSample{time.Duration(i) * time.Second, kib})
	}
	// Samples at 1..4 s: 50 40 60 45, sorted 40 45 50 60; the upper
	// median of an even count.
	if got := rssMedian(s, time.Second, 5*time.Second); got != 50 {
		t.Errorf("median %d, want 50", got)
	}
	if got := rssMedian(s, 10*time.Second, 20*time.Second); got != 0 {
		t.Errorf("no samples: %d", got)
	}
}
