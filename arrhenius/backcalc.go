package arrhenius

import (
	"fmt"
	"math"
	"math/rand/v2"
	"sort"

	"gonum.org/v1/gonum/stat/distuv"

	"github.com/fickfit/fickfit/fit"
	"github.com/fickfit/fickfit/internal/jsonx"
	"github.com/fickfit/fickfit/internal/stats"
	"github.com/fickfit/fickfit/profile"
)

// Observation is what a part's fitted profile says about its exposure:
// ln(Dt) and its variance. When the profile's time was known the fit
// reported D, and Dt = D·time; when it was not, the fit reported Dt itself.
type Observation struct {
	ID, Source string
	LnDt       float64 // ln(Dt / m²)
	VarLnDt    float64 // Var(ln Dt) from the profile fit
	// Time (s), Temperature and TemperatureSigma (K) as the profile states
	// them; 0 when not given.
	Time, Temperature, TemperatureSigma float64
}

// ObservationFromResult reads the observation of a fitted profile. Its
// "D" is Dt (m²) when the result's Time is 0, else D (m²/s) and
// Dt = D·Time. Var(ln Dt) = StdErrLn² of "D".
func ObservationFromResult(r *fit.Result) (Observation, error) {
	if r == nil {
		return Observation{}, badInput("", "result", "missing fit result")
	}
	e := func(field, format string, args ...any) error {
		err := badInput(r.ID, field, format, args...)
		err.Source = r.Source
		return err
	}
	if !r.Converged {
		return Observation{}, e("fit", "the profile fit did not converge: there is nothing to back-calculate from")
	}
	d := r.Param("D")
	if d == nil {
		return Observation{}, e("D", "the %s model has no parameter D", r.Model)
	}
	if d.Fixed {
		return Observation{}, e("D", "D was fixed in the fit, not measured; free it to back-calculate")
	}
	if !(d.Value > 0) || !finite(d.Value) {
		return Observation{}, e("D", "D = %g is not a positive number", d.Value)
	}
	se := d.StdErrLn
	if se == 0 && d.StdErr > 0 {
		se = d.StdErr / d.Value
	}
	o := Observation{ID: r.ID, Source: r.Source, LnDt: math.Log(d.Value), VarLnDt: se * se,
		Temperature: r.Temperature, TemperatureSigma: r.TemperatureSigma}
	if r.Time > 0 {
		o.Time = r.Time
		o.LnDt += math.Log(r.Time)
	}
	return o, nil
}

// SolveOptions control back-calculation. The zero value gives 95 %
// analytic intervals (Fieller for temperature, exact Wald on ln t for
// time) and no Monte Carlo.
type SolveOptions struct {
	// Level is the confidence level; 0 means 0.95.
	Level float64
	// Time (s) is the hold time when solving for temperature; 0 takes the
	// observation's.
	Time float64
	// Temperature (K) is the hold temperature when solving for time; 0 takes
	// the observation's. TemperatureSigma is its standard uncertainty (K); 0
	// takes the observation's.
	Temperature, TemperatureSigma float64
	// Method is SolveAnalytic (the default when ""), SolveMonteCarlo
	// (percentile interval of Draws simulations) or SolveBoth (analytic interval reported,
	// Monte Carlo beside it as a check). No Monte Carlo runs when the
	// calibration gives no interval.
	Method SolveMethod
	// Draws is the number of Monte Carlo draws; 0 means 10⁴.
	Draws int
	// Seed seeds the Monte Carlo generator (PCG); the same seed gives the
	// same interval.
	Seed uint64
	// ColdOK accepts temperatures below 273.15 K as kelvin.
	ColdOK bool
}

func (o *SolveOptions) defaults() (SolveOptions, error) {
	var out SolveOptions
	if o != nil {
		out = *o
	}
	var err error
	if out.Level, err = levelOr(out.Level); err != nil {
		return out, err
	}
	if out.Method, err = ParseSolveMethod(string(out.Method)); err != nil {
		return out, badInput("", "method", "%v", err)
	}
	if out.Draws == 0 {
		out.Draws = 10000
	}
	if out.Draws < 100 {
		return out, badInput("", "draws", "%d Monte Carlo draws are too few for a %g %% interval (use 10000 or more)", out.Draws, 100*out.Level)
	}
	return out, nil
}

