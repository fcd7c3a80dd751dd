package demo

import (
	"bufio"
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"math"
	"slices"
	"strconv"
	"strings"
	"testing"
	"time"
	"unicode"
	"unicode/utf8"

	"github.com/bowline/bowline/corpus"
)

// defaultSHA256 is the SHA-256 of WriteTSV(DefaultOptions()). It changes
// only when the generator changes on purpose; then update it here and say
// so in the commit message. (It changed when the table columns zone,
// plan, age and created were added.)
const defaultSHA256 = "ab7b181a9f24a6b87816c21eca8ebe547d4c05e8ef395fde812850043864340c"

// textSHA256 is the SHA-256 of the first five columns (id to text) of
// WriteTSV(DefaultOptions()), the whole corpus before the table columns
// were added: those columns must keep their bytes, since golden files are
// made from them.
const textSHA256 = "01bf9dfaabfe7fe48891b76b7d72347cbbb474d981241163753f01af2dc8e2cc"

type row struct {
	id, channel, team, sentiment, text string
	zone, plan, age, created           string
}

func generate(t testing.TB, o Options) []byte {
	t.Helper()
	var buf bytes.Buffer
	if err := WriteTSV(&buf, o); err != nil {
		t.Fatal(err)
	}
	return buf.Bytes()
}

// parse splits the TSV, failing on a line without exactly nine fields.
func parse(t testing.TB, b []byte) []row {
	t.Helper()
	sc := bufio.NewScanner(bytes.NewReader(b))
	sc.Buffer(nil, 1<<20)
	var rows []row
	line := 0
	for sc.Scan() {
		line++
		f := strings.Split(sc.Text(), "\t")
		if len(f) != 9 {
			t.Fatalf("line %d has %d fields, want 9: %q", line, len(f), sc.Text())
		}
		if line == 1 {
			if sc.Text() != Header || Header != "id\tchannel\tteam\tsentiment\ttext\tzone\tplan\tage\tcreated" {
				t.Fatalf("header = %q", sc.Text())
			}
			continue
		}
		rows = append(rows, row{f[0], f[1], f[2], f[3], f[4], f[5], f[6], f[7], f[8]})
	}
	if err := sc.Err(); err != nil {
		t.Fatal(err)
	}
	return rows
}

var defaultRows []row

func rowsDefault(t testing.TB) []row {
	if defaultRows == nil {
		defaultRows = parse(t, generate(t, DefaultOptions()))
	}
	return defaultRows
}

func TestDeterministic(t *testing.T) {
	a := generate(t, DefaultOptions())
	b := generate(t, DefaultOptions())
	if !bytes.Equal(a, b) {
		t.Fatal("two generations with the same options differ")
	}
	sum := sha256.Sum256(a)
	if got := hex.EncodeToString(sum[:]); got != defaultSHA256 {
		t.Errorf("SHA-256 of the default corpus = %s, want %s (the generator changed)", got, defaultSHA256)
	}
	other := generate(t, Options{Docs: 5000, Seed: 2})
	if bytes.Equal(a, other) {
		t.Error("seeds 1 and 2 give the same corpus")
	}
	// A shorter corpus is a prefix of a longer one with the same seed.
	short := generate(t, Options{Docs: 100, Seed: 1})
	if !bytes.HasPrefix(a, short) {
		t.Error("the first 100 records depend on how many follow")
	}
}

func TestOptions(t *testing.T) {
	if o := DefaultOptions(); o.Docs != 5000 || o.Seed != 1 {
		t.Errorf("DefaultOptions() = %+v", o)
	}
	if got := string(generate(t, Options{Docs: 0, Seed: 1})); got != Header+"\n" {
		t.Errorf("zero docs: %q, want the header alone", got)
	}
	if err := WriteTSV(&bytes.Buffer{}, Options{Docs: -1}); err == nil {
		t.Error("negative Docs: no error")
	}
	for _, c := range []struct{ docs, train, test int }{{5000, 4000, 1000}, {10, 8, 2}, {7, 5, 2}, {1, 0, 1}, {0, 0, 0}} {
		if tr, te := Split(c.docs); tr != c.train || te != c.test {
			t.Errorf("Split(%d) = %d, %d; want %d, %d", c.docs, tr, te, c.train, c.test)
		}
	}
	if strings.ContainsAny(Notice, "\n\t") || !strings.Contains(Notice, "invented") || !strings.Contains(Notice, "Pellwick Bike Share") {
		t.Errorf("Notice is not one line saying the corpus is invented: %q", Notice)
	}
}

