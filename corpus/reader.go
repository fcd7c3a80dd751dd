package corpus

import (
	"bufio"
	"bytes"
	"compress/gzip"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"os"
	"strconv"
	"strings"
	"unicode/utf8"

	"github.com/bowline/bowline/internal/jsonscan"
)

// Options says how to read a corpus file and which fields to take.
type Options struct {
	// Format is the file's layout.
	Format Format
	// Text names the text fields, at least one unless Format is Lines.
	// TSV and CSV fields are header names or 1-based column numbers
	// ("3"); a header name wins over a column number. JSONL fields are
	// top-level keys. Lines takes the whole line as its one text field,
	// so Text must be empty there.
	Text []string
	// Label names the optional label field ("" for none).
	Label string
	// ID names the optional id field ("" for none).
	ID string
	// Fields names extra fields read beside the text (table fields such
	// as a category, a number or a timestamp), resolved like Text. Unlike
	// a text field, a field may be absent from a JSONL record: its value
	// is then nil.
	Fields []string
	// NoHeader says a TSV or CSV file has no header row: its first row is
	// data and fields must be column numbers. Other formats ignore it.
	NoHeader bool
	// StrictUTF8 makes invalid UTF-8 and NUL bytes anywhere in a record
	// a *ParseError at the first such byte. By default they are left to
	// the tokenizer, which replaces and counts them.
	StrictUTF8 bool
	// TSVEscapes reads the backslash escapes \t, \n, \r and \\ inside TSV
	// fields, as some database exports write them. By default TSV fields
	// are literal, as the IANA text/tab-separated-values registration
	// defines them: a backslash is a backslash.
	TSVEscapes bool
	// MaxRecord bounds the bytes of one record (a line; in CSV, a record
	// with its quoted line breaks): a longer one is a *ParseError
	// wrapping ErrRecordTooLong, which cannot be skipped. 0 means
	// DefaultMaxRecord.
	MaxRecord int64
}

// DefaultMaxRecord is the bound on one record's bytes when
// Options.MaxRecord is 0: twice the largest one-line document bowline's
// torture corpus reads.
const DefaultMaxRecord = 128 << 20

// A Record is one document.
type Record struct {
	Line  int64    // 1-based line where the record starts
	Text  [][]byte // one per Options.Text field, in order (Lines: one)
	Label []byte   // nil when no label field was asked for
	ID    []byte   // nil when no id field was asked for
	// Fields holds one value per Options.Fields field, in order: the
	// field's bytes, or nil when a JSONL record lacks the key or holds
	// null. A JSON number or boolean keeps its literal bytes ("34.5").
	Fields [][]byte
}

// bufSize is the size of the read buffers. Longer lines are assembled in a
// growing buffer, up to Options.MaxRecord.
const bufSize = 64 << 10

// A Reader reads records from a corpus file. Like [bufio.Scanner], call
// Scan until it returns false, then check Err.
type Reader struct {
	name string
	opt  Options

	file   *os.File // closed by Close when Open opened it
	count  countingReader
	gz     *gzip.Reader
	br     *bufio.Reader // decompressed text
	bom    bool          // a UTF-8 BOM was stripped from line 1
	size   int64
	line   int64 // lines consumed so far (Lines, TSV, JSONL)
	header []string
	// maxRecord is Options.MaxRecord, or DefaultMaxRecord.
	maxRecord int64
	// headerPos holds the line and byte column of each header cell.
	headerPos [][2]int64

	// TSV and CSV: column index of each wanted field (-1 for none).
	textCols []int
	fieldCol []int
	labelCol int
	idCol    int
	width    int // expected fields per row; 0 until known
	cr       *csv.Reader

	// JSONL: spans of wanted values, text fields first, then label, id,
	// then the extra fields.
	spans []span
	scan  jsonscan.Scanner

	rec     Record
	buf     []byte   // long-line assembly
	scratch []byte   // decoded field bytes
	offs    []int    // field end offsets into scratch
	fields  [][]byte // TSV row split
	pending bool     // rec holds a row read ahead by NewReader
	n       int64
	err     error
	done    bool

	raw       []byte   // the current (or failed) record as stored in the file
	rawBuf    []byte   // copy of raw when decoding would change it in place
	skippable bool     // err concerns one record; Skip may go past it
	tape      *csvTape // CSV: the bytes csv.Reader consumed, for raw records
	csvStart  int64    // CSV: input offset where the current record starts
	csvLine   int64    // CSV: the line of the last field read
}