func (o SolveOptions) mc() bool { return o.Method == SolveMonteCarlo || o.Method == SolveBoth }

// Quantity is a solved or given number with its interval.
type Quantity struct {
	Value float64
	Unit  string
	// CI is the interval (open ends NaN); unused when Given.
	CI fit.Interval
	// Method names how CI was obtained: "fieller", "wald-log", "test-inversion",
	// "monte-carlo", "" when there is none.
	Method string
	// Given is true for an input, not a result.
	Given bool
	// PI is the prediction interval of a single new part (predictions
	// only; nil when there is none): CI is the band of the mean line.
	PI *fit.Interval
}

// MarshalJSON writes {"value","unit","ci","ci_method"} (with
// "prediction_interval" when there is one) or {"value","unit","given":true}.
func (q Quantity) MarshalJSON() ([]byte, error) {
	type out struct {
		Value  *float64      `json:"value"`
		Unit   string        `json:"unit"`
		CI     *fit.Interval `json:"ci,omitempty"`
		Method string        `json:"ci_method,omitempty"`
		PI     *fit.Interval `json:"prediction_interval,omitempty"`
		Given  bool          `json:"given,omitempty"`
	}
	o := out{Value: num(q.Value), Unit: q.Unit, Given: q.Given, PI: q.PI}
	if !q.Given {
		ci := q.CI
		o.CI, o.Method = &ci, q.Method
	}
	return jsonx.Marshal(o)
}

// MonteCarlo summarises a Monte Carlo interval.
type MonteCarlo struct {
	Draws  int          `json:"draws"`
	Seed   uint64       `json:"seed"`
	Median float64      `json:"median"`
	CI     fit.Interval `json:"ci"`
	// NonPhysical is the fraction of draws that gave no finite answer (a
	// drawn Q ≤ 0, or a Dt beyond what any temperature gives); they count
	// as beyond the upper end.
	NonPhysical float64 `json:"nonphysical_fraction"`
}

// MarshalJSON writes non-finite numbers (an open end) as null.
func (m MonteCarlo) MarshalJSON() ([]byte, error) {
	return jsonx.Marshal(struct {
		Draws       int          `json:"draws"`
		Seed        uint64       `json:"seed"`
		Median      *float64     `json:"median"`
		CI          fit.Interval `json:"ci"`
		NonPhysical float64      `json:"nonphysical_fraction"`
	}{m.Draws, m.Seed, num(m.Median), m.CI, m.NonPhysical})
}

// Solution is a back-calculated exposure.
type Solution struct {
	// SolveFor is "temperature", "time" or "hold-temperature" (level of a log).
	SolveFor    string
	ID          string
	Temperature Quantity // K
	Time        Quantity // s (the log's duration for a history)
	// LnDt and VarLnDt are the part's measured ln(Dt) and its variance.
	LnDt, VarLnDt float64
	Level         float64
	Calibration   Calibration
	// MonteCarlo is set when Monte Carlo was run (as the interval or beside it).
	MonteCarlo *MonteCarlo
	// Adjustment is the fitted level of a log (SolveHistoryLevel): δ in K
	// for Shift, the factor s for Scale; AdjustMode says which.
	Adjustment *Quantity
	AdjustMode string
	Warnings   []fit.Warning
	Cautions   []string
}

