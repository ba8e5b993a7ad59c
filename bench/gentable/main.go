// Command gentable writes a seeded long table of synthetic erf profiles
// (internal/longtable) for the benchmarks and the scipy comparison:
//
//	go run ./bench/gentable -profiles 20000 -points 50 -o /tmp/long.csv
//	go run ./bench/gentable -campaign -profiles 10000 -o /tmp/campaign.csv
//
// The numbers are invented; they time programs and are never check values.
package main

import (
	"flag"
	"fmt"
	"os"

	"github.com/fickfit/fickfit/internal/longtable"
)

func main() {
	var o longtable.Options
	out := flag.String("o", "", "file to write (default: standard output)")
	flag.IntVar(&o.Profiles, "profiles", 20000, "number of profiles")
	flag.IntVar(&o.Points, "points", 50, "points per profile")
	flag.Uint64Var(&o.Seed, "seed", 5, "seed of the generator")
	flag.BoolVar(&o.Campaign, "campaign", false, "a campaign table: two lots, four temperatures, parts marked unknown")
	flag.Parse()
	if o.Profiles < 1 || o.Points < 2 {
		fmt.Fprintln(os.Stderr, "gentable: -profiles must be at least 1 and -points at least 2")
		os.Exit(2)
	}
	if err := write(*out, o); err != nil {
		fmt.Fprintln(os.Stderr, "gentable:", err)
		os.Exit(1)
	}
}

// write writes the table to path, or to standard output when path is "".
func write(path string, o longtable.Options) error {
	if path == "" {
		return longtable.Write(os.Stdout, o)
	}
	f, err := os.Create(path)
	if err != nil {
		return err
	}
	if err := longtable.Write(f, o); err != nil {
		f.Close()
		return err
	}
	return f.Close()
}
