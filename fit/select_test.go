package fit

import (
	"encoding/json"
	"errors"
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"

	"github.com/fickfit/fickfit/profile"
)

// modelProfile makes a seeded synthetic profile from a model (self-check
// data, never a check value).
func modelProfile(m Model, ptrue []float64, d Data, noise float64, seed uint64, unit string) *profile.Profile {
	s := synthData(m, ptrue, d, noise, seed)
	return &profile.Profile{ID: m.Name() + "-synthetic", Time: d.Time, Thickness: d.Thickness,
		ValueUnit: unit, Depth: s.X, Value: s.Y}
}

func candidate(sel *Selection, name string) *Candidate {
	for i := range sel.Candidates {
		if sel.Candidates[i].Model == name {
			return &sel.Candidates[i]
		}
	}
	return nil
}

// TestSelectModel is a self-check by simulation (not an external check):
// seeded synthetic profiles from each model are recognised by AICc, the
// candidate list follows the data, and the Akaike weights sum to 1. A thin
// film is flat at its reflecting surface and so also passes the
// interior-step test: couple is tried there and loses on AICc.
func TestSelectModel(t *testing.T) {
	for _, tc := range []struct {
		name  string
		p     *profile.Profile
		want  string
		tried []string
	}{
		{"erf", synthErf(51, 40, 3e-3, 3e-11, 4*3600, 0.95, 0.2, 0.005), "erf", []string{"erf", "masstransfer", "thinfilm"}},
		{"masstransfer", modelProfile(MassTransfer{}, mtParams(1, 1.1, 0.2), Data{X: depths(50, 3.5e-3), Time: mtT}, 0.004, 52, "wt%"), "masstransfer", []string{"erf", "masstransfer", "thinfilm"}},
		{"thinfilm", modelProfile(ThinFilm{}, tfParams(0.05), Data{X: depths(40, 90e-6), Time: tfT}, 0.005, 53, "wt%"), "thinfilm", []string{"erf", "masstransfer", "thinfilm", "couple"}},
		{"slab", modelProfile(Slab{}, slParams(0.04, 1.2, 0.1), Data{X: depths(41, slL), Time: slT, Thickness: slL, Faces: 2}, 0.003, 54, "wppm"), "slab", []string{"erf", "masstransfer", "thinfilm", "slab"}},
		{"couple", modelProfile(Couple{}, cpParams(12, 1.5, -12e-6), Data{X: positions(45, -250e-6, 250e-6), Time: cpT}, 0.03, 55, "at%"), "couple", []string{"couple"}},
		{"couple-positive", modelProfile(Couple{}, cpParams(0.5, 25, 310e-6), Data{X: positions(45, 0, 600e-6), Time: cpT}, 0.08, 56, "at%"), "couple", []string{"erf", "masstransfer", "thinfilm", "couple"}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			sel, err := SelectModel(tc.p, Options{CI: "wald"}, SelectOptions{})
			if err != nil {
				t.Fatal(err)
			}
			var tried []string
			var wsum float64
			for _, c := range sel.Candidates {
				tried = append(tried, c.Model)
				if c.Fitted {
					wsum += c.Weight
				}
				t.Logf("%-12s fitted %-5v k %d ΔAICc %8.2f w %.3f %s", c.Model, c.Fitted, c.K, c.DeltaAICc, c.Weight, c.Note)
			}
			if strings.Join(tried, ",") != strings.Join(tc.tried, ",") {
				t.Errorf("tried %v, want %v (notes %q)", tried, tc.tried, sel.Notes)
			}
			if sel.Chosen != tc.want {
				t.Errorf("chose %s, want %s", sel.Chosen, tc.want)
			}
			if math.Abs(wsum-1) > 1e-12 {
				t.Errorf("Akaike weights sum to %g", wsum)
			}
			if c := candidate(sel, sel.Chosen); c == nil || c.DeltaAICc != 0 {
				t.Errorf("chosen candidate has ΔAICc %v", c)
			}
			if sel.Result == nil || sel.Result.Model != tc.want {
				t.Errorf("no refitted result for the chosen model")
			}
			if _, err := json.Marshal(sel); err != nil {
				t.Errorf("JSON: %v", err)
			}
		})
	}
}

