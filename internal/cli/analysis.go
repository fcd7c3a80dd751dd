package cli

import (
	"errors"
	"flag"
	"fmt"
	"os"
	"strings"

	"github.com/bowline/bowline/hashing"
	"github.com/bowline/bowline/internal/learn"
	"github.com/bowline/bowline/internal/tablefield"
	"github.com/bowline/bowline/ngram"
	"github.com/bowline/bowline/spec"
	"github.com/bowline/bowline/stopwords"
	"github.com/bowline/bowline/tokenize"
	"github.com/bowline/bowline/vocab"
	"github.com/bowline/bowline/weight"
)

// AnalysisFlags are the flags that shape features: tokens, stop words,
// stemming, n-grams, vocabulary cutoffs or hashing, weights, and the table
// fields beside the text. Each field holds its flag's value.
type AnalysisFlags struct {
	Case, Unicode, Accents, Numbers string   // --case, --unicode, --accents, --numbers
	MinLen, MaxLen                  int      // --min-len, --max-len
	Stop                            ListFlag // --stop sources
	DropNegations                   bool     // --drop-negations
	Stem                            string   // --stem language
	Words, Chars                    string   // --words, --chars n-gram ranges
	MinDocs                         int64    // --min-docs
	MaxDocShare                     float64  // --max-doc-share
	MaxTerms                        int      // --max-terms
	Unseen                          string   // --unseen
	Hash                            string   // --hash width
	Seed                            uint64   // --seed
	Signed                          bool     // --signed
	TF, IDF, Norm                   string   // --tf, --idf, --norm
	Missing                         ListFlag // --missing-value
	TimeZone                        string   // --time-zone

	table []tableArg // --category, --number, --time in command-line order
}

// tableArg is one --category, --number or --time argument.
type tableArg struct {
	kind spec.FieldKind
	arg  string
}

// tableFlag appends its arguments, with their kind, to one shared list,
// so that the table fields keep the order of the command line.
type tableFlag struct {
	kind spec.FieldKind
	list *[]tableArg
}

func (t tableFlag) String() string { return "" }
func (t tableFlag) Set(s string) error {
	*t.list = append(*t.list, tableArg{t.kind, s})
	return nil
}

// Register defines the text analysis, vocabulary, hashing and weighting
// flags on fs.
func (f *AnalysisFlags) Register(fs *flag.FlagSet) {
	fs.StringVar(&f.Case, "case", "fold", "case handling fold|lower|keep")
	fs.StringVar(&f.Unicode, "unicode", "nfkc", "Unicode normalization nfkc|nfc|none")
	fs.StringVar(&f.Accents, "accents", "keep", "accents keep|strip")
	fs.StringVar(&f.Numbers, "numbers", "keep", "numbers keep|mask|drop")
	fs.IntVar(&f.MinLen, "min-len", 1, "shortest token kept, in characters")
	fs.IntVar(&f.MaxLen, "max-len", 64, "longest token kept, in characters")
	fs.Var(&f.Stop, "stop", "stop list: language code, file, or none (repeatable)")
	fs.BoolVar(&f.DropNegations, "drop-negations", false, "drop negations too (kept by default)")
	fs.StringVar(&f.Stem, "stem", "none", "stemming language ("+strings.Join(tokenize.StemLanguages(), " ")+") or none")
	fs.StringVar(&f.Words, "words", "1-1", "word n-gram range A-B, or off")
	fs.StringVar(&f.Chars, "chars", "off", "character n-gram range A-B, or off")
	fs.Int64Var(&f.MinDocs, "min-docs", 1, "keep keys seen in at least N training documents")
	fs.Float64Var(&f.MaxDocShare, "max-doc-share", 1.0, "drop keys in more than this share of training documents")
	fs.IntVar(&f.MaxTerms, "max-terms", 0, "keep at most K keys, by document count (0: no limit)")
	fs.StringVar(&f.Unseen, "unseen", "drop", "unseen keys at encode time: drop|count|hash:K")
	fs.StringVar(&f.Hash, "hash", "", "hashing mode with WIDTH buckets (2^20 or 1048576)")
	fs.Uint64Var(&f.Seed, "seed", 0, "hash seed")
	fs.BoolVar(&f.Signed, "signed", false, "sign hashing: each key adds +1 or -1")
	fs.StringVar(&f.TF, "tf", "count", "term frequency count|binary|log")
	fs.StringVar(&f.IDF, "idf", "none", "inverse document frequency none|smooth|plain")
	fs.StringVar(&f.Norm, "norm", "none", "row norm none|l1|l2")
}

