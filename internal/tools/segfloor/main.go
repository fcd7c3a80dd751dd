// Command segfloor measures the segmentation floor: one bare,
// single-goroutine pass of github.com/blevesearch/segment over a file's
// bytes, the reference the speed targets of bowline's benchmarks are
// ratios of. It prints bytes, seconds and MB/s.
package main

import (
	"fmt"
	"os"
	"time"

	"github.com/blevesearch/segment"
)

func main() {
	if len(os.Args) != 2 {
		fmt.Fprintln(os.Stderr, "usage: segfloor FILE")
		os.Exit(2)
	}
	data, err := os.ReadFile(os.Args[1])
	if err != nil {
		fmt.Fprintln(os.Stderr, err)
		os.Exit(1)
	}
	best := 0.0
	words := 0
	for run := 0; run < 3; run++ {
		start := time.Now()
		s := segment.NewWordSegmenterDirect(data)
		n := 0
		for s.Segment() {
			if s.Type() != segment.None {
				n++
			}
		}
		if err := s.Err(); err != nil {
			fmt.Fprintln(os.Stderr, err)
			os.Exit(1)
		}
		secs := time.Since(start).Seconds()
		if mbs := float64(len(data)) / 1e6 / secs; mbs > best {
			best = mbs
		}
		words = n
	}
	fmt.Printf("bytes %d words %d floor_mb_per_sec %.2f\n", len(data), words, best)
}
