package matano_test

import (
	"fmt"
	"math"

	"github.com/fickfit/fickfit/fit/matano"
	"github.com/fickfit/fickfit/profile"
)

// A couple annealed 100 h whose profile follows the constant-D erf solution
// (D = 4e-14 m²/s): the analysis returns that D across the range.
func ExampleAnalyze() {
	const D, t = 4e-14, 100 * 3600.0
	p := &profile.Profile{ID: "Ni-Cu", Time: t}
	for i := 0; i <= 40; i++ {
		x := -60e-6 + 120e-6*float64(i)/40
		p.Depth = append(p.Depth, x)
		p.Value = append(p.Value, 2+14*(1+math.Erf(x/(2*math.Sqrt(D*t)))))
	}
	r, err := matano.Analyze(p, 0, matano.Options{Concentrations: []float64{9, 16, 23}, Resamples: -1})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%s, Matano plane at %.1f µm\n", r.Method, math.Abs(*r.MatanoPlane*1e6))
	for _, pt := range r.Points {
		fmt.Printf("C = %g: D = %.3g m²/s\n", pt.C, pt.D)
	}
	// Output:
	// boltzmann-matano, Matano plane at 0.0 µm
	// C = 9: D = 4e-14 m²/s
	// C = 16: D = 4e-14 m²/s
	// C = 23: D = 4e-14 m²/s
}