// MarshalJSON writes
//
//	{"solve_for":"temperature","id":…,"temperature_K":{"value","unit":"K","ci","ci_method"},
//	 "time_s":{"value","unit":"s","given":true},"Dt":{"value","unit":"m2","stderr_ln"},
//	 "ci_level":0.95,"calibration":{"method","source","D0","Q","cov_lnD0_Q","dof"},
//	 "monte_carlo":{…},"level_adjustment":{"mode":"shift",…},"warnings":[…],"cautions":[…]}
func (s Solution) MarshalJSON() ([]byte, error) {
	type dt struct {
		Value    float64  `json:"value"`
		Unit     string   `json:"unit"`
		StdErrLn *float64 `json:"stderr_ln"`
	}
	type adj struct {
		Mode   string       `json:"mode"`
		Value  float64      `json:"value"`
		Unit   string       `json:"unit"`
		CI     fit.Interval `json:"ci"`
		Method string       `json:"ci_method,omitempty"`
	}
	type out struct {
		SolveFor    string          `json:"solve_for"`
		ID          string          `json:"id,omitempty"`
		Temperature Quantity        `json:"temperature_K"`
		Time        Quantity        `json:"time_s"`
		Dt          dt              `json:"Dt"`
		Level       float64         `json:"ci_level"`
		Calibration CalibrationJSON `json:"calibration"`
		MonteCarlo  *MonteCarlo     `json:"monte_carlo,omitempty"`
		Adjustment  *adj            `json:"level_adjustment,omitempty"`
		Warnings    []fit.Warning   `json:"warnings"`
		Cautions    []string        `json:"cautions"`
	}
	o := out{SolveFor: s.SolveFor, ID: s.ID, Temperature: s.Temperature, Time: s.Time,
		Dt:    dt{Value: math.Exp(s.LnDt), Unit: "m2", StdErrLn: num(math.Sqrt(s.VarLnDt))},
		Level: s.Level, MonteCarlo: s.MonteCarlo, Warnings: s.Warnings, Cautions: s.Cautions,
		Calibration: s.Calibration.JSON()}
	if s.Adjustment != nil {
		a := s.Adjustment
		o.Adjustment = &adj{Mode: s.AdjustMode, Value: a.Value, Unit: a.Unit, CI: a.CI, Method: a.Method}
	}
	if o.Warnings == nil {
		o.Warnings = []fit.Warning{}
	}
	return jsonx.Marshal(o)
}

// fieller returns Fieller's confidence set for the ratio θ = μN/μD of two
// jointly normal estimates N, D with variances vN, vD and covariance cND:
// {θ : (N − θD)² ≤ k²(vN − 2θ·cND + θ²vD)} (E. C. Fieller, J. R. Stat.
// Soc. B 16 (1954) 175; from memory). It is a finite interval when D is
// significantly different from 0 (D² > k²vD); bounded is false otherwise.
func fieller(N, D, vN, vD, cND, k float64) (lo, hi float64, bounded bool) {
	k2 := k * k
	a := D*D - k2*vD
	if !(a > 0) {
		return nan, nan, false
	}
	bp := N*D - k2*cND
	c := N*N - k2*vN
	disc := bp*bp - a*c
	if disc < 0 {
		disc = 0
	}
	r := math.Sqrt(disc)
	return (bp - r) / a, (bp + r) / a, true
}

