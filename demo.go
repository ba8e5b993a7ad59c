// Package fickfit holds what the whole tool shares: the embedded demo
// campaign and the version string.
package fickfit

import (
	"embed"
	"io/fs"
)

// Version is the software version written into every report.
const Version = "0.1.0"

//go:embed testdata/demo/coupons testdata/demo/unknown testdata/demo/lims-export-BAR-2307.csv
var demo embed.FS

// Demo returns the invented demo campaign: the fictional Harrow Vale Gear
// Co. qualifying its pit furnace F7 for gas carburizing two lots of bar
// (per-coupon CSV files for lot BAR-2291, a long table for lot BAR-2307, and
// one pinion whose hold temperature is unknown). The numbers are made up.
func Demo() fs.FS {
	sub, err := fs.Sub(demo, "testdata/demo")
	if err != nil {
		return demo
	}
	return sub
}
