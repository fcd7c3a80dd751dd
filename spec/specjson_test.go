package spec

import (
	"bytes"
	"compress/gzip"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"
)

// The reference for Read's fast path is encoding/json itself (Go standard
// library, decoding per RFC 8259 into the tagged structs): referenceRead
// below is Read's decoding as it was before the fast path, and every test
// here compares against it.

// referenceDecode decodes a spec file's bytes with encoding/json alone:
// the envelope with json.Decoder (unknown fields refused), then its
// content (unknown fields refused).
func referenceDecode(data []byte) (fl fileLayout, c Content, envErr, contentErr error) {
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.DisallowUnknownFields()
	if envErr = dec.Decode(&fl); envErr != nil {
		return fl, c, envErr, nil
	}
	if fl.Content != nil {
		cdec := json.NewDecoder(bytes.NewReader(fl.Content))
		cdec.DisallowUnknownFields()
		contentErr = cdec.Decode(&c)
	}
	return fl, c, nil, contentErr
}

// referenceRead is Read as it was before the fast path (decoding with
// encoding/json alone), for already-read bytes.
func referenceRead(data []byte, name string) (*Spec, error) {
	// Both of Read's paths refuse what encoding/json lets through: a key
	// given twice, bytes after the envelope.
	if err := checkJSON(data); err != nil {
		return nil, &LoadError{File: name, Reason: ErrNotSpec, Err: err}
	}
	var fl fileLayout
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.DisallowUnknownFields()
	if err := dec.Decode(&fl); err != nil {
		reason := ErrNotSpec
		if errors.Is(err, io.ErrUnexpectedEOF) || errors.Is(err, io.EOF) {
			reason = ErrTruncated
		}
		return nil, &LoadError{File: name, Reason: reason, Err: err}
	}
	if fl.Schema == 0 || fl.Content == nil {
		return nil, &LoadError{File: name, Reason: ErrNotSpec, Err: errors.New("no schema or content field")}
	}
	if fl.Schema > SchemaVersion {
		return nil, &LoadError{File: name, Reason: ErrNewerSchema, Err: fmt.Errorf("schema version %d (written by %s); this bowline %s reads up to version %d", fl.Schema, fl.Tool, ToolVersion, SchemaVersion)}
	}
	s := &Spec{Fingerprint: fl.Fingerprint, Parent: fl.Parent, Tool: fl.Tool}
	cdec := json.NewDecoder(bytes.NewReader(fl.Content))
	cdec.DisallowUnknownFields()
	if err := cdec.Decode(&s.Content); err != nil {
		return nil, &LoadError{File: name, Reason: ErrInvalid, Err: err}
	}
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
	if err := s.Validate(); err != nil {
		return nil, &LoadError{File: name, Reason: ErrInvalid, Err: err}
	}
	return s, nil
}

// compareDecoders checks fastDecode against referenceDecode on data: when
// the fast path succeeds, encoding/json must succeed with the very same
// envelope and content. It reports whether the fast path succeeded.
func compareDecoders(t *testing.T, name string, data []byte) bool {
	t.Helper()
	fl, c, ok := fastDecode(data)
	// Again with every array of strings decoded on its own goroutine.
	defer func(n int) { asyncMinStrings = n }(asyncMinStrings)
	asyncMinStrings = 1
	afl, ac, aok := fastDecode(data)
	if aok != ok || ok && (!reflect.DeepEqual(afl, fl) || !reflect.DeepEqual(ac, c)) {
		t.Fatalf("%s: decoding arrays of strings on their own goroutines changes the result (ok %v, %v)", name, ok, aok)
	}
	if !ok {
		return false
	}
	rfl, rc, envErr, contentErr := referenceDecode(data)
	if envErr != nil || contentErr != nil {
		t.Fatalf("%s: the fast path decoded what encoding/json refuses (%v, %v)", name, envErr, contentErr)
	}
	if !reflect.DeepEqual(fl, rfl) {
		t.Fatalf("%s: envelope differs:\nfast %+v\njson %+v", name, fl, rfl)
	}
	if !reflect.DeepEqual(c, rc) {
		t.Fatalf("%s: content differs:\nfast %s\njson %s", name, dump(c), dump(rc))
	}
	return true
}

