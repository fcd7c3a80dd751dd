package vocab

import (
	"fmt"
	"math"
	"math/rand/v2"
	"reflect"
	"slices"
	"strings"
	"testing"
)

// corpus counts documents given as space-separated keys; the order code
// of a key is its length.
func corpus(docs ...string) *Counts {
	c := NewCounts()
	for _, d := range docs {
		for _, k := range strings.Fields(d) {
			c.Add([]byte(k), len(k))
		}
		c.EndDoc()
	}
	return c
}

// cutCorpus is a hand-made corpus of 10 documents. Key doc counts:
// the 10, bike 6, dock 5, app 3, fee 3, rain 2, aa 1, zz 1. Document i
// holds every key whose doc count is above i; document 0 also has "bike"
// three times, so bike's count is 8.
func cutCorpus() *Counts {
	df := []struct {
		key  string
		docs int
	}{{"the", 10}, {"bike", 6}, {"dock", 5}, {"app", 3}, {"fee", 3}, {"rain", 2}, {"aa", 1}, {"zz", 1}}
	var docs []string
	for i := range 10 {
		var d []string
		for _, k := range df {
			if i < k.docs {
				d = append(d, k.key)
			}
		}
		if i == 0 {
			d = append(d, "bike", "bike")
		}
		docs = append(docs, strings.Join(d, " "))
	}
	return corpus(docs...)
}

func keys(v *Vocabulary) string {
	var s []string
	for _, t := range v.Terms {
		s = append(s, t.Key)
	}
	return strings.Join(s, " ")
}

func TestBuildCutoffs(t *testing.T) {
	c := cutCorpus()
	if c.Docs() != 10 || c.Len() != 8 {
		t.Fatalf("Docs %d Len %d, want 10 8", c.Docs(), c.Len())
	}
	for _, tc := range []struct {
		name string
		cut  Cutoffs
		want string
		rep  CutReport
	}{
		{"none", DefaultCutoffs(), "the bike dock app fee rain aa zz",
			CutReport{Seen: 8, Kept: 8}},
		{"min-docs 2", Cutoffs{MinDocs: 2, MaxDocShare: 1}, "the bike dock app fee rain",
			CutReport{Seen: 8, BelowMinDocs: 2, Kept: 6}},
		{"min-docs 4", Cutoffs{MinDocs: 4, MaxDocShare: 1}, "the bike dock",
			CutReport{Seen: 8, BelowMinDocs: 5, Kept: 3}},
		// the 10/10 = 1.0 and bike 6/10 = 0.6 are above 0.5; dock 5/10 = 0.5
		// equals it and stays.
		{"max-doc-share 0.5", Cutoffs{MinDocs: 1, MaxDocShare: 0.5}, "dock app fee rain aa zz",
			CutReport{Seen: 8, AboveMaxShare: 2, Kept: 6}},
		// 3/10 = 0.3 exactly as written: app and fee stay.
		{"max-doc-share 0.3", Cutoffs{MinDocs: 1, MaxDocShare: 0.3}, "app fee rain aa zz",
			CutReport{Seen: 8, AboveMaxShare: 3, Kept: 5}},
		// app and fee tie at 3 docs: "app" < "fee" by bytes.
		{"max-terms 4", Cutoffs{MinDocs: 1, MaxDocShare: 1, MaxTerms: 4}, "the bike dock app",
			CutReport{Seen: 8, OverMaxTerms: 4, Kept: 4}},
		{"max-terms 7", Cutoffs{MinDocs: 1, MaxDocShare: 1, MaxTerms: 7}, "the bike dock app fee rain aa",
			CutReport{Seen: 8, OverMaxTerms: 1, Kept: 7}},
		{"max-terms above size", Cutoffs{MinDocs: 1, MaxDocShare: 1, MaxTerms: 100}, "the bike dock app fee rain aa zz",
			CutReport{Seen: 8, Kept: 8}},
		// min-docs 2 drops aa zz; share 0.9 drops the; of bike dock app fee
		// rain, max-terms 3 keeps bike dock app.
		{"combined", Cutoffs{MinDocs: 2, MaxDocShare: 0.9, MaxTerms: 3}, "bike dock app",
			CutReport{Seen: 8, BelowMinDocs: 2, AboveMaxShare: 1, OverMaxTerms: 2, Kept: 3}},
	} {
		v, rep := c.Build(tc.cut)
		if got := keys(v); got != tc.want {
			t.Errorf("%s: columns %q, want %q", tc.name, got, tc.want)
		}
		if rep != tc.rep {
			t.Errorf("%s: report %+v, want %+v", tc.name, rep, tc.rep)
		}
		if v.Len() != rep.Kept {
			t.Errorf("%s: Len %d, Kept %d", tc.name, v.Len(), rep.Kept)
		}
		for i, term := range v.Terms {
			if col, ok := v.Lookup([]byte(term.Key)); !ok || col != i {
				t.Errorf("%s: Lookup(%q) = %d, %v; want %d", tc.name, term.Key, col, ok, i)
			}
		}
	}
	v, _ := c.Build(DefaultCutoffs())
	if want := (Term{Key: "bike", Order: 4, Docs: 6, Count: 8}); v.Terms[1] != want {
		t.Errorf("bike term %+v, want %+v", v.Terms[1], want)
	}
	if _, ok := v.Lookup([]byte("bikes")); ok {
		t.Error("Lookup(bikes) found")
	}
}

