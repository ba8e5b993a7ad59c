package arrhenius

import (
	"fmt"
	"math"

	"github.com/fickfit/fickfit/fit"
)

// Line is a fitted Arrhenius line ln D = ln D0 − Q/(RT) with everything
// needed to judge and reuse it.
type Line struct {
	// Group is the group's name and By the grouping column ("" when not grouped).
	Group, By string
	// Method is "two-stage" or "global".
	Method string
	LnD0   float64 // ln(D0 / (m²/s))
	Q      float64 // J/mol
	// Cov is the covariance of (ln D0, Q) used for the intervals: from the
	// stated errors, times B² when Scaled.
	Cov [2][2]float64
	// DOF is the residual degrees of freedom: points − 2 (two-stage) or
	// profiles − 2 (global); the t quantile uses it when Scaled.
	DOF   int
	Level float64
	// ChiSq is the weighted residual sum of squares about the line (for the
	// global fit: the extra sum of squares over the separate fits) and
	// ChiSqP = P(χ²_DOF ≥ ChiSq) when the weights come from stated errors.
	ChiSq, ChiSqP float64
	// BirgeRatio = √(ChiSq/DOF): about 1 when the scatter matches the stated
	// errors. Scaled tells whether the covariance was multiplied by its square.
	BirgeRatio float64
	Scaled     bool
	// NTemperatures is the number of distinct temperatures; HasCI is false
	// below 3 (estimates without intervals).
	NTemperatures int
	HasCI         bool
	Points        []LinePoint
	// TempBudget splits Q's interval into temperature and profile parts;
	// nil when no temperature uncertainty was given.
	TempBudget *TemperatureBudget
	// Iterations of the effective-variance (two-stage) or random-effect
	// (global) loop for temperature uncertainty; 0 when not needed.
	Iterations int
	Warnings   []fit.Warning
}

// LinePoint is one point of the line with its fitted value.
type LinePoint struct {
	Point
	Fitted   float64 // ln D on the line at T
	Residual float64 // LnD − Fitted
	// Weight is the final weight 1/(Var ln D + (Q/RT²)²σ_T²) (two-stage) or
	// 1/Var(ln D) of the separate fit (global).
	Weight float64
	// Influence is the point's leverage, studentized residual and Cook's
	// distance about the weighted line (influence.go).
	Influence
}

// TemperatureBudget tells how much of Q's uncertainty comes from the
// temperatures and how much from the profiles: the same data are fitted
// with the temperature uncertainties and with σ_T = 0.
type TemperatureBudget struct {
	// HalfWidthQ is the half-width (J/mol) of Q's interval with temperature
	// uncertainty; HalfWidthQProfiles the half-width with σ_T = 0, each with
	// its own Birge scaling. NaN without interval.
	HalfWidthQ, HalfWidthQProfiles float64
	// ShareTemperature = 1 − Var₀(Q)/Var(Q) (unscaled variances, without and
	// with σ_T) is the fraction of Var(Q) due to the temperatures;
	// ShareProfiles = 1 − ShareTemperature.
	ShareTemperature, ShareProfiles float64
	Iterations                      int
	Converged                       bool
}

// D0 returns the pre-exponential factor in m²/s.
func (l *Line) D0() float64 { return math.Exp(l.LnD0) }

// StdErrLnD0 returns the standard error of ln D0 used for the intervals.
func (l *Line) StdErrLnD0() float64 { return math.Sqrt(l.Cov[0][0]) }

// StdErrQ returns the standard error of Q (J/mol).
func (l *Line) StdErrQ() float64 { return math.Sqrt(l.Cov[1][1]) }

// Corr returns the correlation of ln D0 and Q.
func (l *Line) Corr() float64 {
	return l.Cov[0][1] / math.Sqrt(l.Cov[0][0]*l.Cov[1][1])
}

// k returns the interval quantile: Student-t on DOF degrees of freedom when
// the covariance was scaled by the Birge ratio (the variance is then
// estimated from the scatter), the normal quantile when the stated errors
// were kept (the covariance is then taken as known).
func (l *Line) k() float64 {
	if l.Scaled {
		return quantile(l.Level, l.DOF)
	}
	return quantile(l.Level, 0)
}

// QCI returns the Wald interval Q ± k·se(Q) (J/mol): k is the Student-t
// quantile on DOF degrees of freedom when Scaled, the normal quantile
// otherwise. Open (NaN) without CI.
func (l *Line) QCI() fit.Interval {
	if !l.HasCI {
		return fit.Interval{Lo: nan, Hi: nan}
	}
	h := l.k() * l.StdErrQ()
	return fit.Interval{Lo: l.Q - h, Hi: l.Q + h}
}

// D0CI returns exp(ln D0 ± k·se(ln D0)) (m²/s); open (NaN) without CI.
func (l *Line) D0CI() fit.Interval {
	if !l.HasCI {
		return fit.Interval{Lo: nan, Hi: nan}
	}
	h := l.k() * l.StdErrLnD0()
	return fit.Interval{Lo: math.Exp(l.LnD0 - h), Hi: math.Exp(l.LnD0 + h)}
}

