package tokenize

import (
	"bytes"
	"unicode"
	"unicode/utf8"

	"github.com/blevesearch/segment"
	"golang.org/x/text/unicode/norm"
)

// Kind is the type of a token, taken from the word types of the UAX #29
// segmenter.
type Kind uint8

const (
	// Letter is a word of letters, possibly with digits, apostrophes,
	// periods or underscores inside ("don't", "U.S.A", "v8", "snake_case").
	// Hangul words are Letter too.
	Letter Kind = iota
	// Number is a run of digits, possibly with separators inside ("3.14",
	// "1,000").
	Number
	// Ideo is one Han ideograph.
	Ideo
	// Kana is one hiragana character or a run of katakana. The segmenter
	// reports kana as ideographic; Each tells them apart by script.
	Kana
)

var kindNames = [...]string{Letter: "letter", Number: "number", Ideo: "ideo", Kana: "kana"}

// String returns "letter", "number", "ideo" or "kana".
func (k Kind) String() string { return enumString(kindNames[:], uint8(k), "Kind") }

// Stats counts what a Tokenizer saw and did since it was made or last reset.
type Stats struct {
	Texts          int64 // calls to Each
	Bytes          int64 // input bytes given to Each
	InvalidUTF8    int64 // bytes that were not valid UTF-8; each became U+FFFD
	NULs           int64 // NUL bytes; each was treated as a space
	Tokens         int64 // tokens passed to the callback, masked numbers included
	DroppedNumbers int64 // number tokens removed under NumbersDrop
	DroppedLength  int64 // tokens removed for being shorter than MinLen or longer than MaxLen
}

// Add adds the counts of o to s.
func (s *Stats) Add(o Stats) {
	s.Texts += o.Texts
	s.Bytes += o.Bytes
	s.InvalidUTF8 += o.InvalidUTF8
	s.NULs += o.NULs
	s.Tokens += o.Tokens
	s.DroppedNumbers += o.DroppedNumbers
	s.DroppedLength += o.DroppedLength
}

// A Tokenizer splits text into tokens under fixed Options. It keeps scratch
// buffers between calls, so it is not safe for concurrent use: use one per
// goroutine.
type Tokenizer struct {
	opt       Options
	caseTable map[rune]string // foldTable, lowerTable or nil
	form      norm.Form       // whole-text form, if hasForm
	hasForm   bool
	compose   norm.Form // recomposition after accent stripping

	clean, text []byte // Each: text after UTF-8 repair, after normalization
	vals        [][]byte
	types       []int
	each        scratch
	mask        []byte

	wordClean, wordText []byte // AppendNormalized
	word                scratch

	iter norm.Iter // normalization state for appendForm

	noFastPath bool // tests: segment everything with the segmenter

	stats Stats

	// Tokenizers are made one per worker; the padding keeps the counters
	// of one off the cache lines of the next one's fields.
	_ [64]byte
}

// scratch holds the two buffers a token is rewritten between.
type scratch struct{ a, b []byte }

// New returns a Tokenizer for o, or the error from o.Validate.
func New(o Options) (*Tokenizer, error) {
	if err := o.Validate(); err != nil {
		return nil, err
	}
	t := &Tokenizer{opt: o, compose: norm.NFC}
	switch o.Case {
	case CaseFold:
		t.caseTable = foldTable
	case CaseLower:
		t.caseTable = lowerTable
	}
	switch o.Unicode {
	case NFKC:
		t.form, t.hasForm, t.compose = norm.NFKC, true, norm.NFKC
	case NFC:
		t.form, t.hasForm = norm.NFC, true
	}
	return t, nil
}

// Options returns the options t was made with.
func (t *Tokenizer) Options() Options { return t.opt }

// Stats returns the counts since t was made or last reset.
func (t *Tokenizer) Stats() Stats { return t.stats }

// ResetStats sets all counts to zero.
func (t *Tokenizer) ResetStats() { t.stats = Stats{} }

