package serve

import (
	"encoding/json"
	"fmt"
	"net/http/httptest"
	"os"
	"strings"
	"sync"
	"testing"

	"github.com/bowline/bowline"
	"github.com/bowline/bowline/internal/testkit"
	"github.com/bowline/bowline/spec"
)

type wireRow struct {
	ID       string    `json:"id"`
	Indices  []int     `json:"indices"`
	Values   []float64 `json:"values"`
	Unseen   *int      `json:"unseen"`
	Features int       `json:"features"`
}

type wireResponse struct {
	Spec string    `json:"spec"`
	Rows []wireRow `json:"rows"`
}

func decodeResponse(t testing.TB, body []byte) wireResponse {
	t.Helper()
	var r wireResponse
	dec := json.NewDecoder(strings.NewReader(string(body)))
	dec.DisallowUnknownFields()
	if err := dec.Decode(&r); err != nil {
		t.Fatalf("response %q: %v", body, err)
	}
	return r
}

// The status codes are those of RFC 9110 section 15 (400 Bad Request, 404
// Not Found, 405 Method Not Allowed, 413 Content Too Large, 415 Unsupported
// Media Type, 422 Unprocessable Content).
func TestStatusCodes(t *testing.T) {
	one := demoEncoder(t)
	two := twoFieldEncoder(t)
	const js = "application/json"
	big := `{"documents":[{"id":"a","text":"` + strings.Repeat("dock ", 300) + `"}]}`
	cases := []struct {
		name        string
		enc         *bowline.Encoder
		method      string
		path        string
		contentType string
		body        string
		want        int
		allow       string
		errHas      string
	}{
		{"text", one, "POST", "/v1/encode", js, `{"documents":[{"id":"a","text":"Dock 14 would not release my bike"}]}`, 200, "", ""},
		{"charset utf-8", one, "POST", "/v1/encode", "application/json; charset=UTF-8", `{"documents":[{"id":"a","text":"dock"}]}`, 200, "", ""},
		{"empty text is an empty row", one, "POST", "/v1/encode", js, `{"documents":[{"id":"a","text":""}]}`, 200, "", ""},
		{"no documents", one, "POST", "/v1/encode", js, `{"documents":[]}`, 200, "", ""},
		{"fields", two, "POST", "/v1/encode", js, `{"documents":[{"id":"a","fields":{"title":"Dock stuck","body":"The dock kept the bike"}}]}`, 200, "", ""},
		{"single field by name", one, "POST", "/v1/encode", js, `{"documents":[{"id":"a","fields":{"text":"dock"}}]}`, 200, "", ""},
		{"healthz", one, "GET", "/healthz", "", "", 200, "", ""},
		{"spec", one, "GET", "/v1/spec", "", "", 200, "", ""},
		{"metrics", one, "GET", "/metrics", "", "", 200, "", ""},

		{"syntax error", one, "POST", "/v1/encode", js, `{"documents":[{"id":"a","text":"x"}`, 400, "", "malformed"},
		{"not json", one, "POST", "/v1/encode", js, `documents=1`, 400, "", "malformed"},
		{"empty body", one, "POST", "/v1/encode", js, ``, 400, "", "empty body"},
		{"data after", one, "POST", "/v1/encode", js, `{"documents":[]} {}`, 400, "", "after"},
		{"wrong type", one, "POST", "/v1/encode", js, `{"documents":[{"id":"a","text":5}]}`, 400, "", "must be a string"},
		{"documents not a list", one, "POST", "/v1/encode", js, `{"documents":{"id":"a"}}`, 400, "", "must be a list"},
		{"unknown key", one, "POST", "/v1/encode", js, `{"docs":[]}`, 400, "", "unknown field"},
		{"no documents key", one, "POST", "/v1/encode", js, `{}`, 400, "", "documents"},
		{"array at top", one, "POST", "/v1/encode", js, `[]`, 400, "", "malformed"},

		{"unknown path", one, "GET", "/v2/encode", "", "", 404, "", "no endpoint"},
		{"GET encode", one, "GET", "/v1/encode", "", "", 405, "POST", "use POST"},
		{"POST metrics", one, "POST", "/metrics", js, `{}`, 405, "GET, HEAD", "use GET"},
		{"DELETE spec", one, "DELETE", "/v1/spec", "", "", 405, "GET, HEAD", "use GET"},

		{"body too large", one, "POST", "/v1/encode", js, big, 413, "", "larger than"},
		{"too many documents", one, "POST", "/v1/encode", js, `{"documents":[{"text":"a"},{"text":"b"},{"text":"c"},{"text":"d"}]}`, 413, "", "limit is 3"},

		{"no content type", one, "POST", "/v1/encode", "", `{"documents":[]}`, 415, "", "Content-Type"},
		{"form", one, "POST", "/v1/encode", "application/x-www-form-urlencoded", `{"documents":[]}`, 415, "", "not application/json"},
		{"latin-1", one, "POST", "/v1/encode", "application/json; charset=iso-8859-1", `{"documents":[]}`, 415, "", "charset"},

		{"no text", one, "POST", "/v1/encode", js, `{"documents":[{"id":"a","text":"ok"},{"id":"b"}]}`, 422, "", `documents[1]: document "b": no text`},
		{"null text", one, "POST", "/v1/encode", js, `{"documents":[{"id":"a","text":null}]}`, 422, "", "no text"},
		{"missing field", two, "POST", "/v1/encode", js, `{"documents":[{"id":"a","fields":{"title":"x"}}]}`, 422, "", `field "body": missing`},
		{"unknown field", two, "POST", "/v1/encode", js, `{"documents":[{"id":"a","fields":{"title":"x","body":"y","notes":"z"}}]}`, 422, "", `field "notes"`},
		{"text for two fields", two, "POST", "/v1/encode", js, `{"documents":[{"id":"a","text":"x"}]}`, 422, "", "2 text fields"},
		{"text and fields", one, "POST", "/v1/encode", js, `{"documents":[{"id":"a","text":"x","fields":{"text":"y"}}]}`, 422, "", "both"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			h, err := New(c.enc, Options{MaxBody: 1000, MaxDocuments: 3})
			if err != nil {
				t.Fatal(err)
			}
			code, hdr, body := do(t, h, c.method, c.path, c.contentType, c.body)
			if code != c.want {
				t.Fatalf("status %d, want %d; body %s", code, c.want, body)
			}
			if c.allow != "" && hdr.Get("Allow") != c.allow {
				t.Errorf("Allow %q, want %q", hdr.Get("Allow"), c.allow)
			}
			if code == 200 {
				if c.path == "/v1/encode" {
					r := decodeResponse(t, body)
					if r.Spec != c.enc.Fingerprint() {
						t.Errorf("spec %q, want %q", r.Spec, c.enc.Fingerprint())
					}
				}
				return
			}
			if ct := hdr.Get("Content-Type"); ct != "application/json" {
				t.Errorf("error Content-Type %q", ct)
			}
			var e map[string]string
			if err := json.Unmarshal(body, &e); err != nil || len(e) != 1 || e["error"] == "" {
				t.Fatalf("error body %q is not {\"error\":\"...\"} (%v)", body, err)
			}
			if !strings.Contains(e["error"], c.errHas) {
				t.Errorf("error %q does not contain %q", e["error"], c.errHas)
			}
			// A refused request changes nothing: no document counted, the
			// same spec in force.
			if n := h.Metrics().documents.Load(); n != 0 {
				t.Errorf("%d documents counted after a refused request", n)
			}
			if h.Encoder() != c.enc {
				t.Error("the spec in force changed")
			}
		})
	}
}

