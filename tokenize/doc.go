// Package tokenize turns Unicode text into normalized word tokens (UAX #29
// segmentation, normalization, case folding, accent, number and length
// rules) and optionally stems them.
package tokenize
