package spec

import (
	"bytes"
	"fmt"
	"os"
	"strconv"
	"sync"
	"testing"

	"github.com/bowline/bowline/tokenize"
	"github.com/bowline/bowline/vocab"
	"github.com/bowline/bowline/weight"
)

// syllables build invented words for the generated vocabularies below.
var syllables = []string{"ba", "ke", "lo", "ru", "pell", "wick", "dor", "ast", "ny", "qua", "tre", "zo", "mi", "fen", "gal", "ho"}

// inventedWord is a word unique to n: n written in base len(syllables).
func inventedWord(n int) string {
	var b []byte
	for {
		b = append(b, syllables[n%len(syllables)]...)
		n /= len(syllables)
		if n == 0 {
			return string(b)
		}
	}
}

// bigVocabularySpec is a sealed vocabulary-mode spec shaped like one learned
// from a mid-size corpus (unigrams and bigrams, descending document
// counts), with n columns; withIDF adds one idf value per column.
func bigVocabularySpec(n int, withIDF bool) *Spec {
	keys := make([]string, n)
	orders := make([]int, n)
	counts := make([]int64, n)
	uni := n / 6
	for i := range keys {
		if i < uni {
			keys[i], orders[i] = inventedWord(i), 1
		} else {
			j := i - uni
			keys[i], orders[i] = inventedWord(j%5000)+" "+inventedWord(j/5000+1), 2
		}
		counts[i] = int64(90000 / (i/8 + 1))
	}
	// A few keys the canonical encoding must escape, and non-ASCII ones.
	keys[n/2], keys[n/2+1], keys[n/2+2] = `say "hi"`, "café", "line\u2028break"
	sp := &Spec{Content: Content{
		Input:      Input{Format: "lines", Text: []string{"line"}},
		Tokens:     TokensFrom(tokenize.DefaultOptions()),
		Stop:       Stop{Sources: []string{"en"}, KeepNegations: true, Words: []string{"a", "about", "the"}},
		Stem:       "none",
		NGrams:     NGrams{Words: "1-2", Chars: "off"},
		Mode:       ModeVocabulary,
		Docs:       90000,
		Vocabulary: &Vocabulary{MinDocs: 1, MaxDocShare: 1, Unseen: vocab.Unseen{Mode: vocab.UnseenDrop}, Keys: keys, Orders: orders, DocCounts: counts},
		Weights:    Weights{TF: weight.TFCount, IDF: weight.IDFNone, Norm: weight.NormNone},
		Labels:     Labels{Kind: LabelsNone},
	}}
	if withIDF {
		sp.Content.Weights.IDF, sp.Content.Weights.Norm = weight.IDFSmooth, weight.NormL2
		idf := make([]float64, n)
		for i, c := range counts {
			idf[i] = 1 + float64(90001)/float64(c+1)/7.3
		}
		sp.Content.Weights.IDFValues = idf
	}
	if err := sp.Seal(); err != nil {
		panic(err)
	}
	return sp
}

// bigHashingSpec is a sealed hashing-mode spec of width 2^20 with n
// buckets carrying learned idf values.
func bigHashingSpec(n int) *Spec {
	buckets := make([]uint64, n)
	values := make([]float64, n)
	for i := range buckets {
		buckets[i] = uint64(i) * (1 << 20) / uint64(n)
		values[i] = 1 + float64(i%977)/97.1
	}
	sp := &Spec{Content: Content{
		Input:   Input{Format: "lines", Text: []string{"line"}},
		Tokens:  TokensFrom(tokenize.DefaultOptions()),
		Stem:    "none",
		NGrams:  NGrams{Words: "1-2", Chars: "off"},
		Mode:    ModeHashing,
		Docs:    90000,
		Hashing: &Hashing{Width: 1 << 20, Seed: 0},
		Weights: Weights{TF: weight.TFCount, IDF: weight.IDFSmooth, Norm: weight.NormNone, IDFBuckets: buckets, IDFBucketValues: values, IDFDefault: 11.2},
		Labels:  Labels{Kind: LabelsNone},
	}}
	if err := sp.Seal(); err != nil {
		panic(err)
	}
	return sp
}

var benchSpecs = sync.OnceValue(func() map[string][]byte {
	out := map[string][]byte{}
	for name, sp := range map[string]*Spec{
		"vocabulary":     bigVocabularySpec(605858, false),
		"vocabulary-idf": bigVocabularySpec(605858, true),
		"hashing-idf":    bigHashingSpec(459912),
	} {
		var buf bytes.Buffer
		if err := sp.Write(&buf); err != nil {
			panic(err)
		}
		out[name] = buf.Bytes()
	}
	return out
})

// BenchmarkLoad reads large generated specs (605,858 columns, about the
// size learned from the four-copy benchmark corpus). BOWLINE_BENCH_SPEC
// names an extra spec file to read.
func BenchmarkLoad(b *testing.B) {
	specs := benchSpecs()
	names := []string{"vocabulary", "vocabulary-idf", "hashing-idf"}
	if p := os.Getenv("BOWLINE_BENCH_SPEC"); p != "" {
		data, err := os.ReadFile(p)
		if err != nil {
			b.Fatal(err)
		}
		specs = map[string][]byte{"file": data}
		names = []string{"file"}
	}
	for _, name := range names {
		data := specs[name]
		b.Run(fmt.Sprintf("%s-%sMB", name, strconv.Itoa(len(data)>>20)), func(b *testing.B) {
			b.SetBytes(int64(len(data)))
			b.ReportAllocs()
			for b.Loop() {
				if _, err := Read(bytes.NewReader(data), name); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// BenchmarkDecode is Read's decoding alone on the generated specs of
// BenchmarkLoad: the fast path ("fast") beside the two encoding/json passes
// it stands in for ("json", referenceDecode).
func BenchmarkDecode(b *testing.B) {
	specs := benchSpecs()
	for _, name := range []string{"vocabulary", "vocabulary-idf", "hashing-idf"} {
		data := specs[name]
		b.Run(name+"/fast", func(b *testing.B) {
			b.SetBytes(int64(len(data)))
			b.ReportAllocs()
			for b.Loop() {
				if _, _, ok := fastDecode(data); !ok {
					b.Fatal("the fast path gave up")
				}
			}
		})
		b.Run(name+"/json", func(b *testing.B) {
			b.SetBytes(int64(len(data)))
			b.ReportAllocs()
			for b.Loop() {
				if _, _, envErr, contentErr := referenceDecode(data); envErr != nil || contentErr != nil {
					b.Fatal(envErr, contentErr)
				}
			}
		})
	}
}
