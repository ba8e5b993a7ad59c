package profile

import (
	"math"
	"sort"
)

// Monotone is a monotone piecewise cubic Hermite interpolant through
// points (xᵢ, yᵢ): on every interval where the data rise (fall) it rises
// (falls), and it never overshoots the data. Tangents follow
// F. N. Fritsch and R. E. Carlson, "Monotone Piecewise Cubic Interpolation",
// SIAM J. Numer. Anal. 17(2), 238–246 (1980):
//
//  1. secants Δₖ = (yₖ₊₁ − yₖ)/(xₖ₊₁ − xₖ);
//  2. initial tangents mₖ = (Δₖ₋₁ + Δₖ)/2 inside, m₀ = Δ₀, mₙ = Δₙ₋₁ at
//     the ends, and mₖ = 0 where Δₖ₋₁ and Δₖ differ in sign or one is 0;
//  3. on each interval with Δₖ ≠ 0, α = mₖ/Δₖ, β = mₖ₊₁/Δₖ; if
//     α² + β² > 9 both tangents are scaled by τ = 3/√(α² + β²) (the
//     circle inside their region of monotonicity); where Δₖ = 0 both are 0.
//
// (Steps as recalled from the paper; from memory.) Between nodes the
// cubic Hermite basis is used. Monotone does not extrapolate: outside
// [x₀, xₙ] At and Deriv return NaN.
type Monotone struct {
	x, y, m []float64
	dir     int // +1 strictly increasing data, -1 strictly decreasing, 0 otherwise
}

// NewMonotone builds the interpolant. x must be strictly increasing, and
// x and y finite and of equal length ≥ 2. The slices are copied.
func NewMonotone(x, y []float64) (*Monotone, error) {
	if len(x) != len(y) {
		return nil, errorf(ErrValue, "x and y differ in length (%d and %d)", len(x), len(y))
	}
	if len(x) < 2 {
		return nil, errorf(ErrNoData, "%d point(s); interpolation needs at least 2", len(x))
	}
	for i := range x {
		if !isFinite(x[i]) || !isFinite(y[i]) {
			return nil, errorf(ErrNumber, "point %d (%v, %v) is not finite", i+1, x[i], y[i])
		}
		if i > 0 && !(x[i] > x[i-1]) {
			return nil, errorf(ErrValue, "x is not strictly increasing at point %d (%v after %v)", i+1, x[i], x[i-1])
		}
	}
	f := &Monotone{x: append([]float64(nil), x...), y: append([]float64(nil), y...)}
	f.m = tangents(f.x, f.y)
	f.dir = direction(f.y)
	return f, nil
}

func isFinite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// tangents returns the Fritsch–Carlson tangents at the nodes.
func tangents(x, y []float64) []float64 {
	n := len(x)
	d := make([]float64, n-1)
	for k := range d {
		d[k] = (y[k+1] - y[k]) / (x[k+1] - x[k])
	}
	m := make([]float64, n)
	m[0], m[n-1] = d[0], d[n-2]
	for k := 1; k < n-1; k++ {
		if d[k-1]*d[k] > 0 {
			m[k] = (d[k-1] + d[k]) / 2
		}
	}
	for k, dk := range d {
		if dk == 0 {
			m[k], m[k+1] = 0, 0
			continue
		}
		a, b := m[k]/dk, m[k+1]/dk
		if s := a*a + b*b; s > 9 {
			tau := 3 / math.Sqrt(s)
			m[k], m[k+1] = tau*a*dk, tau*b*dk
		}
	}
	return m
}

// direction is +1 for strictly increasing y, -1 for strictly decreasing, else 0.
func direction(y []float64) int {
	up, down := true, true
	for k := 1; k < len(y); k++ {
		up = up && y[k] > y[k-1]
		down = down && y[k] < y[k-1]
	}
	switch {
	case up:
		return 1
	case down:
		return -1
	}
	return 0
}

// Domain returns the interval [x₀, xₙ] on which the interpolant is defined.
func (f *Monotone) Domain() (lo, hi float64) { return f.x[0], f.x[len(f.x)-1] }

// Range returns the smallest and largest data value yᵢ; for monotone
// data the interpolant takes exactly the values in this interval.
func (f *Monotone) Range() (lo, hi float64) {
	lo, hi = f.y[0], f.y[0]
	for _, v := range f.y {
		lo, hi = math.Min(lo, v), math.Max(hi, v)
	}
	return lo, hi
}

// segment returns k with x[k] ≤ v ≤ x[k+1], or -1 outside the domain.
func (f *Monotone) segment(v float64) int {
	n := len(f.x)
	if !(v >= f.x[0] && v <= f.x[n-1]) {
		return -1
	}
	k := sort.SearchFloat64s(f.x, v) - 1 // x[k] < v ≤ x[k+1]
	return max(0, min(k, n-2))
}

// At returns the interpolated value at v; NaN outside the domain.
func (f *Monotone) At(v float64) float64 {
	k := f.segment(v)
	if k < 0 {
		return math.NaN()
	}
	h := f.x[k+1] - f.x[k]
	t := (v - f.x[k]) / h
	t2, t3 := t*t, t*t*t
	return (2*t3-3*t2+1)*f.y[k] + (t3-2*t2+t)*h*f.m[k] + (-2*t3+3*t2)*f.y[k+1] + (t3-t2)*h*f.m[k+1]
}

// Deriv returns the derivative of the interpolant at v; NaN outside the domain.
func (f *Monotone) Deriv(v float64) float64 {
	k := f.segment(v)
	if k < 0 {
		return math.NaN()
	}
	h := f.x[k+1] - f.x[k]
	t := (v - f.x[k]) / h
	t2 := t * t
	return (6*t2-6*t)/h*f.y[k] + (3*t2-4*t+1)*f.m[k] + (-6*t2+6*t)/h*f.y[k+1] + (3*t2-2*t)*f.m[k+1]
}

// Inverse returns the x at which the interpolant equals y. It needs
// strictly monotone data; it returns NaN when the data are not strictly
// monotone or y lies outside Range (no extrapolation).
func (f *Monotone) Inverse(y float64) float64 {
	lo, hi := f.Range()
	if f.dir == 0 || !(y >= lo && y <= hi) {
		return math.NaN()
	}
	n := len(f.y)
	k := sort.Search(n, func(i int) bool { return float64(f.dir)*f.y[i] >= float64(f.dir)*y }) - 1
	k = max(0, min(k, n-2))
	a, b := f.x[k], f.x[k+1]
	// Bisection on a monotone cubic: 100 halvings reach the spacing of floats.
	for range 100 {
		mid := a + (b-a)/2
		if mid <= a || mid >= b {
			break
		}
		if float64(f.dir)*(f.At(mid)-y) < 0 {
			a = mid
		} else {
			b = mid
		}
	}
	if math.Abs(f.At(a)-y) <= math.Abs(f.At(b)-y) {
		return a
	}
	return b
}
