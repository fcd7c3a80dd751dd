package svmlight

import (
	"bufio"
	"bytes"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/bowline/bowline/internal/testkit"
)

// Source: the SVMlight format description by T. Joachims
// (http://svmlight.joachims.org/):
//
//	<line> .=. <target> <feature>:<value> <feature>:<value> ... <feature>:<value> # <info>
//	<target> .=. +1 | -1 | 0 | <float>
//	<feature> .=. <integer> | "qid"
//	<value> .=. <float>
//	<info> .=. <string>
//
// with features in increasing order; the lines below are written by hand
// from that grammar.
func TestWriterFormat(t *testing.T) {
	cases := []struct {
		base    int
		withIDs bool
		label   float64
		idx     []int
		val     []float64
		id      string
		want    string
	}{
		{1, false, 1, []int{0, 4, 9}, []float64{0.5, 1, -2.25}, "", "1 1:0.5 5:1 10:-2.25\n"},
		{0, false, 1, []int{0, 4, 9}, []float64{0.5, 1, -2.25}, "", "1 0:0.5 4:1 9:-2.25\n"},
		{1, false, -1, nil, nil, "", "-1\n"},
		{1, false, 0, []int{2}, []float64{0}, "", "0 3:0\n"},
		{1, false, 3.5, []int{0, 1, 2, 3}, []float64{1e-300, 0.1, 1e21, -7}, "", "3.5 1:1e-300 2:0.1 3:1e+21 4:-7\n"},
		{1, false, 2, []int{99999999}, []float64{1.0 / 3}, "", "2 100000000:0.3333333333333333\n"},
		{1, true, 1, []int{1}, []float64{2}, "ticket-17", "1 2:2 # ticket-17\n"},
		{1, true, 1, nil, nil, "", "1 #\n"},
		{1, true, -1, []int{0}, []float64{1}, "a\tb\nc\\d\re\x01f\x7f é", "-1 1:1 # a\\tb\\nc\\\\d\\re\\x01f\\x7f é\n"},
	}
	for _, c := range cases {
		var out bytes.Buffer
		w := NewWriter(&out, c.base, c.withIDs)
		if err := w.WriteRow(c.label, c.idx, c.val, c.id); err != nil {
			t.Fatal(err)
		}
		if err := w.Flush(); err != nil {
			t.Fatal(err)
		}
		if out.String() != c.want {
			t.Errorf("got %q, want %q", out.String(), c.want)
		}
		if w.Rows() != 1 {
			t.Errorf("Rows = %d", w.Rows())
		}
		if got := string(AppendRow([]byte("x"), c.label, c.idx, c.val, c.base)); !c.withIDs && got != "x"+strings.TrimSuffix(c.want, "\n") {
			t.Errorf("AppendRow = %q", got)
		}
	}
}

func TestWriterRejectsBadRows(t *testing.T) {
	var out bytes.Buffer
	w := NewWriter(&out, 1, false)
	bad := []struct {
		label float64
		idx   []int
		val   []float64
		msg   string
	}{
		{1, []int{3, 2}, []float64{1, 1}, "index 2 follows 3"},
		{1, []int{3, 3}, []float64{1, 1}, "index 3 follows 3"},
		{1, []int{-1}, []float64{1}, "negative"},
		{1, []int{1, 2}, []float64{1}, "2 indices but 1 values"},
		{math.NaN(), nil, nil, "label NaN"},
		{math.Inf(1), nil, nil, "label +Inf"},
		{1, []int{4}, []float64{math.Inf(-1)}, "not finite"},
	}
	for _, c := range bad {
		err := w.WriteRow(c.label, c.idx, c.val, "")
		if err == nil || !strings.Contains(err.Error(), c.msg) {
			t.Errorf("WriteRow(%v, %v, %v) error %v, want one with %q", c.label, c.idx, c.val, err, c.msg)
		}
	}
	w.Flush()
	if out.Len() != 0 || w.Rows() != 0 {
		t.Errorf("rejected rows left output %q, Rows %d", out.String(), w.Rows())
	}
	defer func() {
		if recover() == nil {
			t.Error("NewWriter with base 2 did not panic")
		}
	}()
	NewWriter(&out, 2, false)
}

