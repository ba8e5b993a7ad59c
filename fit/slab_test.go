package fit

import (
	"errors"
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"
)

// Hydrogen-charging-like scale (invented for the test, not a check value):
// a 2 mm sheet, t = 1 h, D chosen per case from τ = Dt/L².
const (
	slL = 2e-3
	slT = 3600.0
)

func slParams(tau, cs, c0 float64) []float64 {
	return []float64{math.Log(tau * slL * slL / slT), cs, c0}
}

// slabImages and slabFourier evaluate one series regardless of τ, so the
// two can be compared where both converge.
func slabImages(tau, xi float64) (float64, float64) {
	s := newSlabSeries(tau)
	s.fourier = false
	return s.at(xi)
}

func slabFourier(tau, xi float64) (float64, float64) {
	s := slabSeries{tau: tau, sq: 2 * math.Sqrt(tau), fourier: true}
	for j := 0; j < len(s.ek); j++ {
		k := float64(2*j + 1)
		s.ek[j] = math.Exp(-k * k * math.Pi * math.Pi * tau)
		s.n = j + 1
	}
	return s.at(xi)
}

// TestSlabSeriesAgree: the Fourier series and the series of images are two
// forms of one solution (Crank 1975, eqs. 4.16–4.17, from memory); they
// must agree, value and derivative, on both sides of the switch.
func TestSlabSeriesAgree(t *testing.T) {
	for _, tau := range []float64{0.001, 0.003, 0.005, 0.01, 0.03, 0.05, 0.08, 0.2, 0.6} {
		for _, xi := range []float64{0, 0.01, 0.1, 0.3, 0.5, 0.77, 0.99, 1} {
			a, da := slabImages(tau, xi)
			b, db := slabFourier(tau, xi)
			if math.Abs(a-b) > 2e-14 || math.Abs(da-db) > 1e-12 {
				t.Errorf("τ = %g, ξ = %g: images θ = %.16g (∂ %.16g), Fourier θ = %.16g (∂ %.16g)", tau, xi, a, da, b, db)
			}
		}
	}
}

func TestSlabJacobian(t *testing.T) {
	for _, faces := range []int{1, 2} {
		d := Data{X: depths(21, slL), Time: slT, Thickness: slL, Faces: faces}
		for _, tau := range []float64{1e-4, 1e-3, 0.004, 0.006, 0.04, 0.3, 1.2} {
			checkJacobian(t, Slab{}, slParams(tau, 1.0, 0.1), d, []float64{1e-5, 1e-6, 1e-6})
		}
	}
}

// TestSlabToErf: when L ≫ √(Dt) each face sees a semi-infinite body and the
// profile near x = 0 is the erf solution (analytic identity: the first image
// term; Crank 1975 §4.3, from memory). The far face adds erfc((L−x)/2√(Dt)).
func TestSlabToErf(t *testing.T) {
	cs, c0 := 0.9, 0.2
	tau := 1e-4 // √(Dt) = L/100
	p := slParams(tau, cs, c0)
	D := math.Exp(p[0])
	x := depths(30, 0.08*slL)
	d := Data{X: x, Time: slT, Thickness: slL, Faces: 2}
	got := modelAt(Slab{}, p, d, x)
	want := modelAt(Erf{}, []float64{p[0], cs, c0, 0}, d, x)
	for i := range x {
		far := (cs - c0) * math.Erfc((slL-x[i])/(2*math.Sqrt(D*slT)))
		if math.Abs(got[i]-want[i]) > far+1e-14 {
			t.Errorf("x = %g: slab %.15g, erf %.15g", x[i], got[i], want[i])
		}
	}
}

// TestSlabHalfTime: the mean uptake of a sheet exposed on both faces
// reaches half its final value at Dt/L² = 0.04919 (Crank 1975, §4.3.1,
// "half-time" method, eq. 4.20 region; value from memory, four figures).
// The mean comes from Gauss–Legendre quadrature of the profile over the
// thickness (gonum integrate/quad), so this checks the series as a whole.
// The early-time law M_t/M_∞ = 4√(τ/π) (same section, from memory) is
// checked too, where it holds to better than 1e-12 (τ = 0.005).
func TestSlabHalfTime(t *testing.T) {
	mean := func(tau float64) float64 {
		p := slParams(tau, 1, 0)
		d := Data{Time: slT, Thickness: slL, Faces: 2}
		f := func(x float64) float64 { return modelAt(Slab{}, p, d, []float64{x})[0] }
		// Split at 0.1 L and 0.9 L: the profile is steep near the faces.
		return (quad.Fixed(f, 0, 0.1*slL, 64, nil, 0) + quad.Fixed(f, 0.1*slL, 0.9*slL, 64, nil, 0) +
			quad.Fixed(f, 0.9*slL, slL, 64, nil, 0)) / slL
	}
	if m := mean(0.04919); math.Abs(m-0.5) > 5e-5 {
		t.Errorf("M_t/M_∞ at Dt/L² = 0.04919 is %.6f, want 0.5", m)
	}
	if m, want := mean(0.005), 4*math.Sqrt(0.005/math.Pi); math.Abs(m-want) > 1e-9 {
		t.Errorf("M_t/M_∞ at Dt/L² = 0.005 is %.12f, early-time law gives %.12f", m, want)
	}
}