func TestFields(t *testing.T) {
	rows := rowsDefault(t)
	if len(rows) != 5000 {
		t.Fatalf("%d rows, want 5000", len(rows))
	}
	ids := map[string]bool{}
	for i, r := range rows {
		if ids[r.id] || !strings.HasPrefix(r.id, "pw-") {
			t.Errorf("row %d: bad or repeated id %q", i+1, r.id)
		}
		ids[r.id] = true
		if r.channel != "review" && r.channel != "ticket" {
			t.Errorf("row %d: channel %q", i+1, r.channel)
		}
		if !utf8.ValidString(r.text) {
			t.Errorf("row %d: invalid UTF-8", i+1)
		}
		// TSV has no quoting: no tab or newline may sit in a field; the
		// corpus reader would also decode backslash escapes.
		if strings.ContainsAny(r.text, "\t\n\r\\\"") {
			t.Errorf("row %d: text holds a tab, line break, backslash or double quote: %q", i+1, r.text)
		}
	}
}

func TestDistribution(t *testing.T) {
	rows := rowsDefault(t)
	n := float64(len(rows))
	count := func(get func(row) string) map[string]float64 {
		m := map[string]float64{}
		for _, r := range rows {
			m[get(r)]++
		}
		for k := range m {
			m[k] /= n
		}
		return m
	}
	within := func(what string, got map[string]float64, want map[string][2]float64) {
		if len(got) != len(want) {
			t.Errorf("%s: values %v, want exactly %d", what, got, len(want))
		}
		for k, b := range want {
			if got[k] < b[0] || got[k] > b[1] {
				t.Errorf("%s %q share %.3f, want within [%.2f, %.2f]", what, k, got[k], b[0], b[1])
			}
		}
	}
	within("team", count(func(r row) string { return r.team }), map[string][2]float64{
		"billing": {0.26, 0.33}, "bikes": {0.24, 0.31}, "docks": {0.21, 0.28}, "app": {0.16, 0.22}})
	within("sentiment", count(func(r row) string { return r.sentiment }), map[string][2]float64{
		"positive": {0.26, 0.36}, "negative": {0.40, 0.50}, "neutral": {0.19, 0.30}})
	within("channel", count(func(r row) string { return r.channel }), map[string][2]float64{
		"review": {0.52, 0.58}, "ticket": {0.42, 0.48}})

	var empty, long, short, normal int
	var curly, emoji, accents bool
	for _, r := range rows {
		w := len(strings.Fields(r.text))
		switch {
		case w == 0:
			empty++
		case w > 100:
			long++
		case w < 5:
			short++
		case w <= 80:
			normal++
		}
		curly = curly || strings.Contains(r.text, "\u2019")
		accents = accents || strings.Contains(r.text, "café") || strings.Contains(r.text, "naïve")
		for _, c := range r.text {
			if c > 0xFFFF && unicode.Is(unicode.So, c) {
				emoji = true
			}
		}
	}
	if share := float64(empty) / n; share < 0.015 || share > 0.025 {
		t.Errorf("empty or blank texts %.3f, want about 2%%", share)
	}
	if long < 5 || long > 60 {
		t.Errorf("%d texts over 100 words, want a few (5 to 60)", long)
	}
	if short != 0 {
		t.Errorf("%d texts of 1 to 4 words, want none", short)
	}
	if float64(normal)/n < 0.95 {
		t.Errorf("only %d texts of 5 to 80 words", normal)
	}
	if !curly || !emoji || !accents {
		t.Errorf("missing surface variety: curly apostrophe %v, emoji %v, café/naïve %v", curly, emoji, accents)
	}
}

func tokens(s string) []string {
	return strings.FieldsFunc(strings.ToLower(s), func(r rune) bool {
		return !unicode.IsLetter(r) && !unicode.IsDigit(r) && r != '\'' && r != '\u2019' && r != '-'
	})
}

// TestNoGiveawayWord: no word that occurs in more than 10% of documents
// names the team with more than 99% purity, so the team is not read off a
// single word.
func TestNoGiveawayWord(t *testing.T) {
	rows := rowsDefault(t)
	df := map[string]map[string]int{}
	for _, r := range rows {
		seen := map[string]bool{}
		for _, w := range tokens(r.text) {
			if seen[w] {
				continue
			}
			seen[w] = true
			if df[w] == nil {
				df[w] = map[string]int{}
			}
			df[w][r.team]++
		}
	}
	checked := 0
	for w, byTeam := range df {
		total, top := 0, 0
		for _, c := range byTeam {
			total += c
			top = max(top, c)
		}
		if float64(total) < 0.1*float64(len(rows)) {
			continue
		}
		checked++
		if p := float64(top) / float64(total); p > 0.99 {
			t.Errorf("word %q in %d docs names one team with purity %.3f", w, total, p)
		}
	}
	if checked < 5 {
		t.Errorf("only %d words occur in 10%% of documents; the check saw too little", checked)
	}
}

