package arrhenius

import (
	"errors"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"github.com/fickfit/fickfit/fit"
	"github.com/fickfit/fickfit/profile"
)

// TestGlobalRecovery: self-check by simulation. A global fit of 15 simulated
// erf profiles (5 temperatures × 3, 50 points each) recovers D0 and Q
// within their intervals, agrees with the two-stage line to a fraction of
// its standard error, and keeps each profile's own surface and plateau.
func TestGlobalRecovery(t *testing.T) {
	rng := rand.New(rand.NewPCG(21, 22))
	ps := simCampaign(rng, 3, 50)
	g, err := Global(ps, nil)
	if err != nil {
		t.Fatal(err)
	}
	if ci := g.QCI(); !(ci.Lo <= simQ && simQ <= ci.Hi) {
		t.Errorf("Q interval %v misses the true %g", ci, simQ)
	}
	if ci := g.D0CI(); !(ci.Lo <= simD0 && simD0 <= ci.Hi) {
		t.Errorf("D0 interval %v misses the true %g", ci, simD0)
	}
	if g.Method != "global" || g.DOF != 13 || g.NTemperatures != 5 || len(g.Points) != 15 {
		t.Errorf("line %+v", g)
	}
	var rs []*fit.Result
	for i := range ps {
		r, err := fit.Fit(&ps[i], fit.Options{CI: "wald"})
		if err != nil {
			t.Fatal(err)
		}
		rs = append(rs, r)
	}
	pts, err := PointsFromResults(rs)
	if err != nil {
		t.Fatal(err)
	}
	two, err := TwoStage(pts, nil)
	if err != nil {
		t.Fatal(err)
	}
	if d := math.Abs(g.Q - two.Q); d > 0.5*two.StdErrQ() {
		t.Errorf("global Q %g and two-stage Q %g differ by %g (> half a standard error %g)", g.Q, two.Q, d, two.StdErrQ())
	}
	t.Logf("global Q = %.0f ± %.0f, two-stage Q = %.0f ± %.0f, corr %.4f, Birge %.2f", g.Q, g.StdErrQ(), two.Q, two.StdErrQ(), g.Corr(), g.BirgeRatio)
}

// TestGlobalCoverage: self-check by simulation. Q within its 95 % interval
// in 92–98 % of 300 seeded campaigns of 15 simulated erf profiles.
func TestGlobalCoverage(t *testing.T) {
	if testing.Short() {
		t.Skip("300 global fits")
	}
	rng := rand.New(rand.NewPCG(31, 32))
	cov := coverage(300, func(int) bool {
		g, err := Global(simCampaign(rng, 3, 50), nil)
		if err != nil {
			t.Fatal(err)
		}
		ci := g.QCI()
		return ci.Lo <= simQ && simQ <= ci.Hi
	})
	t.Logf("self-check: global-fit Q coverage %.3f (300 replicates, nominal 0.95)", cov)
	if cov < 0.92 || cov > 0.98 {
		t.Errorf("coverage %.3f outside 0.92–0.98", cov)
	}
}

// TestGlobalTemperatureUncertainty: self-check. With σ_T the random
// shifts widen Q's interval, the iteration converges, and the budget says
// how much comes from the temperatures.
func TestGlobalTemperatureUncertainty(t *testing.T) {
	rng := rand.New(rand.NewPCG(41, 42))
	ps := simCampaign(rng, 3, 50)
	g0, err := Global(ps, nil)
	if err != nil {
		t.Fatal(err)
	}
	g, err := Global(ps, &GlobalOptions{Options: Options{TemperatureSigma: 5}})
	if err != nil {
		t.Fatal(err)
	}
	b := g.TempBudget
	if b == nil || !b.Converged || b.Iterations < 1 {
		t.Fatalf("budget %+v", b)
	}
	if !(g.StdErrQ() > g0.StdErrQ()) || !(b.ShareTemperature > 0.3 && b.ShareTemperature < 1) {
		t.Errorf("σ_T 5 K: se(Q) %g vs %g without, temperature share %g", g.StdErrQ(), g0.StdErrQ(), b.ShareTemperature)
	}
	near(t, "half-width without σ_T", b.HalfWidthQProfiles, g0.QCI().Hi-g0.Q, 1e-6)
	t.Logf("σ_T = 5 K: half-width %.0f J/mol, profiles only %.0f, temperature share %.2f, %d iterations", b.HalfWidthQ, b.HalfWidthQProfiles, b.ShareTemperature, b.Iterations)
}

// TestGlobalOtherModel: the global fit works with any model that has a
// log-scale D: here thin-film profiles (Crank 1975, ch. 3 thin-film
// solution C = C0 + M/√(πDt)·exp(−x²/(4Dt)); simulated, self-check).
func TestGlobalOtherModel(t *testing.T) {
	rng := rand.New(rand.NewPCG(51, 52))
	var ps []profile.Profile
	for _, T := range simTemps {
		for r := 0; r < 2; r++ {
			D := math.Exp(simLnD(T))
			p := profile.Profile{ID: "tf", Temperature: T, Time: 3600}
			for i := 0; i < 40; i++ {
				x := 2e-3 * float64(i) / 39
				p.Depth = append(p.Depth, x)
				p.Value = append(p.Value, 0.1+2e-4/math.Sqrt(math.Pi*D*3600)*math.Exp(-x*x/(4*D*3600))+0.005*rng.NormFloat64())
			}
			ps = append(ps, p)
		}
	}
	g, err := Global(ps, &GlobalOptions{Fit: fit.Options{Model: "thinfilm"}})
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(g.Q-simQ) > 4*g.StdErrQ() {
		t.Errorf("thin-film global Q %g ± %g, true %g", g.Q, g.StdErrQ(), simQ)
	}
}

func TestGlobalBadInput(t *testing.T) {
	rng := rand.New(rand.NewPCG(61, 62))
	base := func() []profile.Profile { return simCampaign(rng, 1, 30) }
	noTime := base()
	noTime[2].Time = 0
	oneT := base()
	for i := range oneT {
		oneT[i].Temperature = 1200
	}
	for _, tc := range []struct {
		name string
		ps   []profile.Profile
		o    *GlobalOptions
		want string
	}{
		{"one profile", base()[:1], nil, "2 or more distinct temperatures"},
		{"time missing", noTime, nil, "hold time is not given"},
		{"one temperature", oneT, nil, "one temperature"},
		{"D fixed", base(), &GlobalOptions{Fit: fit.Options{Fixed: map[string]float64{"D": 1e-11}}}, "D cannot be fixed"},
		{"unknown model", base(), &GlobalOptions{Fit: fit.Options{Model: "parabolic"}}, "unknown model"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, err := Global(tc.ps, tc.o)
			if err == nil || !errors.Is(err, fit.ErrBadInput) || !strings.Contains(err.Error(), tc.want) {
				t.Errorf("got %v, want a bad-input error saying %q", err, tc.want)
			}
		})
	}
}

func TestGlobalGroups(t *testing.T) {
	rng := rand.New(rand.NewPCG(71, 72))
	ps := simCampaign(rng, 2, 30)
	for i := range ps {
		ps[i].Lot = []string{"L1", "L2"}[i%2]
	}
	rep, err := GlobalGroups(ps, "lot", nil)
	if err != nil {
		t.Fatal(err)
	}
	if len(rep.Lines) != 2 || rep.Lines[0].Group != "L1" || rep.Lines[1].Group != "L2" {
		t.Errorf("groups: %+v", rep)
	}
}
