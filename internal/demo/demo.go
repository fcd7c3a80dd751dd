// Package demo generates bowline's invented Pellwick Bike Share corpus of
// rider reviews and support tickets.
package demo

import (
	"bufio"
	"errors"
	"io"
	"math/rand/v2"
	"strconv"
	"strings"
	"time"
	"unicode"
	"unicode/utf8"
)

// Notice is the one-line statement shown wherever the demo corpus is used.
//
// Pellwick Bike Share is a made-up city bike-share operator. Every station,
// street, ticket number, amount and sentence in the corpus is produced by
// this package from templates and a seeded random source; nothing is
// copied from real reviews or tickets.
const Notice = "The Pellwick Bike Share corpus is invented: Pellwick Bike Share is a made-up bike-share operator, " +
	"and its stations, streets, tickets and texts are generated; any resemblance to real places, people or companies is coincidental."

// Header is the first line WriteTSV writes: the names of the columns.
const Header = "id\tchannel\tteam\tsentiment\ttext\tzone\tplan\tage\tcreated"

// Options say how much of the corpus to generate and from which seed.
type Options struct {
	// Docs is the number of records to write after the header.
	Docs int
	// Seed selects the corpus; the same seed gives the same bytes.
	Seed uint64
}

// DefaultOptions returns the options of the standard demo: 5000 records
// from seed 1.
func DefaultOptions() Options { return Options{Docs: 5000, Seed: 1} }

// Split returns the demo's split of docs records: the first 80% (rounded
// down) are for training, the rest are held out.
func Split(docs int) (train, test int) {
	if docs <= 0 {
		return 0, 0
	}
	train = docs * 4 / 5
	return train, docs - train
}

// pcgStream is the second PCG seed word; Options.Seed is the first.
const pcgStream = 0x50656c6c7769636b // "Pellwick"

// tableStream is the second PCG seed word of the table columns (zone,
// plan, age, created): they come from a stream of their own, so the first
// five columns are the same bytes as before the table columns existed.
const tableStream = 0x5461626c65436f6c // "TableCol"

// WriteTSV writes the header and o.Docs records, one per line, with the
// columns id, channel (review or ticket), team (billing, bikes, docks or
// app), sentiment (positive, negative or neutral), text, and the table
// columns of a ticket export: zone (the rider's home zone, now and then in
// other case or with stray spaces, rarely a one-off zone code, sometimes
// empty), plan (single, day pass, monthly, annual, student), age (whole
// years; empty or "unknown" for some riders) and created (an RFC 3339
// time in UTC, empty for a few records). Texts hold no tab, newline or
// backslash, so every line splits into nine fields. The output depends
// only on o.
func WriteTSV(w io.Writer, o Options) error {
	if o.Docs < 0 {
		return errors.New("demo: negative number of documents")
	}
	bw := bufio.NewWriter(w)
	bw.WriteString(Header + "\n")
	g := &generator{r: rand.New(rand.NewPCG(o.Seed, pcgStream))}
	tg := &generator{r: rand.New(rand.NewPCG(o.Seed, tableStream))}
	for i := range o.Docs {
		d := g.doc()
		tc := tg.table(d)
		bw.WriteString("pw-")
		bw.WriteString(pad5(i + 1))
		bw.WriteByte('\t')
		bw.WriteString(d.channel)
		bw.WriteByte('\t')
		bw.WriteString(d.team)
		bw.WriteByte('\t')
		bw.WriteString(d.sentiment)
		bw.WriteByte('\t')
		bw.WriteString(d.text)
		for _, v := range tc {
			bw.WriteByte('\t')
			bw.WriteString(v)
		}
		if err := bw.WriteByte('\n'); err != nil {
			return err
		}
	}
	return bw.Flush()
}

func pad5(n int) string {
	s := strconv.Itoa(n)
	if len(s) < 5 {
		s = strings.Repeat("0", 5-len(s)) + s
	}
	return s
}

// record is one generated document with its labels.
type record struct {
	channel, team, sentiment, text string
}

var (
	teams      = []string{"billing", "bikes", "docks", "app"}
	sentiments = []string{"positive", "negative", "neutral"}
)

// generator draws every choice from one PCG source, in a fixed order.
type generator struct {
	r *rand.Rand
}

func (g *generator) chance(p float64) bool { return g.r.Float64() < p }

func (g *generator) pick(xs []string) string { return xs[g.r.IntN(len(xs))] }

// weighted returns an index drawn with the given weights.
func (g *generator) weighted(ws ...float64) int {
	total := 0.0
	for _, w := range ws {
		total += w
	}
	x := g.r.Float64() * total
	for i, w := range ws {
		if x < w {
			return i
		}
		x -= w
	}
	return len(ws) - 1
}

