package logreg

import "math"

// lbfgsStore is the number of correction pairs L-BFGS keeps.
const lbfgsStore = 10

// minimize runs limited-memory BFGS from w (updated in place) on the
// function fg, which returns the value at w and writes the gradient into
// g. It uses the two-loop recursion for the search direction and a
// backtracking line search with the Armijo condition (J. Nocedal and
// S. J. Wright, Numerical Optimization, 2nd ed., 2006, algorithms 7.4 and
// 3.1), skipping a correction pair whose curvature sᵀy is not positive.
//
// It stops when the largest gradient component is at most tol times its
// value at the start, after maxIter iterations, or when no step decreases
// the value any more. It returns the final value and the iterations run.
func minimize(fg func(w, g []float64) float64, w []float64, tol float64, maxIter int) (float64, int) {
	n := len(w)
	g := make([]float64, n)
	f := fg(w, g)
	if n == 0 {
		return f, 0
	}
	stop := tol * maxAbs(g)
	if stop == 0 {
		return f, 0
	}
	s := make([][]float64, 0, lbfgsStore)
	yv := make([][]float64, 0, lbfgsStore)
	rho := make([]float64, 0, lbfgsStore)
	alpha := make([]float64, lbfgsStore)
	d := make([]float64, n)
	wNew := make([]float64, n)
	gNew := make([]float64, n)
	it := 0
	for ; it < maxIter && maxAbs(g) > stop; it++ {
		// Direction d = −H·g by the two-loop recursion.
		for i := range d {
			d[i] = -g[i]
		}
		for k := len(s) - 1; k >= 0; k-- {
			alpha[k] = rho[k] * dot(s[k], d)
			axpy(-alpha[k], yv[k], d)
		}
		step := 1.0
		if m := len(s); m > 0 {
			// Initial Hessian γ·I with γ = sᵀy / yᵀy of the newest pair.
			scale(dot(s[m-1], yv[m-1])/dot(yv[m-1], yv[m-1]), d)
			for k := 0; k < m; k++ {
				b := rho[k] * dot(yv[k], d)
				axpy(alpha[k]-b, s[k], d)
			}
		} else {
			// First step: steepest descent of length at most 1.
			step = math.Min(1, 1/math.Sqrt(dot(g, g)))
		}
		slope := dot(g, d)
		if slope >= 0 {
			// Not a descent direction (rounding): restart from −g.
			s, yv, rho = s[:0], yv[:0], rho[:0]
			for i := range d {
				d[i] = -g[i]
			}
			slope = -dot(g, g)
			step = math.Min(1, 1/math.Sqrt(-slope))
		}
		// Backtracking line search: accept the first step with
		// f(w + t·d) ≤ f(w) + 1e-4·t·gᵀd.
		var fNew float64
		ok := false
		for tries := 0; tries < 60; tries++ {
			for i := range w {
				wNew[i] = w[i] + step*d[i]
			}
			fNew = fg(wNew, gNew)
			if fNew <= f+1e-4*step*slope {
				ok = true
				break
			}
			step /= 2
		}
		if !ok {
			break
		}
		// Keep the correction pair s = Δw, y = Δg when sᵀy > 0.
		var sk, yk []float64
		if len(s) == lbfgsStore {
			sk, yk = s[0], yv[0]
			s, yv, rho = append(s[:0], s[1:]...), append(yv[:0], yv[1:]...), append(rho[:0], rho[1:]...)
		} else {
			sk, yk = make([]float64, n), make([]float64, n)
		}
		for i := range w {
			sk[i] = wNew[i] - w[i]
			yk[i] = gNew[i] - g[i]
		}
		if sy := dot(sk, yk); sy > 1e-12*math.Sqrt(dot(sk, sk)*dot(yk, yk)) && sy > 0 {
			s, yv, rho = append(s, sk), append(yv, yk), append(rho, 1/sy)
		}
		copy(w, wNew)
		copy(g, gNew)
		improved := f - fNew
		f = fNew
		if improved <= 1e-15*math.Abs(f) {
			it++
			break
		}
	}
	return f, it
}

func dot(a, b []float64) float64 {
	var s float64
	for i, v := range a {
		s += v * b[i]
	}
	return s
}

func axpy(a float64, x, y []float64) {
	for i, v := range x {
		y[i] += a * v
	}
}

func scale(a float64, x []float64) {
	for i := range x {
		x[i] *= a
	}
}

func maxAbs(x []float64) float64 {
	m := 0.0
	for _, v := range x {
		m = math.Max(m, math.Abs(v))
	}
	return m
}
