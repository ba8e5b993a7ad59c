package fit

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"github.com/fickfit/fickfit/profile"
)

// Coverage self-checks by simulation (not external checks): seeded Monte
// Carlo profiles with known truth, fitted as a user would, counting how often
// the 95 % interval for D contains the true D. The synthetic profiles are
// self-check data, not check values; the bar is the nominal 95 %.

// coverageCase is one synthetic erf profile with its truth.
type coverageCase struct {
	p     *profile.Profile
	trueD float64
	cs    float64
	c0    float64
}

// newCoverageCase draws a realistic constant-surface profile: 20–60 points,
// D log-uniform in 1e-13…1e-10 m²/s, hold 0.5–20 h (log-uniform), in- or
// out-diffusion with levels typical of carburizing / decarburization (wt%),
// Gaussian noise 1–4 % of |Cs − C0|, depths from the first step (0–10 % of
// 2√(Dt)) to kmin–kmax diffusion lengths 2√(Dt), evenly spaced with ±20 %
// jitter of the step (a hand-held traverse).
func newCoverageCase(rng *rand.Rand, kmin, kmax float64) coverageCase {
	n := 20 + rng.IntN(41)
	D := math.Pow(10, -13+3*rng.Float64())
	tm := 3600 * math.Pow(10, math.Log10(0.5)+math.Log10(40)*rng.Float64())
	var cs, c0 float64
	if rng.IntN(3) > 0 {
		cs, c0 = 0.6+0.6*rng.Float64(), 0.05+0.25*rng.Float64() // carburizing
	} else {
		cs, c0 = 0.02+0.1*rng.Float64(), 0.4+0.5*rng.Float64() // decarburization
	}
	noise := (0.01 + 0.03*rng.Float64()) * math.Abs(cs-c0)
	L := 2 * math.Sqrt(D*tm)
	x0 := 0.1 * L * rng.Float64()
	x1 := (kmin + (kmax-kmin)*rng.Float64()) * L
	step := (x1 - x0) / float64(n-1)
	p := &profile.Profile{ID: "coverage", Time: tm, Temperature: 1200, ValueUnit: "wt%"}
	for i := 0; i < n; i++ {
		x := x0 + step*float64(i)
		if i > 0 {
			x += 0.2 * step * (2*rng.Float64() - 1)
		}
		v := cs + (c0-cs)*math.Erf(x/L) + noise*rng.NormFloat64()
		p.Depth = append(p.Depth, x)
		p.Value = append(p.Value, v)
	}
	return coverageCase{p: p, trueD: D, cs: cs, c0: c0}
}

// covers reports whether the interval contains v; an open end (NaN) counts
// as unbounded on that side.
func covers(iv Interval, v float64) bool {
	lo, hi := iv.Lo, iv.Hi
	if math.IsNaN(lo) {
		lo = math.Inf(-1)
	}
	if math.IsNaN(hi) {
		hi = math.Inf(1)
	}
	return lo <= v && v <= hi
}

// tally counts the replicates whose interval covers the truth.
type tally struct{ n, hit, open, failed int }

func (c *tally) add(iv Interval, truth float64) {
	c.n++
	if covers(iv, truth) {
		c.hit++
	}
	if iv.Open() {
		c.open++
	}
}

func (c tally) rate() float64 { return float64(c.hit) / float64(c.n) }

func (c tally) String() string {
	return fmt.Sprintf("%.1f %% (%d/%d, %d open, %d failed fits)", 100*c.rate(), c.hit, c.n, c.open, c.failed)
}

