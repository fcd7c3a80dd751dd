package serve

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"net/http"
	"reflect"
	"strings"
	"testing"
	"unicode/utf8"
)

// referenceDecodeRequest is the decoder DecodeRequest replaced, built on
// encoding/json's Decoder, kept as the reference for JSON semantics
// (RFC 8259 as the Go standard library reads it). DecodeRequest must give
// the same request, or an error of the same status and kind, for every
// input.
func referenceDecodeRequest(r io.Reader, maxBody int64, maxDocs int) (*EncodeRequest, error) {
	lr := &limitReader{r: r, n: maxBody}
	if maxBody <= 0 {
		lr.n = -1
	}
	dec := json.NewDecoder(lr)
	dec.DisallowUnknownFields()
	var req EncodeRequest
	if err := dec.Decode(&req); err != nil {
		return nil, referenceDecodeError(err, lr, maxBody)
	}
	// Exactly one value: anything but white space after it is malformed.
	if _, err := dec.Token(); err != io.EOF {
		if lr.over {
			return nil, tooLarge(maxBody)
		}
		return nil, requestErrorf(http.StatusBadRequest, "malformed", "malformed JSON: data after the request object")
	}
	if req.Documents == nil {
		return nil, requestErrorf(http.StatusBadRequest, "malformed", "malformed request: no \"documents\" list")
	}
	if maxDocs > 0 && len(req.Documents) > maxDocs {
		return nil, requestErrorf(http.StatusRequestEntityTooLarge, "too_many_documents", "%d documents in one request; the limit is %d", len(req.Documents), maxDocs)
	}
	return &req, nil
}

func referenceDecodeError(err error, lr *limitReader, maxBody int64) error {
	var mbe *http.MaxBytesError
	if lr.over || errors.As(err, &mbe) {
		return tooLarge(maxBody)
	}
	var se *json.SyntaxError
	var te *json.UnmarshalTypeError
	switch {
	case errors.Is(err, io.EOF):
		return requestErrorf(http.StatusBadRequest, "malformed", "malformed JSON: empty body")
	case errors.Is(err, io.ErrUnexpectedEOF):
		return requestErrorf(http.StatusBadRequest, "malformed", "malformed JSON: body ends early")
	case errors.As(err, &se):
		return requestErrorf(http.StatusBadRequest, "malformed", "malformed JSON at byte %d: %v", se.Offset, err)
	case errors.As(err, &te):
		return requestErrorf(http.StatusBadRequest, "malformed", "malformed request: %s must be %s, not %s", te.Field, te.Type, te.Value)
	}
	var ioErr interface{ Timeout() bool }
	if errors.As(err, &ioErr) {
		return requestErrorf(http.StatusBadRequest, "malformed", "reading the request body: %v", err)
	}
	return requestErrorf(http.StatusBadRequest, "malformed", "malformed request: %v", err)
}

// limitReader reads at most n bytes (n < 0: no limit) and remembers
// whether the input went on beyond them.
type limitReader struct {
	r    io.Reader
	n    int64
	over bool
}

var errOverLimit = errors.New("request body over the limit")

func (l *limitReader) Read(p []byte) (int, error) {
	if l.n < 0 {
		return l.r.Read(p)
	}
	if l.n == 0 {
		var one [1]byte
		k, err := l.r.Read(one[:])
		if k > 0 {
			l.over = true
			return 0, errOverLimit
		}
		return 0, err
	}
	if int64(len(p)) > l.n {
		p = p[:l.n]
	}
	k, err := l.r.Read(p)
	l.n -= int64(k)
	return k, err
}

// failingReader returns its data and then err.
type failingReader struct {
	data []byte
	err  error
}

func (f *failingReader) Read(p []byte) (int, error) {
	if len(f.data) == 0 {
		return 0, f.err
	}
	n := copy(p, f.data)
	f.data = f.data[n:]
	return n, nil
}

