package arrhenius

import (
	"errors"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"github.com/fickfit/fickfit/fit"
)

// TestTwoPointTextbook: external check. Callister & Rethwisch, Materials
// Science and Engineering: An Introduction, 8th ed. (2010), Example
// Problem 5.5 (copper in gold; example number and values from memory):
// from a log D vs 1/T plot, log D = −12.40 at 1/T = 0.8e-3 K⁻¹ and −15.45
// at 1.1e-3 K⁻¹, giving Qd = 194 kJ/mol and D0 = 5.2e-5 m²/s. The book
// uses 2.3 for ln 10 and R = 8.31 and rounds Q before computing D0, which
// moves D0 by about 3 %; hence 1 % on Q and 5 % on D0.
func TestTwoPointTextbook(t *testing.T) {
	pts := []Point{
		{ID: "a", T: 1 / 0.8e-3, LnD: -12.40 * math.Ln10, VarLnD: 0.01},
		{ID: "b", T: 1 / 1.1e-3, LnD: -15.45 * math.Ln10, VarLnD: 0.01},
	}
	l, err := TwoStage(pts, nil)
	if err != nil {
		t.Fatal(err)
	}
	near(t, "Q", l.Q, 194e3, 0.01)
	near(t, "D0", l.D0(), 5.2e-5, 0.05)
	if l.HasCI || !l.QCI().Open() || !l.D0CI().Open() {
		t.Errorf("two temperatures must give no interval, got Q %v", l.QCI())
	}
	if !hasWarning(l.Warnings, "two-temperatures") {
		t.Errorf("missing two-temperatures warning: %v", l.Warnings)
	}
}

func hasWarning(ws []fit.Warning, code string) bool {
	for _, w := range ws {
		if w.Code == code {
			return true
		}
	}
	return false
}

// coverage runs n replicates of f and returns the fraction that return true.
func coverage(n int, f func(i int) bool) float64 {
	hit := 0
	for i := 0; i < n; i++ {
		if f(i) {
			hit++
		}
	}
	return float64(hit) / float64(n)
}

// TestTwoStageCoverage: self-check by simulation (no source). Seeded
// campaigns with known D0 and Q, 5 temperatures × 3 points: the 95 %
// interval of Q must contain the true Q in 92–98 % of 1000 replicates —
// with stated errors right, with the scatter 2× the stated errors (Birge
// scaling must rescue the interval), and with temperature errors of 4 K
// given as σ_T (effective variance must rescue it).
func TestTwoStageCoverage(t *testing.T) {
	for _, tc := range []struct {
		name            string
		se, inflate, sT float64
	}{
		{"stated errors right", 0.05, 1, 0},
		{"scatter 2x stated", 0.05, 2, 0},
		{"temperature sigma 4 K", 0.03, 1, 4},
	} {
		t.Run(tc.name, func(t *testing.T) {
			rng := rand.New(rand.NewPCG(11, 12))
			var lnD0hit int
			cov := coverage(1000, func(int) bool {
				pts := simPoints(rng, 3, tc.se*tc.inflate, tc.sT)
				for i := range pts {
					pts[i].VarLnD = tc.se * tc.se
				}
				l, err := TwoStage(pts, nil)
				if err != nil {
					t.Fatal(err)
				}
				if ci := l.D0CI(); ci.Lo <= simD0 && simD0 <= ci.Hi {
					lnD0hit++
				}
				ci := l.QCI()
				return ci.Lo <= simQ && simQ <= ci.Hi
			})
			t.Logf("self-check: Q coverage %.3f, D0 coverage %.3f (1000 replicates, nominal 0.95)", cov, float64(lnD0hit)/1000)
			if cov < 0.92 || cov > 0.98 {
				t.Errorf("Q interval coverage %.3f outside 0.92–0.98", cov)
			}
			if c := float64(lnD0hit) / 1000; c < 0.92 || c > 0.98 {
				t.Errorf("D0 interval coverage %.3f outside 0.92–0.98", c)
			}
		})
	}
}

