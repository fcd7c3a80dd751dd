package main

import (
	"bufio"
	"bytes"
	"encoding/json"
	"fmt"
	"io"
	"net"
	"net/http"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"syscall"
	"testing"
	"time"

	"github.com/bowline/bowline/internal/demo"
	"github.com/bowline/bowline/svmlight"
)

// serveLog is a bytes.Buffer safe for the server's log writes.
type serveLog struct {
	mu sync.Mutex
	b  bytes.Buffer
}

func (l *serveLog) Write(p []byte) (int, error) {
	l.mu.Lock()
	defer l.mu.Unlock()
	return l.b.Write(p)
}

func (l *serveLog) String() string {
	l.mu.Lock()
	defer l.mu.Unlock()
	return l.b.String()
}

// logged returns the first log record whose msg is msg, waiting for it.
func (l *serveLog) logged(t *testing.T, msg string, after int) map[string]any {
	t.Helper()
	deadline := time.Now().Add(10 * time.Second)
	for time.Now().Before(deadline) {
		n := 0
		for _, line := range strings.Split(l.String(), "\n") {
			var rec map[string]any
			if json.Unmarshal([]byte(line), &rec) == nil && rec["msg"] == msg {
				if n == after {
					return rec
				}
				n++
			}
		}
		time.Sleep(10 * time.Millisecond)
	}
	t.Fatalf("no log record %q (#%d) in:\n%s", msg, after, l.String())
	return nil
}

func serveDemoSplit(t *testing.T, dir string, n int) {
	t.Helper()
	var all bytes.Buffer
	if err := demo.WriteTSV(&all, demo.Options{Docs: n, Seed: 1}); err != nil {
		t.Fatal(err)
	}
	lines := strings.SplitAfter(strings.TrimSuffix(all.String(), "\n"), "\n")
	ntrain, _ := demo.Split(len(lines) - 1)
	os.WriteFile(filepath.Join(dir, "train.tsv"), []byte(lines[0]+strings.Join(lines[1:1+ntrain], "")), 0o644)
	os.WriteFile(filepath.Join(dir, "test.tsv"), []byte(lines[0]+strings.Join(lines[1+ntrain:], "")+"\n"), 0o644)
}

func serveMustRun(t *testing.T, args ...string) {
	t.Helper()
	var out, errb bytes.Buffer
	if code := run(args, &out, &errb); code != 0 {
		t.Fatalf("bowline %s: exit %d\n%s", strings.Join(args, " "), code, errb.String())
	}
}

// End to end: rows from "bowline serve" equal the rows "bowline encode"
// writes; SIGHUP reloads, a bad file is refused, and SIGTERM (through
// main's signal hook) lets a request in flight finish.
func TestServeCommand(t *testing.T) {
	dir := t.TempDir()
	serveDemoSplit(t, dir, 400)
	p := func(n string) string { return filepath.Join(dir, n) }
	serveMustRun(t, "learn", p("train.tsv"), "-o", p("spec.json"), "--text", "text", "--id", "id", "--stop", "en", "--words", "1-2", "--idf", "smooth", "--norm", "l2", "--progress", "never")
	serveMustRun(t, "encode", "--spec", p("spec.json"), p("test.tsv"), "-o", p("test.svm"), "--with-ids", "--progress", "never")

	var logs serveLog
	done := make(chan error, 1)
	go func() {
		done <- runServe([]string{"--spec", p("spec.json"), "--addr", "127.0.0.1:0", "--max-docs", "500"}, io.Discard, &logs)
	}()
	rec := logs.logged(t, "listening", 0)
	addr, _ := rec["addr"].(string)
	first, _ := rec["spec"].(string)
	url := "http://" + addr

	// Parity with encode.
	f, err := os.Open(p("test.svm"))
	if err != nil {
		t.Fatal(err)
	}
	sr := svmlight.NewReader(f, "test.svm", 1)
	texts := map[string]string{}
	for _, line := range strings.Split(strings.TrimSpace(serveReadFile(t, p("test.tsv"))), "\n")[1:] {
		fs := strings.Split(line, "\t")
		texts[fs[0]] = fs[4] // id, channel, team, sentiment, text, then the table columns
	}
	type doc struct {
		ID   string `json:"id"`
		Text string `json:"text"`
	}
	var docs []doc
	var want []svmlight.Row
	for sr.Scan() {
		r := *sr.Row()
		r.Indices = append([]int(nil), r.Indices...)
		r.Values = append([]float64(nil), r.Values...)
		want = append(want, r)
		docs = append(docs, doc{r.ID, texts[r.ID]})
	}
	f.Close()
	if sr.Err() != nil || len(docs) != 80 {
		t.Fatalf("%d rows from encode: %v", len(docs), sr.Err())
	}
	res := servePost(t, url, map[string]any{"documents": docs})
	if res.Spec != first || len(res.Rows) != len(want) {
		t.Fatalf("spec %s with %d rows", res.Spec, len(res.Rows))
	}
	for i, r := range res.Rows {
		if r.ID != want[i].ID || len(r.Indices) != len(want[i].Indices) {
			t.Fatalf("row %d: %q %v, encode %q %v", i, r.ID, r.Indices, want[i].ID, want[i].Indices)
		}
		for j := range r.Indices {
			if r.Indices[j]-1 != want[i].Indices[j] || r.Values[j] != want[i].Values[j] {
				t.Fatalf("row %d entry %d: serve %d:%v, encode %d:%v", i, j, r.Indices[j], r.Values[j], want[i].Indices[j]+1, want[i].Values[j])
			}
		}
	}

	// SIGHUP with a new spec in the file.
	serveMustRun(t, "learn", p("train.tsv"), "-o", p("spec.json"), "--text", "text", "--hash", "2^16", "--progress", "never")
	syscall.Kill(os.Getpid(), syscall.SIGHUP)
	rec = logs.logged(t, "spec reloaded", 0)
	second, _ := rec["spec"].(string)
	if second == first || serveHealth(t, url) != second {
		t.Fatalf("after SIGHUP: spec %s (was %s), healthz %s", second, first, serveHealth(t, url))
	}
	// SIGHUP with a damaged file: the spec in force stays.
	os.WriteFile(p("spec.json"), []byte(`{"schema":1,`), 0o644)
	syscall.Kill(os.Getpid(), syscall.SIGHUP)
	logs.logged(t, "spec reload failed; the old spec stays in force", 0)
	if got := serveHealth(t, url); got != second {
		t.Fatalf("after a failed reload: %s, want %s", got, second)
	}

	// A request in flight when SIGTERM arrives is answered.
	conn, err := net.Dial("tcp", addr)
	if err != nil {
		t.Fatal(err)
	}
	defer conn.Close()
	body := `{"documents":[{"id":"late","text":"The dock kept my bike"}]}`
	fmt.Fprintf(conn, "POST /v1/encode HTTP/1.1\r\nHost: x\r\nContent-Type: application/json\r\nContent-Length: %d\r\n\r\n%s", len(body), body[:10])
	time.Sleep(100 * time.Millisecond) // the server has started reading
	hook := signalHook.Load()
	if hook == nil {
		t.Fatal("serve set no signal hook")
	}
	(*hook)(syscall.SIGTERM)
	logs.logged(t, "shutting down: no new requests, finishing those in flight", 0)
	fmt.Fprint(conn, body[10:])
	resp, err := http.ReadResponse(bufio.NewReader(conn), nil)
	if err != nil {
		t.Fatal(err)
	}
	if resp.StatusCode != 200 {
		t.Fatalf("request in flight: status %d", resp.StatusCode)
	}
	resp.Body.Close()
	select {
	case err := <-done:
		if err != nil {
			t.Fatal(err)
		}
	case <-time.After(10 * time.Second):
		t.Fatal("serve did not stop")
	}
	if signalHook.Load() != nil {
		t.Error("serve left its signal hook in place")
	}
	if _, err := net.DialTimeout("tcp", addr, time.Second); err == nil {
		t.Error("still listening after shutdown")
	}
}

