// Command gen writes a large invented results file for the scale
// benchmarks: go run ./lots/scale/gen -o receipts-1m.csv
package main

import (
	"flag"
	"fmt"
	"os"

	"lotproof/lots/scale"
)

func main() {
	var o scale.Options
	out := flag.String("o", "", "output file (default: standard output)")
	flag.IntVar(&o.Specimens, "specimens", 1_000_000, "number of specimens")
	flag.IntVar(&o.Lots, "lots", 20_000, "number of lots")
	flag.Uint64Var(&o.Seed, "seed", 1, "random seed")
	flag.IntVar(&o.Interleave, "interleave", 1, "write the rows of this many lots round-robin (1: grouped by lot)")
	flag.Parse()
	w := os.Stdout
	if *out != "" {
		f, err := os.Create(*out)
		if err != nil {
			fmt.Fprintln(os.Stderr, err)
			os.Exit(1)
		}
		defer f.Close()
		w = f
	}
	if _, err := scale.Write(w, o); err != nil {
		fmt.Fprintln(os.Stderr, err)
		os.Exit(1)
	}
}
