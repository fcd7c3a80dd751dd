//go:build race

package testkit

// Race reports whether the tests run under the race detector, whose
// shadow memory and instrumented allocations are not the program's own.
const Race = true
