package spec

import (
	"bytes"
	"errors"
	"testing"
)

// FuzzRead: reading arbitrary bytes as a spec never panics; it either
// loads a spec that validates or refuses with a *LoadError.
func FuzzRead(f *testing.F) {
	var good bytes.Buffer
	sp := &Spec{Content: Content{
		Input:  Input{Format: "tsv", Text: []string{"text"}},
		Tokens: Tokens{Unicode: "nfkc", Case: "fold", Accents: "keep", Numbers: "keep", MinLen: 1, MaxLen: 64},
		Stem:   "none", NGrams: NGrams{Words: "1-2", Chars: "off"}, Mode: ModeVocabulary, Docs: 2,
		Vocabulary: &Vocabulary{MinDocs: 1, MaxDocShare: 1, Unseen: "drop", Keys: []string{"dock", "bike"}, Orders: []int{1, 1}, DocCounts: []int64{2, 1}},
		Weights:    Weights{TF: "count", IDF: "none", Norm: "none"}, Labels: Labels{Kind: "none"},
	}}
	if err := sp.Write(&good); err != nil {
		f.Fatal(err)
	}
	f.Add(good.Bytes())
	f.Add(good.Bytes()[:good.Len()/2])
	f.Add([]byte(`{"schema":1,"content":{}}`))
	f.Add([]byte("\x1f\x8b\x08\x00"))
	f.Fuzz(func(t *testing.T, data []byte) {
		s, err := Read(bytes.NewReader(data), "fuzz.json")
		if err != nil {
			var le *LoadError
			if !errors.As(err, &le) {
				t.Fatalf("not a LoadError: %v", err)
			}
			return
		}
		if err := s.Validate(); err != nil {
			t.Fatalf("loaded an invalid spec: %v", err)
		}
		if _, err := NewEncoder(s); err != nil {
			t.Fatalf("loaded a spec that cannot encode: %v", err)
		}
	})
}
