// Package serve answers HTTP requests that encode documents with a frozen
// spec, with metrics, limits and safe reload.
//
// The endpoints:
//
//	POST /v1/encode  {"documents":[{"id":"a1","text":"..."}]}
//	                 or {"documents":[{"id":"a1","fields":{"title":"...","body":"..."}}]}
//	                 → {"spec":"sha256:…","rows":[{"id":"a1","indices":[3,17],"values":[1,2],"unseen":0,"features":3}]}
//	GET  /v1/spec    the spec in force: fingerprint, mode, size, settings
//	GET  /healthz    {"status":"ok","spec":"sha256:…"}
//	GET  /metrics    counters in the Prometheus text exposition format 0.0.4
//
// Row indices are 1-based, as "bowline encode" writes them by default, and
// values are in shortest round-trip form, so a row parses to exactly the
// numbers encode writes for the same text. Every error is a JSON object
// {"error":"message"} with status 400 (malformed request), 404 (unknown
// path), 405 (wrong method), 413 (body or document count over the limit),
// 415 (not application/json) or 422 (a document without its text, or with
// a table-field value that cannot be read).
//
// A spec with table fields (categories, numbers, timestamps beside the
// text) takes their values as strings in "fields", next to the text
// fields: {"fields":{"text":"...","zone":"harbour","age":"34"}}; a table
// field left out or empty is missing.
//
// Reload swaps in a new spec atomically: a request is answered entirely
// with the spec in force when it started, and a spec that fails to load
// leaves the old one in force.
package serve

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"log/slog"
	"net/http"
	"runtime"
	"strconv"
	"strings"
	"sync"
	"sync/atomic"
	"time"

	"github.com/bowline/bowline"
)

// Default limits.
const (
	DefaultMaxBody      = 8 << 20 // bytes of request body
	DefaultMaxDocuments = 1000    // documents per request
)

// IndexBase is the number of the first column in responses, the default
// of "bowline encode".
const IndexBase = 1

// Options configure a Handler.
type Options struct {
	// MaxBody is the largest request body accepted, in bytes
	// (0: DefaultMaxBody).
	MaxBody int64
	// MaxDocuments is the most documents one request may carry
	// (0: DefaultMaxDocuments).
	MaxDocuments int
	// Logger receives the structured logs (nil: none).
	Logger *slog.Logger
}

// A Handler answers the HTTP endpoints with the spec in force.
type Handler struct {
	cur     atomic.Pointer[loaded]
	opts    Options
	log     *slog.Logger
	metrics Metrics
	reload  sync.Mutex // one reload at a time
	bufs    sync.Pool  // *[]byte response buffers
}

// loaded is a spec in force with the answers that only depend on it.
type loaded struct {
	enc      *bowline.Encoder
	specJSON []byte
	health   []byte
	at       time.Time
}

// New returns a Handler that encodes with enc.
func New(enc *bowline.Encoder, o Options) (*Handler, error) {
	if o.MaxBody <= 0 {
		o.MaxBody = DefaultMaxBody
	}
	if o.MaxDocuments <= 0 {
		o.MaxDocuments = DefaultMaxDocuments
	}
	h := &Handler{opts: o, log: o.Logger}
	if h.log == nil {
		h.log = slog.New(slog.DiscardHandler)
	}
	l, err := newLoaded(enc)
	if err != nil {
		return nil, err
	}
	h.cur.Store(l)
	h.metrics.setSpec(enc.Fingerprint(), l.at)
	return h, nil
}

// Open loads the spec file at path and returns a Handler for it.
func Open(path string, o Options) (*Handler, error) {
	enc, err := bowline.Load(path)
	if err != nil {
		return nil, err
	}
	return New(enc, o)
}

// Encoder returns the encoder in force.
func (h *Handler) Encoder() *bowline.Encoder { return h.cur.Load().enc }

// Metrics returns the handler's counters.
func (h *Handler) Metrics() *Metrics { return &h.metrics }

