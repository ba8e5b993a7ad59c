package arrhenius

import (
	"fmt"
	"math"
	"sort"
	"strings"

	"github.com/fickfit/fickfit/fit"
	"github.com/fickfit/fickfit/internal/tempfmt"
	"gonum.org/v1/gonum/stat/distuv"
)

// Options control an Arrhenius regression. The zero value gives 95 %
// intervals, weights from the stated Var(ln D), Birge-ratio scaling when
// the scatter exceeds the stated errors, no temperature uncertainty beyond
// the points' own, and refuses temperatures below 273.15 K as probable °C.
type Options struct {
	// Level is the confidence level of the intervals; 0 means 0.95.
	Level float64
	// TemperatureSigma is the standard uncertainty (K) of every temperature
	// that does not carry its own (Point.SigmaT); 0 means none.
	TemperatureSigma float64
	// NoBirge keeps the covariance from the stated errors even when the
	// points scatter more than those errors allow. The Birge ratio is still
	// reported, with a warning that the intervals are then too narrow.
	NoBirge bool
	// Unweighted fits by ordinary least squares, for points that carry no
	// uncertainty of ln D; the covariance is then always scaled by the
	// residual variance and temperature uncertainties cannot be used.
	Unweighted bool
	// ColdOK accepts temperatures below 273.15 K as kelvin. By default such
	// temperatures stop the regression: they are almost always °C read as K.
	ColdOK bool
	// MaxIter bounds the effective-variance iterations; 0 means 100.
	MaxIter int
	// Tol is the relative change of Q that ends them; 0 means 1e-12.
	Tol float64
}

func (o *Options) defaults() (Options, error) {
	var out Options
	if o != nil {
		out = *o
	}
	var err error
	if out.Level, err = levelOr(out.Level); err != nil {
		return out, err
	}
	if !(out.TemperatureSigma >= 0) || math.IsInf(out.TemperatureSigma, 0) {
		return out, badInput("", "temperature uncertainty", "the temperature uncertainty %g K must be a number ≥ 0", out.TemperatureSigma)
	}
	if out.MaxIter <= 0 {
		out.MaxIter = 100
	}
	if out.Tol <= 0 {
		out.Tol = 1e-12
	}
	return out, nil
}

// Physical bounds used to recognise unit mistakes. Common practice, no source:
// no solid-state diffusion anneal is done above 4000 K, and no published
// activation energy of diffusion in a solid reaches 1.5 MJ/mol.
const (
	coldLimit = 273.15 // K
	hotLimit  = 4000   // K
	qAbsurd   = 1.5e6  // J/mol
)

// checkTemperatures refuses non-physical temperatures and, unless coldOK,
// temperatures below 0 °C, which are almost always °C read as K.
func checkTemperatures(ids []string, srcs []string, T []float64, coldOK bool) error {
	var cold []string
	for i, t := range T {
		if !finite(t) || t <= 0 {
			e := badInput(ids[i], "temperature", "temperature %s is not a positive number of kelvin", tempfmt.Kelvin(t))
			e.Source = srcs[i]
			return e
		}
		if t > hotLimit {
			e := badInput(ids[i], "temperature", "temperature %s is above %s: check the unit (°F read as K?)", tk(t), tempfmt.Kelvin(hotLimit))
			e.Source = srcs[i]
			return e
		}
		if t < coldLimit && !coldOK {
			cold = append(cold, fmt.Sprintf("%s (%s)", ids[i], tempfmt.Kelvin(t)))
		}
	}
	if len(cold) > 0 {
		what := "some temperatures are"
		if len(cold) == len(T) {
			what = "all temperatures are"
		}
		return badInput("", "temperature", "%s below 273.15 K: %s. They look like °C read as kelvin; give temperatures with their unit (e.g. `925 C`) or in kelvin. If they really are kelvin, set ColdOK", what, strings.Join(cold, ", "))
	}
	return nil
}

// distinctTemperatures counts temperatures that differ by more than 1 mK.
func distinctTemperatures(T []float64) int {
	s := append([]float64(nil), T...)
	sort.Float64s(s)
	n := 0
	for i, t := range s {
		if i == 0 || t-s[i-1] > 1e-3 {
			n++
		}
	}
	return n
}

