// Command bowline-load sends encode requests to a "bowline serve" on this
// machine from many concurrent clients and reports throughput, latency,
// errors and the server's memory over time.
//
// Usage:
//
//	bowline-load --url http://127.0.0.1:PORT [--clients 64] [--duration 30s]
//	             [--docs-per-request 100] [--pid PID] [--spec SPEC] [--check]
//
// It only talks to loopback addresses, and every run is bounded: each level
// of --clients (a comma list, such as 1,8,64) sends requests for --duration
// or until --requests requests, whichever comes first, and then stops. The
// documents are the invented Pellwick Bike Share corpus. Request bodies
// are built once, before the first level, and each client sends them over
// one kept-alive connection, so the clients cost little next to the server.
//
// With --pid it samples the server's resident memory (VmRSS in
// /proc/PID/status) every --rss-every. With --spec (the server's spec
// file) it also encodes the same requests in this process with the
// bowline library, the way the server's handler does (the same documents,
// the same split of a request across cores), and puts the two side by
// side: each level alternates --slice of in-process encoding with --slice
// of HTTP requests, so both see the same machine load. With --check it
// exits with status 1 when a request failed or the server's RSS at the end
// of a level is more than 10% away from its RSS after the level's first 5
// seconds.
package main

import (
	"bufio"
	"bytes"
	"cmp"
	"encoding/json"
	"errors"
	"flag"
	"fmt"
	"io"
	"math"
	"net"
	"net/http"
	"net/url"
	"os"
	"runtime"
	"runtime/pprof"
	"slices"
	"strconv"
	"strings"
	"sync"
	"sync/atomic"
	"syscall"
	"time"

	"github.com/bowline/bowline"
	"github.com/bowline/bowline/internal/demo"
)

// Bounds of one run.
const (
	maxDuration = 10 * time.Minute
	maxRequests = 50_000_000
)

type config struct {
	url         string
	host        string // host:port of url
	clients     []int
	duration    time.Duration
	docsPer     int
	requests    int64
	pid         int
	rssEvery    time.Duration
	specPath    string
	slice       time.Duration
	corpusDocs  int
	timeout     time.Duration
	client      string
	cpuProfile  string
	check       bool
	rssSettle   time.Duration
	rssTolerate float64
}

func main() {
	if err := run(os.Args[1:], os.Stdout); err != nil {
		fmt.Fprintf(os.Stderr, "bowline-load: %v\n", err)
		if errors.Is(err, errUsage) {
			os.Exit(2)
		}
		os.Exit(1)
	}
}

var errUsage = errors.New("usage")

func usagef(format string, a ...any) error {
	return fmt.Errorf("%w: %s", errUsage, fmt.Sprintf(format, a...))
}

