package weight

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"github.com/bowline/bowline/internal/testkit"
)

// Source: Manning, Raghavan, Schütze, Introduction to Information
// Retrieval (2008), ch. 6, the idf table for the Reuters-RCV1 collection
// (N = 806,791, idf = log10(N/df)). Every df and idf below is recalled
// from memory, IIR ch. 6 idf example. bowline's plain idf uses ln, so the
// book's value is IDFPlain.Value / ln(10), compared at the book's
// precision of two decimals.
func TestIDFPlainIIRReutersRCV1(t *testing.T) {
	const n = 806791
	for _, c := range []struct {
		term string
		df   int64
		idf  float64 // as printed in the book
	}{
		{"car", 18165, 1.65},       // recalled from memory, IIR ch. 6 idf example
		{"auto", 6723, 2.08},       // recalled from memory, IIR ch. 6 idf example
		{"insurance", 19241, 1.62}, // recalled from memory, IIR ch. 6 idf example
		{"best", 25235, 1.5},       // recalled from memory, IIR ch. 6 idf example
	} {
		got := IDFPlain.Value(n, c.df) / math.Ln10
		if math.Round(got*100)/100 != c.idf {
			t.Errorf("%s: idf = %.4f (log10), book says %.2f", c.term, got, c.idf)
		}
	}
}

// Source: Manning, Raghavan, Schütze, Introduction to Information
// Retrieval (2008), ch. 6, the worked scoring example for the query
// "best car insurance" (N = 1,000,000; lnc document, ltc query). All
// numbers recalled from memory, IIR ch. 6 lnc.ltc example. The book's
// log tf is 1 + log10(tf), not bowline's 1 + ln(tf), so the document's
// book weights (1, 0, 1, 1.3) go in as counts and only the L2 norm is
// checked; the query side checks plain idf (df 5000, 50000, 10000, 1000
// gives idf 2.3, 1.3, 2.0, 3.0) and L2 norm, each at the book's two
// decimals, and the score 0.8.
func TestCosineIIRBestCarInsurance(t *testing.T) {
	const n = 1000000
	// Columns: auto, best, car, insurance.
	df := []int64{5000, 50000, 10000, 1000}
	wantIDF := []float64{2.3, 1.3, 2.0, 3.0} // recalled from memory, IIR ch. 6
	idf := IDFTable(IDFPlain, n, df)
	for c := range df {
		if got := idf[c] / math.Ln10; math.Round(got*10)/10 != wantIDF[c] {
			t.Errorf("idf[%d] = %.3f (log10), book %.1f", c, got, wantIDF[c])
		}
	}

	a := NewAccumulator()
	var doc, query Row
	// Document tf: auto 1, best 0, car 1, insurance 2; book's log-tf
	// weights 1, 0, 1, 1.3; normalized 0.52, 0, 0.52, 0.68.
	a.Add(0, 1)
	a.Add(2, 1)
	a.Add(3, 1.3)
	a.Finish(TFCount, nil, NormL2, &doc)
	if want := []int{0, 2, 3}; !slices.Equal(doc.Indices, want) {
		t.Fatalf("document columns %v, want %v", doc.Indices, want)
	}
	for i, want := range []float64{0.52, 0.52, 0.68} { // recalled from memory, IIR ch. 6
		if got := math.Round(doc.Values[i]*100) / 100; got != want {
			t.Errorf("document value %d = %.4f, book %.2f", i, doc.Values[i], want)
		}
	}
	// Query tf: best 1, car 1, insurance 1; tf-idf 0, 1.3, 2.0, 3.0;
	// normalized 0, 0.34, 0.52, 0.78. Here the idf is bowline's ln-based
	// plain idf: scaling every value by 1/ln(10) leaves the L2-normalized
	// row unchanged, so the book's normalized numbers still apply.
	a.Add(1, 1)
	a.Add(2, 1)
	a.Add(3, 1)
	a.Finish(TFCount, idf, NormL2, &query)
	for i, want := range []float64{0.34, 0.52, 0.78} { // recalled from memory, IIR ch. 6
		if got := math.Round(query.Values[i]*100) / 100; got != want {
			t.Errorf("query value %d = %.4f, book %.2f", i, query.Values[i], want)
		}
	}
	// Score: 0.52*0.52 + 0.68*0.78 = 0.27 + 0.53 = 0.8 (book).
	score := doc.Values[1]*query.Values[1] + doc.Values[2]*query.Values[2]
	if math.Round(score*10)/10 != 0.8 { // recalled from memory, IIR ch. 6
		t.Errorf("score %.4f, book 0.8", score)
	}
}

