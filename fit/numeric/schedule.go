package numeric

import (
	"fmt"
	"math"
	"sort"

	"github.com/fickfit/fickfit/fit"
	"github.com/fickfit/fickfit/internal/phys"
	"github.com/fickfit/fickfit/profile"
)

// R is the molar gas constant in J/(mol·K) (CODATA 2018, exact).
const R = phys.R

// Schedule is the time-dependent multiplier of the diffusivity:
// D(C, t) = D_C(C)·Factor(t), with D_C the law at the reference temperature.
// Factor must be positive and finite on [0, Time].
type Schedule interface {
	Factor(t float64) float64
}

// Spanner is implemented by schedules that are defined only on a time span
// (a furnace log); the solver refuses a hold time beyond End().
type Spanner interface {
	End() float64
}

// FactorFunc adapts a function of time (s) to a Schedule.
type FactorFunc func(t float64) float64

// Factor implements Schedule.
func (f FactorFunc) Factor(t float64) float64 { return f(t) }

// Arrhenius is the schedule of a furnace log:
//
//	F(t) = exp(−Q/R·(1/T(t) − 1/Tref)),
//
// T(t) interpolated linearly in time between the rows of the log. The
// diffusion clock starts at the first row (t = 0 there).
type Arrhenius struct {
	t, temp []float64
	q, tref float64
}

// NewArrhenius builds the schedule of a temperature log h (Time in s,
// strictly increasing; Temp in K) for an activation energy Q (J/mol, ≥ 0)
// and the reference temperature Tref (K) at which D is given.
func NewArrhenius(h *profile.History, q, tref float64) (*Arrhenius, error) {
	if h == nil || len(h.Time) < 2 {
		return nil, fmt.Errorf("%w: a temperature history needs at least two rows", fit.ErrBadInput)
	}
	where := func(i int) string {
		s := h.Source
		if s == "" {
			s = "temperature history"
		}
		if i < len(h.Line) && h.Line[i] > 0 {
			return fmt.Sprintf("%s line %d", s, h.Line[i])
		}
		return fmt.Sprintf("%s row %d", s, i+1)
	}
	if len(h.Temp) != len(h.Time) {
		return nil, fmt.Errorf("%w: %s: %d times but %d temperatures", fit.ErrBadInput, where(0), len(h.Time), len(h.Temp))
	}
	if !(q >= 0) || !finite(q) {
		return nil, fmt.Errorf("%w: activation energy Q = %g J/mol must be a finite number ≥ 0", fit.ErrBadInput, q)
	}
	if !(tref > 0) || !finite(tref) {
		return nil, fmt.Errorf("%w: reference temperature %g K must be positive", fit.ErrBadInput, tref)
	}
	for i := range h.Time {
		if !finite(h.Time[i]) || (i > 0 && !(h.Time[i] > h.Time[i-1])) {
			return nil, fmt.Errorf("%w: %s: time %g s must be a number greater than the previous row's; sort the log by time", fit.ErrBadInput, where(i), h.Time[i])
		}
		if !(h.Temp[i] > 0) || !finite(h.Temp[i]) {
			return nil, fmt.Errorf("%w: %s: temperature %g K must be positive (absolute temperature)", fit.ErrBadInput, where(i), h.Temp[i])
		}
	}
	a := &Arrhenius{t: make([]float64, len(h.Time)), temp: append([]float64(nil), h.Temp...), q: q, tref: tref}
	for i, t := range h.Time {
		a.t[i] = t - h.Time[0]
	}
	return a, nil
}

// Temperature returns T(t) in K (held at the end values outside the log).
func (a *Arrhenius) Temperature(t float64) float64 {
	n := len(a.t)
	if t <= 0 {
		return a.temp[0]
	}
	if t >= a.t[n-1] {
		return a.temp[n-1]
	}
	k := sort.SearchFloat64s(a.t, t) - 1
	if k < 0 {
		k = 0
	}
	s := (t - a.t[k]) / (a.t[k+1] - a.t[k])
	return a.temp[k] + s*(a.temp[k+1]-a.temp[k])
}

// Factor implements Schedule.
func (a *Arrhenius) Factor(t float64) float64 {
	return math.Exp(-a.q / R * (1/a.Temperature(t) - 1/a.tref))
}

// End implements Spanner: the duration of the log in s.
func (a *Arrhenius) End() float64 { return a.t[len(a.t)-1] }

// clock maps physical time to effective time τ(t) = ∫₀ᵗ F dt′ on a fine
// table (composite Simpson rule on clockPanels panels) and back.
type clock struct {
	t, tau []float64
}

const clockPanels = 2048

func newClock(s Schedule, end float64) (*clock, error) {
	if sp, ok := s.(Spanner); ok && end > sp.End()*(1+1e-12) {
		return nil, fmt.Errorf("%w: the hold time %g s is longer than the temperature history (%g s); extend the log or shorten the time", fit.ErrBadInput, end, sp.End())
	}
	c := &clock{t: make([]float64, clockPanels+1), tau: make([]float64, clockPanels+1)}
	h := end / clockPanels
	f := func(t float64) (float64, error) {
		v := s.Factor(t)
		if !(v > 0) || !finite(v) {
			return 0, fmt.Errorf("%w: the temperature factor is %g at t = %g s; it must be positive and finite", fit.ErrBadInput, v, t)
		}
		return v, nil
	}
	fa, err := f(0)
	if err != nil {
		return nil, err
	}
	for k := 1; k <= clockPanels; k++ {
		a, b := float64(k-1)*h, float64(k)*h
		if k == clockPanels {
			b = end
		}
		fm, err := f((a + b) / 2)
		if err != nil {
			return nil, err
		}
		fb, err := f(b)
		if err != nil {
			return nil, err
		}
		c.t[k] = b
		c.tau[k] = c.tau[k-1] + (b-a)/6*(fa+4*fm+fb)
		fa = fb
	}
	return c, nil
}

// end returns τ at the end of the table.
func (c *clock) end() float64 { return c.tau[len(c.tau)-1] }

// timeAt inverts τ(t) by linear interpolation in the table.
func (c *clock) timeAt(tau float64) float64 {
	n := len(c.tau)
	if tau <= 0 {
		return 0
	}
	if tau >= c.tau[n-1] {
		return c.t[n-1]
	}
	k := sort.SearchFloat64s(c.tau, tau) - 1
	if k < 0 {
		k = 0
	}
	s := (tau - c.tau[k]) / (c.tau[k+1] - c.tau[k])
	return c.t[k] + s*(c.t[k+1]-c.t[k])
}