// Ties in document count are broken by ascending key bytes, which is not
// any language's alphabetical order: "B" (0x42) before "a" (0x61), and
// "é" (0xC3 0xA9) after "z".
func TestBuildTieBreakByBytes(t *testing.T) {
	c := corpus("é b z a B ab a\x00", "é")
	v, _ := c.Build(DefaultCutoffs())
	want := []string{"é", "B", "a", "a\x00", "ab", "b", "z"}
	var got []string
	for _, term := range v.Terms {
		got = append(got, term.Key)
	}
	if !slices.Equal(got, want) {
		t.Errorf("columns %q, want %q", got, want)
	}
}

func TestDocFrequencyOncePerDoc(t *testing.T) {
	c := corpus("a a a b", "a", "", "b b")
	got := map[string][2]int64{}
	c.Each(func(k string, order int, count, docs int64) { got[k] = [2]int64{count, docs} })
	want := map[string][2]int64{"a": {4, 2}, "b": {3, 2}}
	if !reflect.DeepEqual(got, want) || c.Docs() != 4 {
		t.Errorf("counts %v docs %d, want %v 4", got, c.Docs(), want)
	}
}

func TestOrderKeptFromFirstAdd(t *testing.T) {
	c := NewCounts()
	c.Add([]byte("x"), 102)
	c.Add([]byte("x"), 1)
	c.EndDoc()
	c.Each(func(k string, order int, count, docs int64) {
		if order != 102 {
			t.Errorf("order %d, want 102", order)
		}
	})
}

func TestEachSorted(t *testing.T) {
	c := corpus("pedal dock brake", "app dock")
	var got []string
	c.Each(func(k string, _ int, _, _ int64) { got = append(got, k) })
	if want := []string{"app", "brake", "dock", "pedal"}; !slices.Equal(got, want) {
		t.Errorf("Each order %q, want %q", got, want)
	}
}

type entry struct {
	key         string
	order       int
	count, docs int64
}

func dump(c *Counts) []entry {
	var e []entry
	c.Each(func(k string, o int, n, d int64) { e = append(e, entry{k, o, n, d}) })
	return e
}

// Merging shards counted separately equals counting every document in one
// Counts, for random documents and random split points.
func TestMergeEqualsSingle(t *testing.T) {
	r := rand.New(rand.NewPCG(7, 8))
	for trial := range 200 {
		ndocs := r.IntN(30)
		docs := make([]string, ndocs)
		for i := range docs {
			var d []string
			for range r.IntN(12) {
				d = append(d, strings.Repeat(string(rune('a'+r.IntN(6))), 1+r.IntN(3)))
			}
			docs[i] = strings.Join(d, " ")
		}
		nshards := 1 + r.IntN(4)
		cuts := []int{0, ndocs}
		for range nshards - 1 {
			cuts = append(cuts, r.IntN(ndocs+1))
		}
		slices.Sort(cuts)
		merged := NewCounts()
		for s := range len(cuts) - 1 {
			merged.Merge(corpus(docs[cuts[s]:cuts[s+1]]...))
		}
		single := corpus(docs...)
		if merged.Docs() != single.Docs() || merged.Len() != single.Len() {
			t.Fatalf("trial %d: docs %d/%d len %d/%d", trial, merged.Docs(), single.Docs(), merged.Len(), single.Len())
		}
		if a, b := dump(merged), dump(single); !reflect.DeepEqual(a, b) {
			t.Fatalf("trial %d: merged %v, single %v", trial, a, b)
		}
		cut := Cutoffs{MinDocs: 1 + int64(r.IntN(3)), MaxDocShare: 0.2 + 0.8*r.Float64(), MaxTerms: r.IntN(8)}
		vm, rm := merged.Build(cut)
		vs, rs := single.Build(cut)
		if !reflect.DeepEqual(vm.Terms, vs.Terms) || rm != rs {
			t.Fatalf("trial %d: Build differs: %v %+v vs %v %+v", trial, vm.Terms, rm, vs.Terms, rs)
		}
	}
}

