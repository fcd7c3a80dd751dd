// Package torture writes bowline's torture corpus: small files with the
// faults real exports have, each paired with the outcome bowline must give.
package torture

import (
	"bytes"
	"compress/gzip"
	"os"
	"path/filepath"
	"strings"
)

// Outcome is what a run over a case must do.
type Outcome int

const (
	// Reads means every record is read; Rows rows come out.
	Reads Outcome = iota
	// Fails means the run stops with a bad-data error naming Line (and
	// Column when not 0); with --on-error skip, Rejects records are skipped
	// and Rows rows come out.
	Fails
	// FailsWhole means the file is damaged beyond one record (a truncated
	// or corrupt archive): the run stops with a bad-data error (exit 3)
	// and skipping cannot help.
	FailsWhole
)

// Case is one file of the torture corpus.
type Case struct {
	// Name is the file name, whose extension gives the format.
	Name string
	// About says what the file tortures.
	About string
	// Data is the file's content.
	Data []byte
	// Args are the corpus flags the case needs (besides the file).
	Args []string
	// Outcome, Rows, Rejects, Line and Column are the expected result.
	Outcome Outcome
	Rows    int
	Rejects int
	Line    int
	Column  int
	// Strict, when set, is the outcome under --strict-utf8.
	Strict *Case
}

// BigDocBytes is the size of the single-line document case.
const BigDocBytes = 64 << 20

// Cases returns the torture corpus. With big false the 64 MiB document is
// left out.
func Cases(big bool) []Case {
	tsv := []string{"--text", "text", "--label", "team"}
	csv := tsv
	jsonl := tsv
	cs := []Case{
		{Name: "invalid-utf8.tsv", About: "invalid UTF-8 bytes inside text: replaced by U+FFFD and counted",
			Data: []byte("team\ttext\nbikes\tflat \xff\xfe tyre\nbilling\tcharged tw\xc3ice\n"), Args: tsv,
			Outcome: Reads, Rows: 2,
			Strict: &Case{Outcome: Fails, Rows: 0, Rejects: 2, Line: 2, Column: 12}},
		{Name: "nul.tsv", About: "a NUL byte inside text: treated as a space and counted",
			Data: []byte("team\ttext\nbikes\tflat\x00tyre\n"), Args: tsv, Outcome: Reads, Rows: 1,
			Strict: &Case{Outcome: Fails, Rows: 0, Rejects: 1, Line: 2, Column: 11}},
		{Name: "bom-crlf.tsv", About: "a UTF-8 byte order mark and CRLF line ends",
			Data: []byte("\xef\xbb\xbfteam\ttext\r\nbikes\tflat tyre\r\napp\tcrash\r\n"), Args: tsv, Outcome: Reads, Rows: 2},
		{Name: "lone-cr.txt", About: "a lone CR inside a line stays part of the text",
			Data: []byte("first\rstill first\nsecond\n"), Outcome: Reads, Rows: 2},
		{Name: "empty-docs.tsv", About: "empty documents keep their rows",
			Data: []byte("team\ttext\nbikes\t\napp\tcrash\nbikes\t   \n"), Args: tsv, Outcome: Reads, Rows: 3},
		{Name: "unbalanced-quote.csv", About: "RFC 4180: a quote inside an unquoted field",
			Data: []byte("team,text\nbikes,flat tyre\nbilling,charged \"twice\napp,crash\n"), Args: csv,
			Outcome: Fails, Rows: 2, Rejects: 1, Line: 3, Column: 17},
		{Name: "ragged.csv", About: "a CSV row with a field too many",
			Data: []byte("team,text\nbikes,flat tyre\nbilling,charged,twice\napp,crash\n"), Args: csv,
			Outcome: Fails, Rows: 2, Rejects: 1, Line: 3, Column: 17},
		{Name: "embedded-newline.tsv", About: "a raw newline inside a TSV field splits the row: the second half has too few fields",
			Data: []byte("team\ttext\nbikes\tflat\ntyre\napp\tcrash\n"), Args: tsv,
			Outcome: Fails, Rows: 2, Rejects: 1, Line: 3, Column: 1},
		{Name: "escaped-newline.tsv", About: "an escaped newline inside a TSV field is read as one with --tsv-escapes",
			Data: []byte("team\ttext\nbikes\tflat\\ntyre\n"), Args: append([]string{"--tsv-escapes"}, tsv...), Outcome: Reads, Rows: 1},
		{Name: "literal-backslash.tsv", About: "a backslash inside a TSV field is literal by default (IANA text/tab-separated-values)",
			Data: []byte("team\ttext\nbikes\tC:\\new\\table\n"), Args: tsv, Outcome: Reads, Rows: 1},
		{Name: "broken.jsonl", About: "a JSON Lines line that is not valid JSON",
			Data: []byte("{\"team\":\"bikes\",\"text\":\"flat\"}\n{\"team\":\"app\",\"text\":\"crash\"\n{\"team\":\"app\",\"text\":\"ok\"}\n"), Args: jsonl,
			Outcome: Fails, Rows: 2, Rejects: 1, Line: 2},
		{Name: "number-text.jsonl", About: "a number where text should be",
			Data: []byte("{\"team\":\"bikes\",\"text\":\"flat\"}\n{\"team\":\"app\",\"text\":42}\n"), Args: jsonl,
			Outcome: Fails, Rows: 1, Rejects: 1, Line: 2},
		{Name: "duplicate-key.jsonl", About: "a JSON Lines object with a key twice (RFC 8259 section 4: names SHOULD be unique)",
			Data: []byte("{\"team\":\"bikes\",\"text\":\"flat\"}\n{\"team\":\"app\",\"text\":\"crash\",\"text\":\"ok\"}\n"), Args: jsonl,
			Outcome: Fails, Rows: 1, Rejects: 1, Line: 2, Column: 30},
		{Name: "missing-field.jsonl", About: "a record without the text field",
			Data: []byte("{\"team\":\"bikes\",\"text\":\"flat\"}\n{\"team\":\"app\"}\n"), Args: jsonl,
			Outcome: Fails, Rows: 1, Rejects: 1, Line: 2},
		{Name: "truncated.tsv.gz", About: "a gzip archive cut short",
			Data: truncatedGzip(), Args: tsv, Outcome: FailsWhole},
	}
	if big {
		cs = append(cs, Case{Name: "big-line.txt", About: "one 64 MiB document on a single line",
			Data: bigLine(), Outcome: Reads, Rows: 2})
	}
	return cs
}

func truncatedGzip() []byte {
	var b bytes.Buffer
	zw := gzip.NewWriter(&b)
	zw.Write([]byte("team\ttext\n"))
	for i := 0; i < 2000; i++ {
		zw.Write([]byte("bikes\tthe dock at Harlow Quay would not release the bike\n"))
	}
	zw.Close()
	return b.Bytes()[:b.Len()/2]
}

func bigLine() []byte {
	word := "pellwick dock bike refund "
	n := BigDocBytes / len(word)
	return []byte(strings.Repeat(word, n) + "\nshort second document\n")
}

// Write writes every case into dir.
func Write(dir string, cases []Case) error {
	for _, c := range cases {
		if err := os.WriteFile(filepath.Join(dir, c.Name), c.Data, 0o644); err != nil {
			return err
		}
	}
	return nil
}
