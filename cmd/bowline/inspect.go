package main

import (
	"bufio"
	"encoding/json"
	"fmt"
	"io"
	"regexp"
	"sort"
	"strings"

	"github.com/bowline/bowline/internal/cli"
	"github.com/bowline/bowline/ngram"
	"github.com/bowline/bowline/spec"
	"github.com/bowline/bowline/vocab"
	"github.com/bowline/bowline/weight"
)

func runInspect(args []string, stdout, stderr io.Writer) error {
	c := newCommand("inspect", "SPEC [flags]", "Shows a spec: fingerprint and parent, settings, size per n-gram order, top terms by document count,\nretired columns, and how many keys other cutoffs would keep.")
	var sf specFlags
	sf.register(c.Flags)
	var top int
	var fmap string
	var asJSON bool
	c.Flags.IntVar(&top, "top", 20, "how many top terms to list")
	c.InputArgs("the spec")
	c.OutputFlag(&fmap, "feature-map", "", "also write the feature map (index, feature, document count) to FILE")
	c.Outputs("the description", stdoutPath)
	c.Flags.BoolVar(&asJSON, "json", false, "print the description as JSON (stable field names) instead of text")
	if err := c.parse(args); err != nil {
		return err
	}
	if len(c.Args) != 1 {
		return cli.Usagef("bowline inspect needs one spec file")
	}
	if top < 0 {
		return cli.Usagef("--top: %d is negative", top)
	}
	s, err := sf.load(c.Args[0])
	if err != nil {
		return err
	}
	v := inspectSpec(s, top)
	if asJSON {
		enc := json.NewEncoder(stdout)
		enc.SetEscapeHTML(false)
		enc.SetIndent("", "  ")
		if err := enc.Encode(v); err != nil {
			return &ioError{err}
		}
	} else {
		// A bufio.Writer keeps the first write error for Flush.
		bw := bufio.NewWriter(stdout)
		v.writeText(bw)
		if err := bw.Flush(); err != nil {
			return &ioError{err}
		}
	}
	if fmap != "" {
		return writeFeatureMap(fmap, s, 1)
	}
	return nil
}

// inspectView is what inspect shows; its JSON field names are stable.
type inspectView struct {
	Fingerprint string       `json:"fingerprint"`
	Parent      string       `json:"parent,omitempty"`
	Tool        string       `json:"tool"`
	Schema      int          `json:"schema"`
	Mode        spec.Mode    `json:"mode"`
	Columns     int64        `json:"columns"`
	Docs        int64        `json:"docs"`
	Settings    settingsView `json:"settings"`
	Vocabulary  *vocabView   `json:"vocabulary,omitempty"`
	Caution     *cautionView `json:"caution,omitempty"`
}

type settingsView struct {
	Input   spec.Input    `json:"input"`
	Tokens  spec.Tokens   `json:"tokens"`
	Stop    stopView      `json:"stop"`
	Stem    string        `json:"stem"`
	NGrams  spec.NGrams   `json:"ngrams"`
	Weights weightsView   `json:"weights"`
	Labels  labelsView    `json:"labels"`
	Hashing *spec.Hashing `json:"hashing,omitempty"`
	// Fields are the table fields with their frozen numbers.
	Fields []spec.TableField `json:"fields,omitempty"`
}

type stopView struct {
	Sources       []string `json:"sources"`
	Words         int      `json:"words"`
	KeepNegations bool     `json:"keep_negations"`
}

type weightsView struct {
	TF   weight.TF   `json:"tf"`
	IDF  weight.IDF  `json:"idf"`
	Norm weight.Norm `json:"norm"`
}

type labelsView struct {
	Kind spec.LabelKind `json:"kind"`
	Map  []string       `json:"map,omitempty"` // label Map[i] is written as i+1
}

type vocabView struct {
	Keys        int           `json:"keys"`
	MinDocs     int64         `json:"min_docs"`
	MaxDocShare float64       `json:"max_doc_share"`
	MaxTerms    int           `json:"max_terms"`
	Unseen      vocab.Unseen  `json:"unseen"`
	ParentKeys  int           `json:"parent_keys"`
	Appended    int           `json:"appended"`
	Retired     int           `json:"retired"`
	ByOrder     []orderView   `json:"by_order"`
	TopTerms    []termView    `json:"top_terms"`
	Seen        int64         `json:"seen"` // distinct keys counted at learn time; -1 when the spec does not say
	Cutoffs     *cutoffView   `json:"cutoff_effects,omitempty"`
	Pruning     *spec.Pruning `json:"pruning,omitempty"`
}

