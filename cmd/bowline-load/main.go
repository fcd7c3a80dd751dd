// Command bowline-load sends encode requests to a "bowline serve" on this
// machine from many concurrent clients and reports throughput, latency,
// errors and the server's memory over time.
//
// Usage:
//
//	bowline-load --url http://127.0.0.1:PORT [--clients 64] [--duration 30s]
//	             [--docs-per-request 8] [--pid PID] [--spec SPEC] [--check]
//
// It only talks to loopback addresses, and every run is bounded: each level
// of --clients (a comma list, such as 1,8,64) runs for --duration or until
// --requests requests, whichever comes first, and then stops. The documents
// are the invented Pellwick Bike Share corpus. With --pid it samples the
// server's resident memory (VmRSS in /proc/PID/status) every --rss-every;
// with --spec it also measures in-process encoding of the same documents
// with the bowline library, for comparison. With --check it exits with
// status 1 when a request failed or the server's RSS at the end of a level
// is more than 10% away from its RSS after the level's first 5 seconds.
package main

import (
	"bufio"
	"bytes"
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
	"slices"
	"strconv"
	"strings"
	"sync"
	"sync/atomic"
	"time"

	"github.com/bowline/bowline"
	"github.com/bowline/bowline/demo"
)

// Bounds of one run.
const (
	maxDuration = 10 * time.Minute
	maxRequests = 50_000_000
)

type config struct {
	url         string
	clients     []int
	duration    time.Duration
	docsPer     int
	requests    int64
	pid         int
	rssEvery    time.Duration
	specPath    string
	inProcess   time.Duration
	corpusDocs  int
	timeout     time.Duration
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
	fs.DurationVar(&c.duration, "duration", 30*time.Second, "length of each level (at most 10m)")
	fs.IntVar(&c.docsPer, "docs-per-request", 8, "documents in each request")
	fs.Int64Var(&c.requests, "requests", 5_000_000, "most requests in each level")
	fs.IntVar(&c.pid, "pid", 0, "process id of the server, to sample its resident memory")
	fs.DurationVar(&c.rssEvery, "rss-every", time.Second, "interval between memory samples")
	fs.StringVar(&c.specPath, "spec", "", "the server's spec file: also time in-process encoding of the same documents")
	fs.DurationVar(&c.inProcess, "in-process", 5*time.Second, "length of each in-process level (with --spec)")
	fs.IntVar(&c.corpusDocs, "corpus-docs", 2000, "invented documents to draw requests from")
	fs.DurationVar(&c.timeout, "timeout", 10*time.Second, "timeout of one request")
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
	}
	base, err := checkLoopback(c.url)
	if err != nil {
		return err
	}
	c.url = base

	texts, err := demoTexts(c.corpusDocs)
	if err != nil {
		return err
	}
	bodies := makeBodies(texts, c.docsPer)
	fingerprint, err := serverSpec(c.url)
	if err != nil {
		return err
	}
	fmt.Fprintf(out, "bowline-load: %s, spec %s, %d documents per request, %v per level (at most %d requests)\n",
		c.url, short(fingerprint), c.docsPer, c.duration, c.requests)
	if c.pid > 0 {
		if _, err := rssKiB(c.pid); err != nil {
			return fmt.Errorf("--pid %d: %v", c.pid, err)
		}
	}

	var inproc map[int]float64
	var lib *bowline.Encoder
	if c.specPath != "" {
		lib, err = bowline.Load(c.specPath)
		if err != nil {
			return err
		}
		if lib.Fingerprint() != fingerprint {
			return fmt.Errorf("--spec %s has fingerprint %s but the server encodes with %s", c.specPath, short(lib.Fingerprint()), short(fingerprint))
		}
		inproc = map[int]float64{}
	}

	var results []levelResult
	for _, n := range c.clients {
		if lib != nil {
			// Right before the level, so both see the same machine load.
			inproc[n] = inProcessRate(lib, texts, n, c.inProcess)
		}
		results = append(results, runLevel(&c, n, bodies))
	}

	fmt.Fprintf(out, "\n%7s %9s %10s %11s %8s %8s %8s %7s", "clients", "requests", "req/s", "docs/s", "p50 ms", "p99 ms", "max ms", "errors")
	if inproc != nil {
		fmt.Fprintf(out, " %13s %9s", "in-proc doc/s", "HTTP/lib")
	}
	fmt.Fprintln(out)
	failed := false
	for _, r := range results {
		fmt.Fprintf(out, "%7d %9d %10.1f %11.1f %8.2f %8.2f %8.2f %7d", r.clients, r.requests, r.reqRate(), r.reqRate()*float64(c.docsPer),
			ms(r.quantile(0.50)), ms(r.quantile(0.99)), ms(r.quantile(1)), r.errors)
		if inproc != nil {
			lib := inproc[r.clients]
			fmt.Fprintf(out, " %13.1f %9.2f", lib, r.reqRate()*float64(c.docsPer)/lib)
		}
		fmt.Fprintln(out)
		if r.errors > 0 {
			failed = true
		}
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
	sc.Scan() // header
	var texts []string
	for sc.Scan() {
		f := strings.Split(sc.Text(), "\t")
		texts = append(texts, f[len(f)-1])
	}
	return texts, sc.Err()
}

