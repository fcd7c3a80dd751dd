package serve

import (
	"errors"
	"fmt"
	"io"
	"mime"
	"net/http"
	"strconv"
	"strings"
	"sync"
	"unicode/utf16"
	"unicode/utf8"
)

// EncodeRequest is the body of POST /v1/encode.
type EncodeRequest struct {
	// Documents are encoded in order; the response has one row for each.
	Documents []WireDocument `json:"documents"`
}

// WireDocument is one document of a request: either text, for a spec with
// one text field, or fields, naming every text field of the spec.
type WireDocument struct {
	ID     string            `json:"id"`
	Text   *string           `json:"text"`
	Fields map[string]string `json:"fields"`
}

// A RequestError is a request the server refuses, with the HTTP status code
// it answers and the kind of error counted in the metrics.
type RequestError struct {
	// Status is the HTTP status code.
	Status int
	// Kind is the metrics label: "malformed", "too_large",
	// "too_many_documents", "content_type", "no_text", "method",
	// "not_found" or "internal".
	Kind string
	// Msg is the message sent to the client.
	Msg string
}

func (e *RequestError) Error() string { return e.Msg }

func requestErrorf(status int, kind, format string, a ...any) *RequestError {
	return &RequestError{Status: status, Kind: kind, Msg: fmt.Sprintf(format, a...)}
}

// checkContentType accepts application/json, with no charset or UTF-8.
func checkContentType(h string) *RequestError {
	if h == "" {
		return requestErrorf(http.StatusUnsupportedMediaType, "content_type", "Content-Type is missing; send application/json")
	}
	mt, params, err := mime.ParseMediaType(h)
	if err != nil || mt != "application/json" {
		return requestErrorf(http.StatusUnsupportedMediaType, "content_type", "Content-Type %q is not application/json", h)
	}
	if cs, ok := params["charset"]; ok && !strings.EqualFold(cs, "utf-8") {
		return requestErrorf(http.StatusUnsupportedMediaType, "content_type", "charset %q is not utf-8", cs)
	}
	return nil
}

func tooLarge(maxBody int64) *RequestError {
	return requestErrorf(http.StatusRequestEntityTooLarge, "too_large", "request body larger than %d bytes", maxBody)
}

func malformed(format string, a ...any) *RequestError {
	return requestErrorf(http.StatusBadRequest, "malformed", format, a...)
}

// DecodeRequest reads one JSON request body from r. It reads at most
// maxBody bytes (0: no limit) and accepts at most maxDocs documents
// (0: no limit). Errors are *RequestError values: 413 for a body or
// document list over its limit, 400 for anything that is not exactly one
// JSON object of the request's shape. A document without text is not an
// error here; the encoder finds it.
//
// The JSON is read as encoding/json's Decoder would read it into an
// EncodeRequest with unknown fields disallowed (RFC 8259 syntax, keys
// matched case-insensitively, a repeated key merged into or replacing
// what came before, invalid UTF-8 and lone surrogates replaced by U+FFFD),
// without reflection and with buffers reused between calls.
func DecodeRequest(r io.Reader, maxBody int64, maxDocs int) (*EncodeRequest, error) {
	d := decoders.Get().(*decoder)
	defer d.release()
	var rerr error
	d.data, d.end, rerr = readBody(d.data[:0], r, maxBody)
	d.maxDocs = maxDocs

	st := d.top()
	switch st {
	case statusBad:
		return nil, malformed("malformed JSON at byte %d: %s", d.errAt, d.errMsg)
	case statusMore:
		switch d.end {
		case endOver:
			return nil, tooLarge(maxBody)
		case endErr:
			return nil, readError(rerr, maxBody)
		}
		if isBlank(d.data) {
			return nil, malformed("malformed JSON: empty body")
		}
		return nil, malformed("malformed JSON: body ends early")
	}
	if d.typeErr != nil {
		return nil, d.typeErr
	}
	// Exactly one value: anything but white space after it is malformed.
	d.skipSpace()
	if d.pos < len(d.data) {
		switch d.data[d.pos] {
		case '[', '{', ']', '}', ':', ',':
		default:
			// encoding/json reads a scalar that follows to its end: when
			// that end is beyond the limit, the body is too large.
			if d.end == endOver && d.scalarAtTop() == statusMore {
				return nil, tooLarge(maxBody)
			}
		}
		return nil, malformed("malformed JSON: data after the request object")
	}
	switch d.end {
	case endOver:
		return nil, tooLarge(maxBody)
	case endErr:
		return nil, malformed("malformed JSON: data after the request object")
	}
	if !d.hasDocs {
		return nil, malformed("malformed request: no \"documents\" list")
	}
	if maxDocs > 0 && d.ndocs > maxDocs {
		return nil, requestErrorf(http.StatusRequestEntityTooLarge, "too_many_documents", "%d documents in one request; the limit is %d", d.ndocs, maxDocs)
	}
	return d.request(), nil
}

