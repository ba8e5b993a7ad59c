package arrhenius

import (
	"math"

	"github.com/fickfit/fickfit/fit"
	"github.com/fickfit/fickfit/internal/jsonx"
)

// PredictOptions control forward predictions. The zero value gives 95 %
// bands and refuses temperatures below 273.15 K as probable °C.
type PredictOptions struct {
	// Level is the confidence level of the bands; 0 means 0.95.
	Level float64
	// ColdOK accepts temperatures below 273.15 K as kelvin.
	ColdOK bool
}

// ProfilePoint is one depth of a predicted profile with its band (Lo,
// Hi: the mean line) and the prediction interval of a single part
// (PartLo, PartHi).
type ProfilePoint struct {
	Depth          float64 `json:"depth_m"`
	Value          float64 `json:"value"`
	Lo, Hi         float64 `json:"-"`
	PartLo, PartHi float64 `json:"-"`
}

// MarshalJSON writes {"depth_m","value","lo","hi","part_lo","part_hi"}
// (null for an open end or no interval).
func (p ProfilePoint) MarshalJSON() ([]byte, error) {
	return jsonx.Marshal(struct {
		Depth  float64  `json:"depth_m"`
		Value  float64  `json:"value"`
		Lo     *float64 `json:"lo"`
		Hi     *float64 `json:"hi"`
		PartLo *float64 `json:"part_lo"`
		PartHi *float64 `json:"part_hi"`
	}{p.Depth, p.Value, num(p.Lo), num(p.Hi), num(p.PartLo), num(p.PartHi)})
}

// Prediction is a forward use of a calibration for schedule planning.
type Prediction struct {
	// Kind is "profile", "case-depth" or "time-to-depth".
	Kind string
	// Temperature is the hold temperature (given) or, for a log, the
	// effective temperature 1/(R·x_eff) that acts for error propagation.
	Temperature Quantity
	// Time is the hold time (given), the log's duration, or for
	// "time-to-depth" the solved time with its interval.
	Time Quantity
	// HistorySource names the log used, if any.
	HistorySource string
	// Dt is Dt (or ∫D dt) in m² with the band from the calibration.
	Dt Quantity
	// Cs, C0 are the surface and base levels; Threshold the case-depth criterion.
	Cs, C0, Threshold float64
	// Profile holds the predicted profile C(x) with its band.
	Profile []ProfilePoint
	// CaseDepth is the depth (m) where C = Threshold ("case-depth") or the
	// target depth (given, "time-to-depth").
	CaseDepth *Quantity
	Level     float64
	// Calibration is what the prediction rests on.
	Calibration Calibration
	Warnings    []fit.Warning
	Cautions    []string
}

// MarshalJSON writes
//
//	{"kind":"case-depth","temperature_K":{…},"time_s":{…},"history":"furnace.csv",
//	 "Dt":{"value","unit":"m2","ci"},"Cs":1.0,"C0":0.2,"threshold":0.4,
//	 "case_depth_m":{"value","unit":"m","ci"},"profile":[{"depth_m","value","lo","hi"}],
//	 "ci_level":0.95,"calibration":{"method","source","D0","Q","cov_lnD0_Q","dof"},
//	 "warnings":[…],"cautions":[…]}
func (p Prediction) MarshalJSON() ([]byte, error) {
	out := struct {
		Kind        string          `json:"kind"`
		Temperature Quantity        `json:"temperature_K"`
		Time        Quantity        `json:"time_s"`
		History     string          `json:"history,omitempty"`
		Dt          Quantity        `json:"Dt"`
		Cs          float64         `json:"Cs"`
		C0          float64         `json:"C0"`
		Threshold   *float64        `json:"threshold,omitempty"`
		CaseDepth   *Quantity       `json:"case_depth_m,omitempty"`
		Profile     []ProfilePoint  `json:"profile,omitempty"`
		Level       float64         `json:"ci_level"`
		Calibration CalibrationJSON `json:"calibration"`
		Warnings    []fit.Warning   `json:"warnings"`
		Cautions    []string        `json:"cautions"`
	}{Kind: p.Kind, Temperature: p.Temperature, Time: p.Time, History: p.HistorySource, Dt: p.Dt,
		Cs: p.Cs, C0: p.C0, CaseDepth: p.CaseDepth, Profile: p.Profile, Level: p.Level,
		Calibration: p.Calibration.JSON(),
		Warnings:    p.Warnings, Cautions: p.Cautions}
	if p.Kind != "profile" {
		out.Threshold = num(p.Threshold)
	}
	if out.Warnings == nil {
		out.Warnings = []fit.Warning{}
	}
	return jsonx.Marshal(out)
}

func (p *Prediction) warn(code, msg string) {
	p.Warnings = append(p.Warnings, fit.Warning{Code: code, Message: msg})
}

