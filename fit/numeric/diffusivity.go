package numeric

import (
	"fmt"
	"math"
	"sort"

	"github.com/fickfit/fickfit/fit"
)

// Diffusivity is a concentration law D(C) at the reference temperature.
type Diffusivity interface {
	// At returns D(C) in m²/s and its derivative dD/dC.
	At(c float64) (d, dDdC float64)
	// Max returns the largest D(C) for C in [lo, hi]; the solver sizes a
	// semi-infinite domain from it.
	Max(lo, hi float64) float64
}

// gradLaw is implemented by the laws the fit model uses: it gives the
// derivatives of D(C) with respect to the law's own parameters, for the
// forward sensitivities.
type gradLaw interface {
	Diffusivity
	// nGrad is the number of law parameters.
	nGrad() int
	// grad writes ∂D(c)/∂qₘ into g[m], given d = D(c) (every law here
	// has gradients that follow from c and D(c) without another exp).
	grad(c, d float64, g []float64)
}

// linearLaw marks a law whose D does not depend on C: the discrete
// equations are then linear and one Newton step is exact.
type linearLaw interface{ constantD() bool }

// Const is a constant diffusivity D (m²/s).
type Const struct{ D float64 }

// At implements Diffusivity.
func (k Const) At(float64) (float64, float64) { return k.D, 0 }

// Max implements Diffusivity.
func (k Const) Max(float64, float64) float64 { return k.D }

func (k Const) nGrad() int                     { return 1 }
func (k Const) grad(_, d float64, g []float64) { g[0] = d } // ∂D/∂ln D
func (Const) constantD() bool                  { return true }

// Exp is the exponential law
//
//	D(C) = D·exp(K·(C − Cref)),
//
// D the diffusivity at the base concentration Cref (m²/s) and K per unit of
// concentration. It is the usual one-parameter description of, e.g., carbon
// in austenite over a carburizing range (common practice, no source).
type Exp struct{ D, K, Cref float64 }

// At implements Diffusivity.
func (e Exp) At(c float64) (float64, float64) {
	d := e.D * math.Exp(e.K*(c-e.Cref))
	return d, e.K * d
}

// Max implements Diffusivity: the law is monotone, so the largest value is
// at one end.
func (e Exp) Max(lo, hi float64) float64 {
	a, _ := e.At(lo)
	b, _ := e.At(hi)
	return math.Max(a, b)
}

func (e Exp) nGrad() int { return 3 }

// grad gives ∂D/∂ln D, ∂D/∂K and ∂D/∂Cref.
func (e Exp) grad(c, d float64, g []float64) {
	g[0] = d
	g[1] = (c - e.Cref) * d
	g[2] = -e.K * d
}

func (e Exp) constantD() bool { return e.K == 0 }

// Table is a tabulated law: (C, D) pairs interpolated by a monotone
// piecewise-cubic Hermite curve in ln D (F. N. Fritsch & R. E. Carlson,
// "Monotone piecewise cubic interpolation", SIAM J. Numer. Anal. 17 (1980)
// 238–246). Monotone data give a monotone curve without overshoot, and
// interpolating ln D keeps D positive. Outside the table, ln D is held at the
// end value (constant extrapolation).
type Table struct {
	c, y, m []float64 // knots, ln D, slopes d(ln D)/dC
}

// NewTable builds a table law from concentrations c (strictly increasing)
// and diffusivities d (m²/s, positive). It needs at least two rows.
func NewTable(c, d []float64) (*Table, error) {
	if len(c) != len(d) {
		return nil, fmt.Errorf("%w: D(C) table has %d concentrations but %d diffusivities", fit.ErrBadInput, len(c), len(d))
	}
	if len(c) < 2 {
		return nil, fmt.Errorf("%w: D(C) table needs at least two rows, got %d", fit.ErrBadInput, len(c))
	}
	t := &Table{c: append([]float64(nil), c...), y: make([]float64, len(c)), m: make([]float64, len(c))}
	for i := range c {
		if !finite(c[i]) {
			return nil, fmt.Errorf("%w: D(C) table row %d: concentration %g is not a finite number", fit.ErrBadInput, i+1, c[i])
		}
		if i > 0 && !(c[i] > c[i-1]) {
			return nil, fmt.Errorf("%w: D(C) table row %d: concentration %g does not increase (previous %g); sort the table by concentration and remove repeats", fit.ErrBadInput, i+1, c[i], c[i-1])
		}
		if !(d[i] > 0) || !finite(d[i]) {
			return nil, fmt.Errorf("%w: D(C) table row %d: D = %g must be a positive number in m²/s", fit.ErrBadInput, i+1, d[i])
		}
		t.y[i] = math.Log(d[i])
	}
	t.slopes()
	return t, nil
}

