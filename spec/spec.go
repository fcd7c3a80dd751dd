// Package spec is bowline's spec file: its schema, canonical form, fingerprint, reading and writing, and validation.
package spec

import (
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"strings"

	"github.com/bowline/bowline/ngram"
	"github.com/bowline/bowline/tokenize"
	"github.com/bowline/bowline/vocab"
	"github.com/bowline/bowline/weight"
)

// SchemaVersion is the version of the spec file layout this build writes and
// the newest it reads.
const SchemaVersion = 1

// ToolVersion is bowline's version, recorded in every spec it writes.
const ToolVersion = "0.1.0"

// Mode is how keys become columns: a learned vocabulary or a hashing
// space. In a spec file it is the word "vocabulary" or "hashing".
type Mode string

// The modes.
const (
	ModeVocabulary Mode = "vocabulary"
	ModeHashing    Mode = "hashing"
)

// MarshalText returns the mode's word; a mode other than the two (or
// unset, "") is an error.
func (m Mode) MarshalText() ([]byte, error) {
	if m != ModeVocabulary && m != ModeHashing && m != "" {
		return nil, fmt.Errorf("unknown mode %q (want %s or %s)", string(m), ModeVocabulary, ModeHashing)
	}
	return []byte(m), nil
}

// UnmarshalText reads "vocabulary" or "hashing" (or "", unset, which
// Validate refuses).
func (m *Mode) UnmarshalText(b []byte) error {
	v := Mode(b)
	if _, err := v.MarshalText(); err != nil {
		return err
	}
	*m = v
	return nil
}

// Spec is a frozen transformation from text to rows: every setting that
// changes a row and every number learned from the training corpus.
type Spec struct {
	// Fingerprint is "sha256:" and the hex SHA-256 of the canonical
	// encoding of Content (see Canonical). Set by Seal and checked by Load.
	Fingerprint string
	// Parent is the fingerprint of the spec this one extends, if any.
	Parent string
	// Tool is the bowline version that wrote the spec.
	Tool string
	// Content is everything that changes a row.
	Content Content

	// canon is the canonical encoding Seal hashed, which Write reuses;
	// Seal again after changing Content.
	canon []byte
}

// Content is the fingerprinted part of a spec.
type Content struct {
	// Input holds the corpus field names used at learn time; later runs
	// use them as defaults.
	Input Input `json:"input"`
	// Tokens are the tokenizer settings.
	Tokens Tokens `json:"tokens"`
	// Stop is the stop list, stored in full.
	Stop Stop `json:"stop"`
	// Stem is the stemming language code, or "none".
	Stem string `json:"stem"`
	// NGrams are the n-gram ranges.
	NGrams NGrams `json:"ngrams"`
	// Mode is ModeVocabulary or ModeHashing.
	Mode Mode `json:"mode"`
	// Docs is the number of training documents.
	Docs int64 `json:"docs"`
	// Vocabulary is set in vocabulary mode.
	Vocabulary *Vocabulary `json:"vocabulary,omitempty"`
	// Hashing is set in hashing mode.
	Hashing *Hashing `json:"hashing,omitempty"`
	// Weights are the weighting settings and learned idf values.
	Weights Weights `json:"weights"`
	// Labels describes how labels become numbers.
	Labels Labels `json:"labels"`
	// Fields are the table fields read beside the text (categories,
	// numbers, timestamps) with their frozen numbers. In vocabulary mode
	// their columns follow the text columns, field by field in this
	// order (see FieldColumns).
	Fields []TableField `json:"fields,omitempty"`
}

// Input names the corpus fields.
type Input struct {
	Format   string   `json:"format"`
	Text     []string `json:"text"`
	Label    string   `json:"label,omitempty"`
	ID       string   `json:"id,omitempty"`
	NoHeader bool     `json:"no_header,omitempty"`
	// TSVEscapes says the training TSV held backslash escapes (see
	// corpus.Options.TSVEscapes); later runs read their TSV the same way
	// unless told otherwise.
	TSVEscapes bool `json:"tsv_escapes,omitempty"`
}

// Tokens are the tokenizer settings (see tokenize.Options); the file
// holds their flag words.
type Tokens struct {
	Unicode tokenize.Normalization `json:"unicode"`
	Case    tokenize.CaseMode      `json:"case"`
	Accents tokenize.AccentMode    `json:"accents"`
	Numbers tokenize.NumberMode    `json:"numbers"`
	MinLen  int                    `json:"min_len"`
	MaxLen  int                    `json:"max_len"`
}

