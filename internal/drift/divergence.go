package drift

import "math"

// PSIEpsilon is the share given to an empty bin when the population
// stability index is computed: PSI takes the logarithm of a ratio of
// shares, which is undefined when either share is 0. A bin whose share is
// below PSIEpsilon counts as PSIEpsilon (the other shares are not
// rescaled). Substituting a small constant for empty bins is common
// practice; the value 1e-6 is bowline's choice, small enough to sit below
// the share of a single document–key pair in corpora of up to a million
// documents.
const PSIEpsilon = 1e-6

// JSD returns the Jensen–Shannon divergence, in bits, between the
// distributions given by the non-negative weights p and q (each is divided
// by its own sum first; p and q must have the same length):
//
//	JSD(P, Q) = ½·KL(P ‖ M) + ½·KL(Q ‖ M),  M = ½·(P + Q),
//	KL(P ‖ M) = Σ p_i · log2(p_i / m_i),
//
// with 0·log 0 taken as 0. It is symmetric and lies between 0 (identical
// distributions) and 1 bit (disjoint supports). Source: J. Lin,
// "Divergence measures based on the Shannon entropy", IEEE Transactions on
// Information Theory 37(1), 1991, where it is the JS divergence with equal
// weights. JSD returns NaN when either sum is 0 or the lengths differ.
func JSD(p, q []float64) float64 {
	sp, sq, ok := sums(p, q)
	if !ok {
		return math.NaN()
	}
	var d float64
	for i := range p {
		a, b := p[i]/sp, q[i]/sq
		m := (a + b) / 2
		if a > 0 {
			d += a * math.Log2(a/m)
		}
		if b > 0 {
			d += b * math.Log2(b/m)
		}
	}
	d /= 2
	// Rounding can leave a tiny negative value, or a hair above 1, for
	// (near-)identical or disjoint distributions.
	return min(max(d, 0), 1)
}

// PSI returns the population stability index between the distributions
// given by the non-negative weights p (the reference, say training) and q
// (the new sample), each divided by its own sum first:
//
//	PSI = Σ (q_i − p_i) · ln(q_i / p_i),
//
// where a share below PSIEpsilon counts as PSIEpsilon. PSI is symmetric in
// p and q and is 0 for identical distributions. It is the symmetrized
// Kullback–Leibler divergence (Jeffreys' J) in nats. Source: the index as
// used in credit scoring, for example N. Siddiqi, "Credit Risk Scorecards"
// (Wiley, 2006), recalled from memory; so is that book's rule of thumb
// (below 0.1 no real shift, 0.1 to 0.25 some shift, above 0.25 a large
// shift), which was meant for about ten bins and does not carry over to
// distributions over thousands of keys. PSI returns NaN when either sum is
// 0 or the lengths differ.
func PSI(p, q []float64) float64 {
	sp, sq, ok := sums(p, q)
	if !ok {
		return math.NaN()
	}
	var d float64
	for i := range p {
		a, b := max(p[i]/sp, PSIEpsilon), max(q[i]/sq, PSIEpsilon)
		d += (b - a) * math.Log(b/a)
	}
	return d
}

func sums(p, q []float64) (sp, sq float64, ok bool) {
	if len(p) != len(q) {
		return 0, 0, false
	}
	for i := range p {
		sp += p[i]
		sq += q[i]
	}
	return sp, sq, sp > 0 && sq > 0
}
