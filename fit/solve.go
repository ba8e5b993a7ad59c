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
	// MaxIter is the largest number of Jacobian evaluations.
	MaxIter int
	// FTol stops when the actual and predicted relative reductions of S
	// are both below it.
	FTol float64
	// XTol stops when the scaled step is below XTol times the scaled parameters.
	XTol float64
	// GTol stops when the largest cosine between the residual vector and a
	// Jacobian column is below it (the gradient vanishes).
	GTol float64
	// CondMax is the largest condition number of the scaled JᵀWJ at the
	// solution for the parameters to count as identified.
	CondMax float64
}

// DefaultSettings returns tolerances tight enough to reproduce certified
// reference values to about eight significant digits.
func DefaultSettings() Settings {
	return Settings{MaxIter: 200, FTol: 1e-14, XTol: 1e-12, GTol: 1e-12, CondMax: 1e13}
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
	if out.XTol <= 0 {
		out.XTol = d.XTol
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
	Iterations int       // Jacobian evaluations
	Converged  bool
	// Reason says why the iteration stopped, in words.
	Reason string
	// JTJ is JᵀWJ over the free parameters at P (k×k, row-major).
	JTJ []float64
	// Jac is the N×P Jacobian at P.
	Jac []float64
	// Cond is the condition number of the unit-diagonal scaled JTJ.
	Cond float64
	// Stuck is the index of a free parameter that ran off to an asymptote
	// (it no longer changes the model), or −1.
	Stuck int
	// Unidentified is true when the scaled JᵀWJ is too ill-conditioned for
	// the free parameters to be told apart.
	Unidentified bool

	work *[]float64 // the workspace P, F, Jac and JTJ live in
}

// Solve minimises the problem by Levenberg–Marquardt with Moré's scaling
// (J. J. Moré, "The Levenberg–Marquardt algorithm: implementation and
// theory", in Numerical Analysis, ed. G. A. Watson, Springer LNM 630, 1978): the damped normal
// equations (JᵀWJ + λ·diag(d²)) δ = JᵀW r, with d the running maximum of the
// column norms, solved by Cholesky. We keep our own small solver rather than
// gonum/optimize so that one fit allocates only its workspace: a profile
// has 2–6 parameters and the normal equations are tiny.
//
// A point where the free parameters are not identified (condition number of
// the scaled JᵀWJ above Settings.CondMax, or a Jacobian column that vanishes)
// is returned with Converged false: it is not a minimum worth reporting.
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

	// One workspace block: p, trial, f, ftrial, jac, jtrial, a (JᵀWJ), chol, g, diag, delta.
	// Trial points are evaluated with their Jacobian: most trials are
	// accepted, and the Jacobian costs little beyond the values.
	size := 2*np + 2*n + 2*n*np + 2*k*k + 3*k
	bp, _ := workPool.Get().(*[]float64)
	if bp == nil || cap(*bp) < size {
		fresh := make([]float64, size)
		bp = &fresh
	}
	buf := (*bp)[:size]
	clear(buf)
	whole := buf
	take := func(m int) []float64 { v := buf[:m:m]; buf = buf[m:]; return v }
	p, trial := take(np), take(np)
	f, ftr := take(n), take(n)
	jac, jtr := take(n*np), take(n*np)
	a, chol := take(k*k), take(k*k)
	g, diag, delta := take(k), take(k), take(k)
	copy(p, p0)

	rss := func(fv []float64) float64 {
		var sum float64
		for i, y := range pr.Y {
			r := y - fv[i]
			if pr.W != nil {
				sum += pr.W[i] * r * r
			} else {
				sum += r * r
			}
		}
		return sum
	}
	// normal builds a = JᵀWJ and g = JᵀW r over the free parameters.
	var jfBuf [16]float64
	jf := jfBuf[:0]
	if k > len(jfBuf) {
		jf = make([]float64, 0, k)
	}
	jf = jf[:k]
	normal := func() {
		clear(a)
		clear(g)
		if k == 3 {
			normal3(pr, f, jac, np, idx, a, g)
			return
		}
		for i := 0; i < n; i++ {
			w := 1.0
			if pr.W != nil {
				w = pr.W[i]
			}
			r := pr.Y[i] - f[i]
			row := jac[i*np : (i+1)*np]
			for aa, ja := range idx {
				jf[aa] = row[ja]
			}
			for aa, ja := range jf {
				wj := w * ja
				g[aa] += wj * r
				arow := a[aa*k : aa*k+aa+1]
				for bb := range arow {
					arow[bb] += wj * jf[bb]
				}
			}
		}
		for aa := 0; aa < k; aa++ {
			for bb := 0; bb < aa; bb++ {
				a[bb*k+aa] = a[aa*k+bb]
			}
		}
	}

	sol := &Solution{Stuck: -1}
	pr.Func(p, f, jac)
	if !allFinite(f) || !allFinite(jac) {
		return nil, fmt.Errorf("%w: the model cannot be evaluated at the starting values", ErrNoAnswer)
	}
	cur := rss(f)
	lambda := 0.0
	reason := ""
	converged := false
	iter := 1
	for ; iter <= set.MaxIter; iter++ {
		normal()
		if !allFinite(a) || !allFinite(g) {
			reason = "the Jacobian is not finite at the current parameters"
			break
		}
		// Moré's scaling: d_j = max over iterations of the column norm.
		var gmax float64
		for aa := 0; aa < k; aa++ {
			cn := math.Sqrt(a[aa*k+aa])
			if cn > diag[aa] {
				diag[aa] = cn
			}
			if cn > 0 && cur > 0 {
				gmax = math.Max(gmax, math.Abs(g[aa])/(cn*math.Sqrt(cur)))
			}
		}
		if gmax <= set.GTol {
			converged, reason = true, "gradient vanished"
			break
		}
		if lambda == 0 {
			var m float64
			for aa := 0; aa < k; aa++ {
				m = math.Max(m, a[aa*k+aa])
			}
			lambda = 1e-3 * m
			if lambda == 0 {
				lambda = 1e-3
			}
		}
		// Inner loop: raise λ until the step reduces S.
		stepped := false
		for tries := 0; tries < 60; tries++ {
			for aa := 0; aa < k; aa++ {
				for bb := 0; bb < k; bb++ {
					chol[aa*k+bb] = a[aa*k+bb]
				}
				d := diag[aa]
				if d == 0 {
					d = 1
				}
				chol[aa*k+aa] += lambda * d * d
			}
			if !cholSolve(chol, g, delta, k) {
				lambda *= 10
				continue
			}
			if tries == 0 && gaussNewtonLike(a, diag, lambda, k) {
				// With negligible damping the quadratic model is the
				// Gauss–Newton one: when even its full step would reduce S
				// by less than FTol relatively, S is at its minimum to
				// working precision and the trial evaluation is not needed.
				if predicted(a, g, delta, k) <= set.FTol*cur {
					converged, reason = true, "predicted reduction of the residual sum below tolerance"
					break
				}
			}
			copy(trial, p)
			for aa, ja := range idx {
				trial[ja] += delta[aa]
			}
			pr.Func(trial, ftr, jtr)
			next := rss(ftr) // NaN or Inf when any value is not finite
			if !finite(next) {
				next = math.Inf(1)
			}
			pred := predicted(a, g, delta, k)
			var dx, xn float64
			for aa, ja := range idx {
				d := diag[aa]
				if d == 0 {
					d = 1
				}
				dx += (d * delta[aa]) * (d * delta[aa])
				xn += (d * p[ja]) * (d * p[ja])
			}
			dx, xn = math.Sqrt(dx), math.Sqrt(xn)
			if next < cur {
				actRel := (cur - next) / math.Max(cur, tiny)
				predRel := pred / math.Max(cur, tiny)
				rho := (cur - next) / math.Max(pred, tiny)
				copy(p, trial)
				f, ftr = ftr, f
				jac, jtr = jtr, jac
				cur = next
				if rho > 0.75 {
					lambda = math.Max(lambda/3, 1e-300)
				} else if rho < 0.25 {
					lambda *= 2
				}
				stepped = true
				if actRel <= set.FTol && predRel <= set.FTol {
					converged, reason = true, "relative reduction of the residual sum below tolerance"
				} else if dx <= set.XTol*math.Max(xn, tiny) {
					converged, reason = true, "relative step below tolerance"
				}
				break
			}
			if dx <= set.XTol*math.Max(xn, tiny) || pred <= set.FTol*cur*1e-2 {
				// No further descent possible at machine precision.
				converged, reason = true, "no further reduction possible at machine precision"
				break
			}
			lambda *= 4
		}
		if converged {
			break
		}
		if !stepped {
			reason = "the damped step could not reduce the residual sum"
			break
		}
	}
	if iter > set.MaxIter {
		iter = set.MaxIter
		reason = fmt.Sprintf("iteration limit (%d) reached", set.MaxIter)
	}
	normal()
	// The solution keeps the workspace it was computed in: no copies.
	sol.P, sol.F, sol.Jac, sol.JTJ = p, f, jac, a
	*bp = whole
	sol.work = bp
	sol.RSS = cur
	sol.Iterations = iter
	sol.Converged = converged
	sol.Reason = reason
	if converged {
		// A free parameter whose whole-size change moves the model by a
		// negligible amount has run off to an asymptote (BoxBOD from its
		// first NIST start is the classic case): not a minimum.
		var yn float64
		for _, y := range pr.Y {
			yn += y * y
		}
		yn = math.Sqrt(yn) + math.Sqrt(cur)
		for aa, ja := range idx {
			if math.Sqrt(a[aa*k+aa]/wmax(pr.W))*math.Max(math.Abs(p[ja]), 1) < 1e-9*yn {
				sol.Converged = false
				sol.Stuck = ja
				sol.Reason = fmt.Sprintf("parameter %d has no effect on the model at the final point (it ran off towards an asymptote)", ja+1)
				return sol, nil
			}
		}
		sol.Cond = scaledCond(a, k)
		if c := sol.Cond; !(c <= set.CondMax) {
			sol.Converged = false
			sol.Unidentified = true
			sol.Reason = fmt.Sprintf("the free parameters are not identified by the data (condition number of the scaled JᵀWJ %.2g)", c)
		}
	}
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

// normal3 builds JᵀWJ and JᵀW r for exactly three free parameters, the
// case of every default fit (D, Cs, C0), with the sums held in registers.
func normal3(pr Problem, f, jac []float64, np int, idx []int, a, g []float64) {
	j0, j1, j2 := idx[0], idx[1], idx[2]
	var a00, a10, a11, a20, a21, a22, g0, g1, g2 float64
	for i, y := range pr.Y {
		row := jac[i*np : (i+1)*np]
		x0, x1, x2 := row[j0], row[j1], row[j2]
		r := y - f[i]
		if pr.W != nil {
			w := pr.W[i]
			r *= w
			a00 += w * x0 * x0
			a10 += w * x1 * x0
			a11 += w * x1 * x1
			a20 += w * x2 * x0
			a21 += w * x2 * x1
			a22 += w * x2 * x2
		} else {
			a00 += x0 * x0
			a10 += x1 * x0
			a11 += x1 * x1
			a20 += x2 * x0
			a21 += x2 * x1
			a22 += x2 * x2
		}
		g0 += x0 * r
		g1 += x1 * r
		g2 += x2 * r
	}
	a[0], a[1], a[2] = a00, a10, a20
	a[3], a[4], a[5] = a10, a11, a21
	a[6], a[7], a[8] = a20, a21, a22
	g[0], g[1], g[2] = g0, g1, g2
}

// predicted is the reduction of S that the quadratic model predicts for
// the step δ: δᵀ(2g − Aδ).
func predicted(a, g, delta []float64, k int) float64 {
	var pred float64
	for aa := 0; aa < k; aa++ {
		var ad float64
		for bb := 0; bb < k; bb++ {
			ad += a[aa*k+bb] * delta[bb]
		}
		pred += delta[aa] * (2*g[aa] - ad)
	}
	return pred
}

// gaussNewtonLike reports whether the damping λ·d² is below 1 % of every
// diagonal element of JᵀWJ: the damped step then predicts nearly the same
// reduction as the Gauss–Newton step.
func gaussNewtonLike(a, diag []float64, lambda float64, k int) bool {
	for j := 0; j < k; j++ {
		d := diag[j]
		if d == 0 {
			d = 1
		}
		if lambda*d*d > 1e-2*a[j*k+j] {
			return false
		}
	}
	return true
}

// wmax returns the largest weight (1 when unweighted), used to put JᵀWJ back
// on the scale of the observations.
func wmax(w []float64) float64 {
	m := 0.0
	for _, v := range w {
		m = math.Max(m, v)
	}
	if w == nil || m == 0 {
		return 1
	}
	return m
}

func allFinite(v []float64) bool {
	for _, x := range v {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return false
		}
	}
	return true
}
