// Package report holds the figures of one bowline run and renders them as
// text for people, JSON for machines and HTML with plots, on the page
// skeleton and plots that bowline's other HTML pages use too.
package report

// Figures are everything one run of learn, encode or drift reports. JSON
// field names are stable: scripts depend on them.
type Figures struct {
	// Command is the subcommand that produced the figures ("learn", "encode").
	Command string `json:"command"`
	// Input names the corpus file(s) read.
	Input string `json:"input"`
	// Spec is the fingerprint of the spec used or written.
	Spec string `json:"spec"`
	// Mode is "vocabulary" or "hashing".
	Mode string `json:"mode"`
	// Docs is the number of records read (one row each).
	Docs int64 `json:"docs"`
	// Rejected counts records skipped under --on-error skip (written to
	// the rejects file); Docs + Rejected is the number of records read.
	Rejected int64 `json:"rejected"`
	// EmptyDocs counts documents that produced no feature at all.
	EmptyDocs int64 `json:"empty_docs"`
	// Tokens counts tokens produced by the tokenizer, before stop words.
	Tokens int64 `json:"tokens"`
	// StopDropped counts tokens removed as stop words.
	StopDropped int64 `json:"stop_dropped"`
	// StopShare is StopDropped / Tokens.
	StopShare float64 `json:"stop_share"`
	// TopStopWords lists the most often dropped stop words.
	TopStopWords []Count `json:"top_stop_words,omitempty"`
	// Features counts feature keys emitted (word and character n-grams,
	// every occurrence).
	Features int64 `json:"features"`
	// InvalidUTF8 counts invalid bytes replaced by U+FFFD.
	InvalidUTF8 int64 `json:"invalid_utf8"`
	// NULs counts NUL bytes found in text (treated as spaces).
	NULs int64 `json:"nul_bytes"`
	// OOV is the out-of-vocabulary account (vocabulary mode; nil in hashing
	// mode and at learn time).
	OOV *OOV `json:"oov,omitempty"`
	// Collisions is the collision account (hashing mode only).
	Collisions *Collisions `json:"collisions,omitempty"`
	// Sparsity describes the rows written (absent when a run writes no
	// rows, as learn does).
	Sparsity *Sparsity `json:"sparsity,omitempty"`
	// Vocabulary describes the vocabulary learned (learn only).
	Vocabulary *VocabFigures `json:"vocabulary,omitempty"`
	// Curves describe the spec's vocabulary for plots (vocabulary mode):
	// its rank-frequency curve and the document-count histogram of every
	// key learn saw, with the cutoffs. Only the HTML report draws them.
	Curves *VocabCurves `json:"vocabulary_curves,omitempty"`
	// Labels counts rows per label value as written (empty when unlabeled).
	Labels []Count `json:"labels,omitempty"`
	// Fields are the figures of the table fields read beside the text
	// (categories, numbers, timestamps), in the spec's order; empty when
	// the spec has none.
	Fields []FieldFigures `json:"fields,omitempty"`
	// Throughput is the run's speed.
	Throughput Throughput `json:"throughput"`
}

// Count is a name with how often it occurred.
type Count struct {
	Name  string `json:"name"`
	Count int64  `json:"count"`
}

// OOV is the out-of-vocabulary account of a run: emitted features whose key
// is not a vocabulary column.
type OOV struct {
	// TokenShare is unseen emitted features over all emitted features.
	TokenShare float64 `json:"token_share"`
	// TypeShare is distinct unseen keys over distinct keys seen.
	TypeShare float64 `json:"type_share"`
	// Features and Unseen count emitted features, all and unseen.
	Features int64 `json:"features"`
	Unseen   int64 `json:"unseen"`
	// Keys and UnseenKeys count distinct keys, all and unseen.
	Keys       int64 `json:"keys"`
	UnseenKeys int64 `json:"unseen_keys"`
	// ByOrder breaks the same figures down per n-gram order ("w1", "w2",
	// "c3"), in order.
	ByOrder []OrderOOV `json:"by_order"`
	// TopUnseen lists the most frequent unseen keys.
	TopUnseen []Count `json:"top_unseen,omitempty"`
}

