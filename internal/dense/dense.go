// Package dense holds the small dense linear algebra that fickfit's
// least-squares solvers share: the Cholesky factorisation of a k×k
// symmetric positive definite matrix and the substitution with its factor,
// on row-major slices, allocating nothing. The normal equations of a
// profile fit are 2–8 parameters across, where gonum's mat costs more in
// allocations than in arithmetic.
package dense

import "math"

// Cholesky overwrites the lower triangle of the k×k symmetric matrix a
// (row-major) with its Cholesky factor L, a = L Lᵀ. It reports false when a
// pivot falls to minPivot or below: the matrix is not (numerically)
// positive definite.
func Cholesky(a []float64, k int, minPivot float64) bool {
	for j := 0; j < k; j++ {
		s := a[j*k+j]
		for m := 0; m < j; m++ {
			s -= a[j*k+m] * a[j*k+m]
		}
		if !(s > minPivot) {
			return false
		}
		d := math.Sqrt(s)
		a[j*k+j] = d
		for i := j + 1; i < k; i++ {
			t := a[i*k+j]
			for m := 0; m < j; m++ {
				t -= a[i*k+m] * a[j*k+m]
			}
			a[i*k+j] = t / d
		}
	}
	return true
}

// CholSubst solves L Lᵀ x = b given the factor L in the lower triangle of l.
func CholSubst(l, b, x []float64, k int) {
	for i := 0; i < k; i++ {
		t := b[i]
		for m := 0; m < i; m++ {
			t -= l[i*k+m] * x[m]
		}
		x[i] = t / l[i*k+i]
	}
	for i := k - 1; i >= 0; i-- {
		t := x[i]
		for m := i + 1; m < k; m++ {
			t -= l[m*k+i] * x[m]
		}
		x[i] = t / l[i*k+i]
	}
}