// slopes sets the Hermite tangents by Fritsch and Carlson's algorithm:
// three-point averages of the secant slopes, zero at local extrema, then
// scaled back wherever α² + β² > 9 (their sufficient region for
// monotonicity).
func (t *Table) slopes() {
	n := len(t.c)
	del := make([]float64, n-1)
	for k := range del {
		del[k] = (t.y[k+1] - t.y[k]) / (t.c[k+1] - t.c[k])
	}
	t.m[0], t.m[n-1] = del[0], del[n-2]
	for k := 1; k < n-1; k++ {
		if del[k-1]*del[k] <= 0 {
			t.m[k] = 0
		} else {
			t.m[k] = (del[k-1] + del[k]) / 2
		}
	}
	for k := range del {
		if del[k] == 0 {
			t.m[k], t.m[k+1] = 0, 0
			continue
		}
		a, b := t.m[k]/del[k], t.m[k+1]/del[k]
		if a < 0 {
			t.m[k], a = 0, 0
		}
		if b < 0 {
			t.m[k+1], b = 0, 0
		}
		if s := a*a + b*b; s > 9 {
			tau := 3 / math.Sqrt(s)
			t.m[k] = tau * a * del[k]
			t.m[k+1] = tau * b * del[k]
		}
	}
}

// lnAt returns ln D and d(ln D)/dC at c.
func (t *Table) lnAt(c float64) (y, dy float64) {
	n := len(t.c)
	if c <= t.c[0] {
		return t.y[0], 0
	}
	if c >= t.c[n-1] {
		return t.y[n-1], 0
	}
	k := sort.SearchFloat64s(t.c, c) - 1 // t.c[k] < c ≤ t.c[k+1]
	if k < 0 {
		k = 0
	}
	h := t.c[k+1] - t.c[k]
	s := (c - t.c[k]) / h
	s2, s3 := s*s, s*s*s
	h00, h10, h01, h11 := 2*s3-3*s2+1, s3-2*s2+s, -2*s3+3*s2, s3-s2
	y = h00*t.y[k] + h10*h*t.m[k] + h01*t.y[k+1] + h11*h*t.m[k+1]
	d00, d10, d01, d11 := 6*s2-6*s, 3*s2-4*s+1, -6*s2+6*s, 3*s2-2*s
	dy = (d00*t.y[k]+d01*t.y[k+1])/h + d10*t.m[k] + d11*t.m[k+1]
	return y, dy
}

// At implements Diffusivity.
func (t *Table) At(c float64) (float64, float64) {
	y, dy := t.lnAt(c)
	d := math.Exp(y)
	return d, d * dy
}

// Max implements Diffusivity: between knots the curve is monotone, so the
// largest value on [lo, hi] is at an end or at a knot inside.
func (t *Table) Max(lo, hi float64) float64 {
	a, _ := t.At(lo)
	b, _ := t.At(hi)
	m := math.Max(a, b)
	for i, c := range t.c {
		if c > lo && c < hi {
			m = math.Max(m, math.Exp(t.y[i]))
		}
	}
	return m
}

// First returns the first row of the table (lowest concentration).
func (t *Table) First() (c, d float64) { return t.c[0], math.Exp(t.y[0]) }

// scaled is a law multiplied by a constant factor: the fit model's table
// form, whose "D" parameter is the table value at its first row.
type scaled struct {
	t *Table
	f float64
}

func (s scaled) At(c float64) (float64, float64) {
	d, dd := s.t.At(c)
	return s.f * d, s.f * dd
}
func (s scaled) Max(lo, hi float64) float64     { return s.f * s.t.Max(lo, hi) }
func (s scaled) nGrad() int                     { return 1 }
func (s scaled) grad(_, d float64, g []float64) { g[0] = d } // ∂D/∂ln f

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }
