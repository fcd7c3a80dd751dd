package vocab

import (
	"bufio"
	"bytes"
	"compress/gzip"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"strconv"
)

// Count shards.
//
// A count shard holds the exact counts of one part of a corpus, before any
// cutoff, so that parts counted apart (on other machines, by other
// processes, by a distributed job) can be merged into the counts of the
// whole. Shards merged together must come from disjoint sets of documents.
//
// File format, version 1: a gzip stream (RFC 1952) of UTF-8 JSON lines.
//
//	line 1:      the header, a JSON object (ShardHeader):
//	             {"format":"bowline-counts","version":1,"tool":"bowline 0.1.0",
//	              "settings":{...},"docs":N,"keys":K,
//	              "label_values":["a","b"],"label_counts":[3,4]}
//	lines 2..K+1: one key each, a JSON array [key, order, count, docs]:
//	             ["dock",1,412,380]
//	             key is the feature key (a JSON string), order its n-gram order
//	             code (bowline: 1..16 word n-grams, 101..132 character
//	             n-grams), count its occurrences and docs the documents holding
//	             it (1 <= docs <= count, docs <= N). Keys are unique and in
//	             strictly ascending byte order.
//	last line:   {"end":K}, so that a file cut at a line boundary is refused.
//
// "settings" is opaque to this package: bowline stores the spec content
// the counts were made under (every setting, no learned number), and
// refuses to merge shards whose settings differ. "docs" counts every
// document of the part, including those that produced no key. Label
// values (sorted by bytes) and their document counts are summed when
// shards merge. A reader refuses a newer version. Any program can write
// shards: one per worker of a distributed job is the intended use.

// Shard format name and version written in every header.
const (
	ShardFormat  = "bowline-counts"
	ShardVersion = 1
)

// ShardHeader is the first line of a count shard.
type ShardHeader struct {
	Format  string `json:"format"`
	Version int    `json:"version"`
	// Tool names the program that wrote the shard.
	Tool string `json:"tool"`
	// Settings are the settings the counts were made under (opaque here).
	Settings json.RawMessage `json:"settings"`
	// Docs is the number of documents counted.
	Docs int64 `json:"docs"`
	// Keys is the number of key lines that follow.
	Keys int64 `json:"keys"`
	// LabelValues and LabelCounts are parallel: each distinct label
	// value, sorted by bytes, and the documents carrying it.
	LabelValues []string `json:"label_values,omitempty"`
	LabelCounts []int64  `json:"label_counts,omitempty"`
}

type shardEnd struct {
	End *int64 `json:"end"`
}

// WriteShard writes c as a count shard. It fills h.Format, h.Version,
// h.Docs and h.Keys from c; the other fields are the caller's. c must have
// no unfinished document and must not be bounded (a shard holds exact
// counts).
func WriteShard(w io.Writer, h ShardHeader, c *Counts) error {
	if c.b != nil {
		return errors.New("vocab: a bounded Counts cannot be written as a shard: its counts are not exact")
	}
	if c.open {
		return errors.New("vocab: shard of a Counts with an unfinished document")
	}
	if len(h.LabelValues) != len(h.LabelCounts) {
		return fmt.Errorf("vocab: %d label values but %d counts", len(h.LabelValues), len(h.LabelCounts))
	}
	h.Format, h.Version, h.Docs, h.Keys = ShardFormat, ShardVersion, c.ndocs, int64(len(c.keys))
	zw := gzip.NewWriter(w)
	bw := bufio.NewWriterSize(zw, 64<<10)
	head, err := json.Marshal(h)
	if err != nil {
		return err
	}
	bw.Write(head)
	bw.WriteByte('\n')
	var line []byte
	c.Each(func(key string, order int, count, docs int64) {
		q, _ := json.Marshal(key) // a string always marshals
		line = append(line[:0], '[')
		line = append(line, q...)
		line = append(line, ',')
		line = strconv.AppendInt(line, int64(order), 10)
		line = append(line, ',')
		line = strconv.AppendInt(line, count, 10)
		line = append(line, ',')
		line = strconv.AppendInt(line, docs, 10)
		line = append(line, "]\n"...)
		bw.Write(line)
	})
	fmt.Fprintf(bw, "{\"end\":%d}\n", len(c.keys))
	if err := bw.Flush(); err != nil {
		return err
	}
	return zw.Close()
}

// ShardError is a problem in a count shard, with its position.
type ShardError struct {
	File string
	Line int64 // 1-based line of the uncompressed JSON lines; 0 for the file as a whole
	Err  error
}

func (e *ShardError) Error() string {
	if e.Line == 0 {
		return fmt.Sprintf("count shard %s: %v", e.File, e.Err)
	}
	return fmt.Sprintf("count shard %s:%d: %v", e.File, e.Line, e.Err)
}

