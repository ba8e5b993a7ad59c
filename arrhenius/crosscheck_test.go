package arrhenius

import (
	"encoding/csv"
	"math"
	"os"
	"strconv"
	"testing"

	"github.com/fickfit/fickfit/internal/tempfmt"
)

// readLots reads testdata/arrhenius/lots.csv (simulated inputs; see the README there).
func readLots(t testing.TB) []Point {
	t.Helper()
	f, err := os.Open("../testdata/arrhenius/lots.csv")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	rows, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	var pts []Point
	for _, r := range rows[1:] {
		num := func(s string) float64 {
			v, err := strconv.ParseFloat(s, 64)
			if err != nil {
				t.Fatal(err)
			}
			return v
		}
		pts = append(pts, Point{ID: r[0], Lot: r[1], T: num(r[2]), LnD: num(r[3]), VarLnD: num(r[4]),
			Meta: map[string]string{"lot": r[1], "furnace": "F" + r[1][1:]}})
	}
	return pts
}

func near(t *testing.T, what string, got, want, rel float64) {
	t.Helper()
	if !(math.Abs(got-want) <= rel*math.Abs(want)) {
		t.Errorf("%s = %.10g, want %.10g (relative tolerance %g)", what, got, want, rel)
	}
}

// TestTwoStageAgainstR: external check against R 4.2.2 lm(lnD ~ x,
// weights = 1/var) and confint (testdata/arrhenius/r_check.R, values in
// r_check.out). The Birge ratio exceeds 1 for these data, so our scaled
// covariance is R's vcov (σ̂²(XᵀWX)⁻¹) and our intervals are R's confint.
func TestTwoStageAgainstR(t *testing.T) {
	pts := readLots(t)
	var l1 []Point
	for _, p := range pts {
		if p.Lot == "L1" {
			l1 = append(l1, p)
		}
	}
	for _, tc := range []struct {
		name                                  string
		pts                                   []Point
		lnD0, q, birge, vA, vQ, cAQ, qLo, qHi float64
	}{
		{"all", pts, -10.89919742, 144686.8871, 2.430847969, 0.7112916277, 72009546.18, 7147.719022, 126858.7906, 162514.9835},
		{"L1", l1, -11.26349902, 142367.9049, 1.485983962, 0.5339651051, 53861125.32, 5355.467152, 125444.1084, 159291.7013},
	} {
		t.Run(tc.name, func(t *testing.T) {
			l, err := TwoStage(tc.pts, nil)
			if err != nil {
				t.Fatal(err)
			}
			if !l.Scaled {
				t.Fatalf("Birge ratio %g > 1 but covariance not scaled", l.BirgeRatio)
			}
			near(t, "ln D0", l.LnD0, tc.lnD0, 1e-8)
			near(t, "Q", l.Q, tc.q, 1e-8)
			near(t, "Birge ratio", l.BirgeRatio, tc.birge, 1e-8)
			near(t, "Var ln D0", l.Cov[0][0], tc.vA, 1e-7)
			near(t, "Var Q", l.Cov[1][1], tc.vQ, 1e-7)
			near(t, "Cov", l.Cov[0][1], tc.cAQ, 1e-7)
			ci := l.QCI()
			near(t, "Q lo", ci.Lo, tc.qLo, 1e-8)
			near(t, "Q hi", ci.Hi, tc.qHi, 1e-8)
		})
	}
}

// TestCompareAgainstR: external check of the extra-sum-of-squares F-tests
// and the D ratio against R 4.2.2 anova(m0, m1, m2), anova(m0, m2) and a
// contrast of lm(lnD ~ lot*x, weights) (testdata/arrhenius/r_check.R).
// Without temperature uncertainty our weights are R's weights.
func TestCompareAgainstR(t *testing.T) {
	c, err := Compare(readLots(t), &CompareOptions{TRef: 1198.15})
	if err != nil {
		t.Fatal(err)
	}
	want := map[string][2]float64{
		"separate-vs-common":   {7.134364343, 0.00609545903},
		"common-Q-vs-common":   {14.21310549, 0.001675417895},
		"separate-vs-common-Q": {0.05562319771, 0.8165447961},
	}
	if len(c.Tests) != 3 {
		t.Fatalf("%d tests, want 3", len(c.Tests))
	}
	for _, ft := range c.Tests {
		w, ok := want[ft.Name]
		if !ok {
			t.Fatalf("unexpected test %q", ft.Name)
		}
		near(t, ft.Name+" F", ft.F, w[0], 1e-7)
		near(t, ft.Name+" p", ft.P, w[1], 1e-6)
	}
	if len(c.Ratios) != 1 {
		t.Fatalf("%d ratios", len(c.Ratios))
	}
	r := c.Ratios[0]
	near(t, "ratio", r.Value, 1.276921196, 1e-8)
	near(t, "ratio lo", r.CI.Lo, 1.107067934, 1e-8)
	near(t, "ratio hi", r.CI.Hi, 1.472834404, 1e-8)
	near(t, "scale", c.Scale, 1.874549704*1.874549704, 1e-8)
	if !c.Differ || r.Group != "L2" || r.Reference != "L1" {
		t.Errorf("verdict fields: differ %v, %s vs %s", c.Differ, r.Group, r.Reference)
	}
	wantVerdict := "Lots L1 and L2 differ (p = 0.0061): D of L2 is 1.28 times D of L1 at 1198.15 K (95 % CI 1.11–1.47)."
	if got := tempfmt.Plain(c.Verdict); got != wantVerdict {
		t.Errorf("verdict\n got %q\nwant %q", got, wantVerdict)
	}
}
