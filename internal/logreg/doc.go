// Package logreg trains and evaluates a deterministic L2-regularized logistic regression on sparse rows, as bowline's measuring instrument.
//
// The objective of each binary problem is the primal of liblinear's solver 0
// ("-s 0", L2-regularized logistic regression):
//
//	min_w 0.5·wᵀw + C·Σᵢ log(1 + exp(−yᵢ·wᵀxᵢ)),   yᵢ ∈ {−1, +1}
//
// with no bias term unless Options.Bias is set (liblinear's -B). Two classes
// make one problem; more classes make one problem per class against the
// rest. Problems are solved from w = 0 with gonum's limited-memory BFGS
// (gonum.org/v1/gonum/optimize, optimize.LBFGS, with a Moré–Thuente line
// search) under a fixed iteration budget and a fixed gradient tolerance,
// one evaluation at a time, so the same dataset and options always give
// the same model, bit for bit.
package logreg