// SolveTemperature back-calculates the hold temperature of a part from its
// measured ln(Dt), the hold time t and an Arrhenius calibration:
//
//	1/T = R·(ln D0 − ln D)/Q,  ln D = ln(Dt) − ln t.
//
// Interval: the solution is a ratio of two normal estimates, so the
// analytic interval is Fieller's (exact under normality; it propagates the
// profile's Var(ln Dt) and the full covariance of (ln D0, Q)), with the
// calibration's Student-t quantile (normal when its covariance is taken as
// known; with a Student-t calibration the dof is Satterthwaite's effective
// value for the calibration's and the part's shares of the variance). Monte
// Carlo draws (ln D0, Q) from the bivariate normal (or t with the
// calibration's dof) and ln Dt from the normal, and takes equal-tail
// percentiles of T.
func SolveTemperature(obs Observation, cal Calibration, o *SolveOptions) (*Solution, error) {
	opt, err := o.defaults()
	if err != nil {
		return nil, err
	}
	if err := checkSolveInputs(obs, cal); err != nil {
		return nil, err
	}
	t := opt.Time
	if t == 0 {
		t = obs.Time
	}
	if !(t > 0) || !finite(t) {
		if t == 0 {
			return nil, badInput(obs.ID, "time", "the hold time is not known: give it (e.g. 4 h) to solve for the temperature")
		}
		return nil, badInput(obs.ID, "time", "time %g s must be > 0", t)
	}
	s := newSolution("temperature", obs, cal, opt)
	obs.VarLnDt += cal.ExcessVar // a single part scatters about the line as the coupons did
	s.Time = Quantity{Value: t, Unit: "s", Given: true}
	y := obs.LnDt - math.Log(t) // ln D of the part
	xc, b, vb, vq := cal.centered()
	theta := (b - y) / cal.Q
	x := xc + theta
	if !(x > 0) {
		return nil, noAnswer(obs.ID, "temperature", "the measured Dt = %.3g m² in %g s is more than this calibration gives at any temperature (D0 = %.3g m²/s): check the time, the profile fit, and that the calibration is for this material", math.Exp(obs.LnDt), t, cal.D0())
	}
	T := 1 / (R * x)
	s.Temperature = Quantity{Value: T, Unit: "K", CI: fit.Interval{Lo: nan, Hi: nan}}
	if !cal.NoInterval {
		k := cal.quantileWith(opt.Level, vb+theta*theta*vq, obs.VarLnDt)
		lo, hi, ok := fieller(b-y, cal.Q, vb+obs.VarLnDt, vq, 0, k)
		s.Temperature.CI, s.Temperature.Method = fieller2T(xc, lo, hi, ok), "fieller"
		if !ok {
			s.warn("unbounded-interval", "Q is not significantly different from zero at this level, so the temperature interval is unbounded; the calibration cannot fix the temperature.")
		}
	}
	if opt.mc() && !cal.NoInterval {
		lnt := math.Log(t)
		s.MonteCarlo = monteCarlo(obs, cal, opt, 0, 0, func(lnD0, q, kappa, _ float64) float64 {
			x := (lnD0 - (kappa - lnt)) / q
			if !(q > 0) || !(x > 0) {
				return math.Inf(1)
			}
			return 1 / (R * x)
		})
		if opt.Method == SolveMonteCarlo {
			s.Temperature.CI, s.Temperature.Method = s.MonteCarlo.CI, "monte-carlo"
		}
	}
	s.rangeWarnings(T)
	if T > hotLimit {
		s.warn("implausible-temperature", "The back-calculated temperature "+tk(T)+" is above any heat-treatment temperature: check the time, the profile fit and the calibration.")
	}
	return s, nil
}

// fieller2T maps a Fieller interval of θ = x − xc to temperatures.
func fieller2T(xc, lo, hi float64, ok bool) fit.Interval {
	if !ok {
		return fit.Interval{Lo: nan, Hi: nan}
	}
	ci := fit.Interval{Lo: 1 / (R * (xc + hi)), Hi: math.Inf(1)}
	if xc+lo > 0 {
		ci.Hi = 1 / (R * (xc + lo))
	}
	return ci
}

// SolveTime back-calculates the hold time of a part at a known temperature
// T from its measured ln(Dt):
//
//	ln t = ln(Dt) − ln D0 + Q/(RT).
//
// Interval: ln t is linear in (ln D0, Q, ln Dt) (and, through Q/(RT), in T
// to first order), so ln t ± k·se with
// se² = Var(ln Dt) + Var(ln D) + (Q/(RT²))²σ_T² is exact under normality
// for σ_T = 0; k is the calibration's Student-t (Satterthwaite dof, as in
// SolveTemperature) or normal quantile. Monte
// Carlo as for SolveTemperature, with T drawn from N(T, σ_T²).
func SolveTime(obs Observation, cal Calibration, o *SolveOptions) (*Solution, error) {
	opt, err := o.defaults()
	if err != nil {
		return nil, err
	}
	if err := checkSolveInputs(obs, cal); err != nil {
		return nil, err
	}
	T, sT := opt.Temperature, opt.TemperatureSigma
	if T == 0 {
		T = obs.Temperature
	}
	if sT == 0 {
		sT = obs.TemperatureSigma
	}
	if T == 0 {
		return nil, badInput(obs.ID, "temperature", "the hold temperature is not known: give it (e.g. 925 °C) to solve for the time")
	}
	if err := checkTemperatures([]string{obs.ID}, []string{obs.Source}, []float64{T}, opt.ColdOK); err != nil {
		return nil, err
	}
	if !(sT >= 0) || !finite(sT) {
		return nil, badInput(obs.ID, "temperature uncertainty", "σ_T = %g K must be a number ≥ 0", sT)
	}
	s := newSolution("time", obs, cal, opt)
	obs.VarLnDt += cal.ExcessVar // a single part scatters about the line as the coupons did
	s.Temperature = Quantity{Value: T, Unit: "K", Given: true}
	if obs.Time > 0 {
		s.warn("time-already-known", fmt.Sprintf("The profile states a hold time of %g s; the solved time ignores it and uses only ln(Dt).", obs.Time))
	}
	xc, b, vb, vq := cal.centered()
	x := 1 / (R * T)
	lnt := obs.LnDt - (b - cal.Q*(x-xc))
	g := cal.Q / (R * T * T)
	s.Time = Quantity{Value: math.Exp(lnt), Unit: "s", CI: fit.Interval{Lo: nan, Hi: nan}}
	if !cal.NoInterval {
		k := cal.quantileWith(opt.Level, vb+(x-xc)*(x-xc)*vq, obs.VarLnDt+g*g*sT*sT)
		se := math.Sqrt(obs.VarLnDt + vb + (x-xc)*(x-xc)*vq + g*g*sT*sT)
		s.Time.CI = fit.Interval{Lo: math.Exp(lnt - k*se), Hi: math.Exp(lnt + k*se)}
		s.Time.Method = "wald-log"
	}
	if opt.mc() && !cal.NoInterval {
		s.MonteCarlo = monteCarlo(obs, cal, opt, T, sT, func(lnD0, q, kappa, T float64) float64 {
			if !(T > 0) {
				return math.Inf(1)
			}
			return math.Exp(kappa - lnD0 + q/(R*T))
		})
		if opt.Method == SolveMonteCarlo {
			s.Time.CI, s.Time.Method = s.MonteCarlo.CI, "monte-carlo"
		}
	}
	s.rangeWarnings(T)
	return s, nil
}

