package cli

import (
	"errors"
	"flag"
	"reflect"
	"strings"
	"testing"

	"github.com/bowline/bowline/corpus"
	"github.com/bowline/bowline/spec"
)

func TestParseFlagsAnywhere(t *testing.T) {
	c := NewCommand("learn", "CORPUS", "")
	var in InputFlags
	in.Register(c.Flags)
	// "--" ends options and what follows are operands even when they
	// begin with "-": POSIX XBD 12.2 Utility Syntax Guidelines,
	// Guideline 10 (recalled from memory).
	err := c.Parse([]string{"a.tsv", "--label", "y", "b.tsv", "--no-header", "--", "-c.tsv", "--id"})
	if err != nil {
		t.Fatal(err)
	}
	if want := []string{"a.tsv", "b.tsv", "-c.tsv", "--id"}; !reflect.DeepEqual(c.Args, want) {
		t.Errorf("Args = %q, want %q", c.Args, want)
	}
	if in.Label != "y" || !in.NoHeader || in.ID != "" {
		t.Errorf("flags = %+v, want label y, no-header, no id", in)
	}
	if !c.Given["label"] || !c.Given["no-header"] || c.Given["id"] {
		t.Errorf("Given = %v, want label and no-header only", c.Given)
	}
}

func TestParseHelp(t *testing.T) {
	c := NewCommand("learn", "", "")
	if err := c.Parse([]string{"x", "--help"}); !errors.Is(err, flag.ErrHelp) {
		t.Errorf("--help: %v, want flag.ErrHelp", err)
	}
}

func TestLinesCorpusRefusesFields(t *testing.T) {
	in := InputFlags{Label: "y"}
	_, err := in.OptionsFor(corpus.Lines, nil, map[string]bool{"label": true})
	var u *UsageError
	if !errors.As(err, &u) {
		t.Fatalf("lines corpus with --label: %v, want a *UsageError", err)
	}
	o, err := (&InputFlags{}).OptionsFor(corpus.Lines, nil, nil)
	if err != nil || SpecInput(o).Text[0] != "line" {
		t.Errorf("lines corpus: %v, %+v; want one text field \"line\"", err, SpecInput(o))
	}
}

func TestSettingsRefusesMixedModes(t *testing.T) {
	c := NewCommand("learn", "", "")
	var an AnalysisFlags
	an.Register(c.Flags)
	an.RegisterTable(c.Flags)
	if err := c.Parse([]string{"--hash", "1024", "--min-docs", "2"}); err != nil {
		t.Fatal(err)
	}
	_, err := an.Settings(SpecInput(corpus.Options{Format: corpus.TSV, Text: []string{"text"}}), c.Given)
	// The message cmd/bowline has always given (moved here unchanged).
	want := "--min-docs is a vocabulary setting; it does not apply with --hash"
	if err == nil || err.Error() != want {
		t.Errorf("--hash with --min-docs: %v, want %q", err, want)
	}
}

// TestTextIsNotLabelOrID: a text field that is also the label or the id
// is refused with a usage error naming both, whether the names come from
// flags, from a spec or from the default text field.
func TestTextIsNotLabelOrID(t *testing.T) {
	sp := &spec.Input{Format: "tsv", Text: []string{"body"}, Label: "team"}
	cases := []struct {
		flags InputFlags
		def   *spec.Input
		given map[string]bool
		want  string // "" for accepted
	}{
		{InputFlags{Text: ListFlag{"team"}, Label: "team"}, nil, map[string]bool{"label": true}, "--text team and --label team name the same field"},
		{InputFlags{Text: ListFlag{"body", "id"}, ID: "id"}, nil, map[string]bool{"id": true}, "--text id and --id id name the same field"},
		{InputFlags{Label: "text"}, nil, map[string]bool{"label": true}, `the text field "text" (the default of --text) and --label text`},
		{InputFlags{Label: "body"}, sp, map[string]bool{"label": true}, `the spec's text field "body" and --label body`},
		{InputFlags{Text: ListFlag{"team"}}, sp, nil, `--text team and the spec's label field "team"`},
		{InputFlags{Text: ListFlag{"body"}, Label: "team", ID: "id"}, nil, map[string]bool{"label": true, "id": true}, ""},
		{InputFlags{}, sp, nil, ""},
	}
	for _, tc := range cases {
		_, err := tc.flags.OptionsFor(corpus.TSV, tc.def, tc.given)
		var u *UsageError
		switch {
		case tc.want == "" && err != nil:
			t.Errorf("%+v: %v, want it accepted", tc.flags, err)
		case tc.want != "" && (!errors.As(err, &u) || !strings.Contains(err.Error(), tc.want)):
			t.Errorf("%+v: %v, want a usage error with %q", tc.flags, err, tc.want)
		}
	}
}
