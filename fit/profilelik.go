package fit

import (
	"math"

	"gonum.org/v1/gonum/stat/distuv"
)

// profileIntervals replaces the Wald intervals of the free parameters by
// profile-likelihood intervals: for each parameter θ the other free
// parameters are re-optimised at fixed θ, and the bounds are where the
// signed root statistic
//
//	τ(θ) = sign(θ − θ̂)·√(S(θ) − S(θ̂)) / s
//
// reaches ∓ the Student-t quantile with the residual degrees of freedom
// (Bates & Watts, Nonlinear Regression Analysis and Its Applications, 1988,
// §6.1). With --absolute-sigma s = 1 and the normal quantile is used.
//
// A constrained refit counts only when the solver certifies it (first-order
// certificate; a nuisance parameter that has run off to an asymptote at a
// certified point, like masstransfer's β → ∞, gives the infimum over the
// model's closure and counts too). A refit that is not certified is tried
// again from other starts (the nearest point of the profile trace, the
// unconstrained estimate, the model's own start from the data with the
// levels re-derived, a walk along a valley that runs off to an asymptote,
// a simplex search); an end whose refits cannot be
// certified is reported open, with a warning, never as a number. A side on
// which τ never reaches the quantile within 60 Wald standard errors, or on
// which τ levels off below it, is open too: not determined by the data.
func (r *Result) profileIntervals(o Options) error {
	q, s := r.profileCutoff()
	params := r.model.Params()
	fi := 0
	for j, free := range r.free {
		if !free {
			continue
		}
		se := math.Sqrt(r.cov[fi][fi])
		fi++
		pf := newProfiler(r, j, o.Settings)
		var lo, hi float64
		var whyLo, whyHi openEnd
		if j == r.limit() {
			lo, whyLo = pf.limitBound(q, s)
			hi, whyHi = math.NaN(), openEnd{open: true}
		} else {
			lo, whyLo = pf.bound(-1, se, q, s)
			hi, whyHi = pf.bound(+1, se, q, s)
		}
		if params[j].Log {
			lo, hi = math.Exp(lo), math.Exp(hi)
		}
		r.Params[j].CI = Interval{lo, hi}
		r.warnOpen(params[j].Name, r.Params[j].CI, whyLo, whyHi)
	}
	r.CIMethod = "profile"
	return nil
}

// profileCutoff returns the quantile the signed root is compared with and
// the residual scale s.
func (r *Result) profileCutoff() (q, s float64) {
	if r.Covariance == "absolute" {
		return distuv.UnitNormal.Quantile(0.5 + r.CILevel/2), 1
	}
	q = tQuantile(r.Stats.DOF, r.CILevel)
	return q, math.Sqrt(r.Stats.Chi2Red)
}

// openEnd says why an interval end is open.
type openEnd struct {
	open bool
	// uncertified, when open: the constrained refit at theta could not be
	// certified as a minimum (solver status); otherwise the data do not
	// reach the cutoff on that side.
	uncertified bool
	theta       float64
	status      Status
}

// warnOpen records the open ends of an interval in words.
func (r *Result) warnOpen(name string, iv Interval, lo, hi openEnd) {
	level := 100 * r.CILevel
	dataLo := lo.open && !lo.uncertified
	dataHi := hi.open && !hi.uncertified
	switch {
	case dataLo && dataHi:
		r.Warn("ci-open", "The data do not bound %s on either side at the %.0f %% level.", name, level)
	case dataHi:
		r.Warn("ci-open", "%s > %.3g: the upper bound is not determined by the data at the %.0f %% level.", name, iv.Lo, level)
	case dataLo:
		r.Warn("ci-open", "%s < %.3g: the lower bound is not determined by the data at the %.0f %% level.", name, iv.Hi, level)
	}
	for side, e := range []openEnd{lo, hi} {
		if !e.uncertified {
			continue
		}
		r.Warn("ci-open", "The %s end of the %s interval is left open: the refit with %s held at %.4g could not be certified as a minimum (solver: %s) from any start, so no bound is claimed there.",
			[]string{"lower", "upper"}[side], name, name, r.external(name, e.theta), e.status)
	}
}

// external maps an internal value of the named parameter to its reported scale.
func (r *Result) external(name string, v float64) float64 {
	for _, pa := range r.model.Params() {
		if pa.Name == name {
			return external(pa, v)
		}
	}
	return v
}

