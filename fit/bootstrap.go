package fit

import (
	"fmt"
	"math"
	"math/rand/v2"
	"sort"

	"gonum.org/v1/gonum/stat/distuv"

	"github.com/fickfit/fickfit/internal/parallel"
	"github.com/fickfit/fickfit/internal/stats"
)

// bootstrapIntervals replaces the intervals of the free parameters by
// bootstrap intervals (Efron & Tibshirani, An Introduction to the
// Bootstrap, 1993: residual resampling ch. 9, percentile ch. 13, BCa
// ch. 14). Residual resampling is the default: the centred residuals,
// standardised by √w and inflated by √(n/(n−k)), are drawn with replacement
// and added to the fitted curve (Davison & Hinkley, Bootstrap Methods and
// their Application, 1997, §6.2; from memory). Case resampling draws whole
// points instead. Each replicate draws from its own generator seeded by
// (seed, replicate number), so the result does not depend on the number of
// workers.
func (r *Result) bootstrapIntervals(o Options) error {
	bo := o.Bootstrap
	B := bo.Resamples
	if B == 0 {
		B = 2000
	}
	if B < 100 {
		return fmt.Errorf("%w: %d bootstrap resamples are too few for an interval (use at least 100; 2000 is the default)", ErrBadInput, B)
	}
	workers := bo.Workers
	d, m := r.data, r.model
	n := len(d.X)
	var idx []int
	for j, f := range r.free {
		if f {
			idx = append(idx, j)
		}
	}
	k := len(idx)
	// Standardised, centred, inflated residuals.
	res := make([]float64, n)
	var mean float64
	for i := range res {
		res[i] = d.Y[i] - r.Residuals[i].Fitted
		if d.W != nil {
			res[i] *= math.Sqrt(d.W[i])
		}
		mean += res[i]
	}
	mean /= float64(n)
	infl := math.Sqrt(float64(n) / float64(n-k))
	for i := range res {
		res[i] = (res[i] - mean) * infl
	}

	reps := make([][]float64, B) // internal-scale free parameters per replicate
	type scratch struct{ xs, ys, ws []float64 }
	newScratch := func() *scratch {
		return &scratch{xs: make([]float64, n), ys: make([]float64, n), ws: make([]float64, n)}
	}
	parallel.Scratch(B, workers, newScratch, func(b int, sc *scratch) {
		xs, ys, ws := sc.xs, sc.ys, sc.ws
		rng := rand.New(rand.NewPCG(bo.Seed, uint64(b)))
		dd := &Data{X: d.X, Y: ys, W: d.W, Time: d.Time, Thickness: d.Thickness, Faces: d.Faces}
		if bo.Cases {
			dd.X = xs
			if d.W != nil {
				dd.W = ws
			}
			for i := 0; i < n; i++ {
				c := rng.IntN(n)
				xs[i], ys[i] = d.X[c], d.Y[c]
				if d.W != nil {
					ws[i] = d.W[c]
				}
			}
		} else {
			for i := 0; i < n; i++ {
				e := res[rng.IntN(n)]
				if d.W != nil {
					e /= math.Sqrt(d.W[i])
				}
				ys[i] = r.Residuals[i].Fitted + e
			}
		}
		pr := Problem{Y: dd.Y, W: dd.W, Free: r.free, Func: func(p, f, jac []float64) { m.Eval(p, dd, f, jac) }}
		sol, err := Solve(pr, r.pint, o.Settings)
		if err == nil && r.usable(sol) {
			v := make([]float64, k)
			for a, j := range idx {
				v[a] = sol.P[j]
			}
			reps[b] = v
		}
	}, bo.Progress)

	good := reps[:0:0]
	for _, v := range reps {
		if v != nil {
			good = append(good, v)
		}
	}
	failed := B - len(good)
	if len(good) < B/2 {
		return fmt.Errorf("%w: only %d of %d bootstrap refits converged; the fit is too fragile for a bootstrap interval (use profile-likelihood intervals)", ErrNoAnswer, len(good), B)
	}
	if failed > B/20 {
		r.Warn("bootstrap-failures", "%d of %d bootstrap refits did not converge and were left out; the bootstrap interval may be too narrow.", failed, B)
	}
	alpha := 1 - r.CILevel
	params := m.Params()
	var jack [][]float64
	if !bo.Percentile {
		jack = r.jackknife(idx, o.Settings)
	}
	col := make([]float64, len(good))
	for a, j := range idx {
		if j == r.limit() {
			continue // at its limit: no interval (see finish)
		}
		for b, v := range good {
			col[b] = v[a]
		}
		sort.Float64s(col)
		lo, hi := alpha/2, 1-alpha/2
		if jack != nil {
			lo, hi = bcaLevels(col, r.pint[j], jackColumn(jack, a), alpha)
		}
		ql, qh := stats.Quantile(col, lo), stats.Quantile(col, hi)
		if params[j].Log {
			ql, qh = math.Exp(ql), math.Exp(qh)
		}
		r.Params[j].CI = Interval{ql, qh}
	}
	r.CIMethod = CIBootstrapPercentile
	if jack != nil {
		r.CIMethod = CIBootstrapBCa
	}
	return nil
}