func run(args []string, out io.Writer) error {
	fs := flag.NewFlagSet("bowline-load", flag.ContinueOnError)
	var c config
	var clients string
	fs.StringVar(&c.url, "url", "", "base URL of bowline serve on this machine (http://127.0.0.1:PORT)")
	fs.StringVar(&clients, "clients", "64", "concurrent clients; a comma list runs one level each (1,8,64)")
	fs.DurationVar(&c.duration, "duration", 30*time.Second, "HTTP time of each level (at most 10m)")
	fs.IntVar(&c.docsPer, "docs-per-request", 100, "documents in each request")
	fs.Int64Var(&c.requests, "requests", 5_000_000, "most requests in each level")
	fs.IntVar(&c.pid, "pid", 0, "process id of the server, to sample its resident memory")
	fs.DurationVar(&c.rssEvery, "rss-every", time.Second, "interval between memory samples")
	fs.StringVar(&c.specPath, "spec", "", "the server's spec file: also encode the same requests in this process, alternating with HTTP")
	fs.StringVar(&c.cpuProfile, "cpuprofile", "", "write a CPU profile of bowline-load itself to this file (for pprof)")
	fs.DurationVar(&c.slice, "slice", time.Second, "with --spec: length of each alternating in-process and HTTP stretch")
	fs.IntVar(&c.corpusDocs, "corpus-docs", 2000, "invented documents to draw requests from")
	fs.DurationVar(&c.timeout, "timeout", 10*time.Second, "timeout of one request")
	fs.StringVar(&c.client, "client", "raw", "HTTP client: raw (pre-built HTTP/1.1 requests on kept-alive connections) or std (net/http)")
	fs.BoolVar(&c.check, "check", false, "exit 1 when a request failed or RSS moved more than 10% after the first 5s")
	if err := fs.Parse(args); err != nil {
		if errors.Is(err, flag.ErrHelp) {
			return nil
		}
		return usagef("%v", err)
	}
	if fs.NArg() > 0 {
		return usagef("no arguments expected, got %q", fs.Args())
	}
	c.rssSettle, c.rssTolerate = 5*time.Second, 0.10
	for _, f := range strings.Split(clients, ",") {
		n, err := strconv.Atoi(strings.TrimSpace(f))
		if err != nil || n < 1 || n > 4096 {
			return usagef("--clients: %q is not a number from 1 to 4096", f)
		}
		c.clients = append(c.clients, n)
	}
	switch {
	case c.url == "":
		return usagef("--url is required (http://127.0.0.1:PORT)")
	case c.duration <= 0 || c.duration > maxDuration:
		return usagef("--duration: %v is not within (0, %v]", c.duration, maxDuration)
	case c.requests < 1 || c.requests > maxRequests:
		return usagef("--requests: %d is not within [1, %d]", c.requests, maxRequests)
	case c.docsPer < 1 || c.docsPer > 10000:
		return usagef("--docs-per-request: %d is not within [1, 10000]", c.docsPer)
	case c.corpusDocs < 10:
		return usagef("--corpus-docs: %d is too few", c.corpusDocs)
	case c.rssEvery <= 0:
		return usagef("--rss-every: %v is not positive", c.rssEvery)
	case c.slice <= 0:
		return usagef("--slice: %v is not positive", c.slice)
	case c.client != "raw" && c.client != "std":
		return usagef("--client: %q is not raw or std", c.client)
	}
	base, err := checkLoopback(c.url)
	if err != nil {
		return err
	}
	c.url = base
	u, _ := url.Parse(base)
	c.host = u.Host
	if u.Port() == "" {
		c.host = net.JoinHostPort(u.Hostname(), "80")
	}

	texts, err := demoTexts(c.corpusDocs)
	if err != nil {
		return err
	}
	fingerprint, err := serverSpec(c.url)
	if err != nil {
		return err
	}
	w := newWorkload(texts, c.docsPer, u.Path, u.Host, fingerprint)
	var lib *bowline.Encoder
	if c.specPath != "" {
		lib, err = bowline.Load(c.specPath)
		if err != nil {
			return err
		}
		if lib.Fingerprint() != fingerprint {
			return fmt.Errorf("--spec %s has fingerprint %s but the server encodes with %s", c.specPath, short(lib.Fingerprint()), short(fingerprint))
		}
	}
	fmt.Fprintf(out, "bowline-load: %s, spec %s, %d documents per request (%d distinct requests, %.1f KiB each on average), %v of HTTP per level (at most %d requests), %s client, %d CPUs\n",
		c.url, short(fingerprint), c.docsPer, len(w.bodies), w.meanBody()/1024, c.duration, c.requests, c.client, runtime.NumCPU())
	if lib != nil {
		fmt.Fprintf(out, "in-process: the same requests encoded with the library in this process, alternating %v stretches with HTTP\n", c.slice)
	}
	if c.pid > 0 {
		if _, err := rssKiB(c.pid); err != nil {
			return fmt.Errorf("--pid %d: %v", c.pid, err)
		}
	}

	if c.cpuProfile != "" {
		f, err := os.Create(c.cpuProfile)
		if err != nil {
			return err
		}
		defer f.Close()
		if err := pprof.StartCPUProfile(f); err != nil {
			return err
		}
		defer pprof.StopCPUProfile()
	}
	var results []levelResult
	for _, n := range c.clients {
		results = append(results, runLevel(&c, n, w, lib))
	}

	fmt.Fprintf(out, "\n%7s %9s %10s %11s %8s %8s %8s %7s", "clients", "requests", "req/s", "docs/s", "p50 ms", "p99 ms", "max ms", "errors")
	if lib != nil {
		fmt.Fprintf(out, " %13s %9s", "in-proc doc/s", "HTTP/lib")
		if c.pid > 0 {
			fmt.Fprintf(out, " %10s %9s %13s", "HTTP cores", "lib cores", "per CPU s")
		}
	}
	fmt.Fprintln(out)
	failed := false
	for _, r := range results {
		fmt.Fprintf(out, "%7d %9d %10.1f %11.1f %8.2f %8.2f %8.2f %7d", r.clients, r.requests, r.reqRate(), r.reqRate()*float64(c.docsPer),
			ms(r.quantile(0.50)), ms(r.quantile(0.99)), ms(r.quantile(1)), r.errors)
		if lib != nil {
			fmt.Fprintf(out, " %13.1f %9.2f", r.libRate(), r.reqRate()*float64(c.docsPer)/r.libRate())
			if c.pid > 0 && r.serverCPUErr == nil {
				h, l := r.perCPU(c.docsPer)
				fmt.Fprintf(out, " %10.2f %9.2f %13.2f", (r.serverCPU+r.clientCPU).Seconds()/r.elapsed.Seconds(), r.libCPU.Seconds()/r.libElapsed.Seconds(), h/l)
			}
		}
		fmt.Fprintln(out)
		if r.errors > 0 {
			failed = true
		}
	}
	if lib != nil && c.pid > 0 {
		fmt.Fprintf(out, "\nHTTP/lib: documents per second through HTTP over documents per second in process, each in its own stretches.\n"+
			"cores: CPU seconds per second, server and client together for HTTP, this process for lib (%d CPUs here; less means\n"+
			"other work on the machine took the rest). per CPU s: documents per CPU second through HTTP over the same in process,\n"+
			"the ratio that load from other processes does not skew.\n", runtime.NumCPU())
	}
	for _, r := range results {
		for i, e := range r.errorSamples {
			if i == 0 {
				fmt.Fprintf(out, "\nerrors with %d clients (first %d):\n", r.clients, len(r.errorSamples))
			}
			fmt.Fprintf(out, "  %s\n", e)
		}
	}
	if c.pid > 0 {
		fmt.Fprintf(out, "\nserver RSS (pid %d, VmRSS from /proc/%d/status):\n", c.pid, c.pid)
		for _, r := range results {
			ok := r.reportRSS(out, &c)
			if !ok {
				failed = true
			}
		}
	}
	if c.check && failed {
		return errors.New("targets missed: requests failed or RSS moved more than 10% after the first 5s")
	}
	return nil
}

