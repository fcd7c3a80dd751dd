package report

import (
	"bytes"
	"encoding/json"
	"encoding/xml"
	"errors"
	"io"
	"math"
	"reflect"
	"regexp"
	"strconv"
	"strings"
	"testing"
)

// Uniform-hashing expectations: the birthday-problem occupancy formula, as
// used for feature hashing by Weinberger et al., "Feature Hashing for Large
// Scale Multitask Learning" (ICML 2009). A key collides when at least one of
// the other n−1 keys lands in its bucket: 1 − (1 − 1/m)^(n−1); a bucket is
// occupied unless all n keys miss it: m·(1 − (1 − 1/m)^n).
func expectedRate(n, m float64) float64     { return 1 - math.Pow(1-1/m, n-1) }
func expectedOccupied(n, m float64) float64 { return m * (1 - math.Pow(1-1/m, n)) }

const (
	hashKeys  = 38412
	hashWidth = 1 << 20
	colliding = 1402
)

// hashingFigures is a hashing-mode run with figures consistent with each
// other (shares are the quotients of the counts they name).
func hashingFigures() *Figures {
	return &Figures{
		Command:      "encode",
		Input:        "tickets.tsv",
		Spec:         "sha256:9f2c",
		Mode:         "hashing",
		Docs:         5000,
		EmptyDocs:    102,
		Tokens:       240000,
		StopDropped:  60000,
		StopShare:    0.25,
		TopStopWords: []Count{{"the", 9000}, {"a", 7000}, {"to", 6000}, {"and", 5000}, {"i", 4000}, {"of", 3000}},
		Features:     180000,
		Collisions: &Collisions{
			Width:            hashWidth,
			Keys:             hashKeys,
			Occupied:         37700,
			ExpectedOccupied: expectedOccupied(hashKeys, hashWidth),
			Colliding:        colliding,
			Rate:             float64(colliding) / hashKeys,
			ExpectedRate:     expectedRate(hashKeys, hashWidth),
		},
		Sparsity: &Sparsity{
			Rows: 5000, Columns: hashWidth, NNZ: 150000,
			MeanNNZ: 30, MaxNNZ: 400,
			Density:      150000 / (5000.0 * hashWidth),
			Sparsity:     1 - 150000/(5000.0*hashWidth),
			NNZHistogram: []int64{102, 10, 200, 1500, 2500, 600, 80, 7, 1},
		},
		Labels:     []Count{{"billing", 1300}, {"bikes", 1250}, {"docks", 1200}, {"app", 1250}},
		Throughput: Throughput{Bytes: 2_400_000, Seconds: 0.5, MBPerSec: 4.8, DocsPerSec: 10000, Workers: 4},
	}
}

// vocabFigures is a vocabulary-mode run whose keys include markup.
func vocabFigures() *Figures {
	return &Figures{
		Command:  "encode",
		Input:    "held-out.tsv",
		Mode:     "vocabulary",
		Docs:     1000,
		Tokens:   20000,
		Features: 30000,
		OOV: &OOV{
			TokenShare: 1500.0 / 30000, TypeShare: 900.0 / 6000,
			Features: 30000, Unseen: 1500, Keys: 6000, UnseenKeys: 900,
			ByOrder: []OrderOOV{
				{Order: "w1", Features: 18000, Unseen: 360, Keys: 3000, UnseenKeys: 300, TokenShare: 0.02, TypeShare: 0.1},
				{Order: "w2", Features: 12000, Unseen: 1140, Keys: 3000, UnseenKeys: 600, TokenShare: 0.095, TypeShare: 0.2},
			},
			TopUnseen: []Count{{"<script>alert(1)</script>", 12}, {"harlow quay", 9}},
		},
		Sparsity: &Sparsity{Rows: 1000, Columns: 5100, NNZ: 25000, MeanNNZ: 25, MaxNNZ: 90,
			Density: 25000 / (1000.0 * 5100), Sparsity: 1 - 25000/(1000.0*5100), NNZHistogram: []int64{3, 20, 100, 500, 370, 7}},
		Vocabulary: &VocabFigures{
			Seen: 9000, Kept: 5100, BelowMinDocs: 3800, AboveMaxShare: 100, OverMaxTerms: 0,
			ByOrder:  []Count{{"w1", 3000}, {"w2", 2100}},
			TopTerms: []Count{{"dock", 410}, {"<b>&amp;", 300}, {"refund", 250}},
		},
	}
}