// readError is the answer to a body that could not be read to its end.
func readError(err error, maxBody int64) *RequestError {
	var mbe *http.MaxBytesError
	if errors.As(err, &mbe) {
		return tooLarge(maxBody)
	}
	return malformed("reading the request body: %v", err)
}

// How the bytes read from a body ended.
const (
	endEOF  = iota // the body ended
	endOver        // the body went on beyond the limit
	endErr         // reading failed
)

// readBody appends the body from r to dst: all of it, or maxBody bytes and
// one more probed (maxBody > 0), or what came before a read error.
func readBody(dst []byte, r io.Reader, maxBody int64) ([]byte, int, error) {
	for {
		room := int64(1 << 62)
		if maxBody > 0 {
			room = maxBody - int64(len(dst))
		}
		if room == 0 {
			// At the limit exactly is fine, beyond is not.
			var one [1]byte
			n, err := r.Read(one[:])
			switch {
			case n > 0:
				return dst, endOver, nil
			case err == io.EOF:
				return dst, endEOF, nil
			case err != nil:
				return dst, endErr, err
			}
			continue
		}
		if len(dst) == cap(dst) {
			grow := int64(max(cap(dst), 4096))
			dst = append(dst, make([]byte, min(grow, room))...)[:len(dst)]
		}
		free := dst[len(dst):cap(dst)]
		if int64(len(free)) > room {
			free = free[:room]
		}
		n, err := r.Read(free)
		dst = dst[:len(dst)+n]
		switch {
		case err == io.EOF:
			return dst, endEOF, nil
		case err != nil:
			return dst, endErr, err
		}
	}
}

// maxDepth is the deepest nesting of objects and arrays accepted, that of
// encoding/json's scanner.
const maxDepth = 10000

// Results of the parsing steps.
type status uint8

const (
	statusOK   status = iota
	statusBad         // a syntax error at errAt
	statusMore        // the bytes read end inside the value
)

// span is a string unquoted into the decoder's arena.
type span struct{ off, n int }

// fieldValue is one "name": "value" pair of a document's fields.
type fieldValue struct{ name, value span }

// docState is a document as decoded so far.
type docState struct {
	id      span
	text    span
	hasText bool
	// hasFields: "fields" was an object, later pairs replacing earlier
	// ones of the same name; a null drops them.
	hasFields bool
	fields    []fieldValue
}

// A decoder reads one request. The zero value is ready; decoders and their
// buffers are reused through a pool.
type decoder struct {
	data    []byte // the body as read
	end     int    // how it ended (endEOF, endOver, endErr)
	pos     int    // next byte of data to read
	maxDocs int

	arena []byte // unquoted strings
	key   []byte // the object key being read
	stack []byte // open containers while skipping a value

	// docs holds every document position written since "documents" was
	// last set to null or an empty list: a later "documents" list in the
	// same request decodes into the same positions, as encoding/json
	// decodes into the elements of a slice it already holds.
	docs    []docState
	written int  // positions of docs in use
	ndocs   int  // length of the documents list
	hasDocs bool // "documents" is a list (not absent or null)

	typeErr *RequestError // the first value of the wrong type or unknown key
	errAt   int
	errMsg  string
}

