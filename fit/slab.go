package fit

import (
	"fmt"
	"math"
)

// Slab is a plane sheet of finite thickness L, initially at a uniform level
// C0, whose exposed faces are held at Cs from t = 0 (D constant):
//
//	(C − C0)/(Cs − C0) = 1 − (4/π) Σₙ 1/(2n+1)·sin((2n+1)πx/L)·exp(−(2n+1)²π²Dt/L²)
//
// with x measured from one face (Crank, The Mathematics of Diffusion, 2nd
// ed., 1975, ch. 4, §4.3.1, eq. 4.17 written for 0 ≤ x ≤ L; section and
// equation numbers from memory). For small τ = Dt/L² the Fourier series
// converges slowly and the equivalent series of images (Crank eq. 4.16,
// from memory)
//
//	(C − C0)/(Cs − C0) = Σₙ (−1)ⁿ [erfc((nL + x)/(2√(Dt))) + erfc(((n+1)L − x)/(2√(Dt)))]
//
// converges in one or two terms; Eval uses the images for τ < 0.005 and
// the Fourier series above, each summed until the bound on the remaining
// terms (of the value and of its derivative in ln D) is below 1e-15 of
// |Cs − C0|.
//
// With Data.Faces == 1 the far face is sealed (no flux): by symmetry the
// profile is that of a sheet of thickness 2L exposed on both faces, so L
// is replaced by 2L. Depths must lie in [0, L]. The thickness comes from
// Data.Thickness and is required.
//
// Parameters: D (fitted as ln D), Cs, C0.
type Slab struct{}

func init() {
	Register(Info{Name: "slab", Title: "finite slab (Fourier series)", InAuto: true, Rank: 40,
		Applies: func(d *Data) (bool, string) {
			if d.Thickness > 0 {
				return true, ""
			}
			return false, "slab not tried: the specimen thickness is not known (give it, e.g. a `# thickness: 12 mm` line)."
		}}, func() Model { return Slab{} })
}

// Name implements Model.
func (Slab) Name() string { return "slab" }

// Params implements Model.
func (Slab) Params() []Param {
	return []Param{
		{Name: "D", Log: true, Unit: "m2/s", Free: true},
		{Name: "Cs", Unit: "value", Free: true},
		{Name: "C0", Unit: "value", Free: true},
	}
}

// slabTauSwitch is the τ = Dt/L² below which the series of images is used.
// At τ = 0.005 the Fourier series needs fourteen terms of plain arithmetic
// (the sines come from one sincos by recurrence) while the images need one
// group, and only near the faces; above it each erfc costs more than the
// whole Fourier sum (measured with the benchmarks).
const slabTauSwitch = 0.005

// slabTol is the bound on the neglected terms of either series, relative to
// the step Cs − C0.
const slabTol = 1e-15

// slabSeries evaluates θ = (C − C0)/(Cs − C0) and ∂θ/∂ln τ at one τ.
type slabSeries struct {
	tau, sq float64 // τ and 2√τ
	fourier bool
	n       int         // Fourier terms kept
	ek      [64]float64 // exp(−k²π²τ), k = 1, 3, 5…
}

func newSlabSeries(tau float64) slabSeries {
	s := slabSeries{tau: tau, sq: 2 * math.Sqrt(tau), fourier: tau >= slabTauSwitch}
	if !s.fourier {
		return s
	}
	for j := 0; j < len(s.ek); j++ {
		k := float64(2*j + 1)
		a := k * k * math.Pi * math.Pi * tau
		s.ek[j] = math.Exp(-a)
		s.n = j + 1
		// Bound on every later term of θ and of ∂θ/∂lnτ: the next envelope
		// (4/π)(1 + a')e^{−a'} times a geometric tail factor.
		k2 := k + 2
		a2 := k2 * k2 * math.Pi * math.Pi * tau
		r := math.Exp(-(4*k2 + 4) * math.Pi * math.Pi * tau)
		if 4/math.Pi*(1+a2)*math.Exp(-a2)/(1-r) < slabTol {
			break
		}
	}
	return s
}

// at returns θ and ∂θ/∂lnτ at ξ = x/L.
func (s *slabSeries) at(xi float64) (theta, dtheta float64) {
	theta, _, dtheta = s.both(xi)
	return theta, dtheta
}

