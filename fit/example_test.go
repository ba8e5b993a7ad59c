package fit_test

import (
	"encoding/json"
	"fmt"

	"github.com/fickfit/fickfit/fit"
	"github.com/fickfit/fickfit/profile"
)

// exampleProfile is a small carburized profile typed in by hand for the
// examples (illustration only, not a check value): 4 h hold, depths in mm
// converted to metres at the edge, carbon in wt%.
func exampleProfile() *profile.Profile {
	depthMM := []float64{0.05, 0.2, 0.35, 0.5, 0.65, 0.8, 0.95, 1.1, 1.25, 1.4, 1.55, 1.7, 1.85, 2.0, 2.15, 2.3}
	carbon := []float64{0.892, 0.777, 0.692, 0.608, 0.513, 0.442, 0.393, 0.35, 0.298, 0.277, 0.25, 0.244, 0.226, 0.222, 0.221, 0.208}
	p := &profile.Profile{ID: "A3", Time: 4 * 3600, Temperature: 1198.15, ValueUnit: "wt%"}
	for i, d := range depthMM {
		p.Depth = append(p.Depth, d*1e-3)
		p.Value = append(p.Value, carbon[i])
	}
	return p
}

// Fit a constant-surface (erf) profile with the default options: ln D, Cs
// and C0 free, 95 % profile-likelihood intervals.
func ExampleFit() {
	r, err := fit.Fit(exampleProfile(), fit.Options{})
	if err != nil {
		fmt.Println(err)
		return
	}
	D := r.Param("D")
	fmt.Printf("model %s, %d points, %d degrees of freedom, intervals: %s\n", r.Model, r.Stats.N, r.Stats.DOF, r.CIMethod)
	fmt.Printf("D  = %.2e m²/s, 95 %% CI [%.2e, %.2e]\n", D.Value, D.CI.Lo, D.CI.Hi)
	fmt.Printf("Cs = %.2f %s, C0 = %.2f %s\n", r.Param("Cs").Value, r.Param("Cs").Unit, r.Param("C0").Value, r.Param("C0").Unit)
	fmt.Printf("RMSE = %.3f wt%%, warnings: %d\n", r.Stats.RMSE, len(r.Warnings))
	// Output:
	// model erf, 16 points, 13 degrees of freedom, intervals: profile
	// D  = 2.40e-11 m²/s, 95 % CI [2.26e-11, 2.55e-11]
	// Cs = 0.92 wt%, C0 = 0.21 wt%
	// RMSE = 0.006 wt%, warnings: 0
}

// Hold the base composition at its known value (from the steel's
// certificate, say) and fit only D and Cs; Wald intervals.
func ExampleFit_fixed() {
	r, err := fit.Fit(exampleProfile(), fit.Options{Fixed: map[string]float64{"C0": 0.20}, CI: "wald"})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println("free:", r.FreeNames, "dof:", r.Stats.DOF)
	fmt.Printf("C0 fixed: %v at %.2f\n", r.Param("C0").Fixed, r.Param("C0").Value)
	fmt.Printf("D = %.1e m²/s\n", r.Param("D").Value)
	// Output:
	// free: [D Cs] dof: 14
	// C0 fixed: true at 0.20
	// D = 2.6e-11 m²/s
}

// An interval end that the data do not determine is NaN in Go, null in
// JSON, and comes with a warning: here the traverse stops at 0.8 mm, before
// the profile flattens towards the base level.
func ExampleInterval_MarshalJSON() {
	p := exampleProfile()
	p.Depth, p.Value = p.Depth[:6], p.Value[:6]
	r, err := fit.Fit(p, fit.Options{})
	if err != nil {
		fmt.Println(err)
		return
	}
	D := r.Param("D")
	b, _ := json.Marshal(D.CI)
	fmt.Printf("D interval open: %v, upper end in JSON: %s\n", D.CI.Open(), b[len(b)-5:])
	for _, w := range r.Warnings {
		fmt.Println("warning:", w.Code)
	}
	// Output:
	// D interval open: true, upper end in JSON: null]
	// warning: ci-open
	// warning: ci-open
	// warning: plateau-not-reached
}
