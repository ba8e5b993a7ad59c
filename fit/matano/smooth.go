package matano

import (
	"fmt"
	"math"

	"github.com/fickfit/fickfit/fit"
)

// Smooth is the monotone curve fitted to a couple's profile before it is
// differentiated and integrated:
//
//	C(x) = CL + (CR − CL)·Y(x),  Y(x) = Σₖ wₖ·½(1 + erf((x − mₖ)/sₖ)),
//
// with wₖ > 0, Σwₖ = 1 and sₖ > 0, so Y rises monotonically from 0 to 1
// and x(C) is single-valued. Why a sum of error functions: the couple with
// a constant D is exactly one term (Crank 1975, ch. 2, from memory), so the
// smoother adds no bias there; further terms take up the asymmetry that a
// concentration-dependent D gives; monotonicity holds by construction, and
// the integrals the Boltzmann–Matano and Sauer–Freise formulas need have
// closed forms, so no quadrature of noisy data is involved. The number of
// terms is chosen by AICc.
type Smooth struct {
	CL, CR  float64   // end compositions (x → −∞ and x → +∞)
	W, M, S []float64 // weights, centres (m) and widths (m) of the terms
}

// Terms returns the number of erf terms.
func (s *Smooth) Terms() int { return len(s.W) }

// Y returns the normalised composition (C − CL)/(CR − CL) at x.
func (s *Smooth) Y(x float64) float64 {
	var y float64
	for k, w := range s.W {
		y += w * 0.5 * math.Erfc(-(x-s.M[k])/s.S[k])
	}
	return y
}

// At returns C(x).
func (s *Smooth) At(x float64) float64 { return s.CL + (s.CR-s.CL)*s.Y(x) }

// slopeY returns dY/dx at x.
func (s *Smooth) slopeY(x float64) float64 {
	var g float64
	for k, w := range s.W {
		z := (x - s.M[k]) / s.S[k]
		g += w * math.Exp(-z*z) / (s.S[k] * math.SqrtPi)
	}
	return g
}

// Slope returns dC/dx at x.
func (s *Smooth) Slope(x float64) float64 { return (s.CR - s.CL) * s.slopeY(x) }

// MatanoPlane returns the plane x_M of equal areas,
// ∫(x − x_M) dC = 0 over the whole profile; for the erf sum it is Σ wₖ mₖ.
func (s *Smooth) MatanoPlane() float64 {
	var xm float64
	for k, w := range s.W {
		xm += w * s.M[k]
	}
	return xm
}

// Position returns the x at which Y(x) = y, 0 < y < 1, by bisection
// polished with Newton steps; ok is false outside (0, 1).
func (s *Smooth) Position(y float64) (x float64, ok bool) {
	if !(y > 0 && y < 1) {
		return math.NaN(), false
	}
	lo, hi := math.Inf(1), math.Inf(-1)
	for k := range s.W {
		lo = math.Min(lo, s.M[k]-40*s.S[k])
		hi = math.Max(hi, s.M[k]+40*s.S[k])
	}
	for i := 0; i < 80; i++ { // 80 halvings of 80 widths: below rounding
		mid := 0.5 * (lo + hi)
		if s.Y(mid) < y {
			lo = mid
		} else {
			hi = mid
		}
	}
	x = 0.5 * (lo + hi)
	for i := 0; i < 3; i++ {
		g := s.slopeY(x)
		if !(g > 0) {
			break
		}
		nx := x - (s.Y(x)-y)/g
		if !(nx >= lo && nx <= hi) {
			break
		}
		x = nx
	}
	return x, true
}

// boltzmannMatano returns D at the position x* (Boltzmann–Matano):
//
//	D(C*) = −1/(2t)·(dx/dC)*·∫_{CL}^{C*} (x − x_M) dC,
//
// with ∫_{−∞}^{x*}(x − x_M)·Y′ dx = Σ wₖ[(mₖ − x_M)Φₖ − sₖ e^{−zₖ²}/(2√π)]
// in closed form for the erf sum (Φₖ = ½(1 + erf zₖ), zₖ = (x* − mₖ)/sₖ).
func (s *Smooth) boltzmannMatano(x, t, xm float64) float64 {
	var integral, slope float64
	for k, w := range s.W {
		z := (x - s.M[k]) / s.S[k]
		e := math.Exp(-z * z)
		integral += w * ((s.M[k]-xm)*0.5*math.Erfc(-z) - s.S[k]*e/(2*math.SqrtPi))
		slope += w * e / (s.S[k] * math.SqrtPi)
	}
	return -integral / (2 * t * slope)
}