type countingReader struct {
	r io.Reader
	n int64
}

func (c *countingReader) Read(p []byte) (int, error) {
	n, err := c.r.Read(p)
	c.n += int64(n)
	return n, err
}

// gzipErrors adds the file name to errors from a gzip stream, so that a
// truncated or corrupt stream is reported, never read as a short file.
type gzipErrors struct {
	gz   *gzip.Reader
	name string
}

func (g *gzipErrors) Read(p []byte) (int, error) {
	n, err := g.gz.Read(p)
	if err != nil && err != io.EOF {
		err = gzipError(g.name, err)
	}
	return n, err
}

func gzipError(name string, err error) error {
	if errors.Is(err, io.ErrUnexpectedEOF) {
		return fmt.Errorf("%s: truncated gzip stream: %w", name, err)
	}
	return fmt.Errorf("%s: corrupt gzip stream: %w", name, err)
}

// Open opens the named file ("-" is standard input) and returns a Reader
// for it. A gzip stream is recognized by its magic bytes 1f 8b, whatever
// the file's name. See [NewReader] for the checks made before the first
// record.
func Open(path string, o Options) (*Reader, error) {
	var f *os.File
	name := path
	if path == "-" {
		f = os.Stdin
		name = "standard input"
	} else {
		var err error
		f, err = os.Open(path)
		if err != nil {
			return nil, err
		}
	}
	size := int64(-1)
	st, err := f.Stat()
	if err == nil {
		if st.IsDir() {
			f.Close()
			return nil, fmt.Errorf("%s: is a directory, not a corpus file", path)
		}
		if st.Mode().IsRegular() {
			size = st.Size()
		}
	}
	r, err := NewReader(f, name, o)
	if err != nil {
		if f != os.Stdin {
			f.Close()
		}
		return nil, err
	}
	if f != os.Stdin {
		r.file = f
	}
	r.size = size
	return r, nil
}

// NewReader returns a Reader that reads r, calling it name in errors.
// Gzip input is recognized by its magic bytes. NewReader checks the
// options, reads the header row of TSV and CSV files (or, with NoHeader,
// the first row, to learn the width) and resolves the fields; an unknown
// field name is an error naming the field and listing the header. A file
// that does not fit the fields named gives an error that errors.Is
// matches with [ErrNoHeader], [ErrNoField], [ErrAmbiguousField] or
// [ErrHeaderName].
// Closing the Reader does not close r.
func NewReader(r io.Reader, name string, o Options) (*Reader, error) {
	if err := checkOptions(o); err != nil {
		return nil, err
	}
	rd := &Reader{name: name, opt: o, size: -1, labelCol: -1, idCol: -1, maxRecord: o.MaxRecord}
	if rd.maxRecord <= 0 {
		rd.maxRecord = DefaultMaxRecord
	}
	rd.count.r = r
	src := bufio.NewReaderSize(&rd.count, bufSize)
	magic, err := src.Peek(2)
	if err != nil && err != io.EOF {
		return nil, err
	}
	if len(magic) == 2 && magic[0] == 0x1f && magic[1] == 0x8b {
		gz, err := gzip.NewReader(src)
		if err != nil {
			return nil, gzipError(name, err)
		}
		rd.gz = gz
		rd.br = bufio.NewReaderSize(&gzipErrors{gz, name}, bufSize)
	} else {
		rd.br = src
	}
	bom, err := rd.br.Peek(3)
	if err != nil && err != io.EOF {
		return nil, err
	}
	if bytes.Equal(bom, []byte("\xef\xbb\xbf")) {
		rd.br.Discard(3)
		rd.bom = true
	}
	if len(o.Fields) > 0 {
		rd.rec.Fields = make([][]byte, len(o.Fields))
	}
	switch o.Format {
	case Lines:
		rd.rec.Text = make([][]byte, 1)
	case JSONL:
		// A key given twice is refused: encoding/json would let the
		// last one win, silently.
		rd.scan.UniqueKeys = true
		rd.rec.Text = make([][]byte, len(o.Text))
		rd.spans = make([]span, len(o.Text)+2+len(o.Fields))
	case TSV, CSV:
		rd.rec.Text = make([][]byte, len(o.Text))
		if err := rd.openTable(); err != nil {
			return nil, err
		}
	}
	return rd, nil
}

