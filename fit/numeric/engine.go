package numeric

import (
	"errors"
	"fmt"
	"math"

	"github.com/fickfit/fickfit/fit"
)

// sensSpec says how one fit parameter enters the problem, for the forward
// sensitivities ∂C/∂p: through the law's own parameters (coefficients on
// gradLaw.grad), the initial uniform level, the surface level, the far
// level, β and Cp.
type sensSpec struct {
	law                     [3]float64
	init, cs, far, beta, cp float64
}

// level holds face quantities at one time level: with
// Gᵢ = D(C̄ᵢ)·qᵢ, qᵢ = (Cᵢ₊₁ − Cᵢ)/(xᵢ₊₁ − xᵢ), C̄ᵢ = (Cᵢ + Cᵢ₊₁)/2,
// a = ∂G/∂Cᵢ and b = ∂G/∂Cᵢ₊₁.
type level struct {
	d, dp, a, b, q []float64 // dp = dD/dC at C̄ᵢ
	g              []float64 // ∂D(C̄ᵢ)/∂qₘ, ng per face
}

func newLevel(n, ng int) level {
	f := n - 1
	buf := make([]float64, 5*f+ng*f)
	cut := func(k int) []float64 { return buf[k*f : (k+1)*f : (k+1)*f] }
	return level{d: cut(0), dp: cut(1), a: cut(2), b: cut(3), q: cut(4), g: buf[5*f:]}
}

// errStep is a failed Newton iteration; the caller splits the step.
var errStep = errors.New("newton iteration failed")

// engine owns the workspace of one solve; a fit model keeps a pool of them
// so that an evaluation allocates almost nothing.
type engine struct {
	opt options
	n   int

	ux, uv, uh   []float64 // unit grid (L = 1)
	x, vol, hinv []float64 // grid of the current run
	fracs        []float64 // τ fractions of the time plan, len steps+1

	c, cn, cprev, cprev2 []float64
	init, ex             []float64
	old, cur             level
	ng                   int
	lo, di, up, rhs, dlt []float64
	cpv, den             []float64
	s, tmp               []float64 // sensitivities (np×n) and scratch
	specBuf              []sensSpec
	fixL                 float64 // when > 0, the truncation depth (tests only)
	// rungs, when set (the model's evaluations for a fit), takes the
	// truncation depth from the ladder 2^(k/8) m (see setup).
	rungs bool

	// Configuration of the current run.
	law                 Diffusivity
	glaw                gradLaw
	linear              bool
	leftDir, mt, right  bool
	cs, beta, cpAtm, cr float64
	tolAbs              float64
	sens                []sensSpec
	sched               Schedule
	ck                  *clock
	ckSched             Schedule
	ckEnd               float64
	tauEnd              float64
	length              float64
	truncated, sym      bool
	thick, c0           float64

	// Book-keeping.
	uptake, farUptake float64
	steps, newton     int
	dtauPrev          float64
	dtauPrev2         float64
	havePrev          int // number of earlier levels available to the predictor
	badD              bool
}

func newEngine(opt options) *engine {
	n := opt.nodes
	e := &engine{opt: opt, n: n}
	e.ux, e.uv, e.uh = unitGrid(n, opt.stretch)
	mk := func() []float64 { return make([]float64, n) }
	e.x, e.vol, e.hinv = mk(), mk(), make([]float64, n-1)
	e.c, e.cn, e.cprev, e.cprev2, e.init, e.ex = mk(), mk(), mk(), mk(), mk(), mk()
	e.lo, e.di, e.up, e.rhs, e.dlt, e.cpv, e.den = mk(), mk(), mk(), mk(), mk(), mk(), mk()
	e.tmp = mk()
	e.fracs = make([]float64, opt.steps+1)
	for k := range e.fracs {
		e.fracs[k] = math.Pow(float64(k)/float64(opt.steps), opt.grading)
	}
	e.fracs[opt.steps] = 1
	e.setNG(3)
	return e
}

