package fit

import (
	"math"

	"github.com/fickfit/fickfit/internal/dense"
)

// The working state of one Solve: the normal equations, Moré's scaling,
// the damped step, the move along a parameter that runs off, and the
// first-order certificate.

// evals holds the model values and Jacobians at the current point (f,
// jac) and at the trial point (ftr, jtr).
type evals struct {
	f, ftr   []float64
	jac, jtr []float64
}

// swap makes the trial point the current one.
func (ev *evals) swap() {
	ev.f, ev.ftr = ev.ftr, ev.f
	ev.jac, ev.jtr = ev.jtr, ev.jac
}

// lmState holds the working arrays of one Solve.
type lmState struct {
	y, wts    []float64 // observations and weights (nil: all 1)
	n, np, k  int
	a         []float64 // JᵀWJ over the free parameters
	fac, fac2 []float64 // Cholesky factors of damped systems
	g         []float64 // JᵀW r
	diag      []float64 // Moré's dⱼ: running maximum of the column norms
	delta     []float64 // the trial step
	u, v      []float64 // scratch for the certificate
	ynorm     float64   // ‖y‖_W, for the rounding level of the residuals
	spreadv   float64   // √(spread), computed when first needed
	jf        [16]float64

	gmax, predRel float64 // the certificate's numbers at the last test
}

func (st *lmState) w(i int) float64 {
	if st.wts == nil {
		return 1
	}
	return st.wts[i]
}

func (st *lmState) rss(fv []float64) float64 {
	var sum float64
	y, w := st.y, st.wts
	if w == nil {
		for i, yi := range y {
			r := yi - fv[i]
			sum += r * r
		}
		return sum
	}
	for i, yi := range y {
		r := yi - fv[i]
		sum += w[i] * r * r
	}
	return sum
}

// stuckRef is the effect below which a whole-size change of a parameter
// (at least 1 in its internal unit) counts as no effect on the model:
// 1e-9 of the spread of the data plus the residual norm.
func (st *lmState) stuckRef(cur float64) float64 {
	if st.spreadv == 0 {
		st.spreadv = math.Sqrt(st.spread())
	}
	return 1e-9 * (st.spreadv + math.Sqrt(cur))
}

// spread is the weighted sum of squares of the data about their weighted
// mean: the scale of the data free of any offset.
func (st *lmState) spread() float64 {
	var sw, swy float64
	for i, y := range st.y {
		sw += st.w(i)
		swy += st.w(i) * y
	}
	m := swy / sw
	var ss float64
	for i, y := range st.y {
		ss += st.w(i) * (y - m) * (y - m)
	}
	return ss
}

// roundS is the change of S that rounding in the residuals can make:
// each residual is uncertain by a few ε of the value, so S by about
// 2√S·8ε(‖y‖ + √S), plus the rounding of the sum itself.
func (st *lmState) roundS(cur float64) float64 {
	sq := math.Sqrt(cur)
	return 2*sq*st.resRound(cur) + float64(st.n)*eps*cur
}

// resRound is the rounding level of the residual vector, 8ε(‖y‖_W + √S).
func (st *lmState) resRound(cur float64) float64 {
	return 8 * eps * (st.ynorm + math.Sqrt(cur))
}

const eps = 0x1p-52

