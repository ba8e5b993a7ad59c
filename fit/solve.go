package fit

import (
	"fmt"
	"math"
	"sync"
)

// Problem is a weighted nonlinear least-squares problem:
// minimise S(p) = Σᵢ wᵢ (yᵢ − fᵢ(p))².
type Problem struct {
	// Func writes the model values fᵢ(p) into f (len N). When jac is not nil
	// it also writes ∂fᵢ/∂pⱼ into jac[i*P+j] (row-major, N×P).
	Func func(p, f, jac []float64)
	Y    []float64 // observations, len N
	W    []float64 // weights, len N; nil means all 1
	// Free marks the parameters the solver may move; nil means all.
	Free []bool
}

// Settings tune Solve. A zero field takes the value from DefaultSettings.
type Settings struct {
	// MaxIter is the largest number of iterations (Jacobian evaluations at
	// accepted points).
	MaxIter int
	// FTol is the certificate's tolerance on the predicted relative
	// reduction of S: the reduction the quadratic model predicts for the
	// next Levenberg–Marquardt step (damping at most the initial one),
	// divided by S, must be below it.
	FTol float64
	// XTol is ignored: a small step is not evidence of an optimum, so Solve
	// no longer stops on it. Kept so that older callers still compile.
	//
	// Deprecated: the first-order certificate (FTol, GTol) decides.
	XTol float64
	// GTol is the certificate's tolerance on the largest scaled gradient
	// component |gⱼ|/(dⱼ√S), the cosine between the residual vector and
	// the scaled Jacobian column j.
	GTol float64
	// CondMax is the largest condition number of the scaled JᵀWJ at the
	// solution for the parameters to count as identified.
	CondMax float64
}

// DefaultSettings returns tolerances tight enough to reproduce certified
// reference values to about eight significant digits.
func DefaultSettings() Settings {
	return Settings{MaxIter: 200, FTol: 1e-14, GTol: 1e-8, CondMax: 1e13}
}

func (s *Settings) withDefaults() Settings {
	d := DefaultSettings()
	if s == nil {
		return d
	}
	out := *s
	if out.MaxIter <= 0 {
		out.MaxIter = d.MaxIter
	}
	if out.FTol <= 0 {
		out.FTol = d.FTol
	}
	if out.GTol <= 0 {
		out.GTol = d.GTol
	}
	if out.CondMax <= 0 {
		out.CondMax = d.CondMax
	}
	return out
}

// Solution is the outcome of Solve: the answer and how it was obtained.
type Solution struct {
	P          []float64 // all parameters (fixed ones unchanged)
	F          []float64 // model values at P
	RSS        float64   // weighted residual sum of squares at P
	Iterations int       // Jacobian evaluations at accepted points
	// Status says how Solve ended; Converged is Status == Certified.
	Status    Status
	Converged bool
	// Reason says why the iteration stopped, in words.
	Reason string
	// FirstOrder is true when the first-order certificate held at P, even
	// if P is no usable answer (Status Asymptote or Unidentified): S is then
	// stationary to working precision in the free parameters.
	FirstOrder bool
	// Gradient is the largest scaled gradient component |gⱼ|/(dⱼ√S) at P and
	// Predicted the predicted relative reduction of S of the next step: the
	// two numbers of the certificate.
	Gradient, Predicted float64
	// JTJ is JᵀWJ over the free parameters at P (k×k, row-major).
	JTJ []float64
	// Jac is the N×P Jacobian at P.
	Jac []float64
	// Cond is the condition number of the unit-diagonal scaled JTJ.
	Cond float64
	// Stuck is the index of a free parameter that ran off to an asymptote
	// (it no longer changes the model), or −1.
	Stuck int

	work *[]float64 // the workspace P, F, Jac and JTJ live in
}

