package svmlight_test

import (
	"fmt"
	"os"
	"strings"

	"github.com/bowline/bowline/svmlight"
)

func ExampleWriter() {
	w := svmlight.NewWriter(os.Stdout, 1, false)
	// Column numbers are 0-based; the file shows them 1-based.
	w.WriteRow(1, []int{0, 4, 9}, []float64{0.5, 1, 1e-300}, "")
	w.WriteRow(-1, []int{2, 3}, []float64{0.1, -2}, "")
	w.WriteRow(-1, nil, nil, "") // an empty document still gets its row
	if err := w.Flush(); err != nil {
		fmt.Println(err)
	}
	fmt.Println(w.Rows(), "rows")
	// Output:
	// 1 1:0.5 5:1 10:1e-300
	// -1 3:0.1 4:-2
	// -1
	// 3 rows
}

func ExampleWriter_withIDs() {
	w := svmlight.NewWriter(os.Stdout, 0, true)
	w.WriteRow(2, []int{0, 7}, []float64{3, 1}, "ticket 17")
	w.WriteRow(0, []int{1}, []float64{1}, "review\t9")
	w.Flush()
	// Output:
	// 2 0:3 7:1 # ticket 17
	// 0 1:1 # review\t9
}

func ExampleReader() {
	in := "1 1:0.5 5:1 # ride-3\n-1 3:0.1 2:2\n"
	r := svmlight.NewReader(strings.NewReader(in), "rows.svm", 1)
	for r.Scan() {
		row := r.Row()
		fmt.Println(row.Label, row.Indices, row.Values, row.ID)
	}
	fmt.Println(r.Err())
	// Output:
	// 1 [0 4] [0.5 1] ride-3
	// rows.svm:2:10: index not ascending: 2 after 3
}

func ExampleWriteFeatureMap() {
	entries := []svmlight.MapEntry{
		{Index: 0, Feature: "w:bike", Docs: 12},
		{Index: 1, Feature: "w:dock full", Docs: 3},
		{Index: 2, Feature: "odd\tkey", Docs: 1},
	}
	svmlight.WriteFeatureMap(os.Stdout, 1, entries)
	// Output:
	// 1	w:bike	12
	// 2	w:dock full	3
	// 3	odd\tkey	1
}
