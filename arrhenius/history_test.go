package arrhenius

import (
	"errors"
	"math"
	"strings"
	"testing"

	"github.com/fickfit/fickfit/fit"
	"github.com/fickfit/fickfit/internal/tempfmt"
	"github.com/fickfit/fickfit/profile"
)

// e1 is the exponential integral E1(z) for z > 1 by its continued fraction
// (Abramowitz & Stegun, Handbook of Mathematical Functions, 1964, eq.
// 5.1.22; from memory), evaluated backwards with 300 terms.
func e1(z float64) float64 {
	f := 0.0
	for n := 300; n >= 1; n-- {
		f = float64(n*n) / (z + float64(2*n+1) - f)
	}
	return math.Exp(-z) / (z + 1 - f)
}

// rampIntegral is ∫exp(−A/T)dt over a linear ramp from T0 to T1 lasting
// dt: (dt/(T1 − T0))·[T e^{−A/T} − A·E1(A/T)] between T0 and T1 (the
// antiderivative follows from d/dT E1(A/T) = e^{−A/T}/T).
func rampIntegral(A, T0, T1, dt float64) float64 {
	F := func(T float64) float64 { return T*math.Exp(-A/T) - A*e1(A/T) }
	return dt / (T1 - T0) * (F(T1) - F(T0))
}

func furnaceLog() *profile.History {
	// heat 300 → 1200 K in 2 h, hold 4 h, cool to 400 K in 3 h
	return &profile.History{Source: "furnace.csv",
		Time: []float64{0, 7200, 21600, 32400}, Temp: []float64{300, 1200, 1200, 400}, Line: []int{2, 3, 4, 5}}
}

// TestIntegralDRamp: external check against the closed form of the
// temperature integral with the exponential integral (A&S 5.1.22).
func TestIntegralDRamp(t *testing.T) {
	D0, Q := 2.3e-5, 148e3
	A := Q / R
	want := D0 * (rampIntegral(A, 300, 1200, 7200) + math.Exp(-A/1200)*14400 + rampIntegral(A, 1200, 400, 10800))
	got, err := IntegralD(furnaceLog(), D0, Q)
	if err != nil {
		t.Fatal(err)
	}
	near(t, "∫D dt", got, want, 1e-10)
	// A single steep ramp alone (no hold) as well.
	h := &profile.History{Time: []float64{0, 600}, Temp: []float64{500, 1400}}
	got, _ = IntegralD(h, D0, Q)
	near(t, "∫D dt over one ramp", got, D0*rampIntegral(A, 500, 1400, 600), 1e-10)
}

// TestEquivalentTimeTextbook: external check. Callister & Rethwisch, 8th
// ed. (2010), Example Problem 5.3 (number and values from memory): D of Cu
// in Al is 4.8e-14 m²/s at 500 °C and 5.3e-13 m²/s at 600 °C; a 10 h
// treatment at 600 °C equals 110.4 h at 500 °C. (The book uses 773 and 873 K.)
func TestEquivalentTimeTextbook(t *testing.T) {
	Q := R * math.Log(5.3e-13/4.8e-14) / (1.0/773 - 1.0/873)
	h := &profile.History{Time: []float64{0, 10 * 3600}, Temp: []float64{873, 873}}
	teq, err := EquivalentTime(h, Q, 773)
	if err != nil {
		t.Fatal(err)
	}
	near(t, "time at 500 °C (h)", teq/3600, 110.4, 5e-4)
	// The effective temperature of an isothermal log is its temperature.
	te, _ := EffectiveTemperature(h, Q)
	near(t, "effective temperature", te, 873, 1e-12)
}

// TestIsothermalLog: a constant log integrates exactly to D·t.
func TestIsothermalLog(t *testing.T) {
	c := Reference{D0: 2.3e-5, Q: 148e3}
	h := &profile.History{Time: []float64{100, 1000, 14500}, Temp: []float64{1200, 1200, 1200}}
	got, _ := IntegralD(h, c.D0, c.Q)
	near(t, "∫D dt", got, c.D(1200)*14400, 1e-13)
}

