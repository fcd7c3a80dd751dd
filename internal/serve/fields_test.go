package serve

import (
	"bytes"
	"encoding/json"
	"net/http"
	"net/http/httptest"
	"strings"
	"testing"

	"github.com/bowline/bowline"
	"github.com/bowline/bowline/corpus"
	"github.com/bowline/bowline/internal/encode"
	"github.com/bowline/bowline/internal/learn"
	"github.com/bowline/bowline/internal/pipeline"
	"github.com/bowline/bowline/internal/tablefield"
	"github.com/bowline/bowline/internal/testkit"
	"github.com/bowline/bowline/spec"
	"github.com/bowline/bowline/svmlight"
)

// tableSettings adds the demo's table columns to st: zone and plan as
// categories, age standardized with "unknown" for missing, created as a
// time (what "bowline demo" learns with).
func tableSettings(t *testing.T, st *learn.Settings) *learn.Settings {
	t.Helper()
	zone, _ := tablefield.ParseCategory("zone")
	plan, _ := tablefield.ParseCategory("plan")
	age, err := tablefield.ParseNumber("age:standard", []string{"unknown"})
	if err != nil {
		t.Fatal(err)
	}
	created, err := tablefield.ParseTime("created", "Europe/London")
	if err != nil {
		t.Fatal(err)
	}
	st.Fields = []spec.TableField{zone, age, plan, created}
	return st
}

func tableReader(t *testing.T, data []byte, st *learn.Settings) *corpus.Reader {
	t.Helper()
	var names []string
	for _, f := range st.Fields {
		names = append(names, f.Name)
	}
	r, err := corpus.NewReader(bytes.NewReader(data), "demo.tsv", corpus.Options{Format: corpus.TSV, Text: st.Input.Text,
		Label: st.Input.Label, ID: st.Input.ID, Fields: names})
	if err != nil {
		t.Fatal(err)
	}
	return r
}

// TestParityTableFields: a spec learned on a table (text beside the demo's
// zone, plan, age and created columns) gives over HTTP, with the table
// values in "fields", exactly the rows pipeline.Encode writes (what
// "bowline encode" runs), in vocabulary and hashing mode.
func TestParityTableFields(t *testing.T) {
	train, test := testkit.DemoSplit(t, 600)
	for _, st := range []*learn.Settings{tableSettings(t, settings(t, demoInput)), tableSettings(t, hashSettings(t, settings(t, demoInput), "2^16"))} {
		l, err := learn.New(st)
		if err != nil {
			t.Fatal(err)
		}
		s, _, err := pipeline.Learn(tableReader(t, train, st), l, pipeline.LearnOptions{Name: "train.tsv", Workers: 2})
		if err != nil {
			t.Fatal(err)
		}
		senc, _ := encode.New(s)
		var svm bytes.Buffer
		if _, err := pipeline.Encode(tableReader(t, test, st), senc, &svm, pipeline.EncodeOptions{Base: 1, Workers: 2}); err != nil {
			t.Fatal(err)
		}
		var want []svmlight.Row
		sr := svmlight.NewReader(&svm, "test.svm", 1)
		for sr.Scan() {
			row := *sr.Row()
			row.Indices = append([]int(nil), row.Indices...)
			row.Values = append([]float64(nil), row.Values...)
			want = append(want, row)
		}
		enc, _ := bowline.New(s)
		h, err := New(enc, Options{})
		if err != nil {
			t.Fatal(err)
		}
		srv := httptest.NewServer(h)
		var docs []WireDocument
		r := tableReader(t, test, st)
		for r.Scan() {
			rec := r.Record()
			d := WireDocument{ID: string(rec.ID), Fields: map[string]string{"text": string(rec.Text[0])}}
			for i, f := range st.Fields {
				if len(rec.Fields[i]) > 0 {
					d.Fields[f.Name] = string(rec.Fields[i])
				}
			}
			docs = append(docs, d)
		}
		body, _ := json.Marshal(&EncodeRequest{Documents: docs})
		res, err := http.Post(srv.URL+"/v1/encode", "application/json", bytes.NewReader(body))
		if err != nil {
			t.Fatal(err)
		}
		var out wireResponse
		err = json.NewDecoder(res.Body).Decode(&out)
		res.Body.Close()
		if err != nil || res.StatusCode != 200 || len(out.Rows) != len(want) || len(want) != 120 {
			t.Fatalf("%s: status %d, %d rows over HTTP, %d from encode: %v", s.Content.Mode, res.StatusCode, len(out.Rows), len(want), err)
		}
		nnz := 0
		for k, got := range out.Rows {
			w := want[k]
			if len(got.Indices) != len(w.Indices) {
				t.Fatalf("%s row %d: %v over HTTP, %v from encode", s.Content.Mode, k, got.Indices, w.Indices)
			}
			for j := range w.Indices {
				if got.Indices[j]-1 != w.Indices[j] || got.Values[j] != w.Values[j] {
					t.Fatalf("%s row %d entry %d: HTTP %d:%v, encode %d:%v", s.Content.Mode, k, j, got.Indices[j], got.Values[j], w.Indices[j]+1, w.Values[j])
				}
			}
			nnz += len(w.Indices)
		}
		t.Logf("%s: %d rows, %d non-zeros identical over HTTP and encode", s.Content.Mode, len(want), nnz)

		// A value that cannot be read refuses the request with 422.
		bad := `{"documents":[{"id":"x","fields":{"text":"dock","age":"old"}}]}`
		res, err = http.Post(srv.URL+"/v1/encode", "application/json", strings.NewReader(bad))
		if err != nil {
			t.Fatal(err)
		}
		var e map[string]string
		json.NewDecoder(res.Body).Decode(&e)
		res.Body.Close()
		if res.StatusCode != http.StatusUnprocessableEntity || !strings.Contains(e["error"], `field "age"`) {
			t.Errorf("bad value: status %d, %v", res.StatusCode, e)
		}
		srv.Close()
	}
}
