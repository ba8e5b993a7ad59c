package arrhenius

import (
	"encoding/json"
	"math"
	"os"
	"strings"
	"testing"

	"github.com/fickfit/fickfit/internal/tempfmt"
)

// influenceRef is testdata/reference/influence.json (see influence.py).
type influenceRef struct {
	Points []struct {
		ID          string  `json:"id"`
		T           float64 `json:"temperature_K"`
		LnD         float64 `json:"lnD"`
		Weight      float64 `json:"weight"`
		Leverage    float64 `json:"leverage"`
		Studentized float64 `json:"studentized"`
		Cook        float64 `json:"cooks_distance"`
		OutlierP    float64 `json:"outlier_p_bonferroni"`
	} `json:"points"`
	Prediction struct {
		T   float64    `json:"temperature_K"`
		LnD float64    `json:"lnD"`
		CI  [2]float64 `json:"ci_mean"`
		PI  [2]float64 `json:"prediction_interval"`
	} `json:"prediction_without_slip"`
}

func readInfluenceRef(t *testing.T) (influenceRef, []Point) {
	t.Helper()
	b, err := os.ReadFile("../testdata/reference/influence.json")
	if err != nil {
		t.Fatal(err)
	}
	var ref influenceRef
	if err := json.Unmarshal(b, &ref); err != nil {
		t.Fatal(err)
	}
	var pts []Point
	for _, p := range ref.Points {
		pts = append(pts, Point{ID: p.ID, T: p.T, LnD: p.LnD, VarLnD: 1 / p.Weight})
	}
	return ref, pts
}

// TestInfluenceAgainstNumpy: external check. Leverage, studentized
// (deleted) residuals, Cook's distances and the Bonferroni outlier p-values
// of a weighted Arrhenius line against their definitions computed with
// numpy 1.24.2 / scipy 1.10.1 by leave-one-out refits
// (testdata/reference/influence.py; the definitions of R's hatvalues,
// rstudent and cooks.distance, Cook & Weisberg 1982 ch. 2–3).
func TestInfluenceAgainstNumpy(t *testing.T) {
	ref, pts := readInfluenceRef(t)
	l, err := TwoStage(pts, nil)
	if err != nil {
		t.Fatal(err)
	}
	worst := [3]float64{}
	for i, p := range l.Points {
		r := ref.Points[i]
		for k, pair := range [][2]float64{{p.Leverage, r.Leverage}, {p.Studentized, r.Studentized}, {p.Cook, r.Cook}} {
			worst[k] = math.Max(worst[k], math.Abs(pair[0]/pair[1]-1))
		}
		near(t, r.ID+" leverage", p.Leverage, r.Leverage, 1e-9)
		near(t, r.ID+" studentized", p.Studentized, r.Studentized, 1e-8)
		near(t, r.ID+" Cook", p.Cook, r.Cook, 1e-8)
		if r.OutlierP < 1 {
			near(t, r.ID+" outlier p", p.OutlierP, r.OutlierP, 1e-6)
		} else if p.OutlierP != 1 {
			t.Errorf("%s outlier p %g, want 1", r.ID, p.OutlierP)
		}
	}
	t.Logf("largest relative difference from numpy: leverage %.1e, studentized %.1e, Cook %.1e", worst[0], worst[1], worst[2])
}

