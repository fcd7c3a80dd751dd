package sweep_test

import (
	"fmt"

	"github.com/bowline/bowline/hashing"
	"github.com/bowline/bowline/internal/sweep"
)

func ExampleParseWidths() {
	for _, s := range []string{"2^10..2^14", "2^10..2^20*4", "2^12,2^16,100000"} {
		ws, err := sweep.ParseWidths(s)
		if err != nil {
			fmt.Println(err)
			continue
		}
		fmt.Print(s, ":")
		for _, w := range ws {
			fmt.Print(" ", hashing.FormatWidth(w))
		}
		fmt.Println()
	}
	// Output:
	// 2^10..2^14: 2^10 2^11 2^12 2^13 2^14
	// 2^10..2^20*4: 2^10 2^12 2^14 2^16 2^18 2^20
	// 2^12,2^16,100000: 2^12 2^16 100000
}
