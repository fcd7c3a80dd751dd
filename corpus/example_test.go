package corpus_test

import (
	"fmt"
	"log"
	"strings"

	"github.com/bowline/bowline/corpus"
)

// Reading a TSV file with a header, taking the body as text and the team
// as label. TSV fields are literal, as the IANA text/tab-separated-values
// registration defines them: the "\t" of ticket t-102 stays a backslash
// and a t (Options.TSVEscapes reads such escapes). The tickets are
// invented (Pellwick Bike Share, a made-up city bike-share operator).
func ExampleNewReader() {
	const tickets = "id\tbody\tteam\n" +
		"t-101\tDock 14 on Marrow Street will not release my bike.\tdocks\n" +
		"t-102\tCharged twice for one ride.\\tPlease refund.\tbilling\n" +
		"t-103\t\tapp\n"
	r, err := corpus.NewReader(strings.NewReader(tickets), "tickets.tsv", corpus.Options{
		Format: corpus.TSV,
		Text:   []string{"body"},
		Label:  "team",
	})
	if err != nil {
		log.Fatal(err)
	}
	defer r.Close()
	for r.Scan() {
		rec := r.Record()
		fmt.Printf("line %d, %s: %q\n", rec.Line, rec.Label, rec.Text[0])
	}
	if err := r.Err(); err != nil {
		log.Fatal(err)
	}
	fmt.Println(r.Records(), "records; header", r.Header())
	// Output:
	// line 2, docks: "Dock 14 on Marrow Street will not release my bike."
	// line 3, billing: "Charged twice for one ride.\\tPlease refund."
	// line 4, app: ""
	// 3 records; header [id body team]
}

// JSON Lines: fields are top-level keys; a numeric label keeps its JSON
// spelling. A problem stops the reader with a *ParseError giving file,
// line, column and field.
func ExampleReader_Err() {
	const reviews = `{"id": "r-1", "text": "Smooth gears, clean bikes.", "stars": 5}
{"id": "r-2", "text": 4, "stars": 2}
`
	r, err := corpus.NewReader(strings.NewReader(reviews), "reviews.jsonl", corpus.Options{
		Format: corpus.JSONL,
		Text:   []string{"text"},
		Label:  "stars",
		ID:     "id",
	})
	if err != nil {
		log.Fatal(err)
	}
	for r.Scan() {
		rec := r.Record()
		fmt.Printf("%s (%s stars): %s\n", rec.ID, rec.Label, rec.Text[0])
	}
	fmt.Println(r.Err())
	// Output:
	// r-1 (5 stars): Smooth gears, clean bikes.
	// reviews.jsonl:2:23: field "text": wrong type: expected a string, found number
}

func ExampleFormatFromName() {
	for _, name := range []string{"rides.tsv.gz", "notes.txt", "tickets.ndjson", "dump.xml"} {
		f, err := corpus.FormatFromName(name)
		if err != nil {
			fmt.Println(err)
			continue
		}
		fmt.Println(name, "->", f)
	}
	// Output:
	// rides.tsv.gz -> tsv
	// notes.txt -> lines
	// tickets.ndjson -> jsonl
	// cannot tell the format of dump.xml from its name; use --format lines|tsv|csv|jsonl
}