// TestSelectNestedF: on mass-transfer data the F-test of erf ⊂
// masstransfer rejects erf; its statistic is the extra-sum-of-squares
// formula applied to the two candidates' RSS.
func TestSelectNestedF(t *testing.T) {
	p := modelProfile(MassTransfer{}, mtParams(1, 1.1, 0.2), Data{X: depths(50, 3.5e-3), Time: mtT}, 0.004, 52, "wt%")
	sel, err := SelectModel(p, Options{CI: "wald"}, SelectOptions{Candidates: []string{"erf", "masstransfer"}})
	if err != nil {
		t.Fatal(err)
	}
	if len(sel.Tests) != 1 {
		t.Fatalf("tests %v", sel.Tests)
	}
	ft := sel.Tests[0]
	r, f := candidate(sel, "erf"), candidate(sel, "masstransfer")
	want := (r.RSS - f.RSS) / 1 / (f.RSS / float64(50-4))
	if ft.DF1 != 1 || ft.DF2 != 46 || relErr(ft.F, want) > 1e-12 {
		t.Errorf("F = %g on (%d, %d), want %g on (1, 46)", ft.F, ft.DF1, ft.DF2, want)
	}
	if !(ft.P < 0.01) {
		t.Errorf("p = %g: erf not rejected on mass-transfer data", ft.P)
	}
}

// TestExtraSumF: with one numerator degree of freedom F = t² and
// P(F₁,ν ≥ t²) = 2·P(T_ν ≥ |t|) (analytic identity between the F and
// Student-t distributions), so the p-value from gonum's F distribution
// must match the two-sided t tail from gonum's StudentsT.
func TestExtraSumF(t *testing.T) {
	for _, tc := range []struct {
		rssR, rssF float64
		dfF        int
	}{{2.0, 1.5, 40}, {1.0, 0.99, 12}, {5, 1, 7}} {
		F, df1, df2, p := extraSumF(tc.rssR, tc.dfF+1, tc.rssF, tc.dfF)
		want := (tc.rssR - tc.rssF) / (tc.rssF / float64(tc.dfF))
		tt := math.Sqrt(want)
		pt := 2 * distuv.StudentsT{Mu: 0, Sigma: 1, Nu: float64(tc.dfF)}.Survival(tt)
		if df1 != 1 || df2 != tc.dfF || relErr(F, want) > 1e-14 || relErr(p, pt) > 1e-9 {
			t.Errorf("F = %g (%d, %d) p = %.12g; want F = %g p = %.12g", F, df1, df2, p, want, pt)
		}
	}
	if F, _, _, p := extraSumF(1.0, 11, 1.2, 10); F != 0 || p != 1 {
		t.Errorf("full model worse than reduced: F = %g, p = %g, want 0 and 1", F, p)
	}
}

// TestSelectBadInput: no applicable candidate gives an answer → ErrNoAnswer
// naming each model; an unknown candidate is bad input; slab is skipped
// (with a note) when the thickness is unknown.
func TestSelectBadInput(t *testing.T) {
	p := synthErf(57, 30, 3e-3, 3e-11, 4*3600, 0.95, 0.2, 0.005)
	if _, err := SelectModel(p, Options{}, SelectOptions{Candidates: []string{"erf", "nosuch"}}); !errors.Is(err, ErrBadInput) {
		t.Errorf("unknown candidate: %v", err)
	}
	sel, err := SelectModel(p, Options{CI: "wald"}, SelectOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(strings.Join(sel.Notes, " "), "slab not tried") {
		t.Errorf("no note on slab: %q", sel.Notes)
	}
	_, err = SelectModel(p, Options{}, SelectOptions{Candidates: []string{"slab"}})
	if !errors.Is(err, ErrNoAnswer) || !strings.Contains(err.Error(), "needs the specimen thickness") {
		t.Errorf("slab alone without thickness: %v", err)
	}
}

// BenchmarkSelectModel times --model auto on a 50-point surface profile
// (erf, masstransfer, thinfilm tried; the winner refitted with Wald
// intervals).
func BenchmarkSelectModel(b *testing.B) {
	p := benchProfile()
	b.ReportAllocs()
	for b.Loop() {
		if _, err := SelectModel(p, Options{CI: "wald"}, SelectOptions{}); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(b.Elapsed().Microseconds())/float64(b.N), "µs/selection")
}
