package tokenize

// collect returns the tokens and kinds Each gives for text.
func collect(tk *Tokenizer, text string) (toks []string, kinds []Kind) {
	tk.Each([]byte(text), func(tok []byte, k Kind) {
		toks = append(toks, string(tok))
		kinds = append(kinds, k)
	})
	return toks, kinds
}