// checkLoopback returns the URL without a trailing slash when its host is
// a loopback address (or a name that resolves only to loopback addresses).
func checkLoopback(raw string) (string, error) {
	u, err := url.Parse(raw)
	if err != nil {
		return "", usagef("--url: %v", err)
	}
	if u.Scheme != "http" || u.Host == "" || u.User != nil || u.RawQuery != "" {
		return "", usagef("--url: %q is not http://HOST:PORT", raw)
	}
	host := u.Hostname()
	var ips []net.IP
	if ip := net.ParseIP(host); ip != nil {
		ips = []net.IP{ip}
	} else if host == "localhost" {
		ips, err = net.LookupIP(host)
		if err != nil {
			return "", fmt.Errorf("--url: %v", err)
		}
	}
	if len(ips) == 0 {
		return "", usagef("--url: %q is not a loopback address; bowline-load only loads servers on this machine", host)
	}
	for _, ip := range ips {
		if !ip.IsLoopback() {
			return "", usagef("--url: %s is not a loopback address; bowline-load only loads servers on this machine", ip)
		}
	}
	return strings.TrimRight(u.Scheme+"://"+u.Host+u.Path, "/"), nil
}

func serverSpec(base string) (string, error) {
	c := &http.Client{Timeout: 5 * time.Second}
	res, err := c.Get(base + "/v1/spec")
	if err != nil {
		return "", err
	}
	defer res.Body.Close()
	var doc struct {
		Fingerprint string   `json:"fingerprint"`
		Fields      []string `json:"fields"`
	}
	if err := json.NewDecoder(res.Body).Decode(&doc); err != nil || res.StatusCode != 200 {
		return "", fmt.Errorf("GET %s/v1/spec: status %d: %v", base, res.StatusCode, err)
	}
	if len(doc.Fields) != 1 {
		return "", fmt.Errorf("the server's spec reads %d text fields (%v); bowline-load sends one text per document", len(doc.Fields), doc.Fields)
	}
	return doc.Fingerprint, nil
}

