package logreg

import (
	"math"
	"slices"
	"sort"
)

// Metrics are a model's figures on a labeled dataset.
type Metrics struct {
	// Rows is the number of rows evaluated; Correct how many were
	// predicted right.
	Rows, Correct int
	// Accuracy is Correct/Rows.
	Accuracy float64
	// LogLoss is the mean of −ln p(true class), with p clipped to
	// [1e-15, 1] so that a confident mistake costs a finite amount (common
	// practice). A label the model never saw has p = 0.
	LogLoss float64
	// AUC is the area under the ROC curve of a two-class model, scoring
	// rows by the probability of Classes[1]; NaN for other models or when
	// either class is absent from the data.
	AUC float64
	// MacroF1 is the unweighted mean over classes of F1 = 2·TP/(2·TP + FP
	// + FN), the classes being those that occur as true or predicted
	// labels.
	MacroF1 float64
}

// minProb is the clipping floor of log loss.
const minProb = 1e-15

// Evaluate measures m on d.
func Evaluate(m *Model, d *Dataset) Metrics {
	mt := Metrics{Rows: len(d.Rows), AUC: math.NaN()}
	if mt.Rows == 0 {
		mt.Accuracy, mt.LogLoss, mt.MacroF1 = math.NaN(), math.NaN(), math.NaN()
		return mt
	}
	probs := make([]float64, len(m.Classes))
	pred := make([]float64, len(d.Rows))
	var scores []float64
	if len(m.Classes) == 2 {
		scores = make([]float64, len(d.Rows))
	}
	var loss float64
	for i, r := range d.Rows {
		pred[i] = m.predictInto(r, probs)
		if pred[i] == d.Labels[i] {
			mt.Correct++
		}
		p := 0.0
		if k, ok := slices.BinarySearch(m.Classes, d.Labels[i]); ok {
			p = probs[k]
		}
		loss -= math.Log(math.Max(p, minProb))
		if scores != nil {
			scores[i] = probs[1]
		}
	}
	mt.Accuracy = float64(mt.Correct) / float64(mt.Rows)
	mt.LogLoss = loss / float64(mt.Rows)
	mt.MacroF1 = MacroF1(d.Labels, pred)
	if scores != nil {
		mt.AUC = AUC(scores, d.Labels, m.Classes[1], m.Classes[0])
	}
	return mt
}

// AUC returns the area under the ROC curve for rows scored by score, where
// rows labeled pos are positive and rows labeled neg negative (others are
// ignored). It is the Mann–Whitney U statistic of the positive scores
// against the negative ones divided by n_pos·n_neg (H. B. Mann and D. R.
// Whitney, 1947; J. A. Hanley and B. J. McNeil, "The meaning and use of the
// area under a receiver operating characteristic (ROC) curve", Radiology
// 1982), with tied scores given the average of their ranks, so that a
// positive–negative tie counts one half. It is NaN when either class is
// empty.
func AUC(score, label []float64, pos, neg float64) float64 {
	type item struct {
		s   float64
		pos bool
	}
	var items []item
	for i, s := range score {
		switch label[i] {
		case pos:
			items = append(items, item{s, true})
		case neg:
			items = append(items, item{s, false})
		}
	}
	sort.SliceStable(items, func(i, j int) bool { return items[i].s < items[j].s })
	var npos, nneg, rankSum float64
	for i := 0; i < len(items); {
		j := i
		for j < len(items) && items[j].s == items[i].s {
			j++
		}
		// Ranks i+1 .. j share their average.
		avg := float64(i+1+j) / 2
		for k := i; k < j; k++ {
			if items[k].pos {
				npos++
				rankSum += avg
			} else {
				nneg++
			}
		}
		i = j
	}
	if npos == 0 || nneg == 0 {
		return math.NaN()
	}
	u := rankSum - npos*(npos+1)/2
	return u / (npos * nneg)
}

// MacroF1 returns the mean F1 over the classes that occur in truth or
// pred. It is NaN for no rows.
func MacroF1(truth, pred []float64) float64 {
	classes := distinct(append(slices.Clone(truth), pred...))
	if len(classes) == 0 {
		return math.NaN()
	}
	tp := make([]float64, len(classes))
	fp := make([]float64, len(classes))
	fn := make([]float64, len(classes))
	for i, t := range truth {
		kt, _ := slices.BinarySearch(classes, t)
		kp, _ := slices.BinarySearch(classes, pred[i])
		if kt == kp {
			tp[kt]++
		} else {
			fn[kt]++
			fp[kp]++
		}
	}
	var sum float64
	for k := range classes {
		sum += 2 * tp[k] / (2*tp[k] + fp[k] + fn[k])
	}
	return sum / float64(len(classes))
}
