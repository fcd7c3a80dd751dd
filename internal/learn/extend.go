package learn

import (
	"bufio"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"sort"
	"strconv"
	"strings"

	"github.com/bowline/bowline/internal/analysis"
	"github.com/bowline/bowline/internal/atomicfile"
	"github.com/bowline/bowline/spec"
	"github.com/bowline/bowline/vocab"
)

// Extension is the account of an index-stable refresh (NewExtend).
type Extension struct {
	// Parent is the fingerprint of the spec extended.
	Parent string
	// ParentKeys is the number of the parent's columns, all kept at their
	// index: Kept of them pass the cutoffs on the new corpus and Retired
	// do not. Revived counts columns retired in the parent that pass again.
	ParentKeys, Kept, Retired, Revived int
	// Appended counts new keys added after the parent's columns;
	// OverMaxTerms the new keys that passed the cutoffs but were left out
	// by MaxTerms.
	Appended, OverMaxTerms int
	// NewLabels lists label values appended to the parent's label map.
	NewLabels []string
}

// NewExtend prepares an index-stable refresh of parent: the new
// spec takes every setting from parent except the cutoffs cut and the
// corpus fields in; every parent column keeps its index and key (a key
// that fails cut on the new corpus stays, marked retired); new keys that
// pass cut follow, in bowline's column order, at most cut.MaxTerms of
// them; document counts and idf come from the new corpus; string labels
// keep their numbers and new ones are appended. The new spec's Parent is
// parent's fingerprint.
//
// Only vocabulary specs can be extended: a hashing spec has no columns to
// keep stable (every key keeps its bucket under the same settings, so
// relearning with them refreshes the idf). A spec whose unseen keys have
// columns (unseen count or hash:K) is refused too: those columns come right
// after the vocabulary, where appended keys would go.
func NewExtend(parent *spec.Spec, cut vocab.Cutoffs, in spec.Input) (*Learner, error) {
	pc := &parent.Content
	if pc.Mode != spec.ModeVocabulary || pc.Vocabulary == nil {
		return nil, errors.New("a hashing spec has no vocabulary columns to keep stable; learn again with the same --hash settings to refresh its idf")
	}
	if len(pc.Fields) > 0 {
		return nil, errors.New("the spec has table fields whose columns follow its vocabulary, where appended keys would go, so it cannot be extended")
	}
	if u := pc.Vocabulary.Unseen; u.Mode != vocab.UnseenDrop {
		return nil, fmt.Errorf("the spec puts unseen keys in columns right after its vocabulary (--unseen %s); appended keys would take those columns, so it cannot be extended", u)
	}
	if err := cut.Validate(); err != nil {
		return nil, err
	}
	if len(in.Text) != len(pc.Input.Text) {
		return nil, fmt.Errorf("the spec was learned on %d text field(s) (%s), the new corpus gives %d", len(pc.Input.Text), strings.Join(pc.Input.Text, ", "), len(in.Text))
	}
	c := *pc
	c.Input = in
	c.Docs = 0
	c.Vocabulary = &spec.Vocabulary{MinDocs: cut.MinDocs, MaxDocShare: cut.MaxDocShare, MaxTerms: cut.MaxTerms, Unseen: pc.Vocabulary.Unseen}
	c.Weights = spec.Weights{TF: pc.Weights.TF, IDF: pc.Weights.IDF, Norm: pc.Weights.Norm}
	c.Labels = spec.Labels{}
	a, err := analysis.New(&c)
	if err != nil {
		return nil, err
	}
	return &Learner{content: c, analysis: a, idf: c.Weights.IDF, cutoffs: cut, parent: parent}, nil
}

// Extension returns the refresh account once Finish has run (nil when the
// learner does not extend a spec).
func (l *Learner) Extension() *Extension { return l.ext }

