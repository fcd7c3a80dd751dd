package vocab

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"strings"
	"sync"
)

// Cutoffs select which counted keys become columns.
type Cutoffs struct {
	// MinDocs drops keys found in fewer documents. It must be at least 1.
	MinDocs int64
	// MaxDocShare drops keys whose document count divided by the number
	// of documents is above it. It must be in (0, 1]; 1 keeps every key.
	MaxDocShare float64
	// MaxTerms keeps only that many keys, those with the highest document
	// counts (ties broken by ascending key bytes). 0 means no limit.
	MaxTerms int
}

// DefaultCutoffs returns cutoffs that keep every key:
// MinDocs 1, MaxDocShare 1, MaxTerms 0.
func DefaultCutoffs() Cutoffs {
	return Cutoffs{MinDocs: 1, MaxDocShare: 1}
}

// Validate reports whether the cutoffs are usable by Build.
func (c Cutoffs) Validate() error {
	if c.MinDocs < 1 {
		return fmt.Errorf("vocab: min docs %d is below 1", c.MinDocs)
	}
	if !(c.MaxDocShare > 0 && c.MaxDocShare <= 1) {
		return fmt.Errorf("vocab: max doc share %v is not in (0, 1]", c.MaxDocShare)
	}
	if c.MaxTerms < 0 {
		return fmt.Errorf("vocab: max terms %d is negative", c.MaxTerms)
	}
	return nil
}

// CutReport counts the keys each cutoff removed, in the order Build
// applies them. Seen = BelowMinDocs + AboveMaxShare + OverMaxTerms + Kept.
type CutReport struct {
	Seen          int // distinct keys counted
	BelowMinDocs  int // removed by MinDocs
	AboveMaxShare int // removed by MaxDocShare (among keys passing MinDocs)
	OverMaxTerms  int // removed by MaxTerms (among keys passing both above)
	Kept          int // keys that became columns
}

// Term is one column of a Vocabulary.
type Term struct {
	Key   string // feature key
	Order int    // n-gram order code given to Counts.Add
	Docs  int64  // document count in the counted corpus
	Count int64  // occurrence count in the counted corpus
}

// Vocabulary maps feature keys to column indices.
type Vocabulary struct {
	// Terms holds the columns: Terms[i] is column i. It must not be
	// modified once the Vocabulary is in use.
	Terms []Term

	index map[string]int32 // built on first use after Build
	once  sync.Once
}

// Build applies the cutoffs and returns the kept keys as a Vocabulary,
// with a report of what each cutoff removed. The cutoffs apply in order:
// MinDocs, then MaxDocShare (document count / Docs(); skipped when no
// document is finished), then MaxTerms.
//
// Column order, which is bowline's column order everywhere: descending
// document count, then ascending key bytes. It depends only on the counts,
// never on the order keys were added or shards merged. MaxTerms keeps the
// first MaxTerms keys of that order.
//
// Keys of an unfinished document are included; call EndDoc first. Build
// panics if cut.Validate reports an error.
func (c *Counts) Build(cut Cutoffs) (*Vocabulary, CutReport) {
	if err := cut.Validate(); err != nil {
		panic(err)
	}
	rep := CutReport{Seen: len(c.keys)}
	keep := make([]int32, 0, len(c.keys))
	n := float64(c.ndocs)
	for i, s := range c.stats {
		if s.docs < cut.MinDocs {
			rep.BelowMinDocs++
			continue
		}
		// Division, not docs > share*n: the quotient is the correctly
		// rounded ratio, so a share written as the exact ratio (0.3 for
		// 3 of 10) compares equal and the key is kept.
		if c.ndocs > 0 && float64(s.docs)/n > cut.MaxDocShare {
			rep.AboveMaxShare++
			continue
		}
		keep = append(keep, int32(i))
	}
	c.sortColumns(keep)
	if cut.MaxTerms > 0 && len(keep) > cut.MaxTerms {
		rep.OverMaxTerms = len(keep) - cut.MaxTerms
		keep = keep[:cut.MaxTerms]
	}
	rep.Kept = len(keep)
	v := &Vocabulary{Terms: make([]Term, len(keep))}
	for col, i := range keep {
		s := c.stats[i]
		v.Terms[col] = Term{Key: c.keys[i], Order: int(s.order), Docs: s.docs, Count: s.count}
	}
	return v, rep
}

