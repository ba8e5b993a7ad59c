package fit

import (
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"

	"github.com/fickfit/fickfit/profile"
)

func TestParseThreshold(t *testing.T) {
	for _, tc := range []struct {
		in   string
		want Threshold
		str  string
	}{
		{"550HV", Threshold{Absolute, 550, "HV", ""}, "550HV"},
		{"550 HV1", Threshold{Absolute, 550, "HV1", ""}, "550HV1"},
		{" 550 hv 0,5 ", Threshold{Absolute, 550, "HV0.5", ""}, "550HV0.5"},
		{"52 HRC", Threshold{Absolute, 52, "HRC", ""}, "52HRC"},
		{"core+50HV", Threshold{OverCore, 50, "HV", ""}, "core+50HV"},
		{"CORE + 50 HV0.5", Threshold{OverCore, 50, "HV0.5", ""}, "core+50HV0.5"},
		{"0.35wt%", Threshold{Absolute, 0.35, "wt%", ""}, "0.35wt%"},
		{"0,35 wt.%", Threshold{Absolute, 0.35, "wt%", ""}, "0.35wt%"},
		{"0.4%C", Threshold{Absolute, 0.4, "%", "C"}, "0.4%C"},
		{"0.5 at% N", Threshold{Absolute, 0.5, "at%", "N"}, "0.5at%N"},
		{"0.3 mass%", Threshold{Absolute, 0.3, "wt%", ""}, "0.3wt%"},
		{"300 ppm", Threshold{Absolute, 300, "ppm", ""}, "300ppm"},
		{"core+0.1wt%", Threshold{OverCore, 0.1, "wt%", ""}, "core+0.1wt%"},
	} {
		got, err := ParseThreshold(tc.in)
		if err != nil {
			t.Errorf("ParseThreshold(%q): %v", tc.in, err)
			continue
		}
		if got != tc.want {
			t.Errorf("ParseThreshold(%q) = %+v, want %+v", tc.in, got, tc.want)
		}
		if got.String() != tc.str {
			t.Errorf("ParseThreshold(%q).String() = %q, want %q", tc.in, got.String(), tc.str)
		}
		back, err := ParseThreshold(got.String())
		if err != nil || back != got {
			t.Errorf("round trip of %q: %+v, %v", tc.in, back, err)
		}
	}
	for _, tc := range []struct{ in, want string }{
		{"", "not understood"},
		{"550", "no unit"},
		{"550 furlongs", "unknown unit"},
		{"550 HB?", "unknown unit"},
		{"0 HV", "positive"},
		{"core-50HV", "not understood"},
		{"core+HV", "not understood"},
		{"HV550", "not understood"},
	} {
		_, err := ParseThreshold(tc.in)
		if err == nil || !errors.Is(err, ErrBadInput) || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("ParseThreshold(%q): error %v, want ErrBadInput with %q", tc.in, err, tc.want)
		}
	}
}

func FuzzParseThreshold(f *testing.F) {
	for _, s := range []string{"550HV1", "core+50HV", "0.35wt%", "0.4%C", "1e2 ppm", "core + 5,5 HV 0,5", "x"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		th, err := ParseThreshold(s)
		if err != nil {
			if !errors.Is(err, ErrBadInput) {
				t.Fatalf("error does not wrap ErrBadInput: %v", err)
			}
			return
		}
		if !(th.Value > 0) || th.Unit == "" {
			t.Fatalf("accepted %q as %+v", s, th)
		}
		back, err := ParseThreshold(th.String())
		if err != nil || back.Kind != th.Kind || back.Unit != th.Unit || back.Element != th.Element ||
			math.Abs(back.Value-th.Value) > 1e-15*th.Value {
			t.Fatalf("round trip of %q: %+v → %q → %+v, %v", s, th, th.String(), back, err)
		}
	})
}

// fitErfProfile fits the erf model to a seeded synthetic profile
// (self-check data) with the given unit.
func fitErfProfile(t *testing.T, seed uint64, D, tm, cs, c0, noise float64, unit string) *Result {
	t.Helper()
	L := 2 * math.Sqrt(D*tm)
	p := synthErf(seed, 40, 3*L, D, tm, cs, c0, noise)
	p.ValueUnit = unit
	r, err := FitModel(p, Erf{}, Options{CI: "wald"})
	if err != nil {
		t.Fatal(err)
	}
	return r
}

