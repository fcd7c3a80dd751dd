package spec

import (
	"crypto/sha256"
	"encoding/json"
	"fmt"
	"strings"
)

// SettingsDiff names the first setting in which a and b differ, as
// "field: a-value vs b-value", or returns "" when they agree. Learned
// numbers and cutoffs are not compared; corpus field names are compared
// only when withInput is true.
func SettingsDiff(a, b *Content, withInput bool) string {
	fa, fb := SettingsFields(a, withInput), SettingsFields(b, withInput)
	for i := range fa {
		if fa[i].Value != fb[i].Value {
			return fmt.Sprintf("%s: %s vs %s", fa[i].Name, fa[i].Value, fb[i].Value)
		}
	}
	return ""
}

// Field is one named setting as text.
type Field struct{ Name, Value string }

// SettingsFields lists the settings of c that change rows, in a fixed
// order, as text (the JSON names of the spec's fields, dotted). Corpus
// field names come first when withInput is true.
func SettingsFields(c *Content, withInput bool) []Field {
	var f []Field
	add := func(name string, v any) {
		b, _ := json.Marshal(v)
		f = append(f, Field{name, string(b)})
	}
	if withInput {
		add("input.format", c.Input.Format)
		add("input.text", c.Input.Text)
		add("input.label", c.Input.Label)
		add("input.id", c.Input.ID)
		add("input.no_header", c.Input.NoHeader)
		add("input.tsv_escapes", c.Input.TSVEscapes)
	}
	t := c.Tokens
	add("tokens.unicode", t.Unicode)
	add("tokens.case", t.Case)
	add("tokens.accents", t.Accents)
	add("tokens.numbers", t.Numbers)
	add("tokens.min_len", t.MinLen)
	add("tokens.max_len", t.MaxLen)
	add("stop.sources", c.Stop.Sources)
	add("stop.keep_negations", c.Stop.KeepNegations)
	sum := sha256.Sum256([]byte(strings.Join(c.Stop.Words, "\n")))
	f = append(f, Field{"stop.words", fmt.Sprintf("%d words (sha256 %x)", len(c.Stop.Words), sum[:4])})
	add("stem", c.Stem)
	add("ngrams.words", c.NGrams.Words)
	add("ngrams.chars", c.NGrams.Chars)
	add("mode", c.Mode)
	if c.Vocabulary != nil {
		add("vocabulary.unseen", c.Vocabulary.Unseen)
	} else {
		add("vocabulary.unseen", nil)
	}
	add("hashing", c.Hashing)
	add("weights.tf", c.Weights.TF)
	add("weights.idf", c.Weights.IDF)
	add("weights.norm", c.Weights.Norm)
	return f
}
