package serve

import (
	"bytes"
	"encoding/json"
	"net/http/httptest"
	"strings"
	"testing"

	"github.com/bowline/bowline"
	"github.com/bowline/bowline/internal/testkit"
)

func benchDocs(b *testing.B, n int) (*bowline.Encoder, []string, []byte) {
	train, test := testkit.DemoSplit(b, 2000)
	enc, err := bowline.New(learnSpec(b, train, "train.tsv", settings(b, demoInput)))
	if err != nil {
		b.Fatal(err)
	}
	var texts []string
	for _, line := range strings.Split(strings.TrimSpace(string(test)), "\n")[1:] {
		f := strings.Split(line, "\t")
		texts = append(texts, f[4]) // the demo's text column (demo.Header)
	}
	var req EncodeRequest
	for i := 0; i < n; i++ {
		req.Documents = append(req.Documents, WireDocument{ID: "d", Text: &texts[i%len(texts)]})
	}
	body, _ := json.Marshal(&req)
	return enc, texts[:n], body
}

// BenchmarkHandler100 answers requests of 100 documents through the
// handler (no network); bytes are request bytes.
func BenchmarkHandler100(b *testing.B) {
	enc, _, body := benchDocs(b, 100)
	h, _ := New(enc, Options{})
	b.SetBytes(int64(len(body)))
	b.ReportAllocs()
	b.ResetTimer()
	b.RunParallel(func(pb *testing.PB) {
		for pb.Next() {
			req := httptest.NewRequest("POST", "/v1/encode", bytes.NewReader(body))
			req.Header.Set("Content-Type", "application/json")
			w := httptest.NewRecorder()
			h.ServeHTTP(w, req)
			if w.Code != 200 {
				b.Fatal(w.Code)
			}
		}
	})
}

// BenchmarkLibrary100 encodes the same 100 documents with the library.
func BenchmarkLibrary100(b *testing.B) {
	enc, texts, body := benchDocs(b, 100)
	b.SetBytes(int64(len(body)))
	b.ReportAllocs()
	b.ResetTimer()
	b.RunParallel(func(pb *testing.PB) {
		for pb.Next() {
			for _, t := range texts {
				enc.Encode(bowline.Document{Text: t})
			}
		}
	})
}

// BenchmarkDecodeRequest100 decodes a request of 100 documents.
func BenchmarkDecodeRequest100(b *testing.B) {
	_, _, body := benchDocs(b, 100)
	b.SetBytes(int64(len(body)))
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		if _, err := DecodeRequest(bytes.NewReader(body), 0, 0); err != nil {
			b.Fatal(err)
		}
	}
}