// demoTexts returns the text column of n invented documents.
func demoTexts(n int) ([]string, error) {
	var b bytes.Buffer
	if err := demo.WriteTSV(&b, demo.Options{Docs: n, Seed: 2}); err != nil {
		return nil, err
	}
	sc := bufio.NewScanner(&b)
	sc.Scan()
	col := slices.Index(strings.Split(sc.Text(), "\t"), "text")
	if col < 0 {
		return nil, fmt.Errorf("the demo corpus has no text column: %q", sc.Text())
	}
	var texts []string
	for sc.Scan() {
		f := strings.Split(sc.Text(), "\t")
		if col >= len(f) {
			return nil, fmt.Errorf("demo record %q has no column %d", sc.Text(), col+1)
		}
		texts = append(texts, f[col])
	}
	return texts, sc.Err()
}

// A workload is the requests of a run, built once before the first level.
type workload struct {
	docs   [][]bowline.Document // the documents of each request
	bodies [][]byte             // their JSON bodies
	raw    [][]byte             // whole HTTP/1.1 requests, head and body
	path   string               // of the encode endpoint
	spec   string               // the fingerprint every answer must name
}

// newWorkload cuts texts into requests of per documents each (at most 256
// distinct requests) and encodes their bodies.
func newWorkload(texts []string, per int, basePath, host, fingerprint string) *workload {
	type doc struct {
		ID   string `json:"id"`
		Text string `json:"text"`
	}
	w := &workload{path: basePath + "/v1/encode", spec: fingerprint}
	nb := max(1, min(256, len(texts)/per))
	k := 0
	for range nb {
		wire := make([]doc, per)
		docs := make([]bowline.Document, per)
		for j := range wire {
			id := "pw-" + strconv.Itoa(k)
			wire[j] = doc{ID: id, Text: texts[k%len(texts)]}
			docs[j] = bowline.Document{ID: id, Text: texts[k%len(texts)]}
			k++
		}
		body, _ := json.Marshal(map[string]any{"documents": wire})
		head := fmt.Sprintf("POST %s HTTP/1.1\r\nHost: %s\r\nContent-Type: application/json\r\nContent-Length: %d\r\n\r\n", w.path, host, len(body))
		w.docs = append(w.docs, docs)
		w.bodies = append(w.bodies, body)
		w.raw = append(w.raw, append([]byte(head), body...))
	}
	return w
}

func (w *workload) meanBody() float64 {
	n := 0
	for _, b := range w.bodies {
		n += len(b)
	}
	return float64(n) / float64(len(w.bodies))
}

// check checks the answer to request i: status 200, the server's spec, and
// one row per document. Rows are counted by their brackets, which a
// single-byte count finds fast: the answer has one '[' for "rows" and two
// in each row ("indices" and "values"), and none elsewhere, since ids are
// "pw-N" and the rest is numbers and the hexadecimal fingerprint.
func (w *workload) check(i, status int, body []byte) error {
	if status != http.StatusOK {
		return fmt.Errorf("status %d: %s", status, bytes.TrimSpace(body))
	}
	if !bytes.HasPrefix(body, []byte(`{"spec":"`)) || !bytes.HasPrefix(body[len(`{"spec":"`):], []byte(w.spec)) {
		return fmt.Errorf("answer does not name the spec %s: %.60q", short(w.spec), body)
	}
	if n, docs := (bytes.Count(body, []byte("["))-1)/2, len(w.docs[i]); n != docs {
		return fmt.Errorf("%d rows for %d documents", n, docs)
	}
	return nil
}

type rssSample struct {
	at  time.Duration
	kib int64
}

type levelResult struct {
	clients      int
	requests     int64 // sent
	errors       int64
	windowed     int64         // answered within the HTTP stretches
	elapsed      time.Duration // of the HTTP stretches
	latencies    []time.Duration
	errorSamples []string
	rss          []rssSample
	libDocs      int64         // documents encoded in this process within its stretches
	libElapsed   time.Duration // of the in-process stretches

	// CPU time spent on whole requests, answered or encoded, by the
	// server (with --pid) and this process, for the ratio per CPU second
	// that background load on the machine does not skew.
	libAll       int64 // documents encoded in process, within the stretches or just after
	libCPU       time.Duration
	clientCPU    time.Duration // this process, in the HTTP stretches
	serverCPU    time.Duration // the server, in the HTTP stretches (with --pid)
	serverCPUErr error
}