// A body without Content-Length (chunked) is cut at the limit while read.
func TestBodyLimitWhileReading(t *testing.T) {
	h, err := New(demoEncoder(t), Options{MaxBody: 100})
	if err != nil {
		t.Fatal(err)
	}
	for _, n := range []int{40, 100, 101, 5000} {
		body := `{"documents":[{"text":"` + strings.Repeat("a", n-len(`{"documents":[{"text":""}]}`)) + `"}]}`
		if len(body) != n {
			t.Fatalf("body length %d, want %d", len(body), n)
		}
		req := httptest.NewRequest("POST", "/v1/encode", strings.NewReader(body))
		req.ContentLength = -1
		req.Header.Set("Content-Type", "application/json")
		w := httptest.NewRecorder()
		h.ServeHTTP(w, req)
		want := 200
		if n > 100 {
			want = 413
		}
		if w.Code != want {
			t.Errorf("%d-byte body: status %d, want %d (%s)", n, w.Code, want, w.Body)
		}
	}
}

func TestEncodeMatchesLibrary(t *testing.T) {
	enc := demoEncoder(t)
	h, _ := New(enc, Options{})
	texts := []string{"Dock 14 on Marrow Street refused to release my bike twice.", "Charged two unlock fees for one ride, please refund.", "", "zzz qqq unseen words only"}
	var req EncodeRequest
	for i, s := range texts {
		s := s
		req.Documents = append(req.Documents, WireDocument{ID: fmt.Sprint("d", i), Text: &s})
	}
	b, _ := json.Marshal(&req)
	code, _, body := do(t, h, "POST", "/v1/encode", "application/json", string(b))
	if code != 200 {
		t.Fatalf("status %d: %s", code, body)
	}
	res := decodeResponse(t, body)
	if len(res.Rows) != len(texts) {
		t.Fatalf("%d rows for %d documents", len(res.Rows), len(texts))
	}
	for i, s := range texts {
		d := bowline.Document{ID: fmt.Sprint("d", i), Text: s}
		if s == "" {
			d = bowline.Document{ID: d.ID, Fields: map[string]string{"text": ""}}
		}
		want, err := enc.Encode(d)
		if err != nil {
			t.Fatal(err)
		}
		got := res.Rows[i]
		if got.ID != want.ID || got.Unseen == nil || *got.Unseen != want.Unseen || got.Features != want.Features {
			t.Errorf("row %d: id %q unseen %v features %d, want %q %d %d", i, got.ID, got.Unseen, got.Features, want.ID, want.Unseen, want.Features)
		}
		if len(got.Indices) != len(want.Indices) || len(got.Values) != len(want.Values) {
			t.Fatalf("row %d: %d/%d entries, want %d", i, len(got.Indices), len(got.Values), len(want.Indices))
		}
		for j := range want.Indices {
			// HTTP indices are 1-based, library indices 0-based.
			if got.Indices[j] != want.Indices[j]+1 || got.Values[j] != want.Values[j] {
				t.Errorf("row %d entry %d: %d:%v, want %d:%v", i, j, got.Indices[j], got.Values[j], want.Indices[j]+1, want.Values[j])
			}
		}
	}
	if res.Rows[2].Indices == nil || len(res.Rows[2].Indices) != 0 {
		t.Errorf("empty document: indices %v, want []", res.Rows[2].Indices)
	}
	if *res.Rows[3].Unseen == 0 {
		t.Error("unseen words counted 0 times")
	}
}