func TestJSONRoundTrip(t *testing.T) {
	for name, f := range map[string]*Figures{"hashing": hashingFigures(), "vocabulary": vocabFigures()} {
		var buf bytes.Buffer
		if err := f.WriteJSON(&buf); err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		if !strings.HasSuffix(buf.String(), "}\n") {
			t.Errorf("%s: JSON does not end in a newline", name)
		}
		if !strings.HasPrefix(buf.String(), "{\n  \"command\": ") {
			t.Errorf("%s: JSON not indented by two spaces: %.40q", name, buf.String())
		}
		var back Figures
		if err := json.Unmarshal(buf.Bytes(), &back); err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		if !reflect.DeepEqual(&back, f) {
			t.Errorf("%s: round trip changed the figures:\n got %+v\nwant %+v", name, back, *f)
		}
	}
}

// TestJSONFieldNames pins a few documented field names: scripts read them.
func TestJSONFieldNames(t *testing.T) {
	get := func(f *Figures) map[string]any {
		var buf bytes.Buffer
		if err := f.WriteJSON(&buf); err != nil {
			t.Fatal(err)
		}
		var m map[string]any
		if err := json.Unmarshal(buf.Bytes(), &m); err != nil {
			t.Fatal(err)
		}
		return m
	}
	h, v := get(hashingFigures()), get(vocabFigures())
	checks := []struct {
		m    map[string]any
		path string
		want float64
	}{
		{h, "docs", 5000},
		{h, "empty_docs", 102},
		{h, "stop_share", 0.25},
		{h, "collisions.expected_rate", expectedRate(hashKeys, hashWidth)},
		{h, "collisions.rate", float64(colliding) / hashKeys},
		{h, "collisions.expected_occupied", expectedOccupied(hashKeys, hashWidth)},
		{h, "collisions.width", hashWidth},
		{h, "sparsity.mean_nnz_per_row", 30},
		{h, "sparsity.max_nnz_per_row", 400},
		{h, "throughput.mb_per_sec", 4.8},
		{h, "throughput.docs_per_sec", 10000},
		{v, "oov.token_share", 0.05},
		{v, "oov.type_share", 0.15},
		{v, "oov.unseen_keys", 900},
		{v, "vocabulary.below_min_docs", 3800},
		{v, "vocabulary.above_max_doc_share", 100},
	}
	for _, c := range checks {
		var cur any = c.m
		for _, k := range strings.Split(c.path, ".") {
			obj, ok := cur.(map[string]any)
			if !ok {
				t.Fatalf("%s: %v is not an object", c.path, cur)
			}
			if cur, ok = obj[k]; !ok {
				t.Fatalf("%s: no field %q", c.path, k)
			}
		}
		if got, ok := cur.(float64); !ok || got != c.want {
			t.Errorf("%s = %v, want %v", c.path, cur, c.want)
		}
	}
	if _, ok := h["oov"]; ok {
		t.Error("hashing run has an oov object; want it left out")
	}
	if _, ok := v["collisions"]; ok {
		t.Error("vocabulary run has a collisions object; want it left out")
	}
}

func TestJSONEmptyListsNotNull(t *testing.T) {
	f := &Figures{Command: "learn", OOV: &OOV{}, Vocabulary: &VocabFigures{}}
	var buf bytes.Buffer
	if err := f.WriteJSON(&buf); err != nil {
		t.Fatal(err)
	}
	if strings.Contains(buf.String(), "null") {
		t.Errorf("JSON has null lists:\n%s", buf.String())
	}
	if f.OOV.ByOrder != nil || f.Vocabulary.TopTerms != nil {
		t.Error("WriteJSON changed the caller's figures")
	}
}

