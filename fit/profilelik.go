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
// §6.1). With --absolute-sigma s = 1 and the normal quantile is used. A side
// on which τ never reaches the quantile within 60 Wald standard errors (or
// where the re-optimised fit breaks down) is reported open: not determined
// by the data.
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
		lo := pf.bound(-1, se, q, s)
		hi := pf.bound(+1, se, q, s)
		if params[j].Log {
			lo, hi = math.Exp(lo), math.Exp(hi)
		}
		r.Params[j].CI = Interval{lo, hi}
		if math.IsNaN(lo) || math.IsNaN(hi) {
			r.warnOpen(params[j].Name, r.Params[j].CI)
		}
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

// warnOpen records an open-ended interval in words.
func (r *Result) warnOpen(name string, iv Interval) {
	switch {
	case math.IsNaN(iv.Lo) && math.IsNaN(iv.Hi):
		r.Warn("ci-open", "The data do not bound %s on either side at the %.0f %% level.", name, 100*r.CILevel)
	case math.IsNaN(iv.Hi):
		r.Warn("ci-open", "%s > %.3g: the upper bound is not determined by the data at the %.0f %% level.", name, iv.Lo, 100*r.CILevel)
	default:
		r.Warn("ci-open", "%s < %.3g: the lower bound is not determined by the data at the %.0f %% level.", name, iv.Hi, 100*r.CILevel)
	}
}

// profiler re-optimises a fit with one parameter held at chosen values.
type profiler struct {
	r     *Result
	j     int
	pr    Problem
	best  float64 // S(θ̂)
	set   *Settings
	start []float64
	// done holds the constrained solutions found so far; each new one starts
	// from the solution at the nearest θ already evaluated, which keeps the
	// re-optimisation on the profile trace.
	done []tracePoint
}

type tracePoint struct {
	theta float64
	p     []float64
}

func newProfiler(r *Result, j int, set *Settings) *profiler {
	free := append([]bool(nil), r.free...)
	free[j] = false
	d, m := r.data, r.model
	return &profiler{
		r: r, j: j, set: set, best: r.Stats.RSS,
		pr:    Problem{Y: d.Y, W: d.W, Free: free, Func: func(p, f, jac []float64) { m.Eval(p, d, f, jac) }},
		start: make([]float64, len(r.pint)),
		done:  []tracePoint{{r.pint[j], append([]float64(nil), r.pint...)}},
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

// constrained returns the least RSS with parameter j held at theta, from
// the nearest point of the trace and, if that start does not converge, from
// the unconstrained estimate as well (the profile RSS is a minimum, so the
// lower of the two is the better answer).
func (pf *profiler) constrained(theta float64) (*Solution, bool) {
	var best *Solution
	for k, from := range [][]float64{pf.nearest(theta), pf.r.pint} {
		if k == 1 && best != nil && best.Converged {
			break
		}
		copy(pf.start, from)
		pf.start[pf.j] = theta
		sol, err := Solve(pf.pr, pf.start, pf.set)
		if err != nil || !finite(sol.RSS) {
			continue
		}
		if best == nil || sol.RSS < best.RSS {
			best = sol
		}
	}
	return best, best != nil
}

// tau evaluates the signed root statistic at θ; ok is false when the
// constrained fit breaks down.
func (pf *profiler) tau(theta, s float64) (float64, bool) {
	sol, ok := pf.constrained(theta)
	if !ok {
		return 0, false
	}
	// A constrained fit that wanders to an asymptote still gives a valid
	// upper bound on the profile RSS; accept it unless it is not finite.
	pf.done = append(pf.done, tracePoint{theta, append([]float64(nil), sol.P...)})
	ds := sol.RSS - pf.best
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
// crossing by the Illinois variant of regula falsi. It returns NaN for an
// open side.
func (pf *profiler) bound(dir, se, q, s float64) float64 {
	theta0 := pf.r.pint[pf.j]
	target := dir * q
	aTh, aF := theta0, -target // τ(θ̂) = 0
	step := se
	const maxSpan = 60
	for span := 0.0; ; {
		span += step / se
		th := theta0 + dir*span*se
		t, ok := pf.tau(th, s)
		if !ok {
			return math.NaN()
		}
		f := t - target
		if f*aF <= 0 {
			return pf.refine(aTh, aF, th, f, target, s, se)
		}
		aTh, aF = th, f
		if span >= maxSpan {
			return math.NaN()
		}
		step *= 1.6
	}
}

func (pf *profiler) refine(a, fa, b, fb, target, s, se float64) float64 {
	for it := 0; it < 60; it++ {
		c := (a*fb - b*fa) / (fb - fa)
		if !finite(c) {
			c = (a + b) / 2
		}
		t, ok := pf.tau(c, s)
		if !ok {
			return math.NaN()
		}
		fc := t - target
		if math.Abs(fc) < 1e-9 || math.Abs(b-a) < 1e-10*se {
			return c
		}
		if fc*fb < 0 {
			a, fa = b, fb
		} else {
			fa /= 2 // Illinois: halve the stale end's value
		}
		b, fb = c, fc
	}
	return (a + b) / 2
}