var decoders = sync.Pool{New: func() any { return new(decoder) }}

// Buffers larger than these are not kept for the next request.
const (
	maxPooledBody  = 1 << 20
	maxPooledDocs  = 4096
	maxPooledArena = 1 << 20
)

func (d *decoder) release() {
	for i := range d.docs[:d.written] {
		d.docs[i].fields = d.docs[i].fields[:0]
	}
	*d = decoder{data: d.data[:0], arena: d.arena[:0], key: d.key[:0], stack: d.stack[:0], docs: d.docs[:0]}
	if cap(d.data) > maxPooledBody || cap(d.arena) > maxPooledArena || cap(d.docs) > maxPooledDocs {
		return
	}
	decoders.Put(d)
}

// request builds the decoded request: all its strings share one
// allocation, and so do its text pointers.
func (d *decoder) request() *EncodeRequest {
	all := string(d.arena)
	str := func(s span) string { return all[s.off : s.off+s.n] }
	req := &EncodeRequest{Documents: make([]WireDocument, d.ndocs)}
	texts := make([]string, d.ndocs)
	for i := range req.Documents {
		if i >= d.written {
			continue // a null past the positions written: a zero document
		}
		ds, wd := &d.docs[i], &req.Documents[i]
		wd.ID = str(ds.id)
		if ds.hasText {
			texts[i] = str(ds.text)
			wd.Text = &texts[i]
		}
		if ds.hasFields {
			wd.Fields = make(map[string]string, len(ds.fields))
			for _, f := range ds.fields {
				wd.Fields[str(f.name)] = str(f.value)
			}
		}
	}
	return req
}

func isBlank(b []byte) bool {
	for _, c := range b {
		if !isSpace(c) {
			return false
		}
	}
	return true
}

// isSpace reports JSON white space (RFC 8259 section 2).
func isSpace(c byte) bool { return c == ' ' || c == '\t' || c == '\n' || c == '\r' }

func (d *decoder) skipSpace() {
	for d.pos < len(d.data) && isSpace(d.data[d.pos]) {
		d.pos++
	}
}

// bad records a syntax error at the current byte.
func (d *decoder) bad(where string) status {
	d.errAt = d.pos
	d.errMsg = fmt.Sprintf("invalid character %s %s", quoteByte(d.data[d.pos]), where)
	return statusBad
}

func quoteByte(c byte) string {
	if c == '\'' {
		return `'\''`
	}
	if c == '"' {
		return `'"'`
	}
	return strconv.QuoteRune(rune(c))
}

// wrongType records the first value of the wrong type; decoding goes on
// to find syntax errors and the end of the body, as encoding/json does.
func (d *decoder) wrongType(where func() string, want string) {
	if d.typeErr != nil {
		return
	}
	got := "number"
	switch d.data[d.pos] {
	case '"':
		got = "string"
	case '{':
		got = "object"
	case '[':
		got = "array"
	case 't', 'f':
		got = "bool"
	case 'n':
		got = "null"
	}
	d.typeErr = malformed("malformed request: %s must be %s, not %s (byte %d)", where(), want, got, d.pos)
}

func (d *decoder) unknownKey(where func() string) {
	if d.typeErr == nil {
		d.typeErr = malformed("malformed request: unknown field %q in %s (byte %d)", d.key, where(), d.pos)
	}
}

// top reads the request object.
func (d *decoder) top() status {
	d.skipSpace()
	if d.pos == len(d.data) {
		return statusMore
	}
	switch d.data[d.pos] {
	case '{':
	case 'n':
		// null leaves the request empty.
		return d.scalarAtTop()
	default:
		if st := d.validStart(); st != statusOK {
			return st
		}
		d.wrongType(func() string { return "the request" }, "an object")
		if d.data[d.pos] == '[' {
			return d.skip(0)
		}
		return d.scalarAtTop()
	}
	return d.object(1, func(k []byte) status {
		if !matchKey(k, "documents") {
			d.unknownKey(func() string { return "the request" })
			return d.skip(1)
		}
		return d.documents()
	})
}