// profiler re-optimises a fit with one parameter held at chosen values.
type profiler struct {
	r     *Result
	j     int
	pr    Problem
	best  float64 // S(θ̂)
	set   *Settings
	start []float64
	// done holds the certified constrained solutions found so far; each new
	// one starts from the solution at the nearest θ already evaluated, which
	// keeps the re-optimisation on the profile trace.
	done []tracePoint
	// last is the latest refit, whether kept on the trace or not.
	last tracePoint
	// model is the model's own start from the data (nil until needed).
	model []float64
	// failed is the status of the last refit that could not be certified.
	failed Status
	// thorough is set once another start undercut the refit on the profile
	// trace at a bound: every later refit then takes the least
	// of the certified refits from the trace, the unconstrained estimate,
	// the model's own start and far along a valley (see farProbe).
	thorough bool
}

type tracePoint struct {
	theta float64
	p     []float64
	rss   float64
}

func newProfiler(r *Result, j int, set *Settings) *profiler {
	free := append([]bool(nil), r.free...)
	free[j] = false
	d, m := r.data, r.model
	return &profiler{
		r: r, j: j, set: set, best: r.Stats.RSS,
		pr:    Problem{Y: d.Y, W: d.W, Free: free, Func: func(p, f, jac []float64) { m.Eval(p, d, f, jac) }},
		start: make([]float64, len(r.pint)),
		done:  []tracePoint{{r.pint[j], append([]float64(nil), r.pint...), r.Stats.RSS}},
	}
}

// nearest returns the stored solution whose θ is closest to theta.
func (pf *profiler) nearest(theta float64) []float64 {
	best := pf.done[0]
	for _, tp := range pf.done[1:] {
		if math.Abs(tp.theta-theta) < math.Abs(best.theta-theta) {
			best = tp
		}
	}
	return best.p
}

// solveFrom runs the constrained refit from `from` with θ set.
func (pf *profiler) solveFrom(from []float64, theta float64) *Solution {
	copy(pf.start, from)
	pf.start[pf.j] = theta
	sol, err := Solve(pf.pr, pf.start, pf.set)
	if err != nil || !finite(sol.RSS) {
		return nil
	}
	return sol
}

// constrained returns the least RSS with parameter j held at theta, from a
// certified refit. The nearest point of the profile trace is tried first;
// when its refit is not certified, the unconstrained estimate, the model's
// own start from the data (with the levels re-derived), a walk along the
// valley from the lowest end point (see valleyWalk) and a simplex search
// follow, and the certified one with the
// least RSS is kept. ok is false when no start gives a certified refit.
func (pf *profiler) constrained(theta float64) (*Solution, bool) {
	if sol := pf.solveFrom(pf.nearest(theta), theta); sol != nil && pf.certified(sol) {
		if pf.thorough {
			if v, ok := pf.lower(sol.P, sol.RSS, theta); ok {
				sol.release()
				return v, true
			}
		}
		return sol, true
	} else if sol != nil {
		pf.failed = sol.Status
		sol.release()
	}
	var tried []*Solution
	keep := func(sol *Solution) {
		if sol != nil {
			tried = append(tried, sol)
		}
	}
	keep(pf.solveFrom(pf.r.pint, theta))
	keep(pf.solveFrom(pf.modelStart(), theta))
	copy(pf.start, pf.model)
	pf.start[pf.j] = theta
	if lv, ok := levelsFromData(pf.pr, pf.r.model.Params(), pf.pr.Free, pf.start, pf.set); ok {
		keep(pf.solveFrom(lv, theta))
	}
	if !pf.anyCertified(tried) {
		if v := valleyWalk(pf.pr, pf.r.model.Params(), pf.pr.Free, lowest(tried), pf.set); v != nil {
			keep(v)
		}
	}
	if !pf.anyCertified(tried) {
		if low := lowest(tried); low != nil {
			if x, ok := simplex(pf.pr, low); ok {
				keep(pf.solveFrom(x, theta))
			}
		}
	}
	var best *Solution
	for _, sol := range tried {
		if pf.certified(sol) && (best == nil || sol.RSS < best.RSS) {
			best = sol
		}
	}
	if best == nil && len(tried) > 0 {
		pf.failed = tried[0].Status
	}
	for _, sol := range tried {
		if sol != best {
			sol.release()
		}
	}
	return best, best != nil
}

