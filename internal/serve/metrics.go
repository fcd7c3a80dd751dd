package serve

import (
	"io"
	"math"
	"strconv"
	"strings"
	"sync"
	"sync/atomic"
	"time"
)

// Paths the metrics count requests by; anything else is "other", so a
// client cannot grow the label set.
var metricPaths = []string{"/v1/encode", "/v1/spec", "/healthz", "/metrics", "other"}

// Status codes the server answers with.
var metricCodes = []int{200, 400, 404, 405, 413, 415, 422, 500}

// Error kinds (see RequestError.Kind).
var errorKinds = []string{"malformed", "too_large", "too_many_documents", "content_type", "no_text", "bad_value", "method", "not_found", "internal"}

// latencyBuckets are the upper bounds, in seconds, of the encode latency
// histogram (the +Inf bucket is implicit).
var latencyBuckets = []float64{0.0005, 0.001, 0.0025, 0.005, 0.01, 0.025, 0.05, 0.1, 0.25, 0.5, 1, 2.5, 5, 10}

// Metrics are the server's counters. The zero value is ready to use; every
// method is safe for concurrent use.
type Metrics struct {
	requests  [5][8]atomic.Uint64 // [path][code]
	documents atomic.Uint64
	errors    [9]atomic.Uint64 // by kind (errorKinds)
	features  atomic.Uint64
	unseen    atomic.Uint64
	buckets   [14]atomic.Uint64 // not cumulative; summed when written
	inf       atomic.Uint64     // beyond the last bucket
	sumNanos  atomic.Int64
	count     atomic.Uint64
	inFlight  atomic.Int64
	reloadsOK atomic.Uint64
	reloadsNo atomic.Uint64

	mu   sync.Mutex
	spec string // fingerprint of the spec in force
	at   time.Time
}

func index[T comparable](list []T, v T) int {
	for i, x := range list {
		if x == v {
			return i
		}
	}
	return -1
}

func (m *Metrics) request(path string, code int) {
	p := index(metricPaths, path)
	if p < 0 {
		p = len(metricPaths) - 1
	}
	c := index(metricCodes, code)
	if c < 0 {
		c = index(metricCodes, 500)
	}
	m.requests[p][c].Add(1)
}

func (m *Metrics) error(kind string) {
	k := index(errorKinds, kind)
	if k < 0 {
		k = index(errorKinds, "internal")
	}
	m.errors[k].Add(1)
}

func (m *Metrics) observe(d time.Duration) {
	s := d.Seconds()
	i := 0
	for i < len(latencyBuckets) && s > latencyBuckets[i] {
		i++
	}
	if i == len(latencyBuckets) {
		m.inf.Add(1)
	} else {
		m.buckets[i].Add(1)
	}
	m.sumNanos.Add(int64(d))
	m.count.Add(1)
}

func (m *Metrics) setSpec(fp string, at time.Time) {
	m.mu.Lock()
	m.spec, m.at = fp, at
	m.mu.Unlock()
}