// extend fills vv with the parent's columns followed by the appended ones.
func (l *Learner) extend(vv *spec.Vocabulary, counts *vocab.Counts) error {
	old := l.parent.Content.Vocabulary
	x := &Extension{Parent: l.parent.Fingerprint, ParentKeys: len(old.Keys)}
	all := l.cutoffs
	all.MaxTerms = 0
	pass, cut := counts.Build(all)
	l.extCut = cut
	n := len(old.Keys)
	vv.Keys = append(make([]string, 0, n), old.Keys...)
	vv.Orders = append(make([]int, 0, n), old.Orders...)
	vv.DocCounts = make([]int64, n)
	retired := make([]bool, n)
	inOld := make(map[string]struct{}, n)
	for i, k := range old.Keys {
		inOld[k] = struct{}{}
		t, _ := counts.Term(k)
		vv.DocCounts[i] = t.Docs
		if _, ok := pass.Lookup([]byte(k)); ok {
			x.Kept++
			if len(old.Retired) == n && old.Retired[i] {
				x.Revived++
			}
		} else {
			retired[i] = true
			x.Retired++
		}
	}
	for _, t := range pass.Terms {
		if _, ok := inOld[t.Key]; ok {
			continue
		}
		if l.cutoffs.MaxTerms > 0 && x.Appended >= l.cutoffs.MaxTerms {
			x.OverMaxTerms++
			continue
		}
		vv.Keys = append(vv.Keys, t.Key)
		vv.Orders = append(vv.Orders, t.Order)
		vv.DocCounts = append(vv.DocCounts, t.Docs)
		retired = append(retired, false)
		x.Appended++
	}
	if x.Retired > 0 {
		vv.Retired = retired
	}
	vv.ParentKeys = n
	l.ext = x
	return nil
}

// extendLabels keeps the parent's label numbers and appends new string
// labels. The spec's label map must stay sorted by bytes (Validate), so a
// new label that sorts before a parent label is refused.
func extendLabels(parent, now spec.Labels) (spec.Labels, error) {
	out := spec.Labels{Kind: parent.Kind, Map: parent.Map, Values: now.Values, Counts: now.Counts}
	switch parent.Kind {
	case spec.LabelsNone:
		if now.Kind != spec.LabelsNone {
			return out, errors.New("the spec was learned without labels; the new corpus has a label field")
		}
	case spec.LabelsNumber:
		if now.Kind == spec.LabelsString {
			for _, v := range now.Values {
				if _, err := strconv.ParseFloat(strings.TrimSpace(v), 64); err != nil {
					return out, fmt.Errorf("the spec's labels are numbers; the new corpus has label %q", v)
				}
			}
		}
		if now.Kind == spec.LabelsNone {
			return out, errors.New("the spec was learned with labels; the new corpus has no label field")
		}
	case spec.LabelsString:
		if now.Kind == spec.LabelsNone {
			return out, errors.New("the spec was learned with labels; the new corpus has no label field")
		}
		known := make(map[string]bool, len(parent.Map))
		for _, m := range parent.Map {
			known[m] = true
		}
		out.Map = append([]string(nil), parent.Map...)
		for _, v := range now.Values { // sorted by bytes
			if known[v] {
				continue
			}
			if last := out.Map[len(out.Map)-1]; v < last {
				return out, fmt.Errorf("new label %q sorts before label %q of the spec; appending it would break the spec's sorted label map, so learn a new spec", v, last)
			}
			out.Map = append(out.Map, v)
		}
	}
	return out, nil
}

// Shard is the exact counts of one part of a training corpus before any
// cutoff, with the settings they were counted under and the label tallies:
// what bowline learn --counts-out writes and bowline merge reads. Its file
// is a vocab count shard (see package vocab) whose header settings are the
// spec content without learned numbers, cutoffs at their defaults.
type Shard struct {
	// Settings is the spec content the counts were made under, with no
	// learned numbers and the cutoffs at their defaults.
	Settings spec.Content
	// Counts are the exact counts; Counts.Docs() the documents.
	Counts *vocab.Counts
	// Labels holds the label tallies in Values and Counts.
	Labels spec.Labels
}

// Shard returns the merged counts of w as a shard, instead of applying the
// cutoffs. labels are the label tallies. The counts must be exact and the
// learner must not extend a spec.
func (l *Learner) Shard(w *Worker, labels spec.Labels) (*Shard, error) {
	if l.content.Mode != spec.ModeVocabulary {
		return nil, errors.New("count shards hold vocabulary counts; hashing mode has none")
	}
	if l.parent != nil {
		return nil, errors.New("count shards cannot extend a spec; extend when merging is done")
	}
	if len(l.content.Fields) > 0 {
		return nil, errors.New("count shards hold text counts only; the statistics of table fields (--category, --number, --time) are learned in one pass")
	}
	w.settle()
	if p := w.counts.Pruning(); p.Evicted > 0 {
		return nil, errors.New("count shards hold exact counts; these were pruned under a memory limit")
	}
	c := l.content
	v := *c.Vocabulary
	def := vocab.DefaultCutoffs()
	v.MinDocs, v.MaxDocShare, v.MaxTerms = def.MinDocs, def.MaxDocShare, def.MaxTerms
	c.Vocabulary = &v
	return &Shard{Settings: c, Counts: w.counts, Labels: spec.Labels{Values: labels.Values, Counts: labels.Counts}}, nil
}

