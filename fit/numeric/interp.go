package numeric

import "sort"

// stencil returns the first of four consecutive nodes around xq and the
// cubic Lagrange weights on them (nonuniform nodes; interpolation error
// O(h⁴), below the scheme's O(h²)). xs must have at least four nodes.
func stencil(xs []float64, xq float64) (j int, w [4]float64) {
	n := len(xs)
	k := sort.SearchFloat64s(xs, xq) - 1 // xs[k] < xq ≤ xs[k+1]
	j = k - 1
	if j < 0 {
		j = 0
	}
	if j > n-4 {
		j = n - 4
	}
	x0, x1, x2, x3 := xs[j], xs[j+1], xs[j+2], xs[j+3]
	d0, d1, d2, d3 := xq-x0, xq-x1, xq-x2, xq-x3
	w[0] = d1 * d2 * d3 / ((x0 - x1) * (x0 - x2) * (x0 - x3))
	w[1] = d0 * d2 * d3 / ((x1 - x0) * (x1 - x2) * (x1 - x3))
	w[2] = d0 * d1 * d3 / ((x2 - x0) * (x2 - x1) * (x2 - x3))
	w[3] = d0 * d1 * d2 / ((x3 - x0) * (x3 - x1) * (x3 - x2))
	return j, w
}
