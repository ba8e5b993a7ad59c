package arrhenius

import (
	"errors"
	"math"
	"strings"
	"testing"

	"github.com/fickfit/fickfit/fit"
	"github.com/fickfit/fickfit/profile"
)

// calAt returns an explicit calibration with D(T) = D and the given Q.
func calAt(t *testing.T, D, T, Q float64) Calibration {
	t.Helper()
	c, err := Explicit(D*math.Exp(Q/(R*T)), 0, Q, 0, 0)
	if err != nil {
		t.Fatal(err)
	}
	return c
}

// TestTimeToDepthTextbook: external check. Callister & Rethwisch, 8th ed.
// (2010), Example Problem 5.2 (number and values from memory): steel with
// 0.25 wt% C carburized at 950 °C with the surface held at 1.20 wt%; D =
// 1.6e-11 m²/s; 0.80 wt% is reached at 0.5 mm after 25 400 s (7.1 h). The
// book interpolates an erf table (z = 0.392); 0.5 % covers that.
func TestTimeToDepthTextbook(t *testing.T) {
	cal := calAt(t, 1.6e-11, 1223.15, 148e3)
	p, err := TimeToDepth(cal, 1223.15, 1.20, 0.25, 0.80, 0.5e-3, nil)
	if err != nil {
		t.Fatal(err)
	}
	near(t, "time (s)", p.Time.Value, 25400, 0.005)
	// Forward: after that time the case depth at 0.80 wt% is 0.5 mm.
	c, err := PredictCaseDepth(cal, Exposure{Temperature: 1223.15, Time: p.Time.Value}, 1.20, 0.25, 0.80, nil)
	if err != nil {
		t.Fatal(err)
	}
	near(t, "case depth (m)", c.CaseDepth.Value, 0.5e-3, 1e-12)
	pr, err := PredictProfile(cal, Exposure{Temperature: 1223.15, Time: p.Time.Value}, 1.20, 0.25, []float64{0, 0.5e-3, 0.05}, nil)
	if err != nil {
		t.Fatal(err)
	}
	near(t, "C at the surface", pr.Profile[0].Value, 1.20, 1e-15)
	near(t, "C at the case depth", pr.Profile[1].Value, 0.80, 1e-12)
	near(t, "C deep", pr.Profile[2].Value, 0.25, 1e-12)
	for _, k := range []string{"Cautions"} {
		if len(p.Cautions) == 0 {
			t.Errorf("%s missing", k)
		}
	}
}

// TestPredictionBands: the bands follow from Dt's interval.
func TestPredictionBands(t *testing.T) {
	cal := testCalibration(t)
	e := Exposure{Temperature: 1200, Time: 4 * 3600}
	c, err := PredictCaseDepth(cal, e, 0.9, 0.2, 0.4, nil)
	if err != nil {
		t.Fatal(err)
	}
	lnD, v := cal.LnD(1200)
	k := cal.quantile(0.95)
	near(t, "Dt lo", c.Dt.CI.Lo, math.Exp(lnD-k*math.Sqrt(v))*4*3600, 1e-12)
	u := math.Erfcinv((0.4 - 0.2) / (0.9 - 0.2))
	near(t, "depth lo", c.CaseDepth.CI.Lo, 2*u*math.Sqrt(c.Dt.CI.Lo), 1e-12)
	near(t, "depth hi", c.CaseDepth.CI.Hi, 2*u*math.Sqrt(c.Dt.CI.Hi), 1e-12)
	// Decarburization (Cs < C0): the band still brackets the value.
	p, err := PredictProfile(cal, e, 0.1, 0.8, []float64{1e-4, 5e-4, 1e-3}, nil)
	if err != nil {
		t.Fatal(err)
	}
	for _, pp := range p.Profile {
		if !(pp.Lo <= pp.Value && pp.Value <= pp.Hi && pp.Lo < pp.Hi) {
			t.Errorf("band %v", pp)
		}
	}
	// The band widens away from the calibrated range.
	far, _ := PredictCaseDepth(cal, Exposure{Temperature: 1450, Time: 3600}, 0.9, 0.2, 0.4, nil)
	if rel := func(q *Quantity) float64 { return q.CI.Hi / q.CI.Lo }; !(rel(far.CaseDepth) > rel(c.CaseDepth)) || !hasWarning(far.Warnings, "extrapolation") {
		t.Errorf("extrapolated band %v vs %v, warnings %v", far.CaseDepth.CI, c.CaseDepth.CI, far.Warnings)
	}
	// Time to depth: interval exp(±k·se) around the time.
	tt, _ := TimeToDepth(cal, 1200, 0.9, 0.2, 0.4, 1e-3, nil)
	near(t, "time interval", tt.Time.CI.Hi/tt.Time.Value, math.Exp(k*math.Sqrt(v)), 1e-12)
}