// Reload loads the spec file at path, checks it, and only then puts it in
// force for every request that starts afterwards; requests already running
// finish with the old spec. When the file is refused the old spec stays in
// force, the failure is logged and counted, and the error returned.
func (h *Handler) Reload(path string) error {
	h.reload.Lock()
	defer h.reload.Unlock()
	old := h.cur.Load().enc.Fingerprint()
	fail := func(err error) error {
		h.metrics.reloadsNo.Add(1)
		h.log.Error("spec reload failed; the old spec stays in force", "path", path, "error", err.Error(), "spec", old)
		return err
	}
	enc, err := bowline.Load(path)
	if err != nil {
		return fail(err)
	}
	l, err := newLoaded(enc)
	if err != nil {
		return fail(err)
	}
	h.cur.Store(l)
	h.metrics.setSpec(enc.Fingerprint(), l.at)
	h.metrics.reloadsOK.Add(1)
	h.log.Info("spec reloaded", "path", path, "spec", enc.Fingerprint(), "previous", old, "changed", old != enc.Fingerprint())
	return nil
}

func newLoaded(enc *bowline.Encoder) (*loaded, error) {
	sj, err := specDocument(enc)
	if err != nil {
		return nil, err
	}
	health, _ := json.Marshal(map[string]string{"status": "ok", "spec": enc.Fingerprint()})
	return &loaded{enc: enc, specJSON: append(sj, '\n'), health: append(health, '\n'), at: time.Now()}, nil
}

// specDocument is the GET /v1/spec answer: the spec's content without the
// learned per-column arrays (vocabulary keys, their orders and document
// counts, idf values), which can be large and are what "bowline inspect"
// is for.
func specDocument(enc *bowline.Encoder) ([]byte, error) {
	s := enc.Spec()
	raw, err := json.Marshal(&s.Content)
	if err != nil {
		return nil, err
	}
	var settings map[string]any
	dec := json.NewDecoder(bytes.NewReader(raw))
	dec.UseNumber() // keep 64-bit seeds exact
	if err := dec.Decode(&settings); err != nil {
		return nil, err
	}
	terms := 0
	if v, ok := settings["vocabulary"].(map[string]any); ok {
		if s.Content.Vocabulary != nil {
			terms = len(s.Content.Vocabulary.Keys)
		}
		for _, k := range []string{"keys", "orders", "doc_counts", "retired"} {
			delete(v, k)
		}
	}
	if w, ok := settings["weights"].(map[string]any); ok {
		for _, k := range []string{"idf_values", "idf_buckets", "idf_bucket_values"} {
			delete(w, k)
		}
	}
	doc := struct {
		Fingerprint string         `json:"fingerprint"`
		Parent      string         `json:"parent,omitempty"`
		Tool        string         `json:"tool"`
		Mode        string         `json:"mode"`
		Columns     int            `json:"columns"`
		Terms       int            `json:"terms"`
		Fields      []string       `json:"fields"`
		IndexBase   int            `json:"index_base"`
		Settings    map[string]any `json:"settings"`
	}{s.Fingerprint, s.Parent, s.Tool, string(s.Content.Mode), enc.Columns(), terms, enc.Fields(), IndexBase, settings}
	return json.Marshal(&doc)
}