func (e *ShardError) Unwrap() error { return e.Err }

// ReadShard reads a count shard from r and merges its counts into into,
// as Merge would; name is used in errors. into may be bounded. The header
// is returned so the caller can check the settings and sum the labels; it
// is returned even when the counts are refused, when it could be read.
func ReadShard(r io.Reader, name string, into *Counts) (*ShardHeader, error) {
	fail := func(line int64, format string, a ...any) error {
		return &ShardError{File: name, Line: line, Err: fmt.Errorf(format, a...)}
	}
	zr, err := gzip.NewReader(r)
	if err != nil {
		return nil, fail(0, "not a gzip stream (%v)", err)
	}
	br := bufio.NewReaderSize(zr, 64<<10)
	var line int64
	next := func() ([]byte, error) {
		b, err := br.ReadSlice('\n')
		if err == bufio.ErrBufferFull {
			long := append([]byte(nil), b...)
			for err == bufio.ErrBufferFull {
				b, err = br.ReadSlice('\n')
				long = append(long, b...)
			}
			b = long
		}
		if err == io.EOF && len(b) > 0 {
			err = io.ErrUnexpectedEOF // a last line without its newline
		}
		if err != nil {
			return nil, err
		}
		line++
		return b, nil
	}
	b, err := next()
	if err != nil {
		return nil, fail(1, "no header: %v", err)
	}
	var h ShardHeader
	if err := json.Unmarshal(b, &h); err != nil || h.Format != ShardFormat {
		return nil, fail(1, "not a bowline count shard (header line is not {\"format\":%q,...})", ShardFormat)
	}
	if h.Version < 1 || h.Version > ShardVersion {
		return &h, fail(1, "shard version %d (written by %s); this bowline reads up to version %d", h.Version, h.Tool, ShardVersion)
	}
	if h.Docs < 0 || h.Keys < 0 || len(h.LabelValues) != len(h.LabelCounts) {
		return &h, fail(1, "header: docs %d, keys %d, %d label values for %d label counts", h.Docs, h.Keys, len(h.LabelValues), len(h.LabelCounts))
	}
	part := NewCounts()
	var prev string
	for i := int64(0); i < h.Keys; i++ {
		b, err := next()
		if err != nil {
			return &h, fail(line+1, "truncated: %d of %d keys read (%v)", i, h.Keys, err)
		}
		key, order, count, docs, err := parseShardLine(b)
		if err != nil {
			return &h, fail(line, "%v", err)
		}
		if i > 0 && key <= prev {
			return &h, fail(line, "key %q is not after %q: keys must be unique and in ascending byte order", key, prev)
		}
		if order < 1 || order > math32 || docs < 1 || count < docs || docs > h.Docs {
			return &h, fail(line, "key %q: order %d, count %d, docs %d break 1 <= docs <= count, docs <= %d documents", key, order, count, docs, h.Docs)
		}
		part.insert(key, int(order), count, docs, -1)
		prev = key
	}
	b, err = next()
	var end shardEnd
	if err != nil {
		return &h, fail(line+1, "truncated: no {\"end\":%d} line after the keys (%v)", h.Keys, err)
	}
	if json.Unmarshal(b, &end) != nil || end.End == nil || *end.End != h.Keys {
		return &h, fail(line, "damaged: %.40q where the {\"end\":%d} line belongs", b, h.Keys)
	}
	switch _, err := next(); {
	case err == nil:
		return &h, fail(line, "data after the end line")
	case err != io.EOF:
		return &h, fail(line+1, "damaged after the end line: %v", err)
	}
	if _, err := io.Copy(io.Discard, zr); err != nil {
		return &h, fail(0, "%v", err)
	}
	part.ndocs = h.Docs
	into.Merge(part)
	return &h, nil
}

const math32 = 1<<31 - 1

// parseShardLine parses ["key",order,count,docs].
func parseShardLine(b []byte) (key string, order, count, docs int64, err error) {
	b = bytes.TrimRight(b, "\r\n")
	var v [4]json.RawMessage
	if err = json.Unmarshal(b, &v); err != nil || v[3] == nil {
		return "", 0, 0, 0, fmt.Errorf("not a [key, order, count, docs] line: %.60q", b)
	}
	if err = json.Unmarshal(v[0], &key); err != nil {
		return "", 0, 0, 0, fmt.Errorf("key is not a JSON string: %.60q", v[0])
	}
	var n [3]int64
	for i := range n {
		if n[i], err = strconv.ParseInt(string(v[i+1]), 10, 64); err != nil {
			return "", 0, 0, 0, fmt.Errorf("key %q: field %d is not an integer: %.30q", key, i+2, v[i+1])
		}
	}
	return key, n[0], n[1], n[2], nil
}