var specialValues = []float64{1e-300, 0.1, 1e21, -1e21, -0.1, -3, 1, 5e-324, math.MaxFloat64, -math.SmallestNonzeroFloat64, 1.0 / 3, 123456789.125, math.Copysign(0, -1)}

func randomRow(rng *rand.Rand) Row {
	var r Row
	r.Label = []float64{1, -1, 0, 2.5, 7, -0.1}[rng.IntN(6)]
	ix := -1
	for n := rng.IntN(30); n > 0; n-- {
		ix += 1 + rng.IntN(1000)
		r.Indices = append(r.Indices, ix)
		var v float64
		switch rng.IntN(3) {
		case 0:
			v = specialValues[rng.IntN(len(specialValues))]
		case 1:
			v = rng.NormFloat64()
		default:
			v = math.Float64frombits(rng.Uint64())
			for math.IsNaN(v) || math.IsInf(v, 0) {
				v = math.Float64frombits(rng.Uint64())
			}
		}
		r.Values = append(r.Values, v)
	}
	ids := []string{"", "t1", "a b", "x\ty", "line\nbreak", `back\slash`, "\x00\x1f\x7f", "é 自転車 🚲", "#hash", " lead", "trail "}
	r.ID = ids[rng.IntN(len(ids))]
	return r
}

// Writer output read back by Reader gives the same rows, bit for bit, for
// index base 0 and 1, with and without ids.
func TestRoundTrip(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for _, base := range []int{0, 1} {
		for _, withIDs := range []bool{false, true} {
			var rows []Row
			var out bytes.Buffer
			w := NewWriter(&out, base, withIDs)
			for range 500 {
				r := randomRow(rng)
				rows = append(rows, r)
				if err := w.WriteRow(r.Label, r.Indices, r.Values, r.ID); err != nil {
					t.Fatal(err)
				}
			}
			if err := w.Flush(); err != nil {
				t.Fatal(err)
			}
			rd := NewReader(&out, "rows.svm", base)
			n := 0
			for rd.Scan() {
				got, want := rd.Row(), rows[n]
				n++
				if math.Float64bits(got.Label) != math.Float64bits(want.Label) {
					t.Fatalf("row %d: label %v, want %v", n, got.Label, want.Label)
				}
				if len(got.Indices) != len(want.Indices) {
					t.Fatalf("row %d: %d pairs, want %d", n, len(got.Indices), len(want.Indices))
				}
				for i := range got.Indices {
					if got.Indices[i] != want.Indices[i] || math.Float64bits(got.Values[i]) != math.Float64bits(want.Values[i]) {
						t.Fatalf("row %d pair %d: %d:%v, want %d:%v", n, i, got.Indices[i], got.Values[i], want.Indices[i], want.Values[i])
					}
				}
				wantID := want.ID
				if !withIDs {
					wantID = ""
				}
				if got.ID != wantID {
					t.Fatalf("row %d: id %q, want %q", n, got.ID, wantID)
				}
			}
			if err := rd.Err(); err != nil {
				t.Fatal(err)
			}
			if n != len(rows) || w.Rows() != int64(n) {
				t.Fatalf("read %d rows, wrote %d (Rows %d)", n, len(rows), w.Rows())
			}
		}
	}
}