// setNG sizes the face levels for ng law gradients.
func (e *engine) setNG(ng int) {
	if e.ng == ng && e.old.d != nil {
		return
	}
	e.ng = ng
	e.old, e.cur = newLevel(e.n, ng), newLevel(e.n, ng)
}

// unitGrid returns nodes on [0, 1] by ξ ↦ sinh(sξ)/sinh(s) (uniform for
// s = 0), the control volumes and the inverse spacings.
func unitGrid(n int, s float64) (x, v, h []float64) {
	x, v, h = make([]float64, n), make([]float64, n), make([]float64, n-1)
	for i := range x {
		xi := float64(i) / float64(n-1)
		if s == 0 {
			x[i] = xi
		} else {
			x[i] = math.Sinh(s*xi) / math.Sinh(s)
		}
	}
	x[n-1] = 1
	for i := 0; i < n-1; i++ {
		dx := x[i+1] - x[i]
		h[i] = 1 / dx
		v[i] += dx / 2
		v[i+1] += dx / 2
	}
	return x, v, h
}

// scale sets the grid for a domain of length L.
func (e *engine) scale(L float64) {
	for i := range e.x {
		e.x[i] = L * e.ux[i]
		e.vol[i] = L * e.uv[i]
	}
	for i := range e.hinv {
		e.hinv[i] = e.uh[i] / L
	}
}

// solve runs one problem. When sens is not nil the forward sensitivities
// are propagated too and left in e.s (len(sens)×n).
func (e *engine) solve(p *Problem, sens []sensSpec) (*Solution, error) {
	if err := e.setup(p, sens); err != nil {
		return nil, err
	}
	if err := e.run(); err != nil {
		return nil, err
	}
	sol := &Solution{
		X: append([]float64(nil), e.x...), C: append([]float64(nil), e.c...),
		Length: e.length, Uptake: e.uptake, FarUptake: e.farUptake,
		EffectiveTime: e.tauEnd, Steps: e.steps, NewtonIterations: e.newton,
		thickness: e.thick, symmetric: e.sym, truncated: e.truncated, beyond: e.c0,
	}
	for i := range e.c {
		sol.Gain += e.vol[i] * (e.c[i] - e.init[i])
	}
	return sol, nil
}

