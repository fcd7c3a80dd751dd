package spec

import (
	"bytes"
	"fmt"
	"testing"
)

// TestCanonicalFastMatchesEncodingJSON: the hand-written vocabulary arrays
// of Canonical are byte for byte what encoding/json writes (the
// fingerprint depends on it), for keys that need every kind of escape
// (RFC 8259 section 7, and encoding/json's own choices: no HTML escaping
// here, U+2028 and U+2029 escaped, invalid UTF-8 replaced).
func TestCanonicalFastMatchesEncodingJSON(t *testing.T) {
	odd := []string{`say "hi"`, `back\slash`, "tab\there", "nl\nx", "\x00nul", "\x01\x1f", "\b\f\r", "del\x7f",
		"<b>&amp;", "line\u2028sep", "para\u2029sep", "bad\xffutf8", "trunc\xe2\x82", "caf\u00e9", "\U0001F6B2 bike", ""}
	base := Spec{Content: handContent()}
	for _, variant := range []string{"plain", "odd keys", "extended", "nil arrays"} {
		c := base.Content
		v := *c.Vocabulary
		v.Keys, v.Orders, v.DocCounts = nil, nil, nil
		for i := range 3000 {
			k := fmt.Sprintf("key %d", i)
			if variant == "odd keys" && i < len(odd) {
				k = odd[i] + fmt.Sprint(i)
			}
			v.Keys = append(v.Keys, k)
			v.Orders = append(v.Orders, 1+i%2)
			v.DocCounts = append(v.DocCounts, int64(3000-i))
		}
		switch variant {
		case "extended":
			v.Retired = make([]bool, len(v.Keys))
			v.Retired[7] = true
			v.ParentKeys = 2000
		case "nil arrays":
			v.Orders, v.DocCounts = nil, nil
		}
		c.Vocabulary = &v
		c.Weights.IDFValues = nil
		want, err := c.canonicalJSON()
		if err != nil {
			t.Fatal(err)
		}
		if _, ok := c.canonicalFast(); !ok {
			t.Fatalf("%s: fast path not taken", variant)
		}
		got, err := c.Canonical()
		if err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(got, want) {
			i := 0
			for i < len(got) && i < len(want) && got[i] == want[i] {
				i++
			}
			t.Fatalf("%s: differs at byte %d: %q vs %q", variant, i, got[max(0, i-20):min(len(got), i+40)], want[max(0, i-20):min(len(want), i+40)])
		}
	}
}
