// Package spec is bowline's frozen spec: its schema, save and load with a
// fingerprint check, validation, and the encoder that applies it to text.
package spec

import (
	"bufio"
	"bytes"
	"compress/gzip"
	"crypto/sha256"
	"encoding/binary"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"strconv"
	"strings"
	"unicode/utf8"

	"github.com/bowline/bowline/internal/atomicfile"
)

// SchemaVersion is the version of the spec file layout this build writes and
// the newest it reads.
const SchemaVersion = 1

// ToolVersion is bowline's version, recorded in every spec it writes.
const ToolVersion = "0.1.0"

// Mode names.
const (
	ModeVocabulary = "vocabulary"
	ModeHashing    = "hashing"
)

// Spec is a frozen transformation from text to rows: every setting that
// changes a row and every number learned from the training corpus.
type Spec struct {
	// Fingerprint is "sha256:" and the hex SHA-256 of the canonical
	// encoding of Content (see Canonical). Set by Seal and checked by Load.
	Fingerprint string
	// Parent is the fingerprint of the spec this one extends, if any.
	Parent string
	// Tool is the bowline version that wrote the spec.
	Tool string
	// Content is everything that changes a row.
	Content Content

	// canon is the canonical encoding Seal hashed, which Write reuses;
	// Seal again after changing Content.
	canon []byte
}

// Content is the fingerprinted part of a spec.
type Content struct {
	// Input holds the corpus field names used at learn time; later runs
	// use them as defaults.
	Input Input `json:"input"`
	// Tokens are the tokenizer settings.
	Tokens Tokens `json:"tokens"`
	// Stop is the stop list, stored in full.
	Stop Stop `json:"stop"`
	// Stem is the stemming language code, or "none".
	Stem string `json:"stem"`
	// NGrams are the n-gram ranges.
	NGrams NGrams `json:"ngrams"`
	// Mode is ModeVocabulary or ModeHashing.
	Mode string `json:"mode"`
	// Docs is the number of training documents.
	Docs int64 `json:"docs"`
	// Vocabulary is set in vocabulary mode.
	Vocabulary *Vocabulary `json:"vocabulary,omitempty"`
	// Hashing is set in hashing mode.
	Hashing *Hashing `json:"hashing,omitempty"`
	// Weights are the weighting settings and learned idf values.
	Weights Weights `json:"weights"`
	// Labels describes how labels become numbers.
	Labels Labels `json:"labels"`
	// Fields are the table fields read beside the text (categories,
	// numbers, timestamps) with their frozen numbers. In vocabulary mode
	// their columns follow the text columns, field by field in this
	// order (see FieldColumns).
	Fields []TableField `json:"fields,omitempty"`
}

// Input names the corpus fields.
type Input struct {
	Format   string   `json:"format"`
	Text     []string `json:"text"`
	Label    string   `json:"label,omitempty"`
	ID       string   `json:"id,omitempty"`
	NoHeader bool     `json:"no_header,omitempty"`
}

// Tokens are the tokenizer settings, as flag words.
type Tokens struct {
	Unicode string `json:"unicode"`
	Case    string `json:"case"`
	Accents string `json:"accents"`
	Numbers string `json:"numbers"`
	MinLen  int    `json:"min_len"`
	MaxLen  int    `json:"max_len"`
}

// Stop is the stop list in force.
type Stop struct {
	// Sources are the --stop arguments (language codes or file names).
	Sources []string `json:"sources,omitempty"`
	// KeepNegations is true unless --drop-negations was given.
	KeepNegations bool `json:"keep_negations"`
	// Words is the normalized stop list itself, sorted by bytes.
	Words []string `json:"words,omitempty"`
}

// NGrams are the n-gram ranges ("1-2", "off").
type NGrams struct {
	Words string `json:"words"`
	Chars string `json:"chars"`
}

