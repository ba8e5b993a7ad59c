package arrhenius

import (
	"errors"
	"fmt"
	"math"
	"strings"

	"github.com/fickfit/fickfit/fit"
	"github.com/fickfit/fickfit/profile"
	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat/distuv"
)

// GlobalOptions control the one-stage fit. The zero value fits the erf
// model with its default free parameters and otherwise behaves as the zero
// Options.
type GlobalOptions struct {
	// Options: Level, TemperatureSigma, NoBirge, ColdOK, MaxIter and Tol as
	// for TwoStage (Unweighted does not apply).
	Options
	// Fit holds the per-profile model settings: Model or Custom, Fixed,
	// Free, AbsoluteSigma, Thickness, Faces and Settings (the solver's
	// tolerances, also used for the global problem). Level and CI are ignored.
	Fit fit.Options
}

// Global fits all profiles at once: they share ln D0 and Q, so that
// ln Dᵢ = ln D0 − Q/(RTᵢ), while each keeps its own other parameters
// (for the erf model the surface and plateau levels Csᵢ, C0ᵢ; x0ᵢ when
// freed). Any fit.Model with a log-scale parameter "D" works.
//
// It is one weighted nonlinear least-squares problem solved by fit.Solve:
// the profiles' residuals are stacked, each profile weighted by its
// σ-weights divided by the residual variance of its own separate fit
// (so that a noisy profile does not dominate; with Fit.AbsoluteSigma the
// σ are taken as known). Starting values come from the separate fits and
// the two-stage line.
//
// Temperature uncertainty enters as a random shift uᵢ of ln Dᵢ with
// variance (Q/(RTᵢ²))²σ_Tᵢ², carried as an extra parameter with a
// pseudo-observation 0 = uᵢ; Q in that variance is iterated to
// convergence, as the effective variance of TwoStage.
//
// Intervals: the covariance of (ln D0, Q) from the inverse of JᵀWJ of the
// whole problem (the other parameters integrated out), Student-t quantiles
// on n_profiles − 2 degrees of freedom, and the Birge ratio from the extra
// sum of squares of the global fit over the separate fits,
// B² = (S_global − Σ S_separate)/(n_profiles − 2), applied as in TwoStage.
// The points reported are the separate fits' D.
func Global(ps []profile.Profile, o *GlobalOptions) (*Line, error) {
	var g GlobalOptions
	if o != nil {
		g = *o
	}
	opt, err := g.Options.defaults()
	if err != nil {
		return nil, err
	}
	if opt.Unweighted {
		return nil, badInput("", "unweighted", "the global fit weights each profile by its own residual variance; Unweighted applies to the two-stage regression only")
	}
	n := len(ps)
	if n < 2 {
		return nil, badInput("", "profiles", "%d profile(s): a global Arrhenius fit needs profiles at 2 or more distinct temperatures (3 or more for a confidence interval)", n)
	}
	ids := make([]string, n)
	srcs := make([]string, n)
	T := make([]float64, n)
	for i := range ps {
		ids[i], srcs[i], T[i] = ps[i].ID, ps[i].Source, ps[i].Temperature
		if !(ps[i].Time > 0) {
			e := badInput(ps[i].ID, "time", "the hold time is not given (or is ≤ 0); the global fit needs each profile's time. Add a `# time:` line or give the time")
			e.Source = ps[i].Source
			return nil, e
		}
	}
	if err := checkTemperatures(ids, srcs, T, opt.ColdOK); err != nil {
		return nil, err
	}
	nT := distinctTemperatures(T)
	if nT < 2 {
		return nil, badInput("", "temperature", "all %d profiles are at one temperature (%s); an Arrhenius line needs 2 or more distinct temperatures (3 or more for a confidence interval)", n, tk(T[0]))
	}
	m := g.Fit.Custom
	if m == nil {
		name := g.Fit.Model
		if name == "" {
			name = "erf"
		}
		if m, err = fit.NewModel(name); err != nil {
			return nil, err
		}
	}
	params := m.Params()
	jd := -1
	for j, pa := range params {
		if pa.Name == "D" && pa.Log {
			jd = j
		}
	}
	if jd < 0 {
		return nil, badInput(m.Name(), "model", "the %s model has no log-scale parameter D; the global fit ties ln D to the Arrhenius line", m.Name())
	}
	for name := range g.Fit.Fixed {
		if strings.EqualFold(strings.TrimSpace(name), "D") {
			return nil, badInput("", "D", "D cannot be fixed in a global Arrhenius fit: it is what the line describes")
		}
	}

	// Stage 0: separate fits give starting values and each profile's scale.
	fo := g.Fit
	fo.CI, fo.Level, fo.Custom = "wald", 0.95, nil
	sep := make([]*fit.Result, n)
	pts := make([]Point, n)
	for i := range ps {
		r, err := fit.FitModel(&ps[i], m, fo)
		if err != nil {
			return nil, fmt.Errorf("global fit needs a separate fit of every profile first: %w", err)
		}
		sep[i] = r
		pt, err := PointFromResult(r)
		if err != nil {
			return nil, err
		}
		pts[i] = pt
	}
	start, err := TwoStage(pts, &Options{Level: opt.Level, TemperatureSigma: opt.TemperatureSigma, ColdOK: opt.ColdOK, MaxIter: opt.MaxIter, Tol: opt.Tol})
	if err != nil {
		return nil, fmt.Errorf("starting line from the separate fits: %w", err)
	}
	sT := make([]float64, n)
	anySigmaT := false
	for i := range ps {
		sT[i] = pts[i].SigmaT
		if sT[i] == 0 {
			sT[i] = opt.TemperatureSigma
		}
		if sT[i] > 0 {
			anySigmaT = true
		}
	}
	gp := newGlobalProblem(m, jd, sep, T, sT, g.Fit.AbsoluteSigma)
	var sw, swx float64
	for _, p := range start.Points {
		sw += p.Weight
		swx += p.Weight / (R * p.T)
	}
	gp.xc = swx / sw
	theta := gp.start(start.LnD0-start.Q*gp.xc, start.Q)

	sol, iter, conv, err := gp.solveLoop(theta, opt, g.Fit.Settings)
	if err != nil {
		return nil, err
	}
	covBQ, err := gp.covariance(sol)
	if err != nil {
		return nil, err
	}
	b, q := sol.P[0], sol.P[1]*qUnit
	l := &Line{Method: "global", Q: q, LnD0: b + q*gp.xc, Level: opt.Level, DOF: n - 2, NTemperatures: nT, HasCI: nT >= 3}
	if anySigmaT {
		l.Iterations = iter
	}
	if err := checkQ(q, T); err != nil {
		return nil, err
	}
	cov := gp.toLnD0(covBQ)
	extra := math.Max(sol.RSS-gp.rssSeparate, 0)
	l.ChiSq = extra
	l.BirgeRatio, l.ChiSqP = nan, nan
	if l.DOF > 0 {
		l.BirgeRatio = math.Sqrt(extra / float64(l.DOF))
		l.ChiSqP = distuv.ChiSquared{K: float64(l.DOF)}.Survival(extra)
	}
	scale := 1.0
	if !opt.NoBirge && l.BirgeRatio > 1 {
		scale, l.Scaled = l.BirgeRatio*l.BirgeRatio, true
	}
	for i := range cov {
		for j := range cov[i] {
			l.Cov[i][j] = cov[i][j] * scale
		}
	}
	l.Points = make([]LinePoint, n)
	for i, p := range pts {
		p.SigmaT = sT[i]
		fitted := l.LnD0 - l.Q/(R*p.T)
		l.Points[i] = LinePoint{Point: p, Fitted: fitted, Residual: p.LnD - fitted, Weight: 1 / p.VarLnD}
	}
	l.Warnings = l.standardWarnings(opt)
	if anySigmaT {
		if !conv {
			l.Warnings = append(l.Warnings, fit.Warning{Code: "effective-variance-not-converged", Message: fmt.Sprintf("The temperature-uncertainty iteration did not settle in %d steps; Q's interval may be slightly off.", opt.MaxIter)})
		}
		gp0 := newGlobalProblem(m, jd, sep, T, make([]float64, n), g.Fit.AbsoluteSigma)
		gp0.xc = gp.xc
		sol0, _, _, err := gp0.solveLoop(gp0.start(sol.P[0], q), opt, g.Fit.Settings)
		if err != nil {
			return nil, fmt.Errorf("refit without temperature uncertainty (for the budget): %w", err)
		}
		cbq0, err := gp0.covariance(sol0)
		if err != nil {
			return nil, err
		}
		scale0 := 1.0
		if l.DOF > 0 && !opt.NoBirge {
			scale0 = math.Max(1, math.Max(sol0.RSS-gp0.rssSeparate, 0)/float64(l.DOF))
		}
		l.TempBudget = newBudget(l, cov[1][1], gp0.toLnD0(cbq0)[1][1], scale, scale0, iter, conv)
	}
	return l, nil
}

