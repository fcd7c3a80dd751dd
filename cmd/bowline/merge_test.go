package main

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math/rand/v2"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/bowline/bowline/internal/cli"
	"github.com/bowline/bowline/internal/demo"
	"github.com/bowline/bowline/spec"
)

// lifecycleCorpus writes n invented Pellwick documents as one TSV file and
// as three parts of it, and returns their paths.
func lifecycleCorpus(t *testing.T, dir string, n int) (whole string, parts []string) {
	t.Helper()
	var buf bytes.Buffer
	o := demo.DefaultOptions()
	o.Docs = n
	if err := demo.WriteTSV(&buf, o); err != nil {
		t.Fatal(err)
	}
	lines := strings.SplitAfter(buf.String(), "\n")
	header, body := lines[0], lines[1:len(lines)-1]
	whole = filepath.Join(dir, "whole.tsv")
	os.WriteFile(whole, buf.Bytes(), 0o644)
	cuts := []int{0, n / 3, n / 2, n}
	for i := 0; i < 3; i++ {
		p := filepath.Join(dir, fmt.Sprintf("part%d.tsv", i))
		os.WriteFile(p, []byte(header+strings.Join(body[cuts[i]:cuts[i+1]], "")), 0o644)
		parts = append(parts, p)
	}
	return whole, parts
}

var lifecycleArgs = []string{"--text", "text", "--label", "team", "--id", "id", "--stop", "en", "--words", "1-2", "--idf", "smooth", "--norm", "l2", "--progress", "never"}

func loadSpec(t *testing.T, p string) *spec.Spec {
	t.Helper()
	s, err := spec.Load(p)
	if err != nil {
		t.Fatal(err)
	}
	return s
}

// TestMergeDemoShards: bowline learn on the whole demo corpus and bowline
// merge of three count shards of it write the same spec (same
// fingerprint), for several cutoffs.
func TestMergeDemoShards(t *testing.T) {
	dir := t.TempDir()
	whole, parts := lifecycleCorpus(t, dir, 1500)
	var shards []string
	for i, p := range parts {
		sh := filepath.Join(dir, fmt.Sprintf("part%d.counts", i))
		mustRun(t, append([]string{"learn", p, "--counts-out", sh, "--workers", fmt.Sprint(i + 1)}, lifecycleArgs...)...)
		shards = append(shards, sh)
	}
	for _, cut := range [][]string{{}, {"--min-docs", "2"}, {"--min-docs", "3", "--max-doc-share", "0.2", "--max-terms", "800"}} {
		one := filepath.Join(dir, "one.json")
		merged := filepath.Join(dir, "merged.json")
		mustRun(t, append(append([]string{"learn", whole, "-o", one}, lifecycleArgs...), cut...)...)
		mustRun(t, append(append([]string{"merge", "-o", merged}, shards...), cut...)...)
		a, b := loadSpec(t, one), loadSpec(t, merged)
		if a.Fingerprint != b.Fingerprint {
			t.Errorf("cutoffs %v: learn %s, merge %s", cut, a.ShortFingerprint(), b.ShortFingerprint())
		} else {
			t.Logf("cutoffs %v: learn and merge both %s", cut, a.Fingerprint)
		}
	}
	// A shard counted with other settings is refused, naming the setting.
	odd := filepath.Join(dir, "odd.counts")
	mustRun(t, append([]string{"learn", parts[0], "--counts-out", odd, "--stem", "en"}, lifecycleArgs...)...)
	code, stderr := bowline(t, "merge", shards[0], odd, "-o", filepath.Join(dir, "x.json"))
	if code == 0 || !strings.Contains(stderr, "stem") || !strings.Contains(stderr, "odd.counts") {
		t.Errorf("odd shard: exit %d, %s", code, stderr)
	}
	// A damaged shard is refused.
	data, _ := os.ReadFile(shards[1])
	cut := filepath.Join(dir, "cut.counts")
	os.WriteFile(cut, data[:len(data)/2], 0o644)
	if code, stderr := bowline(t, "merge", shards[0], cut, "-o", filepath.Join(dir, "x.json")); code == 0 || !strings.Contains(stderr, "cut.counts") {
		t.Errorf("cut shard: exit %d, %s", code, stderr)
	}
	if _, err := os.Stat(filepath.Join(dir, "x.json")); err == nil {
		t.Error("a refused merge left a spec")
	}
}

