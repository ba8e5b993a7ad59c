package arrhenius

import (
	"encoding/json"
	"errors"
	"math"
	"strings"
	"testing"

	"github.com/fickfit/fickfit/fit"
)

// TestSolveTemperatureRoundTrip: self-check. D of Mg in Al from the table
// row at 550 °C, solved back for the temperature with the row taken as
// exact (no spread), gives 823.15 K again, and says that the calibration
// carries no uncertainty.
func TestSolveTemperatureRoundTrip(t *testing.T) {
	ref, err := LookupReference("Mg-in-Al")
	if err != nil {
		t.Fatal(err)
	}
	cal, err := ref.CalibrationWithSpread(1, 0)
	if err != nil {
		t.Fatal(err)
	}
	obs := Observation{ID: "Mg in Al", LnDt: math.Log(ref.D(823.15) * 3600)}
	s, err := SolveTemperature(obs, cal, &SolveOptions{Time: 3600})
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(s.Temperature.Value-823.15) > 1e-9 {
		t.Errorf("T = %g K, want 823.15 K", s.Temperature.Value)
	}
	if !hasWarning(s.Warnings, "calibration-without-uncertainty") || !hasWarning(s.Warnings, "observation-without-uncertainty") || !hasWarning(s.Warnings, "reference-literature") {
		t.Errorf("warnings %v", s.Warnings)
	}
	if len(s.Cautions) != len(Cautions) {
		t.Error("cautions missing")
	}
}

// TestSolveTimeTextbook: external check. Callister & Rethwisch, 8th ed.
// (2010), Example Problem 5.3 (from memory): with D(500 °C) = 4.8e-14 and
// D(600 °C) = 5.3e-13 m²/s (Cu in Al), the Dt of 10 h at 600 °C needs
// 110.4 h at 500 °C. Here through an explicit calibration built from the
// two D values, and SolveTime.
func TestSolveTimeTextbook(t *testing.T) {
	Q := R * math.Log(5.3e-13/4.8e-14) / (1.0/773 - 1.0/873)
	D0 := 5.3e-13 * math.Exp(Q/(R*873))
	cal, err := Explicit(D0, 0, Q, 0, 0)
	if err != nil {
		t.Fatal(err)
	}
	obs := Observation{LnDt: math.Log(5.3e-13 * 36000)}
	s, err := SolveTime(obs, cal, &SolveOptions{Temperature: 773})
	if err != nil {
		t.Fatal(err)
	}
	near(t, "time (h)", s.Time.Value/3600, 110.4, 5e-4)
}

// TestFiellerVsMonteCarlo: the two interval methods of SolveTemperature
// and SolveTime agree (common practice, no source: with 2·10⁵ draws the
// Monte Carlo percentiles are good to about 1 % of the half-width). With a
// known covariance (normal) and a Student-t calibration (Satterthwaite dof
// against the bivariate-t draws).
func TestFiellerVsMonteCarlo(t *testing.T) {
	base := testCalibration(t)
	known := base
	known.DOF = 0
	tcal := base
	tcal.DOF = 8
	wide := base // se(Q) about 20 % of Q: Fieller's interval is clearly asymmetric
	wide.Cov[1][1] *= 40
	wide.Cov[0][0] *= 40
	wide.Cov[0][1] *= 40
	for _, tc := range []struct {
		name string
		cal  Calibration
		v    float64
	}{
		{"normal", known, 0.02},
		{"t with 8 dof", tcal, 0.02},
		{"part dominates", known, 0.25},
		{"wide calibration", wide, 0.02},
	} {
		t.Run(tc.name, func(t *testing.T) {
			obs := Observation{LnDt: simLnD(1180) + math.Log(7200), VarLnDt: tc.v}
			opt := &SolveOptions{Time: 7200, Temperature: 1180, Method: "both", Draws: 200000, Seed: 99}
			for _, solve := range []func(Observation, Calibration, *SolveOptions) (*Solution, error){SolveTemperature, SolveTime} {
				s, err := solve(obs, tc.cal, opt)
				if err != nil {
					t.Fatal(err)
				}
				q := s.Temperature
				if s.SolveFor == "time" {
					q = s.Time
				}
				hw := (q.CI.Hi - q.CI.Lo) / 2
				mc := s.MonteCarlo.CI
				t.Logf("%s: %s %v, Monte Carlo %v", s.SolveFor, q.Method, q.CI, mc)
				if math.Abs(q.CI.Lo-mc.Lo) > 0.02*hw || math.Abs(q.CI.Hi-mc.Hi) > 0.02*hw {
					t.Errorf("%s: analytic %v vs Monte Carlo %v differ by more than 2 %% of the half-width %g", s.SolveFor, q.CI, mc, hw)
				}
			}
		})
	}
}

