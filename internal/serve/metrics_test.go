package serve

import (
	"bufio"
	"fmt"
	"math"
	"regexp"
	"sort"
	"strconv"
	"strings"
	"testing"
	"time"
)

// expoSample is one sample line of the text exposition format.
type expoSample struct {
	name   string
	labels map[string]string
	value  float64
}

// The grammar below is the Prometheus text-based exposition format,
// version 0.0.4, as published in the Prometheus documentation
// ("Exposition formats", section "Text-based format"):
//   - lines are separated by a line feed, and the last line ends with one;
//   - "# HELP name text" and "# TYPE name type" are the only comment lines
//     with meaning; type is counter, gauge, histogram, summary or untyped;
//     at most one of each per metric, and TYPE before the metric's first
//     sample;
//   - a sample is name, optional {label="value",...}, a space, a value
//     parsed as a Go float (with +Inf, -Inf, NaN) and an optional
//     timestamp;
//   - metric names match [a-zA-Z_:][a-zA-Z0-9_:]*, label names
//     [a-zA-Z_][a-zA-Z0-9_]*; label values escape \\, \" and \n;
//   - the samples of one metric form a single group;
//   - a histogram "x" has samples x_bucket with an "le" label, in
//     increasing le, cumulative, ending with le="+Inf", then x_sum and
//     x_count, and the +Inf bucket equals x_count.
var (
	metricNameRe = regexp.MustCompile(`^[a-zA-Z_:][a-zA-Z0-9_:]*$`)
	labelNameRe  = regexp.MustCompile(`^[a-zA-Z_][a-zA-Z0-9_]*$`)
)

func parseExposition(text string) (map[string]string, []expoSample, error) {
	if !strings.HasSuffix(text, "\n") {
		return nil, nil, fmt.Errorf("the last line does not end with a line feed")
	}
	types := map[string]string{}
	helps := map[string]bool{}
	var samples []expoSample
	done := map[string]bool{} // metric groups already closed
	current := ""
	sc := bufio.NewScanner(strings.NewReader(text))
	sc.Buffer(nil, 1<<20)
	for ln := 1; sc.Scan(); ln++ {
		line := sc.Text()
		if line == "" {
			continue
		}
		if strings.HasPrefix(line, "#") {
			f := strings.SplitN(line, " ", 4)
			if len(f) < 3 || (f[1] != "HELP" && f[1] != "TYPE") {
				continue // a plain comment
			}
			name := f[2]
			if !metricNameRe.MatchString(name) {
				return nil, nil, fmt.Errorf("line %d: bad metric name %q", ln, name)
			}
			switch f[1] {
			case "HELP":
				if helps[name] {
					return nil, nil, fmt.Errorf("line %d: second HELP for %s", ln, name)
				}
				helps[name] = true
			case "TYPE":
				if len(f) != 4 {
					return nil, nil, fmt.Errorf("line %d: TYPE without a type", ln)
				}
				switch f[3] {
				case "counter", "gauge", "histogram", "summary", "untyped":
				default:
					return nil, nil, fmt.Errorf("line %d: unknown type %q", ln, f[3])
				}
				if _, ok := types[name]; ok {
					return nil, nil, fmt.Errorf("line %d: second TYPE for %s", ln, name)
				}
				if done[name] || current == name {
					return nil, nil, fmt.Errorf("line %d: TYPE for %s after its samples", ln, name)
				}
				types[name] = f[3]
			}
			continue
		}
		s, err := parseSampleLine(line)
		if err != nil {
			return nil, nil, fmt.Errorf("line %d: %v", ln, err)
		}
		family := s.name
		for _, suf := range []string{"_bucket", "_sum", "_count"} {
			if base := strings.TrimSuffix(s.name, suf); base != s.name && types[base] == "histogram" {
				family = base
			}
		}
		if family != current {
			if done[family] {
				return nil, nil, fmt.Errorf("line %d: samples of %s are not one group", ln, family)
			}
			if current != "" {
				done[current] = true
			}
			current = family
		}
		samples = append(samples, s)
	}
	return types, samples, sc.Err()
}

