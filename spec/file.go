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
	"strings"

	"github.com/bowline/bowline/internal/atomicfile"
	"github.com/bowline/bowline/internal/jsonscan"
)

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

// The reasons a spec file is refused. A *LoadError matches its reason
// with errors.Is: errors.Is(err, spec.ErrFingerprint).
var (
	// ErrUnreadable: the file could not be opened or read (the
	// LoadError's Err is the system's error).
	ErrUnreadable = errors.New("unreadable")
	// ErrTruncated: the file ends before its JSON does.
	ErrTruncated = errors.New("truncated")
	// ErrNotSpec: the file is not JSON in the shape of a spec.
	ErrNotSpec = errors.New("not a spec")
	// ErrNewerSchema: the spec's schema version is newer than this build
	// reads.
	ErrNewerSchema = errors.New("newer schema")
	// ErrFingerprint: the content does not hash to the fingerprint the
	// file names.
	ErrFingerprint = errors.New("fingerprint mismatch")
	// ErrInvalid: the content is incomplete or inconsistent.
	ErrInvalid = errors.New("invalid")
	// ErrTooLarge: the file (after gzip decompression) holds more bytes
	// than LoadOptions.MaxBytes.
	ErrTooLarge = errors.New("too large")
)

// LoadError explains why a spec file was refused.
type LoadError struct {
	// File is the spec's path.
	File string
	// Reason is one of ErrUnreadable, ErrTruncated, ErrNotSpec,
	// ErrNewerSchema, ErrFingerprint, ErrInvalid and ErrTooLarge.
	Reason error
	// Err is the detail.
	Err error
}

func (e *LoadError) Error() string {
	return fmt.Sprintf("spec %s: %v: %v", e.File, e.Reason, e.Err)
}

// Unwrap returns the reason and the detail, so that errors.Is matches
// either (errors.Is(err, fs.ErrNotExist) for a missing file).
func (e *LoadError) Unwrap() []error {
	if e.Err == nil {
		return []error{e.Reason}
	}
	return []error{e.Reason, e.Err}
}

// Load reads a spec file (gzipped or not, by magic bytes), checks its schema
// version and fingerprint, and validates it. An error is a *LoadError.
func Load(path string) (*Spec, error) {
	return LoadOptions{}.Load(path)
}

// Read reads a spec from r as Load reads a file; name is used in errors.
func Read(r io.Reader, name string) (*Spec, error) {
	return LoadOptions{}.Read(r, name)
}

// LoadOptions adjust what Load and Read check. The zero value checks
// everything.
type LoadOptions struct {
	// KeysChecked leaves out the check for duplicate vocabulary keys, for
	// a caller that indexes the keys and refuses a duplicate itself.
	KeysChecked bool
	// MaxBytes bounds the spec's size after gzip decompression: reading
	// stops past it, so a small gzipped file cannot inflate into all of
	// memory. 0 means DefaultMaxBytes.
	MaxBytes int64
}

// DefaultMaxBytes is the bound on a spec's size when LoadOptions.MaxBytes
// is 0: room for a vocabulary of about six million keys with idf values
// (bowline writes some 40 bytes a key).
const DefaultMaxBytes = 256 << 20

// Load is Load with the options.
func (o LoadOptions) Load(path string) (*Spec, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, &LoadError{File: path, Reason: ErrUnreadable, Err: unwrapPathErr(err)}
	}
	defer f.Close()
	return o.Read(f, path)
}

func unwrapPathErr(err error) error {
	var pe *os.PathError
	if errors.As(err, &pe) {
		return pe.Err
	}
	return err
}