func TestReaderErrors(t *testing.T) {
	cases := []struct {
		in     string
		base   int
		line   int64
		col    int
		target error
		msg    string
	}{
		{"1 1:1 3:1 2:1\n", 1, 1, 11, ErrOrder, "rows.svm:1:11: index not ascending: 2 after 3"},
		{"1 1:1\n-1 4:1  4:2\n", 1, 2, 9, ErrOrder, "rows.svm:2:9: index not ascending: 4 after 4"},
		{"1 0:1\n", 1, 1, 3, ErrBase, "rows.svm:1:3: index below the index base: 0 < 1"},
		{"yes 1:1\n", 1, 1, 1, ErrLabel, `rows.svm:1:1: bad label "yes"`},
		{"  nan 1:1\n", 1, 1, 3, ErrLabel, `rows.svm:1:3: bad label "nan"`},
		{"1 1:x\n", 0, 1, 5, ErrValue, `rows.svm:1:5: bad value "x"`},
		{"1 1:inf\n", 0, 1, 5, ErrValue, `rows.svm:1:5: bad value "inf"`},
		{"1 1:\n", 0, 1, 5, ErrValue, `rows.svm:1:5: bad value ""`},
		{"1 qid:3 1:1\n", 1, 1, 3, ErrIndex, `rows.svm:1:3: bad index "qid"`},
		{"1 -2:1\n", 0, 1, 3, ErrIndex, `rows.svm:1:3: bad index "-2"`},
		{"1 2\n", 0, 1, 3, ErrIndex, `rows.svm:1:3: bad index: "2" is not index:value`},
		{"1 1:1\t2:2\t1:3 # id\n", 1, 1, 11, ErrOrder, "rows.svm:1:11: index not ascending: 1 after 2"},
	}
	for _, c := range cases {
		rd := NewReader(strings.NewReader(c.in), "rows.svm", c.base)
		for rd.Scan() {
		}
		err := rd.Err()
		var pe *ParseError
		if !errors.As(err, &pe) {
			t.Errorf("%q: error %v, want a *ParseError", c.in, err)
			continue
		}
		if pe.Line != c.line || pe.Column != c.col || !errors.Is(err, c.target) || err.Error() != c.msg {
			t.Errorf("%q: error %q (line %d col %d), want %q (line %d col %d)", c.in, err, pe.Line, pe.Column, c.msg, c.line, c.col)
		}
		if rd.Scan() {
			t.Errorf("%q: Scan after an error returned true", c.in)
		}
	}
}

func TestReaderLinesAndComments(t *testing.T) {
	in := "# header comment\r\n\n1 2:0.5 # a\\tb\r\n  \t\n-1\n0 1:1 # C:\\path\\x\n2 3:4"
	rd := NewReader(strings.NewReader(in), "", 1)
	var got []string
	for rd.Scan() {
		r := rd.Row()
		got = append(got, fmt.Sprintf("%v %v %v %q", r.Label, r.Indices, r.Values, r.ID))
	}
	if rd.Err() != nil {
		t.Fatal(rd.Err())
	}
	want := []string{
		`1 [1] [0.5] "a\tb"`,
		`-1 [] [] ""`,
		`0 [0] [1] "C:\\path\\x"`,
		`2 [2] [4] ""`,
	}
	if strings.Join(got, "\n") != strings.Join(want, "\n") {
		t.Errorf("got\n%s\nwant\n%s", strings.Join(got, "\n"), strings.Join(want, "\n"))
	}
	// Errors without a file name, and line numbers counting skipped lines.
	rd = NewReader(strings.NewReader("# c\n\n1 2:x\n"), "", 1)
	for rd.Scan() {
	}
	if rd.Err() == nil || rd.Err().Error() != `3:5: bad value "x"` {
		t.Errorf("error %v", rd.Err())
	}
}

// A row longer than any buffer is read whole.
func TestReaderLongLine(t *testing.T) {
	const n = 100000
	idx := make([]int, n)
	val := make([]float64, n)
	for i := range idx {
		idx[i] = 3 * i
		val[i] = float64(i) + 0.25
	}
	var out bytes.Buffer
	w := NewWriter(&out, 1, true)
	w.WriteRow(1, idx, val, "long")
	w.WriteRow(-1, idx[:2], val[:2], "short")
	w.Flush()
	if out.Len() < 1<<20 {
		t.Fatalf("line only %d bytes", out.Len())
	}
	rd := NewReader(&out, "long.svm", 1)
	if !rd.Scan() {
		t.Fatal(rd.Err())
	}
	r := rd.Row()
	if len(r.Indices) != n || r.Indices[n-1] != 3*(n-1) || r.Values[n-1] != val[n-1] || r.ID != "long" {
		t.Fatalf("long row read wrong: %d pairs, id %q", len(r.Indices), r.ID)
	}
	if !rd.Scan() || rd.Row().ID != "short" || len(rd.Row().Indices) != 2 {
		t.Fatalf("second row: %v", rd.Err())
	}
	if rd.Scan() || rd.Err() != nil {
		t.Fatalf("expected clean end, got %v", rd.Err())
	}
}

