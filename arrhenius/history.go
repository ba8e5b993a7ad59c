package arrhenius

import (
	"fmt"
	"math"
	"strconv"

	"github.com/fickfit/fickfit/fit"
	"github.com/fickfit/fickfit/internal/tempfmt"
	"github.com/fickfit/fickfit/profile"
)

// checkHistory refuses a log that cannot be integrated: fewer than two
// rows, columns of different length, time not strictly increasing,
// temperatures that are not positive kelvin.
func checkHistory(h *profile.History) error {
	if h == nil {
		return badInput("", "history", "no thermal history given")
	}
	at := func(i int, field, format string, args ...any) error {
		e := badInput("", field, format, args...)
		e.Source = h.Source
		if i < len(h.Line) {
			e.Line = h.Line[i]
		}
		return e
	}
	if len(h.Time) != len(h.Temp) {
		return at(0, "history", "%d times but %d temperatures", len(h.Time), len(h.Temp))
	}
	if len(h.Time) < 2 {
		return at(0, "history", "a thermal history needs at least 2 rows (time, temperature); it has %d", len(h.Time))
	}
	for i := range h.Time {
		if !finite(h.Time[i]) {
			return at(i, "time", "time %g is not a number", h.Time[i])
		}
		if !finite(h.Temp[i]) || h.Temp[i] <= 0 {
			return at(i, "temperature", "temperature %s is not a positive number of kelvin", tempfmt.Kelvin(h.Temp[i]))
		}
		if i > 0 && !(h.Time[i] > h.Time[i-1]) {
			return at(i, "time", "time %g s is not later than the previous row's %g s: the log must be in increasing time order without repeats (sort it, or remove the duplicate row)", h.Time[i], h.Time[i-1])
		}
	}
	return nil
}

// LogAdjust says how the level of a log of known shape is adjusted.
type LogAdjust int

const (
	// Shift adds δ (K) to every temperature of the log: T'(t) = T(t) + δ
	// (an offset of the thermocouple or controller).
	Shift LogAdjust = iota
	// Scale multiplies every temperature (K) of the log by s: T'(t) = s·T(t)
	// (a proportional error, e.g. of the span of a recorder).
	Scale
)

// String is the adjustment's name: "shift" or "scale".
func (lv LogAdjust) String() string {
	if lv == Scale {
		return "scale"
	}
	return "shift"
}

// adjust returns the temperature at level parameter c: T + c (Shift) or c·T (Scale).
func (lv LogAdjust) adjust(T, c float64) float64 {
	if lv == Scale {
		return c * T
	}
	return T + c
}

// exposure is ∫D dt over a log: lnI = ln ∫ D(T(t)) dt (m²) and
// xEff = ∫x·D dt / ∫D dt with x = 1/(RT), so that ∂lnI/∂lnD0 = 1 and
// ∂lnI/∂Q = −xEff: for error propagation the log acts as a single hold at
// T_eff = 1/(R·xEff).
type exposure struct {
	lnI, xEff float64
	duration  float64
}

