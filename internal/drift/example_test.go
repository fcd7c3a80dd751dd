package drift_test

import (
	"fmt"

	"github.com/bowline/bowline/internal/drift"
)

// Two label distributions with disjoint supports are 1 bit apart, the
// largest Jensen–Shannon divergence; half overlapping ones are 0.5 bit
// apart. Weights are normalized by their sums.
func ExampleJSD() {
	fmt.Println(drift.JSD([]float64{1, 0}, []float64{0, 1}))
	fmt.Println(drift.JSD([]float64{2, 2, 0}, []float64{0, 5, 5}))
	fmt.Println(drift.JSD([]float64{3, 1}, []float64{6, 2}))
	// Output:
	// 1
	// 0.5
	// 0
}

// The population stability index of a 60/40 split that became 40/60:
// (0.4−0.6)·ln(0.4/0.6) + (0.6−0.4)·ln(0.6/0.4) = 0.4·ln 1.5.
func ExamplePSI() {
	fmt.Printf("%.4f\n", drift.PSI([]float64{60, 40}, []float64{40, 60}))
	// Output:
	// 0.1622
}
