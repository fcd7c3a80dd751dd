package report_test

import (
	"os"

	"github.com/bowline/bowline/report"
)

func ExampleFigures_WriteText() {
	f := &report.Figures{
		Command:     "encode",
		Input:       "tickets.tsv",
		Mode:        "hashing",
		Docs:        4,
		EmptyDocs:   1,
		Tokens:      40,
		StopDropped: 10,
		StopShare:   0.25,
		Features:    30,
		Collisions: &report.Collisions{
			Width: 16, Keys: 12,
			Occupied: 9, ExpectedOccupied: 8.6248, // 16·(1 − (15/16)^12), birthday-problem occupancy
			Colliding: 5, Rate: 5.0 / 12, ExpectedRate: 0.5083, // 1 − (15/16)^11
		},
		Sparsity: &report.Sparsity{
			Rows: 4, Columns: 16, NNZ: 22, MeanNNZ: 5.5, MaxNNZ: 9,
			Density: 22.0 / 64, Sparsity: 42.0 / 64,
		},
		Labels: []report.Count{{Name: "billing", Count: 3}, {Name: "docks", Count: 1}},
	}
	f.WriteText(os.Stdout)
	// Output:
	// run
	//   command             encode
	//   input               tickets.tsv
	//   mode                hashing
	//   docs                4
	//   empty docs          1  25.0%
	//   tokens              40
	//   stop words dropped  10  25.0%
	//   features            30
	//
	// collisions
	//   buckets           16 (2^4)
	//   distinct keys     12
	//   collision rate    0.4167  expected 0.5083
	//   colliding keys    5
	//   occupied buckets  9  expected 8.6
	//
	// sparsity
	//   rows x columns  4 x 16
	//   non-zeros       22
	//   per row         mean 5.5  max 9
	//   density         0.3438
	//   sparsity        65.6%
	//
	// labels
	//     label    count  share
	//     billing      3  75.0%
	//     docks        1  25.0%
}