// qUnit is the scale of Q inside the global problem (kJ/mol), so that the
// solver's parameters are of moderate size.
const qUnit = 1000.0

// globalProblem is the stacked least-squares problem of Global.
// Parameter layout: [b, Q/qUnit, profile 0's parameters (its D slot unused),
// profile 1's…, u₀, u₁…] with ln Dᵢ = b − Q·(xᵢ − xc) + uᵢ, xᵢ = 1/(RTᵢ).
type globalProblem struct {
	m      fit.Model
	jd, np int
	data   []*fit.Data
	x, T   []float64
	sT     []float64
	pint   [][]float64
	free   [][]bool
	scale  []float64 // per-profile weight divisor s²ᵢ
	off    []int     // first row of each profile in the stack
	nObs   int       // rows of real observations
	xc     float64
	// rssSeparate is Σ Sᵢ/s²ᵢ of the separate fits, in the global weights.
	rssSeparate float64
}

func newGlobalProblem(m fit.Model, jd int, sep []*fit.Result, T, sT []float64, absolute bool) *globalProblem {
	n := len(sep)
	gp := &globalProblem{m: m, jd: jd, np: len(m.Params()), T: T, sT: sT,
		x: make([]float64, n), data: make([]*fit.Data, n), pint: make([][]float64, n),
		free: make([][]bool, n), scale: make([]float64, n), off: make([]int, n)}
	for i, r := range sep {
		gp.x[i] = 1 / (R * T[i])
		gp.data[i] = r.Data()
		gp.pint[i], gp.free[i], _ = r.Internal()
		gp.scale[i] = 1
		if !absolute {
			gp.scale[i] = r.Stats.Chi2Red
		}
		gp.off[i] = gp.nObs
		gp.nObs += len(gp.data[i].X)
		gp.rssSeparate += r.Stats.RSS / gp.scale[i]
	}
	return gp
}

