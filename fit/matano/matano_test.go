package matano

import (
	"encoding/json"
	"errors"
	"math"
	"math/rand/v2"
	"os"
	"reflect"
	"sort"
	"strings"
	"testing"

	"github.com/fickfit/fickfit/fit"
	"github.com/fickfit/fickfit/fit/numeric"
	"github.com/fickfit/fickfit/internal/stats"
	"github.com/fickfit/fickfit/profile"
)

// erfCouple is the couple of two semi-infinite bodies with constant D,
// C = (CL + CR)/2 + (CR − CL)/2·erf((x − xm)/(2√(Dt))) (Crank, The
// Mathematics of Diffusion, 2nd ed., 1975, ch. 2, extended initial
// distributions; equation number from memory).
func erfCouple(x, D, t, cl, cr, xm float64) float64 {
	return (cl+cr)/2 + (cr-cl)/2*math.Erf((x-xm)/(2*math.Sqrt(D*t)))
}

// couple samples f at n points over [a, b] with seeded noise.
func couple(seed uint64, n int, a, b, t, noise float64, f func(x float64) float64) *profile.Profile {
	rng := rand.New(rand.NewPCG(seed, 3))
	p := &profile.Profile{ID: "couple", Source: "test.csv", Time: t}
	for i := 0; i < n; i++ {
		x := a + (b-a)*float64(i)/float64(n-1)
		p.Depth = append(p.Depth, x)
		p.Value = append(p.Value, f(x)+noise*rng.NormFloat64())
	}
	return p
}

func TestErfCoupleConstantD(t *testing.T) {
	// An erf couple has a constant D (Crank 1975, ch. 2): both analyses
	// must return it within 2 % away from the ends (10 %–90 % of the
	// range), and the Matano plane must sit at the interface. Noise 0.03 on a range of 28 (about 0.1 %, a careful
	// microprobe line scan).
	const D, tm, cl, cr, xm = 4e-14, 100 * 3600.0, 2.0, 30.0, 150e-6
	w := 2 * math.Sqrt(D*tm)
	for _, method := range []string{BoltzmannMatano, SauerFreise} {
		for seed := uint64(1); seed <= 3; seed++ {
			p := couple(seed, 60, xm-4*w, xm+4*w, tm, 0.03, func(x float64) float64 { return erfCouple(x, D, tm, cl, cr, xm) })
			r, err := Analyze(p, 0, Options{Method: method, Resamples: 200, Seed: seed})
			if err != nil {
				t.Fatal(err)
			}
			for _, pt := range r.Points {
				yy := (pt.C - cl) / (cr - cl)
				if yy < 0.1 || yy > 0.9 {
					continue
				}
				if rel := math.Abs(pt.D/D - 1); rel > 0.02 {
					t.Errorf("%s seed %d: D(%.3g) = %.4g, want %.4g (%.1f %%)", method, seed, pt.C, pt.D, D, 100*rel)
				}
				if !(pt.CI.Lo <= pt.D && pt.D <= pt.CI.Hi) {
					t.Errorf("%s seed %d: interval %v does not contain the estimate %.4g", method, seed, pt.CI, pt.D)
				}

			}
			if method == BoltzmannMatano {
				if r.MatanoPlane == nil || math.Abs(*r.MatanoPlane-xm) > 0.02*w {
					t.Errorf("seed %d: Matano plane %v, want %g", seed, r.MatanoPlane, xm)
				}
			} else if r.MatanoPlane != nil {
				t.Errorf("Sauer–Freise reports a Matano plane")
			}
		}
	}
}

