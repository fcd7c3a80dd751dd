package jsonscan

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"reflect"
	"strings"
	"testing"
)

// The reference for every check here is encoding/json (Go standard
// library, reading RFC 8259): json.Valid for what is accepted, the
// json.SyntaxError of json.Unmarshal for where a refusal is found, and
// json.Decoder (with UseNumber) or json.Unmarshal into typed values for
// what a value decodes to.

// tree decodes the value at the scan into what json.Decoder with
// UseNumber gives for an any: nil, bool, json.Number, string, []any and
// map[string]any (the last of two members of one key wins). On the way it
// checks each number with the typed readers against json.Unmarshal into
// int64, uint64 and float64, and that each key stays as it was until its
// object ends.
func tree(t *testing.T, s *Scanner) (any, error) {
	switch s.Kind() {
	case Null:
		_, err := s.Skip()
		return nil, err
	case Bool:
		return s.Bool()
	case Number:
		start := s.Offset()
		raw, err := s.Skip()
		if err != nil {
			return nil, err
		}
		checkNumber(t, s, start, raw)
		return json.Number(raw), nil
	case String:
		v, _, err := s.String([]byte("prefix"))
		return strings.TrimPrefix(string(v), "prefix"), err
	case Array:
		a := []any{}
		err := s.Array(func() error {
			v, err := tree(t, s)
			a = append(a, v)
			return err
		})
		return a, err
	case Object:
		m := map[string]any{}
		var keys [][]byte
		var copies []string
		err := s.Object(func(k []byte) error {
			keys, copies = append(keys, k), append(copies, string(k))
			v, err := tree(t, s)
			m[string(k)] = v
			for i := range keys {
				if string(keys[i]) != copies[i] {
					t.Fatalf("key %q changed to %q before its object ended", copies[i], keys[i])
				}
			}
			return err
		})
		return m, err
	}
	_, err := s.Skip()
	if err == nil {
		t.Fatal("Kind is Invalid but Skip reads a value")
	}
	return nil, err
}

// checkNumber reads the number raw (at start) again with Int64, Uint64
// and Float64 and compares each with json.Unmarshal into that type; the
// scan is left past the number.
func checkNumber(t *testing.T, s *Scanner, start int, raw []byte) {
	end := s.Offset()
	check := func(typ string, got any, err error, want any, werr error) {
		t.Helper()
		switch {
		case (err == nil) != (werr == nil):
			t.Fatalf("%s %s: error %v, encoding/json %v", typ, raw, err, werr)
		case err != nil && (!errors.Is(err, ErrType) || s.Offset() != start):
			t.Fatalf("%s %s: %v at %d, want ErrType at %d", typ, raw, err, s.Offset(), start)
		case err == nil && s.Offset() != end:
			t.Fatalf("%s %s: scan at %d, want %d", typ, raw, s.Offset(), end)
		case err == nil && !reflect.DeepEqual(got, want):
			t.Fatalf("%s %s: %v, encoding/json %v", typ, raw, got, want)
		}
	}
	s.Seek(start)
	i, err := s.Int64()
	var wi int64
	check("int64", i, err, wi, json.Unmarshal(raw, &wi))
	s.Seek(start)
	u, err := s.Uint64()
	var wu uint64
	check("uint64", u, err, wu, json.Unmarshal(raw, &wu))
	s.Seek(start)
	f, err := s.Float64()
	var wf float64
	werr := json.Unmarshal(raw, &wf)
	check("float64", math.Float64bits(f), err, math.Float64bits(wf), werr)
	s.Seek(end)
}

// compare reads data as one JSON text with a Scanner and with
// encoding/json and fails t on any difference: accepted or refused, where
// a refusal is found, and the decoded value.
func compare(t *testing.T, data []byte) {
	t.Helper()
	s := New(data)
	got, err := tree(t, s)
	if err == nil {
		err = s.End()
	}
	var se *json.SyntaxError
	jerr := json.Unmarshal(data, new(any))
	if valid := json.Valid(data); (err == nil) != valid {
		t.Fatalf("%q: scanner error %v; json.Valid %v", data, err, valid)
	}
	if err != nil {
		var pe *ParseError
		if !errors.As(err, &pe) || !errors.As(jerr, &se) {
			t.Fatalf("%q: scanner error %#v, encoding/json error %#v", data, err, jerr)
		}
		// SyntaxError.Offset counts the bytes read, the one in error
		// included. At the end of the input it is all of them, and the
		// error is "unexpected end of JSON input", or (for a scalar cut
		// short at the top level) names the space encoding/json's scanner
		// is given after the last byte, when that byte is no space itself.
		jsonEnd := se.Offset == int64(len(data)) && (se.Error() == "unexpected end of JSON input" ||
			strings.HasPrefix(se.Error(), "invalid character ' ' ") && (len(data) == 0 || data[len(data)-1] != ' '))
		want := int(se.Offset) - 1
		if jsonEnd {
			want = len(data)
		}
		if pe.Offset != want || errors.Is(err, ErrEnd) != jsonEnd {
			t.Fatalf("%q: scanner error %v at %d; encoding/json %q at offset %d", data, err, pe.Offset, se, se.Offset)
		}
		return
	}
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.UseNumber()
	var want any
	if err := dec.Decode(&want); err != nil {
		t.Fatalf("%q: json.Valid but Decode fails: %v", data, err)
	}
	if !reflect.DeepEqual(got, want) {
		t.Fatalf("%q: scanner %#v\nencoding/json %#v", data, got, want)
	}
}

