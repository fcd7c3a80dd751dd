package main

import (
	"bufio"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"runtime"
	"sort"
	"strconv"
	"strings"

	"github.com/bowline/bowline/atomicfile"
	"github.com/bowline/bowline/corpus"
	"github.com/bowline/bowline/hashing"
	"github.com/bowline/bowline/ngram"
	"github.com/bowline/bowline/pipeline"
	"github.com/bowline/bowline/spec"
	"github.com/bowline/bowline/stopwords"
	"github.com/bowline/bowline/tokenize"
	"github.com/bowline/bowline/vocab"
	"github.com/bowline/bowline/weight"
)

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

// command is one subcommand's flag set and positional arguments.
type command struct {
	name  string
	args  string // positional synopsis
	about string
	fs    *flag.FlagSet
	pos   []string
	set   map[string]bool
}

func newCommand(name, args, about string) *command {
	c := &command{name: name, args: args, about: about, fs: flag.NewFlagSet(name, flag.ContinueOnError), set: map[string]bool{}}
	c.fs.SetOutput(io.Discard)
	return c
}

// parse parses flags and positional arguments in any order; "--" ends
// flags.
func (c *command) parse(args []string) error {
	for {
		if err := c.fs.Parse(args); err != nil {
			if errors.Is(err, flag.ErrHelp) {
				c.usage(os.Stdout)
				return flag.ErrHelp
			}
			msg := err.Error()
			if name, ok := strings.CutPrefix(msg, "flag provided but not defined: -"); ok {
				msg = "unknown flag --" + strings.TrimLeft(name, "-")
			}
			return usagef("%s: %s (see bowline %s --help)", c.name, msg, c.name)
		}
		rest := c.fs.Args()
		if len(rest) == 0 {
			break
		}
		if len(args) > 0 && len(rest) < len(args) && args[len(args)-len(rest)-1] == "--" {
			c.pos = append(c.pos, rest...)
			break
		}
		c.pos = append(c.pos, rest[0])
		args = rest[1:]
	}
	c.fs.Visit(func(f *flag.Flag) { c.set[f.Name] = true })
	return nil
}