// Hand-computed check on a three-document corpus (arithmetic below).
//
//	d1: a a b      d2: b c      d3: b c c c
//	columns a=0, b=1, c=2; N = 3; df(a)=1, df(b)=3, df(c)=2
//
// Smooth idf, ln((1+N)/(1+df)) + 1:
//
//	a: ln(4/2)+1 = 1 + 0.693147180559945 = 1.693147180559945
//	b: ln(4/4)+1 = 1
//	c: ln(4/3)+1 = 1 + 0.287682072451781 = 1.287682072451781
//
// Plain idf, ln(N/df):
//
//	a: ln 3 = 1.09861228866811, b: ln 1 = 0, c: ln 1.5 = 0.405465108108164
func TestHandComputedCorpus(t *testing.T) {
	const n = 3
	df := []int64{1, 3, 2}
	smooth := IDFTable(IDFSmooth, n, df)
	plain := IDFTable(IDFPlain, n, df)
	for c, want := range []float64{1.6931471805599454, 1, 1.2876820724517808} {
		if !testkit.Near(smooth[c], want, 1e-12) {
			t.Errorf("smooth idf[%d] = %v, want %v", c, smooth[c], want)
		}
	}
	for c, want := range []float64{1.0986122886681098, 0, 0.4054651081081644} {
		if !testkit.Near(plain[c], want, 1e-12) {
			t.Errorf("plain idf[%d] = %v, want %v", c, plain[c], want)
		}
	}

	docs := [][]int{{0, 0, 1}, {1, 2}, {1, 2, 2, 2}}
	cases := []struct {
		name string
		doc  int
		tf   TF
		idf  []float64
		norm Norm
		cols []int
		vals []float64
	}{
		// d3 raw counts: b 1, c 3.
		{"d3 count", 2, TFCount, nil, NormNone, []int{1, 2}, []float64{1, 3}},
		// binary: b 1, c 1.
		{"d3 binary", 2, TFBinary, nil, NormNone, []int{1, 2}, []float64{1, 1}},
		// log: b 1+ln1 = 1, c 1+ln3 = 2.09861228866811.
		{"d3 log", 2, TFLog, nil, NormNone, []int{1, 2}, []float64{1, 2.09861228866811}},
		// count*smooth: b 1*1 = 1, c 3*1.287682072451781 = 3.863046217355342.
		{"d3 count smooth", 2, TFCount, smooth, NormNone, []int{1, 2}, []float64{1, 3.8630462173553424}},
		// L2: length sqrt(1 + 3.863046217355342^2) = sqrt(15.923126084) = 3.990379192;
		// b 1/3.990379192 = 0.250602750, c 3.863046217/3.990379192 = 0.968090007.
		{"d3 count smooth l2", 2, TFCount, smooth, NormL2, []int{1, 2}, []float64{0.25060275038183466, 0.9680900069213915}},
		// L1: sum 1 + 3.863046217 = 4.863046217; b 1/4.863046217 = 0.205632428,
		// c 3.863046217/4.863046217 = 0.794367572.
		{"d3 count smooth l1", 2, TFCount, smooth, NormL1, []int{1, 2}, []float64{0.20563242776331814, 0.7943675722366819}},
		// binary*smooth: b 1, c 1.287682072; L2 length sqrt(1+1.658125) = 1.630376;
		// b 1/1.630376 = 0.613355537, c 1.287682072/1.630376 = 0.789806929.
		{"d3 binary smooth l2", 2, TFBinary, smooth, NormL2, []int{1, 2}, []float64{0.6133555370249717, 0.7898069290660905}},
		// log*smooth: b 1, c 2.098612289*1.287682072 = 2.702345421;
		// L1 sum 3.702345421; b 0.270099055, c 0.729900945.
		{"d3 log smooth l1", 2, TFLog, smooth, NormL1, []int{1, 2}, []float64{0.2700990551256442, 0.7299009448743558}},
		// count*plain: b 1*0 = 0 (dropped), c 3*0.405465108 = 1.216395324.
		{"d3 count plain", 2, TFCount, plain, NormNone, []int{2}, []float64{1.2163953243244932}},
		// plain then L2: only c is left, so it becomes 1.
		{"d3 count plain l2", 2, TFCount, plain, NormL2, []int{2}, []float64{1}},
		// d1 log*smooth: a (1+ln2)*1.693147181 = 1.693147181^2 = 2.866747375, b 1;
		// L2 length sqrt(8.218240 + 1) = 3.036154; a 0.944203065, b 0.329363889.
		{"d1 log smooth l2", 0, TFLog, smooth, NormL2, []int{0, 1}, []float64{0.9442030652308014, 0.32936388935151817}},
		// d2 count*plain: b 0 dropped, c 1*0.405465108.
		{"d2 count plain", 1, TFCount, plain, NormNone, []int{2}, []float64{0.4054651081081644}},
	}
	a := NewAccumulator()
	var row Row
	for _, c := range cases {
		for _, col := range docs[c.doc] {
			a.Add(col, 1)
		}
		a.Finish(c.tf, c.idf, c.norm, &row)
		if !slices.Equal(row.Indices, c.cols) {
			t.Errorf("%s: columns %v, want %v", c.name, row.Indices, c.cols)
			continue
		}
		for i := range c.vals {
			if !testkit.Near(row.Values[i], c.vals[i], 1e-12) {
				t.Errorf("%s: value[%d] = %v, want %v", c.name, i, row.Values[i], c.vals[i])
			}
		}
	}
}