// TestBackcalcCoverage: self-check by simulation. A campaign of 15 points
// (5 temperatures × 3) calibrates the line; a part at a known temperature
// gives ln Dt with its own error; the 95 % Fieller interval of the
// back-calculated temperature (and the Wald interval of the time) must
// hold the truth in 92–98 % of 1000 replicates.
func TestBackcalcCoverage(t *testing.T) {
	rng := newRand(81, 82)
	const tPart, sePart = 14400.0, 0.08
	var tHit int
	cov := coverage(1000, func(i int) bool {
		l, err := TwoStage(simPoints(rng, 3, 0.06, 0), nil)
		if err != nil {
			t.Fatal(err)
		}
		Tpart := 1150 + 150*rng.Float64()
		obs := Observation{LnDt: simLnD(Tpart) + math.Log(tPart) + sePart*rng.NormFloat64(), VarLnDt: sePart * sePart}
		s, err := SolveTemperature(obs, l.Calibration(), &SolveOptions{Time: tPart})
		if err != nil {
			t.Fatal(err)
		}
		st, err := SolveTime(obs, l.Calibration(), &SolveOptions{Temperature: Tpart})
		if err != nil {
			t.Fatal(err)
		}
		if st.Time.CI.Lo <= tPart && tPart <= st.Time.CI.Hi {
			tHit++
		}
		return s.Temperature.CI.Lo <= Tpart && Tpart <= s.Temperature.CI.Hi
	})
	tcov := float64(tHit) / 1000
	t.Logf("self-check: back-calculated temperature coverage %.3f, time coverage %.3f (1000 replicates, nominal 0.95)", cov, tcov)
	if cov < 0.92 || cov > 0.98 || tcov < 0.92 || tcov > 0.98 {
		t.Errorf("coverage %.3f (temperature), %.3f (time) outside 0.92–0.98", cov, tcov)
	}
}

func TestSolveBadInput(t *testing.T) {
	cal := testCalibration(t)
	obs := Observation{ID: "P7", LnDt: simLnD(1200) + math.Log(3600), VarLnDt: 0.01}
	for _, tc := range []struct {
		name  string
		solve func(Observation, Calibration, *SolveOptions) (*Solution, error)
		o     *SolveOptions
		want  string
	}{
		{"negative time", SolveTemperature, &SolveOptions{Time: -60}, "must be > 0"},
		{"no time", SolveTemperature, nil, "hold time is not known"},
		{"no temperature", SolveTime, nil, "hold temperature is not known"},
		{"celsius", SolveTime, &SolveOptions{Temperature: 92.5}, "°C read as kelvin"},
		{"unknown method", SolveTime, &SolveOptions{Temperature: 1200, Method: "bayes"}, "unknown interval method"},
		{"level", SolveTime, &SolveOptions{Temperature: 1200, Level: 95}, "between 0 and 1"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, err := tc.solve(obs, cal, tc.o)
			if err == nil || !errors.Is(err, fit.ErrBadInput) || !strings.Contains(err.Error(), tc.want) {
				t.Errorf("got %v, want a bad-input error saying %q", err, tc.want)
			}
		})
	}
	// A Dt beyond what any temperature gives: no answer.
	huge := Observation{LnDt: cal.LnD0 + math.Log(3600) + 5}
	if _, err := SolveTemperature(huge, cal, &SolveOptions{Time: 3600}); !errors.Is(err, fit.ErrNoAnswer) {
		t.Errorf("impossible Dt: %v", err)
	}
	// A bad calibration.
	bad := cal
	bad.Q = -1
	if _, err := SolveTemperature(obs, bad, &SolveOptions{Time: 3600}); !errors.Is(err, fit.ErrBadInput) {
		t.Errorf("negative Q: %v", err)
	}
}