// reqRate is the rate of answers within the HTTP stretches: each stretch
// counts the requests answered before its end and lasts exactly --slice
// (or --duration), so the wait for the last answers of a stretch, when
// fewer clients keep the server busy, is not counted against it.
func (r *levelResult) reqRate() float64 { return float64(r.windowed) / r.elapsed.Seconds() }

func (r *levelResult) libRate() float64 { return float64(r.libDocs) / r.libElapsed.Seconds() }

// perCPU returns the documents per CPU second through HTTP (server and
// client together) and in process.
func (r *levelResult) perCPU(docsPer int) (httpRate, libRate float64) {
	return float64(r.requests*int64(docsPer)) / (r.serverCPU + r.clientCPU).Seconds(), float64(r.libAll) / r.libCPU.Seconds()
}

func (r *levelResult) quantile(q float64) time.Duration {
	if len(r.latencies) == 0 {
		return 0
	}
	i := int(math.Ceil(q*float64(len(r.latencies)))) - 1 // nearest rank: ceil(q*n)
	return r.latencies[max(0, min(i, len(r.latencies)-1))]
}

func ms(d time.Duration) float64 { return float64(d.Microseconds()) / 1e3 }

// A sender sends request i of the workload and checks the answer.
type sender interface {
	send(i int) error
	close()
}

// runLevel runs one level of n clients: --duration of HTTP requests, in
// stretches of --slice alternating with in-process encoding when lib is
// not nil.
func runLevel(c *config, n int, w *workload, lib *bowline.Encoder) levelResult {
	res := levelResult{clients: n}
	var tr *http.Transport
	if c.client == "std" {
		tr = &http.Transport{
			MaxIdleConns:        n,
			MaxIdleConnsPerHost: n,
			MaxConnsPerHost:     n,
			DisableCompression:  true,
			IdleConnTimeout:     30 * time.Second,
		}
		defer tr.CloseIdleConnections()
	}
	senders := make([]sender, n)
	for g := range senders {
		if tr != nil {
			senders[g] = &stdClient{hc: &http.Client{Transport: tr, Timeout: c.timeout}, url: c.url + "/v1/encode", w: w}
		} else {
			senders[g] = &rawClient{addr: c.host, timeout: c.timeout, w: w}
		}
		defer senders[g].close()
	}

	start := time.Now()
	stopRSS := make(chan struct{})
	rssDone := make(chan struct{})
	go func() {
		defer close(rssDone)
		if c.pid <= 0 {
			return
		}
		t := time.NewTicker(c.rssEvery)
		defer t.Stop()
		for {
			select {
			case <-stopRSS:
				return
			case <-t.C:
				if kib, err := rssKiB(c.pid); err == nil {
					res.rss = append(res.rss, rssSample{time.Since(start), kib})
				}
			}
		}
	}()

	var budget atomic.Int64
	budget.Store(c.requests)
	var nerr, windowed atomic.Int64
	var mu sync.Mutex
	per := make([][]time.Duration, n)
	next := make([]int, n)    // next request of each HTTP client
	libNext := make([]int, n) // and of each in-process client
	for g := range n {
		next[g], libNext[g] = g, g
		per[g] = make([]time.Duration, 0, 1024)
	}
	stretch := c.duration
	if lib != nil {
		stretch = c.slice
	}
	for left := c.duration; left > 0 && budget.Load() > 0; left -= stretch {
		d := min(stretch, left)
		if lib != nil {
			cpu0 := selfCPU()
			docs, all, el := inProcess(lib, w, libNext, d)
			res.libCPU += selfCPU() - cpu0
			res.libDocs += docs
			res.libAll += all
			res.libElapsed += el
		}
		client0 := selfCPU()
		server0, serr := procCPU(c.pid)
		t0 := time.Now()
		deadline := t0.Add(d)
		var wg sync.WaitGroup
		for g := range n {
			wg.Add(1)
			go func() {
				defer wg.Done()
				answered := int64(0)
				defer func() { windowed.Add(answered) }()
				for time.Now().Before(deadline) && budget.Add(-1) >= 0 {
					i := next[g] % len(w.raw)
					next[g] += n
					t := time.Now()
					err := senders[g].send(i)
					end := time.Now()
					per[g] = append(per[g], end.Sub(t))
					if end.Before(deadline) {
						answered++
					}
					if err != nil {
						nerr.Add(1)
						mu.Lock()
						if len(res.errorSamples) < 5 {
							res.errorSamples = append(res.errorSamples, err.Error())
						}
						mu.Unlock()
					}
				}
			}()
		}
		wg.Wait()
		res.elapsed += d
		res.clientCPU += selfCPU() - client0
		server1, serr1 := procCPU(c.pid)
		res.serverCPU += server1 - server0
		if res.serverCPUErr == nil {
			res.serverCPUErr = cmp.Or(serr, serr1)
		}
	}
	close(stopRSS)
	<-rssDone
	if c.pid > 0 {
		if kib, err := rssKiB(c.pid); err == nil {
			res.rss = append(res.rss, rssSample{time.Since(start), kib})
		}
	}
	for _, l := range per {
		res.latencies = append(res.latencies, l...)
	}
	slices.Sort(res.latencies)
	res.requests = int64(len(res.latencies))
	res.windowed = windowed.Load()
	res.errors = nerr.Load()
	return res
}