// makeBodies builds request bodies ahead of time, so clients spend their
// time waiting for the server, not encoding JSON.
func makeBodies(texts []string, per int) [][]byte {
	type doc struct {
		ID   string `json:"id"`
		Text string `json:"text"`
	}
	nb := max(1, min(256, len(texts)/per))
	bodies := make([][]byte, nb)
	k := 0
	for i := range bodies {
		docs := make([]doc, per)
		for j := range docs {
			docs[j] = doc{ID: "pw-" + strconv.Itoa(k), Text: texts[k%len(texts)]}
			k++
		}
		bodies[i], _ = json.Marshal(map[string]any{"documents": docs})
	}
	return bodies
}

type rssSample struct {
	at  time.Duration
	kib int64
}

type levelResult struct {
	clients      int
	requests     int64
	errors       int64
	elapsed      time.Duration
	latencies    []time.Duration
	errorSamples []string
	rss          []rssSample
}

func (r *levelResult) reqRate() float64 { return float64(r.requests) / r.elapsed.Seconds() }

func (r *levelResult) quantile(q float64) time.Duration {
	if len(r.latencies) == 0 {
		return 0
	}
	i := int(math.Ceil(q*float64(len(r.latencies)))) - 1 // nearest rank: ceil(q*n)
	return r.latencies[max(0, min(i, len(r.latencies)-1))]
}

func ms(d time.Duration) float64 { return float64(d.Microseconds()) / 1e3 }

func runLevel(c *config, clients int, bodies [][]byte) levelResult {
	tr := &http.Transport{
		MaxIdleConns:        clients,
		MaxIdleConnsPerHost: clients,
		MaxConnsPerHost:     clients,
		DisableCompression:  true,
		IdleConnTimeout:     30 * time.Second,
	}
	defer tr.CloseIdleConnections()
	hc := &http.Client{Transport: tr, Timeout: c.timeout}
	res := levelResult{clients: clients}
	var budget atomic.Int64
	budget.Store(c.requests)
	var nerr atomic.Int64
	var mu sync.Mutex
	start := time.Now()
	deadline := start.Add(c.duration)
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
	per := make([][]time.Duration, clients)
	var wg sync.WaitGroup
	for g := 0; g < clients; g++ {
		wg.Add(1)
		go func(g int) {
			defer wg.Done()
			lat := make([]time.Duration, 0, 1024)
			buf := make([]byte, 64<<10)
			for i := g; time.Now().Before(deadline) && budget.Add(-1) >= 0; i += clients {
				body := bodies[i%len(bodies)]
				t0 := time.Now()
				err := send(hc, c.url+"/v1/encode", body, c.docsPer, buf)
				lat = append(lat, time.Since(t0))
				if err != nil {
					nerr.Add(1)
					mu.Lock()
					if len(res.errorSamples) < 5 {
						res.errorSamples = append(res.errorSamples, err.Error())
					}
					mu.Unlock()
				}
			}
			per[g] = lat
		}(g)
	}
	wg.Wait()
	res.elapsed = time.Since(start)
	close(stopRSS)
	<-rssDone
	if c.pid > 0 {
		if kib, err := rssKiB(c.pid); err == nil {
			res.rss = append(res.rss, rssSample{res.elapsed, kib})
		}
	}
	for _, l := range per {
		res.latencies = append(res.latencies, l...)
	}
	slices.Sort(res.latencies)
	res.requests = int64(len(res.latencies))
	res.errors = nerr.Load()
	return res
}

// send posts one body and checks the answer: status 200, and one row per
// document (counted by its "indices" key, cheaper than decoding).
func send(hc *http.Client, u string, body []byte, docs int, buf []byte) error {
	res, err := hc.Post(u, "application/json", bytes.NewReader(body))
	if err != nil {
		return err
	}
	defer res.Body.Close()
	var got bytes.Buffer
	if _, err := io.CopyBuffer(&got, res.Body, buf); err != nil {
		return err
	}
	if res.StatusCode != http.StatusOK {
		return fmt.Errorf("status %d: %s", res.StatusCode, bytes.TrimSpace(got.Bytes()))
	}
	if n := bytes.Count(got.Bytes(), []byte(`"indices":`)); n != docs {
		return fmt.Errorf("%d rows for %d documents", n, docs)
	}
	return nil
}

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
	return ok
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

// inProcessRate encodes the documents with the library from n goroutines
// for d and returns documents per second.
func inProcessRate(enc *bowline.Encoder, texts []string, n int, d time.Duration) float64 {
	var total atomic.Int64
	start := time.Now()
	deadline := start.Add(d)
	var wg sync.WaitGroup
	for g := 0; g < n; g++ {
		wg.Add(1)
		go func(g int) {
			defer wg.Done()
			k := int64(0)
			for i := g; k%64 != 0 || time.Now().Before(deadline); i += n {
				enc.Encode(bowline.Document{Text: texts[i%len(texts)]})
				k++
			}
			total.Add(k)
		}(g)
	}
	wg.Wait()
	return float64(total.Load()) / time.Since(start).Seconds()
}

func short(fp string) string {
	s := strings.TrimPrefix(fp, "sha256:")
	if len(s) > 12 {
		s = s[:12]
	}
	return s
}
