package corpus

import (
	"fmt"
	"path/filepath"
	"strconv"
	"strings"
)

// Format is the layout of a corpus file.
type Format uint8

const (
	// Lines holds one document per line; the whole line is the text.
	Lines Format = iota
	// TSV holds tab-separated fields, one record per line, with
	// backslash escapes \t \n \r \\ decoded inside fields.
	TSV
	// CSV holds comma-separated fields as described by RFC 4180.
	CSV
	// JSONL holds one JSON object per line (JSON Lines).
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
