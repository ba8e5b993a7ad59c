package fit

import (
	"math"
	"math/bits"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"
)

// runsCritical returns the two-sided 5 % critical numbers of runs from
// runsPMF: the largest r with P(R ≤ r) ≤ 0.025 and the smallest r with
// P(R ≥ r) ≤ 0.025 (0 when no such r exists).
func runsCritical(n1, n2 int) (lower, upper int) {
	var cum float64
	for r := 2; r <= n1+n2; r++ {
		cum += runsPMF(r, n1, n2)
		if cum <= 0.025 {
			lower = r
		}
	}
	cum = 0
	for r := n1 + n2; r >= 2; r-- {
		cum += runsPMF(r, n1, n2)
		if cum <= 0.025 {
			upper = r
		}
	}
	return lower, upper
}

// TestRunsCriticalValues checks the runs distribution against the published
// critical values for equal numbers of signs.
//
// Source: F. S. Swed and C. Eisenhart, "Tables for testing randomness of
// grouping in a sequence of alternatives", Ann. Math. Statist. 14, 66–87
// (1943), as reproduced in the usual two-sided α = 0.05 tables of the runs
// test (reject if R ≤ lower or R ≥ upper). Values from memory.
func TestRunsCriticalValues(t *testing.T) {
	for _, tc := range []struct{ n, lower, upper int }{
		{5, 2, 10},
		{6, 3, 11},
		{7, 3, 13},
		{8, 4, 14},
		{9, 5, 15},
		{10, 6, 16},
		{11, 7, 17},
		{12, 7, 19},
		{13, 8, 20},
		{14, 9, 21},
		{15, 10, 22},
		{16, 11, 23},
		{17, 11, 25},
		{18, 12, 26},
		{19, 13, 27},
		{20, 14, 28},
	} {
		lo, hi := runsCritical(tc.n, tc.n)
		if lo != tc.lower || hi != tc.upper {
			t.Errorf("n1 = n2 = %d: critical runs %d and %d, table %d and %d", tc.n, lo, hi, tc.lower, tc.upper)
		}
	}
}

// TestRunsPMFEnumeration compares runsPMF with a brute-force count of the
// runs in every arrangement of n1 plus and n2 minus signs. Common practice,
// no source (an exact enumeration, independent of the closed form).
func TestRunsPMFEnumeration(t *testing.T) {
	for n1 := 1; n1 <= 9; n1++ {
		for n2 := 1; n2 <= 9; n2++ {
			n := n1 + n2
			count := make([]float64, n+2)
			var total float64
			for mask := uint32(0); mask < 1<<n; mask++ {
				if bits.OnesCount32(mask) != n1 {
					continue
				}
				runs := 1
				for i := 1; i < n; i++ {
					if (mask>>i)&1 != (mask>>(i-1))&1 {
						runs++
					}
				}
				count[runs]++
				total++
			}
			var sum float64
			for r := 2; r <= n; r++ {
				want := count[r] / total
				got := runsPMF(r, n1, n2)
				sum += got
				if math.Abs(got-want) > 1e-12 {
					t.Errorf("P(R=%d | %d, %d) = %.15g, enumeration %.15g", r, n1, n2, got, want)
				}
			}
			if math.Abs(sum-1) > 1e-12 {
				t.Errorf("runsPMF(·, %d, %d) sums to %.15g", n1, n2, sum)
			}
		}
	}
}

// runsMoments are the exact mean and variance of the number of runs
// (Wald & Wolfowitz, Ann. Math. Statist. 11, 147–162, 1940; formulas from
// memory, common in every statistics text):
// E R = 2n1n2/N + 1, Var R = 2n1n2(2n1n2 − N)/(N²(N − 1)), N = n1 + n2.
func runsMoments(n1, n2 int) (mean, variance float64) {
	a, b := float64(n1), float64(n2)
	N := a + b
	mean = 2*a*b/N + 1
	variance = 2 * a * b * (2*a*b - N) / (N * N * (N - 1))
	return mean, variance
}

// TestRunsLargeSampleNormal checks the exact distribution against its
// exact moments and the normal approximation with continuity correction
// for large counts (common practice, no source): the approximation error
// shrinks like 1/√N, so the bar is loose for N = 60 and tight for N = 400.
func TestRunsLargeSampleNormal(t *testing.T) {
	for _, tc := range []struct {
		n1, n2 int
		tol    float64 // largest |exact − normal| of the two-sided p-value
	}{
		{30, 30, 0.02},
		{25, 45, 0.02},
		{200, 200, 0.005},
		{150, 250, 0.005},
	} {
		mean, variance := runsMoments(tc.n1, tc.n2)
		var m1, m2 float64
		for r := 2; r <= tc.n1+tc.n2; r++ {
			p := runsPMF(r, tc.n1, tc.n2)
			m1 += float64(r) * p
			m2 += float64(r*r) * p
		}
		if math.Abs(m1-mean) > 1e-9*mean {
			t.Errorf("%d/%d: mean of the exact distribution %.12g, formula %.12g", tc.n1, tc.n2, m1, mean)
		}
		if v := m2 - m1*m1; math.Abs(v-variance) > 1e-7*variance {
			t.Errorf("%d/%d: variance of the exact distribution %.12g, formula %.12g", tc.n1, tc.n2, v, variance)
		}
		sd := math.Sqrt(variance)
		var worst float64
		for dz := -3.0; dz <= 3.0; dz += 0.25 {
			runs := int(math.Round(mean + dz*sd))
			signs := alternatingSigns(tc.n1, tc.n2, runs)
			if signs == nil {
				continue
			}
			x := make([]float64, len(signs))
			for i := range x {
				x[i] = float64(i)
			}
			exact := runsTest(x, signs)
			z := (math.Abs(float64(runs)-mean) - 0.5) / sd
			if z < 0 {
				z = 0
			}
			normal := math.Min(1, 2*distuv.UnitNormal.Survival(z))
			worst = math.Max(worst, math.Abs(exact-normal))
		}
		if worst > tc.tol {
			t.Errorf("%d/%d: exact and normal p-values differ by up to %.4f (bar %.3f)", tc.n1, tc.n2, worst, tc.tol)
		}
	}
}

