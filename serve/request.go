package serve

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"mime"
	"net/http"
	"strconv"
	"strings"
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

// DecodeRequest reads one JSON request body from r. It reads at most
// maxBody bytes (0: no limit) and accepts at most maxDocs documents
// (0: no limit). Errors are *RequestError values: 413 for a body or
// document list over its limit, 400 for anything that is not exactly one
// JSON object of the request's shape. A document without text is not an
// error here; the encoder finds it.
func DecodeRequest(r io.Reader, maxBody int64, maxDocs int) (*EncodeRequest, error) {
	lr := &limitReader{r: r, n: maxBody}
	if maxBody <= 0 {
		lr.n = -1
	}
	dec := json.NewDecoder(lr)
	dec.DisallowUnknownFields()
	var req EncodeRequest
	if err := dec.Decode(&req); err != nil {
		return nil, decodeError(err, lr, maxBody)
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

func tooLarge(maxBody int64) *RequestError {
	return requestErrorf(http.StatusRequestEntityTooLarge, "too_large", "request body larger than %d bytes", maxBody)
}

func decodeError(err error, lr *limitReader, maxBody int64) error {
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
		where := te.Field
		if where == "" {
			where = "the request"
		}
		return requestErrorf(http.StatusBadRequest, "malformed", "malformed request: %s must be %s, not %s", where, jsonKind(te.Type.Kind().String()), te.Value)
	}
	var ioErr interface{ Timeout() bool }
	if errors.As(err, &ioErr) {
		return requestErrorf(http.StatusBadRequest, "malformed", "reading the request body: %v", err)
	}
	if strings.HasPrefix(err.Error(), "json: unknown field") {
		return requestErrorf(http.StatusBadRequest, "malformed", "malformed request: %s", strings.TrimPrefix(err.Error(), "json: "))
	}
	return requestErrorf(http.StatusBadRequest, "malformed", "malformed request: %v", err)
}

func jsonKind(goKind string) string {
	switch goKind {
	case "string":
		return "a string"
	case "slice":
		return "a list"
	case "map", "struct", "ptr":
		return "an object"
	}
	return goKind
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
		// Probe one byte: at the limit exactly is fine, beyond is not.
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

// appendResponse appends the JSON response for rows encoded with the spec
// of the given fingerprint. Indices are written from base.
func appendResponse(dst []byte, fingerprint string, rows []rowOut, base int) []byte {
	dst = append(dst, `{"spec":`...)
	dst = appendJSONString(dst, fingerprint)
	dst = append(dst, `,"rows":[`...)
	for i := range rows {
		r := &rows[i]
		if i > 0 {
			dst = append(dst, ',')
		}
		dst = append(dst, `{"id":`...)
		dst = appendJSONString(dst, r.id)
		dst = append(dst, `,"indices":[`...)
		for j, c := range r.indices {
			if j > 0 {
				dst = append(dst, ',')
			}
			dst = strconv.AppendInt(dst, int64(c+base), 10)
		}
		dst = append(dst, `],"values":[`...)
		for j, v := range r.values {
			if j > 0 {
				dst = append(dst, ',')
			}
			// Shortest round-trip form, as the SVMlight writer uses; the
			// 'g' format is a valid JSON number for every finite value.
			dst = strconv.AppendFloat(dst, v, 'g', -1, 64)
		}
		dst = append(dst, `],"unseen":`...)
		dst = strconv.AppendInt(dst, int64(r.unseen), 10)
		dst = append(dst, `,"features":`...)
		dst = strconv.AppendInt(dst, int64(r.features), 10)
		dst = append(dst, '}')
	}
	dst = append(dst, "]}\n"...)
	return dst
}

type rowOut struct {
	id       string
	indices  []int
	values   []float64
	unseen   int
	features int
}

// appendJSONString appends s as a JSON string (RFC 8259 section 7).
func appendJSONString(dst []byte, s string) []byte {
	simple := true
	for i := 0; i < len(s); i++ {
		if c := s[i]; c < 0x20 || c == '"' || c == '\\' || c >= 0x80 || c == '<' || c == '>' || c == '&' {
			simple = false
			break
		}
	}
	if simple {
		dst = append(dst, '"')
		dst = append(dst, s...)
		return append(dst, '"')
	}
	var b bytes.Buffer
	enc := json.NewEncoder(&b)
	enc.SetEscapeHTML(false)
	enc.Encode(s) // a string always encodes
	return append(dst, bytes.TrimSuffix(b.Bytes(), []byte("\n"))...)
}