// usable tells whether a refit of resampled data is an answer: certified,
// or at the same limit of the model as the fit itself (see atLimit).
func (r *Result) usable(sol *Solution) bool {
	if sol.Converged {
		return true
	}
	j := atLimit(r.model.Params(), sol, r.p0)
	return j >= 0 && (j == r.limit() || r.limit() < 0)
}

// jackknife refits the model leaving out each point in turn and returns
// the free parameters of each refit (nil rows for failed refits).
func (r *Result) jackknife(idx []int, set *Settings) [][]float64 {
	d, m := r.data, r.model
	n := len(d.X)
	out := make([][]float64, n)
	xs, ys := make([]float64, n-1), make([]float64, n-1)
	var ws []float64
	if d.W != nil {
		ws = make([]float64, n-1)
	}
	for leave := 0; leave < n; leave++ {
		c := 0
		for i := 0; i < n; i++ {
			if i == leave {
				continue
			}
			xs[c], ys[c] = d.X[i], d.Y[i]
			if ws != nil {
				ws[c] = d.W[i]
			}
			c++
		}
		dd := &Data{X: xs, Y: ys, W: ws, Time: d.Time, Thickness: d.Thickness, Faces: d.Faces}
		pr := Problem{Y: ys, W: ws, Free: r.free, Func: func(p, f, jac []float64) { m.Eval(p, dd, f, jac) }}
		sol, err := Solve(pr, r.pint, set)
		if err != nil || !r.usable(sol) {
			continue
		}
		v := make([]float64, len(idx))
		for a, j := range idx {
			v[a] = sol.P[j]
		}
		out[leave] = v
	}
	return out
}

func jackColumn(jack [][]float64, a int) []float64 {
	var col []float64
	for _, v := range jack {
		if v != nil {
			col = append(col, v[a])
		}
	}
	return col
}

// bcaLevels returns the bias-corrected and accelerated percentile levels
// (Efron & Tibshirani 1993, eq. 14.9–14.15): z0 from the share of replicates
// below the estimate, the acceleration from the jackknife skewness.
func bcaLevels(sorted []float64, est float64, jack []float64, alpha float64) (lo, hi float64) {
	below := sort.SearchFloat64s(sorted, est)
	frac := float64(below) / float64(len(sorted))
	if frac <= 0 || frac >= 1 || len(jack) < 3 {
		return alpha / 2, 1 - alpha/2
	}
	z0 := distuv.UnitNormal.Quantile(frac)
	var mean float64
	for _, v := range jack {
		mean += v
	}
	mean /= float64(len(jack))
	var s2, s3 float64
	for _, v := range jack {
		d := mean - v
		s2 += d * d
		s3 += d * d * d
	}
	acc := 0.0
	if s2 > 0 {
		acc = s3 / (6 * math.Pow(s2, 1.5))
	}
	adj := func(a float64) float64 {
		z := distuv.UnitNormal.Quantile(a)
		return distuv.UnitNormal.CDF(z0 + (z0+z)/(1-acc*(z0+z)))
	}
	return adj(alpha / 2), adj(1 - alpha/2)
}