func TestFeatureMap(t *testing.T) {
	entries := []MapEntry{
		{0, "w:bike", 12},
		{1, "w:dock full", 3},
		{2, "tab\there", 1},
		{2, "nl\nand\\back\rslash", 1}, // a shared index, as in hashing mode
		{7, "", 0},
		{8, "c:é#", 2},
	}
	for _, base := range []int{0, 1} {
		var out bytes.Buffer
		if err := WriteFeatureMap(&out, base, entries); err != nil {
			t.Fatal(err)
		}
		if base == 1 {
			want := "1\tw:bike\t12\n2\tw:dock full\t3\n3\ttab\\there\t1\n3\tnl\\nand\\\\back\\rslash\t1\n8\t\t0\n9\tc:é#\t2\n"
			if out.String() != want {
				t.Errorf("feature map\n%q\nwant\n%q", out.String(), want)
			}
		}
		got, err := ReadFeatureMap(&out, "map.tsv", base)
		if err != nil {
			t.Fatal(err)
		}
		if fmt.Sprint(got) != fmt.Sprint(entries) {
			t.Errorf("base %d: read back %v, want %v", base, got, entries)
		}
	}
	if err := WriteFeatureMap(&bytes.Buffer{}, 1, []MapEntry{{-1, "x", 1}}); err == nil {
		t.Error("negative index accepted")
	}
	if err := WriteFeatureMap(&bytes.Buffer{}, 1, []MapEntry{{1, "x", -1}}); err == nil {
		t.Error("negative document count accepted")
	}
	bad := []struct {
		in, msg string
	}{
		{"1\tx\t2\n2\ty\n", `map.tsv:2:4: wrong number of fields: want index<TAB>feature<TAB>document count`},
		{"1\tx\t2\t4\n", `map.tsv:1:6: wrong number of fields: more than three tab-separated fields`},
		{"a\tx\t2\n", `map.tsv:1:1: bad index "a"`},
		{"0\tx\t2\n", `map.tsv:1:1: index below the index base: 0 < 1`},
		{"1\tab\\qc\t2\n", `map.tsv:1:5: bad escape in feature "ab\\qc"`},
		{"1\tab\\\t2\n", `map.tsv:1:5: bad escape in feature "ab\\"`},
		{"1\tx\t-2\n", `map.tsv:1:5: bad document count "-2"`},
		{"\n", `map.tsv:1:1: wrong number of fields: want index<TAB>feature<TAB>document count`},
	}
	for _, c := range bad {
		_, err := ReadFeatureMap(strings.NewReader(c.in), "map.tsv", 1)
		if err == nil || err.Error() != c.msg {
			t.Errorf("ReadFeatureMap(%q) error %v, want %s", c.in, err, c.msg)
		}
	}
}