func (g *generator) doc() record {
	var d record
	ticket := g.chance(0.45)
	d.channel = "review"
	if ticket {
		d.channel = "ticket"
	}
	team := g.weighted(0.30, 0.28, 0.24, 0.18)
	var sent int
	if ticket {
		sent = g.weighted(0.12, 0.58, 0.30)
	} else {
		sent = g.weighted(0.45, 0.35, 0.20)
	}

	switch x := g.r.Float64(); {
	case x < 0.012:
		d.text = ""
	case x < 0.02:
		d.text = strings.Repeat(" ", 1+g.r.IntN(3))
	case x < 0.026:
		d.text = g.long(ticket, team, sent)
	default:
		d.text = g.text(ticket, team, sent)
	}

	// Label noise: a share of records carry a label a reader of the text
	// would dispute, as hand-labelled data does.
	if g.chance(0.05) {
		team = (team + 1 + g.r.IntN(len(teams)-1)) % len(teams)
	}
	if g.chance(0.05) {
		sent = (sent + 1 + g.r.IntN(len(sentiments)-1)) % len(sentiments)
	}
	d.team, d.sentiment = teams[team], sentiments[sent]
	return d
}

// text writes one ordinary record: an opener, one to three sentences about
// the team, perhaps some context or a remark about another team, and a
// closing. It keeps the text between 5 and 80 words.
func (g *generator) text(ticket bool, team, sent int) string {
	var parts []string
	if ticket {
		if g.chance(0.75) {
			parts = append(parts, g.fill(g.pick(ticketOpeners)))
		}
	} else if g.chance(0.45) {
		parts = append(parts, g.fill(g.pick(reviewOpeners)))
	}
	if g.chance(0.35) {
		t := g.pick(context)
		if afterComma(parts) {
			t = lowerFirst(t)
		}
		parts = append(parts, g.fill(t))
	}
	if g.chance(0.07) {
		// Some messages never say what they are about.
		parts = append(parts, g.fill(g.pick(vague[sent])))
	} else {
		n := 1 + g.weighted(0.5, 0.35, 0.15)
		for range n {
			parts = append(parts, g.core(parts, team, sent, afterComma(parts)))
		}
	}
	if g.chance(0.3) {
		// A side remark about another team's matter, in the same mood, no
		// mood or the opposite one: real messages wander.
		other := (team + 1 + g.r.IntN(len(teams)-1)) % len(teams)
		s := sent
		switch g.weighted(0.3, 0.3, 0.4) {
		case 1:
			s = 2
		case 2:
			s = (sent + 1 + g.r.IntN(2)) % 3
		}
		parts = append(parts, g.pick(asides)+g.core(parts, other, s, true))
	}
	if g.chance(0.25) && sent != 2 {
		parts = append(parts, g.fill(g.pick(moods[sent])))
	}
	if ticket && g.chance(0.01) {
		parts = append(parts, g.fill("Please reply to {email}."))
	}
	if g.chance(0.7) {
		// Closings follow the mood only loosely: a polite "Thanks!" ends
		// many complaints.
		c := sent
		switch g.weighted(0.4, 0.4, 0.2) {
		case 1:
			c = 2
		case 2:
			c = 2
			if sent == 1 {
				c = 3
			}
		}
		parts = append(parts, g.pick(closers[c]))
	}
	for words(parts) < 5 {
		parts = append(parts, g.fill(g.pick(context)))
	}
	for words(parts) > 80 && len(parts) > 1 {
		parts = parts[:len(parts)-1]
	}
	return g.finish(parts, ticket, sent)
}

// long writes a rambling ticket or review of well over 80 words.
func (g *generator) long(ticket bool, team, sent int) string {
	var parts []string
	if ticket {
		parts = append(parts, g.fill(g.pick(ticketOpeners)))
	}
	t := g.pick(reviewOpeners)
	if afterComma(parts) {
		t = lowerFirst(t)
	}
	parts = append(parts, g.fill(t))
	for words(parts) < 120+g.r.IntN(140) {
		switch g.weighted(0.55, 0.25, 0.1, 0.1) {
		case 0:
			parts = append(parts, g.core(parts, team, sent, afterComma(parts)))
		case 1:
			parts = append(parts, g.fill(g.pick(context)))
		case 2:
			if sent < 2 {
				parts = append(parts, g.pick(moods[sent]))
			} else {
				parts = append(parts, g.fill(g.pick(vague[2])))
			}
		default:
			parts = append(parts, g.pick(asides)+g.core(parts, g.r.IntN(len(teams)), 2, true))
		}
	}
	parts = append(parts, g.pick(closers[sent]))
	return g.finish(parts, ticket, sent)
}

