package stats

import (
	"math"
	"testing"
)

// Reference values: two-sided quantiles from standard tables (NIST/SEMATECH
// e-Handbook of Statistical Methods, §1.3.6.7.1 normal and §1.3.6.7.2
// Student t tables): z(0.95) = 1.960, z(0.90) = 1.645, t(0.95, 10) =
// 2.228, t(0.95, 1) = 12.706, t(0.99, 5) = 4.032.
func TestTwoSided(t *testing.T) {
	for _, tc := range []struct {
		level, dof, want float64
	}{
		{0.95, 0, 1.960}, {0.90, 0, 1.645}, {0.95, 10, 2.228}, {0.95, 1, 12.706}, {0.99, 5, 4.032},
		{0.95, math.Inf(1), 1.960},
	} {
		for rep := 0; rep < 2; rep++ { // second call from the cache
			if got := TwoSided(tc.level, tc.dof); math.Abs(got-tc.want) > 5e-4 {
				t.Errorf("TwoSided(%v, %v) = %v, want %v", tc.level, tc.dof, got, tc.want)
			}
		}
	}
	if Z(0.95) != TwoSided(0.95, -3) || T(0.95, 10) != TwoSided(0.95, 10) {
		t.Error("Z and T disagree with TwoSided")
	}
	// Satterthwaite's fractional dof lies between its neighbours.
	if a, b, c := T(0.95, 7), TwoSided(0.95, 7.5), T(0.95, 8); !(a > b && b > c) {
		t.Errorf("t(7) %v, t(7.5) %v, t(8) %v not decreasing", a, b, c)
	}
}

// Hyndman & Fan (1996) definition 7 on 1…5: Q(0.25) = 2, Q(0.1) = 1.4
// (h = 0.4); common practice, no source, for the ends and +Inf.
func TestQuantile(t *testing.T) {
	s := []float64{1, 2, 3, 4, 5}
	for _, tc := range []struct{ p, want float64 }{{0, 1}, {0.25, 2}, {0.1, 1.4}, {1, 5}, {-1, 1}, {2, 5}} {
		if got := Quantile(s, tc.p); math.Abs(got-tc.want) > 1e-12 {
			t.Errorf("Quantile(%v) = %v, want %v", tc.p, got, tc.want)
		}
	}
	if !math.IsNaN(Quantile(nil, 0.5)) {
		t.Error("empty data must give NaN")
	}
	inf := []float64{1, 2, math.Inf(1)}
	if Quantile(inf, 0.5) != 2 || !math.IsInf(Quantile(inf, 0.6), 1) {
		t.Errorf("+Inf handling: %v %v", Quantile(inf, 0.5), Quantile(inf, 0.6))
	}
	if QuantileOf([]float64{5, 1, 3}, 0.5) != 3 {
		t.Error("QuantileOf does not sort")
	}
}

// Roots of known functions (common practice, no source): √2 as the zero
// of x² − 2, the Dottie number 0.739085133215161 as the zero of cos x − x.
func TestRoot(t *testing.T) {
	f := func(x float64) float64 { return x*x - 2 }
	x, ok := Root(f, 0, f(0), 2, f(2), 0)
	if !ok || math.Abs(x-math.Sqrt2) > 1e-12 {
		t.Errorf("Root(x²−2) = %v, %v", x, ok)
	}
	g := func(x float64) float64 { return x - math.Cos(x) }
	x, ok = RootIncreasing(g, 5, -10, 10)
	if !ok || math.Abs(x-0.739085133215161) > 1e-12 {
		t.Errorf("RootIncreasing(x − cos x) = %v, %v", x, ok)
	}
	if _, ok := Root(f, 2, f(2), 3, f(3), 0); ok {
		t.Error("no sign change must fail")
	}
	if _, ok := RootIncreasing(f, 2, 2, 3); ok {
		t.Error("no root in [2, 3] must fail")
	}
}
