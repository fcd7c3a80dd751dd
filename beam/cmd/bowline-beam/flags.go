package main

import (
	"errors"
	"flag"
	"fmt"
	"os"
	"strconv"
	"strings"

	"github.com/bowline/bowline/corpus"
	"github.com/bowline/bowline/hashing"
	"github.com/bowline/bowline/ngram"
	"github.com/bowline/bowline/spec"
	"github.com/bowline/bowline/stopwords"
	"github.com/bowline/bowline/tokenize"
	"github.com/bowline/bowline/vocab"
	"github.com/bowline/bowline/weight"
)

// The flags below are bowline learn's and encode's (cmd/bowline), with the
// same names, defaults and meaning, so that the same command line gives
// the same spec and rows on either.

// usageError is a problem with the command line (exit code 2).
type usageError struct{ msg string }

func (e *usageError) Error() string { return e.msg }

func usagef(format string, a ...any) error { return &usageError{fmt.Sprintf(format, a...)} }

// listFlag is a repeatable string flag.
type listFlag []string

func (l *listFlag) String() string { return strings.Join(*l, ",") }
func (l *listFlag) Set(s string) error {
	*l = append(*l, s)
	return nil
}

// inputFlags are the corpus flags.
type inputFlags struct {
	format   string
	text     listFlag
	label    string
	id       string
	noHeader bool
	strict   bool
}

func (f *inputFlags) register(fs *flag.FlagSet) {
	fs.BoolVar(&f.strict, "strict-utf8", false, "invalid UTF-8 and NUL bytes are errors (default: replaced and counted)")
	fs.StringVar(&f.format, "format", "", "corpus format lines|tsv|csv|jsonl (default: by file extension)")
	fs.Var(&f.text, "text", "text field by header name or 1-based column number (repeatable; default \"text\")")
	fs.StringVar(&f.label, "label", "", "label field")
	fs.StringVar(&f.id, "id", "", "id field")
	fs.BoolVar(&f.noHeader, "no-header", false, "TSV/CSV first row is data; fields are column numbers")
}

// options resolves the corpus options of paths, which must share one
// format, with defaults from a spec's input section when def is not nil
// and a flag was not given.
func (f *inputFlags) options(paths []string, def *spec.Input, set map[string]bool) (corpus.Options, error) {
	var o corpus.Options
	var err error
	if f.format != "" {
		if o.Format, err = corpus.ParseFormat(f.format); err != nil {
			return o, usagef("--format: %v", err)
		}
	} else {
		for i, p := range paths {
			if p == "-" {
				return o, usagef("a Beam pipeline reads files, not standard input")
			}
			ff, err := corpus.FormatFromName(p)
			if err != nil {
				return o, usagef("%v", err)
			}
			if i > 0 && ff != o.Format {
				return o, usagef("%s is %s but %s is %s: give --format, or files of one format", paths[0], o.Format, p, ff)
			}
			o.Format = ff
		}
	}
	o.Text = f.text
	o.Label, o.ID, o.NoHeader = f.label, f.id, f.noHeader
	o.StrictUTF8 = f.strict
	if def != nil {
		if len(o.Text) == 0 {
			o.Text = def.Text
		}
		if !set["label"] {
			o.Label = def.Label
		}
		if !set["id"] {
			o.ID = def.ID
		}
		if !set["no-header"] {
			o.NoHeader = def.NoHeader
		}
	}
	if o.Format == corpus.Lines {
		if f.label != "" || f.id != "" || len(f.text) > 0 {
			return o, usagef("--text, --label and --id need a tsv, csv or jsonl corpus; lines format has one text per line")
		}
		o.Text, o.Label, o.ID = nil, "", ""
		return o, nil
	}
	if len(o.Text) == 0 || (def != nil && def.Format == "lines" && len(f.text) == 0) {
		o.Text = []string{"text"}
	}
	return o, nil
}

// specInput records the corpus options in a spec; a lines corpus has one
// text field called "line".
func specInput(o corpus.Options) spec.Input {
	in := spec.Input{Format: o.Format.String(), Text: o.Text, Label: o.Label, ID: o.ID, NoHeader: o.NoHeader}
	if o.Format == corpus.Lines {
		in.Text = []string{"line"}
	}
	return in
}

// analysisFlags are the flags that shape features.
type analysisFlags struct {
	caseMode, unicode, accents, numbers string
	minLen, maxLen                      int
	stop                                listFlag
	dropNegations                       bool
	stem                                string
	words, chars                        string
	minDocs                             int64
	maxDocShare                         float64
	maxTerms                            int
	unseen                              string
	hash                                string
	seed                                uint64
	signed                              bool
	tf, idf, norm                       string
}

