package logreg_test

import (
	"math"
	"testing"

	"github.com/bowline/bowline/internal/logreg"
	"github.com/bowline/bowline/internal/testkit"
)

// TestAUCHandWorked checks AUC against the Mann–Whitney count done by
// hand: positives scored 0.9, 0.8, 0.4 and negatives 0.8, 0.3. Of the six
// positive–negative pairs, the positive ranks higher in 4 (0.9>0.8,
// 0.9>0.3, 0.8>0.3, 0.4>0.3), ties in 1 (0.8=0.8, counting ½) and ranks
// lower in 1 (0.4<0.8): U = 4.5, AUC = 4.5/6 = 0.75 (H. B. Mann and
// D. R. Whitney, Ann. Math. Statist. 18, 1947; the pair-counting reading of
// AUC from Hanley and McNeil, Radiology 143, 1982).
func TestAUCHandWorked(t *testing.T) {
	score := []float64{0.9, 0.8, 0.4, 0.8, 0.3, 0.5}
	label := []float64{1, 1, 1, 0, 0, 7} // 7 belongs to neither class
	if got := logreg.AUC(score, label, 1, 0); math.Abs(got-0.75) > 1e-15 {
		t.Errorf("AUC = %v, want 0.75", got)
	}
	// Perfect and reversed orderings, and a single class.
	if got := logreg.AUC([]float64{3, 2, 1}, []float64{1, 1, 0}, 1, 0); got != 1 {
		t.Errorf("perfect ranking: AUC = %v, want 1", got)
	}
	if got := logreg.AUC([]float64{1, 2, 3}, []float64{1, 1, 0}, 1, 0); got != 0 {
		t.Errorf("reversed ranking: AUC = %v, want 0", got)
	}
	if got := logreg.AUC([]float64{1, 2}, []float64{1, 1}, 1, 0); !math.IsNaN(got) {
		t.Errorf("no negatives: AUC = %v, want NaN", got)
	}
}

// TestMacroF1HandWorked: truth a a a b b c, predicted a a b b c c.
// a: TP 2, FP 0, FN 1 → F1 4/5; b: TP 1, FP 1, FN 1 → 1/2; c: TP 1, FP 1,
// FN 0 → 2/3. Mean (0.8 + 0.5 + 0.6667)/3 = 0.65556 (F1 as the harmonic
// mean of precision and recall, van Rijsbergen, Information Retrieval,
// 1979; macro-averaging as an unweighted mean over classes).
func TestMacroF1HandWorked(t *testing.T) {
	truth := []float64{1, 1, 1, 2, 2, 3}
	pred := []float64{1, 1, 2, 2, 3, 3}
	want := (0.8 + 0.5 + 2.0/3) / 3
	if got := logreg.MacroF1(truth, pred); math.Abs(got-want) > 1e-15 {
		t.Errorf("MacroF1 = %v, want %v", got, want)
	}
}

// tiny is a small separable-ish two-class dataset.
func tiny() *logreg.Dataset {
	return &logreg.Dataset{
		Columns: 4,
		Rows: []logreg.Row{
			{Indices: []int{0, 1}, Values: []float64{1, 1}},
			{Indices: []int{0}, Values: []float64{2}},
			{Indices: []int{1, 3}, Values: []float64{1, 0.5}},
			{Indices: []int{2}, Values: []float64{1}},
			{Indices: []int{2, 3}, Values: []float64{1, 1}},
			{Indices: []int{1, 2}, Values: []float64{0.5, 2}},
		},
		Labels: []float64{1, 1, 1, -1, -1, -1},
	}
}

// TestOptimality checks the first-order condition of the objective at the
// solution by finite differences of Objective, the stated formula itself:
// each partial derivative must be near zero, and moving any weight must
// not lower the objective.
func TestOptimality(t *testing.T) {
	d := tiny()
	m, err := logreg.Train(d, logreg.Options{C: 2, Tolerance: 1e-9})
	if err != nil {
		t.Fatal(err)
	}
	w := m.Weights(0)
	f := logreg.Objective(d, m.Positive(0), w, 2, 0)
	if math.Abs(f-m.Objectives[0]) > 1e-12*f {
		t.Errorf("Objective %v, training reported %v", f, m.Objectives[0])
	}
	const h = 1e-5
	for j := range w {
		for _, s := range []float64{-h, h} {
			w2 := append([]float64(nil), w...)
			w2[j] += s
			if f2 := logreg.Objective(d, m.Positive(0), w2, 2, 0); f2 < f-1e-12 {
				t.Errorf("moving weight %d by %g lowers the objective: %v < %v", j, s, f2, f)
			}
		}
		w2 := append([]float64(nil), w...)
		w2[j] += h
		fp := logreg.Objective(d, m.Positive(0), w2, 2, 0)
		w2[j] -= 2 * h
		fm := logreg.Objective(d, m.Positive(0), w2, 2, 0)
		if g := (fp - fm) / (2 * h); math.Abs(g) > 1e-6 {
			t.Errorf("partial derivative %d at the solution is %v", j, g)
		}
	}
	// The model must separate this data.
	ev := logreg.Evaluate(m, d)
	if ev.Accuracy != 1 || ev.AUC != 1 {
		t.Errorf("training accuracy %v, AUC %v; want 1 and 1", ev.Accuracy, ev.AUC)
	}
}

