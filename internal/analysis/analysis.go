// Package analysis turns a spec's text settings into the token chain (tokenizer, stop words, stemmer, n-grams) and emits each document's feature keys.
package analysis

import (
	"github.com/bowline/bowline/ngram"
	"github.com/bowline/bowline/spec"
	"github.com/bowline/bowline/stopwords"
	"github.com/bowline/bowline/tokenize"
)

// A Chain is the frozen text analysis of a spec: tokenizer settings, stop
// set, stemmer language and n-gram ranges. It is safe for concurrent use;
// each goroutine gets its own Analyzer from NewAnalyzer.
type Chain struct {
	tokOpts tokenize.Options
	stop    *stopwords.Set
	stem    string
	ngrams  ngram.Config
	fields  []string
}

// New builds the analysis chain of c.
func New(c *spec.Content) (*Chain, error) {
	var a Chain
	var err error
	if a.tokOpts, err = c.Tokens.Options(); err != nil {
		return nil, err
	}
	if c.Stem != "" && c.Stem != "none" {
		if _, err := tokenize.NewStemmer(c.Stem); err != nil {
			return nil, err
		}
		a.stem = c.Stem
	}
	if len(c.Stop.Words) > 0 {
		// The stored words are already normalized; no second pass.
		a.stop = stopwords.NewSet(c.Stop.Words, nil, false)
	}
	if a.ngrams, err = c.NGrams.Config(); err != nil {
		return nil, err
	}
	a.fields = c.Input.Text
	return &a, nil
}

// Prefixes returns the key prefix of each text field ("field|"), or nil
// with a single text field, whose keys have none.
func (a *Chain) Prefixes() []string {
	if len(a.fields) <= 1 {
		return nil
	}
	p := make([]string, len(a.fields))
	for i, f := range a.fields {
		p[i] = f + "|"
	}
	return p
}

// Words is the range of word n-gram orders (off when none).
func (a *Chain) Words() ngram.Range { return a.ngrams.Words }

// TokenOptions are the tokenizer settings.
func (a *Chain) TokenOptions() tokenize.Options { return a.tokOpts }

// Stats are the token figures one Analyzer collected.
type Stats struct {
	Tokenizer   tokenize.Stats
	StopDropped int64
}

// Analyzer turns one document's text fields into feature keys. It is not
// safe for concurrent use.
type Analyzer struct {
	tok      *tokenize.Tokenizer
	stem     *tokenize.Stemmer
	filter   *stopwords.Filter
	ngr      *ngram.Builder
	prefixes [][]byte
	arena    []byte
	spans    []int
	tokens   [][]byte
	// One is made per worker, next to the others: the padding keeps the
	// fields it writes for every token off their cache lines.
	_ [64]byte
}

// NewAnalyzer returns a fresh Analyzer for one goroutine.
func (a *Chain) NewAnalyzer() *Analyzer {
	tok, err := tokenize.New(a.tokOpts)
	if err != nil {
		panic(err) // validated in New
	}
	z := &Analyzer{tok: tok, ngr: ngram.NewBuilder(a.ngrams)}
	if a.stem != "" {
		z.stem, _ = tokenize.NewStemmer(a.stem)
	}
	if a.stop != nil {
		z.filter = a.stop.NewFilter()
	}
	if len(a.fields) > 1 {
		for _, f := range a.fields {
			z.prefixes = append(z.prefixes, []byte(f+"|"))
		}
	}
	return z
}

// Analyze calls fn for every feature key of the document whose text fields
// are texts (in the order of the spec's text fields). key is only valid
// during fn; o is the key's n-gram order.
func (z *Analyzer) Analyze(texts [][]byte, fn func(key []byte, o ngram.Order)) {
	z.run(texts, func(_ int, prefix []byte, tokens [][]byte, from int) {
		z.ngr.EmitFrom(prefix, tokens, from, fn)
	})
}

