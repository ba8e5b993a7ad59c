package fit

import (
	"fmt"
	"math"
)

// MassTransfer is the semi-infinite body whose surface exchanges solute
// with an atmosphere of potential Cp through a first-order surface
// reaction, −D ∂C/∂x = β(Cp − C) at x = 0, from a uniform initial level C0:
//
//	(C − C0)/(Cp − C0) = erfc(u) − exp(hx + h²Dt)·erfc(u + h√(Dt)),
//	u = x/(2√(Dt)), h = β/D
//
// (Crank, The Mathematics of Diffusion, 2nd ed., 1975, §3.3.2, "surface
// evaporation" boundary condition, eq. 3.29 there; section and equation
// numbers from memory.) Because hx + h²Dt = (u + h√(Dt))² − u², the second
// term is evaluated as exp(−u²)·erfcx(u + h√(Dt)), which never overflows
// however fast the surface reaction is.
//
// As β → ∞ the surface is held at Cp and the model becomes Erf with Cs = Cp
// (the nested pair that SelectModel tests). The surface value itself rises
// with time, C(0,t) = C0 + (Cp − C0)(1 − erfcx(β√t/√D)).
//
// Parameters: D (fitted as ln D), beta (ln β, m/s), Cp, C0.
type MassTransfer struct{}

func init() {
	Register(Info{Name: "masstransfer", Title: "surface mass transfer (erfc with surface coefficient)", SemiInfinite: true, InAuto: true, Rank: 20},
		func() Model { return MassTransfer{} })
}

// Name implements Model.
func (MassTransfer) Name() string { return "masstransfer" }

// Params implements Model.
func (MassTransfer) Params() []Param {
	return []Param{
		{Name: "D", Log: true, Unit: "m2/s", Free: true},
		{Name: "beta", Log: true, Unit: "m/s", Free: true},
		{Name: "Cp", Unit: "value", Free: true},
		{Name: "C0", Unit: "value", Free: true},
	}
}

// massTransferShape returns g = (C − C0)/(Cp − C0) at u with a = u + h√(Dt),
// and the partial derivatives ∂g/∂u (a held) and ∂g/∂a.
func massTransferShape(u, a float64) (g, gu, ga float64) {
	eu := math.Exp(-u * u)
	ex := Erfcx(a)
	g = math.Erfc(u) - eu*ex
	// d erfc/du = −(2/√π)e^{−u²}; d(e^{−u²})/du = −2u e^{−u²};
	// d erfcx/da = 2a·erfcx(a) − 2/√π.
	gu = -(2/math.SqrtPi)*eu + 2*u*eu*ex
	ga = -eu * erfcxDeriv(a, ex)
	return g, gu, ga
}

// erfcxDeriv returns d erfcx/da = 2a·erfcx(a) − 2/√π given ex = erfcx(a).
// For large a the two terms cancel to O(1/a²) (a fast surface reaction,
// h√(Dt) ≫ 1, where the β column of the Jacobian lives on this
// difference), so from a = 20 on it is summed from the asymptotic series
// of erfcx (Abramowitz & Stegun 1964, eq. 7.1.23, from memory) with the
// leading term removed:
//
//	2a·erfcx(a) − 2/√π = (2/√π)·Σₘ≥₁ (−1)ᵐ (2m−1)!!/(2a²)ᵐ,
//
// whose terms fall below 1e-17 of the sum within ten terms there.
func erfcxDeriv(a, ex float64) float64 {
	if a < 20 {
		return 2*a*ex - 2/math.SqrtPi
	}
	z := 1 / (2 * a * a)
	term, sum := 1.0, 0.0
	for m := 1; m <= 30; m++ {
		term *= -float64(2*m-1) * z
		sum += term
		if math.Abs(term) < 1e-17*math.Abs(sum) {
			break
		}
	}
	return 2 / math.SqrtPi * sum
}

// Eval implements Model. With u = x/(2√(Dt)) ∝ D^{-1/2} and
// a = u + β√t/√D ∝ D^{-1/2}: ∂u/∂lnD = −u/2, ∂a/∂lnD = −a/2,
// ∂a/∂lnβ = β√t/√D.
func (MassTransfer) Eval(p []float64, d *Data, f, jac []float64) {
	D, beta := math.Exp(p[0]), math.Exp(p[1])
	cp, c0 := p[2], p[3]
	sq := math.Sqrt(D * d.Time)
	hs := beta * d.Time / sq // h√(Dt) = β√t/√D
	inv := 1 / (2 * sq)
	dc := cp - c0
	for i, x := range d.X {
		u := x * inv
		a := u + hs
		g, gu, ga := massTransferShape(u, a)
		f[i] = c0 + dc*g
		if jac != nil {
			row := jac[4*i : 4*i+4]
			row[0] = dc * (gu*(-u/2) + ga*(-a/2))
			row[1] = dc * ga * hs
			row[2] = g
			row[3] = 1 - g
		}
	}
}