// TestSlabFaces: a sheet of thickness L with the far face sealed equals one
// half of a sheet of thickness 2L exposed on both faces (symmetry; Crank
// 1975 §4.3, from memory): zero flux at the sealed face, and Fick's law.
func TestSlabFaces(t *testing.T) {
	p := slParams(0.08, 1.0, 0.1)
	one := Data{Time: slT, Thickness: slL, Faces: 1}
	two := Data{Time: slT, Thickness: 2 * slL, Faces: 2}
	x := depths(17, slL)
	a, b := modelAt(Slab{}, p, one, x), modelAt(Slab{}, p, two, x)
	for i := range x {
		if math.Abs(a[i]-b[i]) > 1e-15 {
			t.Errorf("x = %g: one face %.16g, mirrored sheet %.16g", x[i], a[i], b[i])
		}
	}
	c := modelAt(Slab{}, p, one, []float64{slL - 1e-9, slL})
	if math.Abs(c[0]-c[1]) > 1e-12 {
		t.Errorf("flux through the sealed face: C(L − 1 nm) = %.16g, C(L) = %.16g", c[0], c[1])
	}
	D := math.Exp(p[0])
	checkFick(t, Slab{}, p, two, D, []float64{0.1 * slL, 0.5 * slL, 1.3 * slL}, 0.9)
	small := slParams(0.01, 1.0, 0.1)
	checkFick(t, Slab{}, small, two, math.Exp(small[0]), []float64{0.05 * slL, 0.2 * slL}, 0.9)
}

// TestSlabRecovery: self-check by simulation (seeded synthetic data through
// Start and Solve), both faces exposed and one face sealed (τ = 0.1 of the
// real thickness is 0.025 of the mirrored sheet). Late in the uptake
// (τ = 0.3) only C0 fixed at its true value leaves D identified; see
// TestSlabSingleMode.
func TestSlabRecovery(t *testing.T) {
	for i, tc := range []struct {
		faces int
		tau   float64
		free  []bool
	}{{2, 0.02, nil}, {2, 0.045, nil}, {1, 0.1, nil}, {2, 0.3, []bool{true, true, false}}} {
		ptrue := slParams(tc.tau, 1.2, 0.1)
		d := synthData(Slab{}, ptrue, Data{X: depths(40, slL), Time: slT, Thickness: slL, Faces: tc.faces}, 0.005, uint64(30+i))
		recoverBySolve(t, Slab{}, d, ptrue, tc.free)
	}
}

// TestSlabSingleMode: late in the uptake only the first Fourier mode is
// left, C ≈ Cs − (Cs − C0)(4/π)e^{−π²τ}·sin(πx/L) (Crank 1975 eq. 4.17,
// from memory), which fixes the product (Cs − C0)e^{−π²τ} but not D and C0
// apart: the ln D and C0 columns of the Jacobian become proportional. The
// scaled condition number of JᵀJ must show it (analytic property; it is why
// a late slab profile needs C0 fixed at the known initial level).
func TestSlabSingleMode(t *testing.T) {
	d := Data{X: depths(40, slL), Time: slT, Thickness: slL, Faces: 2}
	cond := func(tau float64) float64 {
		p := slParams(tau, 1.2, 0.1)
		jac := make([]float64, 40*3)
		(Slab{}).Eval(p, &d, make([]float64, 40), jac)
		a := make([]float64, 9)
		for i := 0; i < 40; i++ {
			for r := 0; r < 3; r++ {
				for c := 0; c < 3; c++ {
					a[r*3+c] += jac[i*3+r] * jac[i*3+c]
				}
			}
		}
		return scaledCond(a, 3)
	}
	early, late := cond(0.02), cond(0.3)
	if !(early < 1e4) || !(late > 1e9) {
		t.Errorf("scaled condition numbers: τ = 0.02 → %.3g (want < 1e4), τ = 0.3 → %.3g (want > 1e9)", early, late)
	}
}

// TestSlabBadInput: no thickness, a wrong number of faces, and a depth
// beyond the specimen are refused with errors that say what to do.
func TestSlabBadInput(t *testing.T) {
	x := depths(10, 1e-3)
	y := make([]float64, len(x))
	for i := range y {
		y[i] = 1 - float64(i)/10
	}
	p := make([]float64, 3)
	for _, tc := range []struct {
		name string
		d    Data
		want string
	}{
		{"no thickness", Data{X: x, Y: y, Time: 1, Faces: 2}, "needs the specimen thickness: give it"},
		{"faces", Data{X: x, Y: y, Time: 1, Faces: 3, Thickness: 2e-3}, "1 exposed face (far face sealed) or 2"},
		{"too deep", Data{X: x, Y: y, Time: 1, Faces: 2, Thickness: 0.5e-3}, "outside the specimen"},
	} {
		err := (Slab{}).Start(&tc.d, p)
		if err == nil || !errors.Is(err, ErrBadInput) || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: error %v, want ErrBadInput containing %q", tc.name, err, tc.want)
		}
	}
}

func BenchmarkSlabEvalFourier(b *testing.B) {
	benchEval(b, Slab{}, slParams(0.15, 1.2, 0.1), Data{X: depths(50, slL), Time: slT, Thickness: slL, Faces: 2})
}

func BenchmarkSlabEvalImages(b *testing.B) {
	benchEval(b, Slab{}, slParams(0.002, 1.2, 0.1), Data{X: depths(50, slL), Time: slT, Thickness: slL, Faces: 2})
}