// ServeHTTP answers one request.
func (h *Handler) ServeHTTP(w http.ResponseWriter, r *http.Request) {
	start := time.Now()
	h.metrics.inFlight.Add(1)
	defer h.metrics.inFlight.Add(-1)
	path := r.URL.Path
	var code int
	var docs int
	var rerr *RequestError
	defer func() {
		if p := recover(); p != nil {
			if p == http.ErrAbortHandler {
				panic(p)
			}
			buf := make([]byte, 4096)
			buf = buf[:runtime.Stack(buf, false)]
			h.log.Error("panic while answering", "path", path, "panic", fmt.Sprint(p), "stack", string(buf))
			rerr = requestErrorf(http.StatusInternalServerError, "internal", "internal error")
			code = h.writeError(w, rerr)
		}
		h.metrics.request(path, code)
		d := time.Since(start)
		if path == "/v1/encode" && r.Method == http.MethodPost {
			h.metrics.observe(d)
		}
		if rerr != nil {
			level := slog.LevelWarn
			if code >= 500 {
				level = slog.LevelError
			}
			h.log.Log(r.Context(), level, "request refused", "method", r.Method, "path", path, "code", code, "kind", rerr.Kind, "error", rerr.Msg, "remote", r.RemoteAddr, "ms", msec(d))
		} else {
			h.log.Debug("request", "method", r.Method, "path", path, "code", code, "documents", docs, "ms", msec(d))
		}
	}()

	switch path {
	case "/v1/encode":
		if r.Method != http.MethodPost {
			w.Header().Set("Allow", "POST")
			rerr = requestErrorf(http.StatusMethodNotAllowed, "method", "%s %s: use POST", r.Method, path)
			break
		}
		code, docs, rerr = h.encode(w, r)
		return
	case "/v1/spec", "/healthz", "/metrics":
		if r.Method != http.MethodGet && r.Method != http.MethodHead {
			w.Header().Set("Allow", "GET, HEAD")
			rerr = requestErrorf(http.StatusMethodNotAllowed, "method", "%s %s: use GET", r.Method, path)
			break
		}
		cur := h.cur.Load()
		switch path {
		case "/v1/spec":
			code = writeJSON(w, http.StatusOK, cur.specJSON)
		case "/healthz":
			code = writeJSON(w, http.StatusOK, cur.health)
		case "/metrics":
			w.Header().Set("Content-Type", "text/plain; version=0.0.4; charset=utf-8")
			w.WriteHeader(http.StatusOK)
			code = http.StatusOK
			h.metrics.WriteTo(w)
		}
		return
	default:
		rerr = requestErrorf(http.StatusNotFound, "not_found", "no endpoint %s (try POST /v1/encode, GET /v1/spec, GET /healthz, GET /metrics)", path)
	}
	code = h.writeError(w, rerr)
}

func msec(d time.Duration) float64 { return float64(d.Microseconds()) / 1e3 }

func writeJSON(w http.ResponseWriter, code int, body []byte) int {
	w.Header().Set("Content-Type", "application/json")
	w.Header().Set("Content-Length", strconv.Itoa(len(body)))
	w.WriteHeader(code)
	w.Write(body)
	return code
}

func (h *Handler) writeError(w http.ResponseWriter, e *RequestError) int {
	h.metrics.error(e.Kind)
	body, _ := json.Marshal(map[string]string{"error": e.Msg})
	if e.Status == http.StatusRequestEntityTooLarge {
		// The rest of an oversized body is not read: end the connection.
		w.Header().Set("Connection", "close")
	}
	return writeJSON(w, e.Status, append(body, '\n'))
}

// parallelMin is the document count from which one request is encoded by
// several goroutines.
const parallelMin = 32

func (h *Handler) encode(w http.ResponseWriter, r *http.Request) (int, int, *RequestError) {
	fail := func(e *RequestError) (int, int, *RequestError) { return h.writeError(w, e), 0, e }
	if r.ContentLength > h.opts.MaxBody {
		return fail(tooLarge(h.opts.MaxBody))
	}
	if e := checkContentType(r.Header.Get("Content-Type")); e != nil {
		return fail(e)
	}
	req, err := DecodeRequest(r.Body, h.opts.MaxBody, h.opts.MaxDocuments)
	if err != nil {
		var e *RequestError
		if !errors.As(err, &e) {
			e = requestErrorf(http.StatusBadRequest, "malformed", "%v", err)
		}
		return fail(e)
	}
	cur := h.cur.Load() // one spec for the whole request
	enc := cur.enc
	rows := make([]rowOut, len(req.Documents))
	// Check every document before encoding any.
	texts := make([][][]byte, len(req.Documents))
	for i := range req.Documents {
		d, err := toDocument(enc, &req.Documents[i])
		if err == nil {
			texts[i], err = enc.Texts(d)
		}
		if err != nil {
			return fail(requestErrorf(http.StatusUnprocessableEntity, "no_text", "documents[%d]: %v", i, err))
		}
	}
	// A table-field value that cannot be read (not a number, not a time)
	// is found while encoding; the first one, by document order, refuses
	// the whole request.
	var bad []error
	if len(enc.TableFields()) > 0 {
		bad = make([]error, len(texts))
	}
	encodeRange := func(lo, hi int) {
		for i := lo; i < hi; i++ {
			row, err := enc.EncodeTexts(req.Documents[i].ID, texts[i]) // text fields checked above
			if err != nil && bad != nil {
				bad[i] = err
			}
			rows[i] = rowOut{id: row.ID, indices: row.Indices, values: row.Values, unseen: row.Unseen, features: row.Features}
		}
	}
	if n := len(texts); n >= parallelMin && runtime.GOMAXPROCS(0) > 1 {
		parts := min(runtime.GOMAXPROCS(0), n/(parallelMin/2))
		var wg sync.WaitGroup
		for p := 0; p < parts; p++ {
			lo, hi := p*n/parts, (p+1)*n/parts
			wg.Add(1)
			go func() { defer wg.Done(); encodeRange(lo, hi) }()
		}
		wg.Wait()
	} else {
		encodeRange(0, len(texts))
	}
	for i, err := range bad {
		if err != nil {
			return fail(requestErrorf(http.StatusUnprocessableEntity, "bad_value", "documents[%d]: %v", i, err))
		}
	}
	var features, unseen uint64
	for i := range rows {
		features += uint64(rows[i].features)
		unseen += uint64(rows[i].unseen)
	}
	h.metrics.documents.Add(uint64(len(rows)))
	h.metrics.features.Add(features)
	h.metrics.unseen.Add(unseen)

	bp, _ := h.bufs.Get().(*[]byte)
	if bp == nil {
		bp = new([]byte)
	}
	body := appendResponse((*bp)[:0], enc.Fingerprint(), rows, IndexBase)
	code := writeJSON(w, http.StatusOK, body)
	if cap(body) <= 4<<20 { // do not keep huge buffers
		*bp = body
		h.bufs.Put(bp)
	}
	return code, len(rows), nil
}

