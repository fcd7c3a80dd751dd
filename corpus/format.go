package corpus

import (
	"fmt"
	"path/filepath"
	"strconv"
	"strings"
)

// Format is the layout of a corpus file.
type Format uint8

// The formats. Every format strips a UTF-8 byte order mark at the start of
// the file and reads gzip input transparently.
const (
	// Lines holds one document per line; the whole line is the text.
	// A line ends at LF or CRLF; a lone CR is part of the text. An empty
	// line is an empty document (still a record), and a last line without
	// a line break is read like any other.
	Lines Format = iota
	// TSV holds tab-separated fields, one record per line (LF or CRLF),
	// without quoting. Because a field cannot hold a raw tab or line break
	// (IANA text/tab-separated-values), the common escapes \t, \n, \r and
	// \\ are decoded inside fields; a backslash before any other byte is
	// kept. Every row must have as many fields as the header (or, without
	// one, the first row); an empty line is a row of one empty field.
	TSV
	// CSV holds comma-separated fields as RFC 4180 describes them, read
	// with encoding/csv: quoted fields may hold commas, doubled quotes and
	// line breaks; every row must have as many fields as the header (or,
	// without one, the first row); a stray quote is an error. As in
	// encoding/csv, a CRLF inside a quoted field reads as LF and empty
	// lines are skipped (they are not records).
	CSV
	// JSONL holds one JSON object (RFC 8259) per line. Lines that are
	// empty or white space only are skipped: they are not records, though
	// line numbers count them. Fields are top-level keys; when a key
	// repeats, the last value wins. A text field takes a string, and null
	// as an empty document; a label or id field takes a string or a number
	// (kept as its JSON literal), and null as empty. A missing key or a
	// value of another type is a *ParseError. An extra field
	// (Options.Fields) takes a string, a number or a boolean (kept as its
	// JSON literal); null and a missing key give nil, not an error. Strings decode exactly as
	// encoding/json decodes them.
	JSONL
)

var formatNames = [...]string{Lines: "lines", TSV: "tsv", CSV: "csv", JSONL: "jsonl"}

// String returns the format's name as accepted by [ParseFormat].
func (f Format) String() string {
	if int(f) < len(formatNames) {
		return formatNames[f]
	}
	return "Format(" + strconv.Itoa(int(f)) + ")"
}

func (f Format) valid() bool { return int(f) < len(formatNames) }

// ParseFormat returns the format named s: "lines", "tsv", "csv" or "jsonl".
func ParseFormat(s string) (Format, error) {
	for f, name := range formatNames {
		if s == name {
			return Format(f), nil
		}
	}
	return 0, fmt.Errorf("unknown format %q: want lines, tsv, csv or jsonl", s)
}

// FormatFromName guesses the format from a file name's extension, after
// stripping a ".gz" suffix: .txt, .text and .lines are [Lines]; .tsv and
// .tab are [TSV]; .csv is [CSV]; .jsonl and .ndjson are [JSONL].
// Case is ignored. Any other name, and "-" for standard input, is an error
// that asks for --format.
func FormatFromName(path string) (Format, error) {
	if path == "-" {
		return 0, fmt.Errorf("cannot tell the format of standard input; use --format lines|tsv|csv|jsonl")
	}
	base := strings.ToLower(filepath.Base(path))
	base = strings.TrimSuffix(base, ".gz")
	switch filepath.Ext(base) {
	case ".txt", ".text", ".lines":
		return Lines, nil
	case ".tsv", ".tab":
		return TSV, nil
	case ".csv":
		return CSV, nil
	case ".jsonl", ".ndjson":
		return JSONL, nil
	}
	return 0, fmt.Errorf("cannot tell the format of %s from its name; use --format lines|tsv|csv|jsonl", path)
}