// rawClient sends the workload's pre-built requests over one kept-alive
// HTTP/1.1 connection (RFC 9112) and reads the answers into a buffer it
// keeps: no allocation per request. It understands what "bowline serve"
// answers (a Content-Length body, perhaps "Connection: close"), and
// treats anything else as an error.
type rawClient struct {
	addr    string
	timeout time.Duration
	w       *workload
	conn    net.Conn
	br      *bufio.Reader
	body    []byte
}

func (c *rawClient) send(i int) error {
	if c.conn == nil {
		conn, err := net.DialTimeout("tcp", c.addr, c.timeout)
		if err != nil {
			return err
		}
		c.conn = conn
		if c.br == nil {
			c.br = bufio.NewReaderSize(conn, 32<<10)
		} else {
			c.br.Reset(conn)
		}
	}
	c.conn.SetDeadline(time.Now().Add(c.timeout))
	if _, err := c.conn.Write(c.w.raw[i]); err != nil {
		c.close()
		return err
	}
	status, closing, err := c.read()
	if err != nil {
		c.close()
		return err
	}
	if closing {
		c.close()
	}
	return c.w.check(i, status, c.body)
}

// read reads one answer: status line, header fields, body.
func (c *rawClient) read() (status int, closing bool, err error) {
	line, err := c.br.ReadSlice('\n')
	if err != nil {
		return 0, false, err
	}
	if len(line) < 12 || !bytes.HasPrefix(line, []byte("HTTP/1.")) || line[8] != ' ' {
		return 0, false, fmt.Errorf("bad status line %q", line)
	}
	status, err = strconv.Atoi(string(line[9:12]))
	if err != nil {
		return 0, false, fmt.Errorf("bad status line %q", line)
	}
	length := -1
	for {
		line, err := c.br.ReadSlice('\n')
		if err != nil {
			return 0, false, err
		}
		line = bytes.TrimRight(line, "\r\n")
		if len(line) == 0 {
			break
		}
		name, value, _ := bytes.Cut(line, []byte(":"))
		value = bytes.TrimSpace(value)
		switch {
		case bytes.EqualFold(name, []byte("Content-Length")):
			length, err = strconv.Atoi(string(value))
			if err != nil || length < 0 {
				return 0, false, fmt.Errorf("bad Content-Length %q", value)
			}
		case bytes.EqualFold(name, []byte("Connection")):
			closing = bytes.EqualFold(value, []byte("close"))
		case bytes.EqualFold(name, []byte("Transfer-Encoding")):
			return 0, false, fmt.Errorf("unexpected Transfer-Encoding %q", value)
		}
	}
	if length < 0 {
		return 0, false, errors.New("answer without Content-Length")
	}
	if cap(c.body) < length {
		c.body = make([]byte, length)
	}
	c.body = c.body[:length]
	_, err = io.ReadFull(c.br, c.body)
	return status, closing, err
}