// Each splits text into tokens and calls fn for every kept token, in text
// order. The steps are those of the package documentation: repair invalid
// UTF-8 and NUL bytes, normalize the text, segment it into UAX #29 words,
// then for each word apply the case rule, the accent rule, apostrophe
// folding, the number rule and the length limits.
//
// tok is only valid until fn returns: it may point into text or into
// scratch space that the next token reuses. fn must not modify tok and must
// not call Each on the same Tokenizer. In steady state Each does not
// allocate.
//
// Stretches of ASCII text are segmented by a fast path that gives exactly
// the segmenter's word boundaries and types (checked by a differential test
// and a fuzz target); everything else goes through the segmenter.
func (t *Tokenizer) Each(text []byte, fn func(tok []byte, kind Kind)) {
	t.stats.Texts++
	t.stats.Bytes += int64(len(text))
	data := t.prepare(text, &t.clean, &t.text, &t.stats)
	for len(data) > 0 {
		n := len(data)
		if n > chunkSize {
			n = splitPoint(data, chunkSize)
		}
		t.segmentFast(data[:n], fn)
		data = data[n:]
	}
}

// AppendNormalized appends word to dst after exactly the rules Each applies
// to a single token: UTF-8 repair, normalization, case, accents and
// apostrophe folding. Number and length rules do not apply, and word is not
// segmented. Use it to bring stop lists and other word lists into the form
// of tokens. It may be called from inside an Each callback.
func (t *Tokenizer) AppendNormalized(dst, word []byte) []byte {
	text := t.prepare(word, &t.wordClean, &t.wordText, nil)
	return append(dst, t.token(&t.word, text)...)
}

// chunkSize is the length of the pieces a long text is segmented in, so the
// segmenter's result slices stay small.
const chunkSize = 16 << 10

// splitPoint returns a cut in data near target (0 < target < len(data))
// where UAX #29 always puts a word boundary, or len(data) if it finds none:
// just after a line feed (WB3a), or just after a space followed by an ASCII
// character (WB14; WB4 only joins Extend and Format characters, which are
// never ASCII, to a preceding space).
func splitPoint(data []byte, target int) int {
	ok := func(i int) bool {
		c := data[i-1]
		return c == '\n' || c == ' ' && data[i] < utf8.RuneSelf
	}
	for i := target; i > target/2; i-- {
		if ok(i) {
			return i
		}
	}
	for i := target + 1; i < len(data); i++ {
		if ok(i) {
			return i
		}
	}
	return len(data)
}

// prepare returns text with invalid UTF-8 bytes replaced by U+FFFD, NUL
// bytes replaced by spaces, and the result normalized. It returns text
// itself when nothing changes, else a slice of *clean or *normed.
// st, if not nil, receives the counts of repaired bytes.
func (t *Tokenizer) prepare(text []byte, clean, normed *[]byte, st *Stats) []byte {
	i := asciiNoNULPrefix(text)
	if i == len(text) {
		return text // ASCII without NUL: valid and in every normal form
	}
	src := text
	if bytes.IndexByte(text[i:], 0) >= 0 || !utf8.Valid(text[i:]) {
		src = repair(text, i, clean, st)
	}
	if !t.hasForm || t.form.QuickSpan(src) == len(src) {
		return src
	}
	*normed = t.appendForm((*normed)[:0], t.form, src)
	return *normed
}

// appendForm appends f applied to src to dst. Unlike Form.Append it does
// not allocate: the normalization state lives in t.
func (t *Tokenizer) appendForm(dst []byte, f norm.Form, src []byte) []byte {
	t.iter.Init(f, src)
	for !t.iter.Done() {
		dst = append(dst, t.iter.Next()...)
	}
	return dst
}