// LnDAt returns ln D on the line at T (K) and its standard error.
func (l *Line) LnDAt(T float64) (lnD, se float64) {
	// Only the coefficients enter; Calibration() would also scan every
	// point for the temperature range, once per call (quadratic in a
	// figure or table that asks at every point).
	lnD, v := Calibration{LnD0: l.LnD0, Q: l.Q, Cov: l.Cov}.LnD(T)
	return lnD, math.Sqrt(v)
}

// DAt returns D (m²/s) on the line at T (K) with the confidence band of
// the mean line, exp(ln D ± k·se); the band is open without CI.
func (l *Line) DAt(T float64) (D float64, ci fit.Interval) {
	lnD, se := l.LnDAt(T)
	if !l.HasCI {
		return math.Exp(lnD), fit.Interval{Lo: nan, Hi: nan}
	}
	h := l.k() * se
	return math.Exp(lnD), fit.Interval{Lo: math.Exp(lnD - h), Hi: math.Exp(lnD + h)}
}

// scale is the factor of the stated variances behind the intervals: the
// squared Birge ratio when the covariance was scaled, else 1.
func (l *Line) scale() float64 {
	if l.Scaled && l.BirgeRatio > 0 {
		return l.BirgeRatio * l.BirgeRatio
	}
	return 1
}

// meanPointVar is the mean of the points' variances 1/wᵢ (their stated
// Var ln D, with the temperature term where one was given); NaN without
// weights.
func (l *Line) meanPointVar() float64 {
	var s float64
	n := 0
	for _, p := range l.Points {
		if p.Weight > 0 && finite(p.Weight) {
			s += 1 / p.Weight
			n++
		}
	}
	if n == 0 {
		return nan
	}
	return s / float64(n)
}

// PartVar is the variance of ln D of a single new part about the true
// line, measured as the calibration points were: c·mean(1/wᵢ), with c the
// squared Birge ratio when the covariance was scaled and 1 when the stated
// errors were kept (the variance of a new observation in weighted
// regression, σ²/w_new with 1/w_new the points' mean variance: Draper &
// Smith, Applied Regression Analysis, 3rd ed., 1998, §1.4 and ch. 9 on
// weighted least squares; sections from memory).
func (l *Line) PartVar() float64 { return l.scale() * l.meanPointVar() }

// PredictAt returns D on the line at T (K) and the prediction interval of
// a single new part, exp(ln D ± k·√(se² + PartVar)), with the quantile k of
// the mean band (DAt). Open without CI.
func (l *Line) PredictAt(T float64) (D float64, pi fit.Interval) {
	lnD, se := l.LnDAt(T)
	v := l.PartVar()
	if !l.HasCI || !finite(v) {
		return math.Exp(lnD), fit.Interval{Lo: nan, Hi: nan}
	}
	h := l.k() * math.Sqrt(se*se+v)
	return math.Exp(lnD), fit.Interval{Lo: math.Exp(lnD - h), Hi: math.Exp(lnD + h)}
}

// DOnLineTemperatures are the temperatures (K) at which the JSON gives D
// on the line: the ends of the measured range and its centre in 1/T.
func (l *Line) DOnLineTemperatures() []float64 {
	lo, hi := l.TRange()
	switch {
	case !(lo > 0):
		return nil
	case !(hi > lo):
		return []float64{lo}
	}
	return []float64{lo, 2 / (1/lo + 1/hi), hi}
}

// TRange returns the lowest and highest temperature of the points (K).
func (l *Line) TRange() (lo, hi float64) {
	lo, hi = math.Inf(1), math.Inf(-1)
	for _, p := range l.Points {
		lo, hi = math.Min(lo, p.T), math.Max(hi, p.T)
	}
	if len(l.Points) == 0 {
		return 0, 0
	}
	return lo, hi
}

// Calibration returns the line in the form back-calculation and prediction use.
func (l *Line) Calibration() Calibration {
	c := Calibration{LnD0: l.LnD0, Q: l.Q, Cov: l.Cov, NoInterval: !l.HasCI, Method: l.Method}
	if l.Scaled {
		c.DOF = l.DOF
	}
	c.Source = fmt.Sprintf("%s Arrhenius fit of %d points at %d temperatures", l.Method, len(l.Points), l.NTemperatures)
	if l.Group != "" {
		c.Source += fmt.Sprintf(" (%s %s)", l.By, l.Group)
	}
	c.TMin, c.TMax = l.TRange()
	if v := l.meanPointVar(); finite(v) {
		c.PartVar = l.scale() * v
		c.ExcessVar = math.Max(l.scale()-1, 0) * v
	}
	if c.DOF < 0 {
		c.DOF = 0
	}
	return c
}