// setup validates the problem, sizes the domain and initialises the state.
func (e *engine) setup(p *Problem, sens []sensSpec) error {
	bad := func(format string, args ...any) error {
		return fmt.Errorf("%w: numeric solver: "+format, append([]any{fit.ErrBadInput}, args...)...)
	}
	if p.DC == nil {
		return bad("no diffusivity law D(C) given")
	}
	if !(p.Time > 0) || math.IsInf(p.Time, 0) {
		return bad("time %g s must be positive", p.Time)
	}
	if !finite(p.C0) {
		return bad("initial concentration C0 = %g is not a finite number", p.C0)
	}
	lo, hi := p.C0, p.C0
	e.leftDir, e.mt = false, false
	switch p.Surface {
	case SurfaceFixed:
		if !finite(p.Cs) {
			return bad("surface concentration Cs = %g is not a finite number", p.Cs)
		}
		e.leftDir, e.cs = true, p.Cs
		lo, hi = math.Min(lo, p.Cs), math.Max(hi, p.Cs)
	case SurfaceMassTransfer:
		if !(p.Beta > 0) || math.IsInf(p.Beta, 0) {
			return bad("mass-transfer coefficient β = %g m/s must be positive", p.Beta)
		}
		if !finite(p.Cp) {
			return bad("atmosphere level Cp = %g is not a finite number", p.Cp)
		}
		e.mt, e.beta, e.cpAtm = true, p.Beta, p.Cp
		lo, hi = math.Min(lo, p.Cp), math.Max(hi, p.Cp)
	case SurfaceSealed:
	default:
		return bad("unknown surface condition %d", int(p.Surface))
	}
	if !(p.Thickness >= 0) || math.IsInf(p.Thickness, 0) {
		return bad("thickness %g m must be ≥ 0 (0 means semi-infinite)", p.Thickness)
	}
	if p.Far < FarSealed || p.Far > FarFixed {
		return bad("unknown far-face condition %d", int(p.Far))
	}
	if p.Initial != nil && p.Thickness == 0 {
		return bad("an initial profile needs a finite thickness")
	}
	// Effective time τ = ∫F dt.
	e.tauEnd = p.Time
	e.sched = p.Schedule
	if p.Schedule != nil {
		if e.ck == nil || e.ckSched != p.Schedule || e.ckEnd != p.Time {
			ck, err := newClock(p.Schedule, p.Time)
			if err != nil {
				return err
			}
			e.ck, e.ckSched, e.ckEnd = ck, p.Schedule, p.Time
		}
		e.tauEnd = e.ck.end()
	}
	// Domain: the (half) thickness, or a truncation at Depth·√(Dmax τ).
	phys := p.Thickness
	e.sym = p.Thickness > 0 && p.Far == FarSymmetric
	if e.sym {
		phys /= 2
	}
	if p.Initial != nil {
		e.scale(phys)
		for i, x := range e.x {
			v := p.Initial(x)
			if !finite(v) {
				return bad("the initial profile is %g at x = %g m", v, x)
			}
			e.init[i] = v
			lo, hi = math.Min(lo, v), math.Max(hi, v)
		}
	}
	dmax := p.DC.Max(lo, hi)
	dlo, _ := p.DC.At(lo)
	dhi, _ := p.DC.At(hi)
	for _, d := range []float64{dmax, dlo, dhi} {
		if !(d > 0) || math.IsInf(d, 0) {
			return bad("D(C) = %g m²/s in the concentration range [%g, %g]; it must be positive and finite", d, lo, hi)
		}
	}
	L := phys
	e.truncated = false
	reach := e.opt.depth * math.Sqrt(dmax*e.tauEnd)
	if e.rungs && reach > 0 && !math.IsInf(reach, 0) {
		// A domain that moves with every parameter change moves the grid,
		// and the solution then depends on the parameters non-smoothly at
		// the level of the discretization error, which the sensitivities
		// (exact for a fixed grid) do not see: a fit could not certify its
		// optimum (a scaled gradient stuck near 1e-7). Taken from the
		// ladder 2^(k/8) m, the domain stays put while the parameters move
		// within a rung, at most 9 % longer than needed.
		reach = math.Exp2(math.Ceil(8*math.Log2(reach)) / 8)
	}
	if e.fixL > 0 {
		reach = e.fixL // frozen grid (tests of the sensitivities)
	}
	if p.Initial == nil && (phys == 0 || reach < phys) {
		L, e.truncated = reach, true
	}
	if !(L > 0) || math.IsInf(L, 0) {
		return bad("the domain length %g m is not usable (check D and the time)", L)
	}
	if p.Initial == nil {
		e.scale(L)
		for i := range e.init {
			e.init[i] = p.C0
		}
	}
	copy(e.c, e.init)
	e.length, e.thick, e.c0 = L, p.Thickness, p.C0
	e.right = p.Thickness > 0 && !e.truncated && p.Far == FarFixed
	e.cr = p.C0

	// Law and sensitivities.
	e.law, e.glaw, e.sens = p.DC, nil, sens
	if gl, ok := p.DC.(gradLaw); ok {
		e.glaw = gl
		e.setNG(gl.nGrad())
	} else if len(sens) > 0 {
		return bad("sensitivities need one of the package's laws (Const, Exp, Table)")
	}
	lin, ok := p.DC.(linearLaw)
	e.linear = ok && lin.constantD()
	np := len(sens)
	if cap(e.s) < np*e.n {
		e.s = make([]float64, np*e.n)
	}
	e.s = e.s[:np*e.n]
	for j, sp := range sens {
		row := e.s[j*e.n : (j+1)*e.n]
		for i := range row {
			row[i] = sp.init
		}
	}
	rng := hi - lo
	if rng == 0 {
		rng = math.Max(math.Abs(hi), 1)
	}
	e.tolAbs = e.opt.tol * rng
	e.uptake, e.farUptake, e.steps, e.newton = 0, 0, 0, 0
	e.havePrev, e.badD = 0, false
	return nil
}

