package sweep

import (
	"cmp"
	"slices"

	"github.com/bowline/bowline/hashing"
	"github.com/bowline/bowline/internal/learn"
	"github.com/bowline/bowline/internal/logreg"
	"github.com/bowline/bowline/vocab"
	"github.com/bowline/bowline/weight"
)

// byBucket returns the training key ids sorted by their bucket at width w
// (then by id), and every training key's bucket.
func byBucket(t *keyTable, w uint64) (order []int32, bucket []uint64) {
	bucket = make([]uint64, t.train)
	order = make([]int32, t.train)
	for i := range bucket {
		bucket[i] = hashing.BucketOf(t.sums[i], w)
		order[i] = int32(i)
	}
	slices.SortFunc(order, func(a, b int32) int {
		if c := cmp.Compare(bucket[a], bucket[b]); c != 0 {
			return c
		}
		return cmp.Compare(a, b)
	})
	return order, bucket
}

// runs calls fn for each bucket's run of key ids in order.
func runs(order []int32, bucket []uint64, fn func(ids []int32)) {
	for i := 0; i < len(order); {
		j := i + 1
		for j < len(order) && bucket[order[j]] == bucket[order[i]] {
			j++
		}
		fn(order[i:j])
		i = j
	}
}

// collisions measures width w exactly from the distinct training keys.
func collisions(t *keyTable, w uint64) WidthRow {
	r := WidthRow{Width: w, Keys: int64(t.train)}
	order, bucket := byBucket(t, w)
	var total, shared int64
	for _, n := range t.count[:t.train] {
		total += n
	}
	runs(order, bucket, func(ids []int32) {
		r.Occupied++
		if len(ids) > 1 {
			r.CollidingKeys += int64(len(ids))
			for _, id := range ids {
				shared += t.count[id]
			}
		}
	})
	if r.Keys > 0 {
		r.CollisionRate = float64(r.CollidingKeys) / float64(r.Keys)
	}
	if total > 0 {
		r.SharedShare = float64(shared) / float64(total)
	}
	r.ExpectedCollisionRate = hashing.ExpectedCollisionRate(float64(r.Keys), float64(w))
	r.ExpectedOccupied = hashing.ExpectedOccupied(float64(r.Keys), float64(w))
	return r
}

// explain lists the n buckets at width w holding the most distinct keys
// (ties: more occurrences, then the lower bucket), each with its keys by
// descending occurrences, then key bytes. Buckets with one key are not
// listed.
func explain(t *keyTable, w uint64, n int) *Explain {
	order, bucket := byBucket(t, w)
	var bs []Bucket
	runs(order, bucket, func(ids []int32) {
		if len(ids) < 2 {
			return
		}
		b := Bucket{Bucket: bucket[ids[0]]}
		for _, id := range ids {
			b.Occurrences += t.count[id]
			b.Keys = append(b.Keys, KeyCount{Key: t.keys[id], Count: t.count[id], Docs: t.docs[id]})
		}
		bs = append(bs, b)
	})
	slices.SortFunc(bs, func(a, b Bucket) int {
		if c := cmp.Compare(len(b.Keys), len(a.Keys)); c != 0 {
			return c
		}
		if c := cmp.Compare(b.Occurrences, a.Occurrences); c != 0 {
			return c
		}
		return cmp.Compare(a.Bucket, b.Bucket)
	})
	if len(bs) > n {
		bs = bs[:n]
	}
	for _, b := range bs {
		slices.SortFunc(b.Keys, func(x, y KeyCount) int {
			if c := cmp.Compare(y.Count, x.Count); c != 0 {
				return c
			}
			return cmp.Compare(x.Key, y.Key)
		})
	}
	return &Explain{Width: w, Buckets: bs}
}

// hashedDatasets builds the training and held-out rows of width w. Columns
// are the buckets that occur in either corpus, renumbered in bucket order,
// so rows hold the same values in the same order as bowline encode writes
// with a spec learned with --hash w.
func hashedDatasets(t *keyTable, s *learn.Settings, w uint64, signed bool, tr, te *docSet, trY, teY []float64) (*logreg.Dataset, *logreg.Dataset) {
	n := len(t.keys)
	bucket := make([]uint64, n)
	order := make([]int32, n)
	for i := range bucket {
		bucket[i] = hashing.BucketOf(t.sums[i], w)
		order[i] = int32(i)
	}
	slices.SortFunc(order, func(a, b int32) int { return cmp.Compare(bucket[a], bucket[b]) })
	col := make([]int32, n)
	cols := 0
	for i, id := range order {
		if i > 0 && bucket[id] != bucket[order[i-1]] {
			cols++
		}
		col[id] = int32(cols)
	}
	if n > 0 {
		cols++
	}
	sign := func(id int32) float64 {
		if signed && t.sums[id]>>63 == 1 {
			return -1
		}
		return 1
	}
	var idf []float64
	if s.IDF != weight.IDFNone {
		df := make([]int64, cols)
		mark := make([]int32, cols)
		for i := range mark {
			mark[i] = -1
		}
		for d := 0; d < tr.len(); d++ {
			for j := tr.start[d]; j < tr.start[d+1]; j++ {
				c := col[tr.ids[j]]
				if mark[c] != int32(d) {
					mark[c] = int32(d)
					df[c]++
				}
			}
		}
		idf = make([]float64, cols)
		docs := int64(tr.len())
		for c := range idf {
			idf[c] = s.IDF.Value(docs, df[c])
		}
	}
	colOf := func(id int32) (int, float64) { return int(col[id]), sign(id) }
	a := &logreg.Dataset{Rows: rowsOf(tr, colOf, s.TF, idf, s.Norm), Labels: trY, Columns: cols}
	b := &logreg.Dataset{Rows: rowsOf(te, colOf, s.TF, idf, s.Norm), Labels: teY, Columns: cols}
	return a, b
}