func (pf *profiler) anyCertified(sols []*Solution) bool {
	for _, s := range sols {
		if pf.certified(s) {
			return true
		}
	}
	return false
}

// certified tells whether a constrained refit gives a profile value: the
// first-order certificate holds, and if a parameter ran off to an
// asymptote it is a log-scale one, whose limit (0 or ∞) is a point of the
// model's closure. A level or position without effect means the model
// evaluation has broken down (e.g. an underflowed term), not a limit.
func (pf *profiler) certified(sol *Solution) bool {
	if sol == nil || !sol.FirstOrder {
		return false
	}
	if sol.Status == Asymptote {
		params := pf.r.model.Params()
		return sol.Stuck >= 0 && sol.Stuck < len(params) && params[sol.Stuck].Log
	}
	return true
}

// lower returns a certified refit at theta below the one at p (residual
// sum rss), from the unconstrained estimate, the model's own start or far
// along a valley.
func (pf *profiler) lower(p []float64, rss, theta float64) (*Solution, bool) {
	var best *Solution
	if v := pf.solveFrom(pf.r.pint, theta); pf.certified(v) && v.RSS < rss*(1-1e-12) {
		best, p, rss = v, v.P, v.RSS
	} else {
		v.release()
	}
	if v, ok := pf.farProbe(p, rss); ok {
		best.release()
		best = v
	}
	return best, best != nil
}

// modelStart is the model's own start from the data, with the parameters
// that are not free held at the fit's values.
func (pf *profiler) modelStart() []float64 {
	if pf.model == nil {
		p := make([]float64, len(pf.r.pint))
		if err := pf.r.model.Start(pf.r.data, p); err == nil {
			for k, free := range pf.r.free {
				if !free || !finite(p[k]) {
					p[k] = pf.r.pint[k]
				}
			}
			pf.model = p
		} else {
			pf.model = pf.r.pint
		}
	}
	return pf.model
}

// farProbe looks for a lower constrained minimum far along a valley of
// the model (D, or the first free log-scale parameter, moved by e^±64 with
// the levels re-derived from the data, then solved): a profile trace can
// sit in a local minimum while S is lower where a parameter runs off
// towards an asymptote (the straight-line limit of erf when the base level
// is not reached). It returns a certified refit below rss, if any.
func (pf *profiler) farProbe(p []float64, rss float64) (*Solution, bool) {
	params := pf.r.model.Params()
	jd := dIndex(params, pf.pr.Free)
	if jd < 0 {
		return nil, false
	}
	var best *Solution
	for _, dir := range []float64{1, -1} {
		q := append([]float64(nil), p...)
		q[jd] += dir * 64
		lv, ok := levelsAt(pf.pr, params, pf.pr.Free, q, pf.set)
		if !ok || !(rssAt(pf.pr, lv) < rss) {
			continue
		}
		v, err := Solve(pf.pr, lv, pf.set)
		if err != nil || !pf.certified(v) || !(v.RSS < rss*(1-1e-12)) {
			v.release()
			continue
		}
		if best == nil || v.RSS < best.RSS {
			best.release()
			best = v
		} else {
			v.release()
		}
	}
	return best, best != nil
}

// tau evaluates the signed root statistic at θ; ok is false when no
// certified constrained refit exists there.
func (pf *profiler) tau(theta, s float64) (float64, bool) {
	sol, ok := pf.constrained(theta)
	if !ok {
		return 0, false
	}
	// A refit in which some parameter ran off (other than one already at
	// its limit in the fit) is a valid profile value but a poor start for
	// its neighbours: it is not kept on the trace.
	pf.last = tracePoint{theta, append([]float64(nil), sol.P...), sol.RSS}
	if sol.Status != Asymptote || (sol.Stuck == pf.r.limit() && sol.Stuck >= 0) {
		pf.done = append(pf.done, pf.last)
	}
	ds := sol.RSS - pf.best
	sol.release()
	if ds < 0 {
		ds = 0
	}
	t := math.Sqrt(ds) / s
	if theta < pf.r.pint[pf.j] {
		t = -t
	}
	return t, true
}

