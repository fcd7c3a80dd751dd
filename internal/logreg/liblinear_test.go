package logreg_test

// Checks against an outside reference: liblinear-train -s 0 (L2-regularized
// logistic regression, primal) and liblinear-predict from the Debian package
// liblinear-tools 2.3.0. On the same rows and the same C, the learner's
// held-out accuracy must be within 1 percentage point of liblinear's, and
// its objective at its own solution must not exceed the objective at
// liblinear's weights (read from liblinear's model file) by more than a
// rounding margin.
//
// The golden files under testdata/learner (rows, liblinear models and
// predictions) let the check run without liblinear; TestLiblinearLive
// repeats it with the installed tools on rows encoded afresh, and with
// -golden-out DIR writes new golden files (scripts/gen-learner-golden.sh).

import (
	"bufio"
	"bytes"
	"compress/gzip"
	"encoding/json"
	"flag"
	"fmt"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/bowline/bowline/internal/logreg"
	"github.com/bowline/bowline/internal/testkit"
)

var goldenOut = flag.String("golden-out", "", "write liblinear golden files into this folder (TestLiblinearLive)")

const goldenDir = "../../testdata/learner"

// llCase is one comparison: a corpus split, its label and the C used.
type llCase struct {
	name    string
	label   string
	c       float64
	minDocs int64 // vocabulary cutoff of the encoding
}

var llCases = []llCase{
	{"demo-team", "team", 1, 2},         // 4 classes: one-vs-rest
	{"demo-channel", "channel", 0.5, 2}, // 2 classes: review, ticket
}

// sotuCase compares on State of the Union addresses, Democratic against
// Republican party.
var sotuCase = llCase{"sotu-party", "party", 1, 10}

// caseRows encodes a case's training and held-out rows from its corpus.
func caseRows(t *testing.T, c llCase) (train, test []byte) {
	t.Helper()
	if c.name == sotuCase.name {
		tr, te := sotuSplit(t)
		return encodeJSONL(t, tr, te, c.label, c.minDocs)
	}
	tr, te := testkit.DemoSplit(t, demoDocs)
	return encodeTSV(t, tr, te, c.label, c.minDocs)
}

// sotuSplit keeps the Democratic and Republican addresses of the State of
// the Union corpus and holds out every fourth of them.
func sotuSplit(t *testing.T) (train, test []byte) {
	t.Helper()
	b, err := os.ReadFile(testkit.SOTU(t))
	if err != nil {
		t.Fatal(err)
	}
	var tr, te bytes.Buffer
	n := 0
	for _, line := range bytes.Split(b, []byte("\n")) {
		var rec struct {
			Party string `json:"party"`
		}
		if len(bytes.TrimSpace(line)) == 0 || json.Unmarshal(line, &rec) != nil {
			continue
		}
		if rec.Party != "Democratic" && rec.Party != "Republican" {
			continue
		}
		dst := &tr
		if n%4 == 3 {
			dst = &te
		}
		dst.Write(line)
		dst.WriteByte('\n')
		n++
	}
	if n < 40 {
		t.Fatalf("%s: only %d Democratic or Republican addresses", testkit.SOTU(t), n)
	}
	return tr.Bytes(), te.Bytes()
}

// comparison is what one case's check looks at.
type comparison struct {
	train, test []byte // SVMlight rows, 1-based
	model       []byte // liblinear model file
	pred        []byte // liblinear-predict output, one label per line
}