func checkSolveInputs(obs Observation, cal Calibration) error {
	if err := cal.validate(); err != nil {
		return err
	}
	if !finite(obs.LnDt) {
		return badInput(obs.ID, "Dt", "ln(Dt) = %g is not a finite number", obs.LnDt)
	}
	if !(obs.VarLnDt >= 0) || !finite(obs.VarLnDt) {
		return badInput(obs.ID, "Dt", "Var(ln Dt) = %g must be a number ≥ 0", obs.VarLnDt)
	}
	return nil
}

func newSolution(what string, obs Observation, cal Calibration, opt SolveOptions) *Solution {
	s := &Solution{SolveFor: what, ID: obs.ID, LnDt: obs.LnDt, VarLnDt: obs.VarLnDt, Level: opt.Level,
		Calibration: cal, Cautions: append([]string(nil), Cautions...), Warnings: []fit.Warning{}}
	if cal.NoInterval {
		s.warn("no-interval", "The calibration rests on only two temperatures: the result carries no interval. Calibrate at a third temperature.")
	}
	if cal.Method == "reference" {
		s.warn("reference-literature", ReferenceNote)
	}
	if !cal.hasCov() && !cal.NoInterval {
		s.warn("calibration-without-uncertainty", "The calibration carries no uncertainty (reference or explicit values without one): the interval covers only the part's profile fit and is too narrow.")
	}
	if cal.Method == "explicit" && cal.Cov[0][0] > 0 && cal.Cov[1][1] > 0 && cal.Cov[0][1] == 0 {
		s.warn("independent-D0-Q", "The uncertainties of D0 and Q were taken as independent; fitted values are strongly correlated, so this interval is wider than a fitted calibration would give inside its range.")
	}
	if obs.VarLnDt == 0 {
		s.warn("observation-without-uncertainty", "The part's Dt carries no uncertainty: the interval covers only the calibration.")
	}
	if cal.ExcessVar > 0 {
		s.warn("part-scatter", fmt.Sprintf("The calibration coupons scatter about their line more than their own profile fits explain (by a standard deviation of %.2g in ln D); a single part is taken to scatter as much, and the interval includes it.", math.Sqrt(cal.ExcessVar)))
	}
	return s
}

func (s *Solution) warn(code, msg string) {
	s.Warnings = append(s.Warnings, fit.Warning{Code: code, Message: msg})
}