// integrateLog computes the exposure of a log adjusted by (lv, c) for
// D = exp(lnD0 − Q/(RT)). T is linear in t between rows; each segment is
// integrated by adaptive 10-point Gauss–Legendre quadrature (nodes by
// Newton's method on the Legendre polynomial; Abramowitz & Stegun, Handbook
// of Mathematical Functions, 1964, §25.4.29; from memory), the integrand
// scaled by exp(Q/(R·Tmax)) so that it never underflows at the top of the log.
func integrateLog(h *profile.History, lnD0, Q float64, lv LogAdjust, c float64) exposure {
	n := len(h.Time)
	T := make([]float64, n)
	tmax := 0.0
	for i := range T {
		T[i] = lv.adjust(h.Temp[i], c)
		tmax = math.Max(tmax, T[i])
	}
	qr := Q / R
	f := func(t0, t1, T0, T1, t float64) (e, xe float64) {
		Tt := T0 + (T1-T0)*(t-t0)/(t1-t0)
		if !(Tt > 0) {
			return 0, 0
		}
		e = math.Exp(-qr * (1/Tt - 1/tmax))
		return e, e / (R * Tt)
	}
	gl := func(t0, t1, T0, T1, a, b float64) (e, xe float64) {
		mid, half := (a+b)/2, (b-a)/2
		for k, node := range glNodes {
			for _, s := range [2]float64{-1, 1} {
				fe, fx := f(t0, t1, T0, T1, mid+s*half*node)
				e += glWeights[k] * fe
				xe += glWeights[k] * fx
			}
		}
		return e * half, xe * half
	}
	// First pass: one rule per segment, for the tolerance scale.
	var total float64
	for i := 1; i < n; i++ {
		if T[i] == T[i-1] {
			total += math.Exp(-qr*(1/T[i]-1/tmax)) * (h.Time[i] - h.Time[i-1])
			continue
		}
		e, _ := gl(h.Time[i-1], h.Time[i], T[i-1], T[i], h.Time[i-1], h.Time[i])
		total += e
	}
	span := h.Time[n-1] - h.Time[0]
	var adapt func(t0, t1, T0, T1, a, b, whole, wx float64, depth int) (float64, float64)
	adapt = func(t0, t1, T0, T1, a, b, whole, wx float64, depth int) (float64, float64) {
		m := (a + b) / 2
		l, lx := gl(t0, t1, T0, T1, a, m)
		r, rx := gl(t0, t1, T0, T1, m, b)
		tol := 1e-13*total*(b-a)/span + 1e-15*math.Abs(l+r)
		if depth >= 40 || math.Abs(l+r-whole) <= tol {
			return l + r, lx + rx
		}
		le, lxe := adapt(t0, t1, T0, T1, a, m, l, lx, depth+1)
		re, rxe := adapt(t0, t1, T0, T1, m, b, r, rx, depth+1)
		return le + re, lxe + rxe
	}
	var J, Jx float64
	for i := 1; i < n; i++ {
		t0, t1 := h.Time[i-1], h.Time[i]
		if T[i] == T[i-1] {
			e := math.Exp(-qr*(1/T[i]-1/tmax)) * (t1 - t0)
			J += e
			Jx += e / (R * T[i])
			continue
		}
		w, wx := gl(t0, t1, T[i-1], T[i], t0, t1)
		e, xe := adapt(t0, t1, T[i-1], T[i], t0, t1, w, wx, 0)
		J += e
		Jx += xe
	}
	return exposure{lnI: lnD0 - Q/(R*tmax) + math.Log(J), xEff: Jx / J, duration: span}
}

// glNodes and glWeights are the positive nodes and weights of the
// 10-point Gauss–Legendre rule on [−1, 1].
var glNodes, glWeights = gaussLegendre(10)

// gaussLegendre returns the n/2 positive nodes and their weights (n even),
// by Newton's method on Pₙ from the guess cos(π(i − ¼)/(n + ½)).
func gaussLegendre(n int) (x, w []float64) {
	for i := 1; i <= n/2; i++ {
		z := math.Cos(math.Pi * (float64(i) - 0.25) / (float64(n) + 0.5))
		var dp float64
		for it := 0; it < 100; it++ {
			p0, p1 := 1.0, z
			for k := 2; k <= n; k++ {
				p0, p1 = p1, ((2*float64(k)-1)*z*p1-(float64(k)-1)*p0)/float64(k)
			}
			dp = float64(n) * (z*p1 - p0) / (z*z - 1)
			dz := p1 / dp
			z -= dz
			if math.Abs(dz) < 1e-16 {
				break
			}
		}
		x = append(x, z)
		w = append(w, 2/((1-z*z)*dp*dp))
	}
	return x, w
}

// IntegralD returns ∫D(T(t))dt (m²) over the log for D = D0·exp(−Q/(RT)),
// D0 in m²/s and Q in J/mol, with T linear in t between the rows. Time-
// dependent D with D independent of x and C: the erf solution holds with Dt
// replaced by this integral (Crank, The Mathematics of Diffusion, 2nd ed.,
// 1975, §7.1; section from memory).
func IntegralD(h *profile.History, D0, Q float64) (float64, error) {
	if err := checkHistory(h); err != nil {
		return 0, err
	}
	if !(D0 > 0) || !(Q > 0) || !finite(D0) || !finite(Q) {
		return 0, badInput("", "D0, Q", "D0 (%g m²/s) and Q (%g J/mol) must be positive numbers", D0, Q)
	}
	return math.Exp(integrateLog(h, math.Log(D0), Q, Shift, 0).lnI), nil
}

