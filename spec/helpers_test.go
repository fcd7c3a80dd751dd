package spec

import (
	"github.com/bowline/bowline/tokenize"
	"github.com/bowline/bowline/vocab"
	"github.com/bowline/bowline/weight"
)

// handContent is a small valid vocabulary-mode content, written out by
// hand (the spec's own tests cannot learn one: the learn package imports
// this one).
func handContent() Content {
	return Content{
		Input:      Input{Format: "tsv", Text: []string{"text"}, Label: "team"},
		Tokens:     TokensFrom(tokenize.DefaultOptions()),
		Stop:       Stop{Sources: []string{"en"}, KeepNegations: true, Words: []string{"a", "the"}},
		Stem:       "none",
		NGrams:     NGrams{Words: "1-2", Chars: "off"},
		Mode:       ModeVocabulary,
		Docs:       4,
		Vocabulary: &Vocabulary{MinDocs: 1, MaxDocShare: 1, Unseen: vocab.Unseen{Mode: vocab.UnseenDrop}, Keys: []string{"bike", "dock", "dock release"}, Orders: []int{1, 1, 2}, DocCounts: []int64{3, 2, 1}},
		Weights:    Weights{TF: weight.TFLog, IDF: weight.IDFSmooth, Norm: weight.NormL2, IDFValues: []float64{1.2231435513142097, 1.5108256237659907, 1.916290731874155}},
		Labels:     Labels{Kind: LabelsString, Map: []string{"app", "bikes", "billing"}, Values: []string{"app", "bikes", "billing"}, Counts: []int64{1, 2, 1}},
	}
}