// TestWithoutData: an all-zero row set gives w = 0 exactly, whose objective
// is C·n·ln 2 (each loss term is log(1+e^0)).
func TestWithoutData(t *testing.T) {
	d := &logreg.Dataset{Columns: 3, Rows: make([]logreg.Row, 4), Labels: []float64{1, 2, 1, 2}}
	m, err := logreg.Train(d, logreg.Options{C: 3})
	if err != nil {
		t.Fatal(err)
	}
	if want := 3 * 4 * math.Ln2; math.Abs(m.Objectives[0]-want) > 1e-12 {
		t.Errorf("objective %v, want %v", m.Objectives[0], want)
	}
	_, p := m.Predict(logreg.Row{})
	if p[0] != 0.5 || p[1] != 0.5 {
		t.Errorf("probabilities %v, want [0.5 0.5]", p)
	}
	ev := logreg.Evaluate(m, d)
	if math.Abs(ev.LogLoss-math.Ln2) > 1e-15 {
		t.Errorf("log loss %v, want ln 2", ev.LogLoss)
	}
}

// TestMultiClassProbabilities: one-vs-rest probabilities sum to one and the
// predicted class has the largest.
func TestMultiClassProbabilities(t *testing.T) {
	d := tiny()
	d.Labels = []float64{3, 3, 1, 2, 2, 1}
	m, err := logreg.Train(d, logreg.Options{})
	if err != nil {
		t.Fatal(err)
	}
	if m.Problems() != 3 || len(m.Classes) != 3 {
		t.Fatalf("%d problems over classes %v, want 3", m.Problems(), m.Classes)
	}
	for i, r := range d.Rows {
		c, p := m.Predict(r)
		var sum float64
		best := 0
		for k, v := range p {
			sum += v
			if v > p[best] {
				best = k
			}
		}
		if math.Abs(sum-1) > 1e-12 || c != m.Classes[best] {
			t.Errorf("row %d: class %v, probabilities %v (sum %v)", i, c, p, sum)
		}
	}
	ev := logreg.Evaluate(m, d)
	if !math.IsNaN(ev.AUC) {
		t.Errorf("AUC of a 3-class model is %v, want NaN", ev.AUC)
	}
}

// TestDeterministic: the same data trains the same weights, bit for bit.
func TestDeterministic(t *testing.T) {
	tr, te := testkit.DemoSplit(t, 600)
	a, _ := encodeTSV(t, tr, te, "team", 2)
	d := readRows(t, "train", a, 0)
	m1, err := logreg.Train(d, logreg.Options{})
	if err != nil {
		t.Fatal(err)
	}
	m2, _ := logreg.Train(d, logreg.Options{})
	for k := 0; k < m1.Problems(); k++ {
		w1, w2 := m1.Weights(k), m2.Weights(k)
		for j := range w1 {
			if math.Float64bits(w1[j]) != math.Float64bits(w2[j]) {
				t.Fatalf("problem %d weight %d: %v then %v", k, j, w1[j], w2[j])
			}
		}
	}
}

func TestTrainErrors(t *testing.T) {
	for name, d := range map[string]*logreg.Dataset{
		"no rows":         {Columns: 2},
		"labels mismatch": {Columns: 2, Rows: make([]logreg.Row, 2), Labels: []float64{1}},
		"index too large": {Columns: 2, Rows: []logreg.Row{{Indices: []int{2}, Values: []float64{1}}}, Labels: []float64{1}},
		"out of order":    {Columns: 5, Rows: []logreg.Row{{Indices: []int{3, 1}, Values: []float64{1, 1}}}, Labels: []float64{1}},
		"NaN value":       {Columns: 5, Rows: []logreg.Row{{Indices: []int{1}, Values: []float64{math.NaN()}}}, Labels: []float64{1}},
	} {
		if _, err := logreg.Train(d, logreg.Options{}); err == nil {
			t.Errorf("%s: no error", name)
		}
	}
	if _, err := logreg.Train(tiny(), logreg.Options{C: -1}); err == nil {
		t.Error("negative C: no error")
	}
}

// TestBias: with a bias feature the model has one more weight, and data
// that only a bias can fit (all rows empty, three of four positive) is
// fitted: the bias weight b solves b + C·Σ ... = 0 with
// p = σ(b·B) near the positive share when C is large.
func TestBias(t *testing.T) {
	d := &logreg.Dataset{Columns: 2, Rows: make([]logreg.Row, 4), Labels: []float64{1, 1, 1, 0}}
	m, err := logreg.Train(d, logreg.Options{C: 1e4, Bias: 1, Tolerance: 1e-10})
	if err != nil {
		t.Fatal(err)
	}
	w := m.Weights(0)
	if len(w) != 3 {
		t.Fatalf("%d weights, want 3 (2 columns and the bias)", len(w))
	}
	_, p := m.Predict(logreg.Row{})
	if math.Abs(p[1]-0.75) > 1e-3 {
		t.Errorf("P(class 1) = %v, want about 0.75", p[1])
	}
}

// TestIterationBudget: with a tolerance no run reaches, each problem stops
// after exactly MaxIterations iterations, and the objective has fallen
// below its value at w = 0, C·n·ln 2.
func TestIterationBudget(t *testing.T) {
	tr, te := testkit.DemoSplit(t, 600)
	a, _ := encodeTSV(t, tr, te, "channel", 2)
	d := readRows(t, "train", a, 0)
	for _, n := range []int{1, 2, 5} {
		m, err := logreg.Train(d, logreg.Options{MaxIterations: n, Tolerance: 1e-300})
		if err != nil {
			t.Fatal(err)
		}
		if len(m.Iterations) != 1 || m.Iterations[0] != n {
			t.Errorf("budget %d: iterations %v", n, m.Iterations)
		}
		if start := float64(len(d.Rows)) * math.Ln2; !(m.Objectives[0] < start) {
			t.Errorf("budget %d: objective %v, not below %v at w = 0", n, m.Objectives[0], start)
		}
	}
}
