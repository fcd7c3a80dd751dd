package spec

import (
	"fmt"

	"github.com/bowline/bowline/ngram"
	"github.com/bowline/bowline/stopwords"
	"github.com/bowline/bowline/tokenize"
)

// OrderCode packs an n-gram kind and order into the int stored with each
// vocabulary key: word n-grams are n, character n-grams 100+n.
func OrderCode(kind ngram.Kind, n int) int {
	if kind == ngram.Char {
		return 100 + n
	}
	return n
}

// OrderLabel is the report label of an order code ("w1", "c3").
func OrderLabel(code int) string {
	if code > 100 {
		return ngram.OrderLabel(ngram.Char, code-100)
	}
	return ngram.OrderLabel(ngram.Word, code)
}

// Analysis is the frozen text analysis chain of a spec: tokenizer settings,
// stop set, stemmer language and n-gram ranges. It is safe for concurrent
// use; each goroutine gets its own Analyzer from NewAnalyzer.
type Analysis struct {
	tokOpts tokenize.Options
	stop    *stopwords.Set
	stem    string
	ngrams  ngram.Config
	fields  []string
}

// Analysis builds the spec's analysis chain.
func (c *Content) Analysis() (*Analysis, error) {
	var a Analysis
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
	if a.ngrams.Words, err = ngram.ParseWords(c.NGrams.Words); err != nil {
		return nil, fmt.Errorf("word n-grams: %w", err)
	}
	if a.ngrams.Chars, err = ngram.ParseChars(c.NGrams.Chars); err != nil {
		return nil, fmt.Errorf("character n-grams: %w", err)
	}
	if !a.ngrams.Words.On() && !a.ngrams.Chars.On() {
		return nil, fmt.Errorf("no features: word and character n-grams are both off")
	}
	a.fields = c.Input.Text
	return &a, nil
}

// Options converts the stored token settings.
func (t Tokens) Options() (tokenize.Options, error) {
	var o tokenize.Options
	var err error
	if o.Unicode, err = tokenize.ParseNormalization(t.Unicode); err != nil {
		return o, err
	}
	if o.Case, err = tokenize.ParseCase(t.Case); err != nil {
		return o, err
	}
	if o.Accents, err = tokenize.ParseAccents(t.Accents); err != nil {
		return o, err
	}
	if o.Numbers, err = tokenize.ParseNumbers(t.Numbers); err != nil {
		return o, err
	}
	o.MinLen, o.MaxLen = t.MinLen, t.MaxLen
	return o, o.Validate()
}

// TokensFrom stores tokenizer options as flag words.
func TokensFrom(o tokenize.Options) Tokens {
	return Tokens{Unicode: o.Unicode.String(), Case: o.Case.String(), Accents: o.Accents.String(),
		Numbers: o.Numbers.String(), MinLen: o.MinLen, MaxLen: o.MaxLen}
}

// AnalyzerStats are the token figures one Analyzer collected.
type AnalyzerStats struct {
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
}

// NewAnalyzer returns a fresh Analyzer for one goroutine.
func (a *Analysis) NewAnalyzer() *Analyzer {
	tok, err := tokenize.New(a.tokOpts)
	if err != nil {
		panic(err) // validated in Analysis
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
// during fn; code is the key's order code (see OrderCode).
func (z *Analyzer) Analyze(texts [][]byte, fn func(key []byte, code int)) {
	for i, text := range texts {
		z.arena = z.arena[:0]
		z.spans = z.spans[:0]
		z.tok.Each(text, func(t []byte, _ tokenize.Kind) {
			if z.filter != nil && z.filter.Drop(t) {
				return
			}
			if z.stem != nil {
				t = z.stem.Stem(t)
			}
			z.arena = append(z.arena, t...)
			z.spans = append(z.spans, len(z.arena))
		})
		z.tokens = z.tokens[:0]
		start := 0
		for _, end := range z.spans {
			z.tokens = append(z.tokens, z.arena[start:end:end])
			start = end
		}
		var prefix []byte
		if z.prefixes != nil && i < len(z.prefixes) {
			prefix = z.prefixes[i]
		}
		z.ngr.Emit(prefix, z.tokens, func(key []byte, kind ngram.Kind, order int) {
			fn(key, OrderCode(kind, order))
		})
	}
}

// Stats returns the figures collected so far.
func (z *Analyzer) Stats() AnalyzerStats {
	s := AnalyzerStats{Tokenizer: z.tok.Stats()}
	if z.filter != nil {
		s.StopDropped = z.filter.Total()
	}
	return s
}

// Filter is the stop-word filter (nil without a stop list); its Dropped
// method tells which stop words were dropped how often.
func (z *Analyzer) Filter() *stopwords.Filter { return z.filter }
