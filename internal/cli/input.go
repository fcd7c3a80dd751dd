package cli

import (
	"flag"
	"fmt"

	"github.com/bowline/bowline/corpus"
	"github.com/bowline/bowline/spec"
)

// InputFlags are the corpus flags: format, fields and byte checks.
type InputFlags struct {
	Format     string   // --format; "" chooses by file extension
	Text       ListFlag // --text fields
	Label      string   // --label field
	ID         string   // --id field
	NoHeader   bool     // --no-header
	StrictUTF8 bool     // --strict-utf8
	TSVEscapes bool     // --tsv-escapes
	// RecordLimit is --record-limit (0: corpus.DefaultMaxRecord).
	RecordLimit SizeFlag
}

// Register defines the corpus flags on fs.
func (f *InputFlags) Register(fs *flag.FlagSet) {
	fs.BoolVar(&f.StrictUTF8, "strict-utf8", false, "invalid UTF-8 and NUL bytes are errors (default: replaced and counted)")
	fs.StringVar(&f.Format, "format", "", "corpus format lines|tsv|csv|jsonl (default: by file extension)")
	fs.Var(&f.Text, "text", "text field by header name or 1-based column number (repeatable; default \"text\")")
	fs.StringVar(&f.Label, "label", "", "label field")
	fs.StringVar(&f.ID, "id", "", "id field")
	fs.BoolVar(&f.NoHeader, "no-header", false, "TSV/CSV first row is data; fields are column numbers")
	fs.BoolVar(&f.TSVEscapes, "tsv-escapes", false, "TSV fields hold backslash escapes (\\t \\n \\r \\\\), as some database exports write them (default: fields are literal)")
	fs.Var(&f.RecordLimit, "record-limit", "the most bytes one record may hold (a longer one stops the run, exit 3) [128MiB]")
}

// Options resolves the corpus options for path ("-" for standard input),
// with defaults from a spec's input section when def is not nil and a flag
// was not given.
func (f *InputFlags) Options(path string, def *spec.Input, given map[string]bool) (corpus.Options, error) {
	var format corpus.Format
	name := f.Format
	if name == "" && def != nil && path == "-" {
		name = def.Format
	}
	var err error
	if name != "" {
		format, err = corpus.ParseFormat(name)
	} else if path == "-" {
		err = Usagef("reading standard input needs --format")
	} else {
		format, err = corpus.FormatFromName(path)
	}
	if err != nil {
		return corpus.Options{}, AsUsage(err)
	}
	return f.OptionsFor(format, def, given)
}

// OptionsFor resolves the corpus options for a corpus of the given format,
// with defaults from a spec's input section when def is not nil and a flag
// was not given.
func (f *InputFlags) OptionsFor(format corpus.Format, def *spec.Input, given map[string]bool) (corpus.Options, error) {
	o := corpus.Options{Format: format}
	o.Text = f.Text
	o.Label, o.ID, o.NoHeader = f.Label, f.ID, f.NoHeader
	o.StrictUTF8 = f.StrictUTF8
	o.TSVEscapes = f.TSVEscapes
	o.MaxRecord = int64(f.RecordLimit)
	if def != nil {
		if !given["tsv-escapes"] {
			o.TSVEscapes = def.TSVEscapes
		}
		if len(o.Text) == 0 {
			o.Text = def.Text
		}
		if !given["label"] {
			o.Label = def.Label
		}
		if !given["id"] {
			o.ID = def.ID
		}
		if !given["no-header"] {
			o.NoHeader = def.NoHeader
		}
	}
	if o.Format == corpus.Lines {
		if f.Label != "" || f.ID != "" || len(f.Text) > 0 {
			return o, Usagef("--text, --label and --id need a tsv, csv or jsonl corpus; lines format has one text per line")
		}
		o.Text, o.Label, o.ID = nil, "", ""
		return o, nil
	}
	if len(o.Text) == 0 || (def != nil && def.Format == "lines" && len(f.Text) == 0) {
		o.Text = []string{"text"}
	}
	return o, f.checkDistinct(o, def, given)
}

// checkDistinct refuses a text field that is also the label or the id
// field: its text would be features and the row's label (or id) at once.
// Fields are compared as written (a name and the column number of the
// same column are not told apart here). The message names the flags, or
// says where a value not given on the command line comes from.
func (f *InputFlags) checkDistinct(o corpus.Options, def *spec.Input, given map[string]bool) error {
	text := func(t string) string {
		switch {
		case len(f.Text) > 0:
			return "--text " + t
		case def != nil && def.Format != "lines":
			return fmt.Sprintf("the spec's text field %q", t)
		}
		return fmt.Sprintf("the text field %q (the default of --text)", t)
	}
	other := func(flag, v string) string {
		if given[flag] || def == nil {
			return "--" + flag + " " + v
		}
		return fmt.Sprintf("the spec's %s field %q", flag, v)
	}
	for _, t := range o.Text {
		for _, x := range []struct{ flag, v string }{{"label", o.Label}, {"id", o.ID}} {
			if x.v != "" && x.v == t {
				return Usagef("%s and %s name the same field: a field is either text or the %s; give --text the field that holds the text", text(t), other(x.flag, x.v), x.flag)
			}
		}
	}
	return nil
}

// SpecInput records the corpus options in a spec; a lines corpus has one
// text field called "line".
func SpecInput(o corpus.Options) spec.Input {
	in := spec.Input{Format: o.Format.String(), Text: o.Text, Label: o.Label, ID: o.ID, NoHeader: o.NoHeader}
	if o.Format == corpus.TSV {
		in.TSVEscapes = o.TSVEscapes
	}
	if o.Format == corpus.Lines {
		in.Text = []string{"line"}
	}
	return in
}