// compareReads checks that Read gives what referenceRead gives: the same
// spec, or the same error (reason and text).
func compareReads(t *testing.T, name string, data []byte) {
	t.Helper()
	got, err := Read(bytes.NewReader(data), "case.json")
	want, werr := referenceRead(data, "case.json")
	switch {
	case (err == nil) != (werr == nil):
		t.Fatalf("%s: Read error %v, reference error %v", name, err, werr)
	case err != nil:
		var a, b *LoadError
		if !errors.As(err, &a) || !errors.As(werr, &b) || a.Reason != b.Reason || err.Error() != werr.Error() {
			t.Fatalf("%s: Read error\n  %v\nreference error\n  %v", name, err, werr)
		}
	case !reflect.DeepEqual(got, want):
		t.Fatalf("%s: Read and the reference give different specs:\n%s\n%s", name, dump(got.Content), dump(want.Content))
	}
}

func dump(c Content) string {
	b, _ := json.Marshal(c)
	if len(b) > 600 {
		b = append(b[:600], "..."...)
	}
	return fmt.Sprintf("%s (vocabulary %#v)", b, c.Vocabulary)
}

// envelope wraps raw content bytes in a spec envelope whose fingerprint is
// the hash of those bytes, so that Read goes as far as Validate.
func envelope(content string) []byte {
	sum := sha256.Sum256([]byte(content))
	return []byte(`{"schema": 1, "tool": "bowline 0.1.0", "fingerprint": "sha256:` + hex.EncodeToString(sum[:]) + `", "content": ` + content + "}\n")
}

// TestFastDecodeGeneratedSpecs: large generated specs take the fast path
// and decode as encoding/json does (learned specs of every shape are
// checked in learned_test.go).
func TestFastDecodeGeneratedSpecs(t *testing.T) {
	for name, sp := range map[string]*Spec{"generated vocabulary idf": bigVocabularySpec(3000, true), "generated hashing idf": bigHashingSpec(2000)} {
		var buf bytes.Buffer
		if err := sp.Write(&buf); err != nil {
			t.Fatal(err)
		}
		if !compareDecoders(t, name, buf.Bytes()) {
			t.Errorf("%s: the fast path gave up on a spec bowline wrote", name)
		}
		compareReads(t, name, buf.Bytes())
	}
}

// contentCase is a hand-built content object; fast says whether the fast
// path must take it (false: it may give up).
type contentCase struct {
	name    string
	content string
	fast    bool
}

// vocabContent is a small valid vocabulary-mode content with the given
// vocabulary fields and weights.
func vocabContent(vocabulary, weights string) string {
	return `{"input":{"format":"lines","text":["line"]},"tokens":{"unicode":"nfkc","case":"fold","accents":"keep","numbers":"keep","min_len":1,"max_len":64},` +
		`"stop":{"keep_negations":true},"stem":"none","ngrams":{"words":"1-2","chars":"off"},"mode":"vocabulary","docs":3,` +
		`"vocabulary":{"min_docs":1,"max_doc_share":1,"max_terms":0,"unseen":"drop",` + vocabulary + `},` +
		`"weights":{"tf":"count","idf":"` + map[bool]string{false: "none", true: "smooth"}[weights != ""] + `","norm":"none"` + weights + `},"labels":{"kind":"none"}}`
}

// hashContent is a small valid hashing-mode content with the given idf
// fields.
func hashContent(weights string) string {
	return `{"input":{"format":"lines","text":["line"]},"tokens":{"unicode":"nfkc","case":"fold","accents":"keep","numbers":"keep","min_len":1,"max_len":64},` +
		`"stop":{"keep_negations":true},"stem":"none","ngrams":{"words":"1-2","chars":"off"},"mode":"hashing","docs":3,` +
		`"hashing":{"width":18446744073709551615,"seed":0,"signed":false},` +
		`"weights":{"tf":"count","idf":"smooth","norm":"none"` + weights + `},"labels":{"kind":"none"}}`
}