func (c *rawClient) close() {
	if c.conn != nil {
		c.conn.Close()
		c.conn = nil
	}
}

// stdClient sends requests with net/http's client, for comparison.
type stdClient struct {
	hc   *http.Client
	url  string
	w    *workload
	body bytes.Buffer
	rd   bytes.Reader
}

func (c *stdClient) send(i int) error {
	c.rd.Reset(c.w.bodies[i])
	req, err := http.NewRequest("POST", c.url, &c.rd)
	if err != nil {
		return err
	}
	req.Header.Set("Content-Type", "application/json")
	res, err := c.hc.Do(req)
	if err != nil {
		return err
	}
	defer res.Body.Close()
	c.body.Reset()
	if _, err := c.body.ReadFrom(res.Body); err != nil {
		return err
	}
	return c.w.check(i, res.StatusCode, c.body.Bytes())
}

func (c *stdClient) close() {}

// reportRSS prints the memory samples of a level and says whether the end
// is within the tolerance of the first sample after rssSettle.
func (r *levelResult) reportRSS(out io.Writer, c *config) bool {
	if len(r.rss) == 0 {
		fmt.Fprintf(out, "  %d clients: no samples\n", r.clients)
		return !c.check
	}
	var series []string
	for _, s := range r.rss {
		series = append(series, fmt.Sprintf("%.0fs %.1f", s.at.Seconds(), mib(s.kib)))
	}
	fmt.Fprintf(out, "  %d clients, MiB over time: %s\n", r.clients, strings.Join(series, ", "))
	// The first sample at or after rssSettle (allowing for ticker jitter).
	settled := -1
	for i, s := range r.rss {
		if s.at >= c.rssSettle-c.rssEvery/10 {
			settled = i
			break
		}
	}
	end := r.rss[len(r.rss)-1]
	if settled < 0 || settled == len(r.rss)-1 {
		fmt.Fprintf(out, "  %d clients: level too short to compare RSS after %v with the end\n", r.clients, c.rssSettle)
		return true
	}
	first := r.rss[settled]
	ratio := float64(end.kib) / float64(first.kib)
	ok := ratio >= 1-c.rssTolerate && ratio <= 1+c.rssTolerate
	verdict := "within"
	if !ok {
		verdict = "NOT within"
	}
	fmt.Fprintf(out, "  %d clients: RSS at %.0fs %.1f MiB, at the end (%.0fs) %.1f MiB, end/%.0fs = %.3f, %s ±%.0f%%\n",
		r.clients, first.at.Seconds(), mib(first.kib), end.at.Seconds(), mib(end.kib), first.at.Seconds(), ratio, verdict, 100*c.rssTolerate)
	// Single samples move with the collector's cycle; the medians of the
	// 5 s after the first 5 s and of the last 5 s show a trend, if any.
	early, late := rssMedian(r.rss, c.rssSettle, 2*c.rssSettle), rssMedian(r.rss, end.at-c.rssSettle, end.at+1)
	if early > 0 && late > 0 && end.at >= 3*c.rssSettle {
		fmt.Fprintf(out, "  %d clients: median RSS %.0f-%.0fs %.1f MiB, last %.0fs %.1f MiB, ratio %.3f (not the target's measure; for the trend)\n",
			r.clients, c.rssSettle.Seconds(), 2*c.rssSettle.Seconds(), mib(early), c.rssSettle.Seconds(), mib(late), float64(late)/float64(early))
	}
	return ok
}

// rssMedian is the median of the samples taken in [from, to) (0: none).
func rssMedian(samples []rssSample, from, to time.Duration) int64 {
	var v []int64
	for _, s := range samples {
		if s.at >= from && s.at < to {
			v = append(v, s.kib)
		}
	}
	if len(v) == 0 {
		return 0
	}
	slices.Sort(v)
	return v[len(v)/2]
}

func mib(kib int64) float64 { return float64(kib) / 1024 }