func (gp *globalProblem) nParams() int { return 2 + len(gp.data)*gp.np + len(gp.data) }
func (gp *globalProblem) uIndex(i int) int {
	return 2 + len(gp.data)*gp.np + i
}

// start returns the starting parameter vector for b and Q.
func (gp *globalProblem) start(b, q float64) []float64 {
	th := make([]float64, gp.nParams())
	th[0], th[1] = b, q/qUnit
	for i := range gp.data {
		copy(th[2+i*gp.np:], gp.pint[i])
	}
	return th
}

// problem builds the fit.Problem for the current Q (used in the variance of uᵢ).
func (gp *globalProblem) problem(q float64) fit.Problem {
	n := len(gp.data)
	np, P := gp.np, gp.nParams()
	nu := 0
	for _, s := range gp.sT {
		if s > 0 {
			nu++
		}
	}
	N := gp.nObs + nu
	y := make([]float64, N)
	w := make([]float64, N)
	free := make([]bool, P)
	free[0], free[1] = true, true
	row := gp.nObs
	uRow := make([]int, n)
	for i, d := range gp.data {
		copy(y[gp.off[i]:], d.Y)
		for k := range d.X {
			wk := 1.0
			if d.W != nil {
				wk = d.W[k]
			}
			w[gp.off[i]+k] = wk / gp.scale[i]
		}
		for j := 0; j < np; j++ {
			free[2+i*np+j] = gp.free[i][j] && j != gp.jd
		}
		uRow[i] = -1
		if gp.sT[i] > 0 {
			g := q / (R * gp.T[i] * gp.T[i])
			w[row] = 1 / (g * g * gp.sT[i] * gp.sT[i])
			free[gp.uIndex(i)] = true
			uRow[i] = row
			row++
		}
	}
	pi := make([]float64, np)
	var jbuf []float64
	return fit.Problem{Y: y, W: w, Free: free, Func: func(th, f, jac []float64) {
		if jac != nil {
			clear(jac)
		}
		for i, d := range gp.data {
			base := 2 + i*np
			copy(pi, th[base:base+np])
			u := th[gp.uIndex(i)]
			dx := gp.x[i] - gp.xc
			pi[gp.jd] = th[0] - th[1]*qUnit*dx + u
			nk := len(d.X)
			fi := f[gp.off[i] : gp.off[i]+nk]
			if jac == nil {
				gp.m.Eval(pi, d, fi, nil)
				continue
			}
			if len(jbuf) < nk*np {
				jbuf = make([]float64, nk*np)
			}
			jb := jbuf[:nk*np]
			gp.m.Eval(pi, d, fi, jb)
			for k := 0; k < nk; k++ {
				src := jb[k*np : (k+1)*np]
				dst := jac[(gp.off[i]+k)*P : (gp.off[i]+k+1)*P]
				dl := src[gp.jd]
				dst[0] = dl
				dst[1] = -dl * qUnit * dx
				for j := 0; j < np; j++ {
					if j != gp.jd {
						dst[base+j] = src[j]
					}
				}
				dst[gp.uIndex(i)] = dl
			}
		}
		for i := range gp.data {
			if r := uRow[i]; r >= 0 {
				f[r] = th[gp.uIndex(i)]
				if jac != nil {
					jac[r*P+gp.uIndex(i)] = 1
				}
			}
		}
	}}
}