// Vocabulary is the learned vocabulary: column i is Keys[i].
type Vocabulary struct {
	MinDocs     int64   `json:"min_docs"`
	MaxDocShare float64 `json:"max_doc_share"`
	MaxTerms    int     `json:"max_terms"`
	// Unseen is the unseen-key policy ("drop", "count", "hash:K").
	Unseen string `json:"unseen"`
	// Keys, Orders and DocCounts are parallel: the key of each column, its
	// n-gram order code (kind*100 + n) and its training document count.
	Keys      []string `json:"keys"`
	Orders    []int    `json:"orders"`
	DocCounts []int64  `json:"doc_counts"`
	// Retired marks columns kept from a parent spec whose keys no longer
	// pass the cutoffs (same length as Keys, or empty).
	Retired []bool `json:"retired,omitempty"`
	// ParentKeys is the number of leading columns taken over from the
	// parent spec (bowline learn --extend); the columns after them were
	// appended. 0 for a spec without a parent.
	ParentKeys int `json:"parent_keys,omitempty"`
	// Seen summarizes every key counted at learn time, kept or cut, so
	// that the effect of other cutoffs can be told without the corpus.
	Seen *Seen `json:"seen,omitempty"`
}

// TopDocCountsKept is how many of the largest document counts Seen keeps.
const TopDocCountsKept = 256

// Seen summarizes the document counts of every key counted at learn time.
type Seen struct {
	// Keys is the number of distinct keys counted.
	Keys int64 `json:"keys"`
	// Orders and OrderKeys are parallel: each n-gram order code counted,
	// ascending, and its number of distinct keys.
	Orders    []int   `json:"orders"`
	OrderKeys []int64 `json:"order_keys"`
	// DocHistogram counts keys by document count: see
	// vocab.Counts.DocHistogram and vocab.DocBucketBounds.
	DocHistogram []int64 `json:"doc_histogram"`
	// TopDocCounts are the largest document counts, descending (at most
	// TopDocCountsKept), kept or cut: with the histogram they make the
	// effect of a max-doc-share cutoff exact (see vocab.Survivors).
	TopDocCounts []int64 `json:"top_doc_counts"`
	// Pruning is set when learn ran under a memory limit and had to drop
	// keys; the figures above then describe the keys it held at the end.
	Pruning *Pruning `json:"pruning,omitempty"`
}

// Pruning records what bounded counting dropped (see vocab.Pruning).
type Pruning struct {
	// Method names the algorithm: "space-saving" (Metwally, Agrawal and
	// El Abbadi, ICDT 2005) over document counts.
	Method string `json:"method"`
	// Capacity is the most distinct keys held at once.
	Capacity int64 `json:"capacity"`
	// Evicted counts keys dropped (a key dropped twice counts twice);
	// EvictedDocs and EvictedCount their document and occurrence counts
	// at the time, summed.
	Evicted      int64 `json:"evicted"`
	EvictedDocs  int64 `json:"evicted_docs"`
	EvictedCount int64 `json:"evicted_count"`
	// MaxDocs is the error bound: no dropped key was found in more than
	// MaxDocs documents, and no kept document count is too low by more
	// (kept counts are the documents counted since the key last entered
	// the table: never too high).
	MaxDocs int64 `json:"max_docs"`
	// InexactKeys counts kept keys whose document count may be too low;
	// every other count is exact.
	InexactKeys int64 `json:"inexact_keys"`
}

// Hashing holds the hashing-space settings.
type Hashing struct {
	Width  uint64 `json:"width"`
	Seed   uint64 `json:"seed"`
	Signed bool   `json:"signed"`
}

// Weights are the weighting settings and learned numbers.
type Weights struct {
	TF   string `json:"tf"`
	IDF  string `json:"idf"`
	Norm string `json:"norm"`
	// IDFValues holds one idf per vocabulary column (vocabulary mode, when
	// IDF is not "none"). Extra unseen columns have weight 1.
	IDFValues []float64 `json:"idf_values,omitempty"`
	// IDFBuckets and IDFBucketValues hold the idf of every bucket seen at
	// learn time (hashing mode); other buckets get IDFDefault.
	IDFBuckets      []uint64  `json:"idf_buckets,omitempty"`
	IDFBucketValues []float64 `json:"idf_bucket_values,omitempty"`
	IDFDefault      float64   `json:"idf_default,omitempty"`
}