type serveResponse struct {
	Spec string `json:"spec"`
	Rows []struct {
		ID      string    `json:"id"`
		Indices []int     `json:"indices"`
		Values  []float64 `json:"values"`
	} `json:"rows"`
}

func servePost(t *testing.T, url string, v any) serveResponse {
	t.Helper()
	b, _ := json.Marshal(v)
	res, err := http.Post(url+"/v1/encode", "application/json", bytes.NewReader(b))
	if err != nil {
		t.Fatal(err)
	}
	defer res.Body.Close()
	var out serveResponse
	if err := json.NewDecoder(res.Body).Decode(&out); err != nil || res.StatusCode != 200 {
		t.Fatalf("status %d: %v", res.StatusCode, err)
	}
	return out
}

func serveHealth(t *testing.T, url string) string {
	t.Helper()
	res, err := http.Get(url + "/healthz")
	if err != nil {
		t.Fatal(err)
	}
	defer res.Body.Close()
	var h struct{ Spec string }
	json.NewDecoder(res.Body).Decode(&h)
	return h.Spec
}

func serveReadFile(t *testing.T, p string) string {
	t.Helper()
	b, err := os.ReadFile(p)
	if err != nil {
		t.Fatal(err)
	}
	return string(b)
}

func TestServeUsage(t *testing.T) {
	dir := t.TempDir()
	cases := []struct {
		args []string
		code int
	}{
		{[]string{"serve"}, exitUsage},
		{[]string{"serve", "--spec", "x.json", "extra.tsv"}, exitUsage},
		{[]string{"serve", "--spec", "x.json", "--max-docs", "0"}, exitUsage},
		{[]string{"serve", "--spec", "x.json", "--max-body", "-1"}, exitUsage},
		{[]string{"serve", "--spec", "x.json", "--read-timeout", "0s"}, exitUsage},
		{[]string{"serve", "--spec", "x.json", "--log-level", "loud"}, exitUsage},
		{[]string{"serve", "--spec", filepath.Join(dir, "none.json")}, exitIO},
	}
	for _, c := range cases {
		var out, errb bytes.Buffer
		if code := run(c.args, &out, &errb); code != c.code {
			t.Errorf("bowline %s: exit %d, want %d (%s)", strings.Join(c.args, " "), code, c.code, errb.String())
		}
	}
	os.WriteFile(filepath.Join(dir, "bad.json"), []byte(`{"schema":1}`), 0o644)
	var errb bytes.Buffer
	if code := run([]string{"serve", "--spec", filepath.Join(dir, "bad.json")}, io.Discard, &errb); code != exitSpec {
		t.Errorf("refused spec: exit %d, want %d (%s)", code, exitSpec, errb.String())
	}
}