// cases are texts where encoding/json's answer is subtle.
var cases = []string{
	// RFC 8259 section 7: escapes, surrogate pairs (U+1F600), lone
	// surrogates, control bytes.
	`"\"\\\/\b\f\n\r\t"`, `"\u00e9\u00E9 \ud83d\ude00 \uD83D\uDE00"`,
	`["\ud800","\udc00x","\ud800\u0041","\ud800\ud800\udc00","\ud800\\","\ud800\u12"]`,
	`"\u0000\u001f\u007f"`, "\"a\tb\"", "\"a\x00\"", `"\x"`, `"\u12g4"`, `"\u12`, `"ab`, `"\`, `"`,
	// Invalid UTF-8: each bad byte becomes U+FFFD; a surrogate encoded in
	// UTF-8 too.
	"\"\xff\"", "\"a\xe2\x82\"", "\"\xed\xa0\x80 \xc0\xaf \xef\xbf\xbd\"", "\"caf\xc3\xa9\"",
	// Numbers (RFC 8259 section 6) and the typed readers' edges.
	`0`, `-0`, `01`, `-`, `- `, `tr `, `"\u12 `, `-01`, `1.`, `1.5`, `.5`, `1e`, `1e+`, `1E-2`, `+1`, `1.5e+3`, `0x10`, `1e400`, `-1e400`, `5e-324`,
	`9223372036854775807`, `9223372036854775808`, `-9223372036854775808`, `-9223372036854775809`,
	`18446744073709551615`, `18446744073709551616`, `01234567890123456789`, `1234567890123456789012345`, `-0.0`, `1.0`, `1e2`,
	// Literals.
	`true`, `false`, `null`, `tru`, `nul`, `nulL`, `truex`, `[true,false,null]`, `True`,
	// Objects and arrays.
	`{}`, `[]`, `{"a":1,"a":2}`, `{"a":{"b":[1,{"c":null}]}}`, `{"k\u0065y":1,"key":2}`, `{"\u00e9":1,"é":2}`,
	`{,}`, `[,]`, `[1,]`, `{"a":1,}`, `{"a" 1}`, `{"a":1 "b":2}`, `[1 2]`, `{1:2}`, `{"a"}`, `[`, `{`, `{"a":`, `{"a"`, `[1`, `[1,`,
	`{"a":[1x]}`, `[1x]`, `{"a":1x}`, `[}`, `{]`, `]`, `}`, `:`, `,`,
	// Top level and white space.
	``, ` `, " \t\r\n1 \t\r\n", `1 2`, `{} {}`, `{}x`, `"a"b`, "\ufeff{}", "\x00", "\xff", "\v1", "\f1",
	// Depth: encoding/json accepts 10000 levels.
	strings.Repeat("[", 10000) + strings.Repeat("]", 10000),
	strings.Repeat("[", 10001) + strings.Repeat("]", 10001),
	strings.Repeat(`{"a":`, 10000) + "1" + strings.Repeat("}", 10000),
	strings.Repeat(`{"a":[`, 5000) + strings.Repeat("]}", 5000),
	strings.Repeat(`{"a":[`, 5000) + "{" + strings.Repeat("]}", 5000),
}

func TestScannerMatchesEncodingJSON(t *testing.T) {
	for _, c := range cases {
		compare(t, []byte(c))
	}
}

// FuzzScanner: on any input, the Scanner accepts what json.Valid accepts,
// finds a refusal where encoding/json finds it, and decodes every value
// as encoding/json does.
func FuzzScanner(f *testing.F) {
	for _, c := range cases {
		if len(c) < 1000 {
			f.Add([]byte(c))
		}
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		compare(t, data)
	})
}