var contentCases = []contentCase{
	// RFC 8259 section 7: escapes, \u with a surrogate pair (U+1F600).
	{"escaped keys", vocabContent(`"keys":["say \"hi\"","back\\slash","caf\u00e9","smile \ud83d\ude00","a\/b","tab\tend","line\u2028sep"],"orders":[1,1,1,1,1,1,1],"doc_counts":[3,3,2,2,1,1,1]`, ""), true},
	{"raw UTF-8 keys", vocabContent(`"keys":["café","smile 😀","日本"],"orders":[1,1,1],"doc_counts":[1,1,1]`, ""), true},
	// encoding/json replaces bad UTF-8 (each byte utf8.DecodeRune refuses)
	// and lone surrogates with U+FFFD.
	{"bad UTF-8 key", vocabContent("\"keys\":[\"ok\",\"bad\xff\xfe\",\"cut\xe2\x82\",\"lone \\ud83d\"],\"orders\":[1,1,1,1],\"doc_counts\":[1,1,1,1]", ""), true},
	{"empty key", vocabContent(`"keys":[""],"orders":[1],"doc_counts":[1]`, ""), true},
	{"empty arrays", vocabContent(`"keys":[],"orders":[],"doc_counts":[],"retired":[]`, ""), true},
	{"empty arrays with space", vocabContent(`"keys":[ ],"orders":[
	],"doc_counts":[	]`, ""), true},
	{"null arrays", vocabContent(`"keys":null,"orders":null,"doc_counts":null,"retired":null`, ""), true},
	{"null elements", vocabContent(`"keys":["a",null],"orders":[1,null],"doc_counts":[null,1],"retired":[null,true]`, ""), true},
	{"null vocabulary", strings.Replace(vocabContent(`"keys":[]`, ""), `"vocabulary":{`, `"vocabulary":null,"x":{`, 1), false},
	{"null small fields", vocabContent(`"keys":["a"],"orders":[1],"doc_counts":[1],"seen":null,"parent_keys":null`, ""), true},
	{"retired", vocabContent(`"keys":["a","b"],"orders":[1,2],"doc_counts":[0,1],"retired":[true,false],"parent_keys":2`, ""), true},
	{"retired not bool", vocabContent(`"keys":["a"],"orders":[1],"doc_counts":[1],"retired":[1]`, ""), false},
	{"retired bad literal", vocabContent(`"keys":["a"],"orders":[1],"doc_counts":[1],"retired":[truex]`, ""), false},
	{"integers at the edges", vocabContent(`"keys":["a","b","c"],"orders":[-0,9223372036854775807,-9223372036854775808],"doc_counts":[-9223372036854775808,0,9223372036854775807]`, ""), true},
	{"integer too large", vocabContent(`"keys":["a"],"orders":[1],"doc_counts":[9223372036854775808]`, ""), false},
	{"integer too small", vocabContent(`"keys":["a"],"orders":[-9223372036854775809],"doc_counts":[1]`, ""), false},
	{"integer of 25 digits", vocabContent(`"keys":["a"],"orders":[1],"doc_counts":[1234567890123456789012345]`, ""), false},
	{"integer with fraction", vocabContent(`"keys":["a"],"orders":[1.0],"doc_counts":[1]`, ""), false},
	{"integer with exponent", vocabContent(`"keys":["a"],"orders":[1],"doc_counts":[1e2]`, ""), false},
	{"integer with leading zero", vocabContent(`"keys":["a"],"orders":[01],"doc_counts":[1]`, ""), false},
	{"integer with plus", vocabContent(`"keys":["a"],"orders":[+1],"doc_counts":[1]`, ""), false},
	{"integer as string", vocabContent(`"keys":["a"],"orders":["1"],"doc_counts":[1]`, ""), false},
	{"bare minus", vocabContent(`"keys":["a"],"orders":[-],"doc_counts":[1]`, ""), false},
	{"trailing comma", vocabContent(`"keys":["a",],"orders":[1],"doc_counts":[1]`, ""), false},
	{"missing comma", vocabContent(`"keys":["a" "b"],"orders":[1],"doc_counts":[1]`, ""), false},
	{"control byte in key", vocabContent("\"keys\":[\"a\tb\"],\"orders\":[1],\"doc_counts\":[1]", ""), false},
	{"bad escape in key", vocabContent(`"keys":["a\qb"],"orders":[1],"doc_counts":[1]`, ""), false},
	{"key not a string", vocabContent(`"keys":[1],"orders":[1],"doc_counts":[1]`, ""), false},
	{"keys not an array", vocabContent(`"keys":"a","orders":[1],"doc_counts":[1]`, ""), false},
	{"unclosed keys", vocabContent(`"keys":["a"`, ""), false},
	// Floats: strconv.ParseFloat of the literal, as encoding/json does.
	{"idf values", vocabContent(`"keys":["a","b","c","d","e","f"],"orders":[1,1,1,1,1,1],"doc_counts":[1,1,1,1,1,1]`,
		`,"idf_values":[1.2876820724517808,-0,5e-324,1E+2,0.1e-1,17976931348623157e292]`), true},
	{"idf value out of range", vocabContent(`"keys":["a"],"orders":[1],"doc_counts":[1]`, `,"idf_values":[1e400]`), false},
	{"idf value .5", vocabContent(`"keys":["a"],"orders":[1],"doc_counts":[1]`, `,"idf_values":[.5]`), false},
	{"idf value 1.", vocabContent(`"keys":["a"],"orders":[1],"doc_counts":[1]`, `,"idf_values":[1.]`), false},
	{"idf value 1e", vocabContent(`"keys":["a"],"orders":[1],"doc_counts":[1]`, `,"idf_values":[1e]`), false},
	{"idf value NaN", vocabContent(`"keys":["a"],"orders":[1],"doc_counts":[1]`, `,"idf_values":[NaN]`), false},
	{"idf value hex", vocabContent(`"keys":["a"],"orders":[1],"doc_counts":[1]`, `,"idf_values":[0x1p3]`), false},
	{"idf values null", vocabContent(`"keys":["a"],"orders":[1],"doc_counts":[1]`, `,"idf_values":null`), true},
	{"weights null", strings.Replace(vocabContent(`"keys":[]`, ""), `"weights":{`, `"weights":null,"x":{`, 1), false},
	{"buckets", hashContent(`,"idf_buckets":[0,18446744073709551615,12345678901234567890],"idf_bucket_values":[1,2.5,3],"idf_default":4`), true},
	{"bucket too large", hashContent(`,"idf_buckets":[18446744073709551616],"idf_bucket_values":[1]`), false},
	{"bucket of 20 digits with zero", hashContent(`,"idf_buckets":[01234567890123456789],"idf_bucket_values":[1]`), false},
	{"bucket negative", hashContent(`,"idf_buckets":[-1],"idf_bucket_values":[1]`), false},
	{"bucket minus zero", hashContent(`,"idf_buckets":[-0],"idf_bucket_values":[1]`), false},
	// encoding/json: the last of two fields of one name wins (merging into
	// a struct decoded twice); the fast path gives up, and Read refuses
	// the file (checkJSON).
	{"duplicate keys field", vocabContent(`"keys":["a"],"orders":[1],"doc_counts":[1],"keys":["b"]`, ""), false},
	{"duplicate vocabulary", strings.Replace(vocabContent(`"keys":["a"],"orders":[1],"doc_counts":[1]`, ""), `"vocabulary":{`, `"vocabulary":{"max_terms":5,"keys":["z"]},"vocabulary":{`, 1), false},
	// encoding/json matches field names without regard to case.
	{"field name case", vocabContent(`"Keys":["a"],"ORDERS":[1],"doc_counts":[1]`, ""), false},
	{"field name escaped", vocabContent(`"k\u0065ys":["a"],"orders":[1],"doc_counts":[1]`, ""), false},
	{"unknown field", vocabContent(`"keys":["a"],"orders":[1],"doc_counts":[1],"colour":"red"`, ""), false},
	{"unknown nested field", vocabContent(`"keys":["a"],"orders":[1],"doc_counts":[1],"seen":{"keys":1,"colour":2}`, ""), false},
	{"unknown top field", strings.Replace(vocabContent(`"keys":[]`, ""), `"docs":3`, `"docs":3,"colour":1`, 1), false},
	{"wrong type small field", strings.Replace(vocabContent(`"keys":[]`, ""), `"docs":3`, `"docs":"3"`, 1), false},
	{"float docs", strings.Replace(vocabContent(`"keys":[]`, ""), `"docs":3`, `"docs":3.5`, 1), false},
	{"content not an object", `["a"]`, false},
	{"content null", `null`, false},
	{"empty content", `{}`, true},
}