// AnalyzeTokens is Analyze for a caller that forms the word n-grams itself
// (looking them up through word ids, say). For each text field and each
// chunk of its kept tokens, words gets the field's index, its key prefix
// ("field|" with several text fields, else empty), the tokens and from:
// tokens[:from] are context, passed with the chunk before, for the word
// n-grams that reach into tokens[from:]. The character n-gram keys of
// tokens[from:] go to chars right after, so keys come in Analyze's order
// when words emits, for each word order, its n-grams ending at or after
// from, left to right (ngram.WordKey forms their keys). The tokens are
// only valid during the call and must not be modified or appended to:
// each reaches, within its capacity, over the next ones.
func (z *Analyzer) AnalyzeTokens(texts [][]byte, words func(field int, prefix []byte, tokens [][]byte, from int), chars func(key []byte, o ngram.Order)) {
	z.run(texts, func(field int, prefix []byte, tokens [][]byte, from int) {
		words(field, prefix, tokens, from)
		z.ngr.EmitCharsFrom(prefix, tokens, from, chars)
	})
}

// run tokenizes texts and hands each chunk of kept tokens to sink.
func (z *Analyzer) run(texts [][]byte, sink func(field int, prefix []byte, tokens [][]byte, from int)) {
	for i, text := range texts {
		var prefix []byte
		if z.prefixes != nil && i < len(z.prefixes) {
			prefix = z.prefixes[i]
		}
		z.arena = z.arena[:0]
		z.spans = z.spans[:0]
		ctx := 0
		z.tok.Each(text, func(t []byte, _ tokenize.Kind) {
			if z.filter != nil && z.filter.Drop(t) {
				return
			}
			if z.stem != nil {
				t = z.stem.Stem(t)
			}
			// Tokens sit in the arena one space apart, so that a word
			// n-gram's key (tokens joined by one space) is a slice of it.
			z.arena = append(z.arena, t...)
			z.spans = append(z.spans, len(z.arena))
			z.arena = append(z.arena, ' ')
			if len(z.spans) >= chunkTokens {
				ctx = z.flush(i, prefix, ctx, false, sink)
			}
		})
		z.flush(i, prefix, ctx, true, sink)
	}
}

// chunkTokens bounds the tokens an Analyzer holds: a longer document is
// cut into chunks, each emitted with the few tokens of context its word
// n-grams need, so memory does not grow with the document.
const chunkTokens = 4096

// flush emits the keys of the tokens held, the first ctx of which are
// context already emitted. Unless final, it keeps the context the next
// chunk needs and returns its length.
func (z *Analyzer) flush(field int, prefix []byte, ctx int, final bool, sink func(int, []byte, [][]byte, int)) int {
	z.tokens = z.tokens[:0]
	start := 0
	for _, end := range z.spans {
		// Not capped: the arena goes on after each token with a space
		// and the next token (see ngram.Builder.EmitFrom).
		z.tokens = append(z.tokens, z.arena[start:end])
		start = end + 1
	}
	sink(field, prefix, z.tokens, ctx)
	if final {
		return 0
	}
	k := min(z.ngr.Context(), len(z.spans))
	if k == 0 {
		z.arena, z.spans = z.arena[:0], z.spans[:0]
		return 0
	}
	cut := 0
	if first := len(z.spans) - k; first > 0 {
		cut = z.spans[first-1] + 1
	}
	n := copy(z.arena, z.arena[cut:])
	z.arena = z.arena[:n]
	copy(z.spans, z.spans[len(z.spans)-k:])
	z.spans = z.spans[:k]
	for j := range z.spans {
		z.spans[j] -= cut
	}
	return k
}

// Stats returns the figures collected so far.
func (z *Analyzer) Stats() Stats {
	s := Stats{Tokenizer: z.tok.Stats()}
	if z.filter != nil {
		s.StopDropped = z.filter.Total()
	}
	return s
}

// Filter is the stop-word filter (nil without a stop list); its Dropped
// method tells which stop words were dropped how often.
func (z *Analyzer) Filter() *stopwords.Filter { return z.filter }