// WriteTo writes the metrics in the Prometheus text exposition format,
// version 0.0.4: for each metric a "# HELP" and a "# TYPE" line, then its
// samples "name{label="value",...} value". Histogram buckets are
// cumulative, and the "+Inf" bucket equals the _count sample.
func (m *Metrics) WriteTo(w io.Writer) (int64, error) {
	var b []byte
	head := func(name, typ, help string) {
		b = append(b, "# HELP "...)
		b = append(b, name...)
		b = append(b, ' ')
		b = append(b, escapeHelp(help)...)
		b = append(b, "\n# TYPE "...)
		b = append(b, name...)
		b = append(b, ' ')
		b = append(b, typ...)
		b = append(b, '\n')
	}
	sample := func(name string, labels []string, v string) {
		b = append(b, name...)
		if len(labels) > 0 {
			b = append(b, '{')
			for i := 0; i < len(labels); i += 2 {
				if i > 0 {
					b = append(b, ',')
				}
				b = append(b, labels[i]...)
				b = append(b, `="`...)
				b = append(b, escapeLabel(labels[i+1])...)
				b = append(b, '"')
			}
			b = append(b, '}')
		}
		b = append(b, ' ')
		b = append(b, v...)
		b = append(b, '\n')
	}
	u := func(x uint64) string { return strconv.FormatUint(x, 10) }

	head("bowline_http_requests_total", "counter", "HTTP requests answered, by path and status code.")
	for p, path := range metricPaths {
		for c, code := range metricCodes {
			if n := m.requests[p][c].Load(); n > 0 {
				sample("bowline_http_requests_total", []string{"path", path, "code", strconv.Itoa(code)}, u(n))
			}
		}
	}
	head("bowline_http_requests_in_flight", "gauge", "HTTP requests being answered now.")
	sample("bowline_http_requests_in_flight", nil, strconv.FormatInt(m.inFlight.Load(), 10))
	head("bowline_request_errors_total", "counter", "Refused requests, by kind of error.")
	for k, kind := range errorKinds {
		sample("bowline_request_errors_total", []string{"kind", kind}, u(m.errors[k].Load()))
	}
	head("bowline_documents_total", "counter", "Documents encoded.")
	sample("bowline_documents_total", nil, u(m.documents.Load()))
	head("bowline_features_total", "counter", "Feature keys produced by encoded documents.")
	sample("bowline_features_total", nil, u(m.features.Load()))
	head("bowline_unseen_features_total", "counter", "Feature keys not in the spec's vocabulary; divided by bowline_features_total it is the out-of-vocabulary share.")
	sample("bowline_unseen_features_total", nil, u(m.unseen.Load()))

	// _count is written as the bucket total, so it equals the +Inf bucket
	// even while requests finish during the writing.
	head("bowline_encode_duration_seconds", "histogram", "Time to answer POST /v1/encode, from the start of the handler to the last byte written.")
	var cum uint64
	for i, le := range latencyBuckets {
		cum += m.buckets[i].Load()
		sample("bowline_encode_duration_seconds_bucket", []string{"le", formatFloat(le)}, u(cum))
	}
	cum += m.inf.Load()
	sample("bowline_encode_duration_seconds_bucket", []string{"le", "+Inf"}, u(cum))
	sample("bowline_encode_duration_seconds_sum", nil, formatFloat(float64(m.sumNanos.Load())/1e9))
	sample("bowline_encode_duration_seconds_count", nil, u(cum))

	head("bowline_spec_reloads_total", "counter", "Spec reloads, by result.")
	sample("bowline_spec_reloads_total", []string{"result", "ok"}, u(m.reloadsOK.Load()))
	sample("bowline_spec_reloads_total", []string{"result", "failed"}, u(m.reloadsNo.Load()))
	m.mu.Lock()
	fp, at := m.spec, m.at
	m.mu.Unlock()
	head("bowline_spec_info", "gauge", "The spec in force: always 1, with its fingerprint as a label.")
	sample("bowline_spec_info", []string{"fingerprint", fp}, "1")
	head("bowline_spec_loaded_seconds", "gauge", "Unix time the spec in force was loaded.")
	sample("bowline_spec_loaded_seconds", nil, formatFloat(float64(at.UnixMilli())/1e3))
	n, err := w.Write(b)
	return int64(n), err
}

// formatFloat writes a sample value the way Go's ParseFloat reads it back,
// which is what the exposition format asks for ("+Inf", "-Inf", "NaN" for
// the special values).
func formatFloat(v float64) string {
	switch {
	case math.IsInf(v, 1):
		return "+Inf"
	case math.IsInf(v, -1):
		return "-Inf"
	case math.IsNaN(v):
		return "NaN"
	}
	return strconv.FormatFloat(v, 'g', -1, 64)
}

// escapeLabel escapes a label value: backslash, double quote and line feed.
func escapeLabel(s string) string {
	return strings.NewReplacer(`\`, `\\`, `"`, `\"`, "\n", `\n`).Replace(s)
}

// escapeHelp escapes a HELP text: backslash and line feed.
func escapeHelp(s string) string {
	return strings.NewReplacer(`\`, `\\`, "\n", `\n`).Replace(s)
}