// RegisterTable defines the table-field flags on fs: --category, --number,
// --time, --missing-value and --time-zone.
func (f *AnalysisFlags) RegisterTable(fs *flag.FlagSet) {
	fs.Var(tableFlag{spec.KindCategory, &f.table}, "category", "categorical field NAME beside the text: one column per level (repeatable)")
	fs.Var(tableFlag{spec.KindNumber, &f.table}, "number", "numeric field NAME[:log|:standard|:log,standard] beside the text (repeatable)")
	fs.Var(tableFlag{spec.KindTime, &f.table}, "time", "timestamp field NAME[:LAYOUT] (RFC 3339 by default, or a Go layout): periodic features (repeatable)")
	fs.Var(&f.Missing, "missing-value", "a value that means missing in number fields, such as NA or -1 (repeatable)")
	fs.StringVar(&f.TimeZone, "time-zone", "UTC", "IANA time zone the periods of --time fields are read in")
}

// tableFields turns the table-field flags into spec settings.
func (f *AnalysisFlags) tableFields(set map[string]bool) ([]spec.TableField, error) {
	if len(f.table) == 0 {
		for _, n := range []string{"missing-value", "time-zone"} {
			if set[n] {
				return nil, Usagef("--%s applies to table fields; give --number or --time too", n)
			}
		}
		return nil, nil
	}
	var out []spec.TableField
	seen := map[string]spec.FieldKind{}
	hasNumber, hasTime := false, false
	for _, a := range f.table {
		var tf spec.TableField
		var err error
		switch a.kind {
		case spec.KindCategory:
			tf, err = tablefield.ParseCategory(a.arg)
		case spec.KindNumber:
			tf, err = tablefield.ParseNumber(a.arg, f.Missing)
			hasNumber = true
		case spec.KindTime:
			tf, err = tablefield.ParseTime(a.arg, f.TimeZone)
			hasTime = true
		}
		if err != nil {
			return nil, Usagef("--%s: %v", a.kind, err)
		}
		if k, dup := seen[tf.Name]; dup {
			return nil, Usagef("--%s %s: field %q is already a %s field", a.kind, a.arg, tf.Name, k)
		}
		seen[tf.Name] = a.kind
		out = append(out, tf)
	}
	if set["missing-value"] && !hasNumber {
		return nil, Usagef("--missing-value applies to --number fields; none given")
	}
	if set["time-zone"] && !hasTime {
		return nil, Usagef("--time-zone applies to --time fields; none given")
	}
	return out, nil
}