// simulatedCouple computes, with the numeric solver, a couple in a closed
// box of length L (both ends sealed, far from the diffusion zone) with
// D(C) = D·exp(k(C − CL)), initially CL left of L/2 and CR right of it.
func simulatedCouple(t *testing.T, D, k, cl, cr, tm, L float64) *numeric.Solution {
	t.Helper()
	step := func(x float64) float64 {
		switch {
		case x < L/2:
			return cl
		case x > L/2:
			return cr
		}
		return (cl + cr) / 2
	}
	s, err := numeric.Solve(numeric.Problem{
		DC: numeric.Exp{D: D, K: k, Cref: cl}, Time: tm, Surface: numeric.SurfaceSealed,
		Thickness: L, Far: numeric.FarSealed, Initial: step,
	}, numeric.Options{Nodes: 2001, Steps: 800, Stretch: -1})
	if err != nil {
		t.Fatal(err)
	}
	return s
}

func TestExponentialDFromSolver(t *testing.T) {
	// Consistency check between two of our methods (not an external
	// check): the forward solver makes a couple profile for a known
	// exponential D(C), rising ×4 from CL to CR; both analyses must return
	// that D(C) within 5 % in the middle of the range (20 %–80 %).
	// In a closed box the Matano plane is the original interface (mass
	// balance), which Boltzmann–Matano must find.
	const D, tm, cl, cr = 1e-14, 50 * 3600.0, 0.0, 1.0
	k := math.Log(4)
	dmax := 4 * D
	L := 20 * math.Sqrt(dmax*tm)
	s := simulatedCouple(t, D, k, cl, cr, tm, L)
	w := math.Sqrt(dmax * tm)
	for _, c := range []struct {
		method string
		noise  float64
	}{{BoltzmannMatano, 0}, {SauerFreise, 0}, {BoltzmannMatano, 0.002}} {
		method := c.method
		p := couple(1, 80, L/2-6*w, L/2+6*w, tm, c.noise, s.At)
		r, err := Analyze(p, 0, Options{Method: method, Resamples: -1})
		if err != nil {
			t.Fatal(err)
		}
		var worst float64
		for _, pt := range r.Points {
			yy := (pt.C - cl) / (cr - cl)
			if yy < 0.2 || yy > 0.8 {
				continue
			}
			want := D * math.Exp(k*(pt.C-cl))
			rel := math.Abs(pt.D/want - 1)
			worst = math.Max(worst, rel)
			if rel > 0.05 {
				t.Errorf("%s, noise %g: D(%.3f) = %.4g, law %.4g (%.1f %%)", method, c.noise, pt.C, pt.D, want, 100*rel)
			}
		}
		if method == BoltzmannMatano && math.Abs(*r.MatanoPlane-L/2) > 0.02*w {
			t.Errorf("Matano plane %.6g m, original interface %.6g m", *r.MatanoPlane, L/2)
		}
		t.Logf("%s, noise %g: %d erf terms, rmse %.2g, worst deviation from the law over 20–80 %%: %.2f %%", method, c.noise, r.Smooth.Terms(), r.RMSE, 100*worst)
		// The constant-D note must not appear for this clearly variable D.
		for _, w := range r.Warnings {
			if w.Code == "constant-d" {
				t.Errorf("constant-d warning on an exponential law")
			}
		}
	}
}

func TestMethodsAgreeOnTheSmoothCurve(t *testing.T) {
	// On a smooth curve whose Matano plane is the plane of equal areas the
	// two formulas are the same quantity (Sauer & Freise rewrote
	// Boltzmann–Matano to avoid locating the plane; common practice, no
	// source): the closed forms must agree to rounding.
	s := &Smooth{CL: 1, CR: 3, W: []float64{0.3, 0.5, 0.2}, M: []float64{-1e-5, 2e-6, 1.5e-5}, S: []float64{4e-6, 9e-6, 2e-5}}
	xm := s.MatanoPlane()
	for _, y := range []float64{0.01, 0.1, 0.33, 0.5, 0.77, 0.95, 0.999} {
		x, ok := s.Position(y)
		if !ok || math.Abs(s.Y(x)-y) > 1e-13 {
			t.Fatalf("Position(%g) = %g, Y there %g", y, x, s.Y(x))
		}
		a, b := s.boltzmannMatano(x, 3600, xm), s.sauerFreise(x, 3600)
		if math.Abs(a/b-1) > 1e-9 {
			t.Errorf("Y = %g: Boltzmann–Matano %.12g, Sauer–Freise %.12g", y, a, b)
		}
	}
	// The plane of equal areas, checked by quadrature of the curve.
	var left, right float64
	const steps, span = 200000, 2e-4
	h := span / steps
	for i := 0; i < steps; i++ {
		left += s.Y(xm-span+(float64(i)+0.5)*h) * h
		right += (1 - s.Y(xm+(float64(i)+0.5)*h)) * h
	}
	if math.Abs(left-right) > 1e-6*left {
		t.Errorf("areas either side of the Matano plane: %.8g and %.8g", left, right)
	}
}