type orderView struct {
	Order string `json:"order"`
	Kept  int64  `json:"kept"`
	Seen  int64  `json:"seen"` // -1 when the spec does not say
}

type termView struct {
	Column  int    `json:"column"` // 1-based, as in the rows and the feature map
	Key     string `json:"key"`
	Docs    int64  `json:"docs"`
	Retired bool   `json:"retired,omitempty"`
}

// cutoffView tells how many counted keys other cutoffs would keep.
type cutoffView struct {
	// MinDocs rows vary --min-docs with --max-doc-share at the spec's
	// value; MaxDocShare rows vary --max-doc-share with --min-docs at the
	// spec's value. --max-terms is not applied.
	MinDocs     []cutoffRow `json:"min_docs"`
	MaxDocShare []cutoffRow `json:"max_doc_share"`
	// Note says where the figures come from.
	Note string `json:"note"`
}

type cutoffRow struct {
	Value float64 `json:"value"`
	// KeysMin and KeysMax bound the keys kept; equal when Exact.
	KeysMin int64 `json:"keys_min"`
	KeysMax int64 `json:"keys_max"`
	Exact   bool  `json:"exact"`
	Current bool  `json:"current,omitempty"` // the spec's own setting
}

type cautionView struct {
	Keys     int      `json:"keys"`
	Examples []string `json:"examples"`
}

// The cutoff values the table shows.
var (
	inspectMinDocs     = []int64{1, 2, 3, 5, 10, 20, 50, 100}
	inspectMaxDocShare = []float64{1.0, 0.5, 0.2, 0.1, 0.05}
)

func inspectSpec(s *spec.Spec, top int) *inspectView {
	ct := &s.Content
	iv := &inspectView{Fingerprint: s.Fingerprint, Parent: s.Parent, Tool: s.Tool, Schema: spec.SchemaVersion,
		Mode: ct.Mode, Columns: s.Columns(), Docs: ct.Docs}
	iv.Settings = settingsView{Input: ct.Input, Tokens: ct.Tokens,
		Stop: stopView{Sources: ct.Stop.Sources, Words: len(ct.Stop.Words), KeepNegations: ct.Stop.KeepNegations},
		Stem: ct.Stem, NGrams: ct.NGrams, Weights: weightsView{ct.Weights.TF, ct.Weights.IDF, ct.Weights.Norm},
		Labels: labelsView{Kind: ct.Labels.Kind, Map: ct.Labels.Map}, Hashing: ct.Hashing, Fields: ct.Fields}
	if iv.Settings.Stop.Sources == nil {
		iv.Settings.Stop.Sources = []string{}
	}
	v := ct.Vocabulary
	if v == nil {
		return iv
	}
	vv := &vocabView{Keys: len(v.Keys), MinDocs: v.MinDocs, MaxDocShare: v.MaxDocShare, MaxTerms: v.MaxTerms,
		Unseen: v.Unseen, ParentKeys: v.ParentKeys, Seen: -1, ByOrder: []orderView{}, TopTerms: []termView{}}
	if v.ParentKeys > 0 {
		vv.Appended = len(v.Keys) - v.ParentKeys
	}
	for _, r := range v.Retired {
		if r {
			vv.Retired++
		}
	}
	per := map[int]int64{}
	for _, o := range v.Orders {
		per[o]++
	}
	seenPer := map[int]int64{}
	if sn := v.Seen; sn != nil {
		vv.Seen = sn.Keys
		for i, o := range sn.Orders {
			if i < len(sn.OrderKeys) {
				seenPer[o] = sn.OrderKeys[i]
			}
		}
		vv.Pruning = sn.Pruning
	}
	var codes []int
	for k := range per {
		codes = append(codes, k)
	}
	for k := range seenPer {
		if _, ok := per[k]; !ok {
			codes = append(codes, k)
		}
	}
	sort.Ints(codes)
	for _, k := range codes {
		seen := int64(-1)
		if v.Seen != nil {
			seen = seenPer[k]
		}
		vv.ByOrder = append(vv.ByOrder, orderView{Order: ngram.Order(k).String(), Kept: per[k], Seen: seen})
	}
	// Top terms by document count (an extended spec's columns are not in
	// that order), ties by key bytes.
	idx := make([]int, len(v.Keys))
	for i := range idx {
		idx[i] = i
	}
	sort.Slice(idx, func(a, b int) bool {
		da, db := v.DocCounts[idx[a]], v.DocCounts[idx[b]]
		if da != db {
			return da > db
		}
		return v.Keys[idx[a]] < v.Keys[idx[b]]
	})
	for _, i := range idx[:min(top, len(idx))] {
		vv.TopTerms = append(vv.TopTerms, termView{Column: i + 1, Key: v.Keys[i], Docs: v.DocCounts[i], Retired: len(v.Retired) > i && v.Retired[i]})
	}
	if sn := v.Seen; sn != nil {
		vv.Cutoffs = cutoffTable(sn, ct.Docs, v)
	}
	iv.Vocabulary = vv
	var risky []string
	for _, k := range v.Keys {
		if looksPersonal(k) {
			risky = append(risky, k)
		}
	}
	if len(risky) > 0 {
		iv.Caution = &cautionView{Keys: len(risky), Examples: firstN(risky, 5)}
	}
	return iv
}