// TestFastDecodeCases compares the fast path with encoding/json on
// hand-built content, and Read with the reference Read on files made of
// it.
func TestFastDecodeCases(t *testing.T) {
	for _, tc := range contentCases {
		data := envelope(tc.content)
		if ok := compareDecoders(t, tc.name, data); tc.fast && !ok {
			t.Errorf("%s: the fast path gave up", tc.name)
		}
		compareReads(t, tc.name, data)
		var pretty bytes.Buffer
		if json.Indent(&pretty, data, "", "\t") == nil {
			compareDecoders(t, tc.name+" indented", pretty.Bytes())
			compareReads(t, tc.name+" indented", pretty.Bytes())
		}
	}
	// The edge cases that must decode did decode to the values RFC 8259
	// and encoding/json's documentation (Unmarshal: "invalid UTF-8 or
	// invalid UTF-16 surrogate pairs are ... replaced by U+FFFD") give.
	keys := func(name string) []string {
		for _, tc := range contentCases {
			if tc.name == name {
				_, c, ok := fastDecode(envelope(tc.content))
				if !ok {
					t.Fatalf("%s: fast path gave up", name)
				}
				return c.Vocabulary.Keys
			}
		}
		t.Fatalf("no case %s", name)
		return nil
	}
	if got, want := keys("escaped keys"), []string{`say "hi"`, `back\slash`, "café", "smile 😀", "a/b", "tab\tend", "line\u2028sep"}; !reflect.DeepEqual(got, want) {
		t.Errorf("escaped keys %q, want %q", got, want)
	}
	if got, want := keys("bad UTF-8 key"), []string{"ok", "bad\ufffd\ufffd", "cut\ufffd\ufffd", "lone \ufffd"}; !reflect.DeepEqual(got, want) {
		t.Errorf("bad UTF-8 keys %q, want %q", got, want)
	}
	if got := keys("empty arrays"); got == nil || len(got) != 0 {
		t.Errorf("[] gave %#v, want an empty, non-nil slice", got)
	}
	if got := keys("null arrays"); got != nil {
		t.Errorf("null gave %#v, want nil", got)
	}
}