// newPrediction computes Dt for the exposure with its band.
func newPrediction(kind string, cal Calibration, e Exposure, cs, c0 float64, o *PredictOptions) (*Prediction, float64, float64, error) {
	var opt PredictOptions
	if o != nil {
		opt = *o
	}
	level, err := levelOr(opt.Level)
	if err != nil {
		return nil, 0, 0, err
	}
	if err := cal.validate(); err != nil {
		return nil, 0, 0, err
	}
	if !finite(cs) || !finite(c0) {
		return nil, 0, 0, badInput("", "levels", "surface level Cs = %g and base level C0 = %g must be numbers", cs, c0)
	}
	if cs == c0 {
		return nil, 0, 0, badInput("", "levels", "surface level Cs and base level C0 are equal (%g): there is no profile to predict", cs)
	}
	if e.History == nil {
		if err := checkTemperatures([]string{""}, []string{""}, []float64{e.Temperature}, opt.ColdOK); err != nil {
			return nil, 0, 0, err
		}
	}
	lnDt, v, x, err := e.lnDt(cal)
	if err != nil {
		return nil, 0, 0, err
	}
	p := &Prediction{Kind: kind, Cs: cs, C0: c0, Level: level, Calibration: cal,
		Cautions: append([]string(nil), Cautions...), Warnings: []fit.Warning{}, Threshold: nan}
	if cal.Method == "reference" {
		p.warn("reference-literature", ReferenceNote)
	}
	if e.History != nil {
		p.Warnings = append(p.Warnings, spikeWarnings(e.History, cal.Q)...)
		p.HistorySource = e.History.Source
		p.Temperature = Quantity{Value: tEffOf(x), Unit: "K", Given: true}
		p.Time = Quantity{Value: e.History.Time[len(e.History.Time)-1] - e.History.Time[0], Unit: "s", Given: true}
		if e.History.Source == "" {
			p.HistorySource = "history"
		}
	} else {
		p.Temperature = Quantity{Value: e.Temperature, Unit: "K", Given: true}
		p.Time = Quantity{Value: e.Time, Unit: "s", Given: true}
	}
	se := math.Sqrt(v)
	p.Dt = Quantity{Value: math.Exp(lnDt), Unit: "m2", CI: fit.Interval{Lo: nan, Hi: nan}, Method: "wald-log"}
	if cal.NoInterval {
		p.warn("no-interval", "The calibration rests on only two temperatures: the prediction carries no band. Calibrate at a third temperature.")
		p.Dt.Method = ""
	} else {
		k := cal.quantile(level)
		p.Dt.CI = fit.Interval{Lo: math.Exp(lnDt - k*se), Hi: math.Exp(lnDt + k*se)}
		if cal.PartVar > 0 {
			sp := math.Sqrt(v + cal.PartVar)
			p.Dt.PI = &fit.Interval{Lo: math.Exp(lnDt - k*sp), Hi: math.Exp(lnDt + k*sp)}
		}
		if !cal.hasCov() {
			p.warn("calibration-without-uncertainty", "The calibration carries no uncertainty (reference or explicit values without one): the band has zero width and says nothing about the real spread.")
		}
	}
	T := p.Temperature.Value
	if cal.TMin > 0 && cal.TMax > 0 && (T < cal.TMin-1e-9 || T > cal.TMax+1e-9) {
		p.warn("extrapolation", tk(T)+" lies outside the calibration's range "+tk(cal.TMin)+" to "+tk(cal.TMax)+": the prediction extrapolates the Arrhenius line and assumes no change of mechanism or phase.")
	}
	if p.Dt.PI != nil {
		p.warn("mean-line-band", "The band is that of the mean Arrhenius line (calibration uncertainty). A single part also varies about the line, as the calibration coupons did: its prediction interval is given beside the band, and a failure analyst's part is one part.")
	} else {
		p.warn("mean-line-band", "The band is that of the mean Arrhenius line (calibration uncertainty); a single part also varies about the line, by an amount this calibration does not tell.")
	}
	return p, lnDt, se, nil
}

// erfProfile is the constant-surface solution C = Cs + (C0 − Cs)·erf(x/(2√(Dt)))
// (Crank, The Mathematics of Diffusion, 2nd ed., 1975, ch. 3; from memory).
func erfProfile(x, dt, cs, c0 float64) float64 {
	return cs + (c0-cs)*math.Erf(x/(2*math.Sqrt(dt)))
}

