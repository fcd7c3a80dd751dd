// Package jsonscan reads JSON text held in memory value by value, without
// reflection, accepting and decoding exactly what encoding/json does.
package jsonscan

import (
	"bytes"
	"errors"
	"fmt"
	"strconv"
	"unicode/utf16"
	"unicode/utf8"
)

// maxDepth is the deepest nesting of objects and arrays accepted, that of
// encoding/json's scanner.
const maxDepth = 10000

// A Kind is the kind of a JSON value, told by its first byte.
type Kind uint8

// The kinds of value.
const (
	Invalid Kind = iota // no value: the end of the input, or a byte no value begins with
	Null
	Bool
	Number
	String
	Array
	Object
)

var kindNames = [...]string{"invalid", "null", "bool", "number", "string", "array", "object"}

// String returns the kind's name: "null", "bool", "number", "string",
// "array" or "object" (the names encoding/json's UnmarshalTypeError
// gives), or "invalid".
func (k Kind) String() string {
	if int(k) < len(kindNames) {
		return kindNames[k]
	}
	return "Kind(" + strconv.Itoa(int(k)) + ")"
}

// kindOf is the kind of value each byte begins.
var kindOf = func() (t [256]Kind) {
	t['n'], t['t'], t['f'], t['"'], t['['], t['{'], t['-'] = Null, Bool, Bool, String, Array, Object, Number
	for c := '0'; c <= '9'; c++ {
		t[c] = Number
	}
	return t
}()

// Errors wrapped by [ParseError]. A ParseError that wraps neither is a
// byte that cannot stand where it was found; its message names the byte
// and what the scanner was looking for.
var (
	// ErrEnd means the input ends inside a value, or holds none.
	ErrEnd = errors.New("unexpected end of JSON input")
	// ErrType means a reader was asked for a value of another kind, or
	// for a number its type cannot hold: out of range, or for an integer
	// type, one with a fraction or an exponent (the numbers for which
	// encoding/json returns an UnmarshalTypeError). The value is left
	// unread.
	ErrType = errors.New("value of the wrong type")
	// ErrDuplicateKey means an object holds the same key twice (RFC 8259
	// section 4: names SHOULD be unique; encoding/json lets the last one
	// win), refused when Scanner.UniqueKeys is set. The ParseError's
	// offset is the second key's.
	ErrDuplicateKey = errors.New("duplicate key")
)

// A ParseError is JSON text that cannot be read as asked, with the offset
// where the problem was found.
type ParseError struct {
	// Offset is the offset in the input of the byte in error, of the
	// value of the wrong type (ErrType), or the input's length (ErrEnd).
	Offset int
	Err    error // ErrEnd, ErrType, or the invalid character
}

// Error returns "parse error at byte N: " and the problem.
func (e *ParseError) Error() string {
	return "parse error at byte " + strconv.Itoa(e.Offset) + ": " + e.Err.Error()
}

// Unwrap returns the underlying error.
func (e *ParseError) Unwrap() error { return e.Err }

// charError is a byte that cannot stand where it was found.
type charError struct {
	c     byte
	where string // what the scanner was looking for or reading
}

func (e *charError) Error() string { return "invalid character " + quoteChar(e.c) + " " + e.where }

// Where a character error is found.
const (
	inValue      = "looking for the beginning of a value"
	inKey        = "looking for the beginning of an object key"
	afterKey     = "after an object key"
	afterMember  = "after an object value"
	afterElement = "after a list element"
	inString     = "in a string (control characters must be escaped)"
	inEscape     = "in a string escape"
	inHex        = "in a \\u escape"
	inNumber     = "in a number"
	inLiteral    = "in a literal"
	tooDeep      = "nested too deep"
	afterTop     = "after the top-level value"
)

// quoteChar quotes c in single quotes.
func quoteChar(c byte) string {
	switch c {
	case '\'':
		return `'\''`
	case '"':
		return `'"'`
	}
	return strconv.QuoteRune(rune(c))
}

// A Scanner reads one JSON text (RFC 8259) held in memory. The scan stands
// at an offset in it; each reading method first skips white space, then
// reads the value there and moves past it. Text that encoding/json refuses
// is refused with a *ParseError. Bytes after the value read are left to
// the caller (see End).
//
// A Scanner is not safe for use by several goroutines at once; several
// Scanners may read the same input.
type Scanner struct {
	// UniqueKeys refuses an object that holds a key twice, with a
	// *ParseError wrapping ErrDuplicateKey at the second one.
	UniqueKeys bool

	data    []byte
	pos     int
	depth   int      // objects and arrays open
	keys    []byte   // the unquoted keys of the objects open
	scratch []byte   // strings unquoted by Skip
	seen    [][]byte // UniqueKeys: the keys of the objects open
	sets    []map[string]struct{}
}