func compare(t *testing.T, c llCase, cmp comparison) {
	t.Helper()
	tr := readRows(t, c.name+".train", cmp.train, 0)
	te := readRows(t, c.name+".test", cmp.test, 0)
	cols := max(tr.Columns, te.Columns)
	tr.Columns, te.Columns = cols, cols

	m, err := logreg.Train(tr, logreg.Options{C: c.c})
	if err != nil {
		t.Fatal(err)
	}
	mine := logreg.Evaluate(m, te)

	preds := strings.Fields(string(cmp.pred))
	if len(preds) != len(te.Rows) {
		t.Fatalf("%s: %d liblinear predictions for %d held-out rows", c.name, len(preds), len(te.Rows))
	}
	correct, agree := 0, 0
	for i, p := range preds {
		v, err := strconv.ParseFloat(p, 64)
		if err != nil {
			t.Fatalf("%s: prediction %d: %v", c.name, i+1, err)
		}
		if v == te.Labels[i] {
			correct++
		}
		if mc, _ := m.Predict(te.Rows[i]); mc == v {
			agree++
		}
	}
	theirs := float64(correct) / float64(len(preds))
	t.Logf("%s (C=%g): %d train, %d held-out rows, %d columns; accuracy learner %.2f%%, liblinear %.2f%%; same prediction on %d/%d rows; log loss %.4f, AUC %.4f, macro-F1 %.4f; iterations %v",
		c.name, c.c, len(tr.Rows), len(te.Rows), cols, 100*mine.Accuracy, 100*theirs, agree, len(preds), mine.LogLoss, mine.AUC, mine.MacroF1, m.Iterations)
	if d := math.Abs(mine.Accuracy - theirs); d > 0.01 {
		t.Errorf("%s: held-out accuracy %.2f%% is %.2f points from liblinear's %.2f%% (allowed: 1)", c.name, 100*mine.Accuracy, 100*d, 100*theirs)
	}

	labels, ws := parseModel(t, c.name, cmp.model, cols)
	for k, l := range labels {
		if len(labels) == 2 && k == 1 {
			break // a two-class liblinear model holds one weight vector, for labels[0]
		}
		theirF := logreg.Objective(tr, l, ws[k], c.c, 0)
		// Find the learner's problem for the same positive class; for two
		// classes the objective is the same for either class as positive,
		// with the weights negated.
		p := 0
		if len(labels) > 2 {
			for p = 0; p < m.Problems() && m.Positive(p) != l; p++ {
			}
			if p == m.Problems() {
				t.Fatalf("%s: liblinear class %g is not among the learner's classes %v", c.name, l, m.Classes)
			}
		}
		ourF := m.Objectives[p]
		if again := logreg.Objective(tr, m.Positive(p), m.Weights(p), c.c, 0); math.Abs(again-ourF) > 1e-9*math.Abs(ourF) {
			t.Errorf("%s: Objective at the model's weights %.12g, but training reported %.12g", c.name, again, ourF)
		}
		t.Logf("%s: class %g: objective learner %.10g, liblinear %.10g", c.name, l, ourF, theirF)
		if ourF > theirF*(1+1e-6) {
			t.Errorf("%s: class %g: objective %.10g is above liblinear's %.10g", c.name, l, ourF, theirF)
		}
	}
}

// parseModel reads a liblinear model file (format of liblinear 2.3's
// save_model): header lines, "w", then one line per feature with one
// weight (two classes) or one weight per class.
func parseModel(t *testing.T, name string, b []byte, cols int) (labels []float64, w [][]float64) {
	t.Helper()
	sc := bufio.NewScanner(bytes.NewReader(b))
	nrClass, nrFeature := 0, 0
	for sc.Scan() {
		f := strings.Fields(sc.Text())
		if len(f) == 0 {
			continue
		}
		if f[0] == "w" {
			break
		}
		switch f[0] {
		case "nr_class":
			nrClass, _ = strconv.Atoi(f[1])
		case "nr_feature":
			nrFeature, _ = strconv.Atoi(f[1])
		case "bias":
			if b, _ := strconv.ParseFloat(f[1], 64); b >= 0 {
				t.Fatalf("%s: model has a bias term; the comparison is without one", name)
			}
		case "label":
			for _, s := range f[1:] {
				v, err := strconv.ParseFloat(s, 64)
				if err != nil {
					t.Fatalf("%s: model label %q: %v", name, s, err)
				}
				labels = append(labels, v)
			}
		}
	}
	if nrClass != len(labels) || nrClass < 2 || nrFeature > cols {
		t.Fatalf("%s: model header: nr_class %d, labels %v, nr_feature %d (rows have %d columns)", name, nrClass, labels, nrFeature, cols)
	}
	nw := nrClass
	if nrClass == 2 {
		nw = 1
	}
	w = make([][]float64, nw)
	for k := range w {
		w[k] = make([]float64, cols)
	}
	for i := 0; i < nrFeature; i++ {
		if !sc.Scan() {
			t.Fatalf("%s: model ends after %d of %d weight lines", name, i, nrFeature)
		}
		f := strings.Fields(sc.Text())
		if len(f) != nw {
			t.Fatalf("%s: weight line %d has %d values, want %d", name, i+1, len(f), nw)
		}
		for k, s := range f {
			v, err := strconv.ParseFloat(s, 64)
			if err != nil {
				t.Fatalf("%s: weight line %d: %v", name, i+1, err)
			}
			w[k][i] = v
		}
	}
	return labels, w
}

