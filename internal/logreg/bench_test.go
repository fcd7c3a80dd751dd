package logreg_test

import (
	"testing"

	"github.com/bowline/bowline/internal/logreg"
	"github.com/bowline/bowline/internal/testkit"
)

// BenchmarkTrain trains the 4-class demo model; bytes are the stored
// non-zeros (index and value, 16 bytes each).
func BenchmarkTrain(b *testing.B) {
	tr, te := testkit.DemoSplit(b, demoDocs)
	rows, _ := encodeTSV(b, tr, te, "team", 2)
	d := readRows(b, "train", rows, 0)
	nnz := 0
	for _, r := range d.Rows {
		nnz += len(r.Indices)
	}
	b.SetBytes(int64(16 * nnz))
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := logreg.Train(d, logreg.Options{}); err != nil {
			b.Fatal(err)
		}
	}
}
