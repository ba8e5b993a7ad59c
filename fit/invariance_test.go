package fit

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"github.com/fickfit/fickfit/profile"
)

// Unit invariance, a property of least squares itself (common practice, no
// source): writing the values as a·y + b (fraction, %, ppm, HV…) or the
// positions in other length units (the same numbers read as µm, mm or m,
// i.e. every length times c, D times c²) must not change the answer. The
// base profiles are seeded synthetic data (self-check data, not check
// values); the bars are the issue's: D to 1e-8 relative, interval ends to
// 1e-6.

// invCase is one closed-form model with a base profile.
type invCase struct {
	name  string
	model string
	p     *profile.Profile
	o     Options
}

// invCases builds one base profile per closed-form model (values in
// "fraction" scale, positions in metres).
func invCases() []invCase {
	rng := rand.New(rand.NewPCG(11, 2026))
	noisy := func(m Model, ptrue []float64, d Data, noise float64, unit string) *profile.Profile {
		d.Y = modelAt(m, ptrue, d, d.X)
		for i := range d.Y {
			d.Y[i] += noise * rng.NormFloat64()
		}
		return &profile.Profile{ID: m.Name(), Time: d.Time, Thickness: d.Thickness, ValueUnit: unit, Depth: d.X, Value: d.Y}
	}
	const tm = 4 * 3600.0
	L := 2 * math.Sqrt(2e-11*tm)
	var cases []invCase
	cases = append(cases, invCase{"erf", "erf",
		noisy(Erf{}, []float64{math.Log(2e-11), 0.92, 0.21, 0}, Data{X: positions(30, 0.02*L, 3*L), Time: tm}, 0.006, "wt%"), Options{}})
	// A traverse with material removed before the first point: x0 free.
	cases = append(cases, invCase{"erf-x0", "erf",
		noisy(Erf{}, []float64{math.Log(2e-11), 0.9, 0.25, -60e-6}, Data{X: positions(28, 0.05e-3, 2.5*L), Time: tm}, 0.005, "wt%"),
		Options{Free: []string{"x0"}}})
	cases = append(cases, invCase{"masstransfer", "masstransfer",
		noisy(MassTransfer{}, mtParams(1.2, 1.05, 0.2), Data{X: depths(40, 3.5e-3), Time: mtT}, 0.004, "wt%"), Options{}})
	cases = append(cases, invCase{"thinfilm", "thinfilm",
		noisy(ThinFilm{}, []float64{math.Log(3e-14), math.Log(2e-5), 0.05}, Data{X: positions(30, 0, 7.5e-5), Time: 2 * 3600}, 0.01, "at%"), Options{}})
	cases = append(cases, invCase{"couple", "couple",
		noisy(Couple{}, cpParams(0.12, 0.81, -9e-6), Data{X: positions(41, -250e-6, 250e-6), Time: cpT}, 0.004, "at%"), Options{}})
	cases = append(cases, invCase{"slab", "slab",
		noisy(Slab{}, slParams(0.03, 1.1, 0.12), Data{X: depths(36, slL), Time: slT, Thickness: slL, Faces: 2}, 0.006, "wt%"), Options{}})
	return cases
}

// transformed returns the profile with values a·y + b (σ times a) and
// every length times c.
func transformed(p *profile.Profile, a, b, c float64) *profile.Profile {
	q := *p
	q.Depth = make([]float64, len(p.Depth))
	q.Value = make([]float64, len(p.Value))
	for i := range p.Depth {
		q.Depth[i] = c * p.Depth[i]
		q.Value[i] = a*p.Value[i] + b
	}
	if p.Sigma != nil {
		q.Sigma = make([]float64, len(p.Sigma))
		for i, s := range p.Sigma {
			q.Sigma[i] = a * s
		}
	}
	q.Thickness = c * p.Thickness
	return &q
}

// backTransform maps an estimate or bound of the transformed fit back to
// the base units: lengths /c, D /c², levels (v − b)/a, beta /c, M /(a·c).
func backTransform(name, unit string, v, a, b, c float64) float64 {
	switch {
	case name == "D":
		return v / (c * c)
	case name == "beta":
		return v / c
	case name == "M":
		return v / (a * c)
	case unit == "m":
		return v / c
	default: // a level in the value's unit
		return (v - b) / a
	}
}