func checkOptions(o Options) error {
	if !o.Format.valid() {
		return fmt.Errorf("unknown format %v", o.Format)
	}
	if o.Format == Lines {
		if len(o.Text) > 0 || o.Label != "" || o.ID != "" || len(o.Fields) > 0 {
			return errors.New("the lines format takes the whole line as the text; it has no text, label, id or other fields to choose")
		}
		return nil
	}
	if len(o.Text) == 0 {
		return fmt.Errorf("no text field given for a %v file (use --text)", o.Format)
	}
	for _, t := range o.Text {
		if t == "" {
			return errors.New("empty text field name")
		}
	}
	for _, f := range o.Fields {
		if f == "" {
			return errors.New("empty field name")
		}
	}
	return nil
}

// openTable reads the header (or the first row) of a TSV or CSV file and
// resolves the wanted fields to columns.
func (r *Reader) openTable() error {
	if r.opt.Format == CSV {
		r.tape = &csvTape{r: r.br, limit: r.maxRecord}
		r.cr = csv.NewReader(r.tape)
		r.cr.ReuseRecord = true
	}
	if !r.opt.NoHeader {
		h, err := r.readHeader()
		if err == io.EOF {
			return &headerError{fmt.Sprintf("%s: empty file, expected a header row", r.name), ErrNoHeader}
		}
		if err != nil {
			return err
		}
		r.header = h
		r.width = len(h)
		if r.cr != nil {
			r.cr.FieldsPerRecord = len(h)
		}
	} else {
		// Read the first row ahead to learn the width, so a column
		// number out of range is reported now.
		err := r.next()
		switch {
		case err == nil:
			r.pending = true
		case err == io.EOF:
			r.done = true
		default:
			r.err, r.done = err, true
		}
	}
	var err error
	for i, t := range r.opt.Text {
		if r.textCols == nil {
			r.textCols = make([]int, len(r.opt.Text))
		}
		if r.textCols[i], err = r.resolve(t); err != nil {
			return err
		}
	}
	for i, f := range r.opt.Fields {
		if r.fieldCol == nil {
			r.fieldCol = make([]int, len(r.opt.Fields))
		}
		if r.fieldCol[i], err = r.resolve(f); err != nil {
			return err
		}
	}
	if r.opt.Label != "" {
		if r.labelCol, err = r.resolve(r.opt.Label); err != nil {
			return err
		}
	}
	if r.opt.ID != "" {
		if r.idCol, err = r.resolve(r.opt.ID); err != nil {
			return err
		}
	}
	if r.pending {
		r.fill(r.fields)
	}
	return nil
}

func (r *Reader) readHeader() ([]string, error) {
	if r.cr != nil {
		row, err := r.cr.Read()
		if err != nil {
			return nil, r.csvError(err, row)
		}
		for i := range row {
			line, col := r.cr.FieldPos(i)
			r.headerPos = append(r.headerPos, [2]int64{int64(line), int64(r.column(int64(line), col))})
		}
		return append([]string(nil), row...), nil
	}
	line, err := r.readLine()
	if err != nil {
		return nil, err
	}
	var h []string
	col := 1
	for _, f := range splitTab(line, nil) {
		r.headerPos = append(r.headerPos, [2]int64{r.line, int64(r.column(r.line, col))})
		col += len(f) + 1
		if r.opt.TSVEscapes {
			f = unescapeTSV(f)
		}
		h = append(h, string(f))
	}
	return h, nil
}