// Write writes the shard in the count shard format (gzip'd JSON lines).
func (sh *Shard) Write(w io.Writer) error {
	settings, err := sh.Settings.Canonical()
	if err != nil {
		return err
	}
	h := vocab.ShardHeader{Tool: "bowline " + spec.ToolVersion, Settings: settings, LabelValues: sh.Labels.Values, LabelCounts: sh.Labels.Counts}
	return vocab.WriteShard(w, h, sh.Counts)
}

// Save writes the shard to path atomically.
func (sh *Shard) Save(path string) error {
	return atomicfile.WriteFile(path, sh.Write)
}

// MergeShards reads count shards and merges them into one. It refuses a
// shard whose settings differ from the first one's, naming the first
// difference, and a damaged shard with a *vocab.ShardError.
func MergeShards(paths []string) (*Shard, error) {
	if len(paths) == 0 {
		return nil, errors.New("no count shards to merge")
	}
	var out *Shard
	labels := map[string]int64{}
	for _, p := range paths {
		f, err := os.Open(p)
		if err != nil {
			return nil, err
		}
		counts := vocab.NewCounts()
		if out != nil {
			counts = out.Counts
		}
		h, err := vocab.ReadShard(bufio.NewReader(f), p, counts)
		f.Close()
		if err != nil {
			return nil, err
		}
		var c spec.Content
		dec := json.NewDecoder(strings.NewReader(string(h.Settings)))
		dec.DisallowUnknownFields()
		if err := dec.Decode(&c); err != nil {
			return nil, &vocab.ShardError{File: p, Line: 1, Err: fmt.Errorf("settings are not a bowline spec's: %v", err)}
		}
		if c.Mode != spec.ModeVocabulary || c.Vocabulary == nil {
			return nil, &vocab.ShardError{File: p, Line: 1, Err: fmt.Errorf("settings are not in vocabulary mode")}
		}
		if out == nil {
			out = &Shard{Settings: c, Counts: counts}
		} else if d := spec.SettingsDiff(&out.Settings, &c, true); d != "" {
			return nil, fmt.Errorf("count shard %s was counted with other settings than %s: %s", p, paths[0], d)
		}
		for i, v := range h.LabelValues {
			labels[v] += h.LabelCounts[i]
		}
	}
	for v := range labels {
		out.Labels.Values = append(out.Labels.Values, v)
	}
	sort.Strings(out.Labels.Values)
	for _, v := range out.Labels.Values {
		out.Labels.Counts = append(out.Labels.Counts, labels[v])
	}
	return out, nil
}

// Learn applies cut to the shard's counts and returns the sealed spec:
// the same spec, fingerprint included, as learning on the shards'
// corpora in one pass with the same settings and cutoffs.
func (sh *Shard) Learn(cut vocab.Cutoffs) (*spec.Spec, vocab.CutReport, error) {
	c := sh.Settings
	v := *c.Vocabulary
	v.MinDocs, v.MaxDocShare, v.MaxTerms = cut.MinDocs, cut.MaxDocShare, cut.MaxTerms
	c.Vocabulary = &v
	if err := cut.Validate(); err != nil {
		return nil, vocab.CutReport{}, err
	}
	a, err := analysis.New(&c)
	if err != nil {
		return nil, vocab.CutReport{}, err
	}
	l := &Learner{content: c, analysis: a, idf: c.Weights.IDF, cutoffs: cut}
	hasLabel := c.Input.Label != ""
	lab := LabelsFrom(sh.Labels.Values, hasLabel)
	if hasLabel {
		lab.Values, lab.Counts = sh.Labels.Values, sh.Labels.Counts
	}
	return l.Finish(&Worker{l: l, counts: sh.Counts, docs: sh.Counts.Docs()}, lab)
}