// Options returns the tokenizer options, validated.
func (t Tokens) Options() (tokenize.Options, error) {
	o := tokenize.Options{Unicode: t.Unicode, Case: t.Case, Accents: t.Accents, Numbers: t.Numbers, MinLen: t.MinLen, MaxLen: t.MaxLen}
	return o, o.Validate()
}

// TokensFrom stores tokenizer options.
func TokensFrom(o tokenize.Options) Tokens {
	return Tokens{Unicode: o.Unicode, Case: o.Case, Accents: o.Accents, Numbers: o.Numbers, MinLen: o.MinLen, MaxLen: o.MaxLen}
}

// Stop is the stop list in force.
type Stop struct {
	// Sources are the --stop arguments (language codes or file names).
	Sources []string `json:"sources,omitempty"`
	// KeepNegations is true unless --drop-negations was given.
	KeepNegations bool `json:"keep_negations"`
	// Words is the normalized stop list itself, sorted by bytes.
	Words []string `json:"words,omitempty"`
}

// NGrams are the n-gram ranges ("1-2", "off").
type NGrams struct {
	Words string `json:"words"`
	Chars string `json:"chars"`
}

// Config parses the ranges.
func (n NGrams) Config() (ngram.Config, error) {
	var c ngram.Config
	var err error
	if c.Words, err = ngram.ParseWords(n.Words); err != nil {
		return c, fmt.Errorf("word n-grams: %w", err)
	}
	if c.Chars, err = ngram.ParseChars(n.Chars); err != nil {
		return c, fmt.Errorf("character n-grams: %w", err)
	}
	if !c.Words.On() && !c.Chars.On() {
		return c, fmt.Errorf("no features: word and character n-grams are both off")
	}
	return c, nil
}

// Vocabulary is the learned vocabulary: column i is Keys[i].
type Vocabulary struct {
	MinDocs     int64   `json:"min_docs"`
	MaxDocShare float64 `json:"max_doc_share"`
	MaxTerms    int     `json:"max_terms"`
	// Unseen is the unseen-key policy ("drop", "count", "hash:K").
	Unseen vocab.Unseen `json:"unseen"`
	// Keys, Orders and DocCounts are parallel: the key of each column, its
	// n-gram order (an ngram.Order) and its training document count.
	Keys      []string `json:"keys"`
	Orders    []int    `json:"orders"`
	DocCounts []int64  `json:"doc_counts"`
	// Retired marks columns kept from a parent spec whose keys no longer
	// pass the cutoffs (same length as Keys, or empty).
	Retired []bool `json:"retired,omitempty"`
	// ParentKeys is the number of leading columns taken over from the
	// parent spec (bowline learn --extend); the columns after them were
	// appended. 0 for a spec without a parent.
	ParentKeys int `json:"parent_keys,omitempty"`
	// Seen summarizes every key counted at learn time, kept or cut, so
	// that the effect of other cutoffs can be told without the corpus.
	Seen *Seen `json:"seen,omitempty"`
}

// TopDocCountsKept is how many of the largest document counts Seen keeps.
const TopDocCountsKept = 256

// Seen summarizes the document counts of every key counted at learn time.
type Seen struct {
	// Keys is the number of distinct keys counted.
	Keys int64 `json:"keys"`
	// Orders and OrderKeys are parallel: each n-gram order counted (an
	// ngram.Order), ascending, and its number of distinct keys.
	Orders    []int   `json:"orders"`
	OrderKeys []int64 `json:"order_keys"`
	// DocHistogram counts keys by document count: see
	// vocab.Counts.DocHistogram and vocab.DocBucketBounds.
	DocHistogram []int64 `json:"doc_histogram"`
	// TopDocCounts are the largest document counts, descending (at most
	// TopDocCountsKept), kept or cut: with the histogram they make the
	// effect of a max-doc-share cutoff exact (see vocab.Survivors).
	TopDocCounts []int64 `json:"top_doc_counts"`
	// Pruning is set when learn ran under a memory limit and had to drop
	// keys; the figures above then describe the keys it held at the end.
	Pruning *Pruning `json:"pruning,omitempty"`
}