// Settings validates the flags before any work starts and returns the
// spec settings for a corpus read as in; set holds the names of the flags
// given. Every error names the flag; it is a *UsageError but for a --stop
// file that cannot be read (its chain holds the *os.PathError) or that is
// malformed (a *stopwords.ParseError).
func (f *AnalysisFlags) Settings(in spec.Input, set map[string]bool) (*learn.Settings, error) {
	s := &learn.Settings{Input: in, KeepNegations: !f.DropNegations}
	var err error
	wrap := func(flag string, err error) error { return Usagef("--%s: %v", flag, err) }
	o := tokenize.DefaultOptions()
	if o.Case, err = tokenize.ParseCase(f.Case); err != nil {
		return nil, wrap("case", err)
	}
	if o.Unicode, err = tokenize.ParseNormalization(f.Unicode); err != nil {
		return nil, wrap("unicode", err)
	}
	if o.Accents, err = tokenize.ParseAccents(f.Accents); err != nil {
		return nil, wrap("accents", err)
	}
	if o.Numbers, err = tokenize.ParseNumbers(f.Numbers); err != nil {
		return nil, wrap("numbers", err)
	}
	o.MinLen, o.MaxLen = f.MinLen, f.MaxLen
	if err := o.Validate(); err != nil {
		return nil, Usagef("--min-len/--max-len: %v", err)
	}
	s.Tokens = o
	for _, src := range f.Stop {
		if src == "none" {
			continue
		}
		words, err := stopSource(src)
		if err != nil {
			var u *UsageError
			if errors.As(err, &u) {
				return nil, wrap("stop", err)
			}
			return nil, &flagError{"--stop: " + err.Error(), err}
		}
		s.StopSources = append(s.StopSources, src)
		s.StopWords = append(s.StopWords, words...)
	}
	if f.Stem != "" && f.Stem != "none" {
		st, err := tokenize.NewStemmer(f.Stem)
		if err != nil {
			return nil, wrap("stem", err)
		}
		s.Stem = st.Language()
	}
	if s.NGrams.Words, err = ngram.ParseWords(f.Words); err != nil {
		return nil, wrap("words", err)
	}
	if s.NGrams.Chars, err = ngram.ParseChars(f.Chars); err != nil {
		return nil, wrap("chars", err)
	}
	if !s.NGrams.Words.On() && !s.NGrams.Chars.On() {
		return nil, Usagef("--words off and --chars off: no features left")
	}
	if s.TF, err = weight.ParseTF(f.TF); err != nil {
		return nil, wrap("tf", err)
	}
	if s.IDF, err = weight.ParseIDF(f.IDF); err != nil {
		return nil, wrap("idf", err)
	}
	if s.Norm, err = weight.ParseNorm(f.Norm); err != nil {
		return nil, wrap("norm", err)
	}
	if s.Fields, err = f.tableFields(set); err != nil {
		return nil, err
	}
	for _, tf := range s.Fields {
		for _, t := range in.Text {
			if t == tf.Name {
				return nil, Usagef("--%s %s: %q is a text field too", tf.Kind, tf.Name, t)
			}
		}
	}
	if f.Hash != "" {
		for _, v := range []string{"min-docs", "max-doc-share", "max-terms", "unseen"} {
			if set[v] {
				return nil, Usagef("--%s is a vocabulary setting; it does not apply with --hash", v)
			}
		}
		w, err := hashing.ParseWidth(f.Hash)
		if err != nil {
			return nil, wrap("hash", err)
		}
		s.Mode = spec.ModeHashing
		s.Hashing = spec.Hashing{Width: w, Seed: f.Seed, Signed: f.Signed}
		return s, nil
	}
	for _, v := range []string{"seed", "signed"} {
		if set[v] {
			return nil, Usagef("--%s is a hashing setting; give --hash WIDTH to use hashing mode", v)
		}
	}
	s.Mode = spec.ModeVocabulary
	if f.MinDocs < 1 {
		return nil, Usagef("--min-docs: %d is below 1", f.MinDocs)
	}
	if !(f.MaxDocShare > 0 && f.MaxDocShare <= 1) {
		return nil, Usagef("--max-doc-share: %g is not a share in (0, 1]", f.MaxDocShare)
	}
	if f.MaxTerms < 0 {
		return nil, Usagef("--max-terms: %d is negative (0 means no limit)", f.MaxTerms)
	}
	s.Cutoffs = vocab.Cutoffs{MinDocs: f.MinDocs, MaxDocShare: f.MaxDocShare, MaxTerms: f.MaxTerms}
	if err := s.Cutoffs.Validate(); err != nil {
		return nil, Usagef("%v", err)
	}
	if s.Unseen, err = vocab.ParseUnseen(f.Unseen); err != nil {
		return nil, wrap("unseen", err)
	}
	return s, nil
}

// StopFiles returns the --stop sources that name files: neither none nor
// a built-in list. Commands declare them as inputs (see CheckFiles).
func (f *AnalysisFlags) StopFiles() []string {
	var out []string
	for _, src := range f.Stop {
		if src != "none" && !builtinStop(src) {
			out = append(out, src)
		}
	}
	return out
}

func builtinStop(src string) bool {
	for _, l := range stopwords.Languages() {
		if l == src {
			return true
		}
	}
	return false
}

// stopSource reads a --stop argument: a built-in language code or a file.
func stopSource(src string) ([]string, error) {
	if builtinStop(src) {
		return stopwords.Builtin(src)
	}
	f, err := os.Open(src)
	if err != nil {
		if os.IsNotExist(err) && !strings.ContainsAny(src, "./") {
			return nil, Usagef("%q is neither a built-in stop list (%s) nor a file", src, strings.Join(stopwords.Languages(), " "))
		}
		return nil, &flagError{fmt.Sprintf("cannot read stop list %s: %v", src, unwrapPath(err)), err}
	}
	defer f.Close()
	return stopwords.ReadList(f, src)
}

// flagError is an error with the message given, whose chain is err's.
type flagError struct {
	msg string
	err error
}

func (e *flagError) Error() string { return e.msg }
func (e *flagError) Unwrap() error { return e.err }

func unwrapPath(err error) error {
	var pe *os.PathError
	if errors.As(err, &pe) {
		return pe.Err
	}
	return err
}