func TestTFApply(t *testing.T) {
	for _, c := range []struct {
		tf       TF
		in, want float64
	}{
		{TFCount, 0, 0}, {TFCount, 3, 3}, {TFCount, -2, -2},
		{TFBinary, 0, 0}, {TFBinary, 5, 1}, {TFBinary, -2, -1},
		{TFLog, 0, 0}, {TFLog, 1, 1}, {TFLog, math.E, 2}, {TFLog, -math.E, -2},
	} {
		if got := c.tf.Apply(c.in); !testkit.Near(got, c.want, 1e-12) {
			t.Errorf("%v.Apply(%v) = %v, want %v", c.tf, c.in, got, c.want)
		}
	}
}

func TestIDFEdges(t *testing.T) {
	for _, c := range []struct {
		idf   IDF
		n, df int64
		want  float64
	}{
		{IDFNone, 10, 0, 1},
		{IDFSmooth, 10, 0, math.Log(11) + 1}, // unseen in training: ln(1+N)+1
		{IDFSmooth, 0, 0, 1},                 // empty training set
		{IDFSmooth, 10, 10, 1},               // in every document: ln 1 + 1
		{IDFPlain, 10, 0, 0},                 // unseen: 0, not +Inf
		{IDFPlain, 0, 0, 0},
		{IDFPlain, 10, 10, 0},
		{IDFPlain, 10, 1, math.Log(10)},
	} {
		if got := c.idf.Value(c.n, c.df); !testkit.Near(got, c.want, 1e-12) {
			t.Errorf("%v.Value(%d, %d) = %v, want %v", c.idf, c.n, c.df, got, c.want)
		}
	}
	if IDFTable(IDFNone, 5, []int64{1, 2}) != nil {
		t.Error("IDFTable(IDFNone) is not nil")
	}
}

func TestParse(t *testing.T) {
	for _, w := range []string{"count", "binary", "log"} {
		v, err := ParseTF(w)
		if err != nil || v.String() != w {
			t.Errorf("ParseTF(%q) = %v, %v", w, v, err)
		}
	}
	for _, w := range []string{"none", "smooth", "plain"} {
		v, err := ParseIDF(w)
		if err != nil || v.String() != w {
			t.Errorf("ParseIDF(%q) = %v, %v", w, v, err)
		}
	}
	for _, w := range []string{"none", "l1", "l2"} {
		v, err := ParseNorm(w)
		if err != nil || v.String() != w {
			t.Errorf("ParseNorm(%q) = %v, %v", w, v, err)
		}
	}
	if _, err := ParseTF("Count"); err == nil {
		t.Error("ParseTF(Count): no error")
	}
	if _, err := ParseIDF(""); err == nil {
		t.Error("ParseIDF(\"\"): no error")
	}
	if _, err := ParseNorm("l3"); err == nil {
		t.Error("ParseNorm(l3): no error")
	}
	if s := TF(9).String(); s != "TF(9)" {
		t.Errorf("TF(9).String() = %q", s)
	}
}