// normal builds a = JᵀWJ and g = JᵀW r over the free parameters idx at
// the current point (f, jac).
func (st *lmState) normal(ev *evals, idx []int) {
	a, g, k := st.a, st.g, st.k
	clear(a)
	clear(g)
	if k == 3 {
		normal3(st.y, st.wts, ev.f, ev.jac, st.np, idx, a, g)
		return
	}
	jf := st.jf[:0]
	if k > len(st.jf) {
		jf = make([]float64, 0, k)
	}
	jf = jf[:k]
	for i := 0; i < st.n; i++ {
		w := st.w(i)
		r := st.y[i] - ev.f[i]
		row := ev.jac[i*st.np : (i+1)*st.np]
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

// scale updates Moré's dⱼ, the running maximum of the column norms.
func (st *lmState) scale() {
	for aa := 0; aa < st.k; aa++ {
		if cn := math.Sqrt(st.a[aa*st.k+aa]); cn > st.diag[aa] {
			st.diag[aa] = cn
		}
	}
}

// step solves (JᵀWJ + λD²) x = g, leaving the Cholesky factor in fac. It
// reports false when the damped matrix is not numerically positive definite.
func (st *lmState) step(lambda float64, fac, x []float64) bool {
	k := st.k
	copy(fac, st.a)
	for aa := 0; aa < k; aa++ {
		d := st.diag[aa]
		if d == 0 {
			d = 1 // a column that was zero all along: g is zero there too
		}
		fac[aa*k+aa] += lambda * d * d
	}
	if !dense.Cholesky(fac, k, 0) {
		return false
	}
	dense.CholSubst(fac, st.g, x, k)
	return true
}

// push moves each free parameter whose Jacobian column has decayed below
// 1e-3 of the largest norm it had (it runs off towards an asymptote, where
// the quadratic model of S is useless along it) further in the descent
// direction, by max(|pⱼ|, 1) and then doubling, as long as S does not
// rise above its rounding level, at most 12 times. It reports whether any
// parameter moved and the new S; p, f and jac follow the move.
func (st *lmState) push(fn func(p, f, jac []float64), ev *evals, p, trial []float64, idx []int, cur float64) (float64, bool) {
	moved := false
	for aa, ja := range idx {
		c := math.Sqrt(st.a[aa*st.k+aa])
		if !(c < 1e-3*st.diag[aa]) || st.g[aa] == 0 || c*math.Max(math.Abs(p[ja]), 1) < st.stuckRef(cur) {
			continue // not decaying, or already without effect
		}
		dir := math.Copysign(1, st.g[aa]) // ∂S/∂pⱼ = −2gⱼ
		step := math.Max(math.Abs(p[ja]), 1)
		for m := 0; m < 12; m++ {
			copy(trial, p)
			trial[ja] += dir * step
			fn(trial, ev.ftr, ev.jtr)
			next := st.rss(ev.ftr)
			if !(next <= cur+st.roundS(cur)) || !allFinite(ev.jtr) {
				break
			}
			copy(p, trial)
			ev.swap()
			cur, moved = next, true
			step *= 2
		}
	}
	return cur, moved
}

// certify tests the first-order certificate at the current point (a, g
// and S = cur belong to it), for the step damped by min(λ, λ0), and
// records its two numbers. Both tolerances are raised to what rounding in
// the residuals allows: each gⱼ is uncertain by up to dⱼ·ρ, ρ the rounding
// level of the residual vector, so the scaled gradient by ρ/√S and the
// predicted reduction by uᵀ(JᵀWJ + λD²)⁻¹u with uⱼ = dⱼρ.
func (st *lmState) certify(cur, lambda float64, set Settings) bool {
	return st.test(cur, lambda, set, false)
}

// test is certify; with full it computes the predicted reduction even when
// the gradient already fails (for the message of a failed solve).
func (st *lmState) test(cur, lambda float64, set Settings, full bool) bool {
	k := st.k
	sq := math.Sqrt(math.Max(cur, tiny))
	rho := st.resRound(cur)
	st.gmax = 0
	for aa := 0; aa < k; aa++ {
		if d := st.diag[aa]; d > 0 {
			st.gmax = math.Max(st.gmax, math.Abs(st.g[aa])/(d*sq))
		}
	}
	st.predRel = math.NaN()
	gok := st.gmax <= math.Max(set.GTol, rho/sq)
	if !gok && !full {
		return false
	}
	lc := math.Min(lambda, lambda0)
	for !st.step(lc, st.fac2, st.v) {
		lc *= 10
		if lc > 1e300 {
			return false
		}
	}
	pred := predicted(st.a, st.g, st.v, k)
	for aa := 0; aa < k; aa++ {
		d := st.diag[aa]
		if d == 0 {
			d = 1
		}
		st.u[aa] = d * rho
	}
	dense.CholSubst(st.fac2, st.u, st.v, k)
	var noise float64
	for aa := 0; aa < k; aa++ {
		noise += st.u[aa] * st.v[aa]
	}
	st.predRel = math.Max(pred, 0) / math.Max(cur, tiny)
	return gok && pred <= set.FTol*cur+noise
}

// normal3 builds JᵀWJ and JᵀW r for exactly three free parameters, the
// case of every default fit (D, Cs, C0), with the sums held in registers.
func normal3(ys, ws, f, jac []float64, np int, idx []int, a, g []float64) {
	j0, j1, j2 := idx[0], idx[1], idx[2]
	var a00, a10, a11, a20, a21, a22, g0, g1, g2 float64
	for i, y := range ys {
		row := jac[i*np : (i+1)*np]
		x0, x1, x2 := row[j0], row[j1], row[j2]
		r := y - f[i]
		if ws != nil {
			w := ws[i]
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