// both returns θ, its complement φ = 1 − θ and ∂θ/∂lnτ at ξ = x/L, each
// to full relative precision: the Fourier series gives φ directly (small
// late in the uptake, where 1 − θ would lose every digit), the series of
// images gives θ directly (small deep inside early on).
func (s *slabSeries) both(xi float64) (theta, phi, dtheta float64) {
	if s.fourier {
		// sin(kφ) for odd k by the recurrence sin((k+2)φ) = 2cos(2φ)sin(kφ) − sin((k−2)φ).
		phi := math.Pi * xi
		s1, c1 := math.Sincos(phi)
		c2 := 2 * (c1*c1 - s1*s1)
		prev, cur := -s1, s1 // sin(−φ), sin(φ)
		var sum, dsum float64
		for j := 0; j < s.n; j++ {
			k := float64(2*j + 1)
			sum += cur / k * s.ek[j]
			dsum += k * cur * s.ek[j]
			prev, cur = cur, c2*cur-prev
		}
		phi = 4 / math.Pi * sum
		return 1 - phi, phi, 4 * math.Pi * s.tau * dsum
	}
	// Series of images; d erfc(w)/dlnτ = (w/√π)e^{−w²} for w = z/(2√τ).
	// Terms with w > 6.5 (erfc < 4e-20, derivative < 2e-18) are skipped.
	sign := 1.0
	for n := 0; n < 1000; n++ {
		for _, w := range [2]float64{(float64(n) + xi) / s.sq, (float64(n+1) - xi) / s.sq} {
			if w <= 6.5 {
				theta += sign * math.Erfc(w)
				dtheta += sign * w * math.Exp(-w*w) / math.SqrtPi
			}
		}
		sign = -sign
		wn := float64(n+1) / s.sq // smallest argument of the next group
		if 2*(math.Erfc(wn)+wn*math.Exp(-wn*wn)) < slabTol {
			break
		}
	}
	return theta, 1 - theta, dtheta
}

// slabLength returns the effective sheet thickness (2L for one sealed face).
func slabLength(d *Data) float64 {
	if d.Faces == 1 {
		return 2 * d.Thickness
	}
	return d.Thickness
}

// Eval implements Model. ∂C/∂lnD = (Cs − C0)·∂θ/∂lnτ since τ ∝ D. Without
// a thickness it writes NaN (Start refuses such data first).
//
// Late in the uptake the profile is Cs − (Cs − C0)·φ with φ = 1 − θ small,
// and with C0 free a refit may take Cs − C0 large while φ is tiny (D and C0
// trade off along the single remaining mode). The value is therefore
// formed as Cs − (Cs − C0)·φ from the Fourier series (C0 + (Cs − C0)·θ from
// the images, where θ is the small one), and the C0 column is φ itself:
// no difference of nearly equal numbers, so the result does not depend on
// how the compiler fuses the arithmetic.
func (Slab) Eval(p []float64, d *Data, f, jac []float64) {
	L := slabLength(d)
	if !(L > 0) {
		for i := range f {
			f[i] = math.NaN()
		}
		return
	}
	s := newSlabSeries(math.Exp(p[0]) * d.Time / (L * L))
	cs, c0 := p[1], p[2]
	dc := cs - c0
	for i, x := range d.X {
		th, phi, dth := s.both(x / L)
		if s.fourier {
			f[i] = cs - dc*phi
		} else {
			f[i] = c0 + dc*th
		}
		if jac != nil {
			row := jac[3*i : 3*i+3]
			row[0] = dc * dth
			row[1] = th
			row[2] = phi
		}
	}
}

