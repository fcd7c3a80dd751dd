package bowline_test

import (
	"errors"
	"fmt"
	"log"
	"os"
	"path/filepath"
	"strings"

	"github.com/bowline/bowline"
	"github.com/bowline/bowline/corpus"
	"github.com/bowline/bowline/internal/learn"
	"github.com/bowline/bowline/internal/pipeline"
	"github.com/bowline/bowline/ngram"
	"github.com/bowline/bowline/spec"
	"github.com/bowline/bowline/stopwords"
	"github.com/bowline/bowline/tokenize"
	"github.com/bowline/bowline/vocab"
	"github.com/bowline/bowline/weight"
)

// Invented support tickets of Pellwick Bike Share, a made-up bike-share
// operator: a text and the team that handled it.
const pellwickTickets = `text	team
Dock 14 on Marrow Street would not release my bike.	docks
I was charged twice for one ride, please refund.	billing
The app froze while I scanned the dock code.	app
The dock at Quill Square kept my bike locked.	docks
Refund the second unlock fee, it was charged twice.	billing
The app logged me out before the ride ended.	app
`

// The whole round trip: learn a spec from training text, save it, load it
// where the model is served, and encode a new document.
func Example() {
	// Train: the settings, then counting over the corpus.
	stop, err := stopwords.Builtin("en")
	if err != nil {
		log.Fatal(err)
	}
	words, _ := ngram.ParseWords("1-1")
	settings := &learn.Settings{
		Input:         spec.Input{Format: "tsv", Text: []string{"text"}, Label: "team"},
		Tokens:        tokenize.DefaultOptions(),
		StopSources:   []string{"en"},
		StopWords:     stop,
		KeepNegations: true,
		NGrams:        ngram.Config{Words: words},
		Mode:          spec.ModeVocabulary,
		Cutoffs:       vocab.Cutoffs{MinDocs: 2, MaxDocShare: 1}, // keys seen in two tickets or more
		TF:            weight.TFCount,
		IDF:           weight.IDFNone,
		Norm:          weight.NormNone,
	}
	learner, err := learn.New(settings)
	if err != nil {
		log.Fatal(err)
	}
	r, err := corpus.NewReader(strings.NewReader(pellwickTickets), "tickets.tsv",
		corpus.Options{Format: corpus.TSV, Text: []string{"text"}, Label: "team"})
	if err != nil {
		log.Fatal(err)
	}
	s, _, err := pipeline.Learn(r, learner, pipeline.LearnOptions{Name: "tickets.tsv", Workers: 1})
	if err != nil {
		log.Fatal(err)
	}
	dir, err := os.MkdirTemp("", "bowline-example")
	if err != nil {
		log.Fatal(err)
	}
	defer os.RemoveAll(dir)
	path := filepath.Join(dir, "spec.json")
	if err := s.Save(path); err != nil {
		log.Fatal(err)
	}

	// Serve: load the frozen spec and encode.
	enc, err := bowline.Load(path)
	if err != nil {
		log.Fatal(err)
	}
	keys := enc.Spec().Content.Vocabulary.Keys
	fmt.Println("columns:", strings.Join(keys, " "))
	row, err := enc.Encode(bowline.Document{ID: "t-7", Text: "The dock app charged me twice for a bike I never rode."})
	if err != nil {
		log.Fatal(err)
	}
	fmt.Print(row.ID, ":")
	for i, c := range row.Indices {
		fmt.Printf(" %d(%s)=%g", c, keys[c], row.Values[i])
	}
	fmt.Printf("\nunseen %d of %d features\n", row.Unseen, row.Features)
	// Output:
	// columns: dock app bike charged refund ride twice
	// t-7: 0(dock)=1 1(app)=1 2(bike)=1 3(charged)=1 6(twice)=1
	// unseen 2 of 7 features
}

// A spec learned on several text fields takes them by name.
func ExampleEncoder_Encode_fields() {
	words, _ := ngram.ParseWords("1-1")
	learner, err := learn.New(&learn.Settings{
		Input:   spec.Input{Format: "tsv", Text: []string{"title", "body"}},
		Tokens:  tokenize.DefaultOptions(),
		NGrams:  ngram.Config{Words: words},
		Mode:    spec.ModeVocabulary,
		Cutoffs: vocab.DefaultCutoffs(),
	})
	if err != nil {
		log.Fatal(err)
	}
	r, err := corpus.NewReader(strings.NewReader("title\tbody\nDock stuck\tbike locked\nDouble charge\trefund please\n"), "t.tsv",
		corpus.Options{Format: corpus.TSV, Text: []string{"title", "body"}})
	if err != nil {
		log.Fatal(err)
	}
	s, _, err := pipeline.Learn(r, learner, pipeline.LearnOptions{Workers: 1})
	if err != nil {
		log.Fatal(err)
	}
	enc, err := bowline.New(s)
	if err != nil {
		log.Fatal(err)
	}
	fmt.Println("fields:", enc.Fields())
	row, err := enc.Encode(bowline.Document{ID: "t-1", Fields: map[string]string{"title": "Dock stuck", "body": "dock locked"}})
	for i, c := range row.Indices {
		fmt.Printf("%q=%g ", s.Content.Vocabulary.Keys[c], row.Values[i])
	}
	fmt.Println("unseen:", row.Unseen, "error:", err)
	_, err = enc.Encode(bowline.Document{ID: "t-2", Fields: map[string]string{"title": "Refund"}})
	var de *bowline.DocumentError
	fmt.Println(errors.As(err, &de), err)
	// Output:
	// fields: [title body]
	// "body|locked"=1 "title|dock"=1 "title|stuck"=1 unseen: 1 error: <nil>
	// true document "t-2": field "body": missing
}