// The messages name the byte and what was being read; the offset is the
// byte's.
func TestParseErrors(t *testing.T) {
	for _, c := range []struct {
		in, err string
	}{
		{`x`, `parse error at byte 0: invalid character 'x' looking for the beginning of a value`},
		{`{"a":1,}`, `parse error at byte 7: invalid character '}' looking for the beginning of an object key`},
		{`{"a" 1}`, `parse error at byte 5: invalid character '1' after an object key`},
		{`{"a":1 "b"}`, `parse error at byte 7: invalid character '"' after an object value`},
		{`[1 2]`, `parse error at byte 3: invalid character '2' after a list element`},
		{"\"a\tb\"", `parse error at byte 2: invalid character '\t' in a string (control characters must be escaped)`},
		{`"\q"`, `parse error at byte 2: invalid character 'q' in a string escape`},
		{`"\u12g4"`, `parse error at byte 5: invalid character 'g' in a \u escape`},
		{`-x`, `parse error at byte 1: invalid character 'x' in a number`},
		{`nul'`, `parse error at byte 3: invalid character '\'' in a literal`},
		{`1 2`, `parse error at byte 2: invalid character '2' after the top-level value`},
		{strings.Repeat("[", 10001), `parse error at byte 10000: invalid character '[' nested too deep`},
		{`[1`, `parse error at byte 2: unexpected end of JSON input`},
	} {
		s := New([]byte(c.in))
		_, err := s.Skip()
		if err == nil {
			err = s.End()
		}
		if err == nil || err.Error() != c.err {
			t.Errorf("%.20q: %v, want %s", c.in, err, c.err)
		}
	}
}

// A typed reader refuses a value of another kind with ErrType and leaves
// it unread; text no value begins with is a syntax error.
func TestTypedReaders(t *testing.T) {
	readers := map[string]func(*Scanner) error{
		"Int64":   func(s *Scanner) error { _, err := s.Int64(); return err },
		"Uint64":  func(s *Scanner) error { _, err := s.Uint64(); return err },
		"Float64": func(s *Scanner) error { _, err := s.Float64(); return err },
		"Bool":    func(s *Scanner) error { _, err := s.Bool(); return err },
		"String":  func(s *Scanner) error { _, _, err := s.String(nil); return err },
		"Array":   func(s *Scanner) error { return s.Array(func() error { _, err := s.Skip(); return err }) },
		"Object":  func(s *Scanner) error { return s.Object(func([]byte) error { _, err := s.Skip(); return err }) },
	}
	takes := map[string]string{"Int64": "1", "Uint64": "1", "Float64": "1", "Bool": "true", "String": `"a"`, "Array": "[]", "Object": "{}"}
	for name, read := range readers {
		for _, v := range []string{"1", "1.5", "-1", "true", "null", `"a"`, "[]", "{}"} {
			s := New([]byte("  " + v))
			err := read(s)
			if v == takes[name] {
				if err != nil || s.Offset() != 2+len(v) {
					t.Errorf("%s(%s): %v, scan at %d", name, v, err, s.Offset())
				}
				continue
			}
			var pe *ParseError
			if err != nil && (!errors.As(err, &pe) || pe.Offset != 2 || s.Offset() != 2 || !errors.Is(err, ErrType)) {
				t.Errorf("%s(%s): %v at %d, want ErrType at 2", name, v, err, s.Offset())
			}
		}
		for _, v := range []string{"", "x", "]"} {
			err := read(New([]byte(v)))
			if err == nil || errors.Is(err, ErrType) {
				t.Errorf("%s(%q): %v, want a syntax error", name, v, err)
			}
		}
	}
}

func TestKindString(t *testing.T) {
	var names []string
	for k := Invalid; k <= Object+1; k++ {
		names = append(names, k.String())
	}
	if got := fmt.Sprint(names); got != "[invalid null bool number string array object Kind(7)]" {
		t.Errorf("kinds: %s", got)
	}
}

// Reading a document of plain strings and numbers allocates nothing.
func TestScannerAllocations(t *testing.T) {
	data := []byte(`{"id": 12, "text": "Dock 14 would not release my bike", "stars": [1, 2.5, true, null], "nested": {"k\u0065y": "caf\u00e9"}}`)
	s := New(data)
	var buf []byte
	allocs := testing.AllocsPerRun(100, func() {
		s.Reset(data)
		err := s.Object(func(key []byte) error {
			if s.Kind() == String {
				v, copied, err := s.String(buf[:0])
				if copied {
					buf = v
				}
				return err
			}
			_, err := s.Skip()
			return err
		})
		if err != nil {
			t.Fatal(err)
		}
	})
	if allocs != 0 {
		t.Errorf("%.1f allocations per document", allocs)
	}
}