// erfDepth is the analytic inverse of the erf profile, x = x0 +
// 2√(Dt)·erfinv((L − Cs)/(C0 − Cs)), with its gradient in (ln D, Cs, C0)
// (analytic identity of C = Cs + (C0 − Cs)·erf(u); erfinv from the Go
// standard library, d erfinv(r)/dr = (√π/2)·exp(erfinv(r)²)).
func erfDepth(r *Result, level, dLdC0 float64) (x float64, grad [3]float64) {
	D, cs, c0 := r.Param("D").Value, r.Param("Cs").Value, r.Param("C0").Value
	l := 2 * math.Sqrt(D*r.Data().Time)
	q := (level - cs) / (c0 - cs)
	z := math.Erfinv(q)
	x = l * z
	dz := math.SqrtPi / 2 * math.Exp(z*z) * l
	grad[0] = x / 2
	grad[1] = dz * (level - c0) / ((c0 - cs) * (c0 - cs))
	grad[2] = dz * (dLdC0*(c0-cs) - (level - cs)) / ((c0 - cs) * (c0 - cs))
	return x, grad
}

// checkDeltaCI compares the interval with exp(±q·se) of ln x from the
// analytic gradient and the fit's covariance.
func checkDeltaCI(t *testing.T, r *Result, e *DepthEstimate, x float64, grad [3]float64) {
	t.Helper()
	_, _, cov := r.Internal()
	var v float64
	for a := 0; a < 3; a++ {
		for b := 0; b < 3; b++ {
			v += grad[a] / x * cov[a][b] * grad[b] / x
		}
	}
	q := r.bandQuantile()
	lo, hi := x*math.Exp(-q*math.Sqrt(v)), x*math.Exp(q*math.Sqrt(v))
	if relErr(e.CI.Lo, lo) > 1e-6 || relErr(e.CI.Hi, hi) > 1e-6 {
		t.Errorf("CI %v, analytic delta method [%g, %g]", e.CI, lo, hi)
	}
}

// TestCaseDepthErfAbsolute: on a fitted erf profile the case depth is the
// analytic inverse of the fitted curve (analytic identity), and its
// interval is the delta method with the analytic gradient.
func TestCaseDepthErfAbsolute(t *testing.T) {
	r := fitErfProfile(t, 41, 3e-11, 4*3600, 0.95, 0.20, 0.005, "wt%")
	th, _ := ParseThreshold("0.35wt%")
	e, err := CaseDepth(r, th, DepthOptions{})
	if err != nil {
		t.Fatal(err)
	}
	x, grad := erfDepth(r, 0.35, 0)
	if relErr(e.Depth, x) > 1e-10 {
		t.Errorf("case depth %.12g m, analytic inverse %.12g m", e.Depth, x)
	}
	checkDeltaCI(t, r, e, x, grad)
	if !(e.FromData > 0) || math.Abs(e.FromData-x) > 0.1*x {
		t.Errorf("depth from data %g m, far from the fitted %g m", e.FromData, x)
	}
	if e.Level != 0.35 || e.Unit != "wt%" || e.Kind != "case" {
		t.Errorf("level %g %s kind %s", e.Level, e.Unit, e.Kind)
	}
	b, err := json.Marshal(e)
	if err != nil || !strings.Contains(string(b), `"depth_m":`) || !strings.Contains(string(b), `"from_data_m":`) {
		t.Errorf("JSON %s, %v", b, err)
	}
}

// TestCaseDepthOverCore: a nitrided-like hardness profile with the
// threshold core + 50 HV; the level follows the fitted C0, so ∂L/∂C0 = 1
// enters the interval (analytic identity as above). Hardness fitted
// directly carries the proxy note.
func TestCaseDepthOverCore(t *testing.T) {
	r := fitErfProfile(t, 42, 2e-14, 20*3600, 900, 320, 8, "HV0.5")
	th, _ := ParseThreshold("core+50HV")
	e, err := CaseDepth(r, th, DepthOptions{})
	if err != nil {
		t.Fatal(err)
	}
	c0 := r.Param("C0").Value
	x, grad := erfDepth(r, c0+50, 1)
	if relErr(e.Depth, x) > 1e-10 || relErr(e.Level, c0+50) > 1e-15 {
		t.Errorf("case depth %.12g m at %g, analytic %.12g m at %g", e.Depth, e.Level, x, c0+50)
	}
	checkDeltaCI(t, r, e, x, grad)
	if !strings.Contains(strings.Join(e.Notes, " "), "proxy mode") {
		t.Errorf("no proxy-mode note for a hardness fit: %q", e.Notes)
	}
	if !strings.Contains(strings.Join(e.Notes, " "), "mean of the 3 deepest points") {
		t.Errorf("no note on the core from data: %q", e.Notes)
	}
}

