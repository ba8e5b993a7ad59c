package fit

import (
	"fmt"
	"math"
	"sort"

	"gonum.org/v1/gonum/optimize"
)

// The failure path of a fit: what solveRobust does when the solver, run
// from the model's own start, gives no certified optimum, or gives one
// whose residuals look like a local optimum's. Only such fits pay for it.

// optimum is one end point reached from one start.
type optimum struct {
	D, RSS float64 // D in reported units (m²/s), the residual sum
	Status Status
	Start  string // which start led there, in words
}

// robust is the outcome of solveRobust.
type robust struct {
	// Sol is the best certified solution (or one at the limit of the
	// model, see atLimit), or the solution from the model's start when no
	// start gives one.
	Sol *Solution
	// Optima lists the distinct certified optima found, lowest RSS first
	// (Sol is the first); more than one means the starts disagree.
	Optima []optimum
	// Lower, when not nil, is an uncertified end point with a residual sum
	// below Sol's: a parameter ran off towards an asymptote or the solver
	// stalled there, so a better fit may lie at the edge of the model.
	Lower *optimum
	// Searched is true when the multi-start ran.
	Searched bool
}

// solveRobust runs the solver from the model's start p0. When that gives
// no certified optimum, or a certified one whose residual signs run in
// long blocks (what a local optimum leaves behind), it tries harder with a
// small deterministic multi-start:
//
//   - ln D shifted by 0, ±1, ±2 and ±3 decades from the model's start;
//   - each also with the levels (parameters in the value's unit: Cs, C0,
//     Cp, CL, CR) re-derived from the data by least squares with every
//     other parameter held at the start;
//
// and, if still none certifies, a walk along a valley that runs off to a
// limit of the model (see valleyWalk), then the Nelder–Mead simplex of
// gonum/optimize (derivative-free, so it crosses regions where the model
// is not finite) on the same residual sum from the model's start and from
// the lowest end point, each polished by Solve. The certified optimum (or
// point at the model's limit, see atLimit) with the least residual sum is
// returned; all distinct ones are listed so that the caller can say the
// starts disagree.
func solveRobust(m Model, d *Data, p0 []float64, free []bool, s *Settings) (robust, error) {
	// The ordinary fit: one solve. Its problem value does not escape, so
	// it costs no allocation; the failure path builds its own.
	first, err := Solve(Problem{Y: d.Y, W: d.W, Free: free, Func: func(p, f, jac []float64) { m.Eval(p, d, f, jac) }}, p0, s)
	if err != nil {
		return robust{}, err
	}
	if first.Converged && !fewRuns(d, first.F) {
		return robust{Sol: first}, nil
	}
	pr := Problem{Y: d.Y, W: d.W, Free: free, Func: func(p, f, jac []float64) { m.Eval(p, d, f, jac) }}
	params := m.Params()
	usable := func(sol *Solution) bool { return sol.Converged || atLimit(params, sol, p0) >= 0 }
	jd := dIndex(params, free)
	out := robust{Searched: true}
	var sols []*Solution
	var labels []string
	add := func(sol *Solution, label string) {
		if sol != nil && finite(sol.RSS) {
			sols = append(sols, sol)
			labels = append(labels, label)
		}
	}
	add(first, "the model's start")
	for _, shift := range []float64{0, 1, -1, 2, -2, 3, -3} {
		start := append([]float64(nil), p0...)
		what := "the model's start"
		if jd >= 0 && shift != 0 {
			start[jd] += shift * math.Ln10
			what = fmt.Sprintf("D × 10^%+.0f", shift)
		} else if shift != 0 {
			continue
		}
		if shift != 0 {
			if sol, err := Solve(pr, start, s); err == nil {
				add(sol, what)
			}
		}
		if lv, ok := levelsFromData(pr, params, free, start, s); ok {
			if sol, err := Solve(pr, lv, s); err == nil {
				add(sol, what+" with levels from the data")
			}
		}
	}
	if !anyUsable(sols, usable) {
		if v := valleyWalk(pr, params, free, lowest(sols), s); v != nil {
			add(v, "a walk along the valley from the lowest end point")
		}
	}
	if !anyUsable(sols, usable) {
		low := lowest(sols)
		for i, from := range [][]float64{p0, low} {
			if from == nil {
				continue
			}
			if x, ok := simplex(pr, from); ok {
				if sol, err := Solve(pr, x, s); err == nil {
					add(sol, []string{"a simplex search from the model's start", "a simplex search from the lowest end point"}[i])
				}
			}
		}
	}
	// Rank: certified by RSS; everything else after.
	order := make([]int, len(sols))
	for i := range order {
		order[i] = i
	}
	sort.SliceStable(order, func(a, b int) bool {
		ca, cb := usable(sols[order[a]]), usable(sols[order[b]])
		if ca != cb {
			return ca
		}
		return sols[order[a]].RSS < sols[order[b]].RSS
	})
	dOf := func(sol *Solution) float64 {
		if jd < 0 {
			return math.NaN()
		}
		return math.Exp(sol.P[jd])
	}
	best := sols[order[0]]
	if !usable(best) {
		best = first
	}
	out.Sol = best
	for _, i := range order {
		sol := sols[i]
		if !usable(sol) {
			break
		}
		o := optimum{D: dOf(sol), RSS: sol.RSS, Status: sol.Status, Start: labels[i]}
		distinct := true
		for _, q := range out.Optima {
			if sameOptimum(q, o) {
				distinct = false
				break
			}
		}
		if distinct {
			out.Optima = append(out.Optima, o)
		}
	}
	if usable(best) {
		for i, sol := range sols {
			if !usable(sol) && sol.RSS < best.RSS*(1-1e-6) {
				if out.Lower == nil || sol.RSS < out.Lower.RSS {
					out.Lower = &optimum{D: dOf(sol), RSS: sol.RSS, Status: sol.Status, Start: labels[i]}
				}
			}
		}
	}
	for _, sol := range sols {
		if sol != best {
			sol.release()
		}
	}
	return out, nil
}

