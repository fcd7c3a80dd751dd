package spec_test

import (
	"bytes"
	"compress/gzip"
	"encoding/json"
	"errors"
	"io/fs"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/bowline/bowline/internal/encode"
	"github.com/bowline/bowline/internal/learn/learntest"
	"github.com/bowline/bowline/spec"
	"github.com/bowline/bowline/weight"
)

func TestSaveLoadRoundTrip(t *testing.T) {
	for _, mode := range []spec.Mode{spec.ModeVocabulary, spec.ModeHashing} {
		for _, name := range []string{"spec.json", "spec.json.gz"} {
			sp := learntest.LearnDocs(t, learntest.Settings(mode))
			p := filepath.Join(t.TempDir(), name)
			if err := sp.Save(p); err != nil {
				t.Fatal(err)
			}
			got, err := spec.Load(p)
			if err != nil {
				t.Fatalf("%s %s: %v", mode, name, err)
			}
			if got.Fingerprint != sp.Fingerprint {
				t.Fatalf("fingerprint changed: %s vs %s", got.Fingerprint, sp.Fingerprint)
			}
			a, _ := sp.Content.Canonical()
			b, _ := got.Content.Canonical()
			if !bytes.Equal(a, b) {
				t.Fatalf("%s: content differs after round trip", mode)
			}
			// Encoding with the loaded spec gives the same rows.
			e1, _ := encode.New(sp)
			e2, err := encode.New(got)
			if err != nil {
				t.Fatal(err)
			}
			for _, d := range learntest.Docs {
				r1, _ := e1.Encode([][]byte{[]byte(d)})
				r2, _ := e2.Encode([][]byte{[]byte(d)})
				if !equalRows(r1, r2) {
					t.Fatalf("%s: rows differ for %q", mode, d)
				}
			}
		}
	}
}

func equalRows(a, b weight.Row) bool {
	if len(a.Indices) != len(b.Indices) {
		return false
	}
	for i := range a.Indices {
		if a.Indices[i] != b.Indices[i] || a.Values[i] != b.Values[i] {
			return false
		}
	}
	return true
}

func TestFingerprintIsDeterministic(t *testing.T) {
	a := learntest.LearnDocs(t, learntest.Settings(spec.ModeVocabulary))
	b := learntest.LearnDocs(t, learntest.Settings(spec.ModeVocabulary))
	if a.Fingerprint != b.Fingerprint {
		t.Fatal("same corpus and settings gave different fingerprints")
	}
	s := learntest.Settings(spec.ModeVocabulary)
	s.Norm = weight.NormL1
	if c := learntest.LearnDocs(t, s); c.Fingerprint == a.Fingerprint {
		t.Fatal("a different norm kept the fingerprint")
	}
}

func writeSpec(t *testing.T, sp *spec.Spec) (string, []byte) {
	t.Helper()
	var buf bytes.Buffer
	if err := sp.Write(&buf); err != nil {
		t.Fatal(err)
	}
	return filepath.Join(t.TempDir(), "spec.json"), buf.Bytes()
}

func reason(t *testing.T, p string, data []byte) error {
	t.Helper()
	if err := os.WriteFile(p, data, 0o644); err != nil {
		t.Fatal(err)
	}
	_, err := spec.Load(p)
	var le *spec.LoadError
	if !errors.As(err, &le) {
		t.Fatalf("want a LoadError, got %v", err)
	}
	if !strings.Contains(err.Error(), p) {
		t.Fatalf("error does not name the file: %v", err)
	}
	if !errors.Is(err, le.Reason) {
		t.Fatalf("errors.Is(%v, %v) is false", err, le.Reason)
	}
	return le.Reason
}

func TestLoadRefuses(t *testing.T) {
	sp := learntest.LearnDocs(t, learntest.Settings(spec.ModeVocabulary))
	p, good := writeSpec(t, sp)

	// A changed document count: the content no longer hashes to the
	// recorded fingerprint.
	i := bytes.Index(good, []byte(`"doc_counts":[`))
	j := i + bytes.IndexAny(good[i:], "0123456789")
	tampered := append([]byte(nil), good...)
	tampered[j]++
	if bytes.Equal(tampered, good) {
		t.Fatal("test did not tamper")
	}
	if r := reason(t, p, tampered); r != spec.ErrFingerprint {
		t.Fatalf("tampered: reason %v", r)
	}
	if r := reason(t, p, good[:len(good)/2]); r != spec.ErrTruncated {
		t.Fatalf("truncated: reason %v", r)
	}
	newer := bytes.Replace(good, []byte(`"schema": 1`), []byte(`"schema": 99`), 1)
	if r := reason(t, p, newer); r != spec.ErrNewerSchema {
		t.Fatalf("newer: reason %v", r)
	}
	if r := reason(t, p, []byte(`{"hello": "world"}`)); r != spec.ErrNotSpec {
		t.Fatalf("not a spec: reason %v", r)
	}
	var gz bytes.Buffer
	zw := gzip.NewWriter(&gz)
	zw.Write(good)
	zw.Close()
	if r := reason(t, p, gz.Bytes()[:gz.Len()-10]); r != spec.ErrTruncated {
		t.Fatalf("truncated gzip: reason %v", r)
	}
	_, err := spec.Load(filepath.Join(t.TempDir(), "missing.json"))
	if !errors.Is(err, spec.ErrUnreadable) || !errors.Is(err, fs.ErrNotExist) {
		t.Fatalf("missing file: %v, want spec.ErrUnreadable and fs.ErrNotExist", err)
	}
}

// TestReindentedSpecLoads: whitespace does not change a spec's meaning, so a
// spec whose content was re-indented still loads with its fingerprint.
func TestReindentedSpecLoads(t *testing.T) {
	sp := learntest.LearnDocs(t, learntest.Settings(spec.ModeVocabulary))
	p, good := writeSpec(t, sp)
	var pretty bytes.Buffer
	if err := json.Indent(&pretty, good, "", "\t"); err != nil {
		t.Fatal(err)
	}
	os.WriteFile(p, pretty.Bytes(), 0o644)
	got, err := spec.Load(p)
	if err != nil || got.Fingerprint != sp.Fingerprint {
		t.Fatalf("re-indented spec: %v", err)
	}
}

// TestSettingsDiff: the first setting that differs is named with both
// values; input fields count only when asked.
func TestSettingsDiff(t *testing.T) {
	a, _ := learntest.Settings(spec.ModeVocabulary).Content()
	b, _ := learntest.Settings(spec.ModeVocabulary).Content()
	if d := spec.SettingsDiff(&a, &b, true); d != "" {
		t.Errorf("equal settings differ: %s", d)
	}
	b.NGrams.Words = "1-3"
	b.Weights.Norm = weight.NormL1
	if d := spec.SettingsDiff(&a, &b, true); d != `ngrams.words: "1-2" vs "1-3"` {
		t.Errorf("first difference %q", d)
	}
	b = a
	b.Input.Format = "csv"
	if spec.SettingsDiff(&a, &b, false) != "" || spec.SettingsDiff(&a, &b, true) == "" {
		t.Error("input fields compared when they should not be, or not when they should")
	}
}
