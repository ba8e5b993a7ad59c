package matano

import (
	"math"

	"github.com/fickfit/fickfit/internal/dense"
)

// The smoother has its own small Levenberg–Marquardt rather than fit.Solve
// for three reasons. The band refits the whole smoother (every number of
// terms it tries, from its starts) for each of ~1000 bootstrap replicates,
// so a fit that is heading for an inadmissible curve (a term narrower than
// the point spacing, wider than the data, or with vanishing weight) must be
// abandoned at once, not after the iteration limit. The problem it solves is unit-free
// by construction (positions scaled to [−1, 1], values to about [0, 1]; see
// scaling), so nothing here depends on the units or on how a general solver
// treats them. And the smoother's acceptance rule (a first-order certificate
// plus identifiability, below) is part of what the band resamples: it must
// not change when the general solver's tolerances are tuned for other models.

// Limits and tolerances of one smoother fit.
const (
	lmMaxIter = 100   // accepted iterations
	lmStall   = 10    // a fit whose S falls, over lmStall accepted iterations,
	lmCrawl   = 1e-3  // by less than lmCrawl of what the Gauss–Newton model promised is crawling
	lmLambda0 = 1e-3  // initial damping, relative to the scaled JᵀJ (unit diagonal)
	lmPred    = 1e-12 // certificate: predicted relative reduction of S by a near Gauss–Newton step
	lmGrad    = 1e-9  // certificate: largest cosine between residuals and a Jacobian column
	lmPivot   = 1e-12 // smallest squared Cholesky pivot of the unit-diagonal JᵀJ (identifiability)
)

// lmWork is the scratch space of one fit; a worker reuses it across fits.
type lmWork struct {
	p, trial, f, ftr, jac []float64
	a, chol, g, d, delta  []float64
	phi, phitr            []float64 // Φₖ(uᵢ) at p and at the trial point
	s                     Smooth
}

func (w *lmWork) size(n, np, k int) {
	grow := func(v []float64, m int) []float64 {
		if cap(v) < m {
			return make([]float64, m)
		}
		return v[:m]
	}
	w.p, w.trial = grow(w.p, np), grow(w.trial, np)
	w.f, w.ftr = grow(w.f, n), grow(w.ftr, n)
	w.jac = grow(w.jac, n*np)
	w.a, w.chol = grow(w.a, np*np), grow(w.chol, np*np)
	w.g, w.d, w.delta = grow(w.g, np), grow(w.d, np), grow(w.delta, np)
	w.phi, w.phitr = grow(w.phi, n*k), grow(w.phitr, n*k)
	w.s.W, w.s.M, w.s.S = grow(w.s.W, k), grow(w.s.M, k), grow(w.s.S, k)
}

