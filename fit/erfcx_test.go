package fit

import (
	"fmt"
	"math"
	"testing"
)

// erfcxRef is exp(x²)·erfc(x) from the standard library's Erfc (an
// independent implementation, Go's port of FreeBSD's msun erf.c), with
// exp(x²) taken from the exact split of x² so that the reference itself is
// good to a few ulp wherever erfc(x) does not underflow (x ≤ 26).
func erfcxRef(x float64) float64 {
	hi := x * x
	lo := math.FMA(x, x, -hi)
	return math.Exp(hi) * math.Exp(lo) * math.Erfc(x)
}

// erfcxContinuedFraction evaluates Laplace's continued fraction for erfc
// (Abramowitz & Stegun 1964, eq. 7.1.14, from memory):
// √π·erfcx(x) = 1/(x+ (1/2)/(x+ 1/(x+ (3/2)/(x+ 2/(x+ …))))), x > 0,
// by the modified Lentz algorithm. It is slow near 0 but exact in the limit,
// and shares no code with Erfcx: an independent check for large x.
func erfcxContinuedFraction(x float64) float64 {
	const tiny = 1e-300
	f, c, d := x, x, 0.0
	for k := 1; k < 100000; k++ {
		an := float64(k) / 2
		d = x + an*d
		if d == 0 {
			d = tiny
		}
		c = x + an/c
		if c == 0 {
			c = tiny
		}
		d = 1 / d
		del := c * d
		f *= del
		if math.Abs(del-1) < 1e-16 {
			break
		}
	}
	return 1 / (math.SqrtPi * f)
}

func relErr(got, want float64) float64 {
	if got == want {
		return 0
	}
	return math.Abs(got-want) / math.Abs(want)
}

// TestErfcxAgainstErfc compares with math.Erfc·exp(x²) on a dense grid over
// the whole range where both factors are representable, −26 ≤ x ≤ 26.
// Source: Go standard library math.Erfc (independent implementation).
func TestErfcxAgainstErfc(t *testing.T) {
	worst, at := 0.0, 0.0
	for i := -26000; i <= 26000; i += 7 {
		x := float64(i) / 1000
		e := relErr(Erfcx(x), erfcxRef(x))
		if e > worst {
			worst, at = e, x
		}
	}
	if worst > 2e-14 {
		t.Errorf("largest relative error against exp(x²)·math.Erfc(x): %.3g at x = %g, want ≤ 2e-14", worst, at)
	}
	t.Logf("largest relative error on [−26, 26]: %.3g at x = %g", worst, at)
}

// TestErfcxTable checks exp(x²)·(1 − erf x) with erf x from Abramowitz &
// Stegun, Handbook of Mathematical Functions (1964), Table 7.1, ten decimals
// (values from memory). The table's rounding, ±5e-11 in erf, sets the
// tolerance: exp(x²)·5e-11 absolute.
func TestErfcxTable(t *testing.T) {
	table := []struct{ x, erf float64 }{
		{0.1, 0.1124629160}, {0.2, 0.2227025892}, {0.3, 0.3286267595},
		{0.4, 0.4283923550}, {0.5, 0.5204998778}, {0.6, 0.6038560908},
		{0.7, 0.6778011938}, {0.8, 0.7421009647}, {0.9, 0.7969082124},
		{1.0, 0.8427007929}, {1.2, 0.9103139782}, {1.4, 0.9522851198},
		{1.5, 0.9661051465}, {1.6, 0.9763483833}, {1.8, 0.9890905016},
		{2.0, 0.9953222650},
	}
	for _, c := range table {
		e2 := math.Exp(c.x * c.x)
		want := e2 * (1 - c.erf)
		tol := e2 * 5.1e-11
		if got := Erfcx(c.x); math.Abs(got-want) > tol {
			t.Errorf("Erfcx(%g) = %.12g, table gives %.12g (±%.1g)", c.x, got, want, tol)
		}
		// Negative argument: erfc(−x) = 1 + erf x.
		want = e2 * (1 + c.erf)
		if got := Erfcx(-c.x); math.Abs(got-want) > tol {
			t.Errorf("Erfcx(%g) = %.12g, table gives %.12g (±%.1g)", -c.x, got, want, tol)
		}
	}
	// erfcx(0) = erfc(0) = 1 exactly (definition).
	if got := Erfcx(0); relErr(got, 1) > 1e-15 {
		t.Errorf("Erfcx(0) = %.17g, want 1", got)
	}
}