// nb is a multinomial Naive Bayes text classifier with add-one smoothing,
// as in Manning, Raghavan, Schütze, Introduction to Information Retrieval
// (2008), ch. 13, figure 13.2 (TrainMultinomialNB / ApplyMultinomialNB).
type nb struct {
	feats  func(string) []string
	prior  map[string]float64
	cond   map[string]map[string]float64
	vocab  map[string]bool
	totals map[string]float64
}

// pairs returns the words of s followed by its adjacent word pairs.
func pairs(s string) []string {
	w := tokens(s)
	out := append([]string(nil), w...)
	for i := 1; i < len(w); i++ {
		out = append(out, w[i-1]+" "+w[i])
	}
	return out
}

func trainNB(rows []row, label func(row) string, feats func(string) []string) *nb {
	m := &nb{feats: feats, prior: map[string]float64{}, cond: map[string]map[string]float64{}, vocab: map[string]bool{}, totals: map[string]float64{}}
	for _, r := range rows {
		c := label(r)
		m.prior[c]++
		if m.cond[c] == nil {
			m.cond[c] = map[string]float64{}
		}
		for _, w := range feats(r.text) {
			m.cond[c][w]++
			m.totals[c]++
			m.vocab[w] = true
		}
	}
	return m
}

func (m *nb) classify(text string) string {
	best, bestScore := "", math.Inf(-1)
	classes := make([]string, 0, len(m.prior))
	for c := range m.prior {
		classes = append(classes, c)
	}
	// Sorted so ties break the same way every run.
	for i := range classes {
		for j := i + 1; j < len(classes); j++ {
			if classes[j] < classes[i] {
				classes[i], classes[j] = classes[j], classes[i]
			}
		}
	}
	v := float64(len(m.vocab))
	for _, c := range classes {
		s := math.Log(m.prior[c])
		for _, w := range m.feats(text) {
			if m.vocab[w] {
				s += math.Log((m.cond[c][w] + 1) / (m.totals[c] + v))
			}
		}
		if s > bestScore {
			best, bestScore = c, s
		}
	}
	return best
}

// TestLearnableNotTrivial trains Naive Bayes on the demo's training split
// and scores the held-out split: a learner must beat the majority rate
// clearly, and must stay well short of perfect. The margins (20 points
// above majority, 5 points below 100%) are common practice for a demo
// that should show both learning and its limits.
func TestLearnableNotTrivial(t *testing.T) {
	rows := rowsDefault(t)
	train, _ := Split(len(rows))
	for _, lab := range []struct {
		name string
		get  func(row) string
	}{
		{"team", func(r row) string { return r.team }},
		{"sentiment", func(r row) string { return r.sentiment }},
	} {
		acc, base := heldOut(rows, train, lab.get, tokens)
		t.Logf("%s: Naive Bayes accuracy %.3f, majority rate %.3f", lab.name, acc, base)
		if acc < base+0.20 {
			t.Errorf("%s: accuracy %.3f not clearly above the majority rate %.3f", lab.name, acc, base)
		}
		if acc > 0.95 {
			t.Errorf("%s: accuracy %.3f; the labels are too easy", lab.name, acc)
		}
	}
}

// TestWordPairsHelpSentiment: the corpus is built so that negation carries
// part of the sentiment ("I was not charged twice" against "I was charged
// twice"), which single words cannot see and word pairs can. Adding word
// pairs must raise held-out sentiment accuracy by at least 3 points.
func TestWordPairsHelpSentiment(t *testing.T) {
	rows := rowsDefault(t)
	train, _ := Split(len(rows))
	get := func(r row) string { return r.sentiment }
	uni, _ := heldOut(rows, train, get, tokens)
	bi, _ := heldOut(rows, train, get, pairs)
	t.Logf("sentiment: words %.3f, words and pairs %.3f", uni, bi)
	if bi < uni+0.03 {
		t.Errorf("word pairs raise sentiment accuracy from %.3f to %.3f only", uni, bi)
	}
	if bi > 0.96 {
		t.Errorf("sentiment accuracy with word pairs %.3f; the labels are too easy", bi)
	}
}

