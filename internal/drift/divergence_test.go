package drift

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/stat"
)

func near(a, b, tol float64) bool { return math.Abs(a-b) <= tol }

// TestJSDHandComputed checks JSD against values worked out by hand from
// the definition in J. Lin, "Divergence measures based on the Shannon
// entropy", IEEE Trans. Inf. Theory 37(1), 1991: JSD(P,Q) = H(M) −
// (H(P)+H(Q))/2 with M = (P+Q)/2, here with base-2 logarithms (bits).
func TestJSDHandComputed(t *testing.T) {
	cases := []struct {
		name string
		p, q []float64
		want float64
	}{
		// Identical distributions: H(M) = H(P) = H(Q), so JSD = 0.
		{"identical", []float64{0.2, 0.3, 0.5}, []float64{0.2, 0.3, 0.5}, 0},
		// Disjoint supports: M = (1/2, 1/2), H(M) = 1, H(P) = H(Q) = 0,
		// so JSD = 1 bit, Lin's upper bound.
		{"disjoint", []float64{1, 0}, []float64{0, 1}, 1},
		// P = (1/2, 1/2, 0), Q = (0, 1/2, 1/2): M = (1/4, 1/2, 1/4),
		// H(M) = 1/4·2 + 1/2·1 + 1/4·2 = 1.5, H(P) = H(Q) = 1,
		// JSD = 1.5 − 1 = 0.5 bit.
		{"half overlap", []float64{0.5, 0.5, 0}, []float64{0, 0.5, 0.5}, 0.5},
		// The same with unnormalized weights (each side is divided by its
		// own sum): (2, 2, 0) and (0, 7, 7).
		{"weights", []float64{2, 2, 0}, []float64{0, 7, 7}, 0.5},
		// P = (1, 0), Q = (1/2, 1/2): M = (3/4, 1/4),
		// H(M) = −3/4·log2(3/4) − 1/4·log2(1/4) = 0.311278 + 0.5 = 0.811278,
		// H(P) = 0, H(Q) = 1, JSD = 0.811278 − 0.5 = 0.311278 bit.
		{"point vs uniform", []float64{1, 0}, []float64{0.5, 0.5}, 0.8112781244591328 - 0.5},
	}
	for _, c := range cases {
		if got := JSD(c.p, c.q); !near(got, c.want, 1e-12) {
			t.Errorf("%s: JSD = %.15g, want %.15g", c.name, got, c.want)
		}
		if got := JSD(c.q, c.p); !near(got, c.want, 1e-12) {
			t.Errorf("%s: JSD is not symmetric: %.15g, want %.15g", c.name, got, c.want)
		}
	}
	if !math.IsNaN(JSD([]float64{0, 0}, []float64{1, 0})) {
		t.Error("JSD of an empty distribution is not NaN")
	}
	if !math.IsNaN(JSD([]float64{1}, []float64{1, 0})) {
		t.Error("JSD of different lengths is not NaN")
	}
}

// TestJSDAgainstGonum compares JSD with gonum's stat.JensenShannon (an
// independent implementation, in nats) divided by ln 2.
func TestJSDAgainstGonum(t *testing.T) {
	p := []float64{0.1, 0.2, 0.3, 0.4, 0}
	q := []float64{0.25, 0.25, 0.05, 0.05, 0.4}
	want := stat.JensenShannon(p, q) / math.Ln2
	if got := JSD(p, q); !near(got, want, 1e-12) {
		t.Errorf("JSD = %.15g, gonum gives %.15g bits", got, want)
	}
}

// TestPSIHandComputed checks PSI = Σ (q_i − p_i)·ln(q_i/p_i), the
// population stability index as used in credit scoring (N. Siddiqi,
// "Credit Risk Scorecards", 2006, recalled from memory), on an example
// worked by hand.
func TestPSIHandComputed(t *testing.T) {
	// p = (0.5, 0.3, 0.2), q = (0.4, 0.4, 0.2):
	//   (0.4 − 0.5)·ln(0.4/0.5) = −0.1·(−0.2231435513) = 0.0223143551
	//   (0.4 − 0.3)·ln(0.4/0.3) =  0.1·( 0.2876820725) = 0.0287682072
	//   (0.2 − 0.2)·ln(1)       =  0
	// PSI = 0.0510825624.
	p := []float64{0.5, 0.3, 0.2}
	q := []float64{0.4, 0.4, 0.2}
	if got := PSI(p, q); !near(got, 0.0510825624, 1e-10) {
		t.Errorf("PSI = %.12g, want 0.0510825624", got)
	}
	if got := PSI(q, p); !near(got, 0.0510825624, 1e-10) {
		t.Errorf("PSI is not symmetric: %.12g", got)
	}
	if got := PSI(p, p); got != 0 {
		t.Errorf("PSI of identical distributions = %g, want 0", got)
	}
	// An empty bin counts as PSIEpsilon = 1e-6:
	// p = (0.5, 0.5, 0), q = (0.5, 0.4, 0.1):
	//   (0.4 − 0.5)·ln(0.4/0.5)   = 0.0223143551
	//   (0.1 − 1e-6)·ln(0.1/1e-6) = 0.099999·ln(1e5) = 0.099999·11.5129254650 = 1.1512810336
	// PSI = 1.1735953887.
	p = []float64{0.5, 0.5, 0}
	q = []float64{0.5, 0.4, 0.1}
	if got := PSI(p, q); !near(got, 1.1735953887, 1e-9) {
		t.Errorf("PSI with an empty bin = %.12g, want 1.1735953887", got)
	}
}

// TestPSIIsJeffreys checks that PSI without empty bins equals the
// symmetrized Kullback–Leibler divergence KL(p‖q) + KL(q‖p) in nats,
// computed with gonum's stat.KullbackLeibler.
func TestPSIIsJeffreys(t *testing.T) {
	p := []float64{0.1, 0.2, 0.3, 0.4}
	q := []float64{0.25, 0.25, 0.2, 0.3}
	want := stat.KullbackLeibler(p, q) + stat.KullbackLeibler(q, p)
	if got := PSI(p, q); !near(got, want, 1e-12) {
		t.Errorf("PSI = %.15g, KL(p,q)+KL(q,p) = %.15g", got, want)
	}
}