// Source: LIBLINEAR's command-line tools (Debian package liblinear-tools
// 2.3.0), which read SVMlight-style rows. A small invented, linearly
// separable two-class set (Pellwick Bike Share ticket features: class +1 has
// large values in columns 0 and 3, class -1 in columns 1 and 4, all rows share
// small noise in column 2 and 5..9) is written with Writer; liblinear-train
// -s 0 (L2-regularized logistic regression) must accept it and
// liblinear-predict must then classify a second, separately drawn set with
// 100% accuracy.
func TestLiblinearReadsRows(t *testing.T) {
	train := testkit.NeedTool(t, "liblinear-train", "liblinear-tools")
	predict := testkit.NeedTool(t, "liblinear-predict", "liblinear-tools")
	dir := t.TempDir()
	rng := rand.New(rand.NewPCG(42, 43))
	write := func(name string, n int) []float64 {
		f, err := os.Create(filepath.Join(dir, name))
		if err != nil {
			t.Fatal(err)
		}
		defer f.Close()
		w := NewWriter(f, 1, false)
		var labels []float64
		for i := range n {
			label := float64(1 - 2*(i%2))
			var idx []int
			var val []float64
			strong := []int{0, 3}
			if label < 0 {
				strong = []int{1, 4}
			}
			for c := range 10 {
				switch {
				case c == strong[0] || c == strong[1]:
					idx = append(idx, c)
					val = append(val, 2+rng.Float64())
				case c == 2 || c >= 5:
					if v := 0.3 * rng.Float64(); rng.IntN(2) == 0 {
						idx = append(idx, c)
						val = append(val, v)
					}
				}
			}
			if err := w.WriteRow(label, idx, val, ""); err != nil {
				t.Fatal(err)
			}
			labels = append(labels, label)
		}
		if err := w.Flush(); err != nil {
			t.Fatal(err)
		}
		return labels
	}
	write("train.svm", 60)
	testLabels := write("test.svm", 40)
	model := filepath.Join(dir, "model")
	if out, err := exec.Command(train, "-s", "0", "-q", filepath.Join(dir, "train.svm"), model).CombinedOutput(); err != nil {
		t.Fatalf("liblinear-train: %v\n%s", err, out)
	}
	pred := filepath.Join(dir, "pred")
	out, err := exec.Command(predict, filepath.Join(dir, "test.svm"), model, pred).CombinedOutput()
	if err != nil {
		t.Fatalf("liblinear-predict: %v\n%s", err, out)
	}
	t.Logf("liblinear-predict: %s", bytes.TrimSpace(out))
	m := regexp.MustCompile(`Accuracy = ([0-9.]+)% \((\d+)/(\d+)\)`).FindSubmatch(out)
	if m == nil {
		t.Fatalf("no accuracy in liblinear-predict output %q", out)
	}
	if string(m[1]) != "100" || string(m[2]) != "40" || string(m[3]) != "40" {
		t.Errorf("liblinear accuracy %s%% (%s/%s), want 100%% (40/40)", m[1], m[2], m[3])
	}
	pf, err := os.Open(pred)
	if err != nil {
		t.Fatal(err)
	}
	defer pf.Close()
	sc := bufio.NewScanner(pf)
	for i := 0; sc.Scan(); i++ {
		if want := fmt.Sprint(testLabels[i]); sc.Text() != want {
			t.Errorf("prediction %d = %s, want %s", i+1, sc.Text(), want)
		}
	}
}

func TestWriteRowAllocatesNothing(t *testing.T) {
	idx := []int{3, 17, 256, 4095, 100000}
	val := []float64{1, 0.5, -2.25, 1e-300, 1e21}
	for _, withIDs := range []bool{false, true} {
		w := NewWriter(discard{}, 1, withIDs)
		w.WriteRow(1, idx, val, "ticket\t42") // grow the buffer once
		allocs := testing.AllocsPerRun(1000, func() {
			if err := w.WriteRow(-1, idx, val, "ticket\t42"); err != nil {
				t.Fatal(err)
			}
		})
		if allocs != 0 {
			t.Errorf("withIDs=%v: WriteRow allocates %v times per row", withIDs, allocs)
		}
	}
}

type discard struct{}

func (discard) Write(p []byte) (int, error) { return len(p), nil }

func benchRows() (idx [][]int, val [][]float64) {
	rng := rand.New(rand.NewPCG(9, 9))
	for range 256 {
		var ix []int
		var v []float64
		c := -1
		for range 40 {
			c += 1 + rng.IntN(5000)
			ix = append(ix, c)
			v = append(v, rng.Float64())
		}
		idx = append(idx, ix)
		val = append(val, v)
	}
	return idx, val
}

func BenchmarkWriteRow(b *testing.B) {
	idx, val := benchRows()
	var size int64
	for i := range idx {
		size += int64(len(AppendRow(nil, 1, idx[i], val[i], 1)) + 1)
	}
	w := NewWriter(discard{}, 1, false)
	b.SetBytes(size / int64(len(idx)))
	i := 0
	for b.Loop() {
		w.WriteRow(1, idx[i%len(idx)], val[i%len(idx)], "")
		i++
	}
}

func BenchmarkReader(b *testing.B) {
	idx, val := benchRows()
	var buf bytes.Buffer
	w := NewWriter(&buf, 1, false)
	for i := range idx {
		w.WriteRow(1, idx[i], val[i], "")
	}
	w.Flush()
	data := buf.Bytes()
	b.SetBytes(int64(len(data)))
	for b.Loop() {
		rd := NewReader(bytes.NewReader(data), "", 1)
		for rd.Scan() {
		}
		if rd.Err() != nil {
			b.Fatal(rd.Err())
		}
	}
}

