package torture

import (
	"bytes"

	"github.com/bowline/bowline/spec"
	"github.com/bowline/bowline/tokenize"
	"github.com/bowline/bowline/weight"
)

// Runs about refused specs.
func init() {
	addRuns(
		Run{Name: "spec-missing", About: "encode with a spec file that does not exist: a file that cannot be read",
			Files: map[string][]byte{"in.tsv": []byte("text\ndock\n")},
			Args:  []string{"encode", "--spec", "{dir}/none.json", "{dir}/in.tsv", "-o", "{dir}/out.svm"},
			Exit:  ExitIO, Absent: []string{"out.svm"}, Stderr: []string{"{dir}/none.json"}},
		Run{Name: "spec-not-json", About: "encode with a spec file that is not a spec",
			Files: map[string][]byte{"in.tsv": []byte("text\ndock\n"), "s.json": []byte("hello")},
			Args:  []string{"encode", "--spec", "{dir}/s.json", "{dir}/in.tsv", "-o", "{dir}/out.svm"},
			Exit:  ExitSpec, Absent: []string{"out.svm"}, Unchanged: []string{"s.json"}, Stderr: []string{"not a spec"}},
	)
}

// handSpec is a small valid vocabulary spec (keys dock, bike; smooth idf
// over 4 documents) after edit changes its content, sealed again: the
// fingerprint matches whatever edit did, as if a person had recomputed it.
func handSpec(edit func(*spec.Content)) []byte {
	c := spec.Content{
		Input:      spec.Input{Format: "tsv", Text: []string{"text"}},
		Tokens:     spec.TokensFrom(tokenize.DefaultOptions()),
		Stem:       "none",
		NGrams:     spec.NGrams{Words: "1-1", Chars: "off"},
		Mode:       spec.ModeVocabulary,
		Docs:       4,
		Vocabulary: &spec.Vocabulary{MinDocs: 1, MaxDocShare: 1, Keys: []string{"dock", "bike"}, Orders: []int{1, 1}, DocCounts: []int64{3, 2}},
		Weights:    spec.Weights{IDF: weight.IDFSmooth, IDFValues: []float64{1.2231435513142097, 1.5108256237659907}},
		Labels:     spec.Labels{Kind: spec.LabelsNone},
	}
	if edit != nil {
		edit(&c)
	}
	s := &spec.Spec{Content: c}
	var b bytes.Buffer
	if err := s.Write(&b); err != nil {
		panic(err)
	}
	return b.Bytes()
}

func init() {
	in := []byte("text\ndock bike\n")
	encodeWith := func(name string) []string {
		return []string{"encode", "--spec", "{dir}/" + name, "{dir}/in.tsv", "-o", "{dir}/out.svm"}
	}
	good := handSpec(nil)
	addRuns(
		Run{Name: "spec-hand-made", About: "a valid spec written by hand encodes",
			Files: map[string][]byte{"in.tsv": in, "s.json": good}, Args: encodeWith("s.json"), Exit: ExitOK},
		Run{Name: "spec-idf-huge", About: "an idf edited to 1e308 with the fingerprint recomputed is refused (rows would hold Inf and NaN)",
			Files: map[string][]byte{"in.tsv": in, "s.json": handSpec(func(c *spec.Content) { c.Weights.IDFValues[0] = 1e308 })},
			Args:  encodeWith("s.json"), Exit: ExitSpec, Absent: []string{"out.svm"}, Stderr: []string{"idf 1e+308 of column 0"}},
		Run{Name: "spec-count-negative", About: "a negative document count, fingerprint recomputed, is refused",
			Files: map[string][]byte{"in.tsv": in, "s.json": handSpec(func(c *spec.Content) { c.Vocabulary.DocCounts[1] = -5 })},
			Args:  encodeWith("s.json"), Exit: ExitSpec, Absent: []string{"out.svm"}, Stderr: []string{"document count: -5"}},
		Run{Name: "spec-duplicate-key", About: "a spec file holding one JSON key twice is refused with its position",
			Files: map[string][]byte{"in.tsv": in, "s.json": bytes.Replace(good, []byte(`"docs":4,`), []byte(`"docs":4,"docs":5,`), 1)},
			Args:  encodeWith("s.json"), Exit: ExitSpec, Absent: []string{"out.svm"}, Stderr: []string{`duplicate key "docs"`, "line 5, column"}},
		Run{Name: "spec-trailing-bytes", About: "bytes after a spec's JSON object are refused with their position",
			Files: map[string][]byte{"in.tsv": in, "s.json": append(append([]byte(nil), good...), `{"schema": 99}`...)},
			Args:  encodeWith("s.json"), Exit: ExitSpec, Absent: []string{"out.svm"}, Stderr: []string{"bytes after the spec's JSON object"}},
	)
}