func TestHistoryBadInput(t *testing.T) {
	for _, tc := range []struct {
		name string
		h    *profile.History
		want string
		line int
	}{
		{"time goes back", &profile.History{Source: "log.csv", Time: []float64{0, 60, 30, 90}, Temp: []float64{300, 900, 950, 950}, Line: []int{2, 3, 4, 5}}, "not later than the previous row", 4},
		{"repeated time", &profile.History{Source: "log.csv", Time: []float64{0, 60, 60}, Temp: []float64{300, 900, 950}, Line: []int{2, 3, 4}}, "not later than the previous row", 4},
		{"one row", &profile.History{Time: []float64{0}, Temp: []float64{900}}, "at least 2 rows", 0},
		{"negative kelvin", &profile.History{Time: []float64{0, 1}, Temp: []float64{900, -3}}, "not a positive number of kelvin", 0},
		{"nil", nil, "no thermal history", 0},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, err := IntegralD(tc.h, 1e-5, 1e5)
			var e *Error
			if err == nil || !errors.As(err, &e) || !errors.Is(err, fit.ErrBadInput) || !strings.Contains(err.Error(), tc.want) {
				t.Fatalf("got %v, want an error saying %q", err, tc.want)
			}
			if e.Line != tc.line {
				t.Errorf("line %d, want %d (%v)", e.Line, tc.line, err)
			}
		})
	}
	if _, err := EquivalentTime(furnaceLog(), 1e5, 0); err == nil {
		t.Error("Tref = 0 accepted")
	}
}

// TestHistoryLevelIsothermal: analytic cross-check. For an isothermal log
// the level solution and its test-inversion interval are exactly
// SolveTemperature's value and Fieller interval.
func TestHistoryLevelIsothermal(t *testing.T) {
	cal := testCalibration(t)
	obs := Observation{ID: "part", LnDt: simLnD(1190) + math.Log(14400), VarLnDt: 0.04}
	ft, err := SolveTemperature(obs, cal, &SolveOptions{Time: 14400})
	if err != nil {
		t.Fatal(err)
	}
	for _, mode := range []LogAdjust{Shift, Scale} {
		h := &profile.History{Time: []float64{0, 14400}, Temp: []float64{1150, 1150}}
		s, err := SolveHistoryLevel(obs, cal, h, mode, nil)
		if err != nil {
			t.Fatal(err)
		}
		near(t, mode.String()+" T", s.Temperature.Value, ft.Temperature.Value, 1e-10)
		near(t, mode.String()+" lo", s.Temperature.CI.Lo, ft.Temperature.CI.Lo, 1e-9)
		near(t, mode.String()+" hi", s.Temperature.CI.Hi, ft.Temperature.CI.Hi, 1e-9)
	}
}

// TestHistoryLevelRecovery: self-check. The Dt of a furnace log raised by
// 15 K is solved back to +15 K (shift) and to the same hold temperature
// (scale); Monte Carlo agrees with the test-inversion interval.
func TestHistoryLevelRecovery(t *testing.T) {
	cal := testCalibration(t)
	h := furnaceLog()
	shifted := &profile.History{Time: h.Time, Temp: []float64{315, 1215, 1215, 415}}
	dt, err := IntegralD(shifted, cal.D0(), cal.Q)
	if err != nil {
		t.Fatal(err)
	}
	obs := Observation{ID: "part", LnDt: math.Log(dt), VarLnDt: 0.05 * 0.05}
	s, err := SolveHistoryLevel(obs, cal, h, Shift, &SolveOptions{Method: "both", Draws: 4000, Seed: 3})
	if err != nil {
		t.Fatal(err)
	}
	near(t, "shift", s.Adjustment.Value, 15, 1e-7)
	near(t, "hold temperature", s.Temperature.Value, 1215, 1e-9)
	ci, mc := s.Temperature.CI, s.MonteCarlo.CI
	hw := (ci.Hi - ci.Lo) / 2
	if math.Abs(ci.Lo-mc.Lo) > 0.08*hw || math.Abs(ci.Hi-mc.Hi) > 0.08*hw {
		t.Errorf("test inversion %v vs Monte Carlo %v (half-width %g)", ci, mc, hw)
	}
	t.Logf("hold %.2f K, test inversion [%.2f, %.2f], Monte Carlo [%.2f, %.2f]", s.Temperature.Value, ci.Lo, ci.Hi, mc.Lo, mc.Hi)
	sc, err := SolveHistoryLevel(obs, cal, h, Scale, nil)
	if err != nil {
		t.Fatal(err)
	}
	// Scaling the log changes its shape slightly, so the hold temperature
	// differs from the shift's by much less than the interval.
	if math.Abs(sc.Temperature.Value-1215) > 0.1*hw {
		t.Errorf("scale: hold %g", sc.Temperature.Value)
	}
}