// rangeWarnings flags a temperature outside the calibration's range.
func (s *Solution) rangeWarnings(T float64) {
	c := s.Calibration
	if c.TMin > 0 && c.TMax > 0 && (T < c.TMin-1e-9 || T > c.TMax+1e-9) {
		s.warn("extrapolation", tk(T)+" lies outside the calibration's range "+tk(c.TMin)+" to "+tk(c.TMax)+": the result is an extrapolation of the Arrhenius line and assumes no change of mechanism or phase.")
	}
}

// monteCarlo draws (b, Q) of the centred calibration — independent by
// construction — from the bivariate normal, or the bivariate t with the
// calibration's dof (normal draws times √(dof/χ²_dof)); ln Dt from
// N(LnDt, VarLnDt); and T from N(T, σ_T²) when sT > 0. It evaluates
// eval(ln D0, Q, ln Dt, T) for each draw and returns equal-tail percentiles.
// Non-finite answers count as +Inf (beyond the upper end).
func monteCarlo(obs Observation, cal Calibration, opt SolveOptions, T, sT float64, eval func(lnD0, q, kappa, T float64) float64) *MonteCarlo {
	xc, b, vb, vq := cal.centered()
	rng := rand.New(rand.NewPCG(opt.Seed, 0x9e3779b97f4a7c15))
	var chi distuv.ChiSquared
	if cal.DOF > 0 {
		chi = distuv.ChiSquared{K: float64(cal.DOF), Src: rand.NewPCG(opt.Seed, 0x632be59bd9b4e019)}
	}
	sb, sq, sy := math.Sqrt(vb), math.Sqrt(vq), math.Sqrt(obs.VarLnDt)
	out := make([]float64, opt.Draws)
	bad := 0
	for i := range out {
		w := 1.0
		if chi.K > 0 {
			w = math.Sqrt(chi.K / chi.Rand())
		}
		bi := b + w*sb*rng.NormFloat64()
		qi := cal.Q + w*sq*rng.NormFloat64()
		ki := obs.LnDt + sy*rng.NormFloat64()
		Ti := T
		if sT > 0 {
			Ti += sT * rng.NormFloat64()
		}
		v := eval(bi+qi*xc, qi, ki, Ti)
		if !finite(v) {
			v = math.Inf(1)
			bad++
		}
		out[i] = v
	}
	sort.Float64s(out)
	a := (1 - opt.Level) / 2
	return &MonteCarlo{Draws: opt.Draws, Seed: opt.Seed, Median: stats.Quantile(out, 0.5),
		CI: fit.Interval{Lo: stats.Quantile(out, a), Hi: stats.Quantile(out, 1-a)}, NonPhysical: float64(bad) / float64(len(out))}
}

