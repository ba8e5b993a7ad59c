package arrhenius_test

import (
	"fmt"
	"math"

	"github.com/fickfit/fickfit/arrhenius"
)

// Fit an Arrhenius line to D measured at three temperatures (values made
// up for the example).
func ExampleTwoStage() {
	pts := []arrhenius.Point{
		{ID: "A", T: 1173.15, LnD: math.Log(6.0e-12), VarLnD: 0.05 * 0.05},
		{ID: "B", T: 1223.15, LnD: math.Log(1.2e-11), VarLnD: 0.05 * 0.05},
		{ID: "C", T: 1273.15, LnD: math.Log(2.2e-11), VarLnD: 0.05 * 0.05},
	}
	l, err := arrhenius.TwoStage(pts, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	ci := l.QCI()
	fmt.Printf("Q = %.0f kJ/mol (95 %% CI %.0f–%.0f), D0 = %.2g m²/s\n", l.Q/1000, ci.Lo/1000, ci.Hi/1000, l.D0())
	// Output: Q = 161 kJ/mol (95 % CI 144–179), D0 = 9.3e-05 m²/s
}

// Back-calculate the temperature of a part from its fitted Dt with a
// reference entry (which carries no uncertainty of its own).
func ExampleSolveTemperature() {
	ref, _ := arrhenius.LookupReference("C-in-gamma-Fe")
	obs := arrhenius.Observation{ID: "pinion", LnDt: math.Log(1.6e-7), VarLnDt: 0.08 * 0.08}
	s, err := arrhenius.SolveTemperature(obs, ref.Calibration(), &arrhenius.SolveOptions{Time: 4 * 3600})
	if err != nil {
		fmt.Println(err)
		return
	}
	T := s.Temperature
	fmt.Printf("T = %.0f K (%.0f–%.0f K, %s)\n", T.Value, T.CI.Lo, T.CI.Hi, T.Method)
	fmt.Println(s.Warnings[0].Code)
	// Output:
	// T = 1224 K (1159–1296 K, fieller)
	// reference-literature
}

// Plan a carburizing time: the hold needed for 0.4 wt% C at 0.8 mm.
func ExampleTimeToDepth() {
	ref, _ := arrhenius.LookupReference("C-in-gamma-Fe")
	p, err := arrhenius.TimeToDepth(ref.Calibration(), 1198.15, 1.0, 0.2, 0.4, 0.8e-3, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%.1f h\n", p.Time.Value/3600)
	// Output: 8.3 h
}

func ExampleLookupReference() {
	_, err := arrhenius.LookupReference("B-in-gamma-Fe")
	fmt.Println(err)
	// Output: arrhenius: B-in-gamma-Fe: reference: no such reference entry; valid names: Al-in-Al, C-in-alpha-Fe, C-in-gamma-Fe, Cu-in-Al, Cu-in-Cu, Fe-in-alpha-Fe, Fe-in-gamma-Fe, Mg-in-Al, N-in-alpha-Fe, N-in-gamma-Fe, Zn-in-Cu
}
