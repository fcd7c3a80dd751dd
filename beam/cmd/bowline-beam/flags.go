package main

import (
	"github.com/bowline/bowline/corpus"
	"github.com/bowline/bowline/internal/cli"
	"github.com/bowline/bowline/spec"
)

// The corpus and analysis flags are bowline learn's and encode's
// (internal/cli, shared with cmd/bowline), with the same names, defaults
// and meaning, so that the same command line gives the same spec and rows
// on either.

// corpusOptions resolves the corpus options of paths, which must share one
// format, with defaults from a spec's input section when def is not nil
// and a flag was not given.
func corpusOptions(in *cli.InputFlags, paths []string, def *spec.Input, given map[string]bool) (corpus.Options, error) {
	var format corpus.Format
	if in.Format != "" {
		var err error
		if format, err = corpus.ParseFormat(in.Format); err != nil {
			return corpus.Options{}, cli.Usagef("--format: %v", err)
		}
	} else {
		for i, p := range paths {
			if p == "-" {
				return corpus.Options{}, cli.Usagef("a Beam pipeline reads files, not standard input")
			}
			ff, err := corpus.FormatFromName(p)
			if err != nil {
				return corpus.Options{}, cli.Usagef("%v", err)
			}
			if i > 0 && ff != format {
				return corpus.Options{}, cli.Usagef("%s is %s but %s is %s: give --format, or files of one format", paths[0], format, p, ff)
			}
			format = ff
		}
	}
	return in.OptionsFor(format, def, given)
}
