package fit

import (
	"fmt"
	"math"
	"slices"
	"sort"
	"sync/atomic"

	"gonum.org/v1/gonum/stat/distuv"

	"github.com/fickfit/fickfit/internal/stats"
)

// finish fills statistics, covariance, intervals, residuals and warnings
// from a converged solution.
func (r *Result) finish(sol *Solution, o Options) error {
	d, m := r.data, r.model
	params := m.Params()
	n := len(d.X)
	k := 0
	for _, f := range r.free {
		if f {
			k++
		}
	}
	r.FreeNames = slices.Grow(r.FreeNames[:0], k)
	for j, f := range r.free {
		if f {
			r.FreeNames = append(r.FreeNames, params[j].Name)
		}
	}
	dof := n - k
	r.Stats = Stats{N: n, DOF: dof, RSS: sol.RSS, Iterations: sol.Iterations}
	r.Stats.Chi2Red = sol.RSS / float64(dof)
	r.Stats.RMSE = math.Sqrt(r.Stats.Chi2Red)
	r.Stats.R2 = 1 - sol.RSS/totalSS(d)
	r.Stats.AICc = aicc(sol.RSS, n, k)
	r.Stats.Chi2P = math.NaN()
	if d.W != nil {
		r.Stats.Chi2P = distuv.ChiSquared{K: float64(dof)}.Survival(sol.RSS)
	}
	r.Stats.Cond = sol.Cond

	level := o.Level
	if level == 0 {
		level = 0.95
	}
	if !(level > 0 && level < 1) {
		return fmt.Errorf("%w: confidence level %g must be between 0 and 1 (e.g. 0.95)", ErrBadInput, level)
	}
	r.CILevel = level
	cov, ok := r.covariance(sol, k)
	if !ok {
		return fmt.Errorf("%w: the parameters %v cannot be separated by these data (singular Jacobian); hold one of them fixed at a known value or add points where the profile changes", ErrNoAnswer, r.FreeNames)
	}
	r.Covariance = CovScaled
	scale := r.Stats.Chi2Red
	if o.AbsoluteSigma {
		if d.W == nil {
			return fmt.Errorf("%w: σ taken as known (absolute) needs a sigma column with the standard uncertainty of each value", ErrBadInput)
		}
		r.Covariance, scale = CovAbsolute, 1
	}
	for i := range cov {
		for j := range cov[i] {
			cov[i][j] *= scale
		}
	}
	r.cov = cov
	var corr []float64 // the rows' storage: Correlation[0] spans it
	if len(r.Correlation[:cap(r.Correlation)]) > 0 {
		corr = r.Correlation[:1][0]
	}
	r.Correlation = resize(r.Correlation, k)
	corr = resize(corr[:cap(corr)], k*k)
	li := r.limitFree()
	for i := range cov {
		r.Correlation[i] = corr[i*k : (i+1)*k]
		for j := range cov[i] {
			r.Correlation[i][j] = cov[i][j] / math.Sqrt(cov[i][i]*cov[j][j])
			if i == li || j == li {
				r.Correlation[i][j] = math.NaN() // undefined at the limit
			}
		}
	}

	// Known σ: the normal quantile; σ estimated from the residuals: Student t.
	tq := stats.T(level, dof)
	if r.Covariance == CovAbsolute {
		tq = stats.Z(level)
	}
	r.Params = resize(r.Params, len(params))
	fi := 0
	for j, pa := range params {
		e := Estimate{Name: pa.Name, Unit: unitFor(pa, r), Value: external(pa, r.pint[j]), Fixed: !r.free[j]}
		if r.Time == 0 {
			// Without the time only products with t are determined.
			switch e.Name {
			case "D":
				e.Unit = "m2" // Dt
			case "beta":
				e.Unit = "m" // βt
			}
		}
		if j == r.limit() {
			// At its limit (+∞): no value, no standard error; the profile
			// gives a lower bound, the other methods none.
			e.Value, e.StdErr, e.StdErrLn = math.Inf(1), math.NaN(), math.NaN()
			e.CI = Interval{math.NaN(), math.NaN()}
			fi++
		} else if r.free[j] {
			se := math.Sqrt(cov[fi][fi])
			lo, hi := r.pint[j]-tq*se, r.pint[j]+tq*se
			if pa.Log {
				e.StdErrLn = se
				e.StdErr = e.Value * se
				e.CI = Interval{math.Exp(lo), math.Exp(hi)}
			} else {
				e.StdErr = se
				e.CI = Interval{lo, hi}
			}
			fi++
		} else {
			e.CI = Interval{e.Value, e.Value}
		}
		r.Params[j] = e
	}
	r.CIMethod = CIWald

	r.Residuals = resize(r.Residuals, n)
	for i := range d.X {
		r.Residuals[i] = Residual{Depth: d.X[i], Observed: d.Y[i], Fitted: sol.F[i], Residual: d.Y[i] - sol.F[i]}
	}
	r.Stats.RunsP = runsP(signRuns(d.X, d.Y, sol.F))

	switch o.CI {
	case "", CIProfile:
		if err := r.profileIntervals(o); err != nil {
			return err
		}
	case CIWald:
	case CIBootstrap:
		if err := r.bootstrapIntervals(o); err != nil {
			return err
		}
	default:
		return fmt.Errorf("%w: unknown interval method %q (use profile, wald or bootstrap)", ErrBadInput, o.CI)
	}
	r.diagnose()
	return nil
}

