package fit

import "math"

// Erfcx returns the scaled complementary error function
//
//	erfcx(x) = exp(x²)·erfc(x),
//
// which stays of order 1/(x√π) where erfc itself underflows (x ≳ 26.5).
// The surface mass-transfer model needs it to evaluate
// exp(hx + h²Dt)·erfc(u + h√(Dt)) as exp(−u²)·erfcx(u + h√(Dt)) without
// overflow.
//
// Method, by range:
//
//   - 0 ≤ x ≤ 50: J. A. C. Weideman, "Computation of the complex error
//     function", SIAM J. Numer. Anal. 31(5), 1497–1518 (1994). With
//     w(z) = exp(−z²)·erfc(−iz) and erfcx(y) = w(iy), his rational series
//     reads erfcx(y) = 2·p(Z)/(L+y)² + 1/(√π·(L+y)), Z = (L−y)/(L+y),
//     p(Z) = Σₙ₌₁..N aₙ Zⁿ⁻¹, L = √(N/√2); the aₙ are the Fourier
//     coefficients of (L²+t²)·exp(−t²) under t = L·tan(θ/2), computed once
//     by the trapezoidal rule on 2M = 4N points (his eq. for the FFT). With
//     N = 40 the relative error is about 1e-15 on the whole half-line.
//   - x > 50: the asymptotic series (Abramowitz & Stegun, Handbook of
//     Mathematical Functions, 1964, eq. 7.1.23, from memory)
//     erfcx(x) ≈ 1/(x√π)·Σₘ (−1)ᵐ (2m−1)!!/(2x²)ᵐ, summed while the terms
//     decrease and exceed 1e-17 of the sum (six terms at x = 50).
//   - x < 0: the reflection erfc(−x) = 2 − erfc(x), i.e.
//     erfcx(x) = 2·exp(x²) − erfcx(−x), with exp(x²) evaluated from the
//     exact split x² = hi + lo (fused multiply–add) so that its relative
//     error does not grow with x². It overflows to +Inf below about −26.6,
//     where the true value exceeds the float64 range.
//
// Special values: Erfcx(NaN) = NaN, Erfcx(+Inf) = 0, Erfcx(−Inf) = +Inf.
func Erfcx(x float64) float64 {
	switch {
	case math.IsNaN(x):
		return x
	case x < 0:
		if x < -26.7 {
			return math.Inf(1)
		}
		return 2*expSquare(x) - Erfcx(-x)
	case x > erfcxAsymptoticFrom:
		return erfcxAsymptotic(x)
	}
	l := weideman.l
	z := (l - x) / (l + x)
	var p float64
	for n := len(weideman.a) - 1; n >= 0; n-- {
		p = p*z + weideman.a[n]
	}
	return 2*p/((l+x)*(l+x)) + 1/(math.SqrtPi*(l+x))
}

// erfcxAsymptoticFrom is the branch point between Weideman's series and the
// asymptotic series.
const erfcxAsymptoticFrom = 50

// erfcxAsymptotic sums A&S 7.1.23 for large x.
func erfcxAsymptotic(x float64) float64 {
	if math.IsInf(x, 1) {
		return 0
	}
	r := 1 / (2 * x * x)
	sum, term := 1.0, 1.0
	for m := 1; m < 30; m++ {
		next := -term * float64(2*m-1) * r
		if math.Abs(next) >= math.Abs(term) || math.Abs(next) < 1e-17 {
			break
		}
		term = next
		sum += term
	}
	return sum / (x * math.SqrtPi)
}

// expSquare returns exp(x²) with x² split exactly into hi + lo, so the
// result carries the rounding of exp alone (not 2x² ulp of x²).
func expSquare(x float64) float64 {
	hi := x * x
	lo := math.FMA(x, x, -hi)
	return math.Exp(hi) * (1 + lo)
}

// weidemanSeries holds the coefficients a₁…a_N (stored from index 0) and L
// of Weideman's rational series for erfcx.
type weidemanSeries struct {
	a []float64
	l float64
}

var weideman = newWeideman(40)

// newWeideman computes the coefficients aₙ = (1/2M) Σₖ f(θₖ) cos(nθₖ),
// θₖ = kπ/M, k = −M+1…M−1, f(θ) = (L²+t²)·exp(−t²), t = L·tan(θ/2), M = 2N
// (Weideman 1994, the trapezoidal rule for the Fourier coefficients; the
// k = ±M point, t = ∞, contributes zero).
func newWeideman(n int) weidemanSeries {
	m := 2 * n
	l := math.Sqrt(float64(n) / math.Sqrt2)
	f := make([]float64, 2*m-1)
	th := make([]float64, 2*m-1)
	for k := -m + 1; k <= m-1; k++ {
		theta := float64(k) * math.Pi / float64(m)
		t := l * math.Tan(theta/2)
		f[k+m-1] = math.Exp(-t*t) * (l*l + t*t)
		th[k+m-1] = theta
	}
	a := make([]float64, n)
	for j := 1; j <= n; j++ {
		var s float64
		for i := range f {
			s += f[i] * math.Cos(float64(j)*th[i])
		}
		a[j-1] = s / float64(2*m)
	}
	return weidemanSeries{a: a, l: l}
}