// TestCoverageProfileWald: self-check by simulation. 1000 replicates per
// regime (400 with -short); the 95 % profile and Wald intervals for D must
// each cover the truth in 92–98 % of them. With 400 replicates the binomial
// standard deviation of a true 95 % coverage is 1.1 points, so the band is
// ±2.7 sd; with 1000 it is ±4.3 sd. Fits that fail are counted and limited
// to 1 %. Regimes: "plateau" profiles measured to 1.8–3.5 diffusion lengths
// 2√(Dt); "shallow" ones to only 0.8–1.3, where C0 is never reached and
// some profile intervals are open (an open side counts as unbounded). The
// 80 % profile interval must cover in 76–84 % (binomial sd 1.3 points at
// 1000, 2.0 at 400), so the test sees the level, not just "wide enough".
func TestCoverageProfileWald(t *testing.T) {
	reps := 1000
	if testing.Short() {
		reps = 400
	}
	for _, regime := range []struct {
		name       string
		kmin, kmax float64
		seed       uint64
	}{
		{"plateau", 1.8, 3.5, 95},
		{"shallow", 0.8, 1.3, 96},
	} {
		t.Run(regime.name, func(t *testing.T) {
			rng := rand.New(rand.NewPCG(2024, regime.seed))
			var prof, wald, prof80 tally
			var profCs, profC0, waldCs tally
			for i := 0; i < reps; i++ {
				c := newCoverageCase(rng, regime.kmin, regime.kmax)
				rp, err := Fit(c.p, Options{CI: "profile"})
				if err != nil {
					prof.failed++
					t.Logf("replicate %d (profile): %v", i, err)
				} else {
					prof.add(rp.Param("D").CI, c.trueD)
					profCs.add(rp.Param("Cs").CI, c.cs)
					profC0.add(rp.Param("C0").CI, c.c0)
				}
				rw, err := Fit(c.p, Options{CI: "wald"})
				if err != nil {
					wald.failed++
					t.Logf("replicate %d (wald): %v", i, err)
				} else {
					wald.add(rw.Param("D").CI, c.trueD)
					waldCs.add(rw.Param("Cs").CI, c.cs)
				}
				r8, err := Fit(c.p, Options{CI: "profile", Level: 0.80})
				if err != nil {
					prof80.failed++
				} else {
					prof80.add(r8.Param("D").CI, c.trueD)
				}
			}
			t.Logf("95 %% profile coverage of D:  %v", prof)
			t.Logf("95 %% Wald coverage of D:     %v", wald)
			t.Logf("80 %% profile coverage of D:  %v", prof80)
			t.Logf("95 %% profile coverage of Cs: %v, of C0: %v; Wald Cs: %v", profCs, profC0, waldCs)
			for _, c := range []struct {
				name   string
				t      tally
				lo, hi float64
			}{{"95 % profile", prof, 0.92, 0.98}, {"95 % Wald", wald, 0.92, 0.98}, {"80 % profile", prof80, 0.76, 0.84}} {
				if r := c.t.rate(); !(r >= c.lo && r <= c.hi) {
					t.Errorf("%s coverage of D %v: outside %.0f–%.0f %%", c.name, c.t, 100*c.lo, 100*c.hi)
				}
				if c.t.failed > reps/100 {
					t.Errorf("%s: %d of %d fits failed (over 1 %%)", c.name, c.t.failed, reps)
				}
			}
		})
	}
}

// TestCoverageBootstrap: self-check by simulation of the default bootstrap
// (residual resampling, BCa) and of the percentile variant, 200 replicates ×
// 500 resamples (60 with -short). The bar is looser than for the profile and
// Wald intervals, 88–99 %: with 200 replicates the binomial sd is 1.5
// points, and bootstrap intervals from 20–60 residuals are known to run a
// little narrow (Efron & Tibshirani, An Introduction to the Bootstrap, 1993,
// ch. 14, discuss the coverage error of percentile and BCa intervals; the
// bar itself is common practice, no source).
func TestCoverageBootstrap(t *testing.T) {
	reps := 200
	if testing.Short() {
		reps = 60
	}
	rng := rand.New(rand.NewPCG(2024, 500))
	var bca, pct tally
	for i := 0; i < reps; i++ {
		c := newCoverageCase(rng, 1.8, 3.5)
		for _, v := range []struct {
			percentile bool
			t          *tally
		}{{false, &bca}, {true, &pct}} {
			r, err := Fit(c.p, Options{CI: "bootstrap", Bootstrap: BootstrapOptions{
				Resamples: 500, Seed: uint64(i) + 1, Percentile: v.percentile}})
			if err != nil {
				v.t.failed++
				t.Logf("replicate %d: %v", i, err)
				continue
			}
			v.t.add(r.Param("D").CI, c.trueD)
		}
	}
	t.Logf("95 %% bootstrap BCa coverage of D:        %v", bca)
	t.Logf("95 %% bootstrap percentile coverage of D: %v", pct)
	for _, c := range []struct {
		name string
		t    tally
	}{{"BCa", bca}, {"percentile", pct}} {
		if r := c.t.rate(); !(r >= 0.88 && r <= 0.99) {
			t.Errorf("bootstrap %s coverage of D %v: outside 88–99 %%", c.name, c.t)
		}
		if c.t.failed > reps/50 {
			t.Errorf("bootstrap %s: %d of %d fits failed (over 2 %%)", c.name, c.t.failed, reps)
		}
	}
}