// repair copies text into *buf, replacing each byte that is not part of a
// valid UTF-8 sequence with U+FFFD and each NUL with a space. The first i
// bytes are known to be ASCII without NUL.
func repair(text []byte, i int, buf *[]byte, st *Stats) []byte {
	b := append((*buf)[:0], text[:i]...)
	var invalid, nuls int64
	for i < len(text) {
		c := text[i]
		switch {
		case c == 0:
			b = append(b, ' ')
			nuls++
			i++
		case c < utf8.RuneSelf:
			b = append(b, c)
			i++
		default:
			r, size := utf8.DecodeRune(text[i:])
			if r == utf8.RuneError && size == 1 {
				b = append(b, "\uFFFD"...)
				invalid++
			} else {
				b = append(b, text[i:i+size]...)
			}
			i += size
		}
	}
	if st != nil {
		st.InvalidUTF8 += invalid
		st.NULs += nuls
	}
	*buf = b
	return b
}

// segment runs the UAX #29 segmenter over data and emits its word segments.
func (t *Tokenizer) segment(data []byte, fn func([]byte, Kind)) {
	for len(data) > 0 {
		vals, types, n, err := segment.SegmentWordsDirect(data, t.vals[:0], t.types[:0])
		t.vals, t.types = vals, types
		// A pending run of letters or digits the segmenter leaves as
		// single characters (see orphan), as offsets into data.
		base, runStart, runEnd, runType := cap(data), -1, -1, segment.None
		for i, v := range vals {
			typ := types[i]
			if typ == segment.None {
				r, _ := utf8.DecodeRune(v)
				off := base - cap(v) // v is a slice of data
				k := orphan(r)
				if k == markKind && runStart >= 0 && off == runEnd {
					runEnd += len(v)
					continue
				}
				if k == Letter || k == Number {
					rt := segment.Letter
					if k == Number {
						rt = segment.Number
					}
					if runStart < 0 || off != runEnd || rt != runType {
						if runStart >= 0 {
							t.emit(data[runStart:runEnd], runType, fn)
						}
						runStart, runType = off, rt
					}
					runEnd = off + len(v)
					continue
				}
				if k == Ideo {
					typ = segment.Ideo
				}
			}
			if runStart >= 0 {
				t.emit(data[runStart:runEnd], runType, fn)
				runStart = -1
			}
			if typ != segment.None {
				t.emit(v, typ, fn)
			}
		}
		if runStart >= 0 {
			t.emit(data[runStart:runEnd], runType, fn)
		}
		if err == nil && n >= len(data) {
			return
		}
		if n <= 0 {
			// The segmenter could not place a boundary; step over one
			// character so that the rest of the text is still seen.
			_, n = utf8.DecodeRune(data)
		}
		data = data[n:]
	}
}

func (t *Tokenizer) emit(v []byte, typ int, fn func([]byte, Kind)) {
	kind := kindOf(typ, v)
	if kind == Number {
		switch t.opt.Numbers {
		case NumbersDrop:
			t.stats.DroppedNumbers++
			return
		case NumbersMask:
			t.stats.Tokens++
			t.mask = append(t.mask[:0], NumberMask...)
			fn(t.mask, Number)
			return
		}
	}
	tok := t.token(&t.each, v)
	if n := utf8.RuneCount(tok); n < t.opt.MinLen || n > t.opt.MaxLen {
		t.stats.DroppedLength++
		return
	}
	t.stats.Tokens++
	fn(tok, kind)
}

func kindOf(typ int, v []byte) Kind {
	switch typ {
	case segment.Number:
		return Number
	case segment.Kana:
		return Kana
	case segment.Ideo:
		r, _ := utf8.DecodeRune(v)
		if r == 'ー' || unicode.In(r, unicode.Hiragana, unicode.Katakana) {
			return Kana
		}
		return Ideo
	}
	return Letter
}

