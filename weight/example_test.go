package weight_test

import (
	"fmt"

	"github.com/bowline/bowline/weight"
)

// A document with feature columns 0, 2, 2, 5 (column 2 twice), weighted
// with log tf, smooth idf learned on 4 documents, and the L2 norm.
func ExampleAccumulator() {
	df := []int64{4, 1, 2, 3, 1, 1} // document counts per column
	idf := weight.IDFTable(weight.IDFSmooth, 4, df)

	a := weight.NewAccumulator()
	for _, col := range []int{5, 2, 0, 2} {
		a.Add(col, 1)
	}
	var row weight.Row
	a.Finish(weight.TFLog, idf, weight.NormL2, &row)
	for i, col := range row.Indices {
		fmt.Printf("%d:%.4f\n", col, row.Values[i])
	}
	// Output:
	// 0:0.2986
	// 2:0.7638
	// 5:0.5722
}

func ExampleIDF_Value() {
	// A key in 10 of 1000 documents.
	fmt.Printf("smooth %.4f\n", weight.IDFSmooth.Value(1000, 10))
	fmt.Printf("plain  %.4f\n", weight.IDFPlain.Value(1000, 10))
	// Never seen in training.
	fmt.Printf("smooth %.4f\n", weight.IDFSmooth.Value(1000, 0))
	fmt.Printf("plain  %.4f\n", weight.IDFPlain.Value(1000, 0))
	// Output:
	// smooth 5.5109
	// plain  4.6052
	// smooth 7.9088
	// plain  0.0000
}

func ExampleParseTF() {
	tf, err := weight.ParseTF("log")
	fmt.Println(tf, err, tf.Apply(1), tf.Apply(0))
	_, err = weight.ParseTF("sqrt")
	fmt.Println(err)
	// Output:
	// log <nil> 1 0
	// weight: unknown tf "sqrt" (want count, binary or log)
}