func TestJSONRejectsNaN(t *testing.T) {
	f := &Figures{StopShare: math.NaN()}
	if err := f.WriteJSON(io.Discard); err == nil {
		t.Error("WriteJSON wrote NaN without error; JSON has no NaN")
	}
}

func text(t *testing.T, f *Figures) string {
	t.Helper()
	var buf bytes.Buffer
	if err := f.WriteText(&buf); err != nil {
		t.Fatal(err)
	}
	return buf.String()
}

func TestTextCollisionsSideBySide(t *testing.T) {
	out := text(t, hashingFigures())
	rate := strconv.FormatFloat(float64(colliding)/hashKeys, 'f', 4, 64)
	exp := strconv.FormatFloat(expectedRate(hashKeys, hashWidth), 'f', 4, 64)
	// Worked by hand as a check on the formula: (n−1)/m = 38411/1048576 =
	// 0.036632, and 1 − e^−0.036632 = 0.0360 to four decimals.
	if exp != "0.0360" || rate != "0.0365" {
		t.Fatalf("fixture drifted: rate %s expected %s", rate, exp)
	}
	re := regexp.MustCompile(`(?m)^  collision rate +` + regexp.QuoteMeta(rate) + `  expected ` + regexp.QuoteMeta(exp) + `$`)
	if !re.MatchString(out) {
		t.Errorf("no line %q in\n%s", re, out)
	}
	occ := strconv.FormatFloat(expectedOccupied(hashKeys, hashWidth), 'f', 1, 64)
	if !regexp.MustCompile(`(?m)^  occupied buckets +37700  expected ` + regexp.QuoteMeta(occ) + `$`).MatchString(out) {
		t.Errorf("occupied buckets line missing (expected %s) in\n%s", occ, out)
	}
	if !strings.Contains(out, "1048576 (2^20)") {
		t.Errorf("width not shown as 1048576 (2^20):\n%s", out)
	}
}

func TestTextSections(t *testing.T) {
	h := text(t, hashingFigures())
	for _, want := range []string{
		"\nrun\n", "\ncollisions\n", "\nsparsity\n", "\nlabels\n", "\nthroughput\n",
		"  stop words dropped  60000  25.0%  top: the 9000, a 7000, to 6000, and 5000, i 4000\n",
		"  empty docs          102  2.04%\n",
		"  rows x columns  5000 x 1048576\n",
		"  elapsed  500ms\n",
		"  workers  4\n",
		"    billing   1300  26.0%\n",
	} {
		if want[0] == '\n' && strings.HasPrefix(h, want[1:]) {
			continue
		}
		if !strings.Contains(h, want) {
			t.Errorf("hashing text lacks %q:\n%s", want, h)
		}
	}
	if strings.Contains(h, " of 3000") {
		t.Error("top stop words not cut at five")
	}
	for _, absent := range []string{"out-of-vocabulary", "vocabulary\n", "invalid UTF-8", "NUL"} {
		if strings.Contains(h, absent) {
			t.Errorf("hashing text shows empty section %q:\n%s", absent, h)
		}
	}

	v := text(t, vocabFigures())
	for _, want := range []string{
		"\nout-of-vocabulary\n", "\nvocabulary\n",
		"  token share  5.00%  (1500 of 30000 features)\n",
		"  type share   15.0%  (900 of 6000 distinct keys)\n",
		"    order  features  unseen  token share  keys  unseen keys  type share\n",
		"    w2        12000    1140        9.50%  3000          600       20.0%\n",
		"  cut by --min-docs       3800\n",
		"  density         0.004902\n",
		"  sparsity        99.51%\n",
	} {
		if !strings.Contains(v, want) {
			t.Errorf("vocabulary text lacks %q:\n%s", want, v)
		}
	}
	if strings.Contains(v, "collisions") || strings.Contains(v, "labels") || strings.Contains(v, "throughput") {
		t.Errorf("vocabulary text shows an empty section:\n%s", v)
	}

	odd := text(t, &Figures{Command: "encode", Docs: 3, InvalidUTF8: 2, NULs: 1})
	if !strings.Contains(odd, "  invalid UTF-8  2 bytes replaced by U+FFFD\n") || !strings.Contains(odd, "  NUL bytes      1 read as spaces\n") {
		t.Errorf("invalid input counts missing:\n%s", odd)
	}
	if got := text(t, &Figures{Command: "learn"}); strings.Contains(got, " \n") {
		t.Errorf("trailing spaces in %q", got)
	}
	if got := text(t, &Figures{}); got != "" {
		t.Errorf("empty figures give %q, want nothing", got)
	}
}