// vocabBuilder maps key ids to vocabulary columns.
type vocabBuilder struct {
	t       *keyTable
	s       *learn.Settings
	v       *vocab.Vocabulary
	cut     vocab.CutReport
	col     []int32 // per key id: column, or −1 for an unseen key
	columns int
	idf     []float64
	docs    int64
}

func newVocabBuilder(t *keyTable, counts *vocab.Counts, s *learn.Settings) *vocabBuilder {
	v, cut := counts.Build(s.Cutoffs)
	b := &vocabBuilder{t: t, s: s, v: v, cut: cut, col: make([]int32, len(t.keys)), docs: counts.Docs()}
	for i := range b.col {
		b.col[i] = -1
	}
	for i, term := range v.Terms {
		b.col[t.ids[term.Key]] = int32(i)
	}
	b.columns = v.Len() + s.Unseen.Columns()
	if s.IDF != weight.IDFNone {
		df := make([]int64, v.Len())
		for i, term := range v.Terms {
			df[i] = term.Docs
		}
		b.idf = weight.IDFTable(s.IDF, b.docs, df)
		for len(b.idf) < b.columns {
			b.idf = append(b.idf, 1)
		}
	}
	return b
}

// colOf is the column of a key as bowline's encoder places it, with the
// settings' unseen-key policy.
func (b *vocabBuilder) colOf(uh *hashing.Hasher) func(id int32) (int, float64) {
	base := b.v.Len()
	return func(id int32) (int, float64) {
		if c := b.col[id]; c >= 0 {
			return int(c), 1
		}
		switch b.s.Unseen.Mode {
		case vocab.UnseenCount:
			return base, 1
		case vocab.UnseenHash:
			k, _ := uh.Bucket([]byte(b.t.keys[id]))
			return base + int(k), 1
		}
		return -1, 0
	}
}

func (b *vocabBuilder) datasets(tr, te *docSet, trY, teY []float64) (*logreg.Dataset, *logreg.Dataset) {
	var uh *hashing.Hasher
	if b.s.Unseen.Mode == vocab.UnseenHash {
		uh, _ = hashing.New(uint64(b.s.Unseen.Buckets), 0, false)
	}
	colOf := b.colOf(uh)
	x := &logreg.Dataset{Rows: rowsOf(tr, colOf, b.s.TF, b.idf, b.s.Norm), Labels: trY, Columns: b.columns}
	y := &logreg.Dataset{Rows: rowsOf(te, colOf, b.s.TF, b.idf, b.s.Norm), Labels: teY, Columns: b.columns}
	return x, y
}

func (b *vocabBuilder) row(tr, te *docSet, classes int) VocabRow {
	r := VocabRow{Terms: int64(b.v.Len()), Columns: int64(b.columns), BelowMinDocs: int64(b.cut.BelowMinDocs),
		AboveMaxShare: int64(b.cut.AboveMaxShare), OverMaxTerms: int64(b.cut.OverMaxTerms)}
	var kept int64
	for id := 0; id < b.t.train; id++ {
		if b.col[id] >= 0 {
			kept += b.t.count[id]
		}
	}
	if tr.occ > 0 {
		r.KeptShare = float64(kept) / float64(tr.occ)
	}
	if te != nil {
		var oov float64
		for j, id := range te.ids {
			if b.col[id] < 0 {
				oov += te.counts[j]
			}
		}
		share := 0.0
		if te.occ > 0 {
			share = oov / float64(te.occ)
		}
		r.HoldoutOOVShare = &share
	}
	for _, term := range b.v.Terms {
		r.KeyBytes += int64(len(term.Key))
	}
	r.IndexBytes = r.KeyBytes + r.Terms*IndexEntryBytes
	r.ModelBytes = r.Columns * WeightBytes * int64(classes)
	r.Bytes = r.ModelBytes + r.IndexBytes
	return r
}
