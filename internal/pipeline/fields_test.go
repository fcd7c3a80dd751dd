package pipeline

import (
	"bytes"
	"encoding/json"
	"errors"
	"testing"

	"github.com/bowline/bowline/corpus"
	"github.com/bowline/bowline/internal/encode"
	"github.com/bowline/bowline/internal/learn"
	"github.com/bowline/bowline/internal/tablefield"
	"github.com/bowline/bowline/internal/testkit"
	"github.com/bowline/bowline/report"
	"github.com/bowline/bowline/spec"
)

var tableOpts = corpus.Options{Format: corpus.TSV, Text: []string{"text"}, Label: "team", ID: "id", Fields: []string{"zone", "age", "created"}}

func tableSpecSettings(t testing.TB, mode spec.Mode) *learn.Settings {
	st := settings(mode)
	zone, _ := tablefield.ParseCategory("zone")
	age, _ := tablefield.ParseNumber("age:log,standard", []string{"unknown"})
	created, err := tablefield.ParseTime("created", "Europe/Oslo")
	if err != nil {
		t.Fatal(err)
	}
	st.Fields = []spec.TableField{zone, age, created}
	return st
}

// TestTableFieldsAcrossWorkers: with table fields the spec, the rows and
// the figures are byte-identical for any worker count (the statistics are
// summed in input order on the reading goroutine).
func TestTableFieldsAcrossWorkers(t *testing.T) {
	train, test := testkit.DemoSplit(t, 1500)
	for _, mode := range []spec.Mode{spec.ModeVocabulary, spec.ModeHashing} {
		var first, firstRows, firstFig string
		for _, w := range []int{1, 2, 5} {
			l, err := learn.New(tableSpecSettings(t, mode))
			if err != nil {
				t.Fatal(err)
			}
			r, _ := corpus.NewReader(bytes.NewReader(train), "train.tsv", tableOpts)
			s, lfig, err := Learn(r, l, LearnOptions{Workers: w})
			if err != nil {
				t.Fatal(err)
			}
			if len(lfig.Fields) != 3 || lfig.Fields[1].Number == nil || lfig.Fields[1].Number.Mean != lfig.Fields[1].Number.FrozenMean {
				t.Fatalf("learn figures %+v", lfig.Fields)
			}
			enc, _ := encode.New(s)
			r, _ = corpus.NewReader(bytes.NewReader(test), "test.tsv", tableOpts)
			var out bytes.Buffer
			fig, err := Encode(r, enc, &out, EncodeOptions{Workers: w})
			if err != nil {
				t.Fatal(err)
			}
			fig.Throughput = report.Throughput{}
			fj, _ := json.Marshal(fig.Fields)
			if w == 1 {
				first, firstRows, firstFig = s.Fingerprint, out.String(), string(fj)
				continue
			}
			if s.Fingerprint != first || out.String() != firstRows || string(fj) != firstFig {
				t.Fatalf("%s: %d workers differ from 1 (spec %v, rows %v, figures %v)", mode, w, s.Fingerprint == first, out.String() == firstRows, string(fj) == firstFig)
			}
		}
	}
}

// TestTableFieldsReaderMismatch: a reader that does not give the spec's
// table fields is refused, not silently read as missing values.
func TestTableFieldsReaderMismatch(t *testing.T) {
	train, _ := testkit.DemoSplit(t, 100)
	l, _ := learn.New(tableSpecSettings(t, spec.ModeVocabulary))
	_, _, err := Learn(reader(t, train), l, LearnOptions{Workers: 1})
	var re *RecordError
	if err == nil || errors.As(err, &re) {
		t.Fatalf("err = %v, want a plain (not skippable) error", err)
	}
}