// alternatingSigns builds a sequence of n1 positive and n2 negative values
// with exactly the given number of runs, or nil when that is impossible.
func alternatingSigns(n1, n2, runs int) []float64 {
	if runs < 2 || runs > n1+n2 {
		return nil
	}
	// Runs alternate starting with +: ⌈runs/2⌉ plus-runs, ⌊runs/2⌋ minus-runs.
	np, nm := (runs+1)/2, runs/2
	if np > n1 || nm > n2 || nm == 0 {
		return nil
	}
	out := make([]float64, 0, n1+n2)
	for i := 0; i < runs; i++ {
		if i%2 == 0 {
			size := 1
			if i == 0 {
				size = n1 - (np - 1)
			}
			for j := 0; j < size; j++ {
				out = append(out, 1)
			}
		} else {
			size := 1
			if i == 1 {
				size = n2 - (nm - 1)
			}
			for j := 0; j < size; j++ {
				out = append(out, -1)
			}
		}
	}
	return out
}

// TestRunsTestSequences checks runsTest on hand-made sign sequences whose
// p-values follow from the definition (common practice, no source).
func TestRunsTestSequences(t *testing.T) {
	seq := func(s string) (x, r []float64) {
		for i, c := range s {
			x = append(x, float64(i))
			switch c {
			case '+':
				r = append(r, 0.3)
			case '-':
				r = append(r, -0.2)
			default:
				r = append(r, 0)
			}
		}
		return x, r
	}
	// Two runs of ten: P(R = 2) = 2/C(20,10); two-sided p doubles it.
	x, r := seq("++++++++++----------")
	want := 2 * 2 / math.Exp(lchoose(20, 10))
	if p := runsTest(x, r); math.Abs(p-want) > 1e-15 {
		t.Errorf("two blocks: p = %g, want %g", p, want)
	}
	// Perfect alternation of 10 and 10: R = 20, P(R = 20) = 2/C(20,10).
	x, r = seq("+-+-+-+-+-+-+-+-+-+-")
	if p := runsTest(x, r); math.Abs(p-want) > 1e-15 {
		t.Errorf("alternation: p = %g, want %g", p, want)
	}
	// Zeros are dropped: the same alternation with zeros interleaved.
	x, r = seq("+0-+-+-+-+-+-+-+-+-+0-")
	if p := runsTest(x, r); math.Abs(p-want) > 1e-15 {
		t.Errorf("alternation with zeros: p = %g, want %g", p, want)
	}
	// Too few of one sign: no test.
	x, r = seq("+++++++-++++")
	if p := runsTest(x, r); !math.IsNaN(p) {
		t.Errorf("one minus sign: p = %g, want NaN", p)
	}
	// Depth order, not file order: reversing the file order of a sequence
	// whose depths are also reversed changes nothing.
	x, r = seq("++-+--+++-+--+-++--+")
	p1 := runsTest(x, r)
	xr, rr := make([]float64, len(x)), make([]float64, len(r))
	for i := range x {
		xr[len(x)-1-i], rr[len(r)-1-i] = x[i], r[i]
	}
	if p2 := runsTest(xr, rr); p1 != p2 {
		t.Errorf("depth-reversed file: p = %g, in order %g", p2, p1)
	}
	// Shuffled file order with depths carried along.
	perm := []int{5, 0, 19, 3, 12, 7, 1, 18, 2, 9, 4, 15, 6, 11, 8, 14, 10, 17, 13, 16}
	xs, rs := make([]float64, len(x)), make([]float64, len(r))
	for i, j := range perm {
		xs[i], rs[i] = x[j], r[j]
	}
	if p3 := runsTest(xs, rs); p1 != p3 {
		t.Errorf("shuffled file: p = %g, in order %g", p3, p1)
	}
}

// TestRunsNullCached: the cached null distribution of a pair is the one
// runsDist computes, to the bit, on first and later use, inside and beyond
// the cached range (self-check).
func TestRunsNullCached(t *testing.T) {
	for _, c := range [][2]int{{2, 2}, {25, 25}, {24, 26}, {127, 3}, {128, 5}, {200, 190}} {
		want := runsDist(c[0], c[1])
		for k := 0; k < 2; k++ {
			got := runsNull(c[0], c[1])
			if len(got) != len(want) {
				t.Fatalf("(%d, %d): %d entries, want %d", c[0], c[1], len(got), len(want))
			}
			for r := range want {
				if math.Float64bits(got[r]) != math.Float64bits(want[r]) {
					t.Fatalf("(%d, %d) use %d: P(R = %d) = %v, want %v", c[0], c[1], k+1, r, got[r], want[r])
				}
			}
		}
	}
}

// BenchmarkRunsTest50 is the runs test on the residuals of a 50-point fit.
func BenchmarkRunsTest50(b *testing.B) {
	rng := rand.New(rand.NewPCG(3, 3))
	x, r := make([]float64, 50), make([]float64, 50)
	for i := range x {
		x[i], r[i] = float64(i), rng.NormFloat64()
	}
	b.ReportAllocs()
	for b.Loop() {
		if p := runsTest(x, r); !(p >= 0 && p <= 1) {
			b.Fatal(p)
		}
	}
}
