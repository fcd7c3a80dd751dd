// Package ngram forms word n-grams and boundary-marked character n-grams
// from a token stream and emits them as feature keys.
package ngram