// TestDecarbDepthErf: for an out-diffusion erf profile the 95 % recovery
// depth is x0 + 2√(Dt)·erfinv(0.95) (analytic identity; erfinv from the Go
// standard library).
func TestDecarbDepthErf(t *testing.T) {
	r := fitErfProfile(t, 43, 2e-11, 2*3600, 0.05, 0.80, 0.004, "wt%")
	for _, frac := range []float64{0, 0.5, 0.9} {
		e, err := DecarbDepth(r, frac, DepthOptions{})
		if err != nil {
			t.Fatal(err)
		}
		f := frac
		if f == 0 {
			f = 0.95
		}
		want := 2 * math.Sqrt(r.Param("D").Value*r.Data().Time) * math.Erfinv(f)
		if relErr(e.Depth, want) > 1e-10 {
			t.Errorf("fraction %g: depth %.12g m, analytic %.12g m", f, e.Depth, want)
		}
		// Cs and C0 cancel from x* for erf: only ln D moves it, so
		// se(ln x*) = se(ln D)/2 (analytic identity).
		seLnD := r.Param("D").StdErrLn
		q := r.bandQuantile()
		if relErr(e.CI.Hi, want*math.Exp(q*seLnD/2)) > 1e-6 {
			t.Errorf("fraction %g: CI %v, want upper %g", f, e.CI, want*math.Exp(q*seLnD/2))
		}
		if !(e.FromData > 0) {
			t.Errorf("fraction %g: no depth from data: %v", f, e.Notes)
		}
	}
	if _, err := DecarbDepth(r, 1.2, DepthOptions{}); !errors.Is(err, ErrBadInput) {
		t.Errorf("fraction 1.2 accepted: %v", err)
	}
	rin := fitErfProfile(t, 44, 3e-11, 4*3600, 0.95, 0.20, 0.005, "wt%")
	if _, err := DecarbDepth(rin, 0.95, DepthOptions{}); !errors.Is(err, ErrBadInput) {
		t.Errorf("decarburization depth of an enriched profile accepted: %v", err)
	}
}

// TestFirstCrossing: linear interpolation between points, by hand (common
// practice, no source): 700, 600, 500 HV at 0, 0.1, 0.2 mm cross 550 at
// 0.15 mm.
func TestFirstCrossing(t *testing.T) {
	x := []float64{0, 0.1e-3, 0.2e-3, 0.3e-3}
	got, _ := firstCrossing(x, []float64{700, 600, 500, 400}, 550, true, nil)
	if math.Abs(got-0.15e-3) > 1e-18 {
		t.Errorf("crossing at %g, want 0.15 mm", got)
	}
	got, notes := firstCrossing(x, []float64{700, 540, 560, 400}, 550, true, nil)
	if math.Abs(got-(0.1e-3*150/160)) > 1e-18 || len(notes) != 1 || !strings.Contains(notes[0], "2 times") {
		t.Errorf("noisy crossing %g, notes %q", got, notes)
	}
	got, notes = firstCrossing(x, []float64{700, 680, 650, 600}, 550, true, nil)
	if !math.IsNaN(got) || !strings.Contains(notes[0], "not reached") {
		t.Errorf("unreached level gave %g, %q", got, notes)
	}
	got, notes = firstCrossing(x, []float64{0.1, 0.3, 0.5, 0.6}, 0.4, false, nil)
	if math.Abs(got-0.15e-3) > 1e-18 || len(notes) != 0 {
		t.Errorf("rising crossing at %g (%q), want 0.15 mm", got, notes)
	}
}

// TestCaseDepthBadInput: a threshold in the wrong unit, outside the fitted
// profile, or on a model without a surface is refused.
func TestCaseDepthBadInput(t *testing.T) {
	r := fitErfProfile(t, 45, 3e-11, 4*3600, 0.95, 0.20, 0.005, "wt%")
	for _, tc := range []struct{ th, want string }{
		{"550HV1", "state the threshold in wt%"},
		{"1.5wt%", "outside the fitted profile"},
		{"0.1wt%", "outside the fitted profile"},
		{"300ppm", "state the threshold in wt%"},
	} {
		th, err := ParseThreshold(tc.th)
		if err != nil {
			t.Fatal(err)
		}
		_, err = CaseDepth(r, th, DepthOptions{})
		if !errors.Is(err, ErrBadInput) || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: error %v, want ErrBadInput with %q", tc.th, err, tc.want)
		}
	}
	pc := &profile.Profile{ID: "couple", Time: cpT, ValueUnit: "wt%"}
	pc.Depth = positions(30, -250e-6, 250e-6)
	pc.Value = modelAt(Couple{}, cpParams(12, 1.5, 0), Data{Time: cpT}, pc.Depth)
	for i := range pc.Value {
		pc.Value[i] += 0.02 * math.Sin(float64(7*i))
	}
	rc, err := FitModel(pc, Couple{}, Options{CI: "wald"})
	if err != nil {
		t.Fatal(err)
	}
	th, _ := ParseThreshold("5wt%")
	if _, err := CaseDepth(rc, th, DepthOptions{}); !errors.Is(err, ErrBadInput) {
		t.Errorf("case depth of a couple accepted: %v", err)
	}
}

