package main

import (
	"errors"
	"testing"
	"time"
)

func TestCheckLoopback(t *testing.T) {
	ok := map[string]string{
		"http://127.0.0.1:8080":   "http://127.0.0.1:8080",
		"http://127.0.0.1:8080/":  "http://127.0.0.1:8080",
		"http://[::1]:9000":       "http://[::1]:9000",
		"http://127.3.4.5:1":      "http://127.3.4.5:1",
		"http://localhost:8080/x": "http://localhost:8080/x",
	}
	for in, want := range ok {
		got, err := checkLoopback(in)
		if err != nil || got != want {
			t.Errorf("%s: %q %v, want %q", in, got, err, want)
		}
	}
	// RFC 1122 section 3.2.1.3 (127/8) and RFC 4291 section 2.5.3 (::1)
	// are the loopback addresses; anything else is refused.
	for _, in := range []string{"http://10.0.0.1:8080", "http://192.168.1.2", "http://example.com:80", "http://0.0.0.0:8080",
		"https://127.0.0.1:8080", "ftp://127.0.0.1", "127.0.0.1:8080", "http://user@127.0.0.1:1", "http://[::]:80", ""} {
		if _, err := checkLoopback(in); !errors.Is(err, errUsage) {
			t.Errorf("%q: accepted or wrong error (%v)", in, err)
		}
	}
}

// Nearest-rank quantiles (the definition in NIST/SEMATECH e-Handbook of
// Statistical Methods, section 7.2.6.2, "percentiles", recalled from
// memory): the p-quantile of n sorted values is the value of rank
// ceil(p*n).
func TestQuantile(t *testing.T) {
	var r levelResult
	for i := 1; i <= 100; i++ {
		r.latencies = append(r.latencies, time.Duration(i)*time.Millisecond)
	}
	for q, want := range map[float64]time.Duration{0.5: 50 * time.Millisecond, 0.99: 99 * time.Millisecond, 1: 100 * time.Millisecond, 0.001: time.Millisecond} {
		if got := r.quantile(q); got != want {
			t.Errorf("q%v = %v, want %v", q, got, want)
		}
	}
	three := levelResult{latencies: []time.Duration{1, 2, 3}}
	for q, want := range map[float64]time.Duration{0.3: 1, 0.4: 2, 0.5: 2, 0.67: 3} {
		if got := three.quantile(q); got != want {
			t.Errorf("3 values: q%v = %v, want %v", q, got, want)
		}
	}
	if (&levelResult{}).quantile(0.5) != 0 {
		t.Error("empty quantile")
	}
}

func TestUsage(t *testing.T) {
	for _, args := range [][]string{
		{},
		{"--url", "http://127.0.0.1:1", "--clients", "0"},
		{"--url", "http://127.0.0.1:1", "--duration", "11m"},
		{"--url", "http://127.0.0.1:1", "--requests", "0"},
		{"--url", "http://10.1.1.1:1"},
		{"--url", "http://127.0.0.1:1", "extra"},
	} {
		if err := run(args, nil); !errors.Is(err, errUsage) {
			t.Errorf("%q: %v, want a usage error", args, err)
		}
	}
}
