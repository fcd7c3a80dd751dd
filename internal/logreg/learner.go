package logreg

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"sort"
)

// Row is one sparse row: 0-based column indices, strictly ascending, and
// the value of each.
type Row struct {
	Indices []int
	Values  []float64
}

// Dataset is a set of labeled rows.
type Dataset struct {
	// Rows are the examples.
	Rows []Row
	// Labels holds one class id per row.
	Labels []float64
	// Columns is the number of columns; every index is below it.
	Columns int
}

// Options control training. The zero value gives liblinear's defaults for
// C and the bias, and bowline's fixed budget and tolerance.
type Options struct {
	// C is the weight of the loss against the regularizer (liblinear's
	// -c). 0 means 1.
	C float64
	// Bias, when positive, appends a constant feature of that value to
	// every row, regularized like the others (liblinear's -B). 0 means no
	// bias term, liblinear's default.
	Bias float64
	// MaxIterations is the L-BFGS iteration budget per binary problem.
	// 0 means DefaultMaxIterations.
	MaxIterations int
	// Tolerance stops a problem when the largest gradient component is at
	// most Tolerance times its value at w = 0. 0 means DefaultTolerance.
	Tolerance float64
}

// Defaults of Options.
const (
	DefaultMaxIterations = 1000
	DefaultTolerance     = 1e-5
)

// Model is a trained classifier.
type Model struct {
	// Classes are the class ids seen in training, ascending.
	Classes []float64
	// C and Bias are the options the model was trained with.
	C, Bias float64
	// Columns is the dataset's column count.
	Columns int
	// Iterations holds the L-BFGS iterations each binary problem took.
	Iterations []int
	// Objectives holds each binary problem's objective at the solution.
	Objectives []float64

	cols []int       // columns that occur in training, ascending
	w    [][]float64 // per problem: one weight per entry of cols, then the bias weight if Bias > 0
}

// Problems returns the number of binary problems: 0 for a single class,
// 1 for two classes, one per class otherwise.
func (m *Model) Problems() int { return len(m.w) }

// Positive returns the class that problem k separates from the rest:
// Classes[1] for a two-class model, Classes[k] otherwise.
func (m *Model) Positive(k int) float64 {
	if len(m.Classes) == 2 {
		return m.Classes[1]
	}
	return m.Classes[k]
}

// Weights returns problem k's weights as a dense slice of Columns values,
// followed by the bias weight when the model has a bias.
func (m *Model) Weights(k int) []float64 {
	n := m.Columns
	if m.Bias > 0 {
		n++
	}
	out := make([]float64, n)
	for i, c := range m.cols {
		out[c] = m.w[k][i]
	}
	if m.Bias > 0 {
		out[m.Columns] = m.w[k][len(m.cols)]
	}
	return out
}

// Train fits a model to d. It reports an error for an empty or malformed
// dataset.
func Train(d *Dataset, o Options) (*Model, error) {
	if err := d.check(); err != nil {
		return nil, err
	}
	if len(d.Rows) == 0 {
		return nil, errors.New("learner: no rows to train on")
	}
	if o.C == 0 {
		o.C = 1
	}
	if o.C < 0 || math.IsNaN(o.C) || math.IsInf(o.C, 0) {
		return nil, fmt.Errorf("learner: C must be a positive number, not %v", o.C)
	}
	if o.Bias < 0 || math.IsNaN(o.Bias) || math.IsInf(o.Bias, 0) {
		return nil, fmt.Errorf("learner: bias must be 0 (none) or positive, not %v", o.Bias)
	}
	if o.MaxIterations <= 0 {
		o.MaxIterations = DefaultMaxIterations
	}
	if o.Tolerance <= 0 {
		o.Tolerance = DefaultTolerance
	}
	m := &Model{C: o.C, Bias: o.Bias, Columns: d.Columns}
	m.Classes = distinct(d.Labels)
	x := compact(d, o.Bias)
	m.cols = x.cols
	var problems []float64
	switch len(m.Classes) {
	case 1:
	case 2:
		problems = m.Classes[1:]
	default:
		problems = m.Classes
	}
	y := make([]float64, len(d.Labels))
	for _, pos := range problems {
		for i, l := range d.Labels {
			y[i] = -1
			if l == pos {
				y[i] = 1
			}
		}
		w, f, it, err := solve(x, y, o)
		if err != nil {
			return nil, err
		}
		m.w = append(m.w, w)
		m.Objectives = append(m.Objectives, f)
		m.Iterations = append(m.Iterations, it)
	}
	return m, nil
}