// sameOptimum tells whether two certified end points are one optimum
// reached twice: residual sums within 1e-9 relative and D within 1e-5.
func sameOptimum(a, b optimum) bool {
	if math.Abs(a.RSS-b.RSS) > 1e-9*math.Max(a.RSS, b.RSS) {
		return false
	}
	if finite(a.D) && finite(b.D) && math.Abs(math.Log(a.D/b.D)) > 1e-5 {
		return false
	}
	return true
}

func anyUsable(sols []*Solution, usable func(*Solution) bool) bool {
	for _, s := range sols {
		if usable(s) {
			return true
		}
	}
	return false
}

// atLimit returns the index of the free parameter at which sol sits at
// the limit of the model, or −1. That is a point with the first-order
// certificate (Status Asymptote) where the parameter that no longer
// changes the curve is a log-scale one other than D that ran off upwards
// from the start p0: masstransfer's β → ∞, where the surface is held at
// Cp and the model is the constant-surface erf (the nested pair). The fit
// is then the limit model, the parameter only bounded from below. Any
// other run-off (D itself, a level, a parameter falling to 0) is no answer.
func atLimit(params []Param, sol *Solution, p0 []float64) int {
	j := sol.Stuck
	if sol.Status != Asymptote || !sol.FirstOrder || j < 0 || j >= len(params) {
		return -1
	}
	if pa := params[j]; !pa.Log || pa.Name == "D" || !(sol.P[j] > p0[j]) {
		return -1
	}
	return j
}

// lowest returns a copy of the parameters of the end point with the least
// residual sum, or nil.
func lowest(sols []*Solution) []float64 {
	var best *Solution
	for _, s := range sols {
		if best == nil || s.RSS < best.RSS {
			best = s
		}
	}
	if best == nil {
		return nil
	}
	return append([]float64(nil), best.P...)
}

// dIndex is the index of the free parameter D (or, for a model without
// one, of its first free log-scale parameter), −1 if none.
func dIndex(params []Param, free []bool) int {
	for j, pa := range params {
		if pa.Name == "D" && pa.Log && free[j] {
			return j
		}
	}
	for j, pa := range params {
		if pa.Log && free[j] {
			return j
		}
	}
	return -1
}

// levelsFromData returns start with its free levels (parameters in the
// value's unit) set by least squares with everything else held: the
// levels enter every closed-form model linearly, so this is a linear
// problem that the solver finishes in a step or two.
func levelsFromData(pr Problem, params []Param, free []bool, start []float64, s *Settings) ([]float64, bool) {
	lf := make([]bool, len(free))
	any := false
	for j, pa := range params {
		if free[j] && !pa.Log && pa.Unit == "value" {
			lf[j], any = true, true
		}
	}
	if !any {
		return nil, false
	}
	q := pr
	q.Free = lf
	sol, err := Solve(q, start, s)
	if err != nil || !sol.FirstOrder {
		return nil, false
	}
	out := append([]float64(nil), sol.P...)
	sol.release()
	return out, true
}

