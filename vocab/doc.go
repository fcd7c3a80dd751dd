// Package vocab counts term and document frequencies of feature keys, applies cutoffs, and maps keys to stable column indices.
package vocab
