package drift

import (
	"math"
	"testing"

	"github.com/bowline/bowline/internal/testkit"
	"gonum.org/v1/gonum/stat"
)

// TestJSDAgainstGonum compares JSD with gonum's stat.JensenShannon (an
// independent implementation, in nats) divided by ln 2.
func TestJSDAgainstGonum(t *testing.T) {
	p := []float64{0.1, 0.2, 0.3, 0.4, 0}
	q := []float64{0.25, 0.25, 0.05, 0.05, 0.4}
	want := stat.JensenShannon(p, q) / math.Ln2
	if got := JSD(p, q); !testkit.Near(got, want, 1e-12) {
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
	if got := PSI(p, q); !testkit.Near(got, 0.0510825624, 1e-10) {
		t.Errorf("PSI = %.12g, want 0.0510825624", got)
	}
	if got := PSI(q, p); !testkit.Near(got, 0.0510825624, 1e-10) {
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
	if got := PSI(p, q); !testkit.Near(got, 1.1735953887, 1e-9) {
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
	if got := PSI(p, q); !testkit.Near(got, want, 1e-12) {
		t.Errorf("PSI = %.15g, KL(p,q)+KL(q,p) = %.15g", got, want)
	}
}