func TestJSONShape(t *testing.T) {
	const D, tm = 4e-14, 100 * 3600.0
	w := 2 * math.Sqrt(D*tm)
	p := couple(2, 40, -4*w, 4*w, tm, 0.1, func(x float64) float64 { return erfCouple(x, D, tm, 2, 30, 0) })
	for _, method := range []string{BoltzmannMatano, SauerFreise} {
		r, err := Analyze(p, 0, Options{Method: method, Resamples: 100, Concentrations: []float64{1, 16}})
		if err != nil {
			t.Fatal(err)
		}
		b, err := json.Marshal(r)
		if err != nil {
			t.Fatal(err)
		}
		var m map[string]json.RawMessage
		if err := json.Unmarshal(b, &m); err != nil {
			t.Fatal(err)
		}
		var keys []string
		for k := range m {
			keys = append(keys, k)
		}
		sort.Strings(keys)
		if want := []string{"id", "matano_plane_m", "method", "points", "warnings"}; !reflect.DeepEqual(keys, want) {
			t.Errorf("keys %v, want %v", keys, want)
		}
		if method == SauerFreise && string(m["matano_plane_m"]) != "null" {
			t.Errorf("Sauer–Freise matano_plane_m = %s, want null", m["matano_plane_m"])
		}
		var pts []map[string]json.RawMessage
		if err := json.Unmarshal(m["points"], &pts); err != nil {
			t.Fatal(err)
		}
		// C = 1 lies outside [2, 30]: D null, interval open.
		if string(pts[0]["D"]) != "null" || string(pts[0]["ci"]) != "[null,null]" {
			t.Errorf("outside the range: D %s ci %s, want null", pts[0]["D"], pts[0]["ci"])
		}
		var ci [2]*float64
		if err := json.Unmarshal(pts[1]["ci"], &ci); err != nil || ci[0] == nil || ci[1] == nil {
			t.Errorf("interval at C = 16: %s", pts[1]["ci"])
		}
		if !hasWarning(r, "outside-range") {
			t.Errorf("no outside-range warning: %v", r.Warnings)
		}
		var back Result
		if err := json.Unmarshal(b, &back); err != nil || len(back.Points) != 2 || !math.IsNaN(back.Points[0].D) {
			t.Errorf("round trip: %v %+v", err, back.Points)
		}
	}
}

func hasWarning(r *Result, code string) bool {
	for _, w := range r.Warnings {
		if w.Code == code {
			return true
		}
	}
	return false
}

