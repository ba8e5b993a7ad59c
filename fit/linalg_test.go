package fit

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// TestSmallLinearAlgebraAgainstGonum checks the hand-written inverse and
// condition number against gonum's LAPACK-based Cholesky and symmetric
// eigen-decomposition (a general reference library) on seeded random
// symmetric positive definite matrices of sizes 1–6 with condition numbers
// up to about 1e8.
func TestSmallLinearAlgebraAgainstGonum(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	for trial := 0; trial < 300; trial++ {
		k := 1 + trial%6
		// A = Bᵀ B + δI with scaled columns: parameters of different sizes.
		b := mat.NewDense(k+2, k, nil)
		for i := 0; i < k+2; i++ {
			for j := 0; j < k; j++ {
				b.Set(i, j, rng.NormFloat64()*math.Pow(10, float64(j%3)*3))
			}
		}
		var ad mat.Dense
		ad.Mul(b.T(), b)
		a := make([]float64, k*k)
		sym := mat.NewSymDense(k, nil)
		for i := 0; i < k; i++ {
			for j := 0; j < k; j++ {
				a[i*k+j] = ad.At(i, j)
				if j <= i {
					sym.SetSym(i, j, ad.At(i, j))
				}
			}
		}
		inv, ok := invertSPD(a, k)
		var ch mat.Cholesky
		if !ch.Factorize(sym) {
			continue
		}
		var ref mat.SymDense
		if err := ch.InverseTo(&ref); err != nil {
			t.Fatal(err)
		}
		if !ok {
			t.Fatalf("trial %d: invertSPD refused an SPD matrix", trial)
		}
		for i := 0; i < k; i++ {
			for j := 0; j < k; j++ {
				want := ref.At(i, j)
				scale := math.Sqrt(ref.At(i, i) * ref.At(j, j))
				if math.Abs(inv[i][j]-want) > 1e-8*scale {
					t.Fatalf("trial %d: inverse[%d][%d] = %g, gonum %g", trial, i, j, inv[i][j], want)
				}
			}
		}
		// Condition number of the unit-diagonal scaled matrix.
		sc := mat.NewSymDense(k, nil)
		for i := 0; i < k; i++ {
			for j := 0; j <= i; j++ {
				sc.SetSym(i, j, a[i*k+j]/math.Sqrt(a[i*k+i]*a[j*k+j]))
			}
		}
		var eig mat.EigenSym
		if !eig.Factorize(sc, false) {
			t.Fatal("gonum eigen failed")
		}
		ev := eig.Values(nil)
		want := ev[len(ev)-1] / ev[0]
		if got := scaledCond(a, k); math.Abs(got/want-1) > 1e-6 {
			t.Fatalf("trial %d: cond %g, gonum %g", trial, got, want)
		}
	}
	// A singular matrix is refused.
	if _, ok := invertSPD([]float64{1, 1, 1, 1}, 2); ok {
		t.Error("singular matrix inverted")
	}
	if c := scaledCond([]float64{1, 1, 1, 1}, 2); c < 1e12 {
		t.Errorf("singular matrix has condition number %g", c)
	}
}