func TestPercent(t *testing.T) {
	for _, c := range []struct {
		x    float64
		want string
	}{
		{0, "0%"}, {1, "100%"}, {0.25, "25.0%"}, {0.0204, "2.04%"}, {0.001, "0.10%"},
		{0.000235, "0.0235%"}, {math.NaN(), "n/a"},
	} {
		if got := Percent(c.x); got != c.want {
			t.Errorf("pct(%v) = %q, want %q", c.x, got, c.want)
		}
	}
	// A sparsity never rounds up to 100% unless it is exactly 1.
	for _, c := range []struct {
		x    float64
		want string
	}{
		{1 - 2.861e-5, "99.9971%"}, {0.995, "99.50%"}, {1, "100%"}, {0.5, "50.0%"},
	} {
		if got := pctNearOne(c.x); got != c.want {
			t.Errorf("pctNearOne(%v) = %q, want %q", c.x, got, c.want)
		}
	}
	for i, want := range []string{"0", "1–2", "3–6", "7–14"} {
		if got := binLabel(i); got != want {
			t.Errorf("binLabel(%d) = %q, want %q", i, got, want)
		}
	}
}

func html(t *testing.T, f *Figures) string {
	t.Helper()
	var buf bytes.Buffer
	if err := f.WriteHTML(&buf); err != nil {
		t.Fatal(err)
	}
	return buf.String()
}

var svgRe = regexp.MustCompile(`(?s)<svg .*?</svg>`)

// checkHTML checks the page's structure: every <svg> is well-formed XML,
// the whole page tokenizes with balanced tags, and nothing is loaded from
// elsewhere.
func checkHTML(t *testing.T, page string) (svgs int) {
	t.Helper()
	if !strings.HasPrefix(page, "<!DOCTYPE html>\n<html lang=\"en\">") || !strings.HasSuffix(page, "</html>\n") {
		t.Errorf("page does not start with a doctype and end with </html>")
	}
	for _, s := range svgRe.FindAllString(page, -1) {
		svgs++
		d := xml.NewDecoder(strings.NewReader(s))
		for {
			_, err := d.Token()
			if errors.Is(err, io.EOF) {
				break
			}
			if err != nil {
				t.Fatalf("svg %d is not well-formed XML: %v", svgs, err)
			}
		}
	}
	// Tag balance of the whole page, HTML void elements closed automatically.
	d := xml.NewDecoder(strings.NewReader(page))
	d.Strict = false
	d.AutoClose = xml.HTMLAutoClose
	d.Entity = xml.HTMLEntity
	var stack []string
	for {
		tok, err := d.Token()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			t.Fatalf("page does not tokenize: %v", err)
		}
		switch e := tok.(type) {
		case xml.StartElement:
			stack = append(stack, e.Name.Local)
			for _, a := range e.Attr {
				if a.Name.Local == "src" || a.Name.Local == "href" {
					t.Errorf("page loads %s=%q; want a self-contained page", a.Name.Local, a.Value)
				}
			}
			if e.Name.Local == "script" || e.Name.Local == "link" {
				t.Errorf("page has a <%s> element", e.Name.Local)
			}
		case xml.EndElement:
			if len(stack) == 0 || stack[len(stack)-1] != e.Name.Local {
				t.Fatalf("unbalanced </%s>, open: %v", e.Name.Local, stack)
			}
			stack = stack[:len(stack)-1]
		}
	}
	if len(stack) != 0 {
		t.Errorf("unclosed elements: %v", stack)
	}
	if strings.Contains(page, "<?xml") {
		t.Error("page contains an XML declaration from the SVG output")
	}
	return svgs
}