func TestWarnings(t *testing.T) {
	const D, tm = 4e-14, 100 * 3600.0
	w := 2 * math.Sqrt(D*tm)
	f := func(x float64) float64 { return erfCouple(x, D, tm, 2, 30, 0) }
	// Default grid: 5 % and 95 % are near the ends; one erf term.
	r, err := Analyze(couple(4, 40, -4*w, 4*w, tm, 0.1, f), 0, Options{Resamples: -1})
	if err != nil {
		t.Fatal(err)
	}
	for _, code := range []string{"near-end", "constant-d"} {
		if !hasWarning(r, code) {
			t.Errorf("missing %s warning: %v", code, r.Warnings)
		}
	}
	if hasWarning(r, "ends-not-reached") {
		t.Errorf("ends-not-reached on a complete profile")
	}
	// A profile cut at the half-way point never reaches CR.
	r, err = Analyze(couple(4, 40, -4*w, 0.3*w, tm, 0.1, f), 0, Options{Resamples: -1})
	if err == nil && !hasWarning(r, "ends-not-reached") {
		t.Errorf("no ends-not-reached warning on a truncated profile: %v", r.Warnings)
	}
	// A symmetric profile cut short at both ends is said the same way at
	// both ends (the same share of the step short).
	r, err = Analyze(couple(5, 40, -0.9*w, 0.9*w, tm, 0, f), 0, Options{Resamples: -1})
	if err != nil {
		t.Fatal(err)
	}
	if !hasWarning(r, "ends-not-reached") {
		t.Fatalf("no ends-not-reached warning on a profile cut at both ends: %v", r.Warnings)
	}
	for _, wn := range r.Warnings {
		if wn.Code != "ends-not-reached" {
			continue
		}
		a := strings.Index(wn.Message, "shallow end (")
		b := strings.Index(wn.Message, "deep end (")
		if a < 0 || b < 0 {
			t.Fatalf("message %q", wn.Message)
		}
		pa := strings.Fields(wn.Message[a+len("shallow end ("):])[0]
		pb := strings.Fields(wn.Message[b+len("deep end ("):])[0]
		if pa != pb || !strings.Contains(wn.Message, "of the step short at the first point") || !strings.Contains(wn.Message, "of the step short at the last point") {
			t.Errorf("symmetric profile said differently at its ends: %q", wn.Message)
		}
	}
	// Few points.
	r, err = Analyze(couple(4, 12, -4*w, 4*w, tm, 0.1, f), 0, Options{Resamples: -1})
	if err != nil || !hasWarning(r, "few-points") {
		t.Errorf("few points: err %v, warnings %v", err, r)
	}
}

func TestBootstrapDeterministic(t *testing.T) {
	const D, tm = 4e-14, 100 * 3600.0
	w := 2 * math.Sqrt(D*tm)
	p := couple(9, 50, -4*w, 4*w, tm, 0.2, func(x float64) float64 { return erfCouple(x, D, tm, 2, 30, 0) })
	run := func(workers int) *Result {
		r, err := Analyze(p, 0, Options{Resamples: 200, Seed: 77, Workers: workers})
		if err != nil {
			t.Fatal(err)
		}
		return r
	}
	a, b := run(1), run(3)
	for i := range a.Points {
		if a.Points[i].CI != b.Points[i].CI && !(math.IsNaN(a.Points[i].CI.Lo) && math.IsNaN(b.Points[i].CI.Lo)) {
			t.Errorf("point %d: %v with 1 worker, %v with 3", i, a.Points[i].CI, b.Points[i].CI)
		}
	}
}