// OrderOOV is the OOV account of one n-gram order.
type OrderOOV struct {
	Order      string  `json:"order"`
	Features   int64   `json:"features"`
	Unseen     int64   `json:"unseen"`
	Keys       int64   `json:"keys"`
	UnseenKeys int64   `json:"unseen_keys"`
	TokenShare float64 `json:"token_share"`
	TypeShare  float64 `json:"type_share"`
}

// Collisions is the hashing account of a run: measured against expected
// under uniform hashing of Keys distinct keys into Width buckets.
type Collisions struct {
	Width uint64 `json:"width"`
	// Keys is the number of distinct feature keys seen.
	Keys int64 `json:"keys"`
	// Occupied is the number of buckets holding at least one key;
	// ExpectedOccupied is m·(1 − (1 − 1/m)^n).
	Occupied         int64   `json:"occupied"`
	ExpectedOccupied float64 `json:"expected_occupied"`
	// Colliding counts distinct keys whose bucket holds another key; Rate
	// is Colliding/Keys; ExpectedRate is 1 − (1 − 1/m)^(n−1).
	Colliding    int64   `json:"colliding"`
	Rate         float64 `json:"rate"`
	ExpectedRate float64 `json:"expected_rate"`
	// Crowded lists the most crowded buckets when asked for
	// (encode --explain-buckets), most distinct keys first.
	Crowded []CrowdedBucket `json:"crowded,omitempty"`
}

// CrowdedBucket is one hashing bucket shared by several distinct keys.
type CrowdedBucket struct {
	// Column is the bucket's column index as written in the rows.
	Column int64 `json:"column"`
	// Keys is the number of distinct keys in the bucket.
	Keys int64 `json:"keys"`
	// Names are the keys themselves, sorted by bytes.
	Names []string `json:"names"`
}

// Sparsity describes the rows written.
type Sparsity struct {
	Rows    int64   `json:"rows"`
	Columns int64   `json:"columns"`
	NNZ     int64   `json:"nnz"`
	MeanNNZ float64 `json:"mean_nnz_per_row"`
	MaxNNZ  int64   `json:"max_nnz_per_row"`
	// Density is NNZ / (Rows × Columns); Sparsity is 1 − Density.
	Density  float64 `json:"density"`
	Sparsity float64 `json:"sparsity"`
	// NNZHistogram[i] counts rows whose non-zero count lies in
	// [2^i − 1, 2^(i+1) − 1): 0, 1–2, 3–6, 7–14, ...
	NNZHistogram []int64 `json:"nnz_histogram"`
}

// VocabFigures describes a learned vocabulary.
type VocabFigures struct {
	// Seen is the number of distinct keys counted; Kept the columns kept.
	Seen int64 `json:"seen"`
	Kept int64 `json:"kept"`
	// BelowMinDocs, AboveMaxShare and OverMaxTerms count keys removed by
	// each cutoff, in that order of application.
	BelowMinDocs  int64 `json:"below_min_docs"`
	AboveMaxShare int64 `json:"above_max_doc_share"`
	OverMaxTerms  int64 `json:"over_max_terms"`
	// ByOrder is the number of kept columns per n-gram order.
	ByOrder []Count `json:"by_order"`
	// TopTerms lists kept keys with the highest document counts.
	TopTerms []Count `json:"top_terms"`
}

// Throughput is the speed of a run.
type Throughput struct {
	Bytes      int64   `json:"bytes"`
	Seconds    float64 `json:"seconds"`
	MBPerSec   float64 `json:"mb_per_sec"`
	DocsPerSec float64 `json:"docs_per_sec"`
	Workers    int     `json:"workers"`
}

