package arrhenius

import (
	"encoding/json"
	"errors"
	"math"
	"strings"
	"testing"

	"github.com/fickfit/fickfit/fit"
)

// TestReferenceChecks: external check — every row reproduces the D values
// printed in its own source (each check names it; all values from memory).
// Tolerance 5 %: the printed D carry two significant figures (up to 2.5 %
// rounding) and the source computed them with R = 8.31, which at
// Q/(RT) ≈ 40 shifts D by up to 2 %.
func TestReferenceChecks(t *testing.T) {
	for _, r := range References() {
		if len(r.Checks) == 0 {
			t.Errorf("%s: no check value", r.Name)
		}
		for _, c := range r.Checks {
			got := r.D(c.T)
			rel := got/c.D - 1
			t.Logf("%-15s T=%7.2f K  D=%.3g  printed %.2g  rel %+.3f", r.Name, c.T, got, c.D, rel)
			if math.Abs(rel) > 0.05 {
				t.Errorf("%s at %g K: D = %.3g m²/s, source prints %.2g (%s)", r.Name, c.T, got, c.D, c.Source)
			}
			if c.T < r.TMin || c.T > r.TMax {
				t.Errorf("%s: check temperature %g K outside the row's range %g–%g K", r.Name, c.T, r.TMin, r.TMax)
			}
		}
	}
}

func TestLookupReference(t *testing.T) {
	for _, name := range []string{"C-in-gamma-Fe", "c-in-GAMMA-fe", " C-in-austenite ", "Zn-in-Cu"} {
		if _, err := LookupReference(name); err != nil {
			t.Errorf("%q: %v", name, err)
		}
	}
	_, err := LookupReference("N-in-unobtainium")
	if err == nil || !errors.Is(err, fit.ErrBadInput) {
		t.Fatalf("unknown name: %v", err)
	}
	for _, n := range ReferenceNames() {
		if !strings.Contains(err.Error(), n) {
			t.Errorf("error does not list %s: %v", n, err)
		}
	}
	r, _ := LookupReference("C-in-gamma-Fe")
	c := r.Calibration()
	if c.Method != "reference" || c.D0() != r.D0 && math.Abs(c.D0()/r.D0-1) > 1e-15 || c.Q != r.Q || c.TMin != 1000 {
		t.Errorf("calibration %+v", c)
	}
	seen := map[string]bool{}
	for _, r := range References() {
		if seen[r.Name] || r.Source == "" || !(r.TMin < r.TMax) || !r.FromMemory {
			t.Errorf("row %s: duplicate, no source or bad range", r.Name)
		}
		seen[r.Name] = true
		if _, err := json.Marshal(r); err != nil {
			t.Error(err)
		}
	}
}
