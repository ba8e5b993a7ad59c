package fit

import (
	"errors"
	"math"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"
)

// TestErfWeightedAgainstScipy checks the σ-weighted fit and both covariance
// scalings against scipy.optimize.curve_fit(sigma=σ, absolute_sigma=False)
// and (…, absolute_sigma=True) (scipy 1.10.1; see scipy_erf.json), and the
// scaled one also against R 4.2.2 nls(weights = 1/σ²). The input
// erf_weighted.csv is synthetic with noise 1.3 × the stated σ, so the two
// scalings differ by √χ²_red ≈ 1.2 and a wrong choice cannot pass.
func TestErfWeightedAgainstScipy(t *testing.T) {
	p := readRefProfile(t, "erf_weighted.csv")
	if p.Sigma == nil {
		t.Fatal("erf_weighted.csv has no sigma column")
	}
	var sp struct {
		Scaled   scipyFit `json:"erf_weighted_scaled"`
		Absolute scipyFit `json:"erf_weighted_absolute"`
	}
	var rr struct {
		Fit rFit `json:"erf_weighted"`
	}
	readJSON(t, "scipy_erf.json", &sp)
	readJSON(t, "r_nls_erf.json", &rr)

	scaled, err := Fit(p, Options{CI: "wald"})
	if err != nil {
		t.Fatal(err)
	}
	if scaled.Covariance != "scaled" {
		t.Errorf("default covariance %q, want scaled", scaled.Covariance)
	}
	checkAgainst(t, "scipy(absolute_sigma=False)", scaled, sp.Scaled.Params, sp.Scaled.StdErr, sp.Scaled.RSS)
	checkAgainst(t, "R nls(weights)", scaled, rr.Fit.Params, rr.Fit.StdErr, rr.Fit.RSS)

	abs, err := Fit(p, Options{CI: "wald", AbsoluteSigma: true})
	if err != nil {
		t.Fatal(err)
	}
	if abs.Covariance != "absolute" {
		t.Errorf("covariance %q with AbsoluteSigma, want absolute", abs.Covariance)
	}
	checkAgainst(t, "scipy(absolute_sigma=True)", abs, sp.Absolute.Params, sp.Absolute.StdErr, sp.Absolute.RSS)

	// The weighted χ² and its p-value follow from the reference RSS:
	// χ²_red = RSS/dof; the scalings differ by exactly √χ²_red.
	chi := sp.Scaled.RSS / float64(sp.Scaled.DOF)
	if e := refRel(scaled.Stats.Chi2Red, chi); e > 1e-9 {
		t.Errorf("reduced χ² %.10g, from scipy RSS %.10g", scaled.Stats.Chi2Red, chi)
	}
	if !(scaled.Stats.Chi2P >= 0 && scaled.Stats.Chi2P < 0.05) {
		t.Errorf("χ² p-value %g: noise is 1.3 σ, the test should see it (p < 0.05)", scaled.Stats.Chi2P)
	}
	ratio := scaled.Param("D").StdErrLn / abs.Param("D").StdErrLn
	if math.Abs(ratio-math.Sqrt(chi)) > 1e-9 {
		t.Errorf("scaled/absolute stderr ratio %.10g, √χ²_red %.10g", ratio, math.Sqrt(chi))
	}
}

// TestAbsoluteSigmaNeedsSigma: --absolute-sigma without a σ column is bad
// input, not a silently unscaled covariance (common practice, no source).
func TestAbsoluteSigmaNeedsSigma(t *testing.T) {
	p := readRefProfile(t, "erf_fixed.csv")
	_, err := Fit(p, Options{CI: "wald", AbsoluteSigma: true})
	if err == nil {
		t.Fatal("AbsoluteSigma without sigma: no error")
	}
	if !errors.Is(err, ErrBadInput) {
		t.Errorf("error %v does not wrap ErrBadInput", err)
	}
}

// TestSigmaScaleInvariance: multiplying every σ by a constant leaves the
// estimates and the scaled covariance unchanged and scales the absolute
// covariance by that constant (a property of weighted least squares;
// common practice, no source).
func TestSigmaScaleInvariance(t *testing.T) {
	p := readRefProfile(t, "erf_weighted.csv")
	q := *p
	q.Sigma = make([]float64, len(p.Sigma))
	for i, s := range p.Sigma {
		q.Sigma[i] = 3 * s
	}
	for _, abs := range []bool{false, true} {
		a, err := Fit(p, Options{CI: "wald", AbsoluteSigma: abs})
		if err != nil {
			t.Fatal(err)
		}
		b, err := Fit(&q, Options{CI: "wald", AbsoluteSigma: abs})
		if err != nil {
			t.Fatal(err)
		}
		factor := 1.0
		if abs {
			factor = 3
		}
		for _, name := range erfRefNames {
			ea, eb := a.Param(name), b.Param(name)
			if e := refRel(eb.Value, ea.Value); e > 1e-9 {
				t.Errorf("abs=%v %s: %.12g with 3σ, %.12g with σ", abs, name, eb.Value, ea.Value)
			}
			if e := refRel(eb.StdErr, factor*ea.StdErr); e > 1e-7 {
				t.Errorf("abs=%v %s stderr: %.10g with 3σ, want %.10g", abs, name, eb.StdErr, factor*ea.StdErr)
			}
		}
	}
}

// TestAbsoluteSigmaWaldQuantile: with σ taken as known the variance is not
// estimated, so the Wald interval is ± z(0.975)·se, the normal quantile, as
// the profile cutoff (profileCutoff) and the curve band (bandQuantile) of
// this package already use; with the scaled covariance it is Student t with
// the residual degrees of freedom. Common practice, no source.
func TestAbsoluteSigmaWaldQuantile(t *testing.T) {
	p := readRefProfile(t, "erf_weighted.csv")
	for _, tc := range []struct {
		abs bool
		q   float64
	}{
		{false, distuv.StudentsT{Mu: 0, Sigma: 1, Nu: 47}.Quantile(0.975)},
		{true, distuv.UnitNormal.Quantile(0.975)},
	} {
		r, err := Fit(p, Options{CI: "wald", AbsoluteSigma: tc.abs})
		if err != nil {
			t.Fatal(err)
		}
		for _, name := range erfRefNames {
			e := r.Param(name)
			half, se := (e.CI.Hi-e.CI.Lo)/2, e.StdErr
			if name == "D" {
				half, se = math.Log(e.CI.Hi/e.CI.Lo)/2, e.StdErrLn
			}
			if got := half / se; math.Abs(got-tc.q) > 1e-9 {
				t.Errorf("absolute=%v %s: Wald half-width %.6f standard errors, want %.6f", tc.abs, name, got, tc.q)
			}
		}
	}
}
