package main

import (
	"bytes"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/bowline/bowline/internal/demo"
)

// driftFiles writes an invented demo corpus split into dir and learns a
// vocabulary spec on its training part with the bowline learn command.
func driftFiles(t *testing.T, dir string) (specPath, test string) {
	t.Helper()
	var buf bytes.Buffer
	o := demo.DefaultOptions()
	o.Docs = 600
	if err := demo.WriteTSV(&buf, o); err != nil {
		t.Fatal(err)
	}
	lines := strings.SplitAfter(buf.String(), "\n")
	header, body := lines[0], lines[1:len(lines)-1]
	ntrain, _ := demo.Split(len(body))
	train := filepath.Join(dir, "train.tsv")
	test = filepath.Join(dir, "test.tsv")
	os.WriteFile(train, []byte(header+strings.Join(body[:ntrain], "")), 0o644)
	os.WriteFile(test, []byte(header+strings.Join(body[ntrain:], "")), 0o644)
	specPath = filepath.Join(dir, "spec.json")
	var stderr bytes.Buffer
	if code := run([]string{"learn", train, "-o", specPath, "--label", "team", "--words", "1-2", "--min-docs", "2", "--progress", "never"}, &bytes.Buffer{}, &stderr); code != 0 {
		t.Fatalf("learn exit %d: %s", code, stderr.String())
	}
	return specPath, test
}

// TestDriftCommand runs bowline drift with --report FILE.json and checks
// the text on stdout and the JSON field names scripts rely on.
func TestDriftCommand(t *testing.T) {
	dir := t.TempDir()
	specPath, test := driftFiles(t, dir)
	rep := filepath.Join(dir, "drift.json")
	var stdout, stderr bytes.Buffer
	// Flags after the file, as the design allows.
	if code := run([]string{"drift", test, "--spec", specPath, "--report", rep, "--top", "5", "--workers", "2", "--progress", "never"}, &stdout, &stderr); code != 0 {
		t.Fatalf("drift exit %d: %s", code, stderr.String())
	}
	for _, s := range []string{"out-of-vocabulary", "token share", "per n-gram order", "top unseen keys", "keys whose document share moved most", "labels (team)", "JSD"} {
		if !strings.Contains(stdout.String(), s) {
			t.Errorf("stdout lacks %q:\n%s", s, stdout.String())
		}
	}
	b, err := os.ReadFile(rep)
	if err != nil {
		t.Fatal(err)
	}
	var m struct {
		Spec    string           `json:"spec"`
		Docs    int64            `json:"docs"`
		OOV     map[string]any   `json:"oov"`
		ByOrder []map[string]any `json:"by_order"`
		Top     []map[string]any `json:"top_unseen"`
		Moved   []map[string]any `json:"moved"`
		Labels  map[string]any   `json:"labels"`
		Buckets *map[string]any  `json:"buckets"`
	}
	if err := json.Unmarshal(b, &m); err != nil {
		t.Fatal(err)
	}
	if !strings.HasPrefix(m.Spec, "sha256:") || m.Docs != 120 || m.Buckets != nil {
		t.Errorf("spec %q, docs %d, buckets %v; want a fingerprint, 120 docs, no buckets", m.Spec, m.Docs, m.Buckets)
	}
	need := func(what string, obj map[string]any, keys ...string) {
		for _, k := range keys {
			if _, ok := obj[k]; !ok {
				t.Errorf("%s lacks field %q", what, k)
			}
		}
	}
	need("oov", m.OOV, "features", "unseen", "token_share", "keys", "unseen_keys", "type_share")
	if len(m.ByOrder) != 2 || len(m.Top) != 5 || len(m.Moved) != 5 {
		t.Fatalf("%d orders, %d unseen, %d moved; want 2, 5, 5", len(m.ByOrder), len(m.Top), len(m.Moved))
	}
	need("by_order", m.ByOrder[0], "order", "features", "keys", "oov", "columns", "columns_seen", "jsd_bits", "psi")
	need("top_unseen", m.Top[0], "key", "order", "count", "docs")
	need("moved", m.Moved[0], "key", "order", "training_docs", "docs", "training_share", "share", "change")
	need("labels", m.Labels, "field", "labeled", "unlabeled", "labels", "unknown", "jsd_bits", "psi")
	if m.Labels["field"] != "team" {
		t.Errorf("label field %v, want team", m.Labels["field"])
	}
	if share := m.OOV["token_share"].(float64); share <= 0 || share >= 1 {
		t.Errorf("held-out OOV token share %g, want between 0 and 1", share)
	}

	// An HTML report is one self-contained page with plots.
	html := filepath.Join(dir, "drift.html")
	if code := run([]string{"drift", "--spec", specPath, test, "--report", html, "--progress", "never"}, &bytes.Buffer{}, &stderr); code != 0 {
		t.Fatalf("drift --report html exit %d: %s", code, stderr.String())
	}
	if b, err := os.ReadFile(html); err != nil || !bytes.Contains(b, []byte("<svg")) {
		t.Errorf("HTML report without plots (err %v)", err)
	}
}

// TestDriftUsage: command-line mistakes exit with code 2 and write nothing.
func TestDriftUsage(t *testing.T) {
	dir := t.TempDir()
	specPath, test := driftFiles(t, dir)
	rep := filepath.Join(dir, "r.txt")
	for _, args := range [][]string{
		{"drift", test},
		{"drift", "--spec", specPath},
		{"drift", "--spec", specPath, test, "--report", rep},
		{"drift", "--spec", specPath, test, "--top", "0"},
		{"drift", "--spec", specPath, test, "--text", "text", "--text", "channel"},
	} {
		var stderr bytes.Buffer
		if code := run(args, &bytes.Buffer{}, &stderr); code != exitUsage {
			t.Errorf("%q: exit %d, want %d (%s)", args, code, exitUsage, stderr.String())
		}
	}
	if _, err := os.Stat(rep); err == nil {
		t.Error("a report was written despite a usage error")
	}
	var stderr bytes.Buffer
	if code := run([]string{"drift", "--spec", filepath.Join(dir, "missing.json"), test}, &bytes.Buffer{}, &stderr); code != exitIO {
		t.Errorf("missing spec: exit %d, want %d", code, exitIO)
	}
}
