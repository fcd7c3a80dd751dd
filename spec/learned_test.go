package spec_test

import (
	"bytes"
	"encoding/json"
	"testing"

	"github.com/bowline/bowline/internal/learn"
	"github.com/bowline/bowline/internal/learn/learntest"
	"github.com/bowline/bowline/internal/tablefield"
	"github.com/bowline/bowline/ngram"
	"github.com/bowline/bowline/spec"
	"github.com/bowline/bowline/tokenize"
	"github.com/bowline/bowline/vocab"
	"github.com/bowline/bowline/weight"
)

// learnedSpecs are specs of every shape learn writes, as files: both
// modes, character n-grams, table fields and an extended spec.
func learnedSpecs(t *testing.T) map[string][]byte {
	t.Helper()
	specs := map[string]*spec.Spec{}
	specs["vocabulary log l2 smooth idf"] = learntest.LearnDocs(t, learntest.Settings(spec.ModeVocabulary))
	specs["hashing signed"] = learntest.LearnDocs(t, learntest.Settings(spec.ModeHashing))
	s := learntest.Settings(spec.ModeVocabulary)
	s.TF, s.IDF, s.Norm = weight.TFCount, weight.IDFNone, weight.NormNone
	specs["vocabulary no idf"] = learntest.LearnDocs(t, s)
	s = learntest.Settings(spec.ModeVocabulary)
	s.NGrams.Chars = s.NGrams.Words
	specs["vocabulary chars"] = learntest.LearnDocs(t, s)
	specs["table fields vocabulary"] = learnTable(t, spec.ModeVocabulary)
	specs["table fields hashing"] = learnTable(t, spec.ModeHashing)
	s = learntest.Settings(spec.ModeVocabulary)
	s.Cutoffs.MinDocs = 2
	parent := learntest.LearnDocs(t, s)
	specs["extended (retired, parent_keys, seen)"], _ = learntest.ExtendOn(t, parent, vocab.Cutoffs{MinDocs: 3, MaxDocShare: 1}, learntest.Docs[:2], []string{"bikes", "billing"})
	out := map[string][]byte{}
	for name, sp := range specs {
		var buf bytes.Buffer
		if err := sp.Write(&buf); err != nil {
			t.Fatal(err)
		}
		out[name] = buf.Bytes()
	}
	return out
}

// learnTable learns a spec with a category, a number and a time field on
// a few invented records.
func learnTable(t *testing.T, mode spec.Mode) *spec.Spec {
	t.Helper()
	s := &learn.Settings{
		Input: spec.Input{Format: "tsv", Text: []string{"text"}}, Tokens: tokenize.DefaultOptions(),
		NGrams: ngram.Config{Words: ngram.Range{Min: 1, Max: 1}}, Mode: mode,
		Cutoffs: vocab.Cutoffs{MinDocs: 2, MaxDocShare: 1},
	}
	if mode == spec.ModeHashing {
		s.Hashing = spec.Hashing{Width: 1 << 20, Seed: 3}
	}
	zone, _ := tablefield.ParseCategory("zone")
	age, _ := tablefield.ParseNumber("age:standard", []string{"-1"})
	created, _ := tablefield.ParseTime("created", "")
	s.Fields = []spec.TableField{zone, age, created}
	l, err := learn.New(s)
	if err != nil {
		t.Fatal(err)
	}
	w := l.NewWorker()
	for _, r := range [][4]string{{"dock", "Harbour", "20", "2024-03-15T06:00:00Z"}, {"bike", "harbour", "-1", ""}, {"app", "quay", "40", "2024-01-01T00:00:00Z"}} {
		if err := l.ObserveFields([][]byte{[]byte(r[1]), []byte(r[2]), []byte(r[3])}); err != nil {
			t.Fatal(err)
		}
		w.Observe([][]byte{[]byte(r[0])})
	}
	sp, _, err := l.Finish(w, learn.LabelsFrom(nil, false))
	if err != nil {
		t.Fatal(err)
	}
	return sp
}

// TestFastDecodeLearnedSpecs: every spec shape bowline writes takes the
// fast path, and it decodes exactly as encoding/json does, re-indented
// too.
func TestFastDecodeLearnedSpecs(t *testing.T) {
	for name, data := range learnedSpecs(t) {
		if !spec.CompareDecoders(t, name, data) {
			t.Errorf("%s: the fast path gave up on a spec bowline wrote", name)
		}
		spec.CompareReads(t, name, data)
		var pretty bytes.Buffer
		if err := json.Indent(&pretty, data, "\t", "  "); err != nil {
			t.Fatal(err)
		}
		if !spec.CompareDecoders(t, name+" re-indented", pretty.Bytes()) {
			t.Errorf("%s: the fast path gave up on a re-indented spec", name)
		}
		spec.CompareReads(t, name+" re-indented", pretty.Bytes())
		if name == "extended (retired, parent_keys, seen)" {
			c, _ := spec.FastContent(data)
			if v := c.Vocabulary; len(v.Retired) == 0 || v.ParentKeys == 0 || v.Seen == nil {
				t.Errorf("%s: the test spec lacks retired flags, parent keys or seen figures", name)
			}
		}
	}
}