// run integrates over the time plan: graded levels τₖ, the first
// Startup/2 intervals each done as two implicit Euler half steps.
func (e *engine) run() error {
	e.computeLevel(&e.old, e.c, len(e.sens) > 0)
	half := e.opt.startup / 2
	for k := 1; k <= e.opt.steps; k++ {
		t0, t1 := e.fracs[k-1]*e.tauEnd, e.fracs[k]*e.tauEnd
		if k <= half {
			tm := (t0 + t1) / 2
			if err := e.advance(t0, tm, 1, 0); err != nil {
				return err
			}
			if err := e.advance(tm, t1, 1, 0); err != nil {
				return err
			}
			continue
		}
		if err := e.advance(t0, t1, 0.5, 0); err != nil {
			return err
		}
	}
	return nil
}

// physical returns the physical time at effective time tau.
func (e *engine) physical(tau float64) float64 {
	if e.sched == nil {
		return tau
	}
	return e.ck.timeAt(tau)
}

// advance takes the state from effective time t0 to t1, splitting the step
// in halves (up to ten times) when Newton's iteration fails.
func (e *engine) advance(t0, t1, theta float64, depth int) error {
	dtau := t1 - t0
	dt := e.physical(t1) - e.physical(t0)
	err := e.step(dtau, dt, theta)
	if err == nil {
		return nil
	}
	if !errors.Is(err, errStep) || depth >= 10 {
		if errors.Is(err, errStep) {
			return fmt.Errorf("%w: numeric solver: Newton's iteration did not converge near t = %g s even with steps 1/1024 of the plan; D(C) may vary too steeply for this grid (raise Nodes or Steps)", fit.ErrNoAnswer, e.physical(t0))
		}
		return err
	}
	tm := (t0 + t1) / 2
	if err := e.advance(t0, tm, theta, depth+1); err != nil {
		return err
	}
	return e.advance(tm, t1, theta, depth+1)
}

// computeLevel fills the face quantities at state c.
func (e *engine) computeLevel(lv *level, c []float64, grad bool) {
	n1 := e.n - 1
	c, hinv := c[:n1+1], e.hinv[:n1]
	d, dp, a, b, q := lv.d[:n1], lv.dp[:n1], lv.a[:n1], lv.b[:n1], lv.q[:n1]
	var sum float64
	if ex, ok := e.law.(Exp); ok {
		// The common case without an interface call per face.
		for i := 0; i < n1; i++ {
			v := ex.D * math.Exp(ex.K*(0.5*(c[i]+c[i+1])-ex.Cref))
			d[i], dp[i] = v, ex.K*v
		}
	} else {
		for i := 0; i < n1; i++ {
			d[i], dp[i] = e.law.At(0.5 * (c[i] + c[i+1]))
		}
	}
	for i := 0; i < n1; i++ {
		qi := (c[i+1] - c[i]) * hinv[i]
		q[i] = qi
		h := 0.5 * dp[i] * qi
		a[i] = h - d[i]*hinv[i]
		b[i] = h + d[i]*hinv[i]
		sum += d[i]
		if !(d[i] > 0) {
			e.badD = true
		}
	}
	if !finite(sum) {
		e.badD = true
	}
	if grad {
		e.levelGrad(lv, c)
	}
}

// levelGrad fills the law gradients per face from the stored D values.
func (e *engine) levelGrad(lv *level, c []float64) {
	ng := e.ng
	for i := 0; i < e.n-1; i++ {
		e.glaw.grad(0.5*(c[i]+c[i+1]), lv.d[i], lv.g[i*ng:(i+1)*ng])
	}
}