// core is one sentence about the team in the given mood, different from
// the sentences already in parts; with lower set its first letter is
// lowered to follow a comma.
func (g *generator) core(parts []string, team, sent int, lower bool) string {
	var s string
	for try := 0; try < 4; try++ {
		var t string
		if sent < 2 && g.chance(0.8) {
			t = mirrors[team][g.r.IntN(len(mirrors[team]))][sent]
		} else {
			t = g.pick(cores[team][sent])
		}
		if lower {
			t = lowerFirst(t)
		}
		s = g.fill(t)
		if !containsString(parts, s) {
			break
		}
	}
	if sent == 1 && g.chance(0.015) {
		s = strings.ToUpper(s)
	}
	return s
}

// finish joins the sentences and applies the surface noise of real text:
// curly apostrophes, typos, lower-case typing and emoji.
func (g *generator) finish(parts []string, ticket bool, sent int) string {
	s := strings.Join(parts, " ")
	if g.chance(0.35) {
		s = strings.ReplaceAll(s, "'", "\u2019")
	}
	if g.chance(0.3) {
		s = g.typos(s, 0.05)
	}
	if !ticket && g.chance(0.05) {
		s = strings.ToLower(s)
	}
	if !ticket && g.chance(0.08) {
		e := sent
		if g.chance(0.1) {
			e = g.r.IntN(3)
		}
		s += " " + g.pick(emoji[e])
	}
	return s
}

// typos changes about rate of the longer plain words: two letters swapped,
// one dropped or one doubled.
func (g *generator) typos(s string, rate float64) string {
	ws := strings.Split(s, " ")
	for i, w := range ws {
		if len(w) < 4 || !plainLower(w) || !g.chance(rate) {
			continue
		}
		k := 1 + g.r.IntN(len(w)-2)
		switch g.r.IntN(3) {
		case 0:
			ws[i] = w[:k] + w[k+1:k+2] + w[k:k+1] + w[k+2:]
		case 1:
			ws[i] = w[:k] + w[k+1:]
		default:
			ws[i] = w[:k+1] + w[k:]
		}
	}
	return strings.Join(ws, " ")
}

func containsString(xs []string, s string) bool {
	for _, x := range xs {
		if x == s {
			return true
		}
	}
	return false
}

func plainLower(w string) bool {
	for i := 0; i < len(w); i++ {
		if w[i] < 'a' || w[i] > 'z' {
			return false
		}
	}
	return true
}

// afterComma reports whether the last sentence so far is a greeting that
// ends in a comma, so the next one continues it.
func afterComma(parts []string) bool {
	return len(parts) > 0 && strings.HasSuffix(parts[len(parts)-1], ",")
}

func words(parts []string) int {
	n := 0
	for _, p := range parts {
		n += len(strings.Fields(p))
	}
	return n
}

// lowerFirst lowers the first letter of a template so it can follow
// "Also, " or a greeting, unless it starts with "I" or a slot (a name).
func lowerFirst(t string) string {
	if t == "" || t[0] == '{' || t == "I" || strings.HasPrefix(t, "I ") || strings.HasPrefix(t, "I'") {
		return t
	}
	r, n := utf8.DecodeRuneInString(t)
	return string(unicode.ToLower(r)) + t[n:]
}

// fill replaces each {slot} in t with an invented value.
func (g *generator) fill(t string) string {
	if !strings.Contains(t, "{") {
		return t
	}
	var b strings.Builder
	var station string
	for {
		i := strings.IndexByte(t, '{')
		if i < 0 {
			b.WriteString(t)
			return b.String()
		}
		j := strings.IndexByte(t[i:], '}') + i
		b.WriteString(t[:i])
		name := t[i+1 : j]
		t = t[j+1:]
		switch name {
		case "station":
			station = g.station()
			b.WriteString(station)
		case "station2":
			s := g.station()
			for s == station {
				s = g.station()
			}
			b.WriteString(s)
		case "street":
			b.WriteString(g.pick(streets))
		case "amount", "amount2":
			b.WriteString(g.amount())
		case "time":
			b.WriteString(g.time())
		case "date":
			b.WriteString(g.date())
		case "month":
			b.WriteString(g.pick(months))
		case "ticket":
			b.WriteString("PB-" + strconv.Itoa(10000+g.r.IntN(90000)))
		case "bike":
			b.WriteString(strconv.Itoa(1000 + g.r.IntN(9000)))
		case "slot":
			b.WriteString(strconv.Itoa(1 + g.r.IntN(24)))
		case "card":
			b.WriteString(pad4(g.r.IntN(10000)))
		case "minutes":
			b.WriteString(strconv.Itoa(5 + g.r.IntN(86)))
		case "year":
			b.WriteString(strconv.Itoa(2017 + g.r.IntN(8)))
		case "email":
			// example.org is reserved for documentation (RFC 2606).
			b.WriteString(g.pick(handles) + strconv.Itoa(10+g.r.IntN(990)) + "@example.org")
		default:
			panic("demo: unknown slot " + name)
		}
	}
}