// TestFastDecodeEnvelope covers the envelope: what json.Decoder ignores
// (bytes after the closing brace) and what it refuses.
func TestFastDecodeEnvelope(t *testing.T) {
	good := envelope(vocabContent(`"keys":["a"],"orders":[1],"doc_counts":[1]`, ""))
	cases := map[string]struct {
		data []byte
		fast bool
	}{
		"good":               {good, true},
		"trailing garbage":   {append(append([]byte(nil), good...), "}}garbage"...), false},
		"leading space":      {append([]byte(" \r\n\t"), good...), true},
		"parent":             {bytes.Replace(good, []byte(`"tool"`), []byte(`"parent": "sha256:00", "tool"`), 1), true},
		"escaped tool":       {bytes.Replace(good, []byte(`"bowline 0.1.0"`), []byte(`"bowline \u0030.1.0"`), 1), true},
		"unknown field":      {bytes.Replace(good, []byte(`"tool"`), []byte(`"colour": 1, "tool"`), 1), false},
		"upper-case field":   {bytes.Replace(good, []byte(`"tool"`), []byte(`"TOOL"`), 1), false},
		"duplicate content":  {bytes.Replace(good, []byte(`"tool"`), []byte(`"content": {}, "tool"`), 1), false},
		"schema as string":   {bytes.Replace(good, []byte(`"schema": 1`), []byte(`"schema": "1"`), 1), false},
		"newer schema":       {bytes.Replace(good, []byte(`"schema": 1`), []byte(`"schema": 2`), 1), true},
		"no schema":          {bytes.Replace(good, []byte(`"schema": 1,`), nil, 1), true},
		"no content":         {[]byte(`{"schema": 1}`), true},
		"truncated":          {good[:len(good)/2], false},
		"truncated at brace": {bytes.TrimRight(good, "}\n"), false},
		"empty":              {nil, false},
		"spaces":             {[]byte("  \n"), false},
		"not an object":      {[]byte(`[1, 2]`), false},
		"content array":      {[]byte(`{"schema": 1, "content": []}`), false},
		"tampered":           {bytes.Replace(good, []byte(`"docs":3`), []byte(`"docs":4`), 1), true},
	}
	for name, tc := range cases {
		if ok := compareDecoders(t, name, tc.data); tc.fast && !ok {
			t.Errorf("%s: the fast path gave up", name)
		}
		compareReads(t, name, tc.data)
	}
}