// readFeatureMap reads index<TAB>feature<TAB>docs lines into index -> key.
func readFeatureMap(t *testing.T, p string) map[string]string {
	t.Helper()
	b, err := os.ReadFile(p)
	if err != nil {
		t.Fatal(err)
	}
	m := map[string]string{}
	for _, line := range strings.Split(strings.TrimSpace(string(b)), "\n") {
		f := strings.Split(line, "\t")
		m[f[0]] = f[1]
	}
	return m
}

// TestLearnExtendCommand: the refresh through the command line, checked
// through the feature maps a model's owner would compare: every index of
// the old map names the same key in the new map.
func TestLearnExtendCommand(t *testing.T) {
	dir := t.TempDir()
	_, parts := lifecycleCorpus(t, dir, 1500)
	old := filepath.Join(dir, "old.json")
	mustRun(t, append([]string{"learn", parts[0], "-o", old, "--min-docs", "2", "--feature-map", filepath.Join(dir, "old.tsv")}, lifecycleArgs...)...)
	ext := filepath.Join(dir, "new.json")
	stderr := mustRun(t, "learn", parts[2], "--extend", old, "-o", ext, "--max-terms", "50", "--progress", "never", "--feature-map", filepath.Join(dir, "new.tsv"))
	om, nm := readFeatureMap(t, filepath.Join(dir, "old.tsv")), readFeatureMap(t, filepath.Join(dir, "new.tsv"))
	for i, k := range om {
		if nm[i] != k {
			t.Fatalf("feature map index %s: %q became %q", i, k, nm[i])
		}
	}
	if len(nm) != len(om)+50 {
		t.Errorf("new map %d entries, old %d + 50 appended", len(nm), len(om))
	}
	for _, want := range []string{"from the parent at their index", "retired", "50 appended", "left out by --max-terms"} {
		if !strings.Contains(stderr, want) {
			t.Errorf("learn --extend output lacks %q:\n%s", want, stderr)
		}
	}
	o, n := loadSpec(t, old), loadSpec(t, ext)
	if n.Parent != o.Fingerprint || n.Content.Vocabulary.MinDocs != 2 || n.Content.Stem != o.Content.Stem || len(n.Content.Stop.Words) != len(o.Content.Stop.Words) {
		t.Errorf("extended spec: parent %q, min-docs %d (settings should come from the old spec)", n.Parent, n.Content.Vocabulary.MinDocs)
	}
	// Analysis flags that contradict the old spec are refused by name;
	// repeating the old value is fine.
	for _, bad := range [][]string{{"--words", "1-3"}, {"--stem", "en"}, {"--idf", "none"}, {"--hash", "2^10"}, {"--case", "keep"}} {
		code, stderr := bowline(t, append([]string{"learn", parts[2], "--extend", old, "-o", filepath.Join(dir, "x.json")}, bad...)...)
		if code != exitUsage || !strings.HasPrefix(strings.TrimPrefix(stderr, "bowline: "), bad[0]+":") {
			t.Errorf("%v: exit %d, %s", bad, code, stderr)
		}
	}
	mustRun(t, "learn", parts[2], "--extend", old, "-o", filepath.Join(dir, "y.json"), "--words", "1-2", "--stop", "en", "--progress", "never")
	hs := filepath.Join(dir, "hash.json")
	mustRun(t, "learn", parts[0], "-o", hs, "--hash", "2^12", "--progress", "never", "--text", "text")
	if code, stderr := bowline(t, "learn", parts[2], "--extend", hs, "-o", filepath.Join(dir, "x.json")); code != exitUsage || !strings.Contains(stderr, "hashing") {
		t.Errorf("extending a hashing spec: exit %d, %s", code, stderr)
	}
}