// lmFit minimises Σ(vᵢ − C(uᵢ; p))² for the erf sum of k terms from p0 by
// Levenberg–Marquardt with Moré's scaling (J. J. Moré, "The
// Levenberg–Marquardt algorithm: implementation and theory", Springer LNM
// 630, 1978): (JᵀJ + λ·diag(d²)) δ = Jᵀr, dⱼ the running maximum of the
// column norms. It returns the parameters and residual sum of squares and
// ok = true only on a first-order certificate at an accepted point (the
// near Gauss–Newton step predicts a relative reduction of S below 1e-12,
// or every column of J is orthogonal to the residuals to 1e-9) with the
// scaled JᵀJ numerically positive definite (the terms are identified).
// abandon is asked after each accepted step; when it says so the fit stops
// with ok = false.
func lmFit(u, v []float64, k int, p0 []float64, w *lmWork, abandon func(*Smooth) bool) (p []float64, rss float64, ok bool) {
	m := erfSum{k: k}
	n, np := len(u), m.np()
	w.size(n, np, k)
	p = w.p
	copy(p, p0)
	clear(w.d)
	sumsq := func(f []float64) float64 {
		var s float64
		for i, y := range v {
			r := y - f[i]
			s += r * r
		}
		return s
	}
	// The rounding level of S: an exact fit (noise-free data) stops there.
	var vn float64
	for _, y := range v {
		vn += y * y
	}
	floor := 64 * 0x1p-52 * math.Sqrt(vn)
	floor *= floor
	m.values(p, u, w.f, &w.s, w.phi)
	cur := sumsq(w.f)
	if !finite(cur) {
		return nil, 0, false
	}
	m.jacobian(u, &w.s, w.phi, w.jac)
	lambda, nu := lmLambda0, 2.0
	// S and the reduction the near Gauss–Newton step promised, at the last
	// lmStall accepted iterations.
	var histS, histPred [lmStall]float64
	for iter := 0; iter < lmMaxIter; iter++ {
		// Normal equations A = JᵀJ (lower triangle, then mirrored), g = Jᵀr.
		a, g := w.a, w.g
		clear(a)
		clear(g)
		for i := 0; i < n; i++ {
			row := w.jac[i*np : (i+1)*np]
			r := v[i] - w.f[i]
			for aa, ja := range row {
				g[aa] += ja * r
				arow := a[aa*np : aa*np+aa+1]
				for bb := range arow {
					arow[bb] += ja * row[bb]
				}
			}
		}
		for aa := 0; aa < np; aa++ {
			for bb := 0; bb < aa; bb++ {
				a[bb*np+aa] = a[aa*np+bb]
			}
			if cn := math.Sqrt(a[aa*np+aa]); cn > w.d[aa] {
				w.d[aa] = cn
			}
		}
		if !allFinite(a) || !allFinite(g) {
			return nil, 0, false
		}
		var gmax float64
		for aa := 0; aa < np; aa++ {
			if w.d[aa] > 0 && cur > 0 {
				gmax = math.Max(gmax, math.Abs(g[aa])/(w.d[aa]*math.Sqrt(cur)))
			}
		}
		if gmax <= lmGrad {
			return p, cur, identified(a, np, w.chol)
		}
		// The certificate: the near Gauss–Newton step (damping λ₀)
		// predicts no reduction of S worth having.
		predGN := math.Inf(1)
		if damped(a, g, w.d, lmLambda0, w.chol, w.delta, np) {
			predGN = predicted(a, g, w.delta, np)
		}
		if predGN <= lmPred*cur+floor {
			return p, cur, identified(a, np, w.chol)
		}
		// A fit that keeps missing what the local model promises is in a
		// curved valley (terms trading places, a weight running off) that
		// it will not leave with a certificate: give it up.
		if j := iter % lmStall; iter >= lmStall && histS[j]-cur < lmCrawl*histPred[j] {
			return nil, 0, false
		}
		histS[iter%lmStall], histPred[iter%lmStall] = cur, predGN
		stepped := false
		for tries := 0; tries < 30; tries++ {
			if !damped(a, g, w.d, lambda, w.chol, w.delta, np) {
				lambda *= 10
				continue
			}
			pred := predicted(a, g, w.delta, np)
			for aa := range w.trial {
				w.trial[aa] = p[aa] + w.delta[aa]
			}
			m.values(w.trial, u, w.ftr, &w.s, w.phitr)
			next := sumsq(w.ftr)
			if !(next < cur) { // also NaN
				lambda *= nu
				nu *= 2
				continue
			}
			// Accepted: the Jacobian at the new point, and Nielsen's
			// update of the damping (H. B. Nielsen, "Damping parameter in
			// Marquardt's method", IMM-REP-1999-05, DTU, 1999).
			rho := (cur - next) / math.Max(pred, 1e-300)
			copy(p, w.trial)
			w.f, w.ftr = w.ftr, w.f
			w.phi, w.phitr = w.phitr, w.phi
			m.jacobian(u, &w.s, w.phi, w.jac)
			cur = next
			r := 2*rho - 1
			lambda = math.Max(lambda*math.Max(1.0/3, 1-r*r*r), 1e-12)
			nu = 2
			stepped = true
			break
		}
		if !stepped {
			return nil, 0, false
		}
		if abandon != nil {
			m.fill(p, &w.s)
			if abandon(&w.s) {
				return nil, 0, false
			}
		}
	}
	return nil, 0, false
}

// damped solves (A + λ·diag(d²)) δ = g into delta, using chol as scratch;
// false when the damped matrix is not numerically positive definite.
func damped(a, g, d []float64, lambda float64, chol, delta []float64, np int) bool {
	copy(chol, a)
	for j := 0; j < np; j++ {
		dj := d[j]
		if dj == 0 {
			dj = 1
		}
		chol[j*np+j] += lambda * dj * dj
	}
	if !dense.Cholesky(chol, np, 0) {
		return false
	}
	dense.CholSubst(chol, g, delta, np)
	return true
}

// identified reports whether the unit-diagonal scaling of JᵀJ (a, np×np)
// has every squared Cholesky pivot above lmPivot: below it the smallest
// eigenvalue is below lmPivot too (a pivot is a Schur complement's
// diagonal, which bounds its smallest eigenvalue from above) and the
// condition number exceeds 1/lmPivot.
func identified(a []float64, np int, scratch []float64) bool {
	for i := 0; i < np; i++ {
		di := math.Sqrt(a[i*np+i])
		if !(di > 0) {
			return false
		}
		for j := 0; j < np; j++ {
			dj := math.Sqrt(a[j*np+j])
			scratch[i*np+j] = a[i*np+j] / (di * dj)
		}
	}
	if !dense.Cholesky(scratch, np, 0) {
		return false
	}
	for i := 0; i < np; i++ {
		if l := scratch[i*np+i]; l*l < lmPivot {
			return false
		}
	}
	return true
}

// predicted is the reduction of S the linear model predicts for the step
// δ: 2δᵀg − δᵀAδ.
func predicted(a, g, delta []float64, np int) float64 {
	var pred float64
	for aa := 0; aa < np; aa++ {
		var ad float64
		for bb := 0; bb < np; bb++ {
			ad += a[aa*np+bb] * delta[bb]
		}
		pred += delta[aa] * (2*g[aa] - ad)
	}
	return pred
}

func allFinite(v []float64) bool {
	for _, x := range v {
		if !finite(x) {
			return false
		}
	}
	return true
}