// TestSolveIntervalEdgeCases: no interval from a two-temperature line,
// an unbounded Fieller set when Q is not significant, and the
// extrapolation warning.
func TestSolveIntervalEdgeCases(t *testing.T) {
	cal := testCalibration(t)
	obs := Observation{LnDt: simLnD(1500) + math.Log(3600), VarLnDt: 0.01}
	two := cal
	two.NoInterval = true
	s, err := SolveTemperature(obs, two, &SolveOptions{Time: 3600})
	if err != nil || !s.Temperature.CI.Open() || !hasWarning(s.Warnings, "no-interval") {
		t.Errorf("two temperatures: %v %v %v", err, s.Temperature.CI, s.Warnings)
	}
	if !hasWarning(s.Warnings, "extrapolation") {
		t.Errorf("1500 K from a 1123–1323 K calibration: no extrapolation warning")
	}
	vague := cal
	vague.Cov[1][1] = cal.Q * cal.Q // se(Q) = Q
	vague.Cov[0][1] = 0
	s, err = SolveTemperature(obs, vague, &SolveOptions{Time: 3600})
	if err != nil || !s.Temperature.CI.Open() || !hasWarning(s.Warnings, "unbounded-interval") {
		t.Errorf("vague Q: %v %v %v", err, s.Temperature.CI, s.Warnings)
	}
}

// TestObservationFromResult: D·t when the time is known, Dt itself when not.
func TestObservationFromResult(t *testing.T) {
	r := &fit.Result{ID: "P7", Converged: true, Time: 7200, Temperature: 1200,
		Params: []fit.Estimate{{Name: "D", Value: 2e-11, StdErrLn: 0.1}}}
	o, err := ObservationFromResult(r)
	if err != nil {
		t.Fatal(err)
	}
	near(t, "ln Dt", o.LnDt, math.Log(2e-11*7200), 1e-14)
	r.Time = 0
	r.Params[0].Value = 1.4e-7 // Dt in m²
	o, _ = ObservationFromResult(r)
	near(t, "ln Dt (time unknown)", o.LnDt, math.Log(1.4e-7), 1e-14)
	if o.Time != 0 || math.Abs(o.VarLnDt-0.01) > 1e-15 {
		t.Errorf("observation %+v", o)
	}
}

// TestSolutionJSON checks the keys promised in docs/output.md.
func TestSolutionJSON(t *testing.T) {
	cal := testCalibration(t)
	s, err := SolveTemperature(Observation{ID: "P7", LnDt: simLnD(1200) + math.Log(3600), VarLnDt: 0.01}, cal, &SolveOptions{Time: 3600, Method: "both", Seed: 1})
	if err != nil {
		t.Fatal(err)
	}
	b, err := json.Marshal(s)
	if err != nil {
		t.Fatal(err)
	}
	var m map[string]any
	if err := json.Unmarshal(b, &m); err != nil {
		t.Fatal(err)
	}
	if m["solve_for"] != "temperature" {
		t.Errorf("solve_for %v", m["solve_for"])
	}
	tk := m["temperature_K"].(map[string]any)
	if _, ok := tk["value"].(float64); !ok || len(tk["ci"].([]any)) != 2 || tk["ci_method"] != "fieller" {
		t.Errorf("temperature_K %v", tk)
	}
	if ts := m["time_s"].(map[string]any); ts["given"] != true {
		t.Errorf("time_s %v", ts)
	}
	for _, k := range []string{"Dt", "calibration", "monte_carlo", "cautions", "warnings", "ci_level"} {
		if _, ok := m[k]; !ok {
			t.Errorf("key %q missing in %s", k, b)
		}
	}
}