// touchUp updates a level computed at the last Newton iterate to the
// accepted state c = iterate + δ by a first-order Taylor step in D
// (error O(δ²), far below the Newton tolerance), saving a law
// evaluation per face.
func (e *engine) touchUp(lv *level, c []float64, grad bool) {
	n1 := e.n - 1
	dlt, hinv := e.dlt[:n1+1], e.hinv[:n1]
	d, dp, a, b, q := lv.d[:n1], lv.dp[:n1], lv.a[:n1], lv.b[:n1], lv.q[:n1]
	for i := 0; i < n1; i++ {
		d[i] += dp[i] * 0.5 * (dlt[i] + dlt[i+1])
		qi := (c[i+1] - c[i]) * hinv[i]
		q[i] = qi
		h := 0.5 * dp[i] * qi
		a[i] = h - d[i]*hinv[i]
		b[i] = h + d[i]*hinv[i]
	}
	if grad {
		e.levelGrad(lv, c)
	}
}

// assemble builds the Jacobian J = diag(V) − θΔτ ∂Φ/∂C − θΔt ∂B/∂C of the
// step equations at level lv into lo, di, up.
func (e *engine) assemble(lv *level, theta, dtau, dt float64) {
	n := e.n
	w := theta * dtau
	for i := 0; i < n; i++ {
		diag := e.vol[i]
		if i < n-1 {
			diag -= w * lv.a[i]
			e.up[i] = -w * lv.b[i]
		} else {
			e.up[i] = 0
		}
		if i > 0 {
			diag += w * lv.b[i-1]
			e.lo[i] = w * lv.a[i-1]
		} else {
			e.lo[i] = 0
		}
		e.di[i] = diag
	}
	if e.mt {
		e.di[0] += theta * dt * e.beta
	}
	if e.leftDir {
		e.lo[0], e.di[0], e.up[0] = 0, 1, 0
	}
	if e.right {
		e.lo[n-1], e.di[n-1], e.up[n-1] = 0, 1, 0
	}
}

// factor computes the Thomas (LU) factors of the tridiagonal system:
// inverse pivots in den, modified upper diagonal in cpv.
func (e *engine) factor() bool {
	n := e.n
	d := e.di[0]
	if !(math.Abs(d) > 1e-300) {
		return false
	}
	e.den[0] = 1 / d
	e.cpv[0] = e.up[0] * e.den[0]
	for i := 1; i < n; i++ {
		d = e.di[i] - e.lo[i]*e.cpv[i-1]
		if !(math.Abs(d) > 1e-300) {
			return false
		}
		inv := 1 / d
		e.den[i] = inv
		e.cpv[i] = e.up[i] * inv
	}
	return true
}

// assembleSolve does assemble, factor and thomas in one forward sweep and
// one backward sweep (the hot path of Newton's iteration); the factors are
// kept for further right-hand sides.
func (e *engine) assembleSolve(lv *level, theta, dtau, dt float64, r, out []float64) bool {
	n := e.n
	w := theta * dtau
	vol, lo, den, cpv := e.vol[:n], e.lo[:n], e.den[:n], e.cpv[:n]
	a, b := lv.a[:n-1], lv.b[:n-1]
	r, out = r[:n], out[:n]
	var cpPrev, yPrev float64
	for i := 0; i < n; i++ {
		diag, l, u := vol[i], 0.0, 0.0
		if i < n-1 {
			diag -= w * a[i]
			u = -w * b[i]
		}
		if i > 0 {
			diag += w * b[i-1]
			l = w * a[i-1]
		}
		if i == 0 {
			if e.mt {
				diag += theta * dt * e.beta
			}
			if e.leftDir {
				diag, u = 1, 0
			}
		}
		if i == n-1 && e.right {
			diag, l = 1, 0
		}
		d := diag - l*cpPrev
		if !(math.Abs(d) > 1e-300) {
			return false
		}
		inv := 1 / d
		lo[i], den[i] = l, inv
		cpPrev = u * inv
		cpv[i] = cpPrev
		yPrev = (r[i] - l*yPrev) * inv
		out[i] = yPrev
	}
	next := out[n-1]
	for i := n - 2; i >= 0; i-- {
		next = out[i] - cpv[i]*next
		out[i] = next
	}
	return true
}