func TestSignedSums(t *testing.T) {
	a := NewAccumulator()
	var row Row
	a.Add(7, 1)
	a.Add(3, -1)
	a.Add(7, -1) // cancels to exactly 0: dropped
	a.Add(3, -1) // -2
	a.Add(5, 4)
	a.Finish(TFLog, nil, NormNone, &row)
	want := []float64{-(1 + math.Ln2), 1 + math.Log(4)}
	if !slices.Equal(row.Indices, []int{3, 5}) || !testkit.Near(row.Values[0], want[0], 1e-12) || !testkit.Near(row.Values[1], want[1], 1e-12) {
		t.Errorf("row %v %v, want [3 5] %v", row.Indices, row.Values, want)
	}
	a.Add(1, -3)
	a.Add(2, 1)
	a.Finish(TFCount, nil, NormL1, &row)
	if !slices.Equal(row.Values, []float64{-0.75, 0.25}) {
		t.Errorf("signed L1 row %v", row.Values)
	}
}

func TestResetAndEmpty(t *testing.T) {
	a := &Accumulator{} // zero value
	row := Row{Indices: []int{9}, Values: []float64{9}}
	a.Finish(TFCount, nil, NormL2, &row)
	if len(row.Indices) != 0 || len(row.Values) != 0 {
		t.Errorf("empty document gave %v", row)
	}
	a.Add(4, 1)
	a.Reset()
	a.Add(2, 1)
	a.Finish(TFCount, nil, NormNone, &row)
	if !slices.Equal(row.Indices, []int{2}) {
		t.Errorf("after Reset: %v", row.Indices)
	}
}

// TestAgainstMap compares the Accumulator with a plain map-and-sort
// implementation on random documents, including growth of the table,
// columns above 2^32 and many generations.
func TestAgainstMap(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 2))
	a := NewAccumulator()
	var row Row
	for doc := range 3000 {
		m := map[int]float64{}
		size := r.IntN(40)
		if doc%100 == 0 {
			size = 5000
		}
		span := 1 + r.IntN(1<<20)
		if doc%50 == 0 {
			span = 1 << 40
		}
		for range size {
			c := r.IntN(span)
			v := float64(1 - 2*r.IntN(2))
			m[c] += v
			a.Add(c, v)
		}
		a.Finish(TFCount, nil, NormNone, &row)
		var cols []int
		for c, v := range m {
			if v != 0 {
				cols = append(cols, c)
			}
		}
		slices.Sort(cols)
		if !slices.Equal(row.Indices, cols) {
			t.Fatalf("doc %d: columns differ: got %d, want %d", doc, len(row.Indices), len(cols))
		}
		for i, c := range cols {
			if row.Values[i] != m[c] {
				t.Fatalf("doc %d col %d: %v, want %v", doc, c, row.Values[i], m[c])
			}
		}
	}
}

func TestFinishAllocs(t *testing.T) {
	a := NewAccumulator()
	idf := make([]float64, 1<<16)
	for i := range idf {
		idf[i] = 1.5
	}
	var row Row
	doc := func() {
		for i := range 300 {
			a.Add((i*7919)&(1<<16-1), 1)
			a.Add((i*31)&(1<<16-1), 1)
		}
		a.Finish(TFLog, idf, NormL2, &row)
	}
	doc() // warm-up
	if n := testing.AllocsPerRun(100, doc); n != 0 {
		t.Errorf("Add+Finish allocates %v times per document", n)
	}
}

// benchDocs makes documents of about 200 features with repeats, columns
// spread over a 2^20 space, the shape of word and character n-grams.
func benchDocs() [][]int {
	r := rand.New(rand.NewPCG(3, 4))
	docs := make([][]int, 64)
	for d := range docs {
		uniq := make([]int, 120)
		for i := range uniq {
			uniq[i] = r.IntN(1 << 20)
		}
		for range 200 {
			docs[d] = append(docs[d], uniq[r.IntN(len(uniq))])
		}
	}
	return docs
}

// BenchmarkAccumulator counts 8 bytes per feature added (one int column).
func BenchmarkAccumulator(b *testing.B) {
	docs := benchDocs()
	idf := make([]float64, 1<<20)
	for i := range idf {
		idf[i] = 2
	}
	a := NewAccumulator()
	var row Row
	b.SetBytes(int64(8 * len(docs[0])))
	b.ReportAllocs()
	i := 0
	for b.Loop() {
		for _, c := range docs[i%len(docs)] {
			a.Add(c, 1)
		}
		a.Finish(TFLog, idf, NormL2, &row)
		i++
	}
}