func TestSpecEndpoint(t *testing.T) {
	enc := demoEncoder(t)
	h, _ := New(enc, Options{})
	code, _, body := do(t, h, "GET", "/v1/spec", "", "")
	if code != 200 {
		t.Fatal(code)
	}
	var doc struct {
		Fingerprint string         `json:"fingerprint"`
		Mode        string         `json:"mode"`
		Columns     int            `json:"columns"`
		Terms       int            `json:"terms"`
		Fields      []string       `json:"fields"`
		IndexBase   int            `json:"index_base"`
		Settings    map[string]any `json:"settings"`
	}
	if err := json.Unmarshal(body, &doc); err != nil {
		t.Fatal(err)
	}
	s := enc.Spec()
	if doc.Fingerprint != s.Fingerprint || doc.Mode != string(spec.ModeVocabulary) || doc.Columns != enc.Columns() || doc.Terms != len(s.Content.Vocabulary.Keys) || doc.IndexBase != 1 {
		t.Errorf("spec document %+v", doc)
	}
	if len(doc.Fields) != 1 || doc.Fields[0] != "text" {
		t.Errorf("fields %v", doc.Fields)
	}
	v, ok := doc.Settings["vocabulary"].(map[string]any)
	if !ok {
		t.Fatalf("settings without vocabulary: %s", body)
	}
	if _, ok := v["keys"]; ok {
		t.Error("settings carry the vocabulary keys")
	}
	if v["min_docs"] != float64(2) {
		t.Errorf("min_docs %v, want 2", v["min_docs"])
	}
	w := doc.Settings["weights"].(map[string]any)
	if w["idf"] != "smooth" || w["norm"] != "l2" {
		t.Errorf("weights %v", w)
	}
	if _, ok := w["idf_values"]; ok {
		t.Error("settings carry the idf values")
	}
	code, _, body = do(t, h, "GET", "/healthz", "", "")
	if code != 200 || !strings.Contains(string(body), `"status":"ok"`) || !strings.Contains(string(body), s.Fingerprint) {
		t.Errorf("healthz %d %s", code, body)
	}
}