// bound walks from θ̂ in direction dir until |τ| exceeds q, then finds the
// crossing by the Illinois variant of regula falsi. It returns NaN and the
// reason for an open side.
func (pf *profiler) bound(dir, se, q, s float64) (float64, openEnd) {
	theta0 := pf.r.pint[pf.j]
	target := dir * q
	aTh, aF := theta0, -target // τ(θ̂) = 0
	step := se
	const maxSpan = 60
	flat := 0
	for span := 0.0; ; {
		span += step / se
		th := theta0 + dir*span*se
		t, ok := pf.tau(th, s)
		if !ok {
			return math.NaN(), openEnd{open: true, uncertified: true, theta: th, status: pf.failed}
		}
		f := t - target
		if f*aF <= 0 {
			c, why := pf.refine(aTh, aF, th, f, target, s, se)
			if why.open || pf.thorough {
				return c, why
			}
			// The crossing holds only if no other start gives a lower
			// minimum at the bound; otherwise search on, thoroughly.
			if pf.last.theta != c {
				if _, ok := pf.tau(c, s); !ok {
					return math.NaN(), openEnd{open: true, uncertified: true, theta: c, status: pf.failed}
				}
			}
			if _, lower := pf.lower(pf.last.p, pf.last.rss, c); !lower {
				return c, why
			}
			pf.thorough = true
			t, ok := pf.tau(c, s)
			if !ok {
				return math.NaN(), openEnd{open: true, uncertified: true, theta: c, status: pf.failed}
			}
			aTh, aF = c, t-target
			span = math.Abs(c-theta0) / se
			step = math.Max(step, se)
			flat = 0
			continue
		}
		// τ levelling off below the cutoff: two steps, each 1.6 times longer
		// than the one before, that each close less than 1e-5 of the
		// remaining gap to the cutoff.
		if math.Abs(f-aF) < 1e-5*math.Abs(f) {
			flat++
		} else {
			flat = 0
		}
		aTh, aF = th, f
		if span >= maxSpan || flat >= 2 {
			return math.NaN(), openEnd{open: true}
		}
		step *= 1.6
	}
}

// limitBound finds the lower bound of a parameter at its limit (+∞, see
// atLimit), where τ is flat: θ is lowered from the estimate by 1, 2, 4, …
// (ln units) until τ crosses −q, the bracket is halved down to a width of
// 1, and the crossing refined as for the other bounds.
func (pf *profiler) limitBound(q, s float64) (float64, openEnd) {
	pf.thorough = true // a rare path: every refit checks other starts
	theta0 := pf.r.pint[pf.j]
	target := -q
	aTh, aF := theta0, q
	for m := 0; m < 14; m++ {
		th := theta0 - math.Ldexp(1, m)
		t, ok := pf.tau(th, s)
		if !ok {
			return math.NaN(), openEnd{open: true, uncertified: true, theta: th, status: pf.failed}
		}
		f := t - target
		if f*aF > 0 {
			aTh, aF = th, f
			continue
		}
		b, fb := th, f
		for aTh-b > 1 {
			c := (aTh + b) / 2
			t, ok := pf.tau(c, s)
			if !ok {
				return math.NaN(), openEnd{open: true, uncertified: true, theta: c, status: pf.failed}
			}
			if fc := t - target; fc*aF > 0 {
				aTh, aF = c, fc
			} else {
				b, fb = c, fc
			}
		}
		return pf.refine(aTh, aF, b, fb, target, s, 1)
	}
	return math.NaN(), openEnd{open: true}
}

func (pf *profiler) refine(a, fa, b, fb, target, s, se float64) (float64, openEnd) {
	for it := 0; it < 60; it++ {
		c := (a*fb - b*fa) / (fb - fa)
		if !finite(c) {
			c = (a + b) / 2
		}
		t, ok := pf.tau(c, s)
		if !ok {
			return math.NaN(), openEnd{open: true, uncertified: true, theta: c, status: pf.failed}
		}
		fc := t - target
		if math.Abs(fc) < 1e-9 || math.Abs(b-a) < 1e-10*se {
			return c, openEnd{}
		}
		if fc*fb < 0 {
			a, fa = b, fb
		} else {
			fa /= 2 // Illinois: halve the stale end's value
		}
		b, fb = c, fc
	}
	return (a + b) / 2, openEnd{}
}