func (f *analysisFlags) register(fs *flag.FlagSet) {
	fs.StringVar(&f.caseMode, "case", "fold", "case handling fold|lower|keep")
	fs.StringVar(&f.unicode, "unicode", "nfkc", "Unicode normalization nfkc|nfc|none")
	fs.StringVar(&f.accents, "accents", "keep", "accents keep|strip")
	fs.StringVar(&f.numbers, "numbers", "keep", "numbers keep|mask|drop")
	fs.IntVar(&f.minLen, "min-len", 1, "shortest token kept, in characters")
	fs.IntVar(&f.maxLen, "max-len", 64, "longest token kept, in characters")
	fs.Var(&f.stop, "stop", "stop list: language code, file, or none (repeatable)")
	fs.BoolVar(&f.dropNegations, "drop-negations", false, "drop negations too (kept by default)")
	fs.StringVar(&f.stem, "stem", "none", "stemming language ("+strings.Join(tokenize.StemLanguages(), " ")+") or none")
	fs.StringVar(&f.words, "words", "1-1", "word n-gram range A-B, or off")
	fs.StringVar(&f.chars, "chars", "off", "character n-gram range A-B, or off")
	fs.Int64Var(&f.minDocs, "min-docs", 1, "keep keys seen in at least N training documents")
	fs.Float64Var(&f.maxDocShare, "max-doc-share", 1.0, "drop keys in more than this share of training documents")
	fs.IntVar(&f.maxTerms, "max-terms", 0, "keep at most K keys, by document count (0: no limit)")
	fs.StringVar(&f.unseen, "unseen", "drop", "unseen keys at encode time: drop|count|hash:K")
	fs.StringVar(&f.hash, "hash", "", "hashing mode with WIDTH buckets (2^20 or 1048576)")
	fs.Uint64Var(&f.seed, "seed", 0, "hash seed")
	fs.BoolVar(&f.signed, "signed", false, "sign hashing: each key adds +1 or -1")
	fs.StringVar(&f.tf, "tf", "count", "term frequency count|binary|log")
	fs.StringVar(&f.idf, "idf", "none", "inverse document frequency none|smooth|plain")
	fs.StringVar(&f.norm, "norm", "none", "row norm none|l1|l2")
}

// settings validates the analysis flags before any work starts.
func (f *analysisFlags) settings(in spec.Input, set map[string]bool) (*spec.Settings, error) {
	s := &spec.Settings{Input: in, KeepNegations: !f.dropNegations}
	var err error
	wrap := func(flag string, err error) error { return usagef("--%s: %v", flag, err) }
	o := tokenize.DefaultOptions()
	if o.Case, err = tokenize.ParseCase(f.caseMode); err != nil {
		return nil, wrap("case", err)
	}
	if o.Unicode, err = tokenize.ParseNormalization(f.unicode); err != nil {
		return nil, wrap("unicode", err)
	}
	if o.Accents, err = tokenize.ParseAccents(f.accents); err != nil {
		return nil, wrap("accents", err)
	}
	if o.Numbers, err = tokenize.ParseNumbers(f.numbers); err != nil {
		return nil, wrap("numbers", err)
	}
	o.MinLen, o.MaxLen = f.minLen, f.maxLen
	if err := o.Validate(); err != nil {
		return nil, usagef("--min-len/--max-len: %v", err)
	}
	s.Tokens = o
	for _, src := range f.stop {
		if src == "none" {
			continue
		}
		words, err := stopSource(src)
		if err != nil {
			return nil, wrap("stop", err)
		}
		s.StopSources = append(s.StopSources, src)
		s.StopWords = append(s.StopWords, words...)
	}
	if f.stem != "" && f.stem != "none" {
		st, err := tokenize.NewStemmer(f.stem)
		if err != nil {
			return nil, wrap("stem", err)
		}
		s.Stem = st.Language()
	}
	if s.NGrams.Words, err = ngram.ParseWords(f.words); err != nil {
		return nil, wrap("words", err)
	}
	if s.NGrams.Chars, err = ngram.ParseChars(f.chars); err != nil {
		return nil, wrap("chars", err)
	}
	if !s.NGrams.Words.On() && !s.NGrams.Chars.On() {
		return nil, usagef("--words off and --chars off: no features left")
	}
	if s.TF, err = weight.ParseTF(f.tf); err != nil {
		return nil, wrap("tf", err)
	}
	if s.IDF, err = weight.ParseIDF(f.idf); err != nil {
		return nil, wrap("idf", err)
	}
	if s.Norm, err = weight.ParseNorm(f.norm); err != nil {
		return nil, wrap("norm", err)
	}
	if f.hash != "" {
		for _, v := range []string{"min-docs", "max-doc-share", "max-terms", "unseen"} {
			if set[v] {
				return nil, usagef("--%s is a vocabulary setting; it does not apply with --hash", v)
			}
		}
		w, err := hashing.ParseWidth(f.hash)
		if err != nil {
			return nil, wrap("hash", err)
		}
		s.Mode = spec.ModeHashing
		s.Hashing = spec.Hashing{Width: w, Seed: f.seed, Signed: f.signed}
		return s, nil
	}
	for _, v := range []string{"seed", "signed"} {
		if set[v] {
			return nil, usagef("--%s is a hashing setting; give --hash WIDTH to use hashing mode", v)
		}
	}
	s.Mode = spec.ModeVocabulary
	s.Cutoffs = vocab.Cutoffs{MinDocs: f.minDocs, MaxDocShare: f.maxDocShare, MaxTerms: f.maxTerms}
	if err := s.Cutoffs.Validate(); err != nil {
		return nil, usagef("%v", err)
	}
	if s.Unseen, err = vocab.ParseUnseen(f.unseen); err != nil {
		return nil, wrap("unseen", err)
	}
	return s, nil
}

// stopSource reads a --stop argument: a built-in language code or a file.
func stopSource(src string) ([]string, error) {
	for _, l := range stopwords.Languages() {
		if l == src {
			return stopwords.Builtin(src)
		}
	}
	f, err := os.Open(src)
	if err != nil {
		var pe *os.PathError
		if errors.As(err, &pe) {
			err = pe.Err
		}
		if os.IsNotExist(err) && !strings.ContainsAny(src, "./") {
			return nil, fmt.Errorf("%q is neither a built-in stop list (%s) nor a file", src, strings.Join(stopwords.Languages(), " "))
		}
		return nil, fmt.Errorf("cannot read stop list %s: %v", src, err)
	}
	defer f.Close()
	return stopwords.ReadList(f, src)
}

func parseFloatFlag(name, s string) (*float64, error) {
	if s == "" {
		return nil, nil
	}
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		return nil, usagef("--%s: %q is not a number", name, s)
	}
	return &v, nil
}