// covariance inverts JᵀWJ over the free parameters. With a parameter at
// its limit (its column has vanished) it inverts over the others and
// leaves zeros in that row and column: the parameter no longer moves the
// curve, so it adds nothing to the band of the curve (its own interval is
// handled apart). Stats.Cond is then the condition number of the rest.
func (r *Result) covariance(sol *Solution, k int) ([][]float64, bool) {
	li := r.limitFree()
	if li < 0 {
		return invertSPDInto(sol.JTJ, k, r.cov) // in the storage of a result lent for reuse
	}
	m := k - 1
	red := make([]float64, 0, m*m)
	for a := 0; a < k; a++ {
		for b := 0; b < k; b++ {
			if a != li && b != li {
				red = append(red, sol.JTJ[a*k+b])
			}
		}
	}
	r.Stats.Cond = scaledCond(red, m)
	if !(r.Stats.Cond <= DefaultSettings().CondMax) {
		return nil, false
	}
	inv, ok := invertSPD(red, m)
	if !ok {
		return nil, false
	}
	cov := make([][]float64, k)
	for a := range cov {
		cov[a] = make([]float64, k)
		if a == li {
			continue
		}
		ra := a
		if a > li {
			ra--
		}
		for b := 0; b < k; b++ {
			if b == li {
				continue
			}
			rb := b
			if b > li {
				rb--
			}
			cov[a][b] = inv[ra][rb]
		}
	}
	return cov, true
}

// limitFree is the position among the free parameters of the parameter at
// its limit, or −1.
func (r *Result) limitFree() int {
	lj := r.limit()
	if lj < 0 {
		return -1
	}
	fi := 0
	for j, f := range r.free {
		if j == lj {
			return fi
		}
		if f {
			fi++
		}
	}
	return -1
}

// external maps an internal parameter value to its reported value.
func external(pa Param, v float64) float64 {
	if pa.Log {
		return math.Exp(v)
	}
	return v
}

// unitFor resolves the "value" placeholders of a parameter's unit.
func unitFor(pa Param, r *Result) string {
	vu := r.ValueUnit
	if vu == "" {
		vu = "value"
	}
	switch pa.Unit {
	case "value":
		return vu
	case "value*m":
		return vu + "*m"
	case "1/value":
		return "1/" + vu
	}
	return pa.Unit
}

// totalSS is the (weighted) sum of squares about the (weighted) mean.
func totalSS(d *Data) float64 {
	var sw, swy float64
	for i, y := range d.Y {
		w := 1.0
		if d.W != nil {
			w = d.W[i]
		}
		sw += w
		swy += w * y
	}
	mean := swy / sw
	var ss float64
	for i, y := range d.Y {
		w := 1.0
		if d.W != nil {
			w = d.W[i]
		}
		ss += w * (y - mean) * (y - mean)
	}
	return ss
}

// aicc is the small-sample corrected Akaike criterion for least squares
// with Gaussian errors, counting the error variance as a parameter:
// AICc = n ln(RSS/n) + 2K + 2K(K+1)/(n−K−1), K = k+1 (Burnham & Anderson,
// Model Selection and Multimodel Inference, 2nd ed., 2002, §2.4; from
// memory). Only differences between models on the same data mean anything.
func aicc(rss float64, n, k int) float64 {
	K := float64(k + 1)
	nf := float64(n)
	if nf-K-1 <= 0 || rss <= 0 {
		return math.NaN()
	}
	return nf*math.Log(rss/nf) + 2*K + 2*K*(K+1)/(nf-K-1)
}

// runsTest is the Wald–Wolfowitz runs test on the signs of the residuals
// taken in depth order (A. Wald and J. Wolfowitz, Ann. Math. Statist. 11,
// 147–162, 1940). It returns the two-sided p-value from the exact
// conditional distribution of the number of runs given the counts of
// positive and negative residuals; zero residuals are dropped. Too few
// signs of either kind give NaN.
func runsTest(x, res []float64) float64 { return runsP(signRuns(x, res, nil)) }

// runsP is the two-sided p-value of r runs among n1 positive and n2
// negative signs from their exact null distribution; NaN when either
// count is below 2.
func runsP(n1, n2, runs int) float64 {
	if n1 < 2 || n2 < 2 {
		return math.NaN()
	}
	pmf := runsNull(n1, n2)
	var lo, hi float64 // P(R ≤ runs), P(R ≥ runs)
	for r, pr := range pmf {
		if r <= runs {
			lo += pr
		}
		if r >= runs {
			hi += pr
		}
	}
	return math.Min(1, 2*math.Min(lo, hi))
}

