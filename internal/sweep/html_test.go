package sweep

import (
	"bytes"
	"strings"
	"testing"
)

// TestHTMLExplain checks the crowded-bucket section of the page: keys from
// the text are escaped, and a width where no bucket is shared says so.
func TestHTMLExplain(t *testing.T) {
	r := &Result{
		Train: "train.tsv", Docs: 3, Features: 9, DistinctKeys: 4, Classes: 1,
		Vocabulary: VocabRow{Terms: 4, ModelBytes: 32, Bytes: 200},
		Widths:     []WidthRow{{Width: 1 << 8, Keys: 4, Occupied: 3, ModelBytes: 2048}, {Width: 1 << 10, Keys: 4, Occupied: 4, ModelBytes: 8192}},
		Explain: &Explain{Width: 1 << 8, Buckets: []Bucket{{Bucket: 7, Occurrences: 5,
			Keys: []KeyCount{{Key: "<b>dock", Count: 3}, {Key: "bike", Count: 2}}}}},
	}
	page := func() string {
		var b bytes.Buffer
		if err := r.WriteHTML(&b); err != nil {
			t.Fatal(err)
		}
		return b.String()
	}
	h := page()
	for _, want := range []string{"<h1>bowline sweep: train.tsv</h1>", "<h2>most crowded buckets at width 2^8</h2>",
		"<td>7</td><td>2</td><td>5</td><td>&#34;&lt;b&gt;dock&#34; (3), &#34;bike&#34; (2)</td>"} {
		if !strings.Contains(h, want) {
			t.Errorf("page lacks %q", want)
		}
	}
	if strings.Contains(h, "<b>") {
		t.Error("a key's markup reached the page unescaped")
	}
	r.Explain = &Explain{Width: 1 << 10}
	if h := page(); !strings.Contains(h, "<li>No bucket holds two keys at this width.</li>") {
		t.Error("a width without shared buckets does not say so")
	}
}
