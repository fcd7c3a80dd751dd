package beam_test

import (
	"context"
	"fmt"
	"log"
	"os"
	"path/filepath"

	"github.com/apache/beam/sdks/v2/go/pkg/beam"
	"github.com/apache/beam/sdks/v2/go/pkg/beam/runners/prism"

	bowlinebeam "github.com/bowline/bowline/beam"
	"github.com/bowline/bowline/corpus"
	"github.com/bowline/bowline/internal/learn"
	"github.com/bowline/bowline/ngram"
	"github.com/bowline/bowline/spec"
	"github.com/bowline/bowline/tokenize"
	"github.com/bowline/bowline/vocab"
)

// A vocabulary learned by a Beam pipeline on the local prism runner, from
// three invented rider notes: keys in two or more notes survive
// --min-docs 2.
func ExampleLearn() {
	dir, _ := os.MkdirTemp("", "example")
	defer os.RemoveAll(dir)
	notes := filepath.Join(dir, "notes.txt")
	os.WriteFile(notes, []byte("dock full again\nbike seat loose\ndock app froze, bike fine\n"), 0o644)

	words, _ := ngram.ParseWords("1-1")
	st := &learn.Settings{
		Input:  spec.Input{Format: "lines", Text: []string{"line"}},
		Tokens: tokenize.DefaultOptions(),
		NGrams: ngram.Config{Words: words},
		Mode:   spec.ModeVocabulary,
		// The other settings at bowline learn's defaults.
		Cutoffs:       vocab.Cutoffs{MinDocs: 2, MaxDocShare: 1},
		KeepNegations: true,
	}
	out := filepath.Join(dir, "spec.json")
	p, s := beam.NewPipelineWithRoot()
	if _, err := bowlinebeam.Learn(s, []string{notes}, corpus.Options{Format: corpus.Lines}, st, out); err != nil {
		log.Fatal(err)
	}
	if _, err := prism.Execute(context.Background(), p); err != nil {
		log.Fatal(err)
	}
	sp, err := spec.Load(out)
	if err != nil {
		log.Fatal(err)
	}
	fmt.Println(sp.Content.Docs, "documents")
	fmt.Println(sp.Content.Vocabulary.Keys, sp.Content.Vocabulary.DocCounts)
	// Output:
	// 3 documents
	// [bike dock] [2 2]
}