// TestPredictHistory: a log as exposure; an isothermal log equals the hold.
func TestPredictHistory(t *testing.T) {
	cal := testCalibration(t)
	h := &profile.History{Source: "iso", Time: []float64{0, 7200}, Temp: []float64{1200, 1200}}
	a, err := PredictCaseDepth(cal, Exposure{History: h}, 0.9, 0.2, 0.4, nil)
	if err != nil {
		t.Fatal(err)
	}
	b, _ := PredictCaseDepth(cal, Exposure{Temperature: 1200, Time: 7200}, 0.9, 0.2, 0.4, nil)
	near(t, "depth", a.CaseDepth.Value, b.CaseDepth.Value, 1e-12)
	near(t, "depth hi", a.CaseDepth.CI.Hi, b.CaseDepth.CI.Hi, 1e-9)
	f, err := PredictCaseDepth(cal, Exposure{History: furnaceLog()}, 0.9, 0.2, 0.4, nil)
	if err != nil || f.HistorySource != "furnace.csv" || !(f.Temperature.Value < 1200) {
		t.Errorf("furnace log: %v, effective T %g", err, f.Temperature.Value)
	}
}

func TestPredictBadInput(t *testing.T) {
	cal := testCalibration(t)
	e := Exposure{Temperature: 1200, Time: 3600}
	for _, tc := range []struct {
		name string
		run  func() error
		want string
	}{
		{"threshold above surface", func() error { _, err := PredictCaseDepth(cal, e, 0.9, 0.2, 1.0, nil); return err }, "strictly between"},
		{"equal levels", func() error { _, err := PredictProfile(cal, e, 0.5, 0.5, []float64{0}, nil); return err }, "are equal"},
		{"zero time", func() error {
			_, err := PredictCaseDepth(cal, Exposure{Temperature: 1200}, 0.9, 0.2, 0.4, nil)
			return err
		}, "must be > 0"},
		{"celsius", func() error {
			_, err := PredictCaseDepth(cal, Exposure{Temperature: 92.5, Time: 3600}, 0.9, 0.2, 0.4, nil)
			return err
		}, "°C read as kelvin"},
		{"negative depth", func() error { _, err := PredictProfile(cal, e, 0.9, 0.2, []float64{-1e-3}, nil); return err }, "≥ 0"},
		{"zero target depth", func() error { _, err := TimeToDepth(cal, 1200, 0.9, 0.2, 0.4, 0, nil); return err }, "> 0"},
		{"log not monotone", func() error {
			_, err := PredictCaseDepth(cal, Exposure{History: &profile.History{Time: []float64{0, 10, 5}, Temp: []float64{900, 1000, 1000}}}, 0.9, 0.2, 0.4, nil)
			return err
		}, "increasing time order"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			err := tc.run()
			if err == nil || !errors.Is(err, fit.ErrBadInput) || !strings.Contains(err.Error(), tc.want) {
				t.Errorf("got %v, want a bad-input error saying %q", err, tc.want)
			}
		})
	}
}