// TestInspectCutoffEffects: the cutoff-effect table of inspect --json
// predicts the vocabulary size that learning with those cutoffs gives.
func TestInspectCutoffEffects(t *testing.T) {
	dir := t.TempDir()
	whole, _ := lifecycleCorpus(t, dir, 1200)
	sp := filepath.Join(dir, "s.json")
	mustRun(t, append([]string{"learn", whole, "-o", sp}, lifecycleArgs...)...)
	var out, errb bytes.Buffer
	if code := run([]string{"inspect", sp, "--json", "--top", "5"}, &out, &errb); code != 0 {
		t.Fatalf("inspect: %s", errb.String())
	}
	var v struct {
		Fingerprint string `json:"fingerprint"`
		Vocabulary  struct {
			Keys     int   `json:"keys"`
			Seen     int64 `json:"seen"`
			TopTerms []struct {
				Column int    `json:"column"`
				Key    string `json:"key"`
				Docs   int64  `json:"docs"`
			} `json:"top_terms"`
			ByOrder []struct {
				Order string `json:"order"`
				Kept  int64  `json:"kept"`
				Seen  int64  `json:"seen"`
			} `json:"by_order"`
			Cutoffs struct {
				MinDocs []struct {
					Value   float64 `json:"value"`
					KeysMin int64   `json:"keys_min"`
					KeysMax int64   `json:"keys_max"`
					Exact   bool    `json:"exact"`
				} `json:"min_docs"`
				MaxDocShare []struct {
					Value   float64 `json:"value"`
					KeysMin int64   `json:"keys_min"`
					KeysMax int64   `json:"keys_max"`
				} `json:"max_doc_share"`
			} `json:"cutoff_effects"`
		} `json:"vocabulary"`
	}
	if err := json.Unmarshal(out.Bytes(), &v); err != nil {
		t.Fatal(err)
	}
	if len(v.Vocabulary.TopTerms) != 5 || len(v.Vocabulary.ByOrder) != 2 || v.Vocabulary.Seen != int64(v.Vocabulary.Keys) {
		t.Fatalf("inspect --json: %s", out.String())
	}
	if len(v.Vocabulary.Cutoffs.MinDocs) != 8 || len(v.Vocabulary.Cutoffs.MaxDocShare) != 5 {
		t.Fatalf("cutoff table rows: %s", out.String())
	}
	check := func(flag string, value float64, lo, hi int64) {
		p := filepath.Join(dir, "c.json")
		mustRun(t, append([]string{"learn", whole, "-o", p, flag, fmt.Sprint(value)}, lifecycleArgs...)...)
		n := int64(len(loadSpec(t, p).Content.Vocabulary.Keys))
		if n < lo || n > hi {
			t.Errorf("%s %v: learn keeps %d keys, inspect said %d to %d", flag, value, n, lo, hi)
		}
	}
	for _, r := range v.Vocabulary.Cutoffs.MinDocs {
		if r.Value == 3 || r.Value == 20 || r.Value == 100 {
			check("--min-docs", r.Value, r.KeysMin, r.KeysMax)
		}
	}
	for _, r := range v.Vocabulary.Cutoffs.MaxDocShare {
		if r.Value == 0.05 {
			check("--max-doc-share", r.Value, r.KeysMin, r.KeysMax)
		}
	}
	var text bytes.Buffer
	run([]string{"inspect", sp}, &text, &errb)
	for _, want := range []string{"cutoff effects", "--min-docs", "--max-doc-share", "top 20 terms by document count", "per order"} {
		if !strings.Contains(text.String(), want) {
			t.Errorf("inspect text lacks %q", want)
		}
	}
}

func TestParseSize(t *testing.T) {
	for in, want := range map[string]int64{"512MiB": 512 << 20, "2GB": 2e9, "100M": 100 << 20, "64k": 64 << 10, "1.5GiB": 3 << 29, "4096": 4096, "16 MiB": 16 << 20, "10mb": 10e6} {
		if got, err := cli.ParseSize(in); err != nil || got != want {
			t.Errorf("cli.ParseSize(%q) = %d, %v; want %d", in, got, err, want)
		}
	}
	for _, bad := range []string{"", "MiB", "12 parsecs", "-5M", "1e3M"} {
		if _, err := cli.ParseSize(bad); err == nil {
			t.Errorf("cli.ParseSize(%q) accepted", bad)
		}
	}
}

func TestLifecycleUsage(t *testing.T) {
	dir := t.TempDir()
	_, parts := lifecycleCorpus(t, dir, 60)
	x := filepath.Join(dir, "x.json")
	for _, tc := range []struct {
		args []string
		msg  string
	}{
		{[]string{"--memory-limit", "15MiB", "-o", x}, "16MiB"},
		{[]string{"--memory-limit", "lots", "-o", x}, "not a size"},
		{[]string{"--memory-limit", "64MiB", "--hash", "2^10", "-o", x}, "hashing"},
		{[]string{"--counts-out", x, "--min-docs", "2"}, "--min-docs does not go with --counts-out"},
		{[]string{"--counts-out", x, "-o", filepath.Join(dir, "y.json")}, "-o does not go"},
		{[]string{"--counts-out", x, "--memory-limit", "64MiB"}, "exact counts"},
		{[]string{"--counts-out", x, "--hash", "2^10"}, "hashing"},
	} {
		code, stderr := bowline(t, append([]string{"learn", parts[0]}, tc.args...)...)
		if code != exitUsage || !strings.Contains(stderr, tc.msg) {
			t.Errorf("%v: exit %d, %s", tc.args, code, stderr)
		}
	}
	if code, _ := bowline(t, "merge", "-o", x); code != exitUsage {
		t.Errorf("merge without shards: exit %d", code)
	}
}

