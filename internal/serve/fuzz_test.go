package serve

import (
	"bytes"
	"encoding/json"
	"errors"
	"net/http"
	"net/http/httptest"
	"testing"
)

var fuzzSeeds = []string{
	`{"documents":[{"id":"a","text":"Dock 14 would not release my bike"}]}`,
	`{"documents":[{"id":"a","fields":{"text":"x"}}]}`,
	`{"documents":[]}`,
	`{"documents":[{"text":""},{"text":null},{}]}`,
	`{"documents":[{"text":"a"},{"text":"b"},{"text":"c"},{"text":"d"},{"text":"e"}]}`,
	`{"documents":[{"id":1}]}`,
	`{"documents":{}}`,
	`{"documents":[{"text":"\ud800 \u0000 é"}]}`,
	`{"documents":[]}{}`,
	`{"documents":[{"text":"x","text":"y"}]}`,
	`{`, ``, `null`, `[]`, `"x"`, "\xff\xfe",
}

// DecodeRequest never panics; it returns a request within the limits or a
// *RequestError with status 400 or 413.
func FuzzDecodeRequest(f *testing.F) {
	for _, s := range fuzzSeeds {
		f.Add([]byte(s))
	}
	const maxBody, maxDocs = 512, 4
	f.Fuzz(func(t *testing.T, data []byte) {
		req, err := DecodeRequest(bytes.NewReader(data), maxBody, maxDocs)
		if err != nil {
			var re *RequestError
			if !errors.As(err, &re) || (re.Status != 400 && re.Status != 413) || re.Msg == "" {
				t.Fatalf("error %#v", err)
			}
			if re.Status == 413 && re.Kind == "too_large" && len(data) <= maxBody {
				t.Fatalf("%d-byte body called too large", len(data))
			}
			return
		}
		if len(data) > maxBody {
			t.Fatalf("accepted a %d-byte body over the %d-byte limit", len(data), maxBody)
		}
		if req.Documents == nil || len(req.Documents) > maxDocs {
			t.Fatalf("accepted %d documents (nil: %v)", len(req.Documents), req.Documents == nil)
		}
		if !json.Valid(data) {
			t.Fatalf("accepted invalid JSON %q", data)
		}
	})
}

// Whatever the body, the handler answers with a known status and a JSON
// body, and a refused request leaves the counters of encoded documents and
// the spec in force as they were.
func FuzzHandler(f *testing.F) {
	for _, s := range fuzzSeeds {
		f.Add([]byte(s))
	}
	h, err := New(demoEncoder(f), Options{MaxBody: 512, MaxDocuments: 4})
	if err != nil {
		f.Fatal(err)
	}
	enc := h.Encoder()
	f.Fuzz(func(t *testing.T, data []byte) {
		before := h.Metrics().documents.Load()
		req := httptest.NewRequest("POST", "/v1/encode", bytes.NewReader(data))
		req.Header.Set("Content-Type", "application/json")
		w := httptest.NewRecorder()
		h.ServeHTTP(w, req)
		switch w.Code {
		case http.StatusOK, http.StatusBadRequest, http.StatusRequestEntityTooLarge, http.StatusUnprocessableEntity:
		default:
			t.Fatalf("status %d for %q", w.Code, data)
		}
		if !json.Valid(w.Body.Bytes()) {
			t.Fatalf("answer is not JSON: %q", w.Body.Bytes())
		}
		if w.Code != http.StatusOK && h.Metrics().documents.Load() != before {
			t.Fatal("a refused request counted documents")
		}
		if h.Encoder() != enc {
			t.Fatal("the spec in force changed")
		}
	})
}