// valleyWalk follows a valley of S that runs off towards an asymptote
// with the levels compensating (D → ∞ with C0 → −∞ when the base level is
// not reached, β → ∞ when the surface is at Cp): D (or the first free
// log-scale parameter) is moved on by 1, 2, 4, … in ln units, in whichever
// direction lowers S, with the levels re-derived from the data by least
// squares at each point, while S keeps falling (at most 8 doublings); the
// solver then starts from the last point. Far along such a valley S is
// flat to working precision and the solver can certify the point (as
// Unidentified or Asymptote when the parameters are not separately
// determined there), which gives the infimum of S over the closure of the
// model. nil when there is no such valley.
func valleyWalk(pr Problem, params []Param, free []bool, from []float64, s *Settings) *Solution {
	jd := dIndex(params, free)
	if jd < 0 || from == nil {
		return nil
	}
	cur, ok := levelsAt(pr, params, free, from, s)
	if !ok {
		return nil
	}
	curS := rssAt(pr, cur)
	var best []float64
	for _, dir := range []float64{1, -1} {
		p, sp := cur, curS
		for m := 0; m < 8; m++ {
			q := append([]float64(nil), p...)
			q[jd] += dir * math.Ldexp(1, m)
			lv, ok := levelsAt(pr, params, free, q, s)
			if !ok {
				break
			}
			sq := rssAt(pr, lv)
			if !(sq < sp) {
				break
			}
			p, sp = lv, sq
		}
		if sp < curS {
			best, curS = p, sp
		}
	}
	if best == nil {
		return nil
	}
	sol, err := Solve(pr, best, s)
	if err != nil {
		return nil
	}
	return sol
}

// levelsAt is levelsFromData, or the point itself when the model has no
// free level.
func levelsAt(pr Problem, params []Param, free []bool, p []float64, s *Settings) ([]float64, bool) {
	if lv, ok := levelsFromData(pr, params, free, p, s); ok {
		return lv, true
	}
	for j, pa := range params {
		if free[j] && !pa.Log && pa.Unit == "value" {
			return nil, false // levels exist but could not be solved
		}
	}
	return p, true
}

// rssAt evaluates S at p (+Inf when the model is not finite there).
func rssAt(pr Problem, p []float64) float64 {
	f := make([]float64, len(pr.Y))
	pr.Func(p, f, nil)
	st := lmState{y: pr.Y, wts: pr.W, n: len(pr.Y)}
	if v := st.rss(f); finite(v) {
		return v
	}
	return math.Inf(1)
}

// simplex minimises S by the Nelder–Mead method of gonum/optimize from
// the given point, in variables scaled so that a unit step in each moves
// the model by about the residual norm there (zⱼ = dⱼΔpⱼ/√S, dⱼ the
// column norm). It returns the best point found.
func simplex(pr Problem, from []float64) ([]float64, bool) {
	n, np := len(pr.Y), len(from)
	f := make([]float64, n)
	jac := make([]float64, n*np)
	pr.Func(from, f, jac)
	if !allFinite(f) || !allFinite(jac) {
		return nil, false
	}
	st := lmState{y: pr.Y, wts: pr.W, n: n}
	s0 := st.rss(f)
	if !(s0 > 0) {
		return nil, false
	}
	var idx []int
	var sc []float64
	for j := 0; j < np; j++ {
		if pr.Free != nil && !pr.Free[j] {
			continue
		}
		var cn float64
		for i := 0; i < n; i++ {
			v := jac[i*np+j]
			cn += st.w(i) * v * v
		}
		cn = math.Sqrt(cn)
		if !(cn > 0) {
			cn = 1
		}
		idx = append(idx, j)
		sc = append(sc, math.Sqrt(s0)/cn)
	}
	p := make([]float64, np)
	at := func(x []float64) []float64 {
		copy(p, from)
		for a, j := range idx {
			p[j] += x[a] * sc[a]
		}
		return p
	}
	prob := optimize.Problem{Func: func(x []float64) float64 {
		pr.Func(at(x), f, nil)
		v := st.rss(f) / s0
		if !finite(v) {
			return math.Inf(1)
		}
		return v
	}}
	set := &optimize.Settings{
		FuncEvaluations: 300 * len(idx),
		Converger:       &optimize.FunctionConverge{Relative: 1e-10, Iterations: 50},
	}
	res, err := optimize.Minimize(prob, make([]float64, len(idx)), set, &optimize.NelderMead{SimplexSize: 1})
	if res == nil || (err != nil && res.X == nil) || !finite(res.F) {
		return nil, false
	}
	return append([]float64(nil), at(res.X)...), true
}

// fewRuns reports, cheaply, whether the signs of the residuals y − f in
// depth order form far fewer runs than chance would: one-sided normal
// approximation to the Wald–Wolfowitz runs test at z < −2.33 (p < 0.01;
// Wald & Wolfowitz, Ann. Math. Statist. 11, 147–162, 1940, for the mean
// and variance of the number of runs). A local optimum of a profile fit
// typically leaves such long blocks. Data not in depth order are ranked
// first.
func fewRuns(d *Data, f []float64) bool {
	n1, n2, runs := signRuns(d.X, d.Y, f)
	if n1 < 2 || n2 < 2 {
		return false
	}
	a, b := float64(n1), float64(n2)
	N := a + b
	mu := 2*a*b/N + 1
	v := 2 * a * b * (2*a*b - N) / (N * N * (N - 1))
	if !(v > 0) {
		return false
	}
	return (float64(runs)-mu)/math.Sqrt(v) < -2.33
}