// TestBirgeScaling: self-check. Scatter 3× the stated errors must be seen
// (Birge ratio near 3, scaled, warning); scatter matching them must not be
// scaled in most replicates.
func TestBirgeScaling(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	pts := simPoints(rng, 3, 0.15, 0)
	for i := range pts {
		pts[i].VarLnD = 0.05 * 0.05
	}
	l, err := TwoStage(pts, nil)
	if err != nil {
		t.Fatal(err)
	}
	if !l.Scaled || l.BirgeRatio < 2 || l.BirgeRatio > 4.5 || !hasWarning(l.Warnings, "scatter-exceeds-errors") {
		t.Errorf("3x scatter: Birge %g scaled %v warnings %v", l.BirgeRatio, l.Scaled, l.Warnings)
	}
	nb, err := TwoStage(pts, &Options{NoBirge: true})
	if err != nil {
		t.Fatal(err)
	}
	if nb.Scaled || !hasWarning(nb.Warnings, "scatter-not-scaled") || !(nb.StdErrQ() < l.StdErrQ()) {
		t.Errorf("NoBirge: scaled %v, se %g vs %g", nb.Scaled, nb.StdErrQ(), l.StdErrQ())
	}
}

// TestTemperatureBudget: self-check of the decomposition of Q's interval.
func TestTemperatureBudget(t *testing.T) {
	rng := rand.New(rand.NewPCG(8, 9))
	pts := simPoints(rng, 3, 0.03, 0)
	prev := -1.0
	for _, sT := range []float64{1, 3, 10} {
		l, err := TwoStage(pts, &Options{TemperatureSigma: sT})
		if err != nil {
			t.Fatal(err)
		}
		b := l.TempBudget
		if b == nil || !b.Converged {
			t.Fatalf("σ_T %g: no converged budget: %+v", sT, b)
		}
		if math.Abs(b.ShareTemperature+b.ShareProfiles-1) > 1e-12 || b.ShareTemperature <= prev {
			t.Errorf("σ_T %g: shares %g + %g, previous temperature share %g", sT, b.ShareTemperature, b.ShareProfiles, prev)
		}
		prev = b.ShareTemperature
		// Effective variance: every weight is 1/(v + (Q/RT²)²σ_T²).
		for _, p := range l.Points {
			g := l.Q / (R * p.T * p.T)
			near(t, "weight", p.Weight, 1/(p.VarLnD+g*g*sT*sT), 1e-9)
		}
		t.Logf("σ_T = %g K: half-width of Q %.0f J/mol (profiles only %.0f), temperature share %.2f", sT, b.HalfWidthQ, b.HalfWidthQProfiles, b.ShareTemperature)
	}
	// A point's own σ_T overrides the global value.
	pts[0].SigmaT = 7
	l, _ := TwoStage(pts, &Options{TemperatureSigma: 1})
	if l.Points[0].SigmaT != 7 || l.Points[1].SigmaT != 1 {
		t.Errorf("σ_T per point: %g, %g", l.Points[0].SigmaT, l.Points[1].SigmaT)
	}
	if l0, _ := TwoStage(simPoints(rng, 3, 0.03, 0), nil); l0.TempBudget != nil {
		t.Error("budget without temperature uncertainty")
	}
}