func TestReload(t *testing.T) {
	train, _ := testkit.DemoSplit(t, 300)
	a := learnSpec(t, train, "train.tsv", settings(t, demoInput))
	b := learnSpec(t, train, "train.tsv", hashSettings(t, settings(t, demoInput), "2^12"))
	pa, pb := saveSpec(t, a, "a.json"), saveSpec(t, b, "b.json.gz")
	h, err := Open(pa, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if got := h.Encoder().Fingerprint(); got != a.Fingerprint {
		t.Fatalf("fingerprint %s, want %s", got, a.Fingerprint)
	}
	if err := h.Reload(pb); err != nil {
		t.Fatal(err)
	}
	if got := h.Encoder().Fingerprint(); got != b.Fingerprint || got == a.Fingerprint {
		t.Fatalf("after reload: fingerprint %s, want %s", got, b.Fingerprint)
	}
	code, _, body := do(t, h, "POST", "/v1/encode", "application/json", `{"documents":[{"text":"dock"}]}`)
	if code != 200 || decodeResponse(t, body).Spec != b.Fingerprint {
		t.Fatalf("after reload: %d %s", code, body)
	}

	// Refused files leave b in force.
	dir := t.TempDir()
	raw, err := os.ReadFile(pa)
	if err != nil {
		t.Fatal(err)
	}
	tampered := strings.Replace(string(raw), `"min_docs":2`, `"min_docs":3`, 1)
	if tampered == string(raw) {
		t.Fatal("could not tamper with the spec")
	}
	bad := map[string]string{
		"missing.json":    "",
		"truncated.json":  string(raw[:len(raw)/2]),
		"tampered.json":   tampered,
		"not-a-spec.json": `{"hello":"world"}`,
	}
	n := 0
	for name, content := range bad {
		p := dir + "/" + name
		if content != "" {
			if err := os.WriteFile(p, []byte(content), 0o644); err != nil {
				t.Fatal(err)
			}
		}
		err := h.Reload(p)
		if err == nil {
			t.Errorf("%s: reload accepted", name)
		}
		n++
		if got := h.Encoder().Fingerprint(); got != b.Fingerprint {
			t.Errorf("%s: fingerprint %s after a refused reload, want %s", name, got, b.Fingerprint)
		}
	}
	if ok, no := h.Metrics().reloadsOK.Load(), h.Metrics().reloadsNo.Load(); ok != 1 || no != uint64(n) {
		t.Errorf("reloads ok %d failed %d, want 1 and %d", ok, no, n)
	}
}

// Many goroutines encode while the spec is swapped back and forth; every
// response must be entirely the work of the spec it names (run with -race).
func TestConcurrentEncodeAndReload(t *testing.T) {
	train, _ := testkit.DemoSplit(t, 300)
	a := learnSpec(t, train, "train.tsv", settings(t, demoInput))
	b := learnSpec(t, train, "train.tsv", hashSettings(t, settings(t, demoInput), "2^10"))
	pa, pb := saveSpec(t, a, "a.json"), saveSpec(t, b, "b.json")
	encA, _ := bowline.New(a)
	encB, _ := bowline.New(b)
	h, err := Open(pa, Options{})
	if err != nil {
		t.Fatal(err)
	}
	texts := []string{"The dock at Quill Square would not release the bike.", "Charged twice for one ride", "app crashed again and again", "great ride, thanks"}
	want := map[string][]bowline.Row{}
	for _, e := range []*bowline.Encoder{encA, encB} {
		for _, s := range texts {
			r, _ := e.Encode(bowline.Document{Text: s})
			want[e.Fingerprint()] = append(want[e.Fingerprint()], r)
		}
	}
	var req EncodeRequest
	for i := range texts {
		req.Documents = append(req.Documents, WireDocument{Text: &texts[i]})
	}
	body, _ := json.Marshal(&req)
	const goroutines, each = 16, 40
	var wg sync.WaitGroup
	errs := make(chan string, goroutines*each)
	stop := make(chan struct{})
	go func() {
		for i := 0; ; i++ {
			select {
			case <-stop:
				return
			default:
			}
			p := pa
			if i%2 == 0 {
				p = pb
			}
			h.Reload(p)
		}
	}()
	for g := 0; g < goroutines; g++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := 0; i < each; i++ {
				req := httptest.NewRequest("POST", "/v1/encode", strings.NewReader(string(body)))
				req.Header.Set("Content-Type", "application/json")
				w := httptest.NewRecorder()
				h.ServeHTTP(w, req)
				if w.Code != 200 {
					errs <- fmt.Sprintf("status %d", w.Code)
					continue
				}
				var res wireResponse
				if err := json.Unmarshal(w.Body.Bytes(), &res); err != nil {
					errs <- err.Error()
					continue
				}
				rows := want[res.Spec]
				if rows == nil {
					errs <- "unknown spec " + res.Spec
					continue
				}
				for k, r := range res.Rows {
					if fmt.Sprint(r.Values) != fmt.Sprint(rows[k].Values) || len(r.Indices) != len(rows[k].Indices) {
						errs <- fmt.Sprintf("row %d does not match spec %s", k, res.Spec)
					}
				}
			}
		}()
	}
	wg.Wait()
	close(stop)
	close(errs)
	for e := range errs {
		t.Error(e)
	}
	if n := h.Metrics().documents.Load(); n != goroutines*each*uint64(len(texts)) {
		t.Errorf("%d documents counted, want %d", n, goroutines*each*len(texts))
	}
}

