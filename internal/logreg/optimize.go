package logreg

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/optimize"
)

// lbfgsStore is the number of correction pairs L-BFGS keeps.
const lbfgsStore = 10

// minRelativeDecrease stops a problem when an iteration lowers the
// objective by no more than this fraction of its value.
const minRelativeDecrease = 1e-15

// minimize runs gonum's L-BFGS (optimize.LBFGS) from w, which it updates
// in place, on the objective of p, and returns the final value and the
// iterations run. The search direction is L-BFGS's two-loop recursion over
// the last lbfgsStore correction pairs; steps satisfy the strong Wolfe
// conditions with sufficient decrease 1e-4 and curvature 0.9, found by
// gonum's MoreThuente line search (J. Nocedal and S. J. Wright, Numerical
// Optimization, 2nd ed., 2006, algorithms 7.4 and 7.5 and section 3.1;
// J. J. Moré and D. J. Thuente, ACM Trans. Math. Softw. 20(3), 1994).
//
// It stops, checking at the start and after each iteration, when:
//   - the largest gradient component is at most tol times its value at the
//     start (the converger below; gonum's own gradient thresholds are
//     absolute, so they are switched off);
//   - maxIter iterations have run (Settings.MajorIterations, which also
//     counts the start as one);
//   - an iteration lowered the objective by no more than
//     minRelativeDecrease of its value (gonum's FunctionConverge); or
//   - the line search finds no step that lowers the objective any more
//     (gonum reports a line search error; the last accepted iterate is
//     kept).
//
// gonum evaluates on its own goroutines; with Settings.Concurrent 1 only
// one evaluation is in flight at a time, in the order the method asks for
// them, and no time limit is set, so the run does not depend on
// scheduling or the clock and gives the same w bit for bit.
func minimize(p *problem, w []float64, tol float64, maxIter int) (float64, int, error) {
	g := make([]float64, len(w))
	f := p.value(w)
	p.gradient(g, w)
	stop := tol * maxAbs(g)
	// Nothing to do without columns or without a gradient; a gradient
	// that is not finite leaves w at the start for the caller to judge by
	// its objective.
	if len(w) == 0 || stop == 0 || math.IsNaN(stop) || math.IsInf(stop, 0) || math.IsNaN(f) || math.IsInf(f, 0) {
		return f, 0, nil
	}
	method := &optimize.LBFGS{
		Linesearcher:      &optimize.MoreThuente{DecreaseFactor: 1e-4, CurvatureFactor: 0.9},
		Store:             lbfgsStore,
		GradStopThreshold: math.NaN(), // off: the converger decides
	}
	settings := &optimize.Settings{
		InitValues:      &optimize.Location{F: f, Gradient: g},
		Converger:       &converger{stop: stop, fc: optimize.FunctionConverge{Relative: minRelativeDecrease, Iterations: 1}},
		MajorIterations: iterLimit(maxIter),
		Concurrent:      1,
	}
	res, err := optimize.Minimize(optimize.Problem{Func: p.value, Grad: p.gradient}, w, settings, method)
	if err != nil && !noProgress(err) {
		return 0, 0, fmt.Errorf("learner: L-BFGS: %w", err)
	}
	copy(w, res.X)
	return res.F, max(res.MajorIterations-1, 0), nil
}

// iterLimit returns Settings.MajorIterations for a budget of maxIter
// iterations: one more, for the start; 0 (no limit) when that overflows.
func iterLimit(maxIter int) int {
	if maxIter == math.MaxInt {
		return 0
	}
	return maxIter + 1
}

// noProgress reports whether err is gonum's word that the line search can
// lower the objective no further.
func noProgress(err error) bool {
	for _, e := range []error{optimize.ErrLinesearcherFailure, optimize.ErrLinesearcherBound, optimize.ErrNoProgress, optimize.ErrNonDescentDirection} {
		if errors.Is(err, e) {
			return true
		}
	}
	return false
}

// converger is the stopping rule checked at every iterate, the start
// included: the largest gradient component at most stop, else fc's test
// on the decrease of the objective.
type converger struct {
	stop float64
	fc   optimize.FunctionConverge
}

func (c *converger) Init(dim int) { c.fc.Init(dim) }

func (c *converger) Converged(loc *optimize.Location) optimize.Status {
	if maxAbs(loc.Gradient) <= c.stop {
		return optimize.GradientThreshold
	}
	return c.fc.Converged(loc)
}

func maxAbs(x []float64) float64 {
	m := 0.0
	for _, v := range x {
		m = math.Max(m, math.Abs(v))
	}
	return m
}