// TestFastDecodeAllocations: the fast path allocates per array, not per
// key (the keys share one allocation).
func TestFastDecodeAllocations(t *testing.T) {
	var small, large bytes.Buffer
	if err := bigVocabularySpec(200, true).Write(&small); err != nil {
		t.Fatal(err)
	}
	if err := bigVocabularySpec(20000, true).Write(&large); err != nil {
		t.Fatal(err)
	}
	count := func(data []byte) float64 {
		return testing.AllocsPerRun(3, func() {
			if _, _, ok := fastDecode(data); !ok {
				t.Fatal("fast path gave up")
			}
		})
	}
	a, b := count(small.Bytes()), count(large.Bytes())
	// The generated specs carry three keys with escapes, decoded one by
	// one; everything else is a fixed number of allocations (a few more
	// for the larger, whose keys are decoded on their own goroutine).
	if b < a || b > a+4 || b > 200 {
		t.Errorf("allocations: %v for 200 keys, %v for 20000 keys", a, b)
	}
}

// FuzzFastDecode: on any input, Read gives what the reference Read gives
// (same spec or same error), and whenever the fast path decodes, it
// decodes as encoding/json does. Each input is tried as a whole file and
// as the content of an envelope that carries its hash.
func FuzzFastDecode(f *testing.F) {
	for _, tc := range contentCases {
		f.Add([]byte(tc.content))
	}
	var buf bytes.Buffer
	if err := bigVocabularySpec(12, true).Write(&buf); err != nil {
		f.Fatal(err)
	}
	f.Add(buf.Bytes())
	buf.Reset()
	if err := bigHashingSpec(8).Write(&buf); err != nil {
		f.Fatal(err)
	}
	f.Add(buf.Bytes())
	f.Fuzz(func(t *testing.T, data []byte) {
		compareDecoders(t, "file", data)
		compareReads(t, "file", data)
		wrapped := envelope(string(data))
		compareDecoders(t, "content", wrapped)
		compareReads(t, "content", wrapped)
	})
}

// TestReadSizeHint: the read buffer is sized from the file (or, gzipped,
// from the ISIZE field of the trailer, RFC 1952 section 2.3.1); a wrong
// guess changes nothing. Two gzip members (RFC 1952 section 2.2: a file
// is a series of members) make the trailer hold the size of the second
// one only.
func TestReadSizeHint(t *testing.T) {
	var plain bytes.Buffer
	if err := bigVocabularySpec(500, true).Write(&plain); err != nil {
		t.Fatal(err)
	}
	data := plain.Bytes()
	var members bytes.Buffer
	for _, part := range [][]byte{data[:len(data)-10], data[len(data)-10:]} {
		zw := gzip.NewWriter(&members)
		zw.Write(part)
		zw.Close()
	}
	dir := t.TempDir()
	for name, b := range map[string][]byte{"plain.json": data, "members.json.gz": members.Bytes()} {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, b, 0o644); err != nil {
			t.Fatal(err)
		}
		f, err := os.Open(p)
		if err != nil {
			t.Fatal(err)
		}
		h := sizeHint(f)
		if strings.HasSuffix(name, ".gz") {
			h = gzipSizeHint(f)
		}
		if name == "plain.json" && h != int64(len(data)) || name != "plain.json" && h != 10 {
			t.Errorf("%s: size hint %d", name, h)
		}
		f.Close()
		got, err := Load(p)
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		want, err := referenceRead(data, p)
		if err != nil || !reflect.DeepEqual(got, want) {
			t.Fatalf("%s: Load and the reference differ (%v)", name, err)
		}
	}
	if h := sizeHint(bytes.NewReader(data)); h != int64(len(data)) {
		t.Errorf("bytes.Reader: size hint %d", h)
	}
}
