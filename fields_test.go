package bowline

import (
	"errors"
	"testing"

	"github.com/bowline/bowline/internal/learn"
	"github.com/bowline/bowline/internal/tablefield"
	"github.com/bowline/bowline/ngram"
	"github.com/bowline/bowline/spec"
	"github.com/bowline/bowline/tokenize"
	"github.com/bowline/bowline/vocab"
	"github.com/bowline/bowline/weight"
)

// tableEncoder learns a tiny invented spec with a category and a number
// beside the text.
func tableEncoder(t *testing.T) *Encoder {
	t.Helper()
	zone, _ := tablefield.ParseCategory("zone")
	age, _ := tablefield.ParseNumber("age:standard", nil)
	st := &learn.Settings{Input: spec.Input{Format: "tsv", Text: []string{"text"}}, Tokens: tokenize.DefaultOptions(),
		NGrams: ngram.Config{Words: ngram.Range{Min: 1, Max: 1}}, Mode: spec.ModeVocabulary, Cutoffs: vocab.DefaultCutoffs(),
		TF: weight.TFCount, Norm: weight.NormNone, Fields: []spec.TableField{zone, age}}
	l, err := learn.New(st)
	if err != nil {
		t.Fatal(err)
	}
	w := l.NewWorker()
	for _, r := range [][3]string{{"dock", "harbour", "20"}, {"bike", "quay", "40"}} {
		if err := l.ObserveFields([][]byte{[]byte(r[1]), []byte(r[2])}); err != nil {
			t.Fatal(err)
		}
		w.Observe([][]byte{[]byte(r[0])})
	}
	s, _, err := l.Finish(w, learn.LabelsFrom(nil, false))
	if err != nil {
		t.Fatal(err)
	}
	e, err := New(s)
	if err != nil {
		t.Fatal(err)
	}
	return e
}

// TestTableFieldsDocument: table-field values travel in Document.Fields;
// the row is the one the spec package's encoder gives for the same values.
// Columns, computed by hand: 0 dock, 1 bike (document count 1 each, ties
// by bytes: bike first, then dock), 2 harbour, 3 quay (ties by bytes:
// harbour first), 4 other, 5 missing, 6 unseen, 7 age, 8 age missing; age
// mean 30, population sd 10.
func TestTableFieldsDocument(t *testing.T) {
	e := tableEncoder(t)
	if got := e.TableFields(); len(got) != 2 || got[0] != "zone" || got[1] != "age" {
		t.Fatalf("TableFields %v", got)
	}
	row, err := e.Encode(Document{ID: "a", Text: "dock", Fields: map[string]string{"zone": "Quay", "age": "45"}})
	if err != nil {
		t.Fatal(err)
	}
	// bike is column 0, dock 1; quay 3; age (45−30)/10 = 1.5.
	want := []struct {
		c int
		v float64
	}{{1, 1}, {3, 1}, {7, 1.5}}
	if len(row.Indices) != len(want) {
		t.Fatalf("row %v %v", row.Indices, row.Values)
	}
	for i, w := range want {
		if row.Indices[i] != w.c || row.Values[i] != w.v {
			t.Errorf("entry %d: %d:%v, want %d:%v", i, row.Indices[i], row.Values[i], w.c, w.v)
		}
	}
	// Missing fields: zone missing (5), age imputed to the mean (0 after
	// standardizing, left out) with its indicator (8).
	row, err = e.Encode(Document{Fields: map[string]string{"text": "bike"}})
	if err != nil || len(row.Indices) != 3 || row.Indices[1] != 5 || row.Indices[2] != 8 {
		t.Errorf("missing: %v %v %v", row.Indices, row.Values, err)
	}
	_, err = e.Encode(Document{ID: "b", Text: "dock", Fields: map[string]string{"age": "old"}})
	var de *DocumentError
	if !errors.As(err, &de) || de.Field != "age" || de.ID != "b" {
		t.Errorf("bad number: %v", err)
	}
	_, err = e.Encode(Document{Fields: map[string]string{"text": "dock", "colour": "red"}})
	if !errors.As(err, &de) || de.Field != "colour" {
		t.Errorf("unknown field: %v", err)
	}
}
