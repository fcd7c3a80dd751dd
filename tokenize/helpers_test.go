package tokenize

import (
	"os"
	"testing"
)

// needFile returns whether path exists. When it does not, the test is
// skipped with the reason printed, or fails when CI=true, where every
// outside file is expected to be present.
func needFile(t testing.TB, path, why string) bool {
	t.Helper()
	if _, err := os.Stat(path); err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatalf("%s missing (%s): %v", path, why, err)
		}
		t.Skipf("skipping: %s missing (%s)", path, why)
		return false
	}
	return true
}

// collect returns the tokens and kinds Each gives for text.
func collect(tk *Tokenizer, text string) (toks []string, kinds []Kind) {
	tk.Each([]byte(text), func(tok []byte, k Kind) {
		toks = append(toks, string(tok))
		kinds = append(kinds, k)
	})
	return toks, kinds
}