// Labels says how label fields become numbers.
type Labels struct {
	// Kind is "none" (no label field), "number" (numeric labels pass
	// through) or "string" (mapped by Map).
	Kind string `json:"kind"`
	// Map lists string labels sorted by bytes; label Map[i] is written as
	// i+1 (0 is the label of unlabeled rows).
	Map []string `json:"map,omitempty"`
	// Values and Counts are the distinct training label values (sorted
	// by bytes) and how many training documents carried each: the
	// reference for label drift.
	Values []string `json:"values,omitempty"`
	Counts []int64  `json:"counts,omitempty"`
}

// Columns is the number of columns of the rows the spec produces.
func (s *Spec) Columns() int64 {
	c := &s.Content
	if c.Mode == ModeHashing && c.Hashing != nil {
		return int64(c.Hashing.Width)
	}
	if c.Vocabulary == nil {
		return 0
	}
	n := int64(len(c.Vocabulary.Keys))
	u, err := parseUnseenColumns(c.Vocabulary.Unseen)
	if err == nil {
		n += int64(u)
	}
	return n + int64(c.fieldColumns())
}

// Canonical returns the canonical encoding of the content: compact JSON in
// the field order of the Go structs above, floats in shortest round-trip
// form, no insignificant space. The fingerprint is its SHA-256.
func (c *Content) Canonical() ([]byte, error) {
	if v := c.Vocabulary; v != nil && len(v.Keys) >= fastCanonicalKeys {
		if b, ok := c.canonicalFast(); ok {
			return b, nil
		}
	}
	return c.canonicalJSON()
}

// canonicalJSON is Canonical by encoding/json alone.
func (c *Content) canonicalJSON() ([]byte, error) {
	var buf bytes.Buffer
	enc := json.NewEncoder(&buf)
	enc.SetEscapeHTML(false)
	if err := enc.Encode(c); err != nil {
		return nil, err
	}
	return bytes.TrimSuffix(buf.Bytes(), []byte("\n")), nil
}

// fastCanonicalKeys is the vocabulary size from which Canonical writes the
// vocabulary's arrays by hand.
const fastCanonicalKeys = 1024

// vocabArraysMark is what encoding/json writes for the vocabulary's three
// arrays when they are nil. No other part of a Content encodes to it: a
// quote inside a JSON string is escaped, and no other object of the
// content has a "keys" member that can be null.
var vocabArraysMark = []byte(`"keys":null,"orders":null,"doc_counts":null`)

// canonicalFast is Canonical with the vocabulary's keys, orders and
// document counts written by hand, byte for byte as encoding/json writes
// them (a key that is not plain printable ASCII or clean UTF-8 is handed
// to encoding/json); ok is false when it cannot tell where they go.
func (c *Content) canonicalFast() ([]byte, bool) {
	cc := *c
	vv := *c.Vocabulary
	vv.Keys, vv.Orders, vv.DocCounts = nil, nil, nil
	cc.Vocabulary = &vv
	skeleton, err := cc.canonicalJSON()
	if err != nil {
		return nil, false
	}
	i := bytes.Index(skeleton, vocabArraysMark)
	if i < 0 || bytes.Index(skeleton[i+1:], vocabArraysMark) >= 0 {
		return nil, false
	}
	v := c.Vocabulary
	size := len(skeleton) + 40
	for _, k := range v.Keys {
		size += len(k) + 3 + 12
	}
	out := make([]byte, 0, size)
	out = append(out, skeleton[:i]...)
	out = append(out, `"keys":`...)
	var one bytes.Buffer
	enc := json.NewEncoder(&one)
	enc.SetEscapeHTML(false)
	if v.Keys == nil {
		out = append(out, "null"...)
	} else {
		out = append(out, '[')
		for j, k := range v.Keys {
			if j > 0 {
				out = append(out, ',')
			}
			if plainJSONString(k) {
				out = append(out, '"')
				out = append(out, k...)
				out = append(out, '"')
				continue
			}
			one.Reset()
			if enc.Encode(k) != nil {
				return nil, false
			}
			out = append(out, bytes.TrimSuffix(one.Bytes(), []byte("\n"))...)
		}
		out = append(out, ']')
	}
	out = append(out, `,"orders":`...)
	out = appendInts(out, v.Orders)
	out = append(out, `,"doc_counts":`...)
	out = appendInts(out, v.DocCounts)
	out = append(out, skeleton[i+len(vocabArraysMark):]...)
	return out, true
}