func TestMergeOpenDocuments(t *testing.T) {
	o := NewCounts()
	o.Add([]byte("k"), 1)
	o.EndDoc()
	o.Add([]byte("k"), 1) // unfinished: counted as a document by Merge

	c := NewCounts()
	c.Add([]byte("k"), 1) // c's own unfinished document
	c.Merge(o)
	c.Add([]byte("k"), 1) // same unfinished document: doc count unchanged
	c.EndDoc()
	want := []entry{{"k", 1, 4, 3}}
	if got := dump(c); !reflect.DeepEqual(got, want) || c.Docs() != 3 {
		t.Errorf("got %v docs %d, want %v docs 3", got, c.Docs(), want)
	}
	if got := dump(o); !reflect.DeepEqual(got, []entry{{"k", 1, 2, 2}}) || o.Docs() != 1 {
		t.Errorf("Merge changed its argument: %v docs %d", got, o.Docs())
	}

	c.Merge(c)
	if got := dump(c); !reflect.DeepEqual(got, []entry{{"k", 1, 8, 6}}) || c.Docs() != 6 {
		t.Errorf("self-merge: %v docs %d", got, c.Docs())
	}
}

func TestDocHistogram(t *testing.T) {
	if h := NewCounts().DocHistogram(); len(h) != 0 {
		t.Errorf("empty histogram %v", h)
	}
	// Keys with doc counts 1, 1, 2, 16, 17, 32, 33, 100.
	dfs := []int{1, 1, 2, 16, 17, 32, 33, 100}
	c := NewCounts()
	for d := range 100 {
		for k, df := range dfs {
			if d < df {
				c.Add(fmt.Appendf(nil, "k%d", k), 1)
			}
		}
		c.EndDoc()
	}
	want := make([]int64, 19)
	want[0] = 2  // 1
	want[1] = 1  // 2
	want[15] = 1 // 16
	want[16] = 2 // 17..32: 17, 32
	want[17] = 1 // 33..64: 33
	want[18] = 1 // 65..128: 100
	if got := c.DocHistogram(); !slices.Equal(got, want) {
		t.Errorf("histogram %v, want %v", got, want)
	}
}

func TestDocBucketBounds(t *testing.T) {
	for _, tc := range []struct {
		i      int
		lo, hi int64
	}{{0, 1, 1}, {15, 16, 16}, {16, 17, 32}, {17, 33, 64}, {20, 257, 512}, {74, 1<<62 + 1, math.MaxInt64}} {
		lo, hi := DocBucketBounds(tc.i)
		if lo != tc.lo || hi != tc.hi {
			t.Errorf("DocBucketBounds(%d) = %d, %d; want %d, %d", tc.i, lo, hi, tc.lo, tc.hi)
		}
	}
	// Every count lands in the bucket whose bounds hold it.
	for _, d := range []int64{1, 2, 16, 17, 31, 32, 33, 64, 65, 1000, 1 << 40, math.MaxInt64} {
		b := docBucket(d)
		if lo, hi := DocBucketBounds(b); d < lo || d > hi {
			t.Errorf("count %d in bucket %d = [%d, %d]", d, b, lo, hi)
		}
	}
}

func TestCutoffsValidate(t *testing.T) {
	good := []Cutoffs{DefaultCutoffs(), {MinDocs: 5, MaxDocShare: 0.01, MaxTerms: 10}}
	bad := []Cutoffs{{}, {MinDocs: 0, MaxDocShare: 1}, {MinDocs: 1, MaxDocShare: 0},
		{MinDocs: 1, MaxDocShare: 1.5}, {MinDocs: 1, MaxDocShare: math.NaN()},
		{MinDocs: 1, MaxDocShare: 1, MaxTerms: -1}}
	for _, c := range good {
		if err := c.Validate(); err != nil {
			t.Errorf("%+v: %v", c, err)
		}
	}
	for _, c := range bad {
		if err := c.Validate(); err == nil {
			t.Errorf("%+v: no error", c)
		}
	}
}

func TestNew(t *testing.T) {
	v0, _ := cutCorpus().Build(DefaultCutoffs())
	v, err := New(v0.Terms)
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(v.Terms, v0.Terms) {
		t.Errorf("terms differ")
	}
	for i, term := range v0.Terms {
		if col, ok := v.Lookup([]byte(term.Key)); !ok || col != i {
			t.Errorf("Lookup(%q) = %d, %v", term.Key, col, ok)
		}
	}
	// Any order given is kept: the spec decides.
	v, err = New([]Term{{Key: "z"}, {Key: "a"}})
	if err != nil || v.Terms[0].Key != "z" {
		t.Errorf("New kept order? %v %v", v, err)
	}
	if _, err := New([]Term{{Key: "a"}, {Key: "b"}, {Key: "a"}}); err == nil ||
		!strings.Contains(err.Error(), `term 2: key "a" already at column 0`) {
		t.Errorf("duplicate key: %v", err)
	}
	if v, err := New(nil); err != nil || v.Len() != 0 {
		t.Errorf("New(nil) = %v, %v", v, err)
	}
}