// invScales are the value and length scales tried: fraction, %, ppm, a
// hardness-like scale with an offset, and tiny and huge factors; lengths
// as if the same numbers were µm, mm or m.
var invScales = []struct {
	name    string
	a, b, c float64
}{
	{"fraction", 1, 0, 1},
	{"percent", 100, 0, 1},
	{"ppm", 1e4, 0, 1},
	{"HV", 600, 290, 1},
	{"milli", 1e-3, 0, 1},
	{"offset-ppm", 1e4, 2.5e4, 1},
	{"µm-as-m", 1, 0, 1e6},
	{"mm-as-µm", 1, 0, 1e-3},
	{"percent-µm", 100, 0, 1e3},
	{"HV-mm", 600, 290, 1e-3},
}

// TestUnitInvariance: every closed-form model, every scale: the same
// convergence verdict, D to 1e-8 relative, RSS to 1e-8 relative (times a²),
// the same warning codes, and every profile-likelihood interval end to
// 1e-6 (relative to the larger of the bound and the parameter's standard
// error; an open end must stay open). Self-check of a property of least
// squares (common practice, no source).
func TestUnitInvariance(t *testing.T) {
	for _, tc := range invCases() {
		t.Run(tc.name, func(t *testing.T) {
			o := tc.o
			o.Model = tc.model
			base, err := Fit(tc.p, o)
			if err != nil {
				t.Fatalf("base fit: %v", err)
			}
			for _, sc := range invScales {
				r, err := Fit(transformed(tc.p, sc.a, sc.b, sc.c), o)
				if err != nil {
					t.Errorf("%s: %v", sc.name, err)
					continue
				}
				checkInvariant(t, sc.name, base, r, sc.a, sc.b, sc.c)
			}
		})
	}
}

func checkInvariant(t *testing.T, scale string, base, r *Result, a, b, c float64) {
	t.Helper()
	if r.Converged != base.Converged {
		t.Errorf("%s: converged %v, base %v", scale, r.Converged, base.Converged)
	}
	if e := refRel(r.Stats.RSS/(a*a), base.Stats.RSS); !(e <= 1e-8) {
		t.Errorf("%s: RSS/a² = %.12g, base %.12g (rel %.2g)", scale, r.Stats.RSS/(a*a), base.Stats.RSS, e)
	}
	for i, e := range r.Params {
		be := base.Params[i]
		v := backTransform(e.Name, be.Unit, e.Value, a, b, c)
		se := be.StdErr
		tol := 1e-8
		if e.Name == "D" {
			if rel := refRel(v, be.Value); !(rel <= tol) {
				t.Errorf("%s: D = %.12g (base units), base %.12g (rel %.2g > 1e-8)", scale, v, be.Value, rel)
			}
		} else if d := math.Abs(v - be.Value); !(d <= tol*math.Max(math.Abs(be.Value), se)) {
			t.Errorf("%s: %s = %.12g (base units), base %.12g", scale, e.Name, v, be.Value)
		}
		for side, got := range []float64{e.CI.Lo, e.CI.Hi} {
			want := []float64{be.CI.Lo, be.CI.Hi}[side]
			if math.IsNaN(got) || math.IsNaN(want) {
				if math.IsNaN(got) != math.IsNaN(want) {
					t.Errorf("%s: %s %s end %g, base %g: open in one and not the other", scale, e.Name, []string{"lower", "upper"}[side], got, want)
				}
				continue
			}
			g := backTransform(e.Name, be.Unit, got, a, b, c)
			ref := math.Max(math.Abs(want), se)
			if e.Name == "D" {
				ref = math.Abs(want)
			}
			if d := math.Abs(g - want); !(d <= 1e-6*ref) {
				t.Errorf("%s: %s %s end %.10g (base units), base %.10g (rel %.2g > 1e-6)", scale, e.Name, []string{"lower", "upper"}[side], g, want, d/ref)
			}
		}
	}
	if got, want := warnCodes(r), warnCodes(base); got != want {
		t.Errorf("%s: warnings %s, base %s", scale, got, want)
	}
}

func warnCodes(r *Result) string {
	s := ""
	for _, w := range r.Warnings {
		s += w.Code + " "
	}
	return fmt.Sprint(s)
}
