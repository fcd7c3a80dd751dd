package tablefield_test

import (
	"fmt"
	"time"

	"github.com/bowline/bowline/internal/tablefield"
	"github.com/bowline/bowline/spec"
)

// Periodic places a time on three circles. 06:00 is a quarter of the day;
// 15 March 2024 was a Friday (day 4 with Monday 0) and day 75 of a leap
// year.
func ExamplePeriodic() {
	p := tablefield.Periodic(time.Date(2024, time.March, 15, 6, 0, 0, 0, time.UTC))
	for i, name := range spec.TimeFeatures {
		fmt.Printf("%s %.4f\n", name, p[i])
	}
	// Output:
	// hour_sin 1.0000
	// hour_cos 0.0000
	// dow_sin -0.4339
	// dow_cos -0.9010
	// doy_sin 0.9552
	// doy_cos 0.2959
}

// ParseNumber reads a --number argument; the --missing-value sentinels
// come with it.
func ExampleParseNumber() {
	f, err := tablefield.ParseNumber("age:log,standard", []string{"unknown"})
	if err != nil {
		panic(err)
	}
	fmt.Println(f.Name, f.Kind, f.Number.Log, f.Number.Standard, f.Number.Sentinels)
	_, err = tablefield.ParseNumber("age:cube", nil)
	fmt.Println(err)
	// Output:
	// age number true true [unknown]
	// "age:cube": unknown transform "cube" (want log, standard or log,standard)
}