// TestAppendValueMatchesStrconv: the integer fast path writes exactly what
// strconv's shortest 'g' form writes.
func TestAppendValueMatchesStrconv(t *testing.T) {
	vals := []float64{0, math.Copysign(0, -1), 1, -1, 2, 999999, -999999, 1e6, -1e6, 123456, 0.5, 1e21, 1e-7, 3, 17, 65536}
	for i := -2000; i <= 2000; i++ {
		vals = append(vals, float64(i), float64(i)/4)
	}
	for _, v := range vals {
		got := string(appendValue(nil, v))
		want := strconv.FormatFloat(v, 'g', -1, 64)
		if got != want {
			t.Fatalf("appendValue(%v) = %q, want %q", v, got, want)
		}
	}
}

// TestAppendUintMatchesStrconv checks the two-digit formatter against
// strconv on the edges of every digit count.
func TestAppendUintMatchesStrconv(t *testing.T) {
	us := []uint64{0, 1, 9, 10, 11, 99, 100, 101, 999, 1000, 65535, 1 << 20, 1<<32 - 1, 1 << 40, 1<<64 - 1}
	for p := uint64(10); p <= 1e19; p *= 10 {
		us = append(us, p)
	}
	for b := 1; b < 64; b++ {
		us = append(us, 1<<b)
	}
	for _, u := range us {
		for _, v := range []uint64{u, u - 1, u + 1} {
			if got, want := string(appendUint(nil, v)), strconv.FormatUint(v, 10); got != want {
				t.Errorf("%d: %q, want %q", v, got, want)
			}
		}
	}
}

// TestAppendRowMatchesStrconv: rows written in place, mixed with entries
// that take the general path (negative columns, counts of 10 and more,
// fractions, -0), read exactly as a plain strconv rendering of each entry.
func TestAppendRowMatchesStrconv(t *testing.T) {
	rng := rand.New(rand.NewPCG(11, 12))
	vals := []float64{1, 2, 9, 10, 0.5, -1, math.Copysign(0, -1), 1e21, 3.25}
	for trial := range 5000 {
		n := rng.IntN(30)
		idx := make([]int, n)
		val := make([]float64, n)
		for i := range idx {
			idx[i] = int(rng.Uint64() >> rng.IntN(64))
			if rng.IntN(50) == 0 {
				idx[i] = -1 - rng.IntN(100)
			}
			val[i] = float64(1 + rng.IntN(9))
			if rng.IntN(8) == 0 {
				val[i] = vals[rng.IntN(len(vals))]
			}
		}
		base := trial % 2
		label := float64(rng.IntN(5)) - 2
		want := strconv.FormatFloat(label, 'g', -1, 64)
		for i := range idx {
			want += " " + strconv.Itoa(idx[i]+base) + ":" + strconv.FormatFloat(val[i], 'g', -1, 64)
		}
		prefix := []byte("row\n")
		dst := make([]byte, len(prefix), len(prefix)+rng.IntN(400))
		copy(dst, prefix)
		got := AppendRow(dst, label, idx, val, base)
		if string(got) != string(prefix)+want {
			t.Fatalf("trial %d:\n got %q\nwant %q", trial, got, string(prefix)+want)
		}
	}
}

// BenchmarkAppendRowCounts: rows of counts in a 2^20-column space, the
// shape of hashing-mode output with tf = count.
func BenchmarkAppendRowCounts(b *testing.B) {
	rng := rand.New(rand.NewPCG(9, 10))
	var idx [][]int
	var val [][]float64
	var size int64
	for range 256 {
		var ix []int
		var v []float64
		for c := rng.IntN(9000); c < 1<<20; c += 1 + rng.IntN(18000) {
			ix = append(ix, c)
			v = append(v, float64(1+rng.IntN(3)/2))
		}
		idx, val = append(idx, ix), append(val, v)
		size += int64(len(AppendRow(nil, 1, ix, v, 1)))
	}
	b.SetBytes(size / int64(len(idx)))
	var dst []byte
	i := 0
	for b.Loop() {
		dst = AppendRow(dst[:0], 1, idx[i%len(idx)], val[i%len(idx)], 1)
		i++
	}
}