var peakRx = regexp.MustCompile(`peak memory ([0-9.]+) MiB`)

// TestMemoryLimitRSS runs learn with --memory-limit in a subprocess on a
// generated corpus of many one-off keys (far more than fit) and checks that
// the peak resident set it reports (the kernel's high-water mark, VmHWM in
// its /proc/self/status, read as it finishes) stays within 10% of the
// limit, and that the pruning figures are reported. (wait4's ru_maxrss
// would do, but Linux folds the parent's resident set into it when the
// child is started with vfork, as Go's os/exec does.)
func TestMemoryLimitRSS(t *testing.T) {
	if testing.Short() {
		t.Skip("-short: skipping the memory-limit subprocess run")
	}
	if _, err := os.Stat("/proc/self/statm"); err != nil {
		t.Skip("no /proc: the memory model needs the process's resident set")
	}
	if raceDetector {
		t.Skip("-race: the race detector's shadow memory multiplies the resident set")
	}
	dir := t.TempDir()
	corpusPath := filepath.Join(dir, "many.txt")
	var b bytes.Buffer
	r := rand.New(rand.NewPCG(1, 2))
	letters := "abcdefghijklmnopqrstuvwxyz"
	for i := 0; i < 60000; i++ {
		for j := 0; j < 10; j++ { // one-off keys
			for k := 0; k < 8; k++ {
				b.WriteByte(letters[r.IntN(26)])
			}
			b.WriteByte(' ')
		}
		for j := 0; j < 5; j++ { // 2000 common keys, about 150 documents each
			fmt.Fprintf(&b, "dock%d ", r.IntN(2000))
		}
		b.WriteByte('\n')
	}
	os.WriteFile(corpusPath, b.Bytes(), 0o644)
	fingerprints := map[string]bool{}
	for _, run := range []struct {
		limit   int64
		workers string
	}{{32 << 20, "1"}, {32 << 20, "2"}, {48 << 20, "2"}} {
		limit := run.limit
		cmd := subcommand(t, "learn", corpusPath, "-o", filepath.Join(dir, "s.json"), "--memory-limit", cli.FormatSize(limit), "--min-docs", "2", "--progress", "never", "--workers", run.workers)
		var stderr bytes.Buffer
		cmd.Stderr = &stderr
		if err := cmd.Run(); err != nil {
			t.Fatalf("learn --memory-limit %s: %v\n%s", cli.FormatSize(limit), err, stderr.String())
		}
		m := peakRx.FindStringSubmatch(stderr.String())
		if m == nil {
			t.Fatalf("learn did not report its peak memory:\n%s", stderr.String())
		}
		mib, _ := strconv.ParseFloat(m[1], 64)
		peak := int64(mib * (1 << 20))
		t.Logf("--memory-limit %s: peak RSS %.1f MiB (%.3f of the limit)", cli.FormatSize(limit), float64(peak)/(1<<20), float64(peak)/float64(limit))
		if float64(peak) > 1.1*float64(limit) {
			t.Errorf("--memory-limit %s: peak RSS %d bytes is more than 10%% above the limit", cli.FormatSize(limit), peak)
		}
		for _, want := range []string{"distinct keys held at once", "pruned", "error bound"} {
			if !strings.Contains(stderr.String(), want) {
				t.Errorf("learn output lacks %q:\n%s", want, stderr.String())
			}
		}
		s := loadSpec(t, filepath.Join(dir, "s.json"))
		p := s.Content.Vocabulary.Seen.Pruning
		if p == nil || p.Evicted == 0 || p.Method != "space-saving" {
			t.Fatalf("no pruning recorded: %+v", p)
		}
		// The 2000 common keys are found in about 150 documents each, far
		// above the error bound, so all of them are kept (every key in
		// min-docs + bound documents or more is kept) and no one-off key
		// passes min-docs 2 (kept counts are never too high).
		if n := len(s.Content.Vocabulary.Keys); n != 2000 || p.MaxDocs > 100 {
			t.Errorf("kept %d keys, bound %d; want the 2000 common keys", n, p.MaxDocs)
		}
		if limit == 32<<20 {
			fingerprints[s.Fingerprint] = true
		}
	}
	// The capacity depends on the limit alone and batches meet in input
	// order: the spec is the same for any worker count.
	if len(fingerprints) != 1 {
		t.Errorf("--memory-limit 32MiB with 1 and 2 workers wrote %d different specs", len(fingerprints))
	}
}
