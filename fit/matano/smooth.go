package matano

import (
	"fmt"
	"math"

	"github.com/fickfit/fickfit/fit"
	"github.com/fickfit/fickfit/internal/stats"
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
// terms is set by the user or chosen from the data (see pipeline.run).
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

// Position returns the x at which Y(x) = y, 0 < y < 1, by the project's
// bracketing root finder (stats.Root) between ends 40 widths beyond the
// outermost terms; ok is false outside (0, 1).
func (s *Smooth) Position(y float64) (x float64, ok bool) {
	if !(y > 0 && y < 1) {
		return math.NaN(), false
	}
	lo, hi := math.Inf(1), math.Inf(-1)
	for k := range s.W {
		lo = math.Min(lo, s.M[k]-40*s.S[k])
		hi = math.Max(hi, s.M[k]+40*s.S[k])
	}
	f := func(x float64) float64 { return s.Y(x) - y }
	return stats.Root(f, lo, f(lo), hi, f(hi), 1e-15)
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

// erfSum is the smoother's parametrisation for fitting, on internal
// parameters [CL, CR, m₁, ln s₁, …, m_K, ln s_K, q₂, …, q_K] with
// wₖ = softmax(0, q₂…q_K): every vector is a monotone curve, and the
// widths stay positive and the weights positive and summing to one.
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

// zTail is the |z| beyond which ½erfc(−z) is 0 or 1 and e^{−z²} negligible
// to double precision (erfc 6 = 2e-17).
const zTail = 6

// values fills s from p and writes C(xᵢ) into f, keeping Φₖ(xᵢ) in
// phi[i·K + k] for jacobian.
func (m erfSum) values(p, x, f []float64, s *Smooth, phi []float64) {
	m.fill(p, s)
	dc := s.CR - s.CL
	for i, xi := range x {
		var y float64
		row := phi[i*m.k : (i+1)*m.k]
		for k, w := range s.W {
			z := (xi - s.M[k]) / s.S[k]
			switch {
			case z > zTail:
				row[k] = 1
			case z < -zTail:
				row[k] = 0
			default:
				row[k] = 0.5 * math.Erfc(-z)
			}
			y += w * row[k]
		}
		f[i] = s.CL + dc*y
	}
}

// jacobian writes ∂C(xᵢ)/∂p into jac (row-major, len(x) × np) at the
// parameters values last filled into s, with its phi.
func (m erfSum) jacobian(x []float64, s *Smooth, phi, jac []float64) {
	np := m.np()
	dc := s.CR - s.CL
	for i, xi := range x {
		row := jac[i*np : (i+1)*np]
		ph := phi[i*m.k : (i+1)*m.k]
		var y float64
		for k, w := range s.W {
			y += w * ph[k]
		}
		row[0], row[1] = 1-y, y
		for k, w := range s.W {
			z := (xi - s.M[k]) / s.S[k]
			var g float64 // ∂C/∂z
			if z >= -zTail && z <= zTail {
				g = dc * w * math.Exp(-z*z) / math.SqrtPi
			}
			row[2+2*k] = -g / s.S[k]
			row[3+2*k] = -g * z
			if k > 0 {
				row[2+2*m.k+k-1] = dc * w * (ph[k] - y)
			}
		}
	}
}

// start returns a starting vector for k terms from a one-term fit
// (cl, cr, m, s): k terms of equal weight and width s spread over the
// middle half-width of the one-term curve.
func start(k int, cl, cr, m, s float64) []float64 {
	p := make([]float64, 3*k+1)
	p[0], p[1] = cl, cr
	for j := 0; j < k; j++ {
		f := 0.0
		if k > 1 {
			f = float64(j)/float64(k-1) - 0.5 // −½ … ½
		}
		p[2+2*j] = m + 0.5*s*f
		p[3+2*j] = math.Log(s)
	}
	return p
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