// FieldFigures are the figures of one table field over a run. Shares are
// over Docs. At learn time the seen statistics are the frozen ones.
type FieldFigures struct {
	// Name and Kind ("category", "number", "time") are the field's.
	Name string `json:"name"`
	Kind string `json:"kind"`
	// Docs counts records read; Missing those without a value (empty,
	// absent, null or a --missing-value sentinel).
	Docs         int64   `json:"docs"`
	Missing      int64   `json:"missing"`
	MissingShare float64 `json:"missing_share"`
	// Category is set for a category field of a vocabulary spec (a
	// hashing spec stores no levels), Number for a number field, Time for
	// a time field.
	Category *CategoryFigures `json:"category,omitempty"`
	Number   *NumberFigures   `json:"number,omitempty"`
	Time     *TimeFigures     `json:"time,omitempty"`
}

// CategoryFigures describe a category field.
type CategoryFigures struct {
	// Levels is the number of levels the spec keeps (0 in hashing mode,
	// where no level is stored); LevelsSeen the distinct levels read.
	Levels     int64 `json:"levels"`
	LevelsSeen int64 `json:"levels_seen"`
	// Other counts values that fell into the other level (rarer than
	// --min-docs at learn time); Unseen values never seen at learn time
	// (always 0 in hashing mode).
	Other       int64   `json:"other"`
	OtherShare  float64 `json:"other_share"`
	Unseen      int64   `json:"unseen"`
	UnseenShare float64 `json:"unseen_share"`
}

// NumberFigures describe a number field. Means and standard deviations
// are of the present values after log (when the field takes it), before
// standardization; standard deviations are population ones (divided by
// n). The frozen ones are the spec's, learned on the training corpus.
type NumberFigures struct {
	Values     int64   `json:"values"`
	Mean       float64 `json:"mean"`
	SD         float64 `json:"sd"`
	FrozenMean float64 `json:"frozen_mean"`
	FrozenSD   float64 `json:"frozen_sd"`
	// Min and Max are the smallest and largest values read, FrozenMin and
	// FrozenMax the training range.
	Min       float64 `json:"min"`
	Max       float64 `json:"max"`
	FrozenMin float64 `json:"frozen_min"`
	FrozenMax float64 `json:"frozen_max"`
	// OutOfRange counts values outside FrozenMin..FrozenMax.
	OutOfRange      int64   `json:"out_of_range"`
	OutOfRangeShare float64 `json:"out_of_range_share"`
}

// TimeFigures describe a time field.
type TimeFigures struct {
	// Values counts times read; First and Last are the earliest and the
	// latest, in RFC 3339 in the field's zone ("" when none).
	Values int64  `json:"values"`
	First  string `json:"first"`
	Last   string `json:"last"`
	// Layout and Zone are the field's settings.
	Layout string `json:"layout"`
	Zone   string `json:"zone"`
}

// VocabCurves are the shape of a vocabulary, for plots.
type VocabCurves struct {
	// RankDocs samples the rank-frequency curve of the kept keys: the
	// document count of the key at each rank (1 = most documents), at
	// ranks spaced evenly on a log scale.
	RankDocs []RankPoint `json:"rank_docs"`
	// DocHistogram counts the keys learn saw, kept or cut, by document
	// count: Keys keys had between Lo and Hi documents.
	DocHistogram []DocBin `json:"doc_histogram"`
	// MinDocs and MaxDocs are the cutoffs as document counts (MaxDocs is
	// max-doc-share times the training documents).
	MinDocs int64   `json:"min_docs"`
	MaxDocs float64 `json:"max_docs"`
}

// RankPoint is one point of a rank-frequency curve.
type RankPoint struct {
	Rank int64 `json:"rank"`
	Docs int64 `json:"docs"`
}

// DocBin is one bin of a document-count histogram.
type DocBin struct {
	Lo   int64 `json:"lo"`
	Hi   int64 `json:"hi"`
	Keys int64 `json:"keys"`
}