// lambda0 is the initial damping, dimensionless: relative to the scaled
// JᵀWJ, whose diagonal is 1 at the start (Nielsen's τ = 1e-3 for a start
// of unknown quality: H. B. Nielsen, "Damping parameter in Marquardt's
// method", IMM-REP-1999-05, DTU, 1999; from memory).
const lambda0 = 1e-3

// Solve minimises the problem by Levenberg–Marquardt with Moré's scaling
// (J. J. Moré, "The Levenberg–Marquardt algorithm: implementation and
// theory", in Numerical Analysis, ed. G. A. Watson, Springer LNM 630, 1978).
// We keep our own small solver rather than gonum/optimize so that one fit
// allocates only its workspace: a profile has 2–6 parameters and the
// normal equations are tiny.
//
// What is scaled by what. Each free parameter j is scaled by dⱼ, the
// largest weighted Jacobian column norm ‖∂f/∂pⱼ‖_W met so far (Moré's
// D, a running maximum); in the scaled variables zⱼ = dⱼpⱼ the columns
// have norm at most 1, whatever the units of values and positions. The
// damped normal equations are (JᵀWJ + λ·D²) δ = JᵀW r, so λ is
// dimensionless (it compares with the unit diagonal of the scaled JᵀWJ);
// it starts at 1e-3 and is divided by 3 after a very successful step,
// doubled after a poor one and multiplied by 4 after a rejected one.
// Residual sums enter only as ratios to S, gradients only as cosines
// gⱼ/(dⱼ√S). Multiplying the values by a, shifting them by b, or
// measuring a parameter in other units leaves every decision unchanged.
//
// Converged only on a first-order certificate at an accepted point: the
// largest scaled gradient component is below GTol and the reduction of S
// predicted for the next step (damping at most 1e-3) is below FTol·S.
// Both floors are raised to what rounding in the residuals allows
// (8ε(‖y‖_W + √S)), so data stored with a large offset still certify. A
// small step alone proves nothing: a stop without the certificate has
// Status IterationLimit or NoDescent and Converged false. Steps whose
// predicted and actual changes of S are both below its rounding level are
// accepted (Gauss–Newton polishing), so that the certificate can be met
// where S itself no longer resolves the progress.
//
// Two moves leave the quadratic model aside. A free parameter whose
// column has decayed below 1e-3 of its largest norm (it runs off towards
// an asymptote, where the model is useless along it) is moved on directly,
// by max(|pⱼ|, 1) and doubling, while S does not rise above rounding; this
// happens when the solver stalls and before a certificate is accepted, so
// that every run-off ends at the asymptote. And a step that lands where the
// model has values but no finite Jacobian is taken back with 16 times the
// damping.
//
// A point where the free parameters are not identified (condition number of
// the scaled JᵀWJ above Settings.CondMax) or where a free parameter ran off
// to an asymptote (Stuck; its whole-size change, at least 1 in its internal
// unit, moves the model by less than 1e-9 of the spread of the data) is
// returned with Converged false: it is not a minimum worth reporting.
// FirstOrder still tells whether the certificate held there.
func Solve(pr Problem, p0 []float64, s *Settings) (*Solution, error) {
	set := s.withDefaults()
	n, np := len(pr.Y), len(p0)
	if pr.Func == nil || n == 0 || np == 0 {
		return nil, fmt.Errorf("%w: empty least-squares problem", ErrBadInput)
	}
	if pr.W != nil && len(pr.W) != n {
		return nil, fmt.Errorf("%w: %d weights for %d observations", ErrBadInput, len(pr.W), n)
	}
	idx := make([]int, 0, np)
	for j := 0; j < np; j++ {
		if pr.Free == nil || pr.Free[j] {
			idx = append(idx, j)
		}
	}
	k := len(idx)
	if k == 0 {
		return nil, fmt.Errorf("%w: no free parameter", ErrBadInput)
	}
	if n < k {
		return nil, fmt.Errorf("%w: %d observations for %d free parameters", ErrBadInput, n, k)
	}

	// One workspace block: p, trial, prev, f, ftrial, jac, jtrial, a (JᵀWJ), two
	// factors, g, diag, delta, u, v. Trial points are evaluated with their
	// Jacobian: most trials are accepted, and the Jacobian costs little
	// beyond the values.
	size := 3*np + 2*n + 2*n*np + 3*k*k + 5*k
	bp, _ := workPool.Get().(*[]float64)
	if bp == nil || cap(*bp) < size {
		fresh := make([]float64, size)
		bp = &fresh
	}
	buf := (*bp)[:size]
	clear(buf)
	whole := buf
	take := func(m int) []float64 { v := buf[:m:m]; buf = buf[m:]; return v }
	st := lmState{y: pr.Y, wts: pr.W, n: n, np: np, k: k}
	p, trial, prev := take(np), take(np), take(np)
	// The model values and Jacobians at p and at the trial point live
	// apart from st, which holds the caller's data: only they are handed
	// to the model function.
	var ev evals
	ev.f, ev.ftr = take(n), take(n)
	ev.jac, ev.jtr = take(n*np), take(n*np)
	jtj := take(k * k)
	st.a, st.fac, st.fac2 = jtj, take(k*k), take(k*k)
	st.g, st.diag, st.delta, st.u, st.v = take(k), take(k), take(k), take(k), take(k)
	copy(p, p0)

	sol := &Solution{Stuck: -1}
	pr.Func(p, ev.f, ev.jac)
	if !allFinite(ev.f) || !allFinite(ev.jac) {
		return nil, fmt.Errorf("%w: the model cannot be evaluated at the starting values", ErrNoAnswer)
	}
	for i, y := range pr.Y {
		st.ynorm += st.w(i) * y * y
	}
	st.ynorm = math.Sqrt(st.ynorm)
	cur := st.rss(ev.f)
	lambda := lambda0
	status := NotTerminated
	reason := ""
	fresh := false // a and g belong to p
	iter := 1
	hasPrev, prevS := false, 0.0
	for ; iter <= set.MaxIter; iter++ {
		st.normal(&ev, idx)
		fresh = true
		if !allFinite(st.a) || !allFinite(st.g) {
			if hasPrev {
				// The last step landed where the model has values but no
				// finite Jacobian (a parameter overflowed): take it back
				// and damp harder.
				copy(p, prev)
				ev.swap()
				cur, hasPrev, fresh = prevS, false, false
				lambda = 16 * math.Max(lambda, lambda0)
				continue
			}
			status, reason = NotFinite, "the Jacobian is not finite at the current parameters"
			break
		}
		st.scale()
		if st.certify(cur, lambda, set) {
			// A parameter whose column has all but vanished may be
			// certified only because it has: move it on towards its
			// asymptote while S allows, so that every such run-off ends as
			// Asymptote, not at an arbitrary point of the plateau.
			if next, moved := st.push(pr.Func, &ev, p, trial, idx, cur); moved {
				cur, hasPrev = next, false
				lambda = lambda0
				fresh = false
				continue
			}
			status = Certified
			break
		}
		// Inner loop: raise λ until the step reduces S.
		floorS := st.roundS(cur)
		accepted := false
		for tries := 0; tries < 60; tries++ {
			if !st.step(lambda, st.fac, st.delta) {
				lambda *= 10
				continue
			}
			pred := predicted(st.a, st.g, st.delta, k)
			copy(trial, p)
			for aa, ja := range idx {
				trial[ja] += st.delta[aa]
			}
			pr.Func(trial, ev.ftr, ev.jtr)
			next := st.rss(ev.ftr) // NaN or Inf when any value is not finite
			if !finite(next) {
				next = math.Inf(1)
			}
			polish := lambda <= lambda0 && pred <= floorS && next <= cur+floorS
			if next < cur || polish {
				rho := (cur - next) / math.Max(pred, tiny)
				copy(prev, p)
				hasPrev, prevS = true, cur
				copy(p, trial)
				ev.swap()
				cur = next
				if !polish {
					if rho > 0.75 {
						lambda = math.Max(lambda/3, 1e-300)
					} else if rho < 0.25 {
						lambda *= 2
					}
				}
				accepted = true
				break
			}
			if pred <= floorS {
				// The damped step predicts no change S could resolve.
				break
			}
			lambda *= 4
		}
		if !accepted {
			if st.certify(cur, lambda0, set) {
				status = Certified
				break
			}
			// A parameter running off towards an asymptote makes the
			// quadratic model useless along it: move it on directly.
			if next, moved := st.push(pr.Func, &ev, p, trial, idx, cur); moved {
				cur, hasPrev = next, false
				lambda = lambda0
				fresh = false
				continue
			}
			status = NoDescent
			break
		}
		fresh = false
	}
	if status == NotTerminated {
		// The last accepted point has not been tested yet.
		iter = set.MaxIter
		st.normal(&ev, idx)
		fresh = true
		st.scale()
		if allFinite(st.a) && allFinite(st.g) && st.certify(cur, lambda, set) {
			status = Certified
		} else {
			status = IterationLimit
		}
	}
	if !fresh {
		st.normal(&ev, idx)
	}
	if status != Certified && status != NotFinite {
		st.scale()
		st.test(cur, lambda0, set, true) // the certificate's numbers for the message
	}
	switch status {
	case Certified:
		reason = "first-order certificate: scaled gradient and predicted relative reduction below tolerance"
	case IterationLimit:
		reason = fmt.Sprintf("iteration limit (%d) reached without a first-order certificate (largest scaled gradient %.2g, predicted relative reduction %.2g)", set.MaxIter, st.gmax, st.predRel)
	case NoDescent:
		reason = fmt.Sprintf("no damped step reduces the residual sum, but the first-order certificate does not hold (largest scaled gradient %.2g, predicted relative reduction %.2g): the point is not proven to be a minimum", st.gmax, st.predRel)
	}
	// The solution keeps the workspace it was computed in: no copies.
	sol.P, sol.F, sol.Jac, sol.JTJ = p, ev.f, ev.jac, jtj
	*bp = whole
	sol.work = bp
	sol.RSS = cur
	sol.Iterations = iter
	sol.FirstOrder = status == Certified
	sol.Gradient, sol.Predicted = st.gmax, st.predRel
	if status == Certified || status == NoDescent {
		// A free parameter whose whole-size change (at least 1 in its
		// internal unit) moves the model by a negligible amount against the
		// spread of the data has run off to an asymptote (BoxBOD from its
		// first NIST start is the classic case): not a minimum.
		ref := st.stuckRef(cur)
		for aa, ja := range idx {
			if math.Sqrt(st.a[aa*k+aa])*math.Max(math.Abs(p[ja]), 1) < ref {
				status = Asymptote
				sol.Stuck = ja
				reason = fmt.Sprintf("parameter %d has no effect on the model at the final point (it ran off towards an asymptote)", ja+1)
				break
			}
		}
	}
	if status == Certified {
		sol.Cond = scaledCond(st.a, k)
		if c := sol.Cond; !(c <= set.CondMax) {
			status = Unidentified
			reason = fmt.Sprintf("the free parameters are not identified by the data (condition number of the scaled JᵀWJ %.2g)", c)
		}
	}
	sol.Status, sol.Converged, sol.Reason = status, status.Converged(), reason
	return sol, nil
}

const tiny = 1e-300

// workPool recycles Solve workspaces released by fits that are done with them.
var workPool sync.Pool

// release returns the workspace to the pool; the solution's slices must not
// be used afterwards.
func (s *Solution) release() {
	if s == nil || s.work == nil {
		return
	}
	workPool.Put(s.work)
	s.work, s.P, s.F, s.Jac, s.JTJ = nil, nil, nil, nil, nil
}

func allFinite(v []float64) bool {
	for _, x := range v {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return false
		}
	}
	return true
}