// sauerFreise returns D at x* (Sauer–Freise), which needs no Matano plane:
//
//	D(Y*) = [(1 − Y*)∫_{−∞}^{x*} Y dx + Y*∫_{x*}^{∞} (1 − Y) dx] / (2t·(dY/dx)*),
//
// with ∫_{−∞}^{x*} Φₖ dx = (sₖ/2)[e^{−z²}/√π + z·erfc(−z)] and
// ∫_{x*}^{∞} (1 − Φₖ) dx = (sₖ/2)[e^{−z²}/√π − z·erfc(z)].
func (s *Smooth) sauerFreise(x, t float64) float64 {
	var left, right, slope, y float64
	for k, w := range s.W {
		z := (x - s.M[k]) / s.S[k]
		e := math.Exp(-z * z)
		left += w * s.S[k] / 2 * (e/math.SqrtPi + z*math.Erfc(-z))
		right += w * s.S[k] / 2 * (e/math.SqrtPi - z*math.Erfc(z))
		slope += w * e / (s.S[k] * math.SqrtPi)
		y += w * 0.5 * math.Erfc(-z)
	}
	return ((1-y)*left + y*right) / (2 * t * slope)
}

// erfSum is the smoother as a fit.Model on internal parameters
// [CL, CR, m₁, ln s₁, …, m_K, ln s_K, q₂, …, q_K], wₖ = softmax(0, q₂…q_K).
type erfSum struct{ k int }

func (m erfSum) np() int { return 3*m.k + 1 }

// unpack converts internal parameters to a Smooth.
func (m erfSum) unpack(p []float64) *Smooth {
	s := &Smooth{CL: p[0], CR: p[1], W: make([]float64, m.k), M: make([]float64, m.k), S: make([]float64, m.k)}
	m.fill(p, s)
	return s
}

func (m erfSum) fill(p []float64, s *Smooth) {
	s.CL, s.CR = p[0], p[1]
	var sum float64
	qmax := 0.0
	for k := 1; k < m.k; k++ {
		qmax = math.Max(qmax, p[2+2*m.k+k-1])
	}
	for k := 0; k < m.k; k++ {
		q := 0.0
		if k > 0 {
			q = p[2+2*m.k+k-1]
		}
		s.W[k] = math.Exp(q - qmax)
		sum += s.W[k]
		s.M[k] = p[2+2*k]
		s.S[k] = math.Exp(p[3+2*k])
	}
	for k := range s.W {
		s.W[k] /= sum
	}
}

// eval writes C(xᵢ) and, when jac is not nil, the Jacobian.
func (m erfSum) eval(p, x, f, jac []float64, s *Smooth, phi []float64) {
	m.fill(p, s)
	np := m.np()
	dc := s.CR - s.CL
	for i, xi := range x {
		var y float64
		for k, w := range s.W {
			phi[k] = 0.5 * math.Erfc(-(xi-s.M[k])/s.S[k])
			y += w * phi[k]
		}
		f[i] = s.CL + dc*y
		if jac == nil {
			continue
		}
		row := jac[i*np : (i+1)*np]
		row[0], row[1] = 1-y, y
		for k, w := range s.W {
			z := (xi - s.M[k]) / s.S[k]
			g := dc * w * math.Exp(-z*z) / math.SqrtPi // ∂C/∂z
			row[2+2*k] = -g / s.S[k]
			row[3+2*k] = -g * z
			if k > 0 {
				row[2+2*m.k+k-1] = dc * w * (phi[k] - y)
			}
		}
	}
}

// fitSmooth fits an erf sum of k terms from the start p0 and returns the
// solution (internal parameters) or an error.
func fitSmooth(x, y []float64, k int, p0 []float64) (*fit.Solution, error) {
	m := erfSum{k: k}
	s := m.unpack(p0)
	phi := make([]float64, k)
	pr := fit.Problem{Y: y, Func: func(p, f, jac []float64) { m.eval(p, x, f, jac, s, phi) }}
	set := fit.DefaultSettings()
	set.MaxIter = 400
	// Stop on the reduction of the sum of squares or a vanishing gradient,
	// not on a small damped step (which the first steps from a nearby
	// start can be).
	set.FTol, set.XTol = 1e-12, 1e-15
	return fit.Solve(pr, p0, &set)
}

// starts returns starting vectors for k terms from a one-term fit
// (cl, cr, m, s): the extra terms spread over the profile and with
// different widths, as an asymmetric profile needs.
func starts(k int, cl, cr, m, s float64) [][]float64 {
	base := func() []float64 {
		p := make([]float64, 3*k+1)
		p[0], p[1] = cl, cr
		return p
	}
	if k == 1 {
		p := base()
		p[2], p[3] = m, math.Log(s)
		return [][]float64{p}
	}
	var out [][]float64
	for _, spread := range []float64{0.5, 1.0} {
		for _, ratio := range []float64{1, 2.5} {
			p := base()
			for j := 0; j < k; j++ {
				f := float64(j)/float64(k-1) - 0.5 // −½ … ½
				p[2+2*j] = m + spread*s*f
				w := s * math.Pow(ratio, f)
				p[3+2*j] = math.Log(w)
			}
			out = append(out, p)
		}
	}
	return out
}