// resolve maps a field name or 1-based column number to a column index.
func (r *Reader) resolve(name string) (int, error) {
	found := -1
	for i, h := range r.header {
		if h == name {
			if found >= 0 {
				return 0, &headerError{fmt.Sprintf("field %q is ambiguous: the header of %s has it in columns %d and %d", name, r.name, found+1, i+1), ErrAmbiguousField}
			}
			found = i
		}
	}
	if found >= 0 {
		if !utf8.ValidString(name) {
			pos := r.headerPos[found]
			return 0, &ParseError{File: r.name, Line: pos[0], Column: int(pos[1]), Field: name,
				Err: fmt.Errorf("%w: a spec keeps field names as text; name this column by its number, %d", ErrHeaderName, found+1)}
		}
		return found, nil
	}
	if n, err := strconv.Atoi(name); err == nil && name[0] != '+' && name[0] != '-' {
		if n < 1 {
			return 0, fmt.Errorf("field %q: column numbers start at 1", name)
		}
		if r.width > 0 && n > r.width {
			return 0, &headerError{fmt.Sprintf("field %q: column %d is out of range; %s has %d columns", name, n, r.name, r.width), ErrNoField}
		}
		return n - 1, nil
	}
	if r.opt.NoHeader {
		return 0, fmt.Errorf("field %q: without a header row, fields must be 1-based column numbers", name)
	}
	return 0, &headerError{fmt.Sprintf("field %q not found in the header of %s (columns: %s)", name, r.name, listHeader(r.header)), ErrNoField}
}

func listHeader(h []string) string {
	const max = 30
	var b strings.Builder
	for i, s := range h {
		if i == max {
			fmt.Fprintf(&b, ", … (%d more)", len(h)-max)
			break
		}
		if i > 0 {
			b.WriteString(", ")
		}
		b.WriteString(strconv.Quote(s))
	}
	return b.String()
}

// Scan advances to the next record, which is then available through
// Record. It returns false at the end of the input or on an error.
func (r *Reader) Scan() bool {
	if r.pending {
		r.pending = false
		r.n++
		return true
	}
	if r.done {
		return false
	}
	err := r.next()
	if err == nil && r.opt.StrictUTF8 {
		err = r.checkStrict()
	}
	if err != nil {
		r.done = true
		if err != io.EOF {
			r.err = err
			var pe *ParseError
			r.skippable = errors.As(err, &pe) && !errors.Is(err, ErrRecordTooLong)
		}
		return false
	}
	r.n++
	return true
}

// Skip goes past the record that made Scan fail with a *ParseError, so
// that Scan can continue with the next record; [Reader.Raw] then still
// holds the failed record's bytes. It returns false, and changes nothing,
// when the error cannot be skipped (an input/output or gzip error, a
// record over Options.MaxRecord, or no error at all).
func (r *Reader) Skip() bool {
	if r.err == nil || !r.skippable {
		return false
	}
	r.err, r.done, r.skippable = nil, false, false
	return true
}

// Raw returns the current record, or the record that made Scan fail, as
// stored in the file (after gzip decompression, without its final line
// break). It is valid until the next call to Scan.
func (r *Reader) Raw() []byte { return r.raw }

// checkStrict reports the first invalid UTF-8 or NUL byte of the current
// record.
func (r *Reader) checkStrict() error {
	raw := r.raw
	for i := 0; i < len(raw); {
		c := raw[i]
		if c == 0 {
			return r.strictError(i, "NUL byte")
		}
		if c < utf8.RuneSelf {
			i++
			continue
		}
		ru, size := utf8.DecodeRune(raw[i:])
		if ru == utf8.RuneError && size == 1 {
			return r.strictError(i, fmt.Sprintf("invalid UTF-8 byte 0x%02x", c))
		}
		i += size
	}
	return nil
}

func (r *Reader) strictError(off int, what string) error {
	line := r.rec.Line
	start := 0
	for i := 0; i < off; i++ {
		if r.raw[i] == '\n' {
			line++
			start = i + 1
		}
	}
	return &ParseError{File: r.name, Line: line, Column: r.column(line, off-start+1),
		Err: fmt.Errorf("%s (--strict-utf8)", what)}
}

// Record returns the most recent record. It and the bytes it refers to
// are valid only until the next call to Scan.
func (r *Reader) Record() *Record { return &r.rec }

// Err returns the first error met, or nil at a clean end of input.
// Problems in the file's content are [*ParseError] values.
func (r *Reader) Err() error { return r.err }

// Records returns the number of records returned so far.
func (r *Reader) Records() int64 { return r.n }

// BytesRead returns the number of bytes consumed from the underlying
// reader so far, compressed bytes for gzip input, including read-ahead
// buffering. It suits progress displays together with [Reader.Size].
func (r *Reader) BytesRead() int64 { return r.count.n }