// thomas solves the factored system for r, writing the solution into out
// (which may alias r).
func (e *engine) thomas(r, out []float64) {
	n := e.n
	lo, den, cpv := e.lo[:n], e.den[:n], e.cpv[:n]
	out = out[:n]
	prev := r[0] * den[0]
	out[0] = prev
	for i := 1; i < n; i++ {
		prev = (r[i] - lo[i]*prev) * den[i]
		out[i] = prev
	}
	next := out[n-1]
	for i := n - 2; i >= 0; i-- {
		next = out[i] - cpv[i]*next
		out[i] = next
	}
}

// step advances by one θ-step of effective length dtau (physical dt).
func (e *engine) step(dtau, dt, theta float64) error {
	n := e.n
	copy(e.cn, e.c)
	old := &e.old
	// Explicit part.
	w0 := (1 - theta) * dtau
	var gPrev float64
	for i := 0; i < n; i++ {
		var g float64
		if i < n-1 {
			g = old.d[i] * old.q[i]
		}
		e.ex[i] = w0 * (g - gPrev)
		gPrev = g
	}
	if e.mt {
		e.ex[0] += (1 - theta) * dt * e.beta * (e.cpAtm - e.cn[0])
	}
	// Predictor: extrapolation in τ through the last three levels
	// (quadratic; linear after the first step), so that the first Newton
	// correction is small and one more suffices.
	if !e.linear && e.havePrev > 0 {
		h, h1 := dtau, e.dtauPrev
		if e.havePrev > 1 {
			h2 := e.dtauPrev2
			ln := (h + h1) * (h + h1 + h2) / (h1 * (h1 + h2))
			l1 := -h * (h + h1 + h2) / (h1 * h2)
			l2 := h * (h + h1) / (h2 * (h1 + h2))
			for i := range e.c {
				e.c[i] = ln*e.cn[i] + l1*e.cprev[i] + l2*e.cprev2[i]
			}
		} else {
			r := h / h1
			for i := range e.c {
				e.c[i] = e.cn[i] + r*(e.cn[i]-e.cprev[i])
			}
		}
	}
	if e.leftDir {
		e.c[0] = e.cs
	}
	if e.right {
		e.c[n-1] = e.cr
	}
	cur := &e.cur
	w := theta * dtau
	converged := false
	mPrev := math.Inf(1)
	for it := 0; it < e.opt.maxNewton; it++ {
		e.newton++
		e.computeLevel(cur, e.c, false)
		if e.badD {
			break
		}
		gPrev = 0
		for i := 0; i < n; i++ {
			var g float64
			if i < n-1 {
				g = cur.d[i] * cur.q[i]
			}
			e.rhs[i] = -(e.vol[i]*(e.c[i]-e.cn[i]) - w*(g-gPrev) - e.ex[i])
			gPrev = g
		}
		if e.mt {
			e.rhs[0] += theta * dt * e.beta * (e.cpAtm - e.c[0])
		}
		if e.leftDir {
			e.rhs[0] = e.cs - e.c[0]
		}
		if e.right {
			e.rhs[n-1] = e.cr - e.c[n-1]
		}
		if !e.assembleSolve(cur, theta, dtau, dt, e.rhs, e.dlt) {
			break
		}
		var m float64
		for i, d := range e.dlt {
			e.c[i] += d
			if a := math.Abs(d); a > m || math.IsNaN(d) {
				m = a
			}
		}
		if math.IsNaN(m) || m > 1e3*e.tolAbs/e.opt.tol {
			break
		}
		// Stop when this correction is within tolerance, or when Newton's
		// quadratic convergence puts the next one there (m²/mPrev).
		if e.linear || m <= e.tolAbs || (it > 0 && m < 1e-3*mPrev && m*m <= 0.1*e.tolAbs*mPrev) {
			converged = true
			break
		}
		mPrev = m
	}
	if !converged {
		copy(e.c, e.cn)
		e.badD = false
		return errStep
	}
	grad := len(e.sens) > 0
	if e.linear {
		e.computeLevel(cur, e.c, grad)
	} else {
		e.touchUp(cur, e.c, grad)
		if grad {
			// The sensitivities need the Newton matrix at the accepted state.
			e.assemble(cur, theta, dtau, dt)
			if !e.factor() {
				copy(e.c, e.cn)
				return errStep
			}
		}
	}
	e.steps++
	// Book-keeping of what crossed the boundaries.
	gNew0, gOld0 := cur.d[0]*cur.q[0], old.d[0]*old.q[0]
	switch {
	case e.mt:
		e.uptake += dt * e.beta * (e.cpAtm - theta*e.c[0] - (1-theta)*e.cn[0])
	case e.leftDir:
		e.uptake += e.vol[0]*(e.c[0]-e.cn[0]) - dtau*(theta*gNew0+(1-theta)*gOld0)
	}
	if e.right {
		k := n - 2
		e.farUptake += e.vol[n-1]*(e.c[n-1]-e.cn[n-1]) + dtau*(theta*cur.d[k]*cur.q[k]+(1-theta)*old.d[k]*old.q[k])
	}
	if grad {
		e.sensitivities(theta, dtau, dt)
	}
	// Rotate the levels: cprev2 ← cprev ← cn (the state before this step).
	e.cprev2, e.cprev, e.cn = e.cprev, e.cn, e.cprev2
	e.old, e.cur = e.cur, e.old
	e.dtauPrev2, e.dtauPrev = e.dtauPrev, dtau
	e.havePrev++
	return nil
}