// signRuns counts the positive and negative residuals y − f (f nil: y
// itself) at depths x, and the runs of equal signs they form in depth
// order (zero residuals dropped; points not in depth order ranked first).
// It serves the exact runs test and the failure path's quick one.
func signRuns(x, y, f []float64) (n1, n2, runs int) {
	n := len(x)
	var idx []int
	if !sort.Float64sAreSorted(x) {
		idx = make([]int, n)
		for j := range idx {
			idx[j] = j
		}
		sort.SliceStable(idx, func(p, q int) bool { return x[idx[p]] < x[idx[q]] })
	}
	prev := 0
	for k := 0; k < n; k++ {
		i := k
		if idx != nil {
			i = idx[k]
		}
		e := y[i]
		if f != nil {
			e -= f[i]
		}
		s := 0
		switch {
		case e > 0:
			s, n1 = 1, n1+1
		case e < 0:
			s, n2 = -1, n2+1
		default:
			continue
		}
		if s != prev {
			runs++
			prev = s
		}
	}
	return n1, n2, runs
}

// runsDist returns P(R = r) for r = 0…n1+n2 when n1 and n2 signs are in
// random order (Swed & Eisenhart, Ann. Math. Statist. 14, 66–87, 1943):
// with r = 2m, 2·C(n1−1, m−1)·C(n2−1, m−1)/C(n1+n2, n1); with r = 2m+1,
// [C(n1−1, m)·C(n2−1, m−1) + C(n1−1, m−1)·C(n2−1, m)]/C(n1+n2, n1).
// The binomial coefficients are stepped in logs, so only three Lgamma
// calls are needed.
func runsDist(n1, n2 int) []float64 {
	den := lchoose(n1+n2, n1)
	mmax := min(n1, n2) + 1
	buf := make([]float64, n1+n2+1+2*(mmax+1))
	pmf := buf[:n1+n2+1]
	// la[m] = ln C(n1−1, m), lb[m] = ln C(n2−1, m), for m = 0…mmax.
	la := buf[n1+n2+1 : n1+n2+mmax+2]
	lb := buf[n1+n2+mmax+2:]
	step := func(l []float64, nn int) {
		l[0] = 0
		for m := 1; m < len(l); m++ {
			if m > nn {
				l[m] = math.Inf(-1)
				continue
			}
			l[m] = l[m-1] + math.Log(float64(nn-m+1)/float64(m))
		}
	}
	step(la, n1-1)
	step(lb, n2-1)
	for m := 1; m <= mmax; m++ {
		if r := 2 * m; r < len(pmf) {
			pmf[r] = 2 * math.Exp(la[m-1]+lb[m-1]-den)
		}
		if r := 2*m + 1; r < len(pmf) && m < len(la) {
			pmf[r] = math.Exp(la[m]+lb[m-1]-den) + math.Exp(la[m-1]+lb[m]-den)
		}
	}
	return pmf
}

// runsCacheSize bounds the counts (n1, n2) whose null distribution is
// kept: profiles up to 2·runsCacheSize − 2 points (each count below it)
// share one table per pair; longer ones compute theirs every time.
const runsCacheSize = 128

// runsCache holds runsDist(n1, n2) once computed: it depends only on the
// pair, and a batch of fits meets few pairs (about n/2 each). The tables
// are read-only once stored; the atomic pointers let every worker read
// them without a lock (two workers computing one pair at once store equal
// tables, and either is kept).
var runsCache [runsCacheSize][runsCacheSize]atomic.Pointer[[]float64]

// runsNull returns runsDist(n1, n2), from the cache when the pair is in
// range. The caller must not modify it.
func runsNull(n1, n2 int) []float64 {
	if n1 >= runsCacheSize || n2 >= runsCacheSize {
		return runsDist(n1, n2)
	}
	slot := &runsCache[n1][n2]
	if p := slot.Load(); p != nil {
		return *p
	}
	pmf := runsDist(n1, n2)
	slot.Store(&pmf)
	return pmf
}

// runsPMF is P(R = r) for n1 and n2 signs in random order (see runsDist).
func runsPMF(r, n1, n2 int) float64 {
	if r < 0 || r > n1+n2 {
		return 0
	}
	return runsDist(n1, n2)[r]
}

// lchoose is ln C(n, k), −Inf outside 0 ≤ k ≤ n.
func lchoose(n, k int) float64 {
	if k < 0 || k > n {
		return math.Inf(-1)
	}
	a, _ := math.Lgamma(float64(n + 1))
	b, _ := math.Lgamma(float64(k + 1))
	c, _ := math.Lgamma(float64(n - k + 1))
	return a - b - c
}

// tQuantile is stats.T with the arguments of profilelik.go, which calls it.
func tQuantile(dof int, level float64) float64 { return stats.T(level, dof) }
