// Package corpus reads documents with their text, label and id fields from lines, TSV, CSV and JSON Lines files, plain or gzipped, and reports errors with file, line and column.
package corpus