// cutoffTable works out the cutoff effects from the spec's summary of
// every counted key (vocab.Survivors).
func cutoffTable(sn *spec.Seen, docs int64, v *spec.Vocabulary) *cutoffView {
	cv := &cutoffView{MinDocs: []cutoffRow{}, MaxDocShare: []cutoffRow{}}
	// The kept keys' document counts are exact. Unless the spec extends
	// another, was pruned or was cut by --max-terms, they are every key
	// passing its own cutoffs, so stricter cutoffs can be counted on them.
	covered := v.ParentKeys == 0 && sn.Pruning == nil && (v.MaxTerms == 0 || len(v.Keys) < v.MaxTerms)
	row := func(value float64, cut vocab.Cutoffs, current bool) cutoffRow {
		if covered && cut.MinDocs >= v.MinDocs && cut.MaxDocShare <= v.MaxDocShare {
			var n int64
			for _, d := range v.DocCounts {
				if d >= cut.MinDocs && (docs <= 0 || float64(d)/float64(docs) <= cut.MaxDocShare) {
					n++
				}
			}
			return cutoffRow{Value: value, KeysMin: n, KeysMax: n, Exact: true, Current: current}
		}
		lo, hi := vocab.Survivors(sn.DocHistogram, sn.TopDocCounts, docs, cut)
		return cutoffRow{Value: value, KeysMin: lo, KeysMax: hi, Exact: lo == hi, Current: current}
	}
	for _, m := range inspectMinDocs {
		cv.MinDocs = append(cv.MinDocs, row(float64(m), vocab.Cutoffs{MinDocs: m, MaxDocShare: v.MaxDocShare}, m == v.MinDocs))
	}
	for _, f := range inspectMaxDocShare {
		cv.MaxDocShare = append(cv.MaxDocShare, row(f, vocab.Cutoffs{MinDocs: v.MinDocs, MaxDocShare: f}, f == v.MaxDocShare))
	}
	cv.Note = fmt.Sprintf("keys of the training corpus (%d documents) that would pass, before --max-terms; exact from the kept keys' document counts for cutoffs at least as strict as the spec's, otherwise from a histogram of document counts: exact for counts up to 16 and for the %d largest counts, bounded (keys_min to keys_max) in between", docs, spec.TopDocCountsKept)
	if v.ParentKeys > 0 {
		cv.Note += "; columns taken from the parent spec stay whatever the cutoffs"
	}
	if sn.Pruning != nil {
		cv.Note += fmt.Sprintf("; counted under a memory limit: keys found in at most %d documents may be missing and kept counts may be up to that much too low", sn.Pruning.MaxDocs)
	}
	return cv
}

