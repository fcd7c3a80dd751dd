package spec

import (
	"bytes"
	"encoding/json"
	"strconv"
	"strings"
	"unicode/utf8"
)

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