// wls is one weighted straight-line fit of y = b − Q·(x − xc), with
// x = 1/(RT) and xc the weighted mean of x, so that b and Q are
// uncorrelated: Var(b) = 1/Σw, Var(Q) = 1/Σw(x − xc)².
type wls struct {
	b, q, xc, sw, sxx, chi2 float64
	w                       []float64
	iter                    int
	converged               bool
}

// a returns ln D0 and the unscaled covariance of (ln D0, Q):
// ln D0 = b + Q·xc, Var = 1/Σw + xc²/Sxx, Cov(ln D0, Q) = xc/Sxx.
func (f wls) a() (lnD0 float64, cov [2][2]float64) {
	lnD0 = f.b + f.q*f.xc
	cov[0][0] = 1/f.sw + f.xc*f.xc/f.sxx
	cov[1][1] = 1 / f.sxx
	cov[0][1] = f.xc / f.sxx
	cov[1][0] = cov[0][1]
	return lnD0, cov
}

// fitLine fits the weighted line once with weights w.
func fitLine(x, y, w []float64) wls {
	var sw, sx, sy float64
	for i := range x {
		sw += w[i]
		sx += w[i] * x[i]
		sy += w[i] * y[i]
	}
	xc, yc := sx/sw, sy/sw
	var sxx, sxy float64
	for i := range x {
		dx := x[i] - xc
		sxx += w[i] * dx * dx
		sxy += w[i] * dx * (y[i] - yc)
	}
	q := -sxy / sxx
	var chi2 float64
	for i := range x {
		r := y[i] - (yc - q*(x[i]-xc))
		chi2 += w[i] * r * r
	}
	return wls{b: yc, q: q, xc: xc, sw: sw, sxx: sxx, chi2: chi2, w: w, converged: true}
}

// fitEffectiveVariance fits the line with weights
// wᵢ = 1/(vᵢ + (Q/(R Tᵢ²))² σᵢ²), iterating on Q until it changes by less
// than tol relatively (the effective-variance method: the temperature
// error enters ln D through ∂lnD/∂T = Q/(RT²); Orear, Am. J. Phys. 50
// (1982) 912, "Least squares when both variables have uncertainties";
// from memory).
func fitEffectiveVariance(x, y, v, T, sT []float64, maxIter int, tol float64) wls {
	n := len(x)
	w := make([]float64, n)
	for i := range w {
		w[i] = 1 / v[i]
	}
	f := fitLine(x, y, w)
	any := false
	for _, s := range sT {
		if s > 0 {
			any = true
		}
	}
	if !any {
		return f
	}
	f.converged = false
	for it := 1; it <= maxIter; it++ {
		w = make([]float64, n)
		for i := range w {
			g := f.q / (R * T[i] * T[i])
			w[i] = 1 / (v[i] + g*g*sT[i]*sT[i])
		}
		next := fitLine(x, y, w)
		next.iter = it
		if math.Abs(next.q-f.q) <= tol*math.Abs(next.q) {
			next.converged = true
			return next
		}
		f = next
	}
	return f
}

