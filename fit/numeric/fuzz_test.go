package numeric

import (
	"math"
	"testing"
)

// FuzzNewTable guards the table constructor and interpolant: bad rows give
// errors, never panics; accepted tables give positive finite D everywhere
// and are monotone between monotone rows (Fritsch & Carlson 1980).
func FuzzNewTable(f *testing.F) {
	f.Add(0.0, 1e-12, 0.5, 5e-12, 1.0, 2e-11, 0.3)
	f.Add(0.0, 1e-12, 0.0, 5e-12, 1.0, -1.0, 0.5)
	f.Add(1.0, 3e-11, 2.0, 1e-13, 3.0, 1e-13, 2.5)
	f.Fuzz(func(t *testing.T, c1, d1, c2, d2, c3, d3, x float64) {
		tab, err := NewTable([]float64{c1, c2, c3}, []float64{d1, d2, d3})
		if err != nil {
			return
		}
		if math.IsNaN(x) {
			return
		}
		v, dv := tab.At(x)
		if !(v > 0) || math.IsInf(v, 0) || math.IsNaN(dv) {
			t.Fatalf("At(%g) = %g, %g", x, v, dv)
		}
		lo, hi := math.Min(d1, math.Min(d2, d3)), math.Max(d1, math.Max(d2, d3))
		if v < lo*(1-1e-12) || v > hi*(1+1e-12) {
			t.Fatalf("At(%g) = %g outside the table's range [%g, %g]", x, v, lo, hi)
		}
		if d1 <= d2 && d2 <= d3 && !math.IsInf(c3-c1, 0) {
			prev, _ := tab.At(c1)
			for k := 1; k <= 50; k++ {
				y := c1 + (c3-c1)*float64(k)/50
				w, _ := tab.At(y)
				if w < prev*(1-1e-12) {
					t.Fatalf("not monotone: At(%g) = %g after %g", y, w, prev)
				}
				prev = w
			}
		}
	})
}