// sensitivities advances Sⱼ = ∂C/∂pⱼ through the converged step by
// differentiating the step equations R(Cⁿ⁺¹, Cⁿ, p) = 0:
//
//	J Sⁿ⁺¹ = V∘Sⁿ + (1−θ)Δτ ∂Φ/∂C|ⁿ Sⁿ + Δτ[θ ∂Φ/∂p|ⁿ⁺¹ + (1−θ) ∂Φ/∂p|ⁿ] + boundary terms,
//
// with J the Newton matrix at Cⁿ⁺¹ (already factored). This is the exact
// derivative of the discrete solution, so the fit sees a Jacobian that
// matches its model values to the Newton tolerance.
func (e *engine) sensitivities(theta, dtau, dt float64) {
	n, ng := e.n, e.ng
	old, cur := &e.old, &e.cur
	wo, wn := (1-theta)*dtau, theta*dtau
	for j, sp := range e.sens {
		s := e.s[j*e.n : (j+1)*e.n]
		r := e.tmp
		var fPrev float64
		for i := 0; i < n; i++ {
			var f float64 // (1−θ)Δτ·dGᵒᵢ + θΔτ·∂Gⁿᵢ/∂p
			if i < n-1 {
				var po, pn float64
				for m := 0; m < ng; m++ {
					if a := sp.law[m]; a != 0 {
						po += a * old.g[i*ng+m]
						pn += a * cur.g[i*ng+m]
					}
				}
				f = wo*(old.a[i]*s[i]+old.b[i]*s[i+1]+po*old.q[i]) + wn*pn*cur.q[i]
			}
			r[i] = e.vol[i]*s[i] + f - fPrev
			fPrev = f
		}
		if e.mt {
			r[0] += -(1-theta)*dt*e.beta*s[0] +
				dt*(sp.beta*(e.cpAtm-theta*e.c[0]-(1-theta)*e.cn[0])+e.beta*sp.cp)
		}
		if e.leftDir {
			r[0] = sp.cs
		}
		if e.right {
			r[n-1] = sp.far
		}
		e.thomas(r, s)
	}
}