// Size returns the file's size in bytes when known (a regular file opened
// with [Open]), else -1.
func (r *Reader) Size() int64 { return r.size }

// Header returns the header row of a TSV or CSV file, or nil when there is
// none (NoHeader, Lines, JSONL).
func (r *Reader) Header() []string { return r.header }

// Close releases the Reader and closes the file opened by [Open]. It does
// not close standard input or a reader passed to [NewReader].
func (r *Reader) Close() error {
	var err error
	if r.gz != nil {
		err = r.gz.Close()
	}
	if r.file != nil {
		if cerr := r.file.Close(); err == nil {
			err = cerr
		}
		r.file = nil
	}
	r.done = true
	return err
}

// next reads one record into r.rec; io.EOF at the end.
func (r *Reader) next() error {
	switch r.opt.Format {
	case Lines:
		line, err := r.readLine()
		if err != nil {
			return err
		}
		r.rec.Line = r.line
		r.rec.Text[0] = line
		return nil
	case TSV:
		return r.nextTSV()
	case CSV:
		return r.nextCSV()
	default:
		return r.nextJSONL()
	}
}

// readLine returns the next line without its "\n" or "\r\n". A lone "\r"
// stays part of the line. The result is valid until the next read.
// A read error drops the partial line, so a broken stream is never read as
// a shorter one.
func (r *Reader) readLine() ([]byte, error) {
	var line []byte
	r.buf = r.buf[:0]
	for {
		chunk, err := r.br.ReadSlice('\n')
		if n := len(r.buf) + len(chunk); n > int(r.maxRecord)+1 || n > int(r.maxRecord) && (err != nil || chunk[len(chunk)-1] != '\n') {
			return nil, r.tooLong(r.line + 1)
		}
		if err == nil {
			if len(r.buf) > 0 {
				r.buf = appendGrow(r.buf, chunk)
				line = r.buf
			} else {
				line = chunk
			}
			break
		}
		if err == bufio.ErrBufferFull {
			r.buf = appendGrow(r.buf, chunk)
			continue
		}
		if err == io.EOF {
			if len(r.buf)+len(chunk) == 0 {
				return nil, io.EOF
			}
			r.buf = appendGrow(r.buf, chunk)
			line = r.buf
			break
		}
		return nil, err
	}
	r.line++
	if n := len(line); n > 0 && line[n-1] == '\n' {
		line = line[:n-1]
		if n > 1 && line[n-2] == '\r' {
			line = line[:n-2]
		}
	}
	r.raw = line
	return line, nil
}

// tooLong is the error of a record over the bound that starts on line.
func (r *Reader) tooLong(line int64) error {
	r.raw = nil
	size := fmt.Sprintf("%d bytes", r.maxRecord)
	if r.maxRecord%(1<<20) == 0 {
		size = fmt.Sprintf("%d MiB", r.maxRecord>>20)
	}
	return &ParseError{File: r.name, Line: line, Err: fmt.Errorf("%w: over %s (the bound on one record; raise it with --record-limit)", ErrRecordTooLong, size)}
}

// appendGrow appends b to buf, doubling the capacity when it must grow, so
// that assembling a very long line copies each byte only a few times.
func appendGrow(buf, b []byte) []byte {
	if n := len(buf) + len(b); n > cap(buf) {
		nb := make([]byte, len(buf), max(2*cap(buf), n, bufSize))
		copy(nb, buf)
		buf = nb
	}
	return append(buf, b...)
}

// column returns the byte column in the file for a column counted in the
// text after the BOM was stripped.
func (r *Reader) column(line int64, col int) int {
	if col > 0 && line == 1 && r.bom {
		return col + 3
	}
	return col
}

// fill sets r.rec's fields from a table row.
func (r *Reader) fill(row [][]byte) {
	for i, c := range r.textCols {
		r.rec.Text[i] = row[c]
	}
	if r.labelCol >= 0 {
		r.rec.Label = row[r.labelCol]
	}
	if r.idCol >= 0 {
		r.rec.ID = row[r.idCol]
	}
	for i, c := range r.fieldCol {
		r.rec.Fields[i] = row[c]
	}
}