// sameDecoding decodes body with both decoders and reports a difference.
func sameDecoding(body []byte, maxBody int64, maxDocs int, fail error) string {
	reader := func() io.Reader {
		if fail != nil {
			return &failingReader{data: body, err: fail}
		}
		return bytes.NewReader(body)
	}
	want, werr := referenceDecodeRequest(reader(), maxBody, maxDocs)
	got, gerr := DecodeRequest(reader(), maxBody, maxDocs)
	switch {
	case werr != nil && gerr != nil:
		we, ge := werr.(*RequestError), gerr.(*RequestError)
		if ge == nil || we.Status != ge.Status || we.Kind != ge.Kind || ge.Msg == "" {
			return fmt.Sprintf("error %d %s %q, reference %d %s %q", ge.Status, ge.Kind, ge.Msg, we.Status, we.Kind, we.Msg)
		}
	case werr != nil:
		return fmt.Sprintf("accepted %s; reference: %v", show(got), werr)
	case gerr != nil:
		return fmt.Sprintf("refused (%v); reference accepts %s", gerr, show(want))
	case !reflect.DeepEqual(got, want):
		return fmt.Sprintf("got %s, reference %s", show(got), show(want))
	}
	return ""
}

func show(r *EncodeRequest) string {
	if r.Documents == nil {
		return "documents nil"
	}
	var b strings.Builder
	fmt.Fprintf(&b, "%d documents:", len(r.Documents))
	for _, d := range r.Documents {
		fmt.Fprintf(&b, " {id %q", d.ID)
		if d.Text != nil {
			fmt.Fprintf(&b, " text %q", *d.Text)
		}
		if d.Fields != nil {
			fmt.Fprintf(&b, " fields %q", d.Fields)
		}
		b.WriteString("}")
	}
	return b.String()
}

