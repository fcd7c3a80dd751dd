package logreg_test

import (
	"fmt"

	"github.com/bowline/bowline/internal/logreg"
)

func Example() {
	// Two columns: "late" (0) and "thanks" (1). Label 1 is a complaint.
	d := &logreg.Dataset{
		Columns: 2,
		Rows: []logreg.Row{
			{Indices: []int{0}, Values: []float64{1}},
			{Indices: []int{0, 1}, Values: []float64{2, 1}},
			{Indices: []int{1}, Values: []float64{1}},
			{Indices: []int{1}, Values: []float64{2}},
		},
		Labels: []float64{1, 1, 0, 0},
	}
	m, err := logreg.Train(d, logreg.Options{C: 1})
	if err != nil {
		fmt.Println(err)
		return
	}
	// liblinear-predict -b 1 prints 0.694258 for the same row after
	// liblinear-train -s 0 -c 1 -e 0.00001 (Debian liblinear-tools 2.3.0).
	class, probs := m.Predict(logreg.Row{Indices: []int{0}, Values: []float64{1}})
	fmt.Printf("class %g, P(complaint) %.3f\n", class, probs[1])
	ev := logreg.Evaluate(m, d)
	fmt.Printf("accuracy %.2f, AUC %.2f\n", ev.Accuracy, ev.AUC)
	// Output:
	// class 1, P(complaint) 0.694
	// accuracy 1.00, AUC 1.00
}