func (d *Dataset) check() error {
	if len(d.Labels) != len(d.Rows) {
		return fmt.Errorf("learner: %d labels for %d rows", len(d.Labels), len(d.Rows))
	}
	if d.Columns < 0 {
		return fmt.Errorf("learner: negative column count %d", d.Columns)
	}
	for i, r := range d.Rows {
		if len(r.Indices) != len(r.Values) {
			return fmt.Errorf("learner: row %d: %d indices and %d values", i, len(r.Indices), len(r.Values))
		}
		for j, c := range r.Indices {
			if c < 0 || c >= d.Columns || (j > 0 && c <= r.Indices[j-1]) {
				return fmt.Errorf("learner: row %d: index %d out of order or outside [0, %d)", i, c, d.Columns)
			}
			if v := r.Values[j]; math.IsNaN(v) || math.IsInf(v, 0) {
				return fmt.Errorf("learner: row %d: value %v at index %d is not finite", i, v, c)
			}
		}
		if l := d.Labels[i]; math.IsNaN(l) || math.IsInf(l, 0) {
			return fmt.Errorf("learner: row %d: label %v is not finite", i, l)
		}
	}
	return nil
}

func distinct(v []float64) []float64 {
	s := slices.Clone(v)
	slices.Sort(s)
	return slices.Compact(s)
}

// matrix is the training rows in compressed sparse row form over the
// columns that occur (plus the bias column).
type matrix struct {
	cols  []int
	dim   int
	start []int
	idx   []int32
	val   []float64
}

func compact(d *Dataset, bias float64) *matrix {
	nnz := 0
	for _, r := range d.Rows {
		nnz += len(r.Indices)
	}
	all := make([]int, 0, nnz)
	for _, r := range d.Rows {
		all = append(all, r.Indices...)
	}
	slices.Sort(all)
	cols := slices.Clip(slices.Compact(all))
	x := &matrix{cols: cols, dim: len(cols), start: make([]int, 1, len(d.Rows)+1)}
	if bias > 0 {
		x.dim++
		nnz += len(d.Rows)
	}
	x.idx = make([]int32, 0, nnz)
	x.val = make([]float64, 0, nnz)
	for _, r := range d.Rows {
		for j, c := range r.Indices {
			k, _ := slices.BinarySearch(cols, c)
			x.idx = append(x.idx, int32(k))
			x.val = append(x.val, r.Values[j])
		}
		if bias > 0 {
			x.idx = append(x.idx, int32(len(cols)))
			x.val = append(x.val, bias)
		}
		x.start = append(x.start, len(x.idx))
	}
	return x
}

// problem is one binary objective over the compact rows. It keeps the
// value and gradient at the last w it saw, so it serves one caller at a
// time.
type problem struct {
	x *matrix
	y []float64
	c float64

	at []float64 // the w of f and g; nil before the first evaluation
	f  float64
	g  []float64
}

// log1pexp returns log(1 + exp(t)) without overflow.
func log1pexp(t float64) float64 {
	if t > 0 {
		return t + math.Log1p(math.Exp(-t))
	}
	return math.Log1p(math.Exp(t))
}

// sigmoid returns 1 / (1 + exp(−t)).
func sigmoid(t float64) float64 {
	if t >= 0 {
		return 1 / (1 + math.Exp(-t))
	}
	e := math.Exp(t)
	return e / (1 + e)
}