// plainJSONString reports whether encoding/json writes s as it is between
// quotes: printable ASCII other than '"' and '\\', or valid UTF-8 other
// than U+2028 and U+2029 (which it escapes).
func plainJSONString(s string) bool {
	ascii := true
	for i := 0; i < len(s); i++ {
		b := s[i]
		if b < 0x20 || b == '"' || b == '\\' {
			return false
		}
		if b >= utf8.RuneSelf {
			ascii = false
		}
	}
	if ascii {
		return true
	}
	return utf8.ValidString(s) && !strings.Contains(s, "\u2028") && !strings.Contains(s, "\u2029")
}

// appendInts appends a JSON array of integers (null for a nil slice).
func appendInts[T int | int64](out []byte, a []T) []byte {
	if a == nil {
		return append(out, "null"...)
	}
	out = append(out, '[')
	for j, x := range a {
		if j > 0 {
			out = append(out, ',')
		}
		out = strconv.AppendInt(out, int64(x), 10)
	}
	return append(out, ']')
}

// Seal computes and sets the fingerprint.
func (s *Spec) Seal() error {
	b, err := s.Content.Canonical()
	if err != nil {
		return err
	}
	sum := sha256.Sum256(b)
	s.Fingerprint = "sha256:" + hex.EncodeToString(sum[:])
	s.Tool = "bowline " + ToolVersion
	s.canon = b
	return nil
}

// ShortFingerprint is the first 12 hex digits of the fingerprint.
func (s *Spec) ShortFingerprint() string {
	f := strings.TrimPrefix(s.Fingerprint, "sha256:")
	if len(f) > 12 {
		return f[:12]
	}
	return f
}

type fileLayout struct {
	Schema      int             `json:"schema"`
	Tool        string          `json:"tool"`
	Fingerprint string          `json:"fingerprint"`
	Parent      string          `json:"parent,omitempty"`
	Content     json.RawMessage `json:"content"`
}

// Write writes the sealed spec as JSON.
func (s *Spec) Write(w io.Writer) error {
	if s.Fingerprint == "" {
		if err := s.Seal(); err != nil {
			return err
		}
	}
	content := s.canon
	if content == nil {
		var err error
		if content, err = s.Content.Canonical(); err != nil {
			return err
		}
	}
	// The envelope is indented for people; the content is written in its
	// canonical (compact) form, the very bytes the fingerprint covers.
	// Indenting a large vocabulary costs more than counting it.
	str := func(v string) string {
		b, _ := json.Marshal(v)
		return string(b)
	}
	var buf bytes.Buffer
	fmt.Fprintf(&buf, "{\n \"schema\": %d,\n \"tool\": %s,\n \"fingerprint\": %s,\n", SchemaVersion, str(s.Tool), str(s.Fingerprint))
	if s.Parent != "" {
		fmt.Fprintf(&buf, " \"parent\": %s,\n", str(s.Parent))
	}
	buf.WriteString(" \"content\": ")
	if _, err := w.Write(buf.Bytes()); err != nil {
		return err
	}
	if _, err := w.Write(content); err != nil {
		return err
	}
	_, err := io.WriteString(w, "\n}\n")
	return err
}

