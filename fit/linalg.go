package fit

import (
	"math"

	"gonum.org/v1/gonum/mat"
)

// scaledCond returns the 2-norm condition number of the k×k symmetric
// matrix a after scaling it to unit diagonal (a correlation-like matrix), so
// that parameters of very different magnitude do not inflate it. A zero
// diagonal (a parameter the data do not touch) gives +Inf.
func scaledCond(a []float64, k int) float64 {
	s := mat.NewSymDense(k, nil)
	for i := 0; i < k; i++ {
		di := a[i*k+i]
		if !(di > 0) {
			return math.Inf(1)
		}
		for j := 0; j <= i; j++ {
			s.SetSym(i, j, a[i*k+j]/math.Sqrt(di*a[j*k+j]))
		}
	}
	var eig mat.EigenSym
	if !eig.Factorize(s, false) {
		return math.Inf(1)
	}
	ev := eig.Values(nil)
	lo, hi := math.Inf(1), 0.0
	for _, v := range ev {
		lo = math.Min(lo, v)
		hi = math.Max(hi, math.Abs(v))
	}
	if !(lo > 0) {
		return math.Inf(1)
	}
	return hi / lo
}

// invertSPD returns the inverse of the k×k symmetric positive definite
// matrix a (row-major) as a k×k slice of rows, or false when a is singular.
// It inverts the unit-diagonal scaled matrix and scales back, which keeps
// the inverse accurate when parameters differ by many orders of magnitude.
func invertSPD(a []float64, k int) ([][]float64, bool) {
	sc := make([]float64, k)
	s := mat.NewSymDense(k, nil)
	for i := 0; i < k; i++ {
		if !(a[i*k+i] > 0) {
			return nil, false
		}
		sc[i] = 1 / math.Sqrt(a[i*k+i])
	}
	for i := 0; i < k; i++ {
		for j := 0; j <= i; j++ {
			s.SetSym(i, j, a[i*k+j]*sc[i]*sc[j])
		}
	}
	var ch mat.Cholesky
	if !ch.Factorize(s) {
		return nil, false
	}
	var inv mat.SymDense
	if err := ch.InverseTo(&inv); err != nil {
		return nil, false
	}
	out := make([][]float64, k)
	back := make([]float64, k*k)
	for i := range out {
		out[i] = back[i*k : (i+1)*k]
		for j := range out[i] {
			out[i][j] = inv.At(i, j) * sc[i] * sc[j]
		}
	}
	return out, true
}