// TestCaseDepthCalibration: a hardness threshold on a concentration
// profile, through a hardness–carbon calibration table (invented for the
// test, monotone; not a check value). The level must be the calibration's
// concentration at 550 HV1 and the fitted curve must pass through it.
func TestCaseDepthCalibration(t *testing.T) {
	cal, err := profile.ReadCalibrationCSV(strings.NewReader("HV1,C_wt%\n300,0.15\n420,0.25\n520,0.35\n600,0.45\n680,0.60\n740,0.80\n"), "cal.csv")
	if err != nil {
		t.Fatal(err)
	}
	r := fitErfProfile(t, 46, 3e-11, 4*3600, 0.78, 0.18, 0.005, "wt%")
	th, _ := ParseThreshold("550 HV1")
	if _, err := CaseDepth(r, th, DepthOptions{}); !errors.Is(err, ErrBadInput) {
		t.Fatalf("hardness threshold on a wt%% profile accepted without a calibration: %v", err)
	}
	e, err := CaseDepth(r, th, DepthOptions{Calibration: cal})
	if err != nil {
		t.Fatal(err)
	}
	want, _ := cal.ToConcentration(550)
	if e.Level != want {
		t.Errorf("level %g, calibration gives %g", e.Level, want)
	}
	x, _ := erfDepth(r, want, 0)
	if relErr(e.Depth, x) > 1e-10 {
		t.Errorf("depth %g, analytic %g", e.Depth, x)
	}
	// core + 50 HV through the calibration: L = c(h(C0) + 50).
	th2, _ := ParseThreshold("core+50HV1")
	e2, err := CaseDepth(r, th2, DepthOptions{Calibration: cal})
	if err != nil {
		t.Fatal(err)
	}
	hc, _ := cal.ToHardness(r.Param("C0").Value)
	want2, _ := cal.ToConcentration(hc + 50)
	if relErr(e2.Level, want2) > 1e-12 {
		t.Errorf("core+50HV1 level %g, want %g", e2.Level, want2)
	}
}

// TestCaseDepthCoverage is a self-check by simulation (not an external
// check): over 200 seeded synthetic profiles the 95 % delta-method
// interval of the case depth covers the true depth in 90–99 % of cases
// (binomial sd ≈ 1.5 %).
func TestCaseDepthCoverage(t *testing.T) {
	if testing.Short() {
		t.Skip("simulation")
	}
	const D, tm, cs, c0 = 3e-11, 4 * 3600.0, 0.95, 0.20
	th, _ := ParseThreshold("0.35wt%")
	truth := 2 * math.Sqrt(D*tm) * math.Erfinv((0.35-cs)/(c0-cs))
	hit, n := 0, 200
	for s := 0; s < n; s++ {
		L := 2 * math.Sqrt(D*tm)
		p := synthErf(uint64(1000+s), 25, 3*L, D, tm, cs, c0, 0.02)
		p.ValueUnit = "wt%"
		r, err := FitModel(p, Erf{}, Options{CI: "wald"})
		if err != nil {
			t.Fatal(err)
		}
		e, err := CaseDepth(r, th, DepthOptions{})
		if err != nil {
			t.Fatal(err)
		}
		if e.CI.Lo <= truth && truth <= e.CI.Hi {
			hit++
		}
	}
	if cov := float64(hit) / float64(n); cov < 0.90 || cov > 0.99 {
		t.Errorf("coverage %.3f of the 95 %% case-depth interval", cov)
	} else {
		t.Logf("coverage %.3f", cov)
	}
}

func ExampleParseThreshold() {
	for _, s := range []string{"550 HV1", "core + 50 HV0.5", "0,35 wt%", "0.4%C"} {
		th, err := ParseThreshold(s)
		if err != nil {
			fmt.Println(err)
			continue
		}
		fmt.Println(th, th.Kind == OverCore, th.Hardness())
	}
	_, err := ParseThreshold("550")
	fmt.Println(err)
	// Output:
	// 550HV1 false true
	// core+50HV0.5 true true
	// 0.35wt% false false
	// 0.4%C false false
	// bad input: case-depth threshold "550" has no unit: write e.g. 550HV1 or 550wt%
}
