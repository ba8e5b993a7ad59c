//go:build ignore

// generate writes the invented demo campaign: a fictional gear shop,
// Harrow Vale Gear Co., qualifying its new pit furnace F7 for gas
// carburizing two lots of case-hardening bar. Every number here is made up
// for the demonstration; none is a check value.
//
//	go run testdata/demo/generate.go
package main

import (
	"fmt"
	"log"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"

	"github.com/fickfit/fickfit/internal/phys"
)

type lot struct {
	name   string
	d0, q  float64 // invented
	cs, c0 float64
}

func main() {
	dir := filepath.Join("testdata", "demo")
	rng := rand.New(rand.NewPCG(2026, 12))
	// Lots are named by the bar supplier's heat numbers ("BAR-"), so that
	// no lot name reads like a hardness value.
	lots := []lot{
		{"BAR-2291", 2.1e-5, 142.0e3, 0.95, 0.19},
		{"BAR-2307", 3.4e-5, 145.5e3, 0.98, 0.21},
	}
	temps := []float64{880, 910, 940, 970} // °C
	hours := []float64{5, 4, 3, 2.5}
	var long strings.Builder
	long.WriteString("specimen,lot,temperature_C,time_h,depth_mm,C_wt%\n")
	for li, l := range lots {
		for ti, tc := range temps {
			for rep := 1; rep <= 3; rep++ {
				id := fmt.Sprintf("F7-%s-%d-%d", strings.TrimPrefix(l.name, "BAR-"), int(tc), rep)
				T := tc + 273.15 + rng.NormFloat64()*2 // furnace scatter
				D := l.d0 * math.Exp(-l.q/(phys.R*T))
				t := hours[ti] * 3600
				cs := l.cs + 0.02*rng.NormFloat64()
				c0 := l.c0 + 0.005*rng.NormFloat64()
				if li == 0 {
					// Step-grind spectrometry sheets, one file per coupon.
					var b strings.Builder
					fmt.Fprintf(&b, "# id: %s\n# material: case-hardening bar, lot %s\n# lot: %s\n", id, l.name, l.name)
					fmt.Fprintf(&b, "# temperature: %g C\n# time: %g h\n# quantity: C\n# thickness: 25 mm\n", tc, hours[ti])
					b.WriteString("depth_mm,C_wt%\n")
					for x := 0.05; x <= 2.001; x += 0.075 {
						v := cs + (c0-cs)*math.Erf(x*1e-3/(2*math.Sqrt(D*t))) + 0.008*rng.NormFloat64()
						fmt.Fprintf(&b, "%.3f,%.3f\n", x, v)
					}
					write(filepath.Join(dir, "coupons", id+".csv"), b.String())
					continue
				}
				// The second lot came back from the lab's database as one long table.
				for x := 0.04; x <= 2.001; x += 0.08 {
					v := cs + (c0-cs)*math.Erf(x*1e-3/(2*math.Sqrt(D*t))) + 0.008*rng.NormFloat64()
					fmt.Fprintf(&long, "%s,%s,%g,%g,%.2f,%.3f\n", id, l.name, tc, hours[ti], x, v)
				}
			}
		}
	}
	write(filepath.Join(dir, "lims-export-BAR-2307.csv"), long.String())

	// The unknown part: a pinion from a load that ran 6 h while the F7
	// controller logged a fault. Lot BAR-2291. Which temperature did it see?
	l := lots[0]
	T := 926 + 273.15
	D := l.d0 * math.Exp(-l.q/(phys.R*T))
	t := 6 * 3600.0
	var b strings.Builder
	b.WriteString("# id: pinion-7731\n# lot: BAR-2291\n# time: 6 h\n# unknown: temperature\n# quantity: C\n")
	b.WriteString("# note: load 7731, F7 controller fault alarm; hold temperature unknown\n")
	b.WriteString("depth_um;C_wt%\n")
	for x := 50.0; x <= 2400; x += 75 {
		v := l.cs + (l.c0-l.cs)*math.Erf(x*1e-6/(2*math.Sqrt(D*t))) + 0.008*rng.NormFloat64()
		b.WriteString(strings.Replace(fmt.Sprintf("%.0f;%.3f\n", x, v), ".", ",", 1))
	}
	write(filepath.Join(dir, "unknown", "pinion-7731.csv"), b.String())
}

func write(path, s string) {
	if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
		log.Fatal(err)
	}
	if err := os.WriteFile(path, []byte(s), 0o644); err != nil {
		log.Fatal(err)
	}
}
