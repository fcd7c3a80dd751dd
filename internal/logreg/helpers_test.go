package logreg_test

import (
	"bytes"
	"compress/gzip"
	"io"
	"testing"

	"github.com/bowline/bowline/corpus"
	"github.com/bowline/bowline/internal/encode"
	"github.com/bowline/bowline/internal/learn"
	"github.com/bowline/bowline/internal/logreg"
	"github.com/bowline/bowline/internal/pipeline"
	"github.com/bowline/bowline/ngram"
	"github.com/bowline/bowline/spec"
	"github.com/bowline/bowline/stopwords"
	"github.com/bowline/bowline/svmlight"
	"github.com/bowline/bowline/tokenize"
	"github.com/bowline/bowline/vocab"
	"github.com/bowline/bowline/weight"
)

// demoDocs is the size of the invented demo corpus the learner is checked
// on: 1600 training and 400 held-out rows.
const demoDocs = 2000

// encodeTSV learns a vocabulary spec on train (English stop words, word
// 1- and 2-grams, keys in at least minDocs documents, binary tf, L2 norm)
// with label field label, and returns both splits as SVMlight rows with
// 1-based indices. Binary tf with an L2 norm gives every value of a row the
// same digits, which keeps the golden files small once gzipped.
func encodeTSV(t testing.TB, train, test []byte, label string, minDocs int64) (trainRows, testRows []byte) {
	t.Helper()
	return encodeWith(t, train, test, label, minDocs, "tsv", corpus.TSV)
}

func encodeWith(t testing.TB, train, test []byte, label string, minDocs int64, format string, f corpus.Format) (trainRows, testRows []byte) {
	t.Helper()
	words, err := stopwords.Builtin("en")
	if err != nil {
		t.Fatal(err)
	}
	w12, err := ngram.ParseWords("1-2")
	if err != nil {
		t.Fatal(err)
	}
	st := &learn.Settings{
		Input:         spec.Input{Format: format, Text: []string{"text"}, Label: label},
		Tokens:        tokenize.DefaultOptions(),
		StopSources:   []string{"en"},
		StopWords:     words,
		KeepNegations: true,
		NGrams:        ngram.Config{Words: w12},
		Mode:          spec.ModeVocabulary,
		Cutoffs:       vocab.Cutoffs{MinDocs: minDocs, MaxDocShare: 1},
		TF:            weight.TFBinary,
		IDF:           weight.IDFNone,
		Norm:          weight.NormL2,
	}
	l, err := learn.New(st)
	if err != nil {
		t.Fatal(err)
	}
	copts := corpus.Options{Format: f, Text: []string{"text"}, Label: label}
	r, err := corpus.NewReader(bytes.NewReader(train), "train.tsv", copts)
	if err != nil {
		t.Fatal(err)
	}
	s, _, err := pipeline.Learn(r, l, pipeline.LearnOptions{Name: "train.tsv", Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	enc, err := encode.New(s)
	if err != nil {
		t.Fatal(err)
	}
	rows := func(name string, text []byte) []byte {
		r, err := corpus.NewReader(bytes.NewReader(text), name, copts)
		if err != nil {
			t.Fatal(err)
		}
		var out bytes.Buffer
		if _, err := pipeline.Encode(r, enc, &out, pipeline.EncodeOptions{Name: name, Workers: 2, Base: 1}); err != nil {
			t.Fatal(err)
		}
		return out.Bytes()
	}
	return rows("train.tsv", train), rows("test.tsv", test)
}

// readRows reads SVMlight rows (1-based, gzipped or not) into a Dataset
// with at least columns columns.
func readRows(t testing.TB, name string, b []byte, columns int) *logreg.Dataset {
	t.Helper()
	var rd io.Reader = bytes.NewReader(b)
	if len(b) > 2 && b[0] == 0x1f && b[1] == 0x8b {
		z, err := gzip.NewReader(rd)
		if err != nil {
			t.Fatal(err)
		}
		rd = z
	}
	sr := svmlight.NewReader(rd, name, 1)
	d := &logreg.Dataset{Columns: columns}
	for sr.Scan() {
		r := sr.Row()
		d.Rows = append(d.Rows, logreg.Row{Indices: append([]int(nil), r.Indices...), Values: append([]float64(nil), r.Values...)})
		d.Labels = append(d.Labels, r.Label)
		if n := len(r.Indices); n > 0 && r.Indices[n-1] >= d.Columns {
			d.Columns = r.Indices[n-1] + 1
		}
	}
	if err := sr.Err(); err != nil {
		t.Fatal(err)
	}
	return d
}

// encodeJSONL is encodeTSV for JSON Lines input.
func encodeJSONL(t testing.TB, train, test []byte, label string, minDocs int64) (trainRows, testRows []byte) {
	t.Helper()
	return encodeWith(t, train, test, label, minDocs, "jsonl", corpus.JSONL)
}