// Start implements Model. It checks the thickness, the number of faces and
// that every depth lies inside the specimen, then scans diffusion lengths
// 2√(Dt) from 1/100 of the deepest depth to 4× the (effective) thickness,
// with Cs and C0 from linear least squares at each length (separable least
// squares, as in MassTransfer.Start).
func (Slab) Start(d *Data, p []float64) error {
	if !(d.Thickness > 0) {
		return fmt.Errorf("%w: the slab model needs the specimen thickness: give it, e.g. a `# thickness: 12 mm` line", ErrBadInput)
	}
	if d.Faces != 1 && d.Faces != 2 {
		return fmt.Errorf("%w: the slab model takes 1 exposed face (far face sealed) or 2 (both faces exposed), not %d", ErrBadInput, d.Faces)
	}
	for i, x := range d.X {
		if x < 0 || x > d.Thickness*(1+1e-9) {
			return fmt.Errorf("%w: point %d at depth %s lies outside the specimen (thickness %s, depths measured from an exposed face): check the specimen thickness and the depth unit", ErrBadInput, i+1, fmtLength(x), fmtLength(d.Thickness))
		}
	}
	L := slabLength(d)
	g := make([]float64, len(d.X))
	s := scanLengths(d, depthScale(d)/100, 4*L, 64, g, func(l float64, g []float64) {
		ss := newSlabSeries(l * l / (4 * L * L))
		for i, x := range d.X {
			g[i], _ = ss.at(x / L)
		}
	}, nil)
	if !s.ok {
		return errNoStart("slab")
	}
	p[0] = math.Log(s.l * s.l / (4 * d.Time))
	p[1], p[2] = s.a+s.b, s.a
	return nil
}

// Diagnose implements Diagnoser: it says when the specimen is practically
// saturated, when only the first Fourier mode is left (D and C0 are then
// confounded unless C0 is fixed), or when the specimen is so thick that the
// far face plays no part.
//
// Only the first mode is left when the rest of the fitted profile, the
// part beyond Cs − (Cs − C0)(4/π)e^{−π²τ}·sin(πx/L) (Crank eq. 4.17, first
// term), adds up over the points to less than three residual standard
// deviations: the data then fix (Cs − C0)·e^{−π²τ} but not D and C0 apart,
// and the profile statistic of D levels off (its upper bound is open). The
// factor three is common practice, no source.
func (Slab) Diagnose(r *Result) {
	D := r.Param("D")
	L := slabLength(r.data)
	if D == nil || !(L > 0) {
		return
	}
	tau := D.Value * r.data.Time / (L * L)
	c0 := r.Param("C0")
	switch {
	case tau > 0.5:
		// Centre deficit (4/π)·exp(−π²τ) < 1 % of the step at τ = 0.5 (Crank eq. 4.17, first term).
		r.Warn("slab-saturated", "The specimen is practically saturated (Dt/L² = %.2g > 0.5; the centre is within %.2g %% of Cs): D rests on a small remaining difference and is poorly determined. A shorter time or a thicker specimen would measure it better.", tau, 100*4/math.Pi*math.Exp(-math.Pi*math.Pi*tau))
	case c0 != nil && !c0.Fixed && tau >= slabTauSwitch:
		higher, s := slabHigherModes(r, tau, L), r.Stats.RMSE
		if higher < 3*s || math.IsNaN(D.CI.Hi) {
			r.Warn("slab-single-mode", "Only the first Fourier mode of the slab solution is resolved (Dt/L² = %.2g; the higher modes add up to %.2g over the points, against a residual standard deviation of %.2g): the profile is a single sine arch, which fixes (Cs − C0)·exp(−π²Dt/L²) but not D and C0 apart, so D is biased and its upper bound is not determined. Fix C0 at the known initial level with --fix C0=… for a trustworthy D.", tau, higher, s)
		}
	case tau < 0.005:
		r.Warn("slab-thick", "The diffusion length is small against the thickness (Dt/L² = %.2g): the far face plays no part and the semi-infinite erf model gives the same D with fewer assumptions.", tau)
	}
}

// slabHigherModes is the weighted norm, over the data points, of the
// fitted profile minus its first Fourier mode.
func slabHigherModes(r *Result, tau, L float64) float64 {
	cs, c0 := r.Param("Cs").Value, r.Param("C0").Value
	a1 := (cs - c0) * 4 / math.Pi * math.Exp(-math.Pi*math.Pi*tau)
	var ss float64
	for i, x := range r.data.X {
		h := r.Residuals[i].Fitted - (cs - a1*math.Sin(math.Pi*x/L))
		w := 1.0
		if r.data.W != nil {
			w = r.data.W[i]
		}
		ss += w * h * h
	}
	return math.Sqrt(ss)
}