// scalarAtTop reads a string, number or literal as the whole body. As in
// encoding/json's scanner, it is complete only when a byte follows it or
// the body ends there.
func (d *decoder) scalarAtTop() status {
	if st := d.skip(0); st != statusOK {
		return st
	}
	if d.pos == len(d.data) && d.end != endEOF {
		return statusMore
	}
	return statusOK
}

// validStart checks that the current byte can begin a value.
func (d *decoder) validStart() status {
	switch c := d.data[d.pos]; {
	case c == '{', c == '[', c == '"', c == '-', c >= '0' && c <= '9', c == 't', c == 'f', c == 'n':
		return statusOK
	}
	return d.bad("looking for the beginning of a value")
}

// object reads the object at d.pos, at the given nesting depth (1 for the
// request itself), calling member for each key with d.pos at its value.
func (d *decoder) object(depth int, member func(key []byte) status) status {
	if depth > maxDepth {
		return d.bad("nested too deep")
	}
	d.pos++ // {
	d.skipSpace()
	if d.pos == len(d.data) {
		return statusMore
	}
	if d.data[d.pos] == '}' {
		d.pos++
		return statusOK
	}
	for {
		if d.data[d.pos] != '"' {
			return d.bad("looking for the beginning of an object key")
		}
		d.key = d.key[:0]
		if st := d.str(&d.key); st != statusOK {
			return st
		}
		d.skipSpace()
		if d.pos == len(d.data) {
			return statusMore
		}
		if d.data[d.pos] != ':' {
			return d.bad("after an object key")
		}
		d.pos++
		d.skipSpace()
		if d.pos == len(d.data) {
			return statusMore
		}
		if st := member(d.key); st != statusOK {
			return st
		}
		d.skipSpace()
		if d.pos == len(d.data) {
			return statusMore
		}
		switch d.data[d.pos] {
		case ',':
			d.pos++
			d.skipSpace()
			if d.pos == len(d.data) {
				return statusMore
			}
		case '}':
			d.pos++
			return statusOK
		default:
			return d.bad("after an object value")
		}
	}
}

// matchKey reports whether key names the field name, as encoding/json
// matches keys to struct fields: exactly, or else under Unicode simple case
// folding (bytes.EqualFold).
func matchKey(key []byte, name string) bool {
	if string(key) == name {
		return true
	}
	// Only a key of the same length or one with non-ASCII bytes (a
	// folding such as K, U+212A, for k) can match.
	if len(key) == len(name) && asciiFold(key, name) {
		return true
	}
	for _, c := range key {
		if c >= utf8.RuneSelf {
			return strings.EqualFold(string(key), name)
		}
	}
	return false
}

// asciiFold reports whether key is name with some letters in upper case;
// name is lower case.
func asciiFold(key []byte, name string) bool {
	for i := range key {
		if key[i]|0x20 != name[i] {
			return false
		}
	}
	return true
}

// documents reads the value of "documents" at d.pos.
func (d *decoder) documents() status {
	switch d.data[d.pos] {
	case 'n':
		d.hasDocs, d.ndocs, d.written = false, 0, 0
		return d.skip(1)
	case '[':
	default:
		if st := d.validStart(); st != statusOK {
			return st
		}
		d.wrongType(func() string { return "documents" }, "a list")
		return d.skip(1)
	}
	d.pos++ // [
	d.skipSpace()
	if d.pos == len(d.data) {
		return statusMore
	}
	if d.data[d.pos] == ']' {
		d.pos++
		// An empty list is a new, empty slice.
		d.hasDocs, d.ndocs, d.written = true, 0, 0
		return statusOK
	}
	d.hasDocs = true
	for i := 0; ; i++ {
		d.ndocs = i + 1
		if st := d.document(i); st != statusOK {
			return st
		}
		d.skipSpace()
		if d.pos == len(d.data) {
			return statusMore
		}
		switch d.data[d.pos] {
		case ',':
			d.pos++
			d.skipSpace()
			if d.pos == len(d.data) {
				return statusMore
			}
		case ']':
			d.pos++
			return statusOK
		default:
			return d.bad("after a list element")
		}
	}
}