// sortColumns sorts key positions into column order: descending document
// count, then ascending key bytes. Each key's first 8 bytes are compared as
// one integer first (big endian, zero padded: an order consistent with the
// bytes'), so most comparisons touch neither the key text nor a pointer.
func (c *Counts) sortColumns(keep []int32) {
	type item struct {
		docs int64
		pre  uint64
		i    int32
	}
	items := make([]item, len(keep))
	for j, i := range keep {
		k := c.keys[i]
		var pre uint64
		for b := 0; b < 8; b++ {
			pre <<= 8
			if b < len(k) {
				pre |= uint64(k[b])
			}
		}
		items[j] = item{c.stats[i].docs, pre, i}
	}
	less := func(a, b item) int {
		if a.docs != b.docs {
			if a.docs > b.docs {
				return -1
			}
			return 1
		}
		if a.pre != b.pre {
			if a.pre < b.pre {
				return -1
			}
			return 1
		}
		return strings.Compare(c.keys[a.i], c.keys[b.i])
	}
	if len(items) < parallelSortItems {
		slices.SortFunc(items, less)
		for j := range items {
			keep[j] = items[j].i
		}
		return
	}
	// Two halves sorted at once, then merged: the order is total (keys
	// are distinct), so the result is the same as one sort's.
	h := len(items) / 2
	lo, hi := items[:h], items[h:]
	var wg sync.WaitGroup
	wg.Add(1)
	go func() {
		defer wg.Done()
		slices.SortFunc(lo, less)
	}()
	slices.SortFunc(hi, less)
	wg.Wait()
	j := 0
	for len(lo) > 0 && len(hi) > 0 {
		if less(lo[0], hi[0]) <= 0 {
			keep[j], lo = lo[0].i, lo[1:]
		} else {
			keep[j], hi = hi[0].i, hi[1:]
		}
		j++
	}
	for _, it := range lo {
		keep[j] = it.i
		j++
	}
	for _, it := range hi {
		keep[j] = it.i
		j++
	}
}

// parallelSortItems is the number of columns from which sortColumns sorts
// on two goroutines.
const parallelSortItems = 1 << 15

// New returns a Vocabulary with the given terms as columns, in the given
// order (as stored in a spec). It copies terms. A key that appears twice
// is an error.
func New(terms []Term) (*Vocabulary, error) {
	if len(terms) > math.MaxInt32 {
		return nil, errors.New("vocab: more than 2^31-1 terms")
	}
	v := &Vocabulary{
		Terms: slices.Clone(terms),
		index: make(map[string]int32, len(terms)),
	}
	v.once.Do(func() {})
	for i, t := range v.Terms {
		if j, dup := v.index[t.Key]; dup {
			return nil, fmt.Errorf("vocab: term %d: key %q already at column %d", i, t.Key, j)
		}
		v.index[t.Key] = int32(i)
	}
	if v.Terms == nil {
		v.Terms = []Term{}
	}
	return v, nil
}

// Len returns the number of columns.
func (v *Vocabulary) Len() int { return len(v.Terms) }

// Lookup returns the column of key, and whether the key is in the
// vocabulary. It does not allocate.
func (v *Vocabulary) Lookup(key []byte) (int, bool) {
	v.once.Do(func() {
		v.index = make(map[string]int32, len(v.Terms))
		for i, t := range v.Terms {
			v.index[t.Key] = int32(i)
		}
	})
	i, ok := v.index[string(key)]
	return int(i), ok
}