// New returns a Scanner at the start of data. The values it returns may
// share data's bytes.
func New(data []byte) *Scanner { return &Scanner{data: data} }

// Reset moves s to the start of data, keeping its buffers.
func (s *Scanner) Reset(data []byte) {
	*s = Scanner{UniqueKeys: s.UniqueKeys, data: data, keys: s.keys[:0], scratch: s.scratch[:0], seen: s.seen[:0], sets: s.sets[:0]}
}

// Offset returns the offset of the scan in the input.
func (s *Scanner) Offset() int { return s.pos }

// Seek moves the scan to off, an offset it stood at before (Offset), to
// read the value there again or skip what lies before it. The nesting is
// kept: off must lie in the object or array being read, or at the top
// level when none is open.
func (s *Scanner) Seek(off int) { s.pos = off }

// space skips white space.
func (s *Scanner) space() {
	if s.pos < len(s.data) && s.data[s.pos] > ' ' {
		return
	}
	s.spaces()
}

// spaces is space past its first byte.
func (s *Scanner) spaces() {
	for s.pos < len(s.data) {
		switch s.data[s.pos] {
		case ' ', '\t', '\n', '\r':
			s.pos++
		default:
			return
		}
	}
}

// Kind skips white space and returns the kind of the value at the scan
// (Invalid at the end of the input).
func (s *Scanner) Kind() Kind {
	s.space()
	if s.pos == len(s.data) {
		return Invalid
	}
	return kindOf[s.data[s.pos]]
}

// End skips white space and checks that the input ends there.
func (s *Scanner) End() error {
	s.space()
	if s.pos < len(s.data) {
		return s.fail(afterTop)
	}
	return nil
}

// fail is the error at the scan: the byte there cannot stand where it is,
// or the input ends.
func (s *Scanner) fail(where string) error {
	if s.pos == len(s.data) {
		return s.end()
	}
	return &ParseError{Offset: s.pos, Err: &charError{s.data[s.pos], where}}
}

func (s *Scanner) end() error { return &ParseError{Offset: len(s.data), Err: ErrEnd} }

// mismatch is the error for the value at the scan when a reader cannot
// take it: ErrType for a value of another kind, else the syntax error.
func (s *Scanner) mismatch() error {
	if s.pos < len(s.data) && kindOf[s.data[s.pos]] != Invalid {
		return &ParseError{Offset: s.pos, Err: ErrType}
	}
	return s.fail(inValue)
}

// Skip checks the value at the scan, moves past it and returns its bytes.
func (s *Scanner) Skip() ([]byte, error) {
	s.space()
	start := s.pos
	err := s.skip()
	return s.data[start:s.pos], err
}

// skip is Skip with the white space skipped.
func (s *Scanner) skip() error {
	if s.pos == len(s.data) {
		return s.end()
	}
	switch kindOf[s.data[s.pos]] {
	case Object:
		return s.Object(s.skipMember)
	case Array:
		return s.Array(s.skip)
	case String:
		v, copied, err := s.String(s.scratch[:0])
		if copied {
			s.scratch = v
		}
		return err
	case Number:
		_, err := s.number()
		return err
	case Null:
		return s.literal("null")
	case Bool:
		if s.data[s.pos] == 't' {
			return s.literal("true")
		}
		return s.literal("false")
	}
	return s.fail(inValue)
}

func (s *Scanner) skipMember([]byte) error { return s.skip() }

// enter moves past the bracket that opens an object or an array. Every
// object and array is entered here, and so their nesting is bounded here.
func (s *Scanner) enter(open byte) error {
	s.space()
	if s.pos == len(s.data) || s.data[s.pos] != open {
		return s.mismatch()
	}
	if s.depth == maxDepth {
		return s.fail(tooDeep)
	}
	s.depth++
	s.pos++
	return nil
}