// solveLoop solves the stacked problem, re-solving with the variance of uᵢ
// updated to the new Q until Q settles.
func (gp *globalProblem) solveLoop(theta []float64, opt Options, s *fit.Settings) (*fit.Solution, int, bool, error) {
	q := theta[1] * qUnit
	any := false
	for _, v := range gp.sT {
		any = any || v > 0
	}
	var sol *fit.Solution
	for it := 1; it <= opt.MaxIter; it++ {
		var err error
		sol, err = fit.Solve(gp.problem(q), theta, s)
		if err != nil {
			return nil, it, false, err
		}
		if !sol.Converged {
			return nil, it, false, noAnswer("", "global fit", "the global fit did not converge: %s. Check the separate fits (fickfit fit) for a profile that does not fit, or use the two-stage regression", sol.Reason)
		}
		qn := sol.P[1] * qUnit
		if !any {
			return sol, 0, true, nil
		}
		if math.Abs(qn-q) <= math.Max(opt.Tol, 1e-10)*math.Abs(qn) {
			return sol, it, true, nil
		}
		q, theta = qn, sol.P
	}
	return sol, opt.MaxIter, false, nil
}

// covariance returns the unscaled covariance of (b, Q) in J/mol from the
// inverse of JᵀWJ over the free parameters (b and Q/qUnit come first).
func (gp *globalProblem) covariance(sol *fit.Solution) ([2][2]float64, error) {
	var vb [2][2]float64
	k := int(math.Round(math.Sqrt(float64(len(sol.JTJ)))))
	a := mat.NewSymDense(k, nil)
	sc := make([]float64, k)
	for i := 0; i < k; i++ {
		if !(sol.JTJ[i*k+i] > 0) {
			return vb, noAnswer("", "global fit", "a parameter of the global fit has no influence on the data (zero column of the Jacobian)")
		}
		sc[i] = 1 / math.Sqrt(sol.JTJ[i*k+i])
	}
	for i := 0; i < k; i++ {
		for j := 0; j <= i; j++ {
			a.SetSym(i, j, sol.JTJ[i*k+j]*sc[i]*sc[j])
		}
	}
	var ch mat.Cholesky
	if !ch.Factorize(a) {
		return vb, noAnswer("", "global fit", "the parameters of the global fit cannot be separated (singular JᵀWJ); fix a parameter or use the two-stage regression")
	}
	var inv mat.SymDense
	if err := ch.InverseTo(&inv); err != nil {
		return vb, noAnswer("", "global fit", "cannot invert JᵀWJ: %v", err)
	}
	var c [2][2]float64
	units := [2]float64{1, qUnit}
	for i := 0; i < 2; i++ {
		for j := 0; j < 2; j++ {
			c[i][j] = inv.At(i, j) * sc[i] * sc[j] * units[i] * units[j]
		}
	}
	return c, nil
}