func parseSampleLine(line string) (expoSample, error) {
	s := expoSample{labels: map[string]string{}}
	i := strings.IndexAny(line, "{ ")
	if i < 0 {
		return s, fmt.Errorf("no value in %q", line)
	}
	s.name = line[:i]
	if !metricNameRe.MatchString(s.name) {
		return s, fmt.Errorf("bad metric name %q", s.name)
	}
	rest := line[i:]
	if rest[0] == '{' {
		rest = rest[1:]
		for {
			if strings.HasPrefix(rest, "}") {
				rest = rest[1:]
				break
			}
			eq := strings.IndexByte(rest, '=')
			if eq < 0 || len(rest) < eq+2 || rest[eq+1] != '"' {
				return s, fmt.Errorf("bad label in %q", line)
			}
			name := rest[:eq]
			if !labelNameRe.MatchString(name) {
				return s, fmt.Errorf("bad label name %q", name)
			}
			rest = rest[eq+2:]
			var v strings.Builder
			closed := false
			for j := 0; j < len(rest); j++ {
				c := rest[j]
				if c == '\\' && j+1 < len(rest) {
					j++
					switch rest[j] {
					case '\\':
						v.WriteByte('\\')
					case '"':
						v.WriteByte('"')
					case 'n':
						v.WriteByte('\n')
					default:
						return s, fmt.Errorf("bad escape \\%c", rest[j])
					}
					continue
				}
				if c == '"' {
					rest = rest[j+1:]
					closed = true
					break
				}
				v.WriteByte(c)
			}
			if !closed {
				return s, fmt.Errorf("unclosed label value in %q", line)
			}
			if _, dup := s.labels[name]; dup {
				return s, fmt.Errorf("label %s twice", name)
			}
			s.labels[name] = v.String()
			rest = strings.TrimPrefix(rest, ",")
		}
	}
	f := strings.Fields(rest)
	if len(f) < 1 || len(f) > 2 || !strings.HasPrefix(rest, " ") {
		return s, fmt.Errorf("bad value part %q", rest)
	}
	v, err := strconv.ParseFloat(f[0], 64)
	if err != nil {
		return s, fmt.Errorf("value %q: %v", f[0], err)
	}
	s.value = v
	if len(f) == 2 {
		if _, err := strconv.ParseInt(f[1], 10, 64); err != nil {
			return s, fmt.Errorf("timestamp %q: %v", f[1], err)
		}
	}
	return s, nil
}

// checkHistograms applies the histogram rules of the format.
func checkHistograms(types map[string]string, samples []expoSample) error {
	for name, typ := range types {
		if typ != "histogram" {
			continue
		}
		var les []float64
		var counts []float64
		count, sum := math.NaN(), math.NaN()
		for _, s := range samples {
			switch s.name {
			case name + "_bucket":
				le, err := strconv.ParseFloat(s.labels["le"], 64)
				if err != nil {
					return fmt.Errorf("%s: le %q", name, s.labels["le"])
				}
				les = append(les, le)
				counts = append(counts, s.value)
			case name + "_count":
				count = s.value
			case name + "_sum":
				sum = s.value
			}
		}
		if len(les) == 0 || !math.IsInf(les[len(les)-1], 1) {
			return fmt.Errorf("%s: no +Inf bucket last", name)
		}
		if !sort.Float64sAreSorted(les) || !sort.Float64sAreSorted(counts) {
			return fmt.Errorf("%s: buckets not increasing and cumulative: %v %v", name, les, counts)
		}
		if math.IsNaN(count) || math.IsNaN(sum) || counts[len(counts)-1] != count {
			return fmt.Errorf("%s: +Inf bucket %v, _count %v, _sum %v", name, counts[len(counts)-1], count, sum)
		}
	}
	return nil
}

func find(samples []expoSample, name string, labels ...string) (float64, bool) {
next:
	for _, s := range samples {
		if s.name != name {
			continue
		}
		for i := 0; i < len(labels); i += 2 {
			if s.labels[labels[i]] != labels[i+1] {
				continue next
			}
		}
		return s.value, true
	}
	return 0, false
}