// Pruning records what bounded counting dropped (see vocab.Pruning).
type Pruning struct {
	// Method names the algorithm: "space-saving" (Metwally, Agrawal and
	// El Abbadi, ICDT 2005) over document counts.
	Method string `json:"method"`
	// Capacity is the most distinct keys held at once.
	Capacity int64 `json:"capacity"`
	// Evicted counts keys dropped (a key dropped twice counts twice);
	// EvictedDocs and EvictedCount their document and occurrence counts
	// at the time, summed.
	Evicted      int64 `json:"evicted"`
	EvictedDocs  int64 `json:"evicted_docs"`
	EvictedCount int64 `json:"evicted_count"`
	// MaxDocs is the error bound: no dropped key was found in more than
	// MaxDocs documents, and no kept document count is too low by more
	// (kept counts are the documents counted since the key last entered
	// the table: never too high).
	MaxDocs int64 `json:"max_docs"`
	// InexactKeys counts kept keys whose document count may be too low;
	// every other count is exact.
	InexactKeys int64 `json:"inexact_keys"`
}

// Hashing holds the hashing-space settings.
type Hashing struct {
	Width  uint64 `json:"width"`
	Seed   uint64 `json:"seed"`
	Signed bool   `json:"signed"`
}

// Weights are the weighting settings and learned numbers.
type Weights struct {
	TF   weight.TF   `json:"tf"`
	IDF  weight.IDF  `json:"idf"`
	Norm weight.Norm `json:"norm"`
	// IDFValues holds one idf per vocabulary column (vocabulary mode, when
	// IDF is not "none"). Extra unseen columns have weight 1.
	IDFValues []float64 `json:"idf_values,omitempty"`
	// IDFBuckets and IDFBucketValues hold the idf of every bucket seen at
	// learn time (hashing mode); other buckets get IDFDefault.
	IDFBuckets      []uint64  `json:"idf_buckets,omitempty"`
	IDFBucketValues []float64 `json:"idf_bucket_values,omitempty"`
	IDFDefault      float64   `json:"idf_default,omitempty"`
}

// LabelKind says how a label field becomes a number. In a spec file it is
// the word "none", "number" or "string".
type LabelKind string

// The label kinds.
const (
	LabelsNone   LabelKind = "none"   // no label field
	LabelsNumber LabelKind = "number" // numeric labels pass through
	LabelsString LabelKind = "string" // string labels mapped by Labels.Map
)

// MarshalText returns the kind's word; another kind (but unset, "") is an
// error.
func (k LabelKind) MarshalText() ([]byte, error) {
	switch k {
	case LabelsNone, LabelsNumber, LabelsString, "":
		return []byte(k), nil
	}
	return nil, fmt.Errorf("labels: unknown kind %q", string(k))
}

// UnmarshalText reads "none", "number" or "string" (or "", unset, which
// Validate refuses).
func (k *LabelKind) UnmarshalText(b []byte) error {
	v := LabelKind(b)
	if _, err := v.MarshalText(); err != nil {
		return err
	}
	*k = v
	return nil
}

// Labels says how label fields become numbers.
type Labels struct {
	// Kind is LabelsNone, LabelsNumber or LabelsString.
	Kind LabelKind `json:"kind"`
	// Map lists string labels sorted by bytes; label Map[i] is written as
	// i+1 (0 is the label of unlabeled rows).
	Map []string `json:"map,omitempty"`
	// Values and Counts are the distinct training label values (sorted
	// by bytes) and how many training documents carried each: the
	// reference for label drift.
	Values []string `json:"values,omitempty"`
	Counts []int64  `json:"counts,omitempty"`
}

// Columns is the number of columns of the rows the spec produces.
func (s *Spec) Columns() int64 {
	c := &s.Content
	if c.Mode == ModeHashing && c.Hashing != nil {
		return int64(c.Hashing.Width)
	}
	if c.Vocabulary == nil {
		return 0
	}
	n := int64(len(c.Vocabulary.Keys))
	n += int64(c.Vocabulary.Unseen.Columns())
	for i := range c.Fields {
		n += int64(c.Fields[i].Columns())
	}
	return n
}

// Seal computes and sets the fingerprint.
func (s *Spec) Seal() error {
	b, err := s.Content.Canonical()
	if err != nil {
		return err
	}
	sum := sha256.Sum256(b)
	s.Fingerprint = "sha256:" + hex.EncodeToString(sum[:])
	s.Tool = "bowline " + ToolVersion
	s.canon = b
	return nil
}

// ShortFingerprint is the first 12 hex digits of the fingerprint.
func (s *Spec) ShortFingerprint() string {
	f := strings.TrimPrefix(s.Fingerprint, "sha256:")
	if len(f) > 12 {
		return f[:12]
	}
	return f
}