// SolveHistoryLevel back-calculates the level of a logged heat treatment
// whose shape is known but whose level is not (e.g. an uncalibrated
// thermocouple): it finds the shift δ (T'(t) = T(t) + δ) or scale s
// (T'(t) = s·T(t)) at which ∫D(T'(t))dt over the log equals the part's
// measured Dt, and reports the resulting hold (maximum) temperature.
//
// Interval: by test inversion — the set of levels c at which
// |ln ∫D dt(c) − ln Dt| ≤ k·√(Var ln Dt + Var(ln ∫D dt)(c)), the variance
// of the integral from the calibration by the delta method
// (∂/∂ln D0 = 1, ∂/∂Q = −x_eff(c)). For an isothermal log this is exactly
// Fieller's interval of SolveTemperature. Monte Carlo (Method
// "monte-carlo" or "both") re-solves the level for every draw.
func SolveHistoryLevel(obs Observation, cal Calibration, h *profile.History, mode LogAdjust, o *SolveOptions) (*Solution, error) {
	opt, err := o.defaults()
	if err != nil {
		return nil, err
	}
	if err := checkSolveInputs(obs, cal); err != nil {
		return nil, err
	}
	if err := checkHistory(h); err != nil {
		return nil, err
	}
	if err := checkTemperatures(repeat(h.Source, len(h.Temp)), repeat(h.Source, len(h.Temp)), []float64{maxOf(h.Temp)}, opt.ColdOK); err != nil {
		return nil, err
	}
	tmin, tmax := minOf(h.Temp), maxOf(h.Temp)
	// Domain of the level parameter c: adjusted temperatures stay in (0, 10 000 K].
	var cLo, cHi, c0 float64
	if mode == Scale {
		cLo, cHi, c0 = 1e-6, 1e4/tmax, 1
	} else {
		cLo, cHi, c0 = -tmin*(1-1e-6), 1e4-tmax, 0
	}
	xc, _, vb, vq := cal.centered()
	F := func(lnD0, q, kappa, c float64) (float64, float64) {
		e := integrateLog(h, lnD0, q, mode, c)
		return e.lnI - kappa, e.xEff
	}
	solve := func(lnD0, q, kappa float64) (float64, bool) {
		return stats.RootIncreasing(func(c float64) float64 { f, _ := F(lnD0, q, kappa, c); return f }, c0, cLo, cHi)
	}
	c, ok := solve(cal.LnD0, cal.Q, obs.LnDt)
	if !ok {
		return nil, noAnswer(obs.ID, "level", "no %s of this log makes ∫D dt equal the measured Dt = %.3g m² within 0–10 000 K: check the log, the profile fit and the calibration", mode, math.Exp(obs.LnDt))
	}
	s := newSolution("hold-temperature", obs, cal, opt)
	s.Warnings = append(s.Warnings, spikeWarnings(h, cal.Q)...)
	obs.VarLnDt += cal.ExcessVar // a single part scatters about the line as the coupons did
	s.AdjustMode = mode.String()
	unit := "K"
	if mode == Scale {
		unit = "1"
	}
	s.Adjustment = &Quantity{Value: c, Unit: unit, CI: fit.Interval{Lo: nan, Hi: nan}}
	s.Time = Quantity{Value: h.Time[len(h.Time)-1] - h.Time[0], Unit: "s", Given: true}
	s.Temperature = Quantity{Value: mode.adjust(tmax, c), Unit: "K", CI: fit.Interval{Lo: nan, Hi: nan}}
	if !cal.NoInterval {
		_, xe0 := F(cal.LnD0, cal.Q, obs.LnDt, c)
		k := cal.quantileWith(opt.Level, vb+(xe0-xc)*(xe0-xc)*vq, obs.VarLnDt)
		g := func(sign float64) func(c float64) float64 {
			return func(c float64) float64 {
				f, xe := F(cal.LnD0, cal.Q, obs.LnDt, c)
				v := obs.VarLnDt + vb + (xe-xc)*(xe-xc)*vq
				return f + sign*k*math.Sqrt(v)
			}
		}
		ci := fit.Interval{Lo: nan, Hi: nan}
		if lo, ok := stats.RootIncreasing(g(+1), c, cLo, c); ok {
			ci.Lo = lo
		}
		if hi, ok := stats.RootIncreasing(g(-1), c, c, cHi); ok {
			ci.Hi = hi
		} else {
			ci.Hi = math.Inf(1)
		}
		s.Adjustment.CI, s.Adjustment.Method = ci, "test-inversion"
		s.Temperature.CI = fit.Interval{Lo: mode.adjust(tmax, ci.Lo), Hi: mode.adjust(tmax, ci.Hi)}
		s.Temperature.Method = "test-inversion"
	}
	if opt.mc() && !cal.NoInterval {
		s.MonteCarlo = monteCarlo(obs, cal, opt, 0, 0, func(lnD0, q, kappa, _ float64) float64 {
			if !(q > 0) {
				return math.Inf(1)
			}
			c, ok := solve(lnD0, q, kappa)
			if !ok {
				return math.Inf(1)
			}
			return mode.adjust(tmax, c)
		})
		if opt.Method == SolveMonteCarlo {
			s.Temperature.CI, s.Temperature.Method = s.MonteCarlo.CI, "monte-carlo"
		}
	}
	s.rangeWarnings(s.Temperature.Value)
	return s, nil
}

func repeat(s string, n int) []string {
	out := make([]string, n)
	for i := range out {
		out[i] = s
	}
	return out
}

func minOf(v []float64) float64 {
	m := math.Inf(1)
	for _, x := range v {
		m = math.Min(m, x)
	}
	return m
}

func maxOf(v []float64) float64 {
	m := math.Inf(-1)
	for _, x := range v {
		m = math.Max(m, x)
	}
	return m
}
