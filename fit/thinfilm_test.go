package fit

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"
)

// Nitrogen-from-a-deposited-layer scale (invented for the test, not a check
// value): D = 4e-14 m²/s, t = 2 h, √(Dt) ≈ 17 µm, M = 2e-5 wt%·m.
const (
	tfD = 4e-14
	tfT = 2 * 3600.0
	tfM = 2e-5
)

func tfParams(c0 float64) []float64 { return []float64{math.Log(tfD), math.Log(tfM), c0} }

func TestThinFilmJacobian(t *testing.T) {
	d := Data{X: depths(30, 120e-6), Time: tfT}
	checkJacobian(t, ThinFilm{}, tfParams(0.05), d, []float64{1e-5, 1e-5, 1e-6})
}

// TestThinFilmConservesM: ∫₀^∞ (C − C0) dx = M (analytic identity of the
// reflected plane source, Crank 1975 §2.2–2.3, from memory), by 64-point
// Gauss–Legendre quadrature (gonum integrate/quad) over [0, 40√(Dt)],
// beyond which the integrand is below exp(−400).
func TestThinFilmConservesM(t *testing.T) {
	c0 := 0.3
	for _, tm := range []float64{60, tfT, 100 * tfT} {
		d := Data{Time: tm}
		p := tfParams(c0)
		xmax := 40 * math.Sqrt(tfD*tm)
		f := func(x float64) float64 { return modelAt(ThinFilm{}, p, d, []float64{x})[0] - c0 }
		got := quad.Fixed(f, 0, xmax, 64, nil, 0)
		if rel := math.Abs(got/tfM - 1); rel > 1e-10 {
			t.Errorf("t = %g s: ∫(C − C0)dx = %.12g, M = %g (rel err %.2g)", tm, got, tfM, rel)
		}
		// Reflecting surface: ∂C/∂x = 0 at x = 0, and Fick's law inside.
		c := modelAt(ThinFilm{}, p, d, []float64{-1e-9, 1e-9})
		if math.Abs(c[1]-c[0]) > 1e-12*math.Abs(c[0]) {
			t.Errorf("t = %g s: flux at the surface is not zero: C(±1 nm) = %g, %g", tm, c[0], c[1])
		}
		l := 2 * math.Sqrt(tfD*tm)
		checkFick(t, ThinFilm{}, p, d, tfD, []float64{0.2 * l, l, 2 * l}, tfM/l)
	}
}

// TestThinFilmRecovery: self-check by simulation (seeded synthetic data
// through Start and Solve).
func TestThinFilmRecovery(t *testing.T) {
	ptrue := tfParams(0.05)
	d := synthData(ThinFilm{}, ptrue, Data{X: depths(40, 90e-6), Time: tfT}, 0.005, 3)
	recoverBySolve(t, ThinFilm{}, d, ptrue, nil)
}

// TestThinFilmStartRejectsRise: a profile that rises from the surface has
// no positive source amount, and Start says so rather than inventing one.
func TestThinFilmStartRejectsRise(t *testing.T) {
	x := depths(20, 1e-3)
	y := make([]float64, len(x))
	for i, xi := range x {
		y[i] = 0.8 - 0.6*math.Erfc(xi/4e-4)
	}
	p := make([]float64, 3)
	if err := (ThinFilm{}).Start(&Data{X: x, Y: y, Time: 3600}, p); err == nil {
		t.Errorf("Start accepted a rising profile with start %v", p)
	}
}

func BenchmarkThinFilmEval(b *testing.B) {
	benchEval(b, ThinFilm{}, tfParams(0.05), Data{X: depths(50, 120e-6), Time: tfT})
}
