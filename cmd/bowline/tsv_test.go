package main

import (
	"bytes"
	"os"
	"path/filepath"
	"testing"
)

// TestTSVIsLiteral: TSV fields are literal by default, as the IANA
// text/tab-separated-values registration defines them, so the same
// records give the same rows from TSV, CSV (RFC 4180) and JSON Lines
// (RFC 8259 strings), backslashes included; --tsv-escapes reads an
// escaped export, and the spec remembers it.
func TestTSVIsLiteral(t *testing.T) {
	dir := t.TempDir()
	p := func(n string) string { return filepath.Join(dir, n) }
	os.WriteFile(p("c.tsv"), []byte("team\ttext\nbikes\tC:\\new\\table dock\napp\tcrash \\t twice\n"), 0o644)
	os.WriteFile(p("c.csv"), []byte("team,text\nbikes,C:\\new\\table dock\napp,crash \\t twice\n"), 0o644)
	os.WriteFile(p("c.jsonl"), []byte(`{"team":"bikes","text":"C:\\new\\table dock"}`+"\n"+`{"team":"app","text":"crash \\t twice"}`+"\n"), 0o644)
	mustRun(t, "learn", p("c.tsv"), "--label", "team", "-o", p("s.json"), "--progress", "never")
	var rows [][]byte
	for _, f := range []string{"c.tsv", "c.csv", "c.jsonl"} {
		mustRun(t, "encode", "--spec", p("s.json"), p(f), "-o", p(f+".svm"), "--progress", "never")
		b, _ := os.ReadFile(p(f + ".svm"))
		rows = append(rows, b)
	}
	if !bytes.Equal(rows[0], rows[1]) || !bytes.Equal(rows[1], rows[2]) {
		t.Fatalf("rows differ between formats:\ntsv   %s\ncsv   %s\njsonl %s", rows[0], rows[1], rows[2])
	}
	// "new" and "table" are words of the first record (not "ew", "able").
	fm := p("fm.tsv")
	mustRun(t, "learn", p("c.tsv"), "--label", "team", "-o", p("s2.json"), "--feature-map", fm, "--progress", "never")
	b, _ := os.ReadFile(fm)
	if !bytes.Contains(b, []byte("\tnew\t")) || !bytes.Contains(b, []byte("\ttable\t")) {
		t.Errorf("feature map lacks the literal words:\n%s", b)
	}
	// An escaped export: --tsv-escapes reads "\t" as a tab, and encode
	// takes the setting from the spec.
	os.WriteFile(p("e.tsv"), []byte("team\ttext\nbikes\tflat\\ttyre\n"), 0o644)
	mustRun(t, "learn", p("e.tsv"), "--label", "team", "--tsv-escapes", "-o", p("e.json"), "--feature-map", p("efm.tsv"), "--progress", "never")
	b, _ = os.ReadFile(p("efm.tsv"))
	if !bytes.Contains(b, []byte("\tflat\t")) || !bytes.Contains(b, []byte("\ttyre\t")) {
		t.Errorf("--tsv-escapes: feature map %s", b)
	}
	sp, _ := os.ReadFile(p("e.json"))
	if !bytes.Contains(sp, []byte(`"tsv_escapes":true`)) {
		t.Error("the spec does not record --tsv-escapes")
	}
	mustRun(t, "encode", "--spec", p("e.json"), p("e.tsv"), "-o", p("e.svm"), "--progress", "never")
	if b, _ := os.ReadFile(p("e.svm")); bytes.Count(b, []byte(":")) != 2 {
		t.Errorf("encode with the spec's --tsv-escapes: %s", b)
	}
}
