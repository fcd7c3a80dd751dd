// Package stopwords holds bowline's built-in stop lists, reads custom lists,
// and filters tokens while keeping negations unless told otherwise.
package stopwords