// rssKiB reads the resident set size of a process, in KiB, from the VmRSS
// line of /proc/PID/status (Linux proc(5)).
func rssKiB(pid int) (int64, error) {
	b, err := os.ReadFile("/proc/" + strconv.Itoa(pid) + "/status")
	if err != nil {
		return 0, err
	}
	for _, line := range strings.Split(string(b), "\n") {
		if v, ok := strings.CutPrefix(line, "VmRSS:"); ok {
			f := strings.Fields(v)
			if len(f) == 2 && f[1] == "kB" {
				return strconv.ParseInt(f[0], 10, 64)
			}
		}
	}
	return 0, errors.New("no VmRSS line")
}

// parallelMin and the split below are those of the server's handler:
// a request of at least parallelMin documents is cut into
// min(GOMAXPROCS, documents/(parallelMin/2)) ranges encoded at once.
const parallelMin = 32

// inProcess encodes the workload's requests with the library from
// len(next) goroutines for d, each request the way the handler does it
// (every document's texts first, then the rows, split across cores), and
// returns the documents of the requests finished within d, the documents
// of every request finished, and d.
func inProcess(enc *bowline.Encoder, w *workload, next []int, d time.Duration) (windowed, all int64, _ time.Duration) {
	var total, totalAll atomic.Int64
	deadline := time.Now().Add(d)
	var wg sync.WaitGroup
	for g := range next {
		wg.Add(1)
		go func() {
			defer wg.Done()
			done, doneAll := 0, 0
			for time.Now().Before(deadline) {
				docs := w.docs[next[g]%len(w.docs)]
				next[g] += len(next)
				encodeRequest(enc, docs)
				if time.Now().Before(deadline) {
					done += len(docs)
				}
				doneAll += len(docs)
			}
			total.Add(int64(done))
			totalAll.Add(int64(doneAll))
		}()
	}
	wg.Wait()
	return total.Load(), totalAll.Load(), d
}

// selfCPU is the CPU time, user and system, this process has used
// (getrusage(2), RUSAGE_SELF).
func selfCPU() time.Duration {
	var ru syscall.Rusage
	if syscall.Getrusage(syscall.RUSAGE_SELF, &ru) != nil {
		return 0
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}

// procCPU is the CPU time, user and system, process pid has used: fields
// 14 and 15 (utime, stime) of /proc/PID/stat, in clock ticks of 1/100 s
// (USER_HZ on Linux; proc(5)). It is 0 for pid 0.
func procCPU(pid int) (time.Duration, error) {
	if pid <= 0 {
		return 0, nil
	}
	b, err := os.ReadFile("/proc/" + strconv.Itoa(pid) + "/stat")
	if err != nil {
		return 0, err
	}
	// The command name, field 2, is in parentheses and may hold spaces.
	i := bytes.LastIndexByte(b, ')')
	if i < 0 {
		return 0, errors.New("no command name in /proc/PID/stat")
	}
	f := strings.Fields(string(b[i+1:])) // from field 3
	if len(f) < 13 {
		return 0, errors.New("short /proc/PID/stat")
	}
	ut, err1 := strconv.ParseInt(f[11], 10, 64)
	st, err2 := strconv.ParseInt(f[12], 10, 64)
	if err1 != nil || err2 != nil {
		return 0, errors.New("bad utime or stime in /proc/PID/stat")
	}
	return time.Duration(ut+st) * (time.Second / 100), nil
}

func encodeRequest(enc *bowline.Encoder, docs []bowline.Document) []bowline.Row {
	texts := make([][][]byte, len(docs))
	for i, d := range docs {
		texts[i], _ = enc.Texts(d)
	}
	rows := make([]bowline.Row, len(docs))
	encodeRange := func(lo, hi int) {
		for i := lo; i < hi; i++ {
			rows[i], _ = enc.EncodeTexts(docs[i].ID, texts[i])
		}
	}
	if n := len(docs); n >= parallelMin && runtime.GOMAXPROCS(0) > 1 {
		parts := min(runtime.GOMAXPROCS(0), n/(parallelMin/2))
		var wg sync.WaitGroup
		for p := range parts {
			wg.Add(1)
			go func() { defer wg.Done(); encodeRange(p*n/parts, (p+1)*n/parts) }()
		}
		wg.Wait()
	} else {
		encodeRange(0, len(docs))
	}
	return rows
}

func short(fp string) string {
	s := strings.TrimPrefix(fp, "sha256:")
	if len(s) > 12 {
		s = s[:12]
	}
	return s
}