// smoothed is a fitted smoother with its statistics. The fit runs on the
// scaled depth u = (x − xc)/xs (order one, so that positions and levels
// are on comparable scales); s is in metres.
type smoothed struct {
	k      int
	p      []float64 // internal parameters on the u scale
	s      *Smooth
	rss    float64
	aicc   float64
	xc, xs float64
}

// metres returns the Smooth of internal parameters p on the depth scale.
func (sm *smoothed) metres(p []float64) *Smooth {
	s := erfSum{k: sm.k}.unpack(p)
	for k := range s.M {
		s.M[k] = sm.xc + sm.xs*s.M[k]
		s.S[k] *= sm.xs
	}
	return s
}

// chooseSmooth fits 1…kmax terms and returns the converged fit with the
// smallest AICc (Hurvich & Tsai, Biometrika 76, 1989: AICc = n ln(RSS/n) +
// 2p + 2p(p+1)/(n − p − 1)); terms whose parameters the data do not
// identify do not converge and are skipped.
func chooseSmooth(xm, y []float64, kmax int) (*smoothed, error) {
	n := len(xm)
	xc, xs := (xm[0]+xm[n-1])/2, (xm[n-1]-xm[0])/2
	x := make([]float64, n)
	for i, v := range xm {
		x[i] = (v - xc) / xs
	}
	cl, cr, m, s, err := oneTermStart(x, y)
	if err != nil {
		return nil, err
	}
	var best *smoothed
	for k := 1; k <= kmax; k++ {
		np := 3*k + 1
		if n < np+4 {
			break
		}
		var bk *smoothed
		for _, p0 := range starts(k, cl, cr, m, s) {
			sol, err := fitSmooth(x, y, k, p0)
			if err != nil || !sol.Converged {
				continue
			}
			if bk == nil || sol.RSS < bk.rss {
				bk = &smoothed{k: k, p: sol.P, rss: sol.RSS, xc: xc, xs: xs}
			}
		}
		if bk == nil {
			continue
		}
		if k == 1 {
			// Later starts build on the one-term fit.
			cl, cr, m, s = bk.p[0], bk.p[1], bk.p[2], math.Exp(bk.p[3])
		}
		rss := math.Max(bk.rss, 1e-300)
		bk.aicc = float64(n)*math.Log(rss/float64(n)) + 2*float64(np) + 2*float64(np*(np+1))/float64(n-np-1)
		bk.s = bk.metres(bk.p)
		if best == nil || bk.aicc < best.aicc {
			best = bk
		}
	}
	if best == nil {
		return nil, fmt.Errorf("%w: no smooth monotone curve (sum of error functions) could be fitted to the profile; check that it is a diffusion-couple profile that rises or falls from one end composition to the other", fit.ErrNoAnswer)
	}
	return best, nil
}

// oneTermStart estimates CL, CR, the centre and the width of a one-term
// fit from depth-ordered data: ends from the outer sixths, centre from the
// half-way crossing, width from the 10 %–90 % crossings (the erf rises
// from 0.1 to 0.9 over 2·erfinv(0.8)·s = 1.8124·s).
func oneTermStart(x, y []float64) (cl, cr, m, s float64, err error) {
	n := len(x)
	k := max(1, min(n/6, 5))
	for i := 0; i < k; i++ {
		cl += y[i]
		cr += y[n-1-i]
	}
	cl /= float64(k)
	cr /= float64(k)
	if cl == cr {
		return 0, 0, 0, 0, fmt.Errorf("%w: both ends of the profile have the same level (%g): not a diffusion couple", fit.ErrBadInput, cl)
	}
	cross := func(frac float64) float64 {
		target := cl + frac*(cr-cl)
		sign := 1.0
		if cr < cl {
			sign = -1
		}
		for i := 1; i < n; i++ {
			a, b := sign*(y[i-1]-target), sign*(y[i]-target)
			if a < 0 && b >= 0 {
				return x[i-1] + a/(a-b)*(x[i]-x[i-1])
			}
		}
		return x[0] + frac*(x[n-1]-x[0])
	}
	m = cross(0.5)
	s = (cross(0.9) - cross(0.1)) / 1.8124
	if !(s > 0) {
		s = (x[n-1] - x[0]) / 8
	}
	return cl, cr, m, s, nil
}
