// Command demotsv writes bowline's invented Pellwick Bike Share corpus as
// TSV to standard output.
//
// Usage:
//
//	go run ./internal/demo/demotsv [--docs N] [--seed N] > pellwick-demo.tsv
//
// The corpus is invented (see demo.Notice); the notice is printed on
// standard error. The same flags give byte-identical output everywhere.
package main

import (
	"bufio"
	"flag"
	"fmt"
	"os"

	"github.com/bowline/bowline/internal/demo"
)

func main() {
	o := demo.DefaultOptions()
	flag.IntVar(&o.Docs, "docs", o.Docs, "number of records to write")
	flag.Uint64Var(&o.Seed, "seed", o.Seed, "seed of the generator")
	flag.Parse()
	if flag.NArg() > 0 {
		fmt.Fprintln(os.Stderr, "demotsv: no file arguments; the corpus goes to standard output")
		os.Exit(2)
	}
	fmt.Fprintln(os.Stderr, demo.Notice)
	w := bufio.NewWriter(os.Stdout)
	if err := demo.WriteTSV(w, o); err != nil {
		fmt.Fprintln(os.Stderr, "demotsv:", err)
		os.Exit(1)
	}
	if err := w.Flush(); err != nil {
		fmt.Fprintln(os.Stderr, "demotsv:", err)
		os.Exit(1)
	}
}
