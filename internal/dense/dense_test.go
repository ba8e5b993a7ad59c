package dense

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// TestCholeskyAgainstGonum: external check against gonum's mat.Cholesky
// and mat.Dense.Solve (general reference library) on seeded random
// symmetric positive definite matrices of the sizes a profile fit meets.
func TestCholeskyAgainstGonum(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 11))
	for k := 1; k <= 8; k++ {
		// A = BᵀB + k·I is symmetric positive definite.
		b := make([]float64, k*k)
		for i := range b {
			b[i] = rng.NormFloat64()
		}
		a := make([]float64, k*k)
		for i := 0; i < k; i++ {
			for j := 0; j < k; j++ {
				for m := 0; m < k; m++ {
					a[i*k+j] += b[m*k+i] * b[m*k+j]
				}
			}
			a[i*k+i] += float64(k)
		}
		rhs := make([]float64, k)
		for i := range rhs {
			rhs[i] = rng.NormFloat64()
		}
		var ch mat.Cholesky
		if !ch.Factorize(mat.NewSymDense(k, append([]float64(nil), a...))) {
			t.Fatalf("k=%d: gonum refuses the matrix", k)
		}
		var want mat.VecDense
		if err := ch.SolveVecTo(&want, mat.NewVecDense(k, append([]float64(nil), rhs...))); err != nil {
			t.Fatal(err)
		}
		l := append([]float64(nil), a...)
		if !Cholesky(l, k, 0) {
			t.Fatalf("k=%d: Cholesky refused a positive definite matrix", k)
		}
		x := make([]float64, k)
		CholSubst(l, rhs, x, k)
		for i := range x {
			if d := math.Abs(x[i] - want.AtVec(i)); d > 1e-12*math.Max(1, math.Abs(want.AtVec(i))) {
				t.Errorf("k=%d: x[%d] = %.15g, gonum %.15g", k, i, x[i], want.AtVec(i))
			}
		}
	}
	// Not positive definite: a pivot at or below minPivot is refused.
	if Cholesky([]float64{1, 2, 2, 1}, 2, 0) {
		t.Error("an indefinite matrix was factored")
	}
	if Cholesky([]float64{1e-20}, 1, 1e-15) {
		t.Error("a pivot below minPivot was accepted")
	}
}