func TestAnalyzeBadInput(t *testing.T) {
	good := couple(1, 30, -1e-5, 1e-5, 3600, 0.01, func(x float64) float64 { return erfCouple(x, 1e-14, 3600, 0, 1, 0) })
	mod := func(f func(p *profile.Profile)) *profile.Profile {
		q := *good
		q.Depth = append([]float64(nil), good.Depth...)
		q.Value = append([]float64(nil), good.Value...)
		f(&q)
		return &q
	}
	cases := []struct {
		name string
		p    *profile.Profile
		t    float64
		o    Options
	}{
		{"nil", nil, 0, Options{}},
		{"no time", mod(func(p *profile.Profile) { p.Time = 0 }), 0, Options{}},
		{"few points", mod(func(p *profile.Profile) { p.Depth, p.Value = p.Depth[:5], p.Value[:5] }), 0, Options{}},
		{"NaN value", mod(func(p *profile.Profile) { p.Value[3] = math.NaN(); p.Line = make([]int, 30); p.Line[3] = 17 }), 0, Options{}},
		{"flat", mod(func(p *profile.Profile) {
			for i := range p.Value {
				p.Value[i] = 1
			}
		}), 0, Options{}},
		{"method", good, 0, Options{Method: "hall"}},
		{"level", good, 0, Options{Level: 1.5}},
		{"resamples", good, 0, Options{Resamples: 10}},
		{"terms", good, 0, Options{MaxTerms: 9}},
		{"NaN concentration", good, 0, Options{Concentrations: []float64{math.NaN()}}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			r, err := Analyze(c.p, c.t, c.o)
			if err == nil {
				t.Fatalf("no error, result %+v", r)
			}
			if !errors.Is(err, fit.ErrBadInput) {
				t.Errorf("error %v does not wrap ErrBadInput", err)
			}
		})
	}
}

func TestQuantileType6(t *testing.T) {
	// External check: scipy 1.10.1 scipy.stats.mstats.mquantiles with
	// alphap = betap = 0 (Hyndman & Fan, Amer. Statist. 50 (1996), type 6),
	// testdata/reference/scipy_quantile.py → scipy_quantile.json.
	b, err := os.ReadFile("../../testdata/reference/scipy_quantile.json")
	if err != nil {
		t.Fatal(err)
	}
	var ref struct {
		Cases []struct {
			Data, P, Quantile []float64
		}
	}
	if err := json.Unmarshal(b, &ref); err != nil || len(ref.Cases) == 0 {
		t.Fatalf("scipy_quantile.json: %v", err)
	}
	for _, c := range ref.Cases {
		s := append([]float64(nil), c.Data...)
		sort.Float64s(s)
		for i, p := range c.P {
			if got := stats.BootstrapQuantile(s, p); math.Abs(got-c.Quantile[i]) > 1e-12*math.Max(1, math.Abs(c.Quantile[i])) {
				t.Errorf("BootstrapQuantile(%v, %g) = %.15g, scipy %.15g", c.Data, p, got, c.Quantile[i])
			}
		}
	}
	// The bootstrap rule: of 119 replicates, the 3rd and the 117th.
	s := make([]float64, 119)
	for i := range s {
		s[i] = float64(i + 1)
	}
	if lo, hi := stats.BootstrapQuantile(s, 0.025), stats.BootstrapQuantile(s, 0.975); lo != 3 || hi != 117 {
		t.Errorf("2.5 %% and 97.5 %% of 1…119: %g and %g, want 3 and 117", lo, hi)
	}
}

func TestUnderResolvedWarning(t *testing.T) {
	// Self-check: a couple whose D rises ×30 (Crank–Nicolson solver) has a
	// steep low side. Sampled at 60 points over ±6√(Dmax·t) it crosses the
	// range within 5–6 point spacings there and must be flagged; at 160
	// points it must not be.
	const tm = 50 * 3600.0
	law := numeric.Exp{D: 1e-14, K: math.Log(30)}
	sol, L := boxCouple(t, law, tm)
	half := 6 * math.Sqrt(law.Max(0, 1)*tm)
	for _, c := range []struct {
		n    int
		want bool
	}{{60, true}, {160, false}} {
		p := couple(1, c.n, L/2-half, L/2+half, tm, 0.005, sol.At)
		r, err := Analyze(p, 0, Options{Resamples: -1, Concentrations: []float64{0.1, 0.2, 0.3, 0.5, 0.7, 0.9}})
		if err != nil {
			t.Fatal(err)
		}
		if got := hasWarning(r, "under-resolved"); got != c.want {
			t.Errorf("%d points: under-resolved warning %v, want %v (%v)", c.n, got, c.want, r.Warnings)
		}
	}
}