// document reads documents[i] at d.pos.
func (d *decoder) document(i int) status {
	where := func() string { return fmt.Sprintf("documents[%d]", i) }
	c := d.data[d.pos]
	if c != '{' && c != 'n' {
		if st := d.validStart(); st != statusOK {
			return st
		}
		d.wrongType(where, "an object")
		return d.skip(2)
	}
	// Positions past maxDocs are only counted: such a request is refused.
	var ds *docState
	if d.maxDocs <= 0 || i < d.maxDocs {
		// Positions not written before start as zero documents.
		for d.written <= i {
			if d.written == len(d.docs) {
				d.docs = append(d.docs, docState{})
			}
			ds = &d.docs[d.written]
			*ds = docState{fields: ds.fields[:0]}
			d.written++
		}
		ds = &d.docs[i]
	}
	if c == 'n' {
		return d.skip(2) // null leaves the document as it was
	}
	var scratch docState
	if ds == nil {
		ds = &scratch
	}
	return d.object(3, func(k []byte) status {
		switch {
		case matchKey(k, "text"):
			switch d.data[d.pos] {
			case '"':
				ds.hasText = true
				return d.value(&ds.text)
			case 'n':
				ds.hasText = false
				return d.skip(3)
			}
			if st := d.validStart(); st != statusOK {
				return st
			}
			d.wrongType(func() string { return where() + ".text" }, "a string")
			return d.skip(3)
		case matchKey(k, "id"):
			switch d.data[d.pos] {
			case '"':
				return d.value(&ds.id)
			case 'n':
				return d.skip(3) // null leaves a string as it was
			}
			if st := d.validStart(); st != statusOK {
				return st
			}
			d.wrongType(func() string { return where() + ".id" }, "a string")
			return d.skip(3)
		case matchKey(k, "fields"):
			return d.fields(ds, where)
		}
		d.unknownKey(where)
		return d.skip(3)
	})
}

// fields reads a document's "fields" object at d.pos.
func (d *decoder) fields(ds *docState, where func() string) status {
	switch d.data[d.pos] {
	case 'n':
		ds.hasFields, ds.fields = false, ds.fields[:0]
		return d.skip(3)
	case '{':
	default:
		if st := d.validStart(); st != statusOK {
			return st
		}
		d.wrongType(func() string { return where() + ".fields" }, "an object")
		return d.skip(3)
	}
	// A second "fields" object adds to the first, as encoding/json
	// decodes into a map it already holds.
	ds.hasFields = true
	return d.object(4, func(k []byte) status {
		name := span{len(d.arena), len(k)}
		d.arena = append(d.arena, k...)
		switch d.data[d.pos] {
		case '"':
			var v span
			if st := d.value(&v); st != statusOK {
				return st
			}
			ds.fields = append(ds.fields, fieldValue{name, v})
			return statusOK
		case 'n':
			// null in a map of strings stores the empty string.
			ds.fields = append(ds.fields, fieldValue{name, span{}})
			return d.skip(4)
		}
		if st := d.validStart(); st != statusOK {
			return st
		}
		d.wrongType(func() string { return fmt.Sprintf("%s.fields[%q]", where(), k) }, "a string")
		return d.skip(4)
	})
}

// value unquotes the string at d.pos into the arena.
func (d *decoder) value(s *span) status {
	off := len(d.arena)
	st := d.str(&d.arena)
	*s = span{off, len(d.arena) - off}
	return st
}

// safe marks the bytes a string can hold as they are: printable ASCII
// other than the quote and the backslash.
var safe = func() (t [256]bool) {
	for c := 0x20; c < 0x80; c++ {
		t[c] = c != '"' && c != '\\'
	}
	return t
}()