// toDocument turns a request document into a library Document. A "text"
// present but empty is an empty text (an empty row, as "bowline encode"
// gives an empty record); an absent one is a document without text.
func toDocument(enc *bowline.Encoder, wd *WireDocument) (bowline.Document, error) {
	d := bowline.Document{ID: wd.ID, Fields: wd.Fields}
	switch {
	case wd.Text == nil && len(wd.Fields) == 0:
		reason := "no text"
		if f := enc.Fields(); len(f) > 1 {
			reason = fmt.Sprintf("no text: give the fields %s", strings.Join(f, ", "))
		}
		return d, &bowline.DocumentError{ID: wd.ID, Reason: reason}
	case wd.Text == nil:
		return d, nil
	case wd.Fields != nil:
		return d, &bowline.DocumentError{ID: wd.ID, Reason: "both text and fields given; give one"}
	}
	d.Text = *wd.Text
	if d.Text == "" && len(enc.Fields()) > 1 {
		return d, &bowline.DocumentError{ID: wd.ID, Reason: fmt.Sprintf("the spec has %d text fields (%s); give them by name in fields", len(enc.Fields()), strings.Join(enc.Fields(), ", "))}
	}
	return d, nil
}

// Timeouts bound the time spent on one connection.
type Timeouts struct {
	// Read bounds reading a whole request, headers and body.
	Read time.Duration
	// Write bounds the time from the end of the request headers to the
	// end of the response.
	Write time.Duration
	// Idle bounds the wait for the next request on a kept-alive
	// connection.
	Idle time.Duration
}

// DefaultTimeouts are the timeouts of "bowline serve".
var DefaultTimeouts = Timeouts{Read: 10 * time.Second, Write: 30 * time.Second, Idle: 2 * time.Minute}

// NewServer returns an http.Server for h at addr with the given timeouts;
// the server's own errors go to log (nil: none).
func NewServer(addr string, h http.Handler, t Timeouts, log *slog.Logger) *http.Server {
	if log == nil {
		log = slog.New(slog.DiscardHandler)
	}
	header := t.Read
	if header <= 0 || header > 5*time.Second {
		header = 5 * time.Second
	}
	return &http.Server{
		Addr:              addr,
		Handler:           h,
		ReadHeaderTimeout: header,
		ReadTimeout:       t.Read,
		WriteTimeout:      t.Write,
		IdleTimeout:       t.Idle,
		MaxHeaderBytes:    64 << 10,
		ErrorLog:          slog.NewLogLogger(log.Handler(), slog.LevelWarn),
	}
}