// TestErfcxLargeX checks the region where erfc underflows against the
// continued fraction A&S 7.1.14 and the leading asymptote 1/(x√π) of
// A&S 7.1.23 (both from memory).
func TestErfcxLargeX(t *testing.T) {
	for _, x := range []float64{20, 26, 30, 45, 49.999, 50, 50.001, 60, 100, 1e3, 1e5, 1e8, 1e15, 1e150, 1e300} {
		got := Erfcx(x)
		if x < 1e8 {
			if e := relErr(got, erfcxContinuedFraction(x)); e > 2e-15 {
				t.Errorf("Erfcx(%g) = %.17g, continued fraction %.17g, relative error %.2g", x, got, erfcxContinuedFraction(x), e)
			}
		}
		// erfcx(x)·x√π = 1 − 1/(2x²) + O(x⁻⁴).
		lead := 1 / (x * math.SqrtPi)
		want := lead * (1 - 1/(2*x*x))
		if e := relErr(got, want); e > 3/(4*x*x*x*x)+1e-15 {
			t.Errorf("Erfcx(%g) = %.17g, asymptote %.17g, relative error %.2g", x, got, want, e)
		}
	}
}

// TestErfcxBranchContinuity checks that the value does not jump at the
// branch points (0: reflection; 50: Weideman → asymptotic series). Both
// sides must agree to a few ulp of the local change (common practice, no
// source).
func TestErfcxBranchContinuity(t *testing.T) {
	for _, b := range []float64{0, erfcxAsymptoticFrom} {
		lo := Erfcx(math.Nextafter(b, math.Inf(-1)))
		hi := Erfcx(math.Nextafter(b, math.Inf(1)))
		at := Erfcx(b)
		// The true function changes by |erfcx'(b)|·2ulp ≈ 1e-16 relative here.
		if relErr(lo, hi) > 4e-15 || relErr(lo, at) > 4e-15 {
			t.Errorf("jump at %g: %.17g | %.17g | %.17g", b, lo, at, hi)
		}
	}
}

func TestErfcxSpecial(t *testing.T) {
	if v := Erfcx(math.NaN()); !math.IsNaN(v) {
		t.Errorf("Erfcx(NaN) = %g", v)
	}
	if v := Erfcx(math.Inf(1)); v != 0 {
		t.Errorf("Erfcx(+Inf) = %g, want 0", v)
	}
	if v := Erfcx(math.Inf(-1)); !math.IsInf(v, 1) {
		t.Errorf("Erfcx(−Inf) = %g, want +Inf", v)
	}
	if v := Erfcx(-27); !math.IsInf(v, 1) {
		t.Errorf("Erfcx(−27) = %g, want +Inf (exp(729) overflows)", v)
	}
	// Near the overflow edge the reflection must still be finite and right.
	if v, w := Erfcx(-26.6), erfcxRef(-26.6); relErr(v, w) > 1e-13 {
		t.Errorf("Erfcx(−26.6) = %g, want %g", v, w)
	}
	// Monotone decreasing (erfcx' = 2x·erfcx − 2/√π < 0 everywhere):
	// analytic property, common practice.
	prev := math.Inf(1)
	for i := -5000; i <= 100000; i++ {
		x := float64(i) / 1000
		v := Erfcx(x)
		if !(v <= prev) {
			t.Fatalf("Erfcx not decreasing at %g: %.17g after %.17g", x, v, prev)
		}
		prev = v
	}
}

func ExampleErfcx() {
	// erfc(30) ≈ 2.6e-393 underflows, but exp(900)·erfc(30) is an ordinary number.
	fmt.Printf("%.10f\n", Erfcx(30))
	fmt.Printf("%.10f\n", math.Exp(0.25)*math.Erfc(0.5))
	fmt.Printf("%.10f\n", Erfcx(0.5))
	// Output:
	// 0.0187958889
	// 0.6156903442
	// 0.6156903442
}

func BenchmarkErfcx(b *testing.B) {
	xs := []float64{-3, -0.5, 0.1, 0.7, 2, 5, 20, 80}
	b.ReportAllocs()
	var s float64
	for i := 0; i < b.N; i++ {
		s += Erfcx(xs[i&7])
	}
	_ = s
}