// Object reads the object at the scan, calling member for each of its
// members in order, with the key (unquoted as String unquotes) and the
// scan at the value's first byte. member must read the value and returns
// nil to go on; Object returns the first error. The key's bytes stay
// valid and unchanged until Object returns; member must not change them.
// A key given twice is passed twice.
func (s *Scanner) Object(member func(key []byte) error) error {
	if err := s.enter('{'); err != nil {
		return err
	}
	base := len(s.keys)
	seenBase, setBase := len(s.seen), len(s.sets)
	// Every key of every object read, skipped ones too, passes here.
	err := s.items('}', afterMember, func() error {
		if s.data[s.pos] != '"' {
			return s.fail(inKey)
		}
		at := s.pos
		key, copied, err := s.String(s.keys)
		if err != nil {
			return err
		}
		if copied {
			key, s.keys = key[len(s.keys):len(key):len(key)], key
		}
		if s.UniqueKeys {
			if err := s.unique(key, at, seenBase, setBase); err != nil {
				return err
			}
		}
		s.space()
		if s.pos == len(s.data) || s.data[s.pos] != ':' {
			return s.fail(afterKey)
		}
		s.pos++
		s.space()
		if s.pos == len(s.data) {
			return s.end()
		}
		return member(key)
	})
	s.keys = s.keys[:base]
	s.seen, s.sets = s.seen[:seenBase], s.sets[:setBase]
	s.depth--
	return err
}

// uniqueSetFrom is the number of keys from which an object's keys are
// looked up in a set rather than compared one by one.
const uniqueSetFrom = 32

// unique notes key, found at offset at, among the keys of the object
// being read (those from seenBase on, or the set at setBase once there
// are many), or refuses it when it is there already.
func (s *Scanner) unique(key []byte, at, seenBase, setBase int) error {
	dup := func() error {
		return &ParseError{Offset: at, Err: fmt.Errorf("%w %q", ErrDuplicateKey, key)}
	}
	if len(s.sets) > setBase {
		set := s.sets[setBase]
		if _, ok := set[string(key)]; ok {
			return dup()
		}
		set[string(key)] = struct{}{}
		return nil
	}
	for _, k := range s.seen[seenBase:] {
		if bytes.Equal(k, key) {
			return dup()
		}
	}
	s.seen = append(s.seen, key)
	if len(s.seen)-seenBase == uniqueSetFrom {
		set := make(map[string]struct{}, 2*uniqueSetFrom)
		for _, k := range s.seen[seenBase:] {
			set[string(k)] = struct{}{}
		}
		s.seen = s.seen[:seenBase]
		s.sets = append(s.sets, set)
	}
	return nil
}

// Array reads the array at the scan, calling elem for each element with
// the scan at its first byte. elem must read the element and returns nil
// to go on; Array returns the first error.
func (s *Scanner) Array(elem func() error) error {
	if err := s.enter('['); err != nil {
		return err
	}
	err := s.items(']', afterElement, elem)
	s.depth--
	return err
}

// items reads the members or elements of the object or array whose
// opening bracket the scan has passed, up to the closing bracket close,
// calling item for each with the scan at its first byte. after says where
// a byte that is neither a comma nor close was found.
func (s *Scanner) items(close byte, after string, item func() error) error {
	s.space()
	if s.pos < len(s.data) && s.data[s.pos] == close {
		s.pos++
		return nil
	}
	for {
		if s.pos == len(s.data) {
			return s.end()
		}
		if err := item(); err != nil {
			return err
		}
		s.space()
		if s.pos == len(s.data) {
			return s.end()
		}
		switch s.data[s.pos] {
		case ',':
			s.pos++
			s.space()
		case close:
			s.pos++
			return nil
		default:
			return s.fail(after)
		}
	}
}

// plain marks the bytes a string can hold as they are, but for bytes
// from 0x80 on, which must also form valid UTF-8.
var plain = func() (t [256]bool) {
	for c := 0x20; c < 256; c++ {
		t[c] = c != '"' && c != '\\'
	}
	return t
}()

// String reads the string at the scan and returns its value. When the
// string holds no escape and only valid UTF-8, the value is the input's
// bytes between the quotes: String returns them (copied false), and dst
// is not used. Otherwise String returns dst with the value appended
// (copied true), unquoted as encoding/json unquotes: the escapes of RFC
// 8259 section 7, a UTF-16 surrogate pair written as two \u escapes as one
// character, a lone surrogate and each byte that is not part of valid
// UTF-8 as U+FFFD.
func (s *Scanner) String(dst []byte) (v []byte, copied bool, err error) {
	s.space()
	if s.pos == len(s.data) || s.data[s.pos] != '"' {
		return nil, false, s.mismatch()
	}
	data := s.data
	start := s.pos + 1
	p := start
	var high byte
	for p < len(data) && plain[data[p]] {
		high |= data[p]
		p++
	}
	if p < len(data) && data[p] == '"' && (high < utf8.RuneSelf || utf8.Valid(data[start:p])) {
		s.pos = p + 1
		return data[start:p:p], false, nil
	}
	if high < utf8.RuneSelf {
		// The bytes so far are ASCII and stand for themselves.
		dst = append(dst, data[start:p]...)
		start = p
	}
	dst, err = s.unquote(dst, start)
	return dst, true, err
}