// PredictProfile predicts the profile C(x) at the given depths (m) after
// the exposure, for the erf model (constant surface level Cs, uniform base
// level C0, semi-infinite body) with Dt (or ∫D dt for a log) from the
// calibration. Band: C is monotone in Dt at every depth, so the band is C
// at the ends of Dt's interval exp(ln Dt ± k·se), se from the calibration
// covariance (delta method for a log, with x_eff).
func PredictProfile(cal Calibration, e Exposure, cs, c0 float64, depths []float64, o *PredictOptions) (*Prediction, error) {
	p, _, _, err := newPrediction("profile", cal, e, cs, c0, o)
	if err != nil {
		return nil, err
	}
	for i, x := range depths {
		if !(x >= 0) || !finite(x) {
			return nil, badInput("", "depth", "depth %d (%g m) must be a number ≥ 0", i+1, x)
		}
		pp := ProfilePoint{Depth: x, Value: erfProfile(x, p.Dt.Value, cs, c0), Lo: nan, Hi: nan, PartLo: nan, PartHi: nan}
		if !p.Dt.CI.Open() {
			a := erfProfile(x, p.Dt.CI.Lo, cs, c0)
			b := erfProfile(x, p.Dt.CI.Hi, cs, c0)
			pp.Lo, pp.Hi = math.Min(a, b), math.Max(a, b)
		}
		if pi := p.Dt.PI; pi != nil {
			a := erfProfile(x, pi.Lo, cs, c0)
			b := erfProfile(x, pi.Hi, cs, c0)
			pp.PartLo, pp.PartHi = math.Min(a, b), math.Max(a, b)
		}
		p.Profile = append(p.Profile, pp)
	}
	return p, nil
}

// thresholdU returns u = erfc⁻¹((Cth − C0)/(Cs − C0)), the value of
// x/(2√(Dt)) at which the erf profile crosses Cth: from
// C = Cs + (C0 − Cs)·erf(u) follows (C − C0)/(Cs − C0) = erfc(u).
func thresholdU(cs, c0, th float64) (float64, error) {
	r := (th - c0) / (cs - c0)
	if !(r > 0 && r < 1) || !finite(th) {
		return 0, badInput("", "threshold", "the case-depth threshold %g must lie strictly between the base level C0 = %g and the surface level Cs = %g", th, c0, cs)
	}
	return math.Erfcinv(r), nil
}

// PredictCaseDepth predicts the case depth — the depth where the erf
// profile crosses the threshold — after the exposure:
//
//	x_c = 2√(Dt)·erfc⁻¹((C_th − C0)/(Cs − C0)).
//
// Band: x_c ∝ √(Dt), so the band is x_c at the ends of Dt's interval.
func PredictCaseDepth(cal Calibration, e Exposure, cs, c0, threshold float64, o *PredictOptions) (*Prediction, error) {
	u, err := thresholdU(cs, c0, threshold)
	if err != nil {
		return nil, err
	}
	p, _, _, err := newPrediction("case-depth", cal, e, cs, c0, o)
	if err != nil {
		return nil, err
	}
	p.Threshold = threshold
	depth := func(dt float64) float64 { return 2 * u * math.Sqrt(dt) }
	q := &Quantity{Value: depth(p.Dt.Value), Unit: "m", CI: fit.Interval{Lo: nan, Hi: nan}, Method: p.Dt.Method}
	if !p.Dt.CI.Open() {
		q.CI = fit.Interval{Lo: depth(p.Dt.CI.Lo), Hi: depth(p.Dt.CI.Hi)}
	}
	if pi := p.Dt.PI; pi != nil {
		q.PI = &fit.Interval{Lo: depth(pi.Lo), Hi: depth(pi.Hi)}
	}
	p.CaseDepth = q
	return p, nil
}

// TimeToDepth returns the hold time at temperature T (K) for the erf case
// depth to reach depth (m) at the threshold:
//
//	t = (depth/(2u))² / D(T),  u = erfc⁻¹((C_th − C0)/(Cs − C0)).
//
// Interval: ln t = 2 ln(depth/(2u)) − ln D(T) is linear in (ln D0, Q), so
// ln t ± k·se(ln D(T)) is exact under normality (Student-t with the
// calibration's dof).
func TimeToDepth(cal Calibration, T, cs, c0, threshold, depth float64, o *PredictOptions) (*Prediction, error) {
	u, err := thresholdU(cs, c0, threshold)
	if err != nil {
		return nil, err
	}
	if !(depth > 0) || !finite(depth) {
		return nil, badInput("", "depth", "the target case depth %g m must be > 0", depth)
	}
	dtNeed := (depth / (2 * u)) * (depth / (2 * u))
	// Evaluate at a nominal one second, then rescale the time.
	p, _, se, err := newPrediction("time-to-depth", cal, Exposure{Temperature: T, Time: 1}, cs, c0, o)
	if err != nil {
		return nil, err
	}
	p.Threshold = threshold
	p.CaseDepth = &Quantity{Value: depth, Unit: "m", Given: true}
	D := p.Dt.Value // Dt for t = 1 s
	t := dtNeed / D
	p.Dt = Quantity{Value: dtNeed, Unit: "m2", Given: true}
	p.Time = Quantity{Value: t, Unit: "s", CI: fit.Interval{Lo: nan, Hi: nan}}
	if !cal.NoInterval {
		k := cal.quantile(p.Level)
		p.Time.CI = fit.Interval{Lo: t * math.Exp(-k*se), Hi: t * math.Exp(k*se)}
		p.Time.Method = "wald-log"
		if cal.PartVar > 0 {
			sp := math.Sqrt(se*se + cal.PartVar)
			p.Time.PI = &fit.Interval{Lo: t * math.Exp(-k*sp), Hi: t * math.Exp(k*sp)}
		}
	}
	return p, nil
}