func readGz(t *testing.T, path string) []byte {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	z, err := gzip.NewReader(f)
	if err != nil {
		t.Fatalf("%s: %v", path, err)
	}
	var b bytes.Buffer
	if _, err := b.ReadFrom(z); err != nil {
		t.Fatalf("%s: %v", path, err)
	}
	return b.Bytes()
}

// TestLiblinearGolden runs the comparison on the committed golden files.
func TestLiblinearGolden(t *testing.T) {
	cases := llCases
	if _, err := os.Stat(filepath.Join(goldenDir, sotuCase.name+".pred")); err == nil {
		cases = append(cases, sotuCase)
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			g := func(ext string) string { return filepath.Join(goldenDir, c.name+ext) }
			pred, err := os.ReadFile(g(".pred"))
			if err != nil {
				t.Fatalf("%v (regenerate with scripts/gen-learner-golden.sh)", err)
			}
			compare(t, c, comparison{
				train: readGz(t, g(".train.svm.gz")),
				test:  readGz(t, g(".test.svm.gz")),
				model: readGz(t, g(".model.gz")),
				pred:  pred,
			})
		})
	}
}

// TestLiblinearLive encodes the rows afresh and runs the installed
// liblinear-train and liblinear-predict on them.
func TestLiblinearLive(t *testing.T) {
	if testing.Short() && *goldenOut == "" {
		t.Skip("-short: skipping the live liblinear run")
	}
	train := testkit.NeedTool(t, "liblinear-train", "liblinear-tools")
	predict := testkit.NeedTool(t, "liblinear-predict", "liblinear-tools")
	for _, c := range append(llCases, sotuCase) {
		t.Run(c.name, func(t *testing.T) {
			trRows, teRows := caseRows(t, c)
			dir := t.TempDir()
			p := func(n string) string { return filepath.Join(dir, n) }
			for n, b := range map[string][]byte{"train.svm": trRows, "test.svm": teRows} {
				if err := os.WriteFile(p(n), b, 0o644); err != nil {
					t.Fatal(err)
				}
			}
			cs := strconv.FormatFloat(c.c, 'g', -1, 64)
			if out, err := exec.Command(train, "-s", "0", "-c", cs, "-q", p("train.svm"), p("model")).CombinedOutput(); err != nil {
				t.Fatalf("liblinear-train: %v: %s", err, out)
			}
			if out, err := exec.Command(predict, p("test.svm"), p("model"), p("pred")).CombinedOutput(); err != nil {
				t.Fatalf("liblinear-predict: %v: %s", err, out)
			}
			model, _ := os.ReadFile(p("model"))
			pred, _ := os.ReadFile(p("pred"))
			compare(t, c, comparison{train: trRows, test: teRows, model: model, pred: pred})
			if *goldenOut != "" {
				writeGolden(t, *goldenOut, c.name, trRows, teRows, model, pred)
			}
		})
	}
}

func writeGolden(t *testing.T, dir, name string, train, test, model, pred []byte) {
	t.Helper()
	gz := func(ext string, b []byte) {
		var buf bytes.Buffer
		z, _ := gzip.NewWriterLevel(&buf, gzip.BestCompression)
		z.Write(b)
		if err := z.Close(); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(filepath.Join(dir, name+ext), buf.Bytes(), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	gz(".train.svm.gz", train)
	gz(".test.svm.gz", test)
	gz(".model.gz", model)
	if err := os.WriteFile(filepath.Join(dir, name+".pred"), pred, 0o644); err != nil {
		t.Fatal(err)
	}
	fmt.Fprintf(os.Stderr, "wrote golden files for %s into %s\n", name, dir)
}