// Save writes the spec to path atomically, gzipped when the name ends in
// ".gz".
func (s *Spec) Save(path string) error {
	return atomicfile.WriteFile(path, func(w io.Writer) error {
		if strings.HasSuffix(path, ".gz") {
			zw, _ := gzip.NewWriterLevel(w, gzip.BestCompression)
			if err := s.Write(zw); err != nil {
				return err
			}
			return zw.Close()
		}
		return s.Write(w)
	})
}

// LoadError explains why a spec file was refused.
type LoadError struct {
	// File is the spec's path.
	File string
	// Reason is one of "unreadable", "truncated", "not a spec", "newer
	// schema", "fingerprint mismatch", "invalid".
	Reason string
	// Err is the detail.
	Err error
}

func (e *LoadError) Error() string {
	return fmt.Sprintf("spec %s: %s: %v", e.File, e.Reason, e.Err)
}

func (e *LoadError) Unwrap() error { return e.Err }

// Load reads a spec file (gzipped or not, by magic bytes), checks its schema
// version and fingerprint, and validates it.
func Load(path string) (*Spec, error) {
	return load(path, true)
}

// LoadEncoder loads the spec at path as Load does and makes its Encoder.
// The vocabulary's keys are checked for duplicates once, while the
// encoder indexes them, rather than first by Validate and again by the
// index (0.07 s and 8 MB for 600,000 keys). A duplicate key is then a
// *LoadError with Reason "invalid", as with Load.
func LoadEncoder(path string) (*Spec, *Encoder, error) {
	s, err := load(path, false)
	if err != nil {
		return nil, nil, err
	}
	enc, err := NewEncoder(s)
	if err != nil {
		return nil, nil, &LoadError{File: path, Reason: "invalid", Err: err}
	}
	return s, enc, nil
}

func load(path string, dupKeys bool) (*Spec, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, &LoadError{File: path, Reason: "unreadable", Err: unwrapPathErr(err)}
	}
	defer f.Close()
	return read(f, path, dupKeys)
}

func unwrapPathErr(err error) error {
	var pe *os.PathError
	if errors.As(err, &pe) {
		return pe.Err
	}
	return err
}

// Read reads a spec from r; name is used in errors.
func Read(r io.Reader, name string) (*Spec, error) {
	return read(r, name, true)
}