// TwoStage fits ln D = ln D0 − Q/(RT) to measured points by weighted least
// squares with weights 1/Var(ln Dᵢ) — the second stage after each profile
// has been fitted on its own.
//
// Temperature uncertainty (Point.SigmaT, or Options.TemperatureSigma for
// points without one) enters by effective variance
// Var(ln Dᵢ) + (Q/(RTᵢ²))²σ_Tᵢ², iterated to convergence; the result then
// splits Q's interval into its temperature and profile parts.
//
// Intervals are Wald intervals. The Birge ratio B = √(χ²/(n − 2)) says
// whether the points scatter more than their stated errors; when B > 1 the
// covariance is multiplied by B² (R. T. Birge, Phys. Rev. 40 (1932) 207;
// the same rule as the Particle Data Group's scale factor; from memory) and
// the variance, now estimated from the scatter, takes Student-t quantiles
// on n − 2 degrees of freedom. When B ≤ 1 the stated errors are kept and
// taken as known: normal quantiles. (Always using t with B ≤ 1 too gave 98 %
// coverage for a nominal 95 % in the simulations of the tests.)
//
// Errors: fewer than 2 points or 2 distinct temperatures, a point without
// Var(ln D) (unless Unweighted), temperatures that look like °C read as K,
// and a fitted Q that is not positive or is absurdly large. With only two
// distinct temperatures D0 and Q are returned without intervals and with
// a warning.
func TwoStage(pts []Point, o *Options) (*Line, error) {
	opt, err := o.defaults()
	if err != nil {
		return nil, err
	}
	n := len(pts)
	if n < 2 {
		return nil, badInput("", "points", "%d point(s): an Arrhenius line needs D at 2 or more distinct temperatures (3 or more for a confidence interval)", n)
	}
	ids := make([]string, n)
	srcs := make([]string, n)
	x := make([]float64, n)
	y := make([]float64, n)
	v := make([]float64, n)
	T := make([]float64, n)
	sT := make([]float64, n)
	for i, p := range pts {
		ids[i], srcs[i], T[i] = p.ID, p.Source, p.T
	}
	if err := checkTemperatures(ids, srcs, T, opt.ColdOK); err != nil {
		return nil, err
	}
	var warns []fit.Warning
	anySigmaT := false
	for i, p := range pts {
		x[i] = 1 / (R * p.T)
		y[i] = p.LnD
		if !finite(p.LnD) {
			e := badInput(p.ID, "D", "ln D = %g is not a finite number", p.LnD)
			e.Source = p.Source
			return nil, e
		}
		v[i] = p.VarLnD
		if opt.Unweighted {
			v[i] = 1
		} else if !(v[i] > 0) || !finite(v[i]) {
			e := badInput(p.ID, "D", "this point has no uncertainty of ln D (Var = %g), so it cannot be weighted; refit the profile to get one, or use an unweighted regression", p.VarLnD)
			e.Source = p.Source
			return nil, e
		}
		sT[i] = p.SigmaT
		if sT[i] == 0 {
			sT[i] = opt.TemperatureSigma
		}
		if !(sT[i] >= 0) || !finite(sT[i]) {
			e := badInput(p.ID, "temperature uncertainty", "σ_T = %g K must be a number ≥ 0", p.SigmaT)
			e.Source = p.Source
			return nil, e
		}
		if sT[i] > 0 {
			anySigmaT = true
		}
	}
	if opt.Unweighted && anySigmaT {
		for i := range sT {
			sT[i] = 0
		}
		anySigmaT = false
		warns = append(warns, fit.Warning{Code: "temperature-uncertainty-ignored", Message: "Temperature uncertainties were ignored: an unweighted regression has no stated Var(ln D) to add them to."})
	}
	nT := distinctTemperatures(T)
	if nT < 2 {
		return nil, badInput("", "temperature", "all %d points are at one temperature (%s); an Arrhenius line needs D at 2 or more distinct temperatures (3 or more for a confidence interval)", n, tk(T[0]))
	}

	f := fitEffectiveVariance(x, y, v, T, sT, opt.MaxIter, opt.Tol)
	if err := checkQ(f.q, T); err != nil {
		// Name the point that most likely caused it.
		if e, ok := err.(*Error); ok && n >= 4 {
			if ss := suspects(ids, T, y, f.w, influence(x, y, f.w), 1-opt.Level); len(ss) > 0 {
				e.Msg += ". " + strings.Join(ss, " ")
			}
		}
		return nil, err
	}
	l := &Line{Method: "two-stage", Q: f.q, Level: opt.Level, DOF: n - 2, NTemperatures: nT, Iterations: f.iter}
	var cov [2][2]float64
	l.LnD0, cov = f.a()
	l.ChiSq = f.chi2
	l.BirgeRatio, l.ChiSqP = nan, nan
	if l.DOF > 0 {
		l.BirgeRatio = math.Sqrt(f.chi2 / float64(l.DOF))
		if !opt.Unweighted {
			l.ChiSqP = distuv.ChiSquared{K: float64(l.DOF)}.Survival(f.chi2)
		}
	}
	scale := 1.0
	switch {
	case opt.Unweighted && l.DOF > 0:
		scale, l.Scaled = l.BirgeRatio*l.BirgeRatio, true
	case !opt.NoBirge && l.BirgeRatio > 1:
		scale, l.Scaled = l.BirgeRatio*l.BirgeRatio, true
	}
	for i := range cov {
		for j := range cov[i] {
			cov[i][j] *= scale
		}
	}
	l.Cov = cov
	l.HasCI = nT >= 3
	l.Points = make([]LinePoint, n)
	for i, p := range pts {
		p.SigmaT = sT[i]
		if opt.Unweighted {
			p.VarLnD = pts[i].VarLnD
		}
		fitted := l.LnD0 - l.Q*x[i]
		l.Points[i] = LinePoint{Point: p, Fitted: fitted, Residual: p.LnD - fitted, Weight: f.w[i]}
	}
	warns = append(warns, l.standardWarnings(opt)...)
	if anySigmaT {
		if !f.converged {
			warns = append(warns, fit.Warning{Code: "effective-variance-not-converged", Message: fmt.Sprintf("The effective-variance iteration did not settle in %d steps; Q's interval may be slightly off.", opt.MaxIter)})
		}
		f0 := fitEffectiveVariance(x, y, v, T, make([]float64, n), 1, opt.Tol)
		_, cov0 := f0.a()
		scale0 := 1.0
		if l.DOF > 0 && !opt.NoBirge && f0.chi2/float64(l.DOF) > 1 {
			scale0 = f0.chi2 / float64(l.DOF)
		}
		l.TempBudget = newBudget(l, 1/f.sxx, cov0[1][1], scale, scale0, f.iter, f.converged)
	}
	l.Warnings = warns
	return l, nil
}

