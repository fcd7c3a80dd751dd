// Package weight turns a document's feature counts into a weighted sparse row: tf, idf and per-row norms.
package weight