func (c *command) usage(w io.Writer) {
	fmt.Fprintf(w, "usage: bowline %s %s\n\n%s\n\nflags:\n", c.name, c.args, c.about)
	var names []string
	c.fs.VisitAll(func(f *flag.Flag) { names = append(names, f.Name) })
	sort.Strings(names)
	for _, n := range names {
		f := c.fs.Lookup(n)
		name := "--" + n
		if len(n) == 1 {
			name = "-" + n
		}
		def := " [" + f.DefValue + "]"
		if f.DefValue == "" {
			def = " [none]"
		}
		if _, list := f.Value.(*listFlag); list {
			def = "" // the usage text says what happens without it
		}
		fmt.Fprintf(w, "  %-18s %s%s\n", name, f.Usage, def)
	}
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

// options resolves corpus options for path, with defaults from a spec's
// input section when def is not nil and a flag was not given.
func (f *inputFlags) options(path string, def *spec.Input, set map[string]bool) (corpus.Options, error) {
	var o corpus.Options
	format := f.format
	if format == "" && def != nil && path == "-" {
		format = def.Format
	}
	var err error
	if format != "" {
		o.Format, err = corpus.ParseFormat(format)
	} else if path == "-" {
		err = usagef("reading standard input needs --format")
	} else {
		o.Format, err = corpus.FormatFromName(path)
	}
	if err != nil {
		return o, asUsage(err)
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

func asUsage(err error) error {
	if err == nil {
		return nil
	}
	var u *usageError
	if errors.As(err, &u) {
		return err
	}
	return &usageError{err.Error()}
}

// analysisFlags are the flags that shape features (learn and sweep).
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
	table                               []tableArg // --category, --number, --time in command-line order
	missing                             listFlag
	timeZone                            string
}

// tableArg is one --category, --number or --time argument.
type tableArg struct{ kind, arg string }

// tableFlag appends its arguments, with their kind, to one shared list,
// so that the table fields keep the order of the command line.
type tableFlag struct {
	kind string
	list *[]tableArg
}

func (t tableFlag) String() string { return "" }
func (t tableFlag) Set(s string) error {
	*t.list = append(*t.list, tableArg{t.kind, s})
	return nil
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
	fs.Var(tableFlag{spec.KindCategory, &f.table}, "category", "categorical field NAME beside the text: one column per level (repeatable)")
	fs.Var(tableFlag{spec.KindNumber, &f.table}, "number", "numeric field NAME[:log|:standard|:log,standard] beside the text (repeatable)")
	fs.Var(tableFlag{spec.KindTime, &f.table}, "time", "timestamp field NAME[:LAYOUT] (RFC 3339 by default, or a Go layout): periodic features (repeatable)")
	fs.Var(&f.missing, "missing-value", "a value that means missing in number fields, such as NA or -1 (repeatable)")
	fs.StringVar(&f.timeZone, "time-zone", "UTC", "IANA time zone the periods of --time fields are read in")
}

// tableFields turns the table-field flags into spec settings.
func (f *analysisFlags) tableFields(set map[string]bool) ([]spec.TableField, error) {
	if len(f.table) == 0 {
		for _, n := range []string{"missing-value", "time-zone"} {
			if set[n] {
				return nil, usagef("--%s applies to table fields; give --number or --time too", n)
			}
		}
		return nil, nil
	}
	var out []spec.TableField
	seen := map[string]string{}
	hasNumber, hasTime := false, false
	for _, a := range f.table {
		var tf spec.TableField
		var err error
		switch a.kind {
		case spec.KindCategory:
			tf, err = spec.ParseCategory(a.arg)
		case spec.KindNumber:
			tf, err = spec.ParseNumber(a.arg, f.missing)
			hasNumber = true
		case spec.KindTime:
			tf, err = spec.ParseTime(a.arg, f.timeZone)
			hasTime = true
		}
		if err != nil {
			return nil, usagef("--%s: %v", a.kind, err)
		}
		if k, dup := seen[tf.Name]; dup {
			return nil, usagef("--%s %s: field %q is already a %s field", a.kind, a.arg, tf.Name, k)
		}
		seen[tf.Name] = a.kind
		out = append(out, tf)
	}
	if set["missing-value"] && !hasNumber {
		return nil, usagef("--missing-value applies to --number fields; none given")
	}
	if set["time-zone"] && !hasTime {
		return nil, usagef("--time-zone applies to --time fields; none given")
	}
	return out, nil
}

// fieldNames lists the names of table fields.
func fieldNames(fs []spec.TableField) []string {
	var out []string
	for _, f := range fs {
		out = append(out, f.Name)
	}
	return out
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
		words, err := stopSource(src, o)
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
	if s.Fields, err = f.tableFields(set); err != nil {
		return nil, err
	}
	for _, tf := range s.Fields {
		for _, t := range in.Text {
			if t == tf.Name {
				return nil, usagef("--%s %s: %q is a text field too", tf.Kind, tf.Name, t)
			}
		}
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
	if f.minDocs < 1 {
		return nil, usagef("--min-docs: %d is below 1", f.minDocs)
	}
	if !(f.maxDocShare > 0 && f.maxDocShare <= 1) {
		return nil, usagef("--max-doc-share: %g is not a share in (0, 1]", f.maxDocShare)
	}
	if f.maxTerms < 0 {
		return nil, usagef("--max-terms: %d is negative (0 means no limit)", f.maxTerms)
	}
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
func stopSource(src string, o tokenize.Options) ([]string, error) {
	for _, l := range stopwords.Languages() {
		if l == src {
			return stopwords.Builtin(src)
		}
	}
	f, err := os.Open(src)
	if err != nil {
		if os.IsNotExist(err) && !strings.ContainsAny(src, "./") {
			return nil, fmt.Errorf("%q is neither a built-in stop list (%s) nor a file", src, strings.Join(stopwords.Languages(), " "))
		}
		return nil, fmt.Errorf("cannot read stop list %s: %v", src, unwrapPath(err))
	}
	defer f.Close()
	return stopwords.ReadList(f, src)
}

func unwrapPath(err error) error {
	var pe *os.PathError
	if errors.As(err, &pe) {
		return pe.Err
	}
	return err
}

// runFlags are the running flags.
type runFlags struct {
	workers  int
	progress string
}

func (f *runFlags) register(fs *flag.FlagSet) {
	fs.IntVar(&f.workers, "workers", runtime.NumCPU(), "worker goroutines")
	fs.StringVar(&f.progress, "progress", "auto", "progress bar on stderr auto|always|never")
}

func (f *runFlags) check() error {
	if f.workers < 1 {
		return usagef("--workers: %d is not a positive number", f.workers)
	}
	switch f.progress {
	case "auto", "always", "never":
	default:
		return usagef("--progress: %q is not one of auto, always, never", f.progress)
	}
	return nil
}

func parseIndexBase(n int) error {
	if n != 0 && n != 1 {
		return usagef("--index-base: %d is not 1 or 0", n)
	}
	return nil
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

// errorFlags choose what happens to records that cannot be read.
type errorFlags struct {
	onError string
	rejects string
}

func (f *errorFlags) register(fs *flag.FlagSet) {
	fs.StringVar(&f.onError, "on-error", "stop", "a record that cannot be read: stop (exit 3) or skip (into --rejects)")
	fs.StringVar(&f.rejects, "rejects", "", "with --on-error skip: write each skipped record, as read, to FILE")
}

func (f *errorFlags) check() error {
	switch f.onError {
	case "stop":
		if f.rejects != "" {
			return usagef("--rejects needs --on-error skip")
		}
	case "skip":
		if f.rejects == "" {
			return usagef("--on-error skip needs --rejects FILE, so that no skipped record is lost")
		}
	default:
		return usagef("--on-error: %q is not stop or skip", f.onError)
	}
	return nil
}

// open starts the rejects file (nil, nil without --on-error skip).
func (f *errorFlags) open() (*rejectsFile, error) {
	if f.onError != "skip" {
		return nil, nil
	}
	af, err := atomicfile.Create(f.rejects)
	if err != nil {
		return nil, &ioError{err}
	}
	bw := bufio.NewWriter(af)
	return &rejectsFile{file: af, buf: bw, Rejects: &pipeline.Rejects{W: bw}}, nil
}

// rejectsFile is the rejects output of a run.
type rejectsFile struct {
	file *atomicfile.File
	buf  *bufio.Writer
	*pipeline.Rejects
}

func (r *rejectsFile) rejects() *pipeline.Rejects {
	if r == nil {
		return nil
	}
	return r.Rejects
}

func (r *rejectsFile) abort() {
	if r != nil {
		r.file.Abort()
	}
}

// commit puts the rejects file in place.
func (r *rejectsFile) commit(stderr io.Writer) error {
	if r == nil {
		return nil
	}
	if err := r.buf.Flush(); err != nil {
		return &ioError{err}
	}
	if err := r.file.Commit(); err != nil {
		return &ioError{err}
	}
	return nil
}

// summary says what was skipped.
func (r *rejectsFile) summary(stderr io.Writer) {
	if r == nil {
		return
	}
	if r.N > 0 {
		fmt.Fprintf(stderr, "\n%d records skipped, written to %s; first errors:\n", r.N, r.file.Path)
		for _, e := range r.Errors {
			fmt.Fprintf(stderr, "  %s\n", e)
		}
	}
}

// openCorpus opens a corpus and classifies a failure: a file that cannot be
// read is an I/O error (exit 4), a damaged first record bad data (exit 3),
// and a field the file does not have a command-line mistake (exit 2).
func openCorpus(path string, o corpus.Options) (*corpus.Reader, error) {
	r, err := corpus.Open(path, o)
	if err == nil {
		return r, nil
	}
	var pe *corpus.ParseError
	var pathErr *os.PathError
	switch {
	case errors.As(err, &pe):
		return nil, err
	case errors.As(err, &pathErr):
		return nil, &ioError{fmt.Errorf("cannot read %s: %v", path, pathErr.Err)}
	case strings.Contains(err.Error(), "gzip"):
		return nil, &ioError{err}
	}
	return nil, &usageError{err.Error()}
}

// refuseLearnFlags refuses analysis flags given to a command that applies a
// spec: the spec's settings are frozen, so a different tokenizer, stop list,
// n-gram range or weighting would contradict it. The message names the flag
// and what the spec says.
func refuseLearnFlags(c *command, args []string, specPath string) error {
	var an analysisFlags
	learnFS := flag.NewFlagSet("learn", flag.ContinueOnError)
	an.register(learnFS)
	for _, a := range args {
		if a == "--" {
			break
		}
		if !strings.HasPrefix(a, "-") || a == "-" {
			continue
		}
		name := strings.TrimLeft(a, "-")
		name, _, _ = strings.Cut(name, "=")
		if c.fs.Lookup(name) != nil || learnFS.Lookup(name) == nil {
			continue
		}
		sp := specPath
		for j, b := range args {
			if (b == "--spec" || b == "-spec") && j+1 < len(args) {
				sp = args[j+1]
			} else if v, ok := strings.CutPrefix(b, "--spec="); ok {
				sp = v
			}
		}
		said := ""
		if s, err := spec.Load(sp); err == nil {
			said = " (the spec says " + specSetting(name, &s.Content) + ")"
		}
		return usagef("--%s is a learn setting: bowline %s applies the spec's frozen settings%s; learn a new spec to change it", name, c.name, said)
	}
	return nil
}

// specSetting describes the spec's value for an analysis flag.
func specSetting(name string, c *spec.Content) string {
	t := c.Tokens
	switch name {
	case "case":
		return "case " + t.Case
	case "unicode":
		return "unicode " + t.Unicode
	case "accents":
		return "accents " + t.Accents
	case "numbers":
		return "numbers " + t.Numbers
	case "min-len", "max-len":
		return fmt.Sprintf("token length %d-%d", t.MinLen, t.MaxLen)
	case "stop", "drop-negations":
		if len(c.Stop.Words) == 0 {
			return "no stop words"
		}
		neg := "negations kept"
		if !c.Stop.KeepNegations {
			neg = "negations dropped"
		}
		return fmt.Sprintf("stop %s, %d words, %s", strings.Join(c.Stop.Sources, " "), len(c.Stop.Words), neg)
	case "stem":
		return "stem " + c.Stem
	case "words", "chars":
		return "words " + c.NGrams.Words + ", chars " + c.NGrams.Chars
	case "tf", "idf", "norm":
		return "tf " + c.Weights.TF + ", idf " + c.Weights.IDF + ", norm " + c.Weights.Norm
	case "category", "number", "time", "missing-value", "time-zone":
		if len(c.Fields) == 0 {
			return "no table fields"
		}
		var parts []string
		for _, f := range c.Fields {
			d := f.Kind + " " + f.Name
			switch {
			case f.Number != nil:
				var tr []string
				if f.Number.Log {
					tr = append(tr, "log")
				}
				if f.Number.Standard {
					tr = append(tr, "standard")
				}
				if len(tr) > 0 {
					d += ":" + strings.Join(tr, ",")
				}
				if len(f.Number.Sentinels) > 0 {
					d += " (missing: " + strings.Join(f.Number.Sentinels, " ") + ")"
				}
			case f.Time != nil:
				d += ":" + f.Time.Layout + " in " + f.Time.Zone
			}
			parts = append(parts, d)
		}
		return strings.Join(parts, ", ")
	case "hash", "seed", "signed":
		if h := c.Hashing; h != nil {
			return fmt.Sprintf("hashing width %d, seed %d, signed %v", h.Width, h.Seed, h.Signed)
		}
		return "vocabulary mode"
	default:
		if v := c.Vocabulary; v != nil {
			return fmt.Sprintf("min-docs %d, max-doc-share %g, max-terms %d, unseen %s", v.MinDocs, v.MaxDocShare, v.MaxTerms, v.Unseen)
		}
		return "hashing mode"
	}
}
