package fit

import (
	"math"

	"github.com/fickfit/fickfit/internal/dense"
)

// The normal equations of a profile fit are tiny (2–6 parameters), so the
// few dense operations needed are written out here: they allocate nothing
// beyond their result and beat a general library at this size.

// scaledCond returns the 2-norm condition number of the k×k symmetric
// matrix a after scaling it to unit diagonal (a correlation-like matrix), so
// that parameters of very different magnitude do not inflate it. A zero
// diagonal (a parameter the data do not touch) gives +Inf.
func scaledCond(a []float64, k int) float64 {
	var buf [36]float64
	s := buf[:0]
	if k*k > len(buf) {
		s = make([]float64, 0, k*k)
	}
	s = s[:k*k]
	for i := 0; i < k; i++ {
		if !(a[i*k+i] > 0) {
			return math.Inf(1)
		}
	}
	for i := 0; i < k; i++ {
		for j := 0; j < k; j++ {
			s[i*k+j] = a[i*k+j] / math.Sqrt(a[i*k+i]*a[j*k+j])
		}
	}
	jacobiEigen(s, k)
	lo, hi := math.Inf(1), 0.0
	for i := 0; i < k; i++ {
		v := s[i*k+i]
		lo = math.Min(lo, v)
		hi = math.Max(hi, math.Abs(v))
	}
	if !(lo > 0) {
		return math.Inf(1)
	}
	return hi / lo
}

// jacobiEigen diagonalises the symmetric k×k matrix s in place by cyclic
// Jacobi rotations; the eigenvalues are left on the diagonal (Golub & Van
// Loan, Matrix Computations, 4th ed., 2013, §8.5; from memory). Jacobi is
// accurate to high relative precision for the small eigenvalues of a
// well-scaled matrix, which is what a condition number needs.
func jacobiEigen(s []float64, k int) {
	for sweep := 0; sweep < 50; sweep++ {
		var off, diag float64
		for p := 0; p < k; p++ {
			diag += s[p*k+p] * s[p*k+p]
			for q := p + 1; q < k; q++ {
				off += s[p*k+q] * s[p*k+q]
			}
		}
		if off <= 1e-32*diag {
			return
		}
		for p := 0; p < k; p++ {
			for q := p + 1; q < k; q++ {
				apq := s[p*k+q]
				if apq == 0 {
					continue
				}
				theta := (s[q*k+q] - s[p*k+p]) / (2 * apq)
				t := math.Copysign(1, theta) / (math.Abs(theta) + math.Sqrt(theta*theta+1))
				c := 1 / math.Sqrt(t*t+1)
				sn := t * c
				for r := 0; r < k; r++ {
					arp, arq := s[r*k+p], s[r*k+q]
					s[r*k+p] = c*arp - sn*arq
					s[r*k+q] = sn*arp + c*arq
				}
				for r := 0; r < k; r++ {
					apr, aqr := s[p*k+r], s[q*k+r]
					s[p*k+r] = c*apr - sn*aqr
					s[q*k+r] = sn*apr + c*aqr
				}
			}
		}
	}
}

// invertSPD returns the inverse of the k×k symmetric positive definite
// matrix a (row-major) as a k×k slice of rows, or false when a is singular.
// It inverts the unit-diagonal scaled matrix by Cholesky and scales back,
// which keeps the inverse accurate when parameters differ by many orders
// of magnitude.
func invertSPD(a []float64, k int) ([][]float64, bool) { return invertSPDInto(a, k, nil) }

// invertSPDInto is invertSPD writing into the storage of an earlier
// inverse from it (old), when it is large enough.
func invertSPDInto(a []float64, k int, old [][]float64) ([][]float64, bool) {
	size := 2*k*k + 2*k
	var back []float64 // inverse, scaled copy, scales, unit vector; old[0] spans it
	if cap(old) > 0 {
		if row := old[:1][0]; cap(row) >= size {
			back = row[:size]
		}
	}
	if back == nil {
		back = make([]float64, size)
	}
	inv, s, sc, e := back[:k*k], back[k*k:2*k*k], back[2*k*k:2*k*k+k], back[2*k*k+k:]
	for i := 0; i < k; i++ {
		if !(a[i*k+i] > 0) {
			return nil, false
		}
		sc[i] = 1 / math.Sqrt(a[i*k+i])
	}
	for i := 0; i < k; i++ {
		for j := 0; j < k; j++ {
			s[i*k+j] = a[i*k+j] * sc[i] * sc[j]
		}
	}
	// Cholesky s = L Lᵀ; a pivot below 1e-15 of the unit diagonal means
	// the matrix is numerically singular.
	if !dense.Cholesky(s, k, 1e-15) {
		return nil, false
	}
	// Column c of the inverse solves L Lᵀ x = e_c.
	for c := 0; c < k; c++ {
		for i := range e {
			e[i] = 0
		}
		e[c] = 1
		dense.CholSubst(s, e, inv[c*k:(c+1)*k], k)
	}
	out := resize(old, k)
	for i := range out {
		out[i] = inv[i*k : (i+1)*k]
		for j := range out[i] {
			out[i][j] *= sc[i] * sc[j]
		}
	}
	return out, true
}