func TestLookupAllocs(t *testing.T) {
	v, _ := cutCorpus().Build(DefaultCutoffs())
	key := []byte("dock")
	miss := []byte("docks")
	if n := testing.AllocsPerRun(1000, func() {
		v.Lookup(key)
		v.Lookup(miss)
	}); n != 0 {
		t.Errorf("Lookup allocates %v times", n)
	}
}

func TestAddSeenAllocs(t *testing.T) {
	c := NewCounts()
	key := []byte("pellwick-dock-17")
	c.Add(key, 1)
	c.EndDoc()
	if n := testing.AllocsPerRun(1000, func() {
		c.Add(key, 1)
		c.EndDoc()
	}); n != 0 {
		t.Errorf("Add of a seen key allocates %v times", n)
	}
	if c.Docs() != 1002 { // 1 + warm-up run + 1000 runs
		t.Errorf("Docs %d", c.Docs())
	}
}

func TestParseUnseen(t *testing.T) {
	for _, tc := range []struct {
		in   string
		want Unseen
		str  string
		cols int
	}{
		{"drop", Unseen{Mode: UnseenDrop}, "drop", 0},
		{"count", Unseen{Mode: UnseenCount}, "count", 1},
		{"hash:1", Unseen{Mode: UnseenHash, Buckets: 1}, "hash:1", 1},
		{"hash:1000", Unseen{Mode: UnseenHash, Buckets: 1000}, "hash:1000", 1000},
		{"hash:2^10", Unseen{Mode: UnseenHash, Buckets: 1024}, "hash:1024", 1024},
		{"hash:16777216", Unseen{Mode: UnseenHash, Buckets: 1 << 24}, "hash:16777216", 1 << 24},
		{"hash:2^24", Unseen{Mode: UnseenHash, Buckets: 1 << 24}, "hash:16777216", 1 << 24},
	} {
		u, err := ParseUnseen(tc.in)
		if err != nil || u != tc.want || u.String() != tc.str || u.Columns() != tc.cols {
			t.Errorf("ParseUnseen(%q) = %+v, %v; String %q Columns %d", tc.in, u, err, u.String(), u.Columns())
		}
	}
	for _, in := range []string{"", "Drop", "hash", "hash:", "hash:0", "hash:-1", "hash:16777217",
		"hash:2^25", "hash:3^2", "hash:1.5", "hash:K", "count:1"} {
		if u, err := ParseUnseen(in); err == nil {
			t.Errorf("ParseUnseen(%q) = %+v, no error", in, u)
		}
	}
}

// zipfKeys makes n key occurrences over a vocabulary of distinct
// synthetic keys, with Zipf-like frequencies as in text.
func zipfKeys(n int) [][]byte {
	r := rand.New(rand.NewPCG(5, 6))
	z := rand.NewZipf(r, 1.1, 1, 50000)
	out := make([][]byte, n)
	for i := range out {
		out[i] = fmt.Appendf(nil, "key%x", z.Uint64())
	}
	return out
}

// BenchmarkCountsAdd measures counting throughput in key bytes per second,
// 200 keys per document.
func BenchmarkCountsAdd(b *testing.B) {
	ks := zipfKeys(1 << 16)
	var size int64
	for _, k := range ks[:200] {
		size += int64(len(k))
	}
	c := NewCounts()
	b.SetBytes(size)
	b.ReportAllocs()
	off := 0
	for b.Loop() {
		if off+200 > len(ks) {
			off = 0
		}
		for _, k := range ks[off : off+200] {
			c.Add(k, 1)
		}
		c.EndDoc()
		off += 200
	}
}

// BenchmarkLookup measures vocabulary lookups in key bytes per second.
func BenchmarkLookup(b *testing.B) {
	ks := zipfKeys(1 << 16)
	c := NewCounts()
	for _, k := range ks {
		c.Add(k, 1)
	}
	c.EndDoc()
	v, _ := c.Build(DefaultCutoffs())
	var size int64
	for _, k := range ks[:200] {
		size += int64(len(k))
	}
	b.SetBytes(size)
	off := 0
	for b.Loop() {
		if off+200 > len(ks) {
			off = 0
		}
		for _, k := range ks[off : off+200] {
			v.Lookup(k)
		}
		off += 200
	}
}