func pad4(n int) string {
	s := strconv.Itoa(n)
	return strings.Repeat("0", 4-len(s)) + s
}

func (g *generator) station() string {
	name := g.pick(stationNames)
	switch g.weighted(0.5, 0.3, 0.2) {
	case 0:
		return name + " dock"
	case 1:
		return name + " station"
	}
	return name
}

func (g *generator) amount() string {
	euros := 1 + g.r.IntN(14)
	if g.chance(0.15) {
		euros = 20 + g.r.IntN(100)
	}
	cents := []string{"00", "50", "20", "80", "95", "10"}[g.r.IntN(6)]
	if g.chance(0.1) {
		return strconv.Itoa(euros) + "," + cents + " €"
	}
	return "€" + strconv.Itoa(euros) + "." + cents
}

func (g *generator) time() string {
	h, m := 6+g.r.IntN(17), []int{0, 5, 10, 15, 20, 30, 40, 45, 50, 55}[g.r.IntN(10)]
	mm := strconv.Itoa(m)
	if m < 10 {
		mm = "0" + mm
	}
	switch g.r.IntN(3) {
	case 0:
		hh := strconv.Itoa(h)
		if h < 10 {
			hh = "0" + hh
		}
		return hh + ":" + mm
	case 1:
		suffix := "am"
		if h >= 12 {
			suffix = "pm"
		}
		h12 := h
		if h > 12 {
			h12 -= 12
		}
		return strconv.Itoa(h12) + "." + mm + suffix
	}
	return strconv.Itoa((h+11)%12+1) + " o'clock"
}

func (g *generator) date() string {
	switch g.r.IntN(3) {
	case 0:
		return strconv.Itoa(1+g.r.IntN(28)) + " " + g.pick(months)
	case 1:
		return g.pick(days)
	}
	d, m := 1+g.r.IntN(28), 1+g.r.IntN(12)
	return pad2(d) + "/" + pad2(m)
}

func pad2(n int) string {
	if n < 10 {
		return "0" + strconv.Itoa(n)
	}
	return strconv.Itoa(n)
}

// Table columns of the demo (invented zone names).
var (
	zones = []string{"Harbour", "Old Town", "Canal Side", "University", "Riverside", "Northgate"}
	plans = []string{"single", "day pass", "monthly", "annual", "student"}
	// demoYear is the year the tickets are from (a leap year).
	demoYear = time.Date(2024, time.January, 1, 0, 0, 0, 0, time.UTC)
)

// table draws the zone, plan, age and created columns of record d from
// the table stream (the record's own fields steer the draws but take no
// draw from the text stream).
func (g *generator) table(d record) [4]string {
	var c [4]string
	// zone
	switch x := g.r.Float64(); {
	case x < 0.03:
		c[0] = ""
	case x < 0.035:
		c[0] = "Z" + strconv.Itoa(100+g.r.IntN(900)) // a one-off zone code
	default:
		z := zones[g.weighted(0.26, 0.22, 0.17, 0.15, 0.12, 0.08)]
		switch y := g.r.Float64(); {
		case y < 0.04:
			z = strings.ToLower(z)
		case y < 0.06:
			z = strings.ToUpper(z)
		case y < 0.08:
			z = " " + z + " "
		}
		c[0] = z
	}
	// plan: billing tickets come more often from members.
	if d.team == "billing" {
		c[1] = plans[g.weighted(0.15, 0.10, 0.35, 0.30, 0.10)]
	} else {
		c[1] = plans[g.weighted(0.35, 0.25, 0.15, 0.10, 0.15)]
	}
	// age: students are young; some riders give none.
	switch x := g.r.Float64(); {
	case x < 0.08:
		c[2] = ""
	case x < 0.10:
		c[2] = "unknown"
	default:
		age := 18 + g.r.IntN(8)
		if c[1] != "student" {
			age = 18 + int(g.r.ExpFloat64()*14)
			age = min(age, 84)
		}
		c[2] = strconv.Itoa(age)
	}
	// created: app trouble peaks late in the evening, the rest around
	// the commute.
	if g.chance(0.015) {
		c[3] = ""
		return c
	}
	day := g.r.IntN(366)
	hour := []int{8, 17}[g.r.IntN(2)] + int(g.r.NormFloat64()*2)
	if d.team == "app" && g.chance(0.5) {
		hour = 22 + g.r.IntN(4)
	}
	hour = ((hour % 24) + 24) % 24
	t := demoYear.AddDate(0, 0, day).Add(time.Duration(hour)*time.Hour + time.Duration(g.r.IntN(60))*time.Minute)
	c[3] = t.Format(time.RFC3339)
	return c
}