// Start implements Model. It scans a grid of diffusion lengths 2√(Dt)
// (Data-depth/100 to 10× the deepest depth) and of h√(Dt) = 0.1…10 and, at
// each node, solves the linear least-squares problem for the two levels
// C0, Cp − C0 (separable least squares: G. H. Golub and V. Pereyra,
// SIAM J. Numer. Anal. 10, 413–432, 1973); the node with the smallest
// residual sum gives the start.
func (MassTransfer) Start(d *Data, p []float64) error {
	best := math.Inf(1)
	g := make([]float64, len(d.X))
	for _, hs := range []float64{0.1, 0.3, 1, 3, 10} {
		s := scanLengths(d, depthScale(d)/100, 10*depthScale(d), 48, g, func(l float64, g []float64) {
			for i, x := range d.X {
				u := x / l
				g[i], _, _ = massTransferShape(u, u+hs)
			}
		}, nil)
		if s.ok && s.rss < best {
			best = s.rss
			D := s.l * s.l / (4 * d.Time)
			p[0] = math.Log(D)
			p[1] = math.Log(hs * math.Sqrt(D) / math.Sqrt(d.Time))
			p[3] = s.a
			p[2] = s.a + s.b
		}
	}
	if math.IsInf(best, 1) {
		return errNoStart("masstransfer")
	}
	return nil
}

// Diagnose implements Diagnoser: it says when the surface resistance is
// not resolved by the data.
func (MassTransfer) Diagnose(r *Result) {
	D, b := r.Param("D"), r.Param("beta")
	if D == nil || b == nil || !(D.Value > 0) {
		return
	}
	hs := b.Value * r.data.Time / math.Sqrt(D.Value*r.data.Time)
	switch {
	case math.IsInf(b.Value, 1):
		bound := "the data give no lower bound either"
		if r.CIMethod != "profile" {
			bound = "--ci profile gives its lower bound"
		}
		if finite(b.CI.Lo) {
			bound = fmt.Sprintf("the data only bound it from below, beta > %.3g %s", b.CI.Lo, b.Unit)
		}
		r.Warn("surface-fast", "The best fit has beta → ∞: the surface is held at Cp throughout and the profile is the constant-surface erf model (the nested limit of this model), so beta has no value (%s). D, Cp and C0 are those of the limit; prefer --model erf.", bound)
	case hs > 20:
		r.Warn("surface-fast", "The surface reaction is fast (β√t/√D = %.3g > 20): the surface is practically at Cp and the profile cannot be told from the constant-surface erf model, so β is poorly determined. Prefer --model erf.", hs)
	case hs < 0.2:
		r.Warn("surface-slow", "The surface is still far from equilibrium (β√t/√D = %.3g < 0.2): the profile mostly fixes the product β·(Cp − C0), so β and Cp are strongly correlated. Fix Cp at the atmosphere's carbon potential with --fix if it is known.", hs)
	}
}

// depthScale is the largest |x| of the data, used to size the start grids;
// never zero.
func depthScale(d *Data) float64 {
	m := 0.0
	for _, x := range d.X {
		m = math.Max(m, math.Abs(x))
	}
	if !(m > 0) {
		m = 1e-3
	}
	return m
}

// scan is the best node of a start grid.
type scan struct {
	l, a, b, rss float64
	ok           bool
}

// scanLengths evaluates a one-parameter family of shapes on n diffusion
// lengths l = 2√(Dt), log-spaced from lmin to lmax. For each length, shape
// fills g and the levels (a, b) of y ≈ a + b·g come from weighted linear
// least squares; it returns the length with the smallest residual sum.
// Shapes that give a non-finite or degenerate basis are skipped, and so are
// levels that accept (when not nil) rejects.
func scanLengths(d *Data, lmin, lmax float64, n int, g []float64, shape func(l float64, g []float64), accept func(a, b float64) bool) scan {
	best := scan{rss: math.Inf(1)}
	r := math.Log(lmax / lmin)
	for k := 0; k < n; k++ {
		l := lmin * math.Exp(r*float64(k)/float64(n-1))
		shape(l, g)
		a, b, rss, ok := linearLevels(g, d.Y, d.W)
		if ok && rss < best.rss && (accept == nil || accept(a, b)) {
			best = scan{l: l, a: a, b: b, rss: rss, ok: true}
		}
	}
	return best
}

// linearLevels solves min Σ wᵢ(yᵢ − a − b·gᵢ)² (w nil: all 1) in closed form.
func linearLevels(g, y, w []float64) (a, b, rss float64, ok bool) {
	var sw, sg, sy, sgg, sgy float64
	for i := range y {
		wi := 1.0
		if w != nil {
			wi = w[i]
		}
		gi := g[i]
		if !finite(gi) {
			return 0, 0, 0, false
		}
		sw += wi
		sg += wi * gi
		sy += wi * y[i]
		sgg += wi * gi * gi
		sgy += wi * gi * y[i]
	}
	mg, my := sg/sw, sy/sw
	vgg := sgg/sw - mg*mg
	if !(vgg > 1e-14*math.Max(sgg/sw, 1e-300)) {
		return 0, 0, 0, false
	}
	b = (sgy/sw - mg*my) / vgg
	a = my - b*mg
	for i := range y {
		wi := 1.0
		if w != nil {
			wi = w[i]
		}
		r := y[i] - a - b*g[i]
		rss += wi * r * r
	}
	return a, b, rss, finite(rss)
}

// errNoStart is returned by Start when no node of the start grid gives a
// usable shape for the data.
func errNoStart(model string) error {
	return fmt.Errorf("%w: the %s model finds no usable starting values in these data (the profile does not have the shape this model describes); try automatic model selection or another model", ErrNoAnswer, model)
}