// checkQ refuses a fitted Q that cannot be physical, with the likely cause.
func checkQ(q float64, T []float64) error {
	if !finite(q) {
		return noAnswer("", "Q", "the regression gave no finite Q; the temperatures may be too close together")
	}
	if q <= 0 {
		return badInput("", "Q", "the fitted Q = %.4g kJ/mol is not positive: in these data D does not increase with temperature. Check that temperatures are in kelvin (°C read as K does this), that each profile's time is right, and that no profile was mislabelled", q/1000)
	}
	if q > qAbsurd {
		return badInput("", "Q", "the fitted Q = %.4g kJ/mol is beyond any published activation energy of diffusion in a solid: check the temperature unit (°C read as K over a narrow range does this) and the times", q/1000)
	}
	return nil
}

// standardWarnings says what the data cannot support.
func (l *Line) standardWarnings(opt Options) []fit.Warning {
	var w []fit.Warning
	if l.NTemperatures == 2 {
		w = append(w, fit.Warning{Code: "two-temperatures", Message: "Only two distinct temperatures: D0 and Q are determined but carry no confidence interval, and the straight line cannot be checked. Measure at a third temperature (3 or more are needed for an interval)."})
	}
	if l.Scaled && !opt.Unweighted && l.ChiSqP < 1-l.Level {
		w = append(w, fit.Warning{Code: "scatter-exceeds-errors", Message: fmt.Sprintf("The points scatter more about the line than their stated errors allow (Birge ratio %.3g, χ² p = %.2g); the intervals were widened by that ratio. Look for a mislabelled temperature, a wrong time, or lot-to-lot differences.", l.BirgeRatio, l.ChiSqP)})
	}
	if opt.NoBirge && l.BirgeRatio > 1 && !(l.ChiSqP >= 1-l.Level) {
		w = append(w, fit.Warning{Code: "scatter-not-scaled", Message: fmt.Sprintf("The points scatter more than their stated errors (Birge ratio %.3g) but the intervals were not widened on request: they are too narrow.", l.BirgeRatio)})
	}
	return append(w, l.lineDiagnostics()...)
}

// newBudget splits Var(Q) into temperature and profile parts from the
// unscaled variances with (vT) and without (v0) temperature uncertainty.
func newBudget(l *Line, vT, v0, scale, scale0 float64, iter int, conv bool) *TemperatureBudget {
	b := &TemperatureBudget{Iterations: iter, Converged: conv, HalfWidthQ: nan, HalfWidthQProfiles: nan}
	share := 1.0
	if vT > 0 {
		share = math.Min(math.Max(v0/vT, 0), 1)
	}
	b.ShareProfiles, b.ShareTemperature = share, 1-share
	if l.HasCI {
		k := func(scale float64) float64 {
			if scale > 1 {
				return quantile(l.Level, l.DOF)
			}
			return quantile(l.Level, 0)
		}
		b.HalfWidthQ = k(scale) * math.Sqrt(vT*scale)
		b.HalfWidthQProfiles = k(scale0) * math.Sqrt(v0*scale0)
	}
	return b
}