// toLnD0 maps the covariance of (b, Q) to that of (ln D0 = b + Q·xc, Q).
func (gp *globalProblem) toLnD0(c [2][2]float64) [2][2]float64 {
	xc := gp.xc
	var out [2][2]float64
	out[0][0] = c[0][0] + 2*xc*c[0][1] + xc*xc*c[1][1]
	out[0][1] = c[0][1] + xc*c[1][1]
	out[1][0] = out[0][1]
	out[1][1] = c[1][1]
	return out
}

// GroupProfiles splits profiles by the column by: "lot" (Profile.Lot, else
// Meta["lot"]), "material" (Profile.Material, else Meta) or any metadata
// key (case-insensitive), in order of first appearance. A profile without
// a value is an error naming it.
func GroupProfiles(ps []profile.Profile, by string) (names []string, groups [][]profile.Profile, err error) {
	return groupBy(ps, by, func(p profile.Profile) (string, bool, string, string) {
		v, ok := groupValue(by, p.Lot, p.Material, p.Meta)
		return v, ok, p.ID, p.Source
	})
}

// TwoStageGroups runs TwoStage on each group of points (see GroupPoints);
// by == "" gives a single line.
func TwoStageGroups(pts []Point, by string, o *Options) (*Report, error) {
	names, groups, err := GroupPoints(pts, by)
	if err != nil {
		return nil, err
	}
	rep := &Report{By: strings.TrimSpace(by)}
	for i, g := range groups {
		l, err := TwoStage(g, o)
		if err != nil {
			return nil, groupErr(by, names[i], err)
		}
		l.Group, l.By = names[i], rep.By
		rep.Lines = append(rep.Lines, *l)
	}
	return rep, nil
}

// GlobalGroups runs Global on each group of profiles (see GroupProfiles).
func GlobalGroups(ps []profile.Profile, by string, o *GlobalOptions) (*Report, error) {
	names, groups, err := GroupProfiles(ps, by)
	if err != nil {
		return nil, err
	}
	rep := &Report{By: strings.TrimSpace(by)}
	for i, g := range groups {
		l, err := Global(g, o)
		if err != nil {
			return nil, groupErr(by, names[i], err)
		}
		l.Group, l.By = names[i], rep.By
		rep.Lines = append(rep.Lines, *l)
	}
	return rep, nil
}

func groupErr(by, name string, err error) error {
	if strings.TrimSpace(by) == "" {
		return err
	}
	var e *Error
	if errors.As(err, &e) && e.ID == "" {
		e.ID = fmt.Sprintf("%s %s", by, name)
		return err
	}
	return fmt.Errorf("%s %s: %w", by, name, err)
}