// TestTwoStageBadInput: bad input gives clear errors, never a number.
func TestTwoStageBadInput(t *testing.T) {
	ok := func() []Point { return simPoints(rand.New(rand.NewPCG(1, 1)), 1, 0.05, 0) }
	// Ageing of an aluminium alloy at 150–250 °C, written in °C and read as
	// kelvin. (At the usual 400–1200 °C of steel treatments the °C numbers
	// are plausible kelvin and cannot be told apart from the data alone.)
	celsius := ok()
	for i := range celsius {
		celsius[i].T = 150 + 25*float64(i)
	}
	someCold := ok()
	someCold[0].T = 200
	reversed := ok()
	for i := range reversed {
		reversed[i].LnD = -reversed[i].LnD - 60
	}
	noVar := ok()
	noVar[2].VarLnD = math.NaN()
	oneT := ok()
	for i := range oneT {
		oneT[i].T = 1200
	}
	negT := ok()
	negT[1].T = -5
	for _, tc := range []struct {
		name string
		pts  []Point
		want string
	}{
		{"no points", nil, "2 or more distinct temperatures"},
		{"one point", ok()[:1], "2 or more distinct temperatures"},
		{"one temperature", oneT, "one temperature"},
		{"celsius read as kelvin", celsius, "all temperatures are below 273.15 K"},
		{"one cold point", someCold, "°C read as kelvin"},
		{"D falls with T", reversed, "not positive"},
		{"missing variance", noVar, "no uncertainty of ln D"},
		{"negative temperature", negT, "not a positive number of kelvin"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			l, err := TwoStage(tc.pts, nil)
			if err == nil {
				t.Fatalf("no error; got Q = %g", l.Q)
			}
			if !errors.Is(err, fit.ErrBadInput) {
				t.Errorf("error does not wrap ErrBadInput: %v", err)
			}
			if !strings.Contains(err.Error(), tc.want) {
				t.Errorf("error %q does not say %q", err, tc.want)
			}
		})
	}
	// Cold temperatures are accepted when confirmed as kelvin.
	cold := ok()
	for i := range cold {
		cold[i].T /= 5
	}
	if _, err := TwoStage(cold, &Options{ColdOK: true}); err != nil {
		t.Errorf("ColdOK: %v", err)
	}
	// Unweighted regression needs no variances and always scales.
	if l, err := TwoStage(noVar, &Options{Unweighted: true}); err != nil || !l.Scaled {
		t.Errorf("unweighted: %v", err)
	}
}

// TestGrouping: grouping by lot or any metadata key gives one line per group.
func TestGrouping(t *testing.T) {
	pts := readLots(t)
	for _, by := range []string{"lot", "Furnace"} {
		rep, err := TwoStageGroups(pts, by, nil)
		if err != nil {
			t.Fatal(err)
		}
		if len(rep.Lines) != 2 || rep.Lines[0].Group == rep.Lines[1].Group || rep.Lines[0].By != by {
			t.Errorf("by %s: %d lines", by, len(rep.Lines))
		}
	}
	rep, err := TwoStageGroups(pts, "", nil)
	if err != nil || len(rep.Lines) != 1 || rep.Lines[0].Group != "" {
		t.Errorf("ungrouped: %v", err)
	}
	_, err = TwoStageGroups(pts, "operator", nil)
	if err == nil || !strings.Contains(err.Error(), `no value for the grouping column "operator"`) {
		t.Errorf("missing column: %v", err)
	}
}

// TestPointFromResult reads fit results, refusing Dt results for Arrhenius.
func TestPointFromResult(t *testing.T) {
	r := &fit.Result{ID: "A3", Source: "a3.csv", Converged: true, Time: 14400, Temperature: 1198.15, TemperatureSigma: 2,
		Lot: "L1", Material: "16MnCr5", Params: []fit.Estimate{{Name: "D", Value: 3e-11, StdErrLn: 0.04}, {Name: "Cs", Value: 1}}}
	p, err := PointFromResult(r)
	if err != nil {
		t.Fatal(err)
	}
	if p.LnD != math.Log(3e-11) || p.VarLnD != 0.04*0.04 || p.SigmaT != 2 || p.Meta["material"] != "16MnCr5" {
		t.Errorf("point %+v", p)
	}
	dt := *r
	dt.Time = 0
	if _, err := PointFromResult(&dt); err == nil || !strings.Contains(err.Error(), "Dt") || !strings.Contains(err.Error(), "a3.csv") {
		t.Errorf("Dt result: %v", err)
	}
	nc := *r
	nc.Converged = false
	if _, err := PointFromResult(&nc); err == nil {
		t.Error("unconverged result accepted")
	}
}
