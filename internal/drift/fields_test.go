package drift

import (
	"bytes"
	"io"
	"math"
	"strings"
	"testing"

	"github.com/bowline/bowline/corpus"
	"github.com/bowline/bowline/internal/learn"
	"github.com/bowline/bowline/internal/pipeline"
	"github.com/bowline/bowline/internal/tablefield"
	"github.com/bowline/bowline/ngram"
	"github.com/bowline/bowline/spec"
	"github.com/bowline/bowline/tokenize"
	"github.com/bowline/bowline/vocab"
	"github.com/bowline/bowline/weight"
)

func fieldReader(t *testing.T, data string) *corpus.Reader {
	t.Helper()
	r, err := corpus.NewReader(strings.NewReader(data), "new.tsv", corpus.Options{Format: corpus.TSV, Text: []string{"text"}, Fields: []string{"zone", "age"}})
	if err != nil {
		t.Fatal(err)
	}
	return r
}

// TestFieldDrift compares an invented table with a spec learned on
// another: every figure below is computed by hand.
func TestFieldDrift(t *testing.T) {
	zone, _ := tablefield.ParseCategory("zone")
	age, _ := tablefield.ParseNumber("age", nil)
	st := &learn.Settings{Input: spec.Input{Format: "tsv", Text: []string{"text"}}, Tokens: tokenize.DefaultOptions(),
		NGrams: ngram.Config{Words: ngram.Range{Min: 1, Max: 1}}, Mode: spec.ModeVocabulary, Cutoffs: vocab.DefaultCutoffs(),
		TF: weight.TFCount, Norm: weight.NormNone, Fields: []spec.TableField{zone, age}}
	l, err := learn.New(st)
	if err != nil {
		t.Fatal(err)
	}
	s, _, err := pipeline.Learn(fieldReader(t, "text\tzone\tage\ndock\tharbour\t20\nbike\tquay\t40\ndock\tharbour\t30\n"), l, pipeline.LearnOptions{Workers: 1})
	if err != nil {
		t.Fatal(err)
	}
	res, err := Compare(s, fieldReader(t, "text\tzone\tage\ndock\tpier\t50\nbike\t\t\ndock\tHarbour\t25\n"), Options{Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	if len(res.Fields) != 2 {
		t.Fatalf("fields %+v", res.Fields)
	}
	// zone: 1 of 3 missing, pier never seen (1 of 3), Harbour folds to a
	// kept level.
	z := res.Fields[0]
	if z.Docs != 3 || z.Missing != 1 || z.Category == nil || z.Category.Unseen != 1 || math.Abs(z.Category.UnseenShare-1.0/3) > 1e-15 {
		t.Errorf("zone %+v %+v", z, z.Category)
	}
	// age: frozen mean (20+30+40)/3 = 30, population sd √(200/3); seen 50
	// and 25: mean 37.5, sd 12.5; 50 lies above the training range 20..40.
	a := res.Fields[1].Number
	if a == nil || a.FrozenMean != 30 || math.Abs(a.FrozenSD-math.Sqrt(200.0/3)) > 1e-12 || a.Mean != 37.5 || a.SD != 12.5 ||
		a.OutOfRange != 1 || a.FrozenMin != 20 || a.FrozenMax != 40 || res.Fields[1].Missing != 1 {
		t.Errorf("age %+v", a)
	}
	var text, js bytes.Buffer
	res.WriteText(&text)
	res.WriteJSON(&js)
	if !strings.Contains(text.String(), "table fields") || !strings.Contains(text.String(), "37.5 (30)") ||
		!strings.Contains(js.String(), `"out_of_range": 1`) {
		t.Errorf("renderings lack the field figures:\n%s", text.String())
	}
	// A number that cannot be read ends the comparison naming the line,
	// or goes to Rejects.
	if _, err := Compare(s, fieldReader(t, "text\tzone\tage\ndock\tpier\tfifty\n"), Options{Name: "new.tsv"}); err == nil || !strings.Contains(err.Error(), `new.tsv:2: field "age"`) {
		t.Errorf("bad number: %v", err)
	}
	rj := &pipeline.Rejects{W: io.Discard}
	res, err = Compare(s, fieldReader(t, "text\tzone\tage\ndock\tpier\tfifty\nbike\tquay\t30\n"), Options{Rejects: rj})
	rejected := rj.N
	if err != nil || rejected != 1 || res.Docs != 1 || res.Fields[1].Number.Values != 1 {
		t.Errorf("reject: %v, %d rejected, %d docs", err, rejected, res.Docs)
	}
}