// TestSuspectPointNamed: the coupon whose 927 °C was entered as 927 K is
// named, with how far it lies from the line through the others and the
// unit slip that would put it back on that line; the line's Q is flagged
// as unusual and the scatter warning is given (its p-value is tiny).
func TestSuspectPointNamed(t *testing.T) {
	_, pts := readInfluenceRef(t)
	l, err := TwoStage(pts, nil)
	if err != nil {
		t.Fatal(err)
	}
	var msgs []string
	codes := map[string]bool{}
	for _, w := range l.Warnings {
		codes[w.Code] = true
		msgs = append(msgs, tempfmt.Plain(w.Message))
	}
	all := strings.Join(msgs, "\n")
	for _, want := range []string{"Profile C927-slip at 927 K lies 35.4 σ off the line through the other points",
		"was its temperature 927 °C, not 927 K?"} {
		if !strings.Contains(all, want) {
			t.Errorf("warnings lack %q:\n%s", want, all)
		}
	}
	if n := strings.Count(all, "Profile "); n != 1 {
		t.Errorf("%d points named, want only the slipped one:\n%s", n, all)
	}
	if !codes["q-unusual"] || !codes["scatter-exceeds-errors"] {
		t.Errorf("codes %v", codes)
	}
	// Without the slip: no suspect, Q usual, and the scatter (Birge ratio
	// below 1 here) raises no warning.
	l2, err := TwoStage(pts[:len(pts)-1], nil)
	if err != nil {
		t.Fatal(err)
	}
	if len(l2.Warnings) != 0 {
		t.Errorf("clean line warns: %v", l2.Warnings)
	}
}

// TestPredictionIntervalAgainstNumpy: external check of the band of the
// mean line and the prediction interval of a single new part at 925 °C,
// against influence.py (numpy/scipy by matrix algebra).
func TestPredictionIntervalAgainstNumpy(t *testing.T) {
	ref, pts := readInfluenceRef(t)
	l, err := TwoStage(pts[:len(pts)-1], nil)
	if err != nil {
		t.Fatal(err)
	}
	d, ci := l.DAt(ref.Prediction.T)
	_, pi := l.PredictAt(ref.Prediction.T)
	near(t, "D", math.Log(d), ref.Prediction.LnD, 1e-12)
	near(t, "CI lo", ci.Lo, ref.Prediction.CI[0], 1e-9)
	near(t, "CI hi", ci.Hi, ref.Prediction.CI[1], 1e-9)
	near(t, "PI lo", pi.Lo, ref.Prediction.PI[0], 1e-9)
	near(t, "PI hi", pi.Hi, ref.Prediction.PI[1], 1e-9)
}

// TestPredictionIntervalCoverage: self-check by simulation. A new coupon
// measured like the calibration coupons (true scatter 1.5 × the stated
// error, so that the Birge scaling is exercised) falls inside the 95 %
// prediction interval in 93–97 % of 2000 replicates, while the band of the
// mean line covers it far less often.
func TestPredictionIntervalCoverage(t *testing.T) {
	const n = 2000
	rng := newRand(20260514, 7)
	var inPI, inCI int
	for i := 0; i < n; i++ {
		var pts []Point
		for _, T := range simTemps {
			for r := 0; r < 2; r++ {
				pts = append(pts, Point{ID: "p", T: T, LnD: simLnD(T) + 1.5*0.05*rng.NormFloat64(), VarLnD: 0.05 * 0.05})
			}
		}
		l, err := TwoStage(pts, nil)
		if err != nil {
			t.Fatal(err)
		}
		T := 1198.15
		yNew := simLnD(T) + 1.5*0.05*rng.NormFloat64()
		_, pi := l.PredictAt(T)
		_, ci := l.DAt(T)
		if math.Log(pi.Lo) <= yNew && yNew <= math.Log(pi.Hi) {
			inPI++
		}
		if math.Log(ci.Lo) <= yNew && yNew <= math.Log(ci.Hi) {
			inCI++
		}
	}
	cp, cc := float64(inPI)/n, float64(inCI)/n
	t.Logf("self-check: prediction interval covers a new coupon in %.3f (nominal 0.95), the mean band in %.3f, %d replicates", cp, cc, n)
	if cp < 0.93 || cp > 0.97 {
		t.Errorf("prediction interval coverage %.3f", cp)
	}
	if cc > 0.8 {
		t.Errorf("mean band covers a single coupon %.3f of the time: the test does not separate them", cc)
	}
}
