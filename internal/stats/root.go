package stats

import "math"

// Root returns a zero of f inside the bracket [a, b], where fa = f(a) and
// fb = f(b) have opposite signs (or one is zero), by the Illinois variant
// of regula falsi (Dowell & Jarratt, BIT 11 (1971) 168–174; from memory):
// a secant step between the bracket ends, with the function value kept at
// a stale end halved so that the bracket shrinks from both sides; a step
// that leaves the bracket is replaced by bisection. It stops when f is
// exactly zero or the bracket is narrower than tol·max(1, |x|) (tol ≤ 0
// means 1e-13), after at most 200 steps. ok is false when [a, b] does not
// bracket a sign change or f gives NaN.
func Root(f func(float64) float64, a, fa, b, fb, tol float64) (x float64, ok bool) {
	if tol <= 0 {
		tol = 1e-13
	}
	switch {
	case math.IsNaN(fa) || math.IsNaN(fb):
		return math.NaN(), false
	case fa == 0:
		return a, true
	case fb == 0:
		return b, true
	case (fa > 0) == (fb > 0):
		return math.NaN(), false
	}
	side := 0
	for it := 0; it < 200; it++ {
		c := (a*fb - b*fa) / (fb - fa)
		if !(c > math.Min(a, b) && c < math.Max(a, b)) {
			c = (a + b) / 2
		}
		fc := f(c)
		if math.IsNaN(fc) {
			return math.NaN(), false
		}
		if fc == 0 || math.Abs(b-a) <= tol*math.Max(1, math.Abs(c)) {
			return c, true
		}
		if (fc > 0) == (fb > 0) {
			b, fb = c, fc
			if side == -1 {
				fa /= 2
			}
			side = -1
		} else {
			a, fa = c, fc
			if side == 1 {
				fb /= 2
			}
			side = 1
		}
	}
	return (a + b) / 2, true
}

// RootIncreasing returns x in [lo, hi] with f(x) = 0 for f increasing in
// x: it steps outward from x0 towards the zero in doubling steps (the
// first 10⁻³ of the range) until f changes sign, then calls Root. ok is
// false when f does not change sign inside [lo, hi] or gives NaN.
func RootIncreasing(f func(float64) float64, x0, lo, hi float64) (x float64, ok bool) {
	if !(lo < hi) {
		return math.NaN(), false
	}
	x0 = math.Min(math.Max(x0, lo), hi)
	f0 := f(x0)
	if f0 == 0 {
		return x0, true
	}
	a, fa := x0, f0
	step := math.Max((hi-lo)*1e-3, 1e-9*math.Abs(x0))
	for it := 0; it < 200; it++ {
		var b float64
		if f0 > 0 {
			b = math.Max(a-step, lo)
		} else {
			b = math.Min(a+step, hi)
		}
		fb := f(b)
		if math.IsNaN(fb) {
			return math.NaN(), false
		}
		if (fb > 0) != (f0 > 0) || fb == 0 {
			return Root(f, a, fa, b, fb, 1e-13)
		}
		if b == lo || b == hi {
			return math.NaN(), false
		}
		a, fa = b, fb
		step *= 2
	}
	return math.NaN(), false
}