// str reads the string at d.pos (its opening quote) and appends it,
// unquoted, to *dst (nil: checks it only). Unquoting follows
// encoding/json: escapes of RFC 8259 section 7, a UTF-16 surrogate pair
// written as two \u escapes is one character, a lone surrogate and each
// byte that is not part of valid UTF-8 become U+FFFD.
func (d *decoder) str(dst *[]byte) status {
	data := d.data
	p := d.pos + 1
	for {
		start := p
		for p < len(data) && safe[data[p]] {
			p++
		}
		if dst != nil {
			*dst = append(*dst, data[start:p]...)
		}
		if p == len(data) {
			d.pos = p
			return statusMore
		}
		switch c := data[p]; {
		case c == '"':
			d.pos = p + 1
			return statusOK
		case c == '\\':
			r, n, st := d.escape(p)
			if st != statusOK {
				return st
			}
			p += n
			if dst != nil {
				*dst = utf8.AppendRune(*dst, r)
			}
		case c < 0x20:
			d.pos = p
			return d.bad("in a string (control characters must be escaped)")
		default:
			r, n := utf8.DecodeRune(data[p:])
			if dst != nil {
				if r == utf8.RuneError && n == 1 {
					*dst = utf8.AppendRune(*dst, utf8.RuneError)
				} else {
					*dst = append(*dst, data[p:p+n]...)
				}
			}
			p += n
		}
	}
}

// escape reads the escape at data[p] (a backslash) and returns the
// character it stands for and its length in bytes.
func (d *decoder) escape(p int) (rune, int, status) {
	data := d.data
	if p+1 == len(data) {
		d.pos = p + 1
		return 0, 0, statusMore
	}
	switch data[p+1] {
	case '"', '\\', '/':
		return rune(data[p+1]), 2, statusOK
	case 'b':
		return '\b', 2, statusOK
	case 'f':
		return '\f', 2, statusOK
	case 'n':
		return '\n', 2, statusOK
	case 'r':
		return '\r', 2, statusOK
	case 't':
		return '\t', 2, statusOK
	case 'u':
	default:
		d.pos = p + 1
		return 0, 0, d.bad("in a string escape")
	}
	r, st := d.hex4(p + 2)
	if st != statusOK {
		return 0, 0, st
	}
	if !utf16.IsSurrogate(r) {
		return r, 6, statusOK
	}
	// A pair only when a low surrogate escape follows; otherwise U+FFFD,
	// and what follows is read on its own.
	q := p + 6
	if q+6 <= len(data) && data[q] == '\\' && data[q+1] == 'u' {
		if r2, ok := parseHex4(data[q+2 : q+6]); ok {
			if pair := utf16.DecodeRune(r, r2); pair != utf8.RuneError {
				return pair, 12, statusOK
			}
		}
	}
	return utf8.RuneError, 6, statusOK
}

// hex4 reads the four hexadecimal digits of a \u escape at data[p:].
func (d *decoder) hex4(p int) (rune, status) {
	var r rune
	for i := p; i < p+4; i++ {
		if i == len(d.data) {
			d.pos = i
			return 0, statusMore
		}
		v, ok := hexValue(d.data[i])
		if !ok {
			d.pos = i
			return 0, d.bad("in a \\u escape")
		}
		r = r<<4 | v
	}
	return r, statusOK
}

func parseHex4(b []byte) (rune, bool) {
	var r rune
	for _, c := range b {
		v, ok := hexValue(c)
		if !ok {
			return 0, false
		}
		r = r<<4 | v
	}
	return r, true
}

func hexValue(c byte) (rune, bool) {
	switch {
	case c >= '0' && c <= '9':
		return rune(c - '0'), true
	case c >= 'a' && c <= 'f':
		return rune(c-'a') + 10, true
	case c >= 'A' && c <= 'F':
		return rune(c-'A') + 10, true
	}
	return 0, false
}