// token applies the per-token rules (case, accents, apostrophe) to v, using
// s for any rewritten form. The result is v itself or a slice of s.
func (t *Tokenizer) token(s *scratch, v []byte) []byte {
	ascii, upper := true, false
	for _, c := range v {
		if c >= utf8.RuneSelf {
			ascii = false
			break
		}
		if 'A' <= c && c <= 'Z' {
			upper = true
		}
	}
	if ascii {
		// Case folding and lowercasing agree on ASCII; nothing else
		// applies to it.
		if !upper || t.caseTable == nil {
			return v
		}
		s.a = append(s.a[:0], v...)
		for i, c := range s.a {
			if 'A' <= c && c <= 'Z' {
				s.a[i] = c + 'a' - 'A'
			}
		}
		return s.a
	}

	cur, inA := v, false
	// next returns the scratch buffer that cur does not occupy.
	next := func() *[]byte {
		if inA {
			return &s.b
		}
		return &s.a
	}
	if t.caseTable != nil {
		buf := next()
		b, changed := t.appendCase((*buf)[:0], cur)
		*buf = b
		if changed {
			cur, inA = b, buf == &s.a
			// Full case mappings can leave a text that is no longer
			// in the chosen normal form (e.g. U+0390 folds to three
			// code points); restore it so equal words stay equal.
			if t.hasForm && t.form.QuickSpan(cur) < len(cur) {
				buf = next()
				*buf = t.appendForm((*buf)[:0], t.form, cur)
				cur, inA = *buf, buf == &s.a
			}
		}
	}
	if t.opt.Accents == AccentsStrip {
		buf := next()
		d := t.appendForm((*buf)[:0], norm.NFD, cur)
		w := 0
		for i := 0; i < len(d); {
			r, size := utf8.DecodeRune(d[i:])
			if !unicode.Is(unicode.Mn, r) {
				w += copy(d[w:], d[i:i+size])
			}
			i += size
		}
		*buf = d
		inA = buf == &s.a
		out := next() // the buffer cur was in, or the free one
		*out = t.appendForm((*out)[:0], t.compose, d[:w])
		cur, inA = *out, out == &s.a
	}
	if bytes.Contains(cur, rightQuote) {
		buf := next()
		b := (*buf)[:0]
		for {
			i := bytes.Index(cur, rightQuote)
			if i < 0 {
				break
			}
			b = append(b, cur[:i]...)
			b = append(b, '\'')
			cur = cur[i+len(rightQuote):]
		}
		b = append(b, cur...)
		*buf = b
		cur = b
	}
	return cur
}

// rightQuote is U+2019 RIGHT SINGLE QUOTATION MARK, the apostrophe of most
// typeset text.
var rightQuote = []byte("\u2019")

// markKind is orphan's answer for a combining mark.
const markKind Kind = 255

// noneKind is orphan's answer for a character that is no part of a word.
const noneKind Kind = 254

// orphan classifies the first character r of a segment the segmenter typed
// as no word. Two kinds of letters end up there: letters of scripts written
// without spaces between words (Line_Break=SA in the Unicode Character
// Database: Thai, Lao, Khmer, Myanmar, Tai scripts), which UAX #29 leaves to
// dictionary methods and splits into single characters (WB999), and letters
// added to Unicode after version 8.0, which the segmenter's tables predate.
// Digits added after Unicode 8.0, and fullwidth digits when the text is not
// NFKC-normalized, end up there too. orphan returns Letter for such a letter
// and Number for such a digit (Each joins a run of either, with its marks,
// into one token of that kind), Ideo for a Han ideograph or kana (kept one
// per token, as UAX #29 does), markKind for a combining mark and noneKind
// for everything else.
func orphan(r rune) Kind {
	switch {
	case r < 0x0370:
		// Every letter and digit below the Greek block was in
		// Unicode 8.0.
		return noneKind
	case unicode.IsLetter(r):
		if unicode.In(r, unicode.Han, unicode.Hiragana, unicode.Katakana) {
			return Ideo
		}
		return Letter
	case unicode.IsDigit(r):
		return Number
	case unicode.IsMark(r):
		return markKind
	}
	return noneKind
}