func TestHTMLHashing(t *testing.T) {
	page := html(t, hashingFigures())
	// Plots: top stop words, collision rate, non-zeros histogram, labels.
	if n := checkHTML(t, page); n != 4 {
		t.Errorf("%d <svg> plots, want 4", n)
	}
	for _, want := range []string{"<h2>collisions</h2>", "Collision rate", "Rows by non-zeros", "Top stop words dropped",
		"<td>0.0365  expected 0.0360</td>", `<td class="num">1300</td>`} {
		if !strings.Contains(page, want) {
			t.Errorf("page lacks %q", want)
		}
	}
	if strings.Contains(page, `class="caution"`) {
		t.Error("hashing page without strings shows the vocabulary caution")
	}
}

func TestHTMLVocabularyEscapes(t *testing.T) {
	page := html(t, vocabFigures())
	// Plots: OOV per order, top unseen keys, non-zeros histogram, top terms.
	if n := checkHTML(t, page); n != 4 {
		t.Errorf("%d <svg> plots, want 4", n)
	}
	if strings.Contains(page, "<script") || strings.Contains(page, "<b>") {
		t.Error("feature key markup reached the page unescaped")
	}
	if c := strings.Count(page, "&lt;script&gt;"); c < 2 {
		t.Errorf("escaped key appears %d times, want it in the table and the plot", c)
	}
	if !strings.Contains(page, "&lt;b&gt;&amp;amp;") {
		t.Error("key <b>&amp; not escaped once as &lt;b&gt;&amp;amp;")
	}
	if !strings.Contains(page, `<p class="caution">Caution: a vocabulary memorizes strings`) {
		t.Error("page showing vocabulary strings has no caution")
	}
	if !strings.Contains(page, "OOV share per n-gram order") {
		t.Error("OOV plot missing")
	}
}

func TestHTMLEmpty(t *testing.T) {
	if n := checkHTML(t, html(t, &Figures{})); n != 0 {
		t.Errorf("%d plots for empty figures", n)
	}
}

func TestWriteAndFormatFromPath(t *testing.T) {
	f := hashingFigures()
	for _, format := range []string{"text", "json", "html"} {
		var a, b bytes.Buffer
		if err := Write(&a, format, f); err != nil {
			t.Fatalf("%s: %v", format, err)
		}
		switch format {
		case "text":
			f.WriteText(&b)
		case "json":
			f.WriteJSON(&b)
		case "html":
			f.WriteHTML(&b)
		}
		if a.String() != b.String() {
			t.Errorf("Write(%q) differs from the method", format)
		}
	}
	if err := Write(io.Discard, "yaml", f); err == nil || !strings.Contains(err.Error(), `"yaml"`) {
		t.Errorf("unknown format: err = %v", err)
	}
	for path, want := range map[string]string{"run.json": "json", "out/R.HTML": "html", "r.htm": "html"} {
		if got, err := FormatFromPath(path); err != nil || got != want {
			t.Errorf("FormatFromPath(%q) = %q, %v; want %q", path, got, err, want)
		}
	}
	for _, path := range []string{"report.txt", "report", "json"} {
		if _, err := FormatFromPath(path); err == nil || !strings.Contains(err.Error(), strconv.Quote(path)) {
			t.Errorf("FormatFromPath(%q): err = %v, want one naming the path", path, err)
		}
	}
}

func TestHTMLDeterministic(t *testing.T) {
	if html(t, vocabFigures()) != html(t, vocabFigures()) {
		t.Error("two renderings of the same figures differ")
	}
}
