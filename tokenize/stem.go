package tokenize

import (
	"fmt"
	"strings"

	"github.com/kljensen/snowball/english"
	"github.com/kljensen/snowball/french"
	"github.com/kljensen/snowball/hungarian"
	"github.com/kljensen/snowball/norwegian"
	"github.com/kljensen/snowball/russian"
	"github.com/kljensen/snowball/spanish"
	"github.com/kljensen/snowball/swedish"
)

type stemLang struct {
	code, name string
	stem       func(word string, stemStopWords bool) string
}

// stemLangs lists every language of github.com/kljensen/snowball v0.10.0,
// sorted by code.
var stemLangs = []stemLang{
	{"en", "english", english.Stem},
	{"es", "spanish", spanish.Stem},
	{"fr", "french", french.Stem},
	{"hu", "hungarian", hungarian.Stem},
	{"no", "norwegian", norwegian.Stem},
	{"ru", "russian", russian.Stem},
	{"sv", "swedish", swedish.Stem},
}

// StemLanguages returns the language codes NewStemmer accepts, sorted:
// en, es, fr, hu, no, ru, sv.
func StemLanguages() []string {
	codes := make([]string, len(stemLangs))
	for i, l := range stemLangs {
		codes[i] = l.code
	}
	return codes
}

// DefaultStemCacheSize is the number of words a Stemmer remembers before it
// empties its cache and starts again.
const DefaultStemCacheSize = 1 << 16

// A Stemmer reduces tokens to their Snowball stems in one language. It
// remembers the stems of recent words, so it is not safe for concurrent use:
// use one per goroutine.
type Stemmer struct {
	lang  stemLang
	cache map[string][]byte
	limit int
}

// NewStemmer returns a Stemmer for lang, given as a code from StemLanguages
// ("en") or as the language's English name ("english"), in any letter case.
func NewStemmer(lang string) (*Stemmer, error) {
	l := strings.ToLower(strings.TrimSpace(lang))
	for _, sl := range stemLangs {
		if l == sl.code || l == sl.name {
			return &Stemmer{lang: sl, cache: make(map[string][]byte), limit: DefaultStemCacheSize}, nil
		}
	}
	return nil, fmt.Errorf("tokenize: no stemmer for language %q (known: %s)", lang, strings.Join(StemLanguages(), ", "))
}

// Language returns the language code of s, as listed by StemLanguages.
func (s *Stemmer) Language() string { return s.lang.code }

// Stem returns the Snowball stem of tok. Stop words are stemmed like any
// other word, as the Snowball reference implementation does. For Russian,
// "ё" is read as "е" first, as Snowball 2.x does.
//
// The result belongs to the Stemmer and must not be modified. The Stemmer
// never writes to a slice it has returned, so the result stays valid for as
// long as the caller keeps it, even after the cache is emptied. A word seen
// before is answered from the cache without allocating; the cache holds at
// most DefaultStemCacheSize words and is emptied when full.
func (s *Stemmer) Stem(tok []byte) []byte {
	if st, ok := s.cache[string(tok)]; ok {
		return st
	}
	if len(s.cache) >= s.limit {
		clear(s.cache)
	}
	w := string(tok)
	if s.lang.code == "ru" && strings.Contains(w, "ё") {
		// Snowball 2.x treats ё as е before stemming Russian;
		// kljensen/snowball v0.10.0 does not.
		w = strings.ReplaceAll(w, "ё", "е")
	}
	st := []byte(s.lang.stem(w, true))
	s.cache[string(tok)] = st
	return st
}
