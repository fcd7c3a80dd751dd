package spec

import "testing"

// These let the external tests (package spec_test), which learn specs
// with the learn package, reach the decoders' differential checks.

// CompareDecoders is compareDecoders.
func CompareDecoders(t *testing.T, name string, data []byte) bool {
	return compareDecoders(t, name, data)
}

// CompareReads is compareReads.
func CompareReads(t *testing.T, name string, data []byte) { compareReads(t, name, data) }

// FastContent is the content fastDecode gives for data, and whether it
// took data.
func FastContent(data []byte) (Content, bool) {
	_, c, ok := fastDecode(data)
	return c, ok
}