// EquivalentTime returns the time t_eq at the reference temperature Tref
// (K) that gives the same ∫D dt as the log: D(Tref)·t_eq = ∫D(T(t))dt. It
// depends on Q only, not on D0. A fit of a profile from this log with time
// t_eq reports D at Tref.
func EquivalentTime(h *profile.History, Q, Tref float64) (float64, error) {
	if err := checkHistory(h); err != nil {
		return 0, err
	}
	if !(Q > 0) || !finite(Q) {
		return 0, badInput("", "Q", "Q = %g J/mol must be a positive number", Q)
	}
	if !(Tref > 0) || !finite(Tref) {
		return 0, badInput("", "reference temperature", "Tref = %s must be a positive number of kelvin", tempfmt.Kelvin(Tref))
	}
	e := integrateLog(h, 0, Q, Shift, 0)
	return math.Exp(e.lnI + Q/(R*Tref)), nil
}

// EffectiveTemperature returns the constant temperature that, held for the
// log's whole duration, gives the same ∫D dt: D(T_eff)·duration = ∫D dt.
func EffectiveTemperature(h *profile.History, Q float64) (float64, error) {
	if err := checkHistory(h); err != nil {
		return 0, err
	}
	if !(Q > 0) || !finite(Q) {
		return 0, badInput("", "Q", "Q = %g J/mol must be a positive number", Q)
	}
	e := integrateLog(h, 0, Q, Shift, 0)
	return Q / (R * (math.Log(e.duration) - e.lnI)), nil
}

// Exposure is a heat treatment: an isothermal hold (Temperature in K for
// Time in s) or, when History is not nil, a logged temperature history.
type Exposure struct {
	Temperature float64
	Time        float64
	History     *profile.History
}

// lnDt returns ln(Dt) (or ln ∫D dt) under the calibration, its variance
// from the calibration, and the x = 1/(RT) that acts for error
// propagation (1/(RT) for a hold, xEff for a log).
func (e Exposure) lnDt(c Calibration) (lnDt, variance, x float64, err error) {
	if e.History != nil {
		if err := checkHistory(e.History); err != nil {
			return 0, 0, 0, err
		}
		ex := integrateLog(e.History, c.LnD0, c.Q, Shift, 0)
		x = ex.xEff
		lnDt = ex.lnI
	} else {
		if !(e.Time > 0) || !finite(e.Time) {
			return 0, 0, 0, badInput("", "time", "time %g s must be > 0", e.Time)
		}
		if !(e.Temperature > 0) || !finite(e.Temperature) {
			return 0, 0, 0, badInput("", "temperature", "temperature %s must be a positive number of kelvin", tempfmt.Kelvin(e.Temperature))
		}
		x = 1 / (R * e.Temperature)
		lnDt = c.LnD0 - c.Q*x + math.Log(e.Time)
	}
	variance = c.Cov[0][0] + x*x*c.Cov[1][1] - 2*x*c.Cov[0][1]
	return lnDt, math.Max(variance, 0), x, nil
}

// tEff returns the temperature that acts for the exposure (hold temperature
// or 1/(R·xEff) of a log).
func tEffOf(x float64) float64 { return 1 / (R * x) }