func TestMetricsExposition(t *testing.T) {
	h, _ := New(demoEncoder(t), Options{MaxDocuments: 2})
	const js = "application/json"
	for i := 0; i < 3; i++ {
		if code, _, b := do(t, h, "POST", "/v1/encode", js, `{"documents":[{"text":"dock 14 would not release"},{"text":"xyzzy plugh"}]}`); code != 200 {
			t.Fatalf("%d %s", code, b)
		}
	}
	do(t, h, "POST", "/v1/encode", js, `{`)
	do(t, h, "POST", "/v1/encode", "text/plain", `{}`)
	do(t, h, "POST", "/v1/encode", js, `{"documents":[{}]}`)
	do(t, h, "POST", "/v1/encode", js, `{"documents":[{"text":"a"},{"text":"b"},{"text":"c"}]}`)
	do(t, h, "GET", "/nowhere", "", "")
	do(t, h, "GET", "/healthz", "", "")
	h.Metrics().observe(20 * time.Second) // beyond the last bucket

	code, hdr, body := do(t, h, "GET", "/metrics", "", "")
	if code != 200 {
		t.Fatal(code)
	}
	// The content type of format 0.0.4 (same documentation).
	if ct := hdr.Get("Content-Type"); ct != "text/plain; version=0.0.4; charset=utf-8" {
		t.Errorf("Content-Type %q", ct)
	}
	types, samples, err := parseExposition(string(body))
	if err != nil {
		t.Fatalf("%v\n%s", err, body)
	}
	if err := checkHistograms(types, samples); err != nil {
		t.Fatalf("%v\n%s", err, body)
	}
	for _, s := range samples {
		if types[strings.TrimSuffix(strings.TrimSuffix(strings.TrimSuffix(s.name, "_bucket"), "_sum"), "_count")] == "" && types[s.name] == "" {
			t.Errorf("sample %s without a TYPE", s.name)
		}
		if types[s.name] == "counter" && s.value < 0 {
			t.Errorf("negative counter %s", s.name)
		}
	}
	want := []struct {
		name   string
		labels []string
		value  float64
	}{
		{"bowline_http_requests_total", []string{"path", "/v1/encode", "code", "200"}, 3},
		{"bowline_http_requests_total", []string{"path", "/v1/encode", "code", "400"}, 1},
		{"bowline_http_requests_total", []string{"path", "/v1/encode", "code", "415"}, 1},
		{"bowline_http_requests_total", []string{"path", "/v1/encode", "code", "422"}, 1},
		{"bowline_http_requests_total", []string{"path", "/v1/encode", "code", "413"}, 1},
		{"bowline_http_requests_total", []string{"path", "other", "code", "404"}, 1},
		{"bowline_http_requests_total", []string{"path", "/healthz", "code", "200"}, 1},
		{"bowline_request_errors_total", []string{"kind", "malformed"}, 1},
		{"bowline_request_errors_total", []string{"kind", "content_type"}, 1},
		{"bowline_request_errors_total", []string{"kind", "no_text"}, 1},
		{"bowline_request_errors_total", []string{"kind", "too_many_documents"}, 1},
		{"bowline_request_errors_total", []string{"kind", "not_found"}, 1},
		{"bowline_documents_total", nil, 6},
		{"bowline_encode_duration_seconds_count", nil, 8}, // 7 POSTs and one 20 s
		{"bowline_encode_duration_seconds_bucket", []string{"le", "10"}, 7},
		{"bowline_encode_duration_seconds_bucket", []string{"le", "+Inf"}, 8},
		{"bowline_http_requests_in_flight", nil, 1}, // the /metrics request itself
		{"bowline_spec_info", []string{"fingerprint", h.Encoder().Fingerprint()}, 1},
	}
	for _, w := range want {
		got, ok := find(samples, w.name, w.labels...)
		if !ok || got != w.value {
			t.Errorf("%s%v = %v (found %v), want %v", w.name, w.labels, got, ok, w.value)
		}
	}
	feat, _ := find(samples, "bowline_features_total")
	unseen, _ := find(samples, "bowline_unseen_features_total")
	if feat <= 0 || unseen <= 0 || unseen > feat {
		t.Errorf("features %v, unseen %v", feat, unseen)
	}
	if sum, _ := find(samples, "bowline_encode_duration_seconds_sum"); sum < 20 {
		t.Errorf("duration sum %v, want at least 20 s", sum)
	}
}

// The parser itself must refuse what the format does not allow, or the
// test above proves nothing.
func TestExpositionParserRefuses(t *testing.T) {
	bad := []string{
		"x 1", // no final line feed
		"# TYPE x counter\n# TYPE x counter\nx 1\n", // two TYPEs
		"x 1\n# TYPE x counter\n",                   // TYPE after samples
		"# TYPE x wobbly\nx 1\n",                    // unknown type
		"x{a=\"b} 1\n",                              // unclosed value
		"x{a=\"\\q\"} 1\n",                          // bad escape
		"x{1a=\"b\"} 1\n",                           // bad label name
		"x one\n",                                   // bad value
		"x 1\ny 2\nx 3\n",                           // not one group
		"9x 1\n",                                    // bad metric name
	}
	for _, b := range bad {
		types, samples, err := parseExposition(b)
		if err == nil {
			err = checkHistograms(types, samples)
		}
		if err == nil {
			t.Errorf("accepted %q", b)
		}
	}
	badHist := "# TYPE h histogram\nh_bucket{le=\"1\"} 5\nh_bucket{le=\"+Inf\"} 4\nh_sum 1\nh_count 4\n"
	types, samples, err := parseExposition(badHist)
	if err != nil || checkHistograms(types, samples) == nil {
		t.Error("accepted a non-cumulative histogram")
	}
	good := "# HELP x a \\\\ help\n# TYPE x counter\nx{a=\"q\\\"\\n\\\\\"} 1.5e3 1700000000000\n"
	_, samples, err = parseExposition(good)
	if err != nil || samples[0].labels["a"] != "q\"\n\\" || samples[0].value != 1500 {
		t.Errorf("refused or misread a good exposition: %v %+v", err, samples)
	}
}

func TestLabelEscaping(t *testing.T) {
	var m Metrics
	m.setSpec("odd \"spec\"\nwith \\ stuff", time.Unix(1700000000, 0))
	var b strings.Builder
	m.WriteTo(&b)
	_, samples, err := parseExposition(b.String())
	if err != nil {
		t.Fatal(err)
	}
	if _, ok := find(samples, "bowline_spec_info", "fingerprint", "odd \"spec\"\nwith \\ stuff"); !ok {
		t.Errorf("label value did not survive escaping:\n%s", b.String())
	}
	if v, _ := find(samples, "bowline_spec_loaded_seconds"); v != 1700000000 {
		t.Errorf("loaded at %v", v)
	}
}