func (iv *inspectView) writeText(w io.Writer) {
	fmt.Fprintf(w, "spec         %s\n", iv.Fingerprint)
	if iv.Parent != "" {
		fmt.Fprintf(w, "parent       %s\n", iv.Parent)
	}
	fmt.Fprintf(w, "written by   %s (schema %d)\n", iv.Tool, iv.Schema)
	fmt.Fprintf(w, "mode         %s\n", iv.Mode)
	fmt.Fprintf(w, "columns      %d\n", iv.Columns)
	fmt.Fprintf(w, "trained on   %d documents\n", iv.Docs)
	st := iv.Settings
	fmt.Fprintf(w, "\ninput        format %s, text %s", st.Input.Format, strings.Join(st.Input.Text, ", "))
	if st.Input.Label != "" {
		fmt.Fprintf(w, ", label %s", st.Input.Label)
	}
	if st.Input.ID != "" {
		fmt.Fprintf(w, ", id %s", st.Input.ID)
	}
	fmt.Fprintln(w)
	t := st.Tokens
	fmt.Fprintf(w, "tokens       unicode %s, case %s, accents %s, numbers %s, length %d-%d\n", t.Unicode, t.Case, t.Accents, t.Numbers, t.MinLen, t.MaxLen)
	stop := "none"
	if st.Stop.Words > 0 {
		neg := "negations kept"
		if !st.Stop.KeepNegations {
			neg = "negations dropped"
		}
		stop = fmt.Sprintf("%d words from %s, %s", st.Stop.Words, strings.Join(st.Stop.Sources, ", "), neg)
	}
	fmt.Fprintf(w, "stop words   %s\n", stop)
	fmt.Fprintf(w, "stem         %s\n", st.Stem)
	fmt.Fprintf(w, "n-grams      words %s, chars %s\n", st.NGrams.Words, st.NGrams.Chars)
	fmt.Fprintf(w, "weights      tf %s, idf %s, norm %s\n", st.Weights.TF, st.Weights.IDF, st.Weights.Norm)
	if st.Labels.Kind == "string" {
		fmt.Fprintf(w, "labels       ")
		for i, l := range st.Labels.Map {
			if i > 0 {
				fmt.Fprint(w, ", ")
			}
			fmt.Fprintf(w, "%s=%d", l, i+1)
		}
		fmt.Fprintln(w)
	} else {
		fmt.Fprintf(w, "labels       %s\n", st.Labels.Kind)
	}
	for i, f := range st.Fields {
		label := "             "
		if i == 0 {
			label = "table fields "
		}
		fmt.Fprintf(w, "%s%s\n", label, describeTableField(&f))
	}
	if h := st.Hashing; h != nil {
		fmt.Fprintf(w, "hashing      width %d, seed %d, signed %v\n", h.Width, h.Seed, h.Signed)
		return
	}
	v := iv.Vocabulary
	fmt.Fprintf(w, "vocabulary   %d keys; min-docs %d, max-doc-share %g, max-terms %d, unseen %s\n", v.Keys, v.MinDocs, v.MaxDocShare, v.MaxTerms, v.Unseen)
	if v.ParentKeys > 0 {
		fmt.Fprintf(w, "lineage      %d columns from the parent (%d of them retired), %d appended\n", v.ParentKeys, v.Retired, v.Appended)
	} else if v.Retired > 0 {
		fmt.Fprintf(w, "retired      %d columns\n", v.Retired)
	}
	fmt.Fprintf(w, "\nper order    kept")
	if v.Seen >= 0 {
		fmt.Fprintf(w, " of counted")
	}
	fmt.Fprintln(w)
	for _, o := range v.ByOrder {
		if o.Seen >= 0 {
			fmt.Fprintf(w, "  %-4s %10d of %d\n", o.Order, o.Kept, o.Seen)
		} else {
			fmt.Fprintf(w, "  %-4s %10d\n", o.Order, o.Kept)
		}
	}
	if len(v.TopTerms) > 0 {
		fmt.Fprintf(w, "\ntop %d terms by document count\n  column  docs     key\n", len(v.TopTerms))
		for _, t := range v.TopTerms {
			mark := ""
			if t.Retired {
				mark = "  (retired)"
			}
			fmt.Fprintf(w, "  %6d  %-8d %s%s\n", t.Column, t.Docs, t.Key, mark)
		}
	}
	if c := v.Cutoffs; c != nil {
		fmt.Fprintf(w, "\ncutoff effects: keys that would pass, of %d counted (before --max-terms)\n", v.Seen)
		fmt.Fprintf(w, "  --min-docs (max-doc-share %g)      --max-doc-share (min-docs %d)\n", v.MaxDocShare, v.MinDocs)
		for i := 0; i < max(len(c.MinDocs), len(c.MaxDocShare)); i++ {
			left := ""
			if i < len(c.MinDocs) {
				left = fmt.Sprintf("%6g  %s", c.MinDocs[i].Value, keysCell(c.MinDocs[i]))
			}
			right := ""
			if i < len(c.MaxDocShare) {
				right = fmt.Sprintf("%6g  %s", c.MaxDocShare[i].Value, keysCell(c.MaxDocShare[i]))
			}
			fmt.Fprintf(w, "  %-34s %s\n", left, right)
		}
		fmt.Fprintln(w, "  figures at least as strict as the spec's come from the kept keys' exact document counts; looser ones from a")
		fmt.Fprintf(w, "  histogram that is exact up to 16 documents and for the %d largest counts; ~ marks a range where it is not\n", spec.TopDocCountsKept)
		if v.ParentKeys > 0 {
			fmt.Fprintln(w, "  columns taken from the parent spec stay whatever the cutoffs")
		}
	} else {
		fmt.Fprintln(w, "\ncutoff effects: not recorded in this spec (learned before bowline kept a document-count histogram)")
	}
	if p := v.Pruning; p != nil {
		fmt.Fprintf(w, "\npruned       learned under a memory limit (%s, %d keys at once): %d evictions (a key can be evicted more than once) holding %d document counts;\n", p.Method, p.Capacity, p.Evicted, p.EvictedDocs)
		fmt.Fprintf(w, "             no pruned key was in more than %d documents; %d kept counts may be up to that much too low\n", p.MaxDocs, p.InexactKeys)
	}
	if c := iv.Caution; c != nil {
		fmt.Fprintf(w, "\ncaution: %d kept keys look like e-mail addresses, URLs with queries or long digit runs, e.g. %s\n", c.Keys, strings.Join(c.Examples, ", "))
		fmt.Fprintln(w, "a spec carries strings from the training text; raise --min-docs or use --hash before shipping it")
	}
}