// Encoding in several goroutines inside one large request gives the rows
// in document order.
func TestLargeRequestOrder(t *testing.T) {
	enc := demoEncoder(t)
	h, _ := New(enc, Options{})
	_, test := testkit.DemoSplit(t, 500)
	r := openCorpus(t, test, "test.tsv", demoInput)
	var req EncodeRequest
	for r.Scan() {
		s := string(r.Record().Text[0])
		req.Documents = append(req.Documents, WireDocument{ID: string(r.Record().ID), Text: &s})
	}
	if len(req.Documents) < parallelMin*2 {
		t.Fatalf("only %d documents", len(req.Documents))
	}
	body, _ := json.Marshal(&req)
	code, _, out := do(t, h, "POST", "/v1/encode", "application/json", string(body))
	if code != 200 {
		t.Fatalf("%d %s", code, out)
	}
	res := decodeResponse(t, out)
	for i, d := range req.Documents {
		want, _ := enc.Encode(bowline.Document{ID: d.ID, Text: *d.Text})
		if res.Rows[i].ID != d.ID || len(res.Rows[i].Indices) != len(want.Indices) {
			t.Fatalf("row %d: id %q with %d entries, want %q with %d", i, res.Rows[i].ID, len(res.Rows[i].Indices), d.ID, len(want.Indices))
		}
	}
}

func TestIDEscaping(t *testing.T) {
	h, _ := New(demoEncoder(t), Options{})
	ids := []string{"plain", `quote " and \ backslash`, "tab\tnew\nline", "<b>&amp;</b>", "ünïcödé ✓", "\u2028"}
	var req EncodeRequest
	for i := range ids {
		s := "dock"
		req.Documents = append(req.Documents, WireDocument{ID: ids[i], Text: &s})
	}
	body, _ := json.Marshal(&req)
	code, _, out := do(t, h, "POST", "/v1/encode", "application/json", string(body))
	if code != 200 {
		t.Fatal(code)
	}
	res := decodeResponse(t, out)
	for i, id := range ids {
		if res.Rows[i].ID != id {
			t.Errorf("id %q came back as %q", id, res.Rows[i].ID)
		}
	}
}