// WithHistory prepares a profile from a part that saw a logged treatment
// for fitting: it returns a copy whose Time is the equivalent time of the
// log at Tref (K; 0 means the log's highest temperature) for activation
// energy Q (J/mol) and whose Temperature is Tref, so that the fit reports
// D at Tref (exact when D does not depend on x or C: only ∫D dt enters the
// solution). Meta records "history", "history_Q_J_per_mol" and
// "equivalent_time_s"; the input profile is not changed.
func WithHistory(p profile.Profile, h *profile.History, Q, Tref float64) (profile.Profile, error) {
	if err := checkHistory(h); err != nil {
		return p, err
	}
	if Tref == 0 {
		Tref = maxOf(h.Temp)
	}
	teq, err := EquivalentTime(h, Q, Tref)
	if err != nil {
		return p, err
	}
	out := p
	out.Time, out.Temperature, out.TemperatureSigma = teq, Tref, 0
	out.Meta = make(map[string]string, len(p.Meta)+3)
	for k, v := range p.Meta {
		out.Meta[k] = v
	}
	out.Meta["history"] = h.Source
	out.Meta["history_Q_J_per_mol"] = strconv.FormatFloat(Q, 'g', -1, 64)
	out.Meta["equivalent_time_s"] = strconv.FormatFloat(teq, 'g', -1, 64)
	out.Notes = append([]profile.Note(nil), p.Notes...)
	for _, w := range spikeWarnings(h, Q) {
		out.Notes = append(out.Notes, profile.Note{Code: w.Code, Message: w.Message})
	}
	return out, nil
}

// Spike is a single reading of a log that departs from both neighbours in
// the same direction by far more than they differ from each other — a
// thermocouple glitch or a typing error, rarely a real excursion.
// Expected is the temperature interpolated from the neighbours (K).
type Spike struct {
	Index, Line int
	T, Expected float64
}

// Thresholds of Spikes (common practice, no source): a controlled furnace
// does not leave and regain its set point within one logging interval by
// tens of kelvin while both neighbours agree.
const (
	spikeMin    = 30 // K: least departure from the interpolated value
	spikeFactor = 5  // times the neighbours' own difference
)

// Spikes finds the single-sample spikes of a log: an interior row whose
// temperature lies on the same side of both neighbours and departs from
// the value interpolated between them (linearly in time) by more than
// spikeMin and more than spikeFactor times the neighbours' own difference.
// The first and last rows are not judged (a ramp starts and ends there).
func Spikes(h *profile.History) []Spike {
	var out []Spike
	for i := 1; i+1 < len(h.Time); i++ {
		t0, t1, t2 := h.Time[i-1], h.Time[i], h.Time[i+1]
		a, b, c := h.Temp[i-1], h.Temp[i], h.Temp[i+1]
		exp := a + (c-a)*(t1-t0)/(t2-t0)
		dev := b - exp
		same := (b-a)*(b-c) > 0
		if same && math.Abs(dev) > spikeMin && math.Abs(dev) > spikeFactor*math.Abs(c-a) {
			s := Spike{Index: i, T: b, Expected: exp}
			if i < len(h.Line) {
				s.Line = h.Line[i]
			}
			out = append(out, s)
		}
	}
	return out
}

// spikeWarnings says of each spike of the log where it is, what it reads
// and, for activation energy q (J/mol; none when q ≤ 0), how much it
// changes ∫D dt against the row replaced by its neighbours' interpolation.
func spikeWarnings(h *profile.History, q float64) []fit.Warning {
	sp := Spikes(h)
	if len(sp) == 0 {
		return nil
	}
	var ws []fit.Warning
	for _, s := range sp {
		where := fmt.Sprintf("row %d", s.Index+1)
		if s.Line > 0 {
			where = fmt.Sprintf("line %d", s.Line)
		}
		msg := fmt.Sprintf("The log %s reads %s at %s, between %s and %s: a single-sample spike (a thermocouple glitch or a typing error?).",
			h.Source, tk(s.T), where, tk(h.Temp[s.Index-1]), tk(h.Temp[s.Index+1]))
		if q > 0 && finite(q) {
			fixed := *h
			fixed.Temp = append([]float64(nil), h.Temp...)
			fixed.Temp[s.Index] = s.Expected
			with := integrateLog(h, 0, q, Shift, 0)
			without := integrateLog(&fixed, 0, q, Shift, 0)
			if r := math.Exp(with.lnI - without.lnI); finite(r) {
				msg += fmt.Sprintf(" With it, ∫D dt is %.3g times what it is with the row interpolated from its neighbours;", r)
			}
		}
		msg += " check the log, and correct or remove the row if the furnace did not do this."
		ws = append(ws, fit.Warning{Code: "history-spike", Message: msg})
	}
	return ws
}
