package hashing_test

import (
	"fmt"

	"github.com/bowline/bowline/hashing"
)

func ExampleParseWidth() {
	for _, s := range []string{"2^20", "1000003", "0", "2^41"} {
		m, err := hashing.ParseWidth(s)
		if err != nil {
			fmt.Println(err)
			continue
		}
		fmt.Println(m, hashing.FormatWidth(m))
	}
	// Output:
	// 1048576 2^20
	// 1000003 1000003
	// hashing: width 0 is invalid; it must be at least 1 bucket
	// hashing: width "2^41" is above the limit of 2^40 buckets
}

func ExampleHasher_Bucket() {
	h, err := hashing.New(1<<10, 0, true)
	if err != nil {
		panic(err)
	}
	for _, key := range []string{"w:dock", "w:refund", "w:late_fee"} {
		b, sign := h.Bucket([]byte(key))
		fmt.Printf("%-10s sum %016x  bucket %4d  sign %+g\n", key, h.Sum([]byte(key)), b, sign)
	}
	// Output:
	// w:dock     sum 1859adee50d4ad31  bucket  305  sign +1
	// w:refund   sum 829e54afd9de52fa  bucket  762  sign -1
	// w:late_fee sum 8169249026a08e9d  bucket  669  sign -1
}

func ExampleTally() {
	h, _ := hashing.New(8, 0, false)
	t := hashing.NewTally()
	for _, key := range []string{"bike", "dock", "app", "refund", "bike", "late", "fee"} {
		t.Add(h.Sum([]byte(key)))
	}
	for _, m := range []uint64{8, 1 << 10} {
		c := t.Collisions(m)
		fmt.Printf("width %-5s keys %d occupied %d colliding %d rate %.2f expected %.2f\n",
			hashing.FormatWidth(m), c.Keys, c.Occupied, c.Colliding, c.Rate, c.ExpectedRate)
	}
	// Output:
	// width 2^3   keys 6 occupied 5 colliding 2 rate 0.33 expected 0.49
	// width 2^10  keys 6 occupied 6 colliding 0 rate 0.00 expected 0.00
}

func ExampleExpectedCollisionRate() {
	// A million distinct features in 2^20 buckets: about 61% share a bucket.
	fmt.Printf("%.4f\n", hashing.ExpectedCollisionRate(1e6, 1<<20))
	fmt.Printf("%.0f\n", hashing.ExpectedOccupied(1e6, 1<<20))
	// Output:
	// 0.6147
	// 644536
}
