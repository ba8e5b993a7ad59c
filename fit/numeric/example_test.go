package numeric_test

import (
	"fmt"
	"math"

	"github.com/fickfit/fickfit/fit"
	"github.com/fickfit/fickfit/fit/numeric"
)

// Carburizing with a carbon diffusivity that triples between 0.2 and
// 1.0 wt%: the profile at 0.5 mm and the carbon taken up.
func ExampleSolve() {
	s, err := numeric.Solve(numeric.Problem{
		DC:   numeric.Exp{D: 1.5e-11, K: math.Log(3) / 0.8, Cref: 0.2},
		Time: 4 * 3600, C0: 0.2, Cs: 1.0,
	}, numeric.Options{})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("C(0.5 mm) = %.3f wt%%\n", s.At(0.5e-3))
	fmt.Printf("uptake = %.3f wt%%·mm, conserved to 1e-9: %v\n", s.Uptake*1e3, math.Abs(s.Gain-s.Uptake) < 1e-9*s.Uptake)
	// Output:
	// C(0.5 mm) = 0.732 wt%
	// uptake = 0.604 wt%·mm, conserved to 1e-9: true
}

// The numerical model plugs into the fit package like a closed-form one.
func ExampleNewModel() {
	m, err := numeric.NewModel(numeric.Config{DC: "exp"})
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, p := range m.Params() {
		fmt.Printf("%s [%s] ", p.Name, p.Unit)
	}
	fmt.Println()
	var _ fit.Model = m // use with fit.FitModel or fit.Options{Custom: m}
	// Output:
	// D [m2/s] k [1/value] Cs [value] C0 [value]
}
