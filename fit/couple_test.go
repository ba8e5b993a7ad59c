package fit

import (
	"math"
	"testing"
)

// Interdiffusion scale (invented for the test, not a check value):
// D = 5e-15 m²/s, t = 100 h, √(Dt) ≈ 42 µm, interface at −12 µm.
const (
	cpD = 5e-15
	cpT = 100 * 3600.0
)

func cpParams(cl, cr, xm float64) []float64 { return []float64{math.Log(cpD), cl, cr, xm} }

func positions(n int, lo, hi float64) []float64 {
	x := make([]float64, n)
	for i := range x {
		x[i] = lo + (hi-lo)*float64(i)/float64(n-1)
	}
	return x
}

func TestCoupleJacobian(t *testing.T) {
	d := Data{X: positions(31, -300e-6, 300e-6), Time: cpT}
	checkJacobian(t, Couple{}, cpParams(12, 1.5, -12e-6), d, []float64{1e-5, 1e-6, 1e-6, 1e-9})
	checkJacobian(t, Couple{}, cpParams(0, 30, 40e-6), d, []float64{1e-5, 1e-6, 1e-6, 1e-9})
}

// TestCoupleSymmetry: the couple solution is antisymmetric about the
// interface, C(xm + s) − C̄ = −(C(xm − s) − C̄), C̄ = (CL + CR)/2, takes
// C̄ at xm and the end levels far away, and solves Fick's law (analytic
// identities; Crank 1975 §2.4, from memory).
func TestCoupleSymmetry(t *testing.T) {
	cl, cr, xm := 12.0, 1.5, -12e-6
	p := cpParams(cl, cr, xm)
	d := Data{Time: cpT}
	mid := (cl + cr) / 2
	for _, s := range []float64{0, 1e-6, 20e-6, 80e-6, 250e-6} {
		c := modelAt(Couple{}, p, d, []float64{xm + s, xm - s})
		if diff := (c[0] - mid) + (c[1] - mid); math.Abs(diff) > 1e-13*math.Abs(cr-cl) {
			t.Errorf("s = %g: C(xm+s) − C̄ = %.15g, C(xm−s) − C̄ = %.15g: not antisymmetric", s, c[0]-mid, c[1]-mid)
		}
	}
	far := modelAt(Couple{}, p, d, []float64{-5e-3, 5e-3})
	if math.Abs(far[0]-cl) > 1e-12 || math.Abs(far[1]-cr) > 1e-12 {
		t.Errorf("far-field levels %v, want CL = %g, CR = %g", far, cl, cr)
	}
	checkFick(t, Couple{}, p, d, cpD, []float64{-100e-6, -20e-6, 0, 60e-6}, cr-cl)
}

// TestCoupleRecovery: self-check by simulation (seeded synthetic data
// through Start and Solve), with the interface off the origin and with an
// all-positive position axis (a microprobe scan from 0 to 600 µm).
func TestCoupleRecovery(t *testing.T) {
	for i, tc := range []struct {
		cl, cr, xm, lo, hi float64
	}{
		{12, 1.5, -12e-6, -250e-6, 250e-6},
		{0.5, 25, 310e-6, 0, 600e-6},
	} {
		ptrue := cpParams(tc.cl, tc.cr, tc.xm)
		d := synthData(Couple{}, ptrue, Data{X: positions(45, tc.lo, tc.hi), Time: cpT}, 0.003*math.Abs(tc.cr-tc.cl), uint64(20+i))
		recoverBySolve(t, Couple{}, d, ptrue, nil)
	}
}

func BenchmarkCoupleEval(b *testing.B) {
	benchEval(b, Couple{}, cpParams(12, 1.5, -12e-6), Data{X: positions(50, -300e-6, 300e-6), Time: cpT})
}