// heldOut trains on rows[:train] and returns the accuracy on the rest and
// the majority rate there.
func heldOut(rows []row, train int, get func(row) string, feats func(string) []string) (acc, majorityRate float64) {
	m := trainNB(rows[:train], get, feats)
	counts := map[string]int{}
	right := 0
	for _, r := range rows[train:] {
		counts[get(r)]++
		if m.classify(r.text) == get(r) {
			right++
		}
	}
	majority := 0
	for _, c := range counts {
		majority = max(majority, c)
	}
	held := float64(len(rows) - train)
	return float64(right) / held, float64(majority) / held
}

// TestReadsAsCorpus reads the demo with bowline's own TSV reader, the way
// learn and encode read it: every record arrives with its text, label and
// id, and the text is the one written.
func TestReadsAsCorpus(t *testing.T) {
	rows := rowsDefault(t)
	r, err := corpus.NewReader(bytes.NewReader(generate(t, DefaultOptions())), "demo.tsv",
		corpus.Options{Format: corpus.TSV, Text: []string{"text"}, Label: "team", ID: "id"})
	if err != nil {
		t.Fatal(err)
	}
	i := 0
	for r.Scan() {
		rec := r.Record()
		if i >= len(rows) {
			t.Fatalf("reader returned more than %d records", len(rows))
		}
		if string(rec.Text[0]) != rows[i].text || string(rec.Label) != rows[i].team || string(rec.ID) != rows[i].id {
			t.Fatalf("record %d read as %q %q %q, want %q %q %q", i+1, rec.ID, rec.Label, rec.Text[0], rows[i].id, rows[i].team, rows[i].text)
		}
		i++
	}
	if err := r.Err(); err != nil {
		t.Fatal(err)
	}
	if i != len(rows) {
		t.Errorf("reader returned %d records, want %d", i, len(rows))
	}
}

// TestTableColumns checks the table columns: the text columns keep the
// bytes they had before the table columns existed, and the table columns
// have the shares the generator aims at.
func TestTableColumns(t *testing.T) {
	var five bytes.Buffer
	for _, line := range strings.SplitAfter(string(generate(t, DefaultOptions())), "\n") {
		if line == "" {
			continue
		}
		f := strings.SplitN(strings.TrimSuffix(line, "\n"), "\t", 6)
		five.WriteString(strings.Join(f[:5], "\t") + "\n")
	}
	sum := sha256.Sum256(five.Bytes())
	if got := hex.EncodeToString(sum[:]); got != textSHA256 {
		t.Errorf("the first five columns changed: SHA-256 %s, want %s", got, textSHA256)
	}
	rows := rowsDefault(t)
	n := float64(len(rows))
	var zoneMissing, oneOff, ageMissing, unknown, created int
	folded := map[string]bool{}
	for _, r := range rows {
		switch {
		case r.zone == "":
			zoneMissing++
		case strings.HasPrefix(r.zone, "Z"):
			oneOff++
		default:
			folded[strings.ToLower(strings.TrimSpace(r.zone))] = true
		}
		switch r.age {
		case "":
			ageMissing++
		case "unknown":
			unknown++
		default:
			if a, err := strconv.Atoi(r.age); err != nil || a < 18 || a > 84 {
				t.Errorf("%s: age %q", r.id, r.age)
			}
		}
		if r.created != "" {
			tm, err := time.Parse(time.RFC3339, r.created)
			if err != nil || tm.Year() != 2024 {
				t.Errorf("%s: created %q: %v", r.id, r.created, err)
			}
			created++
		}
		if !slices.Contains(plans, r.plan) {
			t.Errorf("%s: plan %q", r.id, r.plan)
		}
	}
	for _, c := range []struct {
		what   string
		got    float64
		lo, hi float64
	}{
		{"zone missing", float64(zoneMissing) / n, 0.02, 0.04},
		{"one-off zones", float64(oneOff) / n, 0.002, 0.01},
		{"age missing", float64(ageMissing) / n, 0.06, 0.10},
		{"age unknown", float64(unknown) / n, 0.01, 0.03},
		{"created present", float64(created) / n, 0.97, 0.995},
	} {
		if c.got < c.lo || c.got > c.hi {
			t.Errorf("%s share %.4f, want within [%.3f, %.3f]", c.what, c.got, c.lo, c.hi)
		}
	}
	if len(folded) != len(zones) {
		t.Errorf("zones after case folding and trimming: %v", folded)
	}
}