// evaluate sets p.f and p.g to the objective and its gradient at w,
// unless they already hold them for the same w, bit for bit: the line
// search asks for the value and then the gradient at one point. The
// gradient is w + C·Σ −y·σ(−y·wᵀx)·x. Rows are visited in order, so the
// sums are the same on every run.
func (p *problem) evaluate(w []float64) {
	if p.at != nil && sameBits(p.at, w) {
		return
	}
	if p.at == nil {
		p.at = make([]float64, len(w))
		p.g = make([]float64, len(w))
	}
	x := p.x
	g := p.g
	var reg, loss float64
	for i, v := range w {
		reg += v * v
		g[i] = v
	}
	for i, y := range p.y {
		var z float64
		for j := x.start[i]; j < x.start[i+1]; j++ {
			z += w[x.idx[j]] * x.val[j]
		}
		loss += log1pexp(-y * z)
		// d/dz of C·log(1+exp(−y·z)) is −C·y·σ(−y·z).
		s := -p.c * y * sigmoid(-y*z)
		for j := x.start[i]; j < x.start[i+1]; j++ {
			g[x.idx[j]] += s * x.val[j]
		}
	}
	p.f = 0.5*reg + p.c*loss
	copy(p.at, w)
}

// sameBits reports whether a and b hold the same float64 bit patterns.
func sameBits(a, b []float64) bool {
	if len(a) != len(b) {
		return false
	}
	for i, v := range a {
		if math.Float64bits(v) != math.Float64bits(b[i]) {
			return false
		}
	}
	return true
}

// value returns the objective at w.
func (p *problem) value(w []float64) float64 {
	p.evaluate(w)
	return p.f
}

// gradient stores the objective's gradient at w in g.
func (p *problem) gradient(g, w []float64) {
	p.evaluate(w)
	copy(g, p.g)
}

func solve(x *matrix, y []float64, o Options) (w []float64, f float64, iters int, err error) {
	p := &problem{x: x, y: y, c: o.C}
	w = make([]float64, x.dim)
	f, iters, err = minimize(p, w, o.Tolerance, o.MaxIterations)
	if err != nil {
		return nil, 0, 0, err
	}
	if math.IsNaN(f) || math.IsInf(f, 0) {
		return nil, 0, 0, errors.New("learner: the objective is not finite; are the row values very large?")
	}
	return w, f, iters, nil
}

// Predict returns the most probable class of row and the probability of
// each class, in the order of Classes. Two-class models give
// σ(w·x) to Classes[1]; models with more classes normalize the per-class
// σ(w_k·x) to sum to one, as liblinear's logistic models do. Columns not
// seen in training weigh nothing. Ties go to the earlier class.
func (m *Model) Predict(row Row) (class float64, probs []float64) {
	probs = make([]float64, len(m.Classes))
	return m.predictInto(row, probs), probs
}

func (m *Model) predictInto(row Row, probs []float64) float64 {
	switch len(m.Classes) {
	case 0:
		return 0
	case 1:
		probs[0] = 1
		return m.Classes[0]
	case 2:
		p := sigmoid(m.decision(0, row))
		probs[0], probs[1] = 1-p, p
		if p > 0.5 {
			return m.Classes[1]
		}
		return m.Classes[0]
	}
	var sum float64
	for k := range m.w {
		probs[k] = sigmoid(m.decision(k, row))
		sum += probs[k]
	}
	best := 0
	for k := range probs {
		probs[k] /= sum
		if probs[k] > probs[best] {
			best = k
		}
	}
	return m.Classes[best]
}

// decision returns w_k·x for problem k.
func (m *Model) decision(k int, row Row) float64 {
	w := m.w[k]
	var s float64
	// Walk both sorted lists; binary search from the last hit.
	lo := 0
	for j, c := range row.Indices {
		i := lo + sort.SearchInts(m.cols[lo:], c)
		if i < len(m.cols) && m.cols[i] == c {
			s += w[i] * row.Values[j]
		}
		lo = i
	}
	if m.Bias > 0 {
		s += w[len(m.cols)] * m.Bias
	}
	return s
}

// Objective returns liblinear's -s 0 primal objective for the binary
// problem "positive against the rest" on d at the dense weights w (Columns
// values, then the bias weight when bias > 0):
// 0.5·wᵀw + C·Σ log(1 + exp(−y·wᵀx)).
func Objective(d *Dataset, positive float64, w []float64, c, bias float64) float64 {
	var reg, loss float64
	for _, v := range w {
		reg += v * v
	}
	for i, r := range d.Rows {
		var z float64
		for j, col := range r.Indices {
			z += w[col] * r.Values[j]
		}
		if bias > 0 {
			z += w[d.Columns] * bias
		}
		y := -1.0
		if d.Labels[i] == positive {
			y = 1
		}
		loss += log1pexp(-y * z)
	}
	return 0.5*reg + c*loss
}