// keysCell shows a cutoff row's key count: exact, or a range marked ~.
func keysCell(r cutoffRow) string {
	s := fmt.Sprintf("%d", r.KeysMin)
	if !r.Exact {
		s = fmt.Sprintf("%d~%d", r.KeysMin, r.KeysMax)
	}
	if r.Current {
		s += "  (this spec)"
	}
	return s
}

var personal = regexp.MustCompile(`[^\s@]+@[^\s@]+\.[a-z]{2,}|https?\S*\?\S+|\d{7,}`)

func looksPersonal(k string) bool { return personal.MatchString(k) }

func firstN(s []string, n int) []string {
	if len(s) > n {
		return s[:n]
	}
	return s
}

// describeTableField says in one line what a table field's columns hold.
func describeTableField(f *spec.TableField) string {
	switch {
	case f.Category != nil:
		g := f.Category
		if len(g.Levels) == 0 && g.MinDocs == 0 {
			return fmt.Sprintf("%s: category, hashed as %s=LEVEL (no level stored)", f.Name, f.Name)
		}
		shown := g.Levels
		if len(shown) > 8 {
			shown = append(shown[:8:8], "…")
		}
		return fmt.Sprintf("%s: category, %d levels (%s) + other (%d folded below min-docs %d), missing, unseen",
			f.Name, len(g.Levels), strings.Join(shown, ", "), len(g.OtherHashes), g.MinDocs)
	case f.Number != nil:
		n := f.Number
		var tr []string
		if n.Log {
			tr = append(tr, "log")
		}
		if n.Standard {
			tr = append(tr, "standard")
		}
		if len(tr) == 0 {
			tr = []string{"as read"}
		}
		d := fmt.Sprintf("%s: number, %s; mean %.6g, sd %.6g (after log, population), range %g..%g, %d of %d training values missing",
			f.Name, strings.Join(tr, ","), n.Mean, n.SD, n.Min, n.Max, n.MissingDocs, n.Docs+n.MissingDocs)
		if len(n.Sentinels) > 0 {
			d += "; missing also: " + strings.Join(n.Sentinels, " ")
		}
		return d
	case f.Time != nil:
		return fmt.Sprintf("%s: time, layout %q in %s; hour, day of week, day of year (sin, cos) + missing", f.Name, f.Time.Layout, f.Time.Zone)
	}
	return f.Name + ": " + string(f.Kind)
}