// unquote appends the rest of the string whose bytes resume at data[p]
// to dst, unquoted, and moves past the closing quote.
func (s *Scanner) unquote(dst []byte, p int) ([]byte, error) {
	data := s.data
	for {
		start := p
		for p < len(data) && data[p] < utf8.RuneSelf && plain[data[p]] {
			p++
		}
		dst = append(dst, data[start:p]...)
		if p == len(data) {
			s.pos = p
			return dst, s.end()
		}
		switch c := data[p]; {
		case c == '"':
			s.pos = p + 1
			return dst, nil
		case c == '\\':
			r, n, err := s.escape(p)
			if err != nil {
				return dst, err
			}
			dst = utf8.AppendRune(dst, r)
			p += n
		case c < 0x20:
			s.pos = p
			return dst, s.fail(inString)
		default:
			r, n := utf8.DecodeRune(data[p:])
			if r == utf8.RuneError && n == 1 {
				dst = utf8.AppendRune(dst, utf8.RuneError)
			} else {
				dst = append(dst, data[p:p+n]...)
			}
			p += n
		}
	}
}

// escape reads the escape at data[p] (a backslash) and returns the
// character it stands for and its length in bytes. A \u escape of a high
// surrogate followed by one of a low surrogate is the pair's character;
// any other surrogate is U+FFFD, and what follows it is read on its own.
func (s *Scanner) escape(p int) (rune, int, error) {
	data := s.data
	if p+1 == len(data) {
		s.pos = p + 1
		return 0, 0, s.end()
	}
	switch data[p+1] {
	case '"', '\\', '/':
		return rune(data[p+1]), 2, nil
	case 'b':
		return '\b', 2, nil
	case 'f':
		return '\f', 2, nil
	case 'n':
		return '\n', 2, nil
	case 'r':
		return '\r', 2, nil
	case 't':
		return '\t', 2, nil
	case 'u':
	default:
		s.pos = p + 1
		return 0, 0, s.fail(inEscape)
	}
	var r rune
	for i := p + 2; i < p+6; i++ {
		v, ok := hexValue(data, i)
		if !ok {
			s.pos = i
			return 0, 0, s.fail(inHex)
		}
		r = r<<4 | v
	}
	if !utf16.IsSurrogate(r) {
		return r, 6, nil
	}
	q := p + 6
	if q+6 <= len(data) && data[q] == '\\' && data[q+1] == 'u' {
		var r2 rune
		for i := q + 2; i < q+6; i++ {
			v, ok := hexValue(data, i)
			if !ok {
				return utf8.RuneError, 6, nil
			}
			r2 = r2<<4 | v
		}
		if pair := utf16.DecodeRune(r, r2); pair != utf8.RuneError {
			return pair, 12, nil
		}
	}
	return utf8.RuneError, 6, nil
}

// hexValue returns the value of the hexadecimal digit data[i] (false past
// the end or for another byte).
func hexValue(data []byte, i int) (rune, bool) {
	if i >= len(data) {
		return 0, false
	}
	switch c := data[i]; {
	case c >= '0' && c <= '9':
		return rune(c - '0'), true
	case c >= 'a' && c <= 'f':
		return rune(c-'a') + 10, true
	case c >= 'A' && c <= 'F':
		return rune(c-'A') + 10, true
	}
	return 0, false
}

// literal moves past true, false or null.
func (s *Scanner) literal(word string) error {
	for i := 0; i < len(word); i++ {
		if s.pos == len(s.data) || s.data[s.pos] != word[i] {
			return s.fail(inLiteral)
		}
		s.pos++
	}
	return nil
}

// number moves past the number at the scan (RFC 8259 section 6), which
// begins with a minus or a digit, and returns its bytes.
func (s *Scanner) number() ([]byte, error) {
	data, p := s.data, s.pos
	digits := func() bool {
		from := p
		for p < len(data) && data[p] >= '0' && data[p] <= '9' {
			p++
		}
		return p > from
	}
	if data[p] == '-' {
		p++
	}
	if p < len(data) && data[p] == '0' {
		p++
	} else if !digits() {
		s.pos = p
		return nil, s.fail(inNumber)
	}
	if p < len(data) && data[p] == '.' {
		p++
		if !digits() {
			s.pos = p
			return nil, s.fail(inNumber)
		}
	}
	if p < len(data) && (data[p] == 'e' || data[p] == 'E') {
		p++
		if p < len(data) && (data[p] == '+' || data[p] == '-') {
			p++
		}
		if !digits() {
			s.pos = p
			return nil, s.fail(inNumber)
		}
	}
	start := s.pos
	s.pos = p
	return data[start:p], nil
}