// testCalibration is a two-stage line fitted to a seeded simulated campaign.
func testCalibration(t testing.TB) Calibration {
	t.Helper()
	l, err := TwoStage(simPoints(newRand(3, 4), 3, 0.1, 0), nil)
	if err != nil {
		t.Fatal(err)
	}
	return l.Calibration()
}

// TestWithHistory: self-check. A profile simulated for a furnace log is
// fitted through its equivalent time and gives D at the reference
// temperature (the log acts only through ∫D dt).
func TestWithHistory(t *testing.T) {
	h := furnaceLog()
	dt, _ := IntegralD(h, simD0, simQ)
	Tref := 1200.0
	// A profile whose Dt is the log's ∫D dt: simulate at Tref for t_eq.
	teq := dt / math.Exp(simLnD(Tref))
	p := simProfile(newRand(9, 9), "part", Tref, teq, 1.0, 0.2, 3e-3, 60, 0.005)
	p.Time, p.Temperature = 0, 0
	p.Meta = map[string]string{"lot": "L1"}
	q, err := WithHistory(p, h, simQ, 0)
	if err != nil {
		t.Fatal(err)
	}
	near(t, "equivalent time", q.Time, teq, 1e-9)
	if q.Temperature != 1200 || q.Meta["history"] != "furnace.csv" || p.Meta["history"] != "" || q.Meta["lot"] != "L1" {
		t.Errorf("profile %+v", q)
	}
	r, err := fit.Fit(&q, fit.Options{CI: "wald"})
	if err != nil {
		t.Fatal(err)
	}
	lnD, se, _ := r.LnD()
	if math.Abs(lnD-simLnD(Tref)) > 4*se {
		t.Errorf("D at Tref: ln D = %g ± %g, true %g", lnD, se, simLnD(Tref))
	}
}

// TestSpikes: a single 1500 °C row in a 925 °C hold is a spike, named with
// its line and its effect on ∫D dt; a ramp, a step to a new level and the
// ends of the log are not.
func TestSpikes(t *testing.T) {
	h := &profile.History{Source: "log.csv", Time: []float64{0, 600, 1200, 1800, 2400, 3000, 3600},
		Temp: []float64{300, 1198.15, 1198.15, 1773.15, 1199.15, 1198.15, 1273.15}, Line: []int{2, 3, 4, 5, 6, 7, 8}}
	sp := Spikes(h)
	if len(sp) != 1 || sp[0].Line != 5 || math.Abs(sp[0].Expected-1198.65) > 1e-9 {
		t.Fatalf("spikes %+v", sp)
	}
	ws := spikeWarnings(h, 148e3)
	if len(ws) != 1 || ws[0].Code != "history-spike" || !strings.Contains(tempfmt.Plain(ws[0].Message), "reads 1773.15 K at line 5") ||
		!strings.Contains(ws[0].Message, "times what it is") {
		t.Errorf("warning %+v", ws)
	}
	// A ramp and a new level are not spikes.
	ramp := &profile.History{Time: []float64{0, 600, 1200, 1800}, Temp: []float64{900, 1000, 1100, 1100}}
	if sp := Spikes(ramp); len(sp) != 0 {
		t.Errorf("ramp: %+v", sp)
	}
}
