package spec

import (
	"bytes"
	"errors"
	"testing"
)

// FuzzRead: reading arbitrary bytes as a spec never panics; it either
// loads a spec that validates or refuses with a *LoadError. (The encode
// package's FuzzReadEncode checks that such a spec also encodes.)
func FuzzRead(f *testing.F) {
	var good bytes.Buffer
	sp := &Spec{Content: handContent()}
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
	})
}