// Cases where encoding/json's reading of RFC 8259 has a subtle answer;
// each is compared with the reference decoder, and the results that
// matter to the encoder are also spelled out.
var decodeCases = []string{
	// Escapes of RFC 8259 section 7, surrogate pairs, lone surrogates.
	`{"documents":[{"id":"\"\\\/\b\f\n\r\t","text":"\u00e9\u00E9 \ud83d\ude00 \uD83D\uDE00"}]}`,
	`{"documents":[{"text":"\ud800"},{"text":"\udc00x"},{"text":"\ud800\u0041"},{"text":"\ud800\ud800\udc00"},{"text":"\ud800\\"}]}`,
	`{"documents":[{"text":"\u0000\u001f\u007f"}]}`,
	// Invalid UTF-8: each bad byte becomes U+FFFD.
	"{\"documents\":[{\"id\":\"\xff\",\"text\":\"a\xe2\x82\"},{\"text\":\"\xed\xa0\x80 \xc0\xaf \xef\xbf\xbd\"}]}",
	// Duplicate keys: the last wins; lists and maps are decoded into what
	// an earlier occurrence left.
	`{"documents":[{"text":"x","text":"y","id":"a","id":null}]}`,
	`{"documents":[{"text":"x","text":null}]}`,
	`{"documents":[{"id":"a","text":"x"},{"id":"b"}],"documents":[{"text":"y"}]}`,
	`{"documents":[{"id":"a"},{"id":"b"},{"id":"c"}],"documents":[{}],"documents":[null,null,null,null]}`,
	`{"documents":[{"id":"a"}],"documents":[],"documents":[null]}`,
	`{"documents":[{"id":"a"}],"documents":null,"documents":[null]}`,
	`{"documents":[{"fields":{"a":"1","b":"2"},"fields":{"b":"3","c":null}}]}`,
	`{"documents":[{"fields":{"a":"1"},"fields":null}]}`,
	`{"documents":[{"fields":{}}]}`,
	`{"documents":[{"fields":{"\u0061":"x","a":"y"}}]}`,
	// Keys match struct fields case-insensitively, Unicode folding too
	// (K is U+212A KELVIN SIGN, ſ U+017F LATIN SMALL LETTER LONG S).
	`{"Documents":[{"ID":"a","TEXT":"x"}],"DOCUMENTS":[{"Fields":{"Text":"y"}}]}`,
	"{\"document\u017f\":[{\"text\":\"x\"}]}",
	"{\"documents\":[{\"\u212a\":1}]}",
	`{"documents":[{"t\u0065xt":"x"}]}`,
	// Numbers, booleans and other values where strings are expected.
	`{"documents":[{"text":5}]}`,
	`{"documents":[{"id":true,"text":"x"}]}`,
	`{"documents":[{"fields":{"a":1}}]}`,
	`{"documents":[{"fields":[]}]}`,
	`{"documents":["x"]}`,
	`{"documents":{}}`,
	`{"documents":1e5}`,
	`{"documents":[{"text":"x","note":"y"}]}`,
	`{"docs":[]}`,
	// Top level.
	``, ` `, `null`, ` null `, `[]`, `"x"`, `5`, `-`, `true`, `{}`, `{"documents":[]}`, `{"documents":null}`,
	`{"documents":[]} `, `{"documents":[]} {}`, `{"documents":[]}x`, `{"documents":[]}]`, "\ufeff{\"documents\":[]}",
	// Syntax.
	`{"documents":[,]}`, `{"documents":[{},]}`, `{"documents":[{"text":"x",}]}`, `{"documents":[{"text" "x"}]}`,
	`{"documents":[{"text":"x"}`, `{"documents":[{"text":"x`, `{"documents":[{"text":"x\`, `{"documents":[{"text":"x\u12`,
	`{"documents":[{"text":"\x"}]}`, `{"documents":[{"text":"\u12g4"}]}`, "{\"documents\":[{\"text\":\"a\tb\"}]}",
	`{"documents":[{"text":"x","n":01}]}`, `{"documents":[{"text":"x","n":-}]}`, `{"documents":[{"text":"x","n":1.}]}`,
	`{"documents":[{"text":"x","n":1.5e+3}]}`, `{"documents":[{"text":"x","n":[1,{"a":[true,false,null]}]}]}`,
	`{"documents":[{"text":"x","n":tru}]}`, `{"documents":[{"text":"x","n":nul}]}`, `{"documents":[nulL]}`,
	` {"documents" : [ { "id" : "a" , "text" : "b" } ] } ` + "\n\r\t",
	`{"documents":[{"text":"a"},{"text":"b"},{"text":"c"},{"text":"d"},{"text":"e"}]}`,
	`{"documents":[{"text":"a"},{"text":"b"},{"text":"c"},{"text":"d"},{"text":"e"}],"documents":[{"id":"x"}]}`,
	strings.Repeat("[", 10001) + strings.Repeat("]", 10001),
	`{"documents":` + strings.Repeat("[", 9999) + strings.Repeat("]", 9999) + `}`,
	`{"documents":` + strings.Repeat("[", 10000) + strings.Repeat("]", 10000) + `}`,
}

func TestDecodeMatchesReference(t *testing.T) {
	for _, c := range decodeCases {
		for _, lim := range []struct {
			body int64
			docs int
		}{{0, 0}, {1 << 20, 4}, {int64(len(c)), 3}, {int64(len(c)) - 1, 0}, {12, 0}} {
			if msg := sameDecoding([]byte(c), lim.body, lim.docs, nil); msg != "" {
				t.Errorf("%.80q (limits %d bytes, %d documents): %s", c, lim.body, lim.docs, msg)
			}
		}
		for _, cut := range []int{0, len(c) / 2, len(c)} {
			for _, e := range []error{errors.New("connection reset"), &http.MaxBytesError{Limit: 1}} {
				if msg := sameDecoding([]byte(c[:cut]), 0, 0, e); msg != "" {
					t.Errorf("%.80q cut at %d with %v: %s", c, cut, e, msg)
				}
			}
		}
	}
}

// The results that matter to the encoder, spelled out: these are what
// encoding/json gives (checked above against it) and what RFC 8259
// section 7 and Unicode's U+FFFD substitution say.
func TestDecodeValues(t *testing.T) {
	decode := func(s string) *EncodeRequest {
		t.Helper()
		req, err := DecodeRequest(strings.NewReader(s), 0, 0)
		if err != nil {
			t.Fatalf("%q: %v", s, err)
		}
		return req
	}
	req := decode(decodeCases[0])
	if d := req.Documents[0]; d.ID != "\"\\/\b\f\n\r\t" || *d.Text != "éé 😀 😀" {
		t.Errorf("escapes: id %q text %q", d.ID, *d.Text)
	}
	req = decode(decodeCases[1])
	for i, want := range []string{"\ufffd", "\ufffdx", "\ufffdA", "\ufffd\U00010000", "\ufffd\\"} {
		if got := *req.Documents[i].Text; got != want {
			t.Errorf("lone surrogate %d: %q, want %q", i, got, want)
		}
	}
	req = decode(decodeCases[3])
	if d := req.Documents; d[0].ID != "\ufffd" || *d[0].Text != "a\ufffd\ufffd" || *d[1].Text != "\ufffd\ufffd\ufffd \ufffd\ufffd \ufffd" {
		t.Errorf("invalid UTF-8: %s", show(req))
	}
	req = decode(decodeCases[6])
	if d := req.Documents; len(d) != 1 || d[0].ID != "a" || *d[0].Text != "y" {
		t.Errorf("repeated documents list: %s", show(req))
	}
	req = decode(decodeCases[10])
	if f := req.Documents[0].Fields; len(f) != 3 || f["a"] != "1" || f["b"] != "3" || f["c"] != "" {
		t.Errorf("repeated fields: %q", f)
	}
	for _, s := range []string{`{"documents":[{"text":5}]}`, `{"documents":[{"id":5,"text":"x"}]}`, `{"documents":[{"fields":{"a":true}}]}`} {
		if _, err := DecodeRequest(strings.NewReader(s), 0, 0); err == nil || !strings.Contains(err.Error(), "must be a string") {
			t.Errorf("%s: %v, want a string required", s, err)
		}
	}
}

// Bodies over the limit are refused as encoding/json's Decoder refused
// them: a syntax error or a complete request of the wrong shape inside the
// first maxBody bytes is malformed (400), anything else too large (413).
func TestDecodeLimitEdges(t *testing.T) {
	for _, c := range []struct {
		body string
		max  int64
		want int
	}{
		{`{"documents":[]}`, 16, 0},
		{`{"documents":[]} `, 16, 413},
		{`{"documents":[]}x`, 16, 413},
		{`{"documents":[]}` + "  x", 18, 413},
		{`{"documents":[]}` + "  x", 19, 400},
		{`{"documents":[]}` + "0", 17, 400},
		{`{"documents":[]}` + "0 ", 17, 413},
		{`{"documents":[]}` + "{", 17, 400},
		{`{"docs":[]}` + strings.Repeat(" ", 100), 20, 400},
		{`{"documents":[x` + strings.Repeat(" ", 100), 20, 400},
		{`{"documents":[{"text":"` + strings.Repeat("a", 100) + `"}]}`, 20, 413},
		{`5 `, 1, 413},
		{`5 `, 2, 400},
		{`null `, 4, 413},
		{`null  `, 5, 413},
		{`null`, 4, 400},
	} {
		_, err := DecodeRequest(strings.NewReader(c.body), c.max, 0)
		got := 0
		if err != nil {
			got = err.(*RequestError).Status
		}
		if got != c.want {
			t.Errorf("%.40q limit %d: status %d (%v), want %d", c.body, c.max, got, err, c.want)
		}
		if msg := sameDecoding([]byte(c.body), c.max, 0, nil); msg != "" {
			t.Errorf("%.40q limit %d: %s", c.body, c.max, msg)
		}
	}
}

// FuzzDecodeMatchesReference: on any bytes, with and without limits and
// with a read error at the end, DecodeRequest gives the reference decoder's
// request or an error of the same status and kind.
func FuzzDecodeMatchesReference(f *testing.F) {
	for _, s := range append(append([]string{}, fuzzSeeds...), decodeCases...) {
		if len(s) < 4096 {
			f.Add([]byte(s), uint16(0), uint8(0), false)
			f.Add([]byte(s), uint16(len(s)/2+1), uint8(2), false)
			f.Add([]byte(s), uint16(0), uint8(0), true)
		}
	}
	f.Fuzz(func(t *testing.T, data []byte, maxBody uint16, maxDocs uint8, fail bool) {
		var e error
		if fail {
			e = errors.New("connection reset")
		}
		if msg := sameDecoding(data, int64(maxBody), int(maxDocs), e); msg != "" {
			t.Fatalf("%q (limits %d bytes, %d documents, read error %v): %s", data, maxBody, maxDocs, fail, msg)
		}
		if req, err := DecodeRequest(bytes.NewReader(data), int64(maxBody), int(maxDocs)); err == nil {
			for _, d := range req.Documents {
				if !utf8.ValidString(d.ID) || d.Text != nil && !utf8.ValidString(*d.Text) {
					t.Fatalf("invalid UTF-8 in %s", show(req))
				}
			}
		}
	})
}

// A request of text documents takes a fixed number of allocations,
// whatever the number of documents: the documents, their texts and one
// string holding every id and text (buffers come from a pool).
func TestDecodeAllocations(t *testing.T) {
	for _, n := range []int{1, 100, 1000} {
		var b bytes.Buffer
		b.WriteString(`{"documents":[`)
		for i := 0; i < n; i++ {
			if i > 0 {
				b.WriteByte(',')
			}
			fmt.Fprintf(&b, `{"id":"pw-%d","text":"Dock %d at Quill Square would not release my bike \u2014 twice."}`, i, i)
		}
		b.WriteString(`]}`)
		body := b.Bytes()
		DecodeRequest(bytes.NewReader(body), 0, 0) // fill the pool
		allocs := testing.AllocsPerRun(50, func() {
			req, err := DecodeRequest(bytes.NewReader(body), 0, 0)
			if err != nil || len(req.Documents) != n {
				t.Fatal(err)
			}
		})
		// EncodeRequest, its documents, the texts, the strings, and the
		// bytes.Reader.
		if allocs > 5 {
			t.Errorf("%d documents: %.1f allocations per request, want at most 5", n, allocs)
		}
	}
}

// The error messages clients see, to the letter: positions are byte
// offsets into the body, and each was written by the decoder before it
// moved to internal/jsonscan. (The reference decoder above agrees on
// status and kind only: encoding/json words and places errors otherwise.)
func TestDecodeErrorMessages(t *testing.T) {
	for _, c := range []struct {
		body   string
		max    int64
		status int
		msg    string
	}{
		{`{"documents":[{"text":"x"}`, 0, 400, `malformed JSON: body ends early`},
		{`{"documents":[]`, 0, 400, `malformed JSON: body ends early`},
		{` `, 0, 400, `malformed JSON: empty body`},
		{`documents=1`, 0, 400, `malformed JSON at byte 0: invalid character 'd' looking for the beginning of a value`},
		{`{"documents":[{"text":5}]}`, 0, 400, `malformed request: documents[0].text must be a string, not number (byte 22)`},
		{`{"documents":[{"id":"a","fields":{"t":[1]}}]}`, 0, 400, `malformed request: documents[0].fields["t"] must be a string, not array (byte 38)`},
		{`{"documents":{}}`, 0, 400, `malformed request: documents must be a list, not object (byte 13)`},
		{`{"docs":[],"documents":[]}`, 0, 400, `malformed request: unknown field "docs" in the request (byte 8)`},
		{`[]`, 0, 400, `malformed request: the request must be an object, not array (byte 0)`},
		{`{"documents":[{"text":"x",}]}`, 0, 400, `malformed JSON at byte 26: invalid character '}' looking for the beginning of an object key`},
		{`{"documents":[{"text" "x"}]}`, 0, 400, `malformed JSON at byte 22: invalid character '"' after an object key`},
		{`{"documents":[{"text":"x"} {}]}`, 0, 400, `malformed JSON at byte 27: invalid character '{' after a list element`},
		{`{"documents":[{"text":"x" "id":"y"}]}`, 0, 400, `malformed JSON at byte 26: invalid character '"' after an object value`},
		{"{\"documents\":[{\"text\":\"a\tb\"}]}", 0, 400, `malformed JSON at byte 24: invalid character '\t' in a string (control characters must be escaped)`},
		{`{"documents":[{"text":"\x"}]}`, 0, 400, `malformed JSON at byte 24: invalid character 'x' in a string escape`},
		{`{"documents":[{"text":"\u12g4"}]}`, 0, 400, `malformed JSON at byte 27: invalid character 'g' in a \u escape`},
		{`{"documents":[{"text":"x","n":-x}]}`, 0, 400, `malformed JSON at byte 31: invalid character 'x' in a number`},
		{`{"documents":[nulL]}`, 0, 400, `malformed JSON at byte 17: invalid character 'L' in a literal`},
		{`{"documents":` + strings.Repeat("[", 10000) + strings.Repeat("]", 10000) + `}`, 0, 400, `malformed JSON at byte 10012: invalid character '[' nested too deep`},
		{`{"documents":[]}x`, 0, 400, `malformed JSON: data after the request object`},
		{`{"documents":[]}x`, 16, 413, `request body larger than 16 bytes`},
		{`{"documents":[{"text":"a"},{"text":"b"}]}`, 20, 413, `request body larger than 20 bytes`},
	} {
		_, err := DecodeRequest(strings.NewReader(c.body), c.max, 0)
		var re *RequestError
		if !errors.As(err, &re) || re.Status != c.status || re.Msg != c.msg {
			t.Errorf("%.40q: %v, want %d %s", c.body, err, c.status, c.msg)
		}
	}
}