// read is Read; without dupKeys, validation leaves out the check for
// duplicate vocabulary keys (see LoadEncoder).
func read(r io.Reader, name string, dupKeys bool) (*Spec, error) {
	hint := sizeHint(r)
	br := bufio.NewReader(r)
	var src io.Reader = br
	if magic, _ := br.Peek(2); len(magic) == 2 && magic[0] == 0x1f && magic[1] == 0x8b {
		zr, err := gzip.NewReader(br)
		if err != nil {
			return nil, &LoadError{File: name, Reason: "truncated", Err: err}
		}
		src = zr
		hint = gzipSizeHint(r)
	}
	data, err := readAll(src, hint)
	if err != nil {
		reason := "unreadable"
		if errors.Is(err, io.ErrUnexpectedEOF) {
			reason = "truncated"
		}
		return nil, &LoadError{File: name, Reason: reason, Err: err}
	}
	// fastDecode gives the same result as the encoding/json path below,
	// or gives up; the encoding/json path then also reports the errors.
	fl, content, fast := fastDecode(data)
	if !fast {
		fl = fileLayout{}
		dec := json.NewDecoder(bytes.NewReader(data))
		dec.DisallowUnknownFields()
		if err := dec.Decode(&fl); err != nil {
			reason := "not a spec"
			if errors.Is(err, io.ErrUnexpectedEOF) || errors.Is(err, io.EOF) {
				reason = "truncated"
			}
			return nil, &LoadError{File: name, Reason: reason, Err: err}
		}
	}
	if fl.Schema == 0 || fl.Content == nil {
		return nil, &LoadError{File: name, Reason: "not a spec", Err: errors.New("no schema or content field")}
	}
	if fl.Schema > SchemaVersion {
		return nil, &LoadError{File: name, Reason: "newer schema", Err: fmt.Errorf("schema version %d (written by %s); this bowline %s reads up to version %d", fl.Schema, fl.Tool, ToolVersion, SchemaVersion)}
	}
	s := &Spec{Fingerprint: fl.Fingerprint, Parent: fl.Parent, Tool: fl.Tool, Content: content}
	if !fast {
		s.Content = Content{}
		cdec := json.NewDecoder(bytes.NewReader(fl.Content))
		cdec.DisallowUnknownFields()
		if err := cdec.Decode(&s.Content); err != nil {
			return nil, &LoadError{File: name, Reason: "invalid", Err: err}
		}
	}
	// Bowline writes the content in canonical form, so the raw bytes
	// usually hash to the fingerprint as they are; otherwise (a file
	// re-indented by hand, say) the content is encoded canonically again.
	sum := sha256.Sum256(fl.Content)
	if "sha256:"+hex.EncodeToString(sum[:]) != fl.Fingerprint {
		canon, err := s.Content.Canonical()
		if err != nil {
			return nil, &LoadError{File: name, Reason: "invalid", Err: err}
		}
		sum = sha256.Sum256(canon)
	}
	if want := "sha256:" + hex.EncodeToString(sum[:]); want != fl.Fingerprint {
		return nil, &LoadError{File: name, Reason: "fingerprint mismatch", Err: fmt.Errorf("file says %s but its contents hash to %s: the spec was edited or damaged after bowline wrote it", short(fl.Fingerprint), short(want))}
	}
	if err := s.validate(dupKeys); err != nil {
		return nil, &LoadError{File: name, Reason: "invalid", Err: err}
	}
	return s, nil
}

// readAll is io.ReadAll with the buffer sized up front to hint bytes
// (0: unknown), so that reading a large spec copies it once.
func readAll(r io.Reader, hint int64) ([]byte, error) {
	if hint <= 0 {
		return io.ReadAll(r)
	}
	buf := bytes.NewBuffer(make([]byte, 0, hint+bytes.MinRead))
	_, err := buf.ReadFrom(r)
	return buf.Bytes(), err
}

// maxSizeHint bounds sizeHint: a larger spec is read with a growing
// buffer.
const maxSizeHint = 1 << 30

// sizeHint guesses the number of bytes Read will read from r, before
// anything is read: the size of a file or the length of an in-memory
// reader. 0 when unknown. It is only a capacity.
func sizeHint(r io.Reader) int64 {
	var size int64
	switch r := r.(type) {
	case *os.File:
		fi, err := r.Stat()
		if err != nil || !fi.Mode().IsRegular() {
			return 0
		}
		size = fi.Size()
	case interface{ Len() int }:
		size = int64(r.Len())
	}
	if size > maxSizeHint {
		return 0
	}
	return size
}

// gzipSizeHint is sizeHint for a gzipped file: the uncompressed size its
// trailer records (RFC 1952 section 2.3.1, ISIZE: the size modulo 2^32 of
// the last member), bounded by the largest deflate ratio (1032:1, common
// practice).
func gzipSizeHint(r io.Reader) int64 {
	f, ok := r.(*os.File)
	if !ok {
		return 0
	}
	size := sizeHint(f)
	var trailer [4]byte
	if size < 18 {
		return 0
	}
	if _, err := f.ReadAt(trailer[:], size-4); err != nil {
		return 0
	}
	return min(int64(binary.LittleEndian.Uint32(trailer[:])), 1032*size, maxSizeHint)
}

func short(f string) string {
	f = strings.TrimPrefix(f, "sha256:")
	if len(f) > 12 {
		return f[:12]
	}
	if f == "" {
		return "(none)"
	}
	return f
}
