package report

import (
	"encoding/json"
	"fmt"
	"io"
)

// WriteJSON writes the figures as indented JSON with the field names given
// in the struct tags, followed by a newline. Lists that are always present
// (by_order, top_terms, nnz_histogram) are written as [] rather than null
// when empty, so readers need not tell the two apart.
func (f *Figures) WriteJSON(w io.Writer) error {
	c := *f
	if c.Sparsity != nil && c.Sparsity.NNZHistogram == nil {
		sp := *c.Sparsity
		sp.NNZHistogram = []int64{}
		c.Sparsity = &sp
	}
	if c.OOV != nil && c.OOV.ByOrder == nil {
		o := *c.OOV
		o.ByOrder = []OrderOOV{}
		c.OOV = &o
	}
	if c.Vocabulary != nil && (c.Vocabulary.ByOrder == nil || c.Vocabulary.TopTerms == nil) {
		v := *c.Vocabulary
		if v.ByOrder == nil {
			v.ByOrder = []Count{}
		}
		if v.TopTerms == nil {
			v.TopTerms = []Count{}
		}
		c.Vocabulary = &v
	}
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	enc.SetEscapeHTML(false)
	if err := enc.Encode(&c); err != nil {
		return fmt.Errorf("report: writing JSON: %w", err)
	}
	return nil
}