// Read is Read with the options.
func (o LoadOptions) Read(r io.Reader, name string) (*Spec, error) {
	hint := sizeHint(r)
	br := bufio.NewReader(r)
	var src io.Reader = br
	if magic, _ := br.Peek(2); len(magic) == 2 && magic[0] == 0x1f && magic[1] == 0x8b {
		zr, err := gzip.NewReader(br)
		if err != nil {
			return nil, &LoadError{File: name, Reason: ErrTruncated, Err: err}
		}
		src = zr
		hint = gzipSizeHint(r)
	}
	limit := o.MaxBytes
	if limit <= 0 {
		limit = DefaultMaxBytes
	}
	data, err := readAll(io.LimitReader(src, limit+1), min(hint, limit+1))
	if err == nil && int64(len(data)) > limit {
		size := fmt.Sprintf("%d bytes", limit)
		if limit%(1<<20) == 0 {
			size = fmt.Sprintf("%d MiB", limit>>20)
		}
		return nil, &LoadError{File: name, Reason: ErrTooLarge, Err: fmt.Errorf("over %s after decompression (the bound on a spec; raise it with --spec-limit)", size)}
	}
	if err != nil {
		reason := ErrUnreadable
		if errors.Is(err, io.ErrUnexpectedEOF) {
			reason = ErrTruncated
		}
		return nil, &LoadError{File: name, Reason: reason, Err: err}
	}
	// fastDecode gives the same result as the encoding/json path below,
	// or gives up; the encoding/json path then also reports the errors.
	fl, content, fast := fastDecode(data)
	if !fast {
		if err := checkJSON(data); err != nil {
			return nil, &LoadError{File: name, Reason: ErrNotSpec, Err: err}
		}
		fl = fileLayout{}
		dec := json.NewDecoder(bytes.NewReader(data))
		dec.DisallowUnknownFields()
		if err := dec.Decode(&fl); err != nil {
			reason := ErrNotSpec
			if errors.Is(err, io.ErrUnexpectedEOF) || errors.Is(err, io.EOF) {
				reason = ErrTruncated
			}
			return nil, &LoadError{File: name, Reason: reason, Err: err}
		}
	}
	if fl.Schema == 0 || fl.Content == nil {
		return nil, &LoadError{File: name, Reason: ErrNotSpec, Err: errors.New("no schema or content field")}
	}
	if fl.Schema > SchemaVersion {
		return nil, &LoadError{File: name, Reason: ErrNewerSchema, Err: fmt.Errorf("schema version %d (written by %s); this bowline %s reads up to version %d", fl.Schema, fl.Tool, ToolVersion, SchemaVersion)}
	}
	s := &Spec{Fingerprint: fl.Fingerprint, Parent: fl.Parent, Tool: fl.Tool, Content: content}
	if !fast {
		s.Content = Content{}
		cdec := json.NewDecoder(bytes.NewReader(fl.Content))
		cdec.DisallowUnknownFields()
		if err := cdec.Decode(&s.Content); err != nil {
			return nil, &LoadError{File: name, Reason: ErrInvalid, Err: err}
		}
	}
	// Bowline writes the content in canonical form, so the raw bytes
	// usually hash to the fingerprint as they are; otherwise (a file
	// re-indented by hand, say) the content is encoded canonically again.
	sum := sha256.Sum256(fl.Content)
	if "sha256:"+hex.EncodeToString(sum[:]) != fl.Fingerprint {
		canon, err := s.Content.Canonical()
		if err != nil {
			return nil, &LoadError{File: name, Reason: ErrInvalid, Err: err}
		}
		sum = sha256.Sum256(canon)
	}
	if want := "sha256:" + hex.EncodeToString(sum[:]); want != fl.Fingerprint {
		return nil, &LoadError{File: name, Reason: ErrFingerprint, Err: fmt.Errorf("file says %s but its contents hash to %s: the spec was edited or damaged after bowline wrote it", short(fl.Fingerprint), short(want))}
	}
	if err := s.validate(!o.KeysChecked); err != nil {
		return nil, &LoadError{File: name, Reason: ErrInvalid, Err: err}
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

// checkJSON refuses what encoding/json lets through in a spec file: an
// object holding a key twice (encoding/json keeps the last) and bytes
// after the file's JSON value (json.Decoder stops before them). The error
// names the line and column. Other faults are left to encoding/json,
// which words them as before.
func checkJSON(data []byte) error {
	sc := jsonscan.New(data)
	sc.UniqueKeys = true
	if _, err := sc.Skip(); err != nil {
		var pe *jsonscan.ParseError
		if errors.As(err, &pe) && errors.Is(err, jsonscan.ErrDuplicateKey) {
			return fmt.Errorf("%s: %w", position(data, pe.Offset), pe.Err)
		}
		return nil
	}
	if err := sc.End(); err != nil {
		var pe *jsonscan.ParseError
		off := sc.Offset()
		if errors.As(err, &pe) {
			off = pe.Offset
		}
		return fmt.Errorf("%s: bytes after the spec's JSON object", position(data, off))
	}
	return nil
}

// position is "line L, column C" of offset off in data (1-based, columns
// in bytes).
func position(data []byte, off int) string {
	off = min(off, len(data))
	line := 1 + bytes.Count(data[:off], []byte("\n"))
	col := off - bytes.LastIndexByte(data[:off], '\n')
	return fmt.Sprintf("line %d, column %d", line, col)
}