// skip checks and passes over the value at d.pos, inside depth open
// objects and arrays.
func (d *decoder) skip(depth int) status {
	stack := d.stack[:0]
	defer func() { d.stack = stack[:0] }()
	for {
		// A value.
		d.skipSpace()
		if d.pos == len(d.data) {
			return statusMore
		}
		switch c := d.data[d.pos]; {
		case c == '{' || c == '[':
			if depth+len(stack)+1 > maxDepth {
				return d.bad("nested too deep")
			}
			d.pos++
			d.skipSpace()
			if d.pos == len(d.data) {
				return statusMore
			}
			if c == '{' && d.data[d.pos] == '}' || c == '[' && d.data[d.pos] == ']' {
				d.pos++
				break
			}
			stack = append(stack, c)
			if c == '{' {
				if st := d.keyColon(); st != statusOK {
					return st
				}
			}
			continue
		case c == '"':
			if st := d.str(nil); st != statusOK {
				return st
			}
		case c == '-' || c >= '0' && c <= '9':
			if st := d.number(); st != statusOK {
				return st
			}
		case c == 't':
			if st := d.literal("true"); st != statusOK {
				return st
			}
		case c == 'f':
			if st := d.literal("false"); st != statusOK {
				return st
			}
		case c == 'n':
			if st := d.literal("null"); st != statusOK {
				return st
			}
		default:
			return d.bad("looking for the beginning of a value")
		}
		// After a value: close containers, or a comma and the next value.
		for {
			if len(stack) == 0 {
				return statusOK
			}
			d.skipSpace()
			if d.pos == len(d.data) {
				return statusMore
			}
			open := stack[len(stack)-1]
			c := d.data[d.pos]
			if open == '{' && c == '}' || open == '[' && c == ']' {
				d.pos++
				stack = stack[:len(stack)-1]
				continue
			}
			if c != ',' {
				if open == '{' {
					return d.bad("after an object value")
				}
				return d.bad("after a list element")
			}
			d.pos++
			if open == '{' {
				if st := d.keyColon(); st != statusOK {
					return st
				}
			}
			break
		}
	}
}

// keyColon passes over an object key and its colon.
func (d *decoder) keyColon() status {
	d.skipSpace()
	if d.pos == len(d.data) {
		return statusMore
	}
	if d.data[d.pos] != '"' {
		return d.bad("looking for the beginning of an object key")
	}
	if st := d.str(nil); st != statusOK {
		return st
	}
	d.skipSpace()
	if d.pos == len(d.data) {
		return statusMore
	}
	if d.data[d.pos] != ':' {
		return d.bad("after an object key")
	}
	d.pos++
	return statusOK
}

// number passes over a number (RFC 8259 section 6).
func (d *decoder) number() status {
	data, p := d.data, d.pos
	digits := func() {
		for p < len(data) && data[p] >= '0' && data[p] <= '9' {
			p++
		}
	}
	need := func() status { // at least one digit at p
		d.pos = p
		if p == len(data) {
			return statusMore
		}
		if data[p] < '0' || data[p] > '9' {
			return d.bad("in a number")
		}
		return statusOK
	}
	if data[p] == '-' {
		p++
		if st := need(); st != statusOK {
			return st
		}
	}
	if data[p] == '0' {
		p++
	} else {
		digits()
	}
	if p < len(data) && data[p] == '.' {
		p++
		if st := need(); st != statusOK {
			return st
		}
		digits()
	}
	if p < len(data) && (data[p] == 'e' || data[p] == 'E') {
		p++
		if p < len(data) && (data[p] == '+' || data[p] == '-') {
			p++
		}
		if st := need(); st != statusOK {
			return st
		}
		digits()
	}
	d.pos = p
	return statusOK
}

// literal passes over true, false or null.
func (d *decoder) literal(word string) status {
	for i := 0; i < len(word); i++ {
		if d.pos == len(d.data) {
			return statusMore
		}
		if d.data[d.pos] != word[i] {
			return d.bad("in a literal")
		}
		d.pos++
	}
	return statusOK
}
