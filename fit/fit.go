package fit

import (
	"errors"
	"fmt"
	"math"
	"sort"
	"strings"

	"github.com/fickfit/fickfit/profile"
)

// Fit fits the model named in o to one measured profile.
//
// A fit that does not converge, or whose parameters the data cannot
// identify, returns an error wrapping ErrNoAnswer (and no numbers); a
// request the data cannot support (too few points, unknown parameter…)
// returns an error wrapping ErrBadInput. Both name the profile and file.
func Fit(p *profile.Profile, o Options) (*Result, error) { return fitInto(p, o, nil) }

// fitInto is Fit; into, when not nil, is a result that is no longer used
// and lends its storage to the new one (FitEach with BatchOptions.Reuse).
// A model chosen by --model auto is fitted afresh.
func fitInto(p *profile.Profile, o Options, into *Result) (*Result, error) {
	m := o.Custom
	if m == nil {
		name := strings.ToLower(strings.TrimSpace(o.Model))
		if name == "" {
			name = "erf"
		}
		if name == "auto" {
			sel, err := SelectModel(p, o, SelectOptions{})
			if err != nil {
				return nil, err
			}
			sel.Result.Selection = sel
			return sel.Result, nil
		}
		var err error
		if m, err = NewModel(name); err != nil {
			return nil, errAt(p, err)
		}
	}
	r, err := fitModel(p, m, o, into)
	if err != nil {
		return nil, errAt(p, err)
	}
	r.noteInput(p)
	return r, nil
}

// FitModel fits the given model to one profile; see Fit.
func FitModel(p *profile.Profile, m Model, o Options) (*Result, error) {
	r, err := fitModel(p, m, o, nil)
	if err != nil {
		return nil, errAt(p, err)
	}
	r.noteInput(p)
	return r, nil
}

// noteInput carries what reading and converting the profile left to say:
// its notes become warnings, its values below a detection limit are listed.
func (r *Result) noteInput(p *profile.Profile) {
	for _, n := range p.Notes {
		r.Warn(n.Code, "%s", n.Message)
	}
	r.BelowLimit = append([]profile.BelowLimit(nil), p.BelowLimit...)
}

// errAt prefixes an error with the profile's id and source.
func errAt(p *profile.Profile, err error) error {
	where := p.ID
	if p.Source != "" && p.Source != p.ID {
		where = fmt.Sprintf("%s (%s)", p.ID, p.Source)
	}
	return fmt.Errorf("profile %s: %w", where, err)
}

// newData builds the model's view of a profile, in SI units (in the
// storage of into's data, when into is not nil).
func newData(p *profile.Profile, o Options, into *Result) (*Data, error) {
	n := p.Len()
	if n == 0 || len(p.Value) != n {
		return nil, fmt.Errorf("%w: the profile has no data points", ErrBadInput)
	}
	var d *Data
	var w []float64
	if into != nil && into.data != nil {
		d, w = into.data, into.data.W
	} else {
		d = new(Data)
	}
	*d = Data{X: p.Depth, Y: p.Value, Time: p.Time, Thickness: p.Thickness, Faces: o.Faces}
	if d.Time <= 0 {
		d.Time = 1 // D then stands for Dt
	}
	if o.Thickness > 0 {
		d.Thickness = o.Thickness
	}
	if d.Faces == 0 {
		d.Faces = 2
	}
	for i := 0; i < n; i++ {
		if !finite(p.Depth[i]) || !finite(p.Value[i]) {
			return nil, fmt.Errorf("%w: point %d%s is not a finite number", ErrBadInput, i+1, lineOf(p, i))
		}
	}
	if p.Sigma != nil {
		if len(p.Sigma) != n {
			return nil, fmt.Errorf("%w: %d sigma values for %d points", ErrBadInput, len(p.Sigma), n)
		}
		d.W = resize(w, n)
		for i, s := range p.Sigma {
			if !(s > 0) || !finite(s) {
				return nil, fmt.Errorf("%w: sigma %g at point %d%s must be a positive number (it is the standard uncertainty of the value)", ErrBadInput, s, i+1, lineOf(p, i))
			}
			d.W[i] = 1 / (s * s)
		}
	}
	return d, nil
}

func lineOf(p *profile.Profile, i int) string {
	if i < len(p.Line) && p.Line[i] > 0 {
		return fmt.Sprintf(" (line %d)", p.Line[i])
	}
	return ""
}

// setup resolves which parameters are free and their starting values.
func setup(m Model, d *Data, o Options) (p0 []float64, free []bool, err error) {
	params := m.Params()
	p0 = make([]float64, len(params))
	if err := m.Start(d, p0); err != nil {
		return nil, nil, err
	}
	free = make([]bool, len(params))
	for j, pa := range params {
		free[j] = pa.Free
	}
	lookup := func(name string) (int, error) {
		name = strings.TrimSpace(name)
		for j, pa := range params {
			if strings.EqualFold(pa.Name, name) {
				return j, nil
			}
		}
		names := make([]string, len(params))
		for j, pa := range params {
			names[j] = pa.Name
		}
		return 0, fmt.Errorf("%w: the %s model has no parameter %q (its parameters: %s)", ErrBadInput, m.Name(), name, strings.Join(names, ", "))
	}
	for _, name := range o.Free {
		j, err := lookup(name)
		if err != nil {
			return nil, nil, err
		}
		free[j] = true
	}
	var fixedNames []string
	for name := range o.Fixed {
		fixedNames = append(fixedNames, name)
	}
	sort.Strings(fixedNames)
	for _, name := range fixedNames {
		v := o.Fixed[name]
		j, err := lookup(name)
		if err != nil {
			return nil, nil, err
		}
		if !finite(v) {
			return nil, nil, fmt.Errorf("%w: fixed value of %s is not a finite number", ErrBadInput, params[j].Name)
		}
		if params[j].Log {
			if v <= 0 {
				return nil, nil, fmt.Errorf("%w: %s must be positive to be fixed (got %g)", ErrBadInput, params[j].Name, v)
			}
			v = math.Log(v)
		}
		p0[j] = v
		free[j] = false
	}
	for j := range p0 {
		if !finite(p0[j]) {
			return nil, nil, fmt.Errorf("%w: no usable starting value for %s from these data", ErrNoAnswer, params[j].Name)
		}
	}
	return p0, free, nil
}

// fitModel fits m to p; into, when not nil, lends its storage (see fitInto).
func fitModel(p *profile.Profile, m Model, o Options, into *Result) (*Result, error) {
	d, err := newData(p, o, into)
	if err != nil {
		return nil, err
	}
	p0, free, err := setup(m, d, o)
	if err != nil {
		return nil, err
	}
	k := 0
	for _, f := range free {
		if f {
			k++
		}
	}
	n := len(d.X)
	if k == 0 {
		return nil, fmt.Errorf("%w: every parameter is fixed; free at least one", ErrBadInput)
	}
	if n < k+2 {
		return nil, fmt.Errorf("%w: %d %s cannot support %d free parameters with an error estimate (need at least %d points); add points or hold a parameter at a known value", ErrBadInput, n, plural(n, "point", "points"), k, k+2)
	}
	if nd := distinctDepths(d.X); nd < k {
		return nil, fmt.Errorf("%w: the points lie at only %d distinct %s, which cannot determine the %d free parameters of the %s model (need at least %d distinct depths); add points at other depths or hold a parameter at a known value", ErrNoAnswer, nd, plural(nd, "depth", "depths"), k, m.Name(), k)
	}
	if constant(d.Y) {
		return nil, fmt.Errorf("%w: all %d values are equal (%g): there is no profile to fit", ErrBadInput, n, d.Y[0])
	}
	rb, err := solveRobust(m, d, p0, free, o.Settings)
	if err != nil {
		return nil, err
	}
	sol := rb.Sol
	limit := atLimit(m.Params(), sol, p0)
	if !sol.Converged && limit < 0 {
		return nil, fmt.Errorf("%w: the %s fit did not converge: %s. Try holding a parameter at a known value, adding deeper or shallower points, or another model", ErrNoAnswer, m.Name(), failureReason(m, sol, free, p0))
	}
	r := into
	if r == nil {
		r = &Result{}
	}
	*r = Result{
		ID: p.ID, Source: p.Source, Lot: p.Lot, Material: p.Material, Model: m.Name(),
		ValueUnit: p.ValueUnit, Converged: true, Time: p.Time, Temperature: p.Temperature,
		TemperatureSigma: p.TemperatureSigma, Thickness: d.Thickness, Meta: p.Meta,
		model: m, data: d, pint: append(r.pint[:0], sol.P...), free: free,
		lim: limit + 1, p0: p0,
		// Storage the statistics fill again (empty for a new result).
		Params: r.Params[:0], FreeNames: r.FreeNames[:0], Correlation: r.Correlation[:0], Residuals: r.Residuals[:0], cov: r.cov[:0],
	}
	err = r.finish(sol, o)
	sol.release() // the result keeps copies, not the solver's workspace
	if err != nil {
		return nil, err
	}
	r.warnOptima(rb)
	if err := r.depths(o); err != nil {
		return nil, err
	}
	return r, nil
}

// resize returns s with length n, in its own storage when it is large
// enough, else new.
func resize[T any](s []T, n int) []T {
	if cap(s) >= n {
		return s[:n]
	}
	return make([]T, n)
}

// warnOptima says when the starts of the failure path disagree: two
// certified optima, or an uncertified end point below the reported one.
func (r *Result) warnOptima(rb robust) {
	unit := "m²/s"
	if e := r.Param("D"); e != nil && e.Unit == "m2" {
		unit = "m² (Dt)"
	}
	if len(rb.Optima) > 1 {
		a, b := rb.Optima[0], rb.Optima[1]
		verdict := fmt.Sprintf("The reported one fits best; the other is a local optimum of the %s model, so check that the model suits the profile's shape.", r.Model)
		if math.Abs(a.RSS-b.RSS) <= 1e-9*b.RSS {
			verdict = fmt.Sprintf("Both fit equally well: these data cannot decide between them, so D is not determined by the %s model here.", r.Model)
		}
		r.Warn("multiple-optima", "Different starts of the solver reached different optima: D = %.6g %s (RSS %.6g, from %s; reported) and D = %.6g %s (RSS %.6g, from %s). %s",
			a.D, unit, a.RSS, a.Start, b.D, unit, b.RSS, b.Start, verdict)
	}
	if l := rb.Lower; l != nil {
		r.Warn("multiple-optima", "From %s the residual sum fell to %.6g, below the reported optimum's %.6g, without a certified optimum there (solver status %s, D = %.6g %s): the best fit may lie at an edge of the %s model, where a parameter runs off to 0 or infinity. Treat the reported D = %.6g %s with care, or compare models with --model auto.",
			l.Start, l.RSS, rb.Optima[0].RSS, l.Status, l.D, unit, r.Model, rb.Optima[0].D, unit)
	}
}

func constant(y []float64) bool {
	for _, v := range y[1:] {
		if v != y[0] {
			return false
		}
	}
	return true
}

// Data returns the data the model was fitted to.
func (r *Result) Data() *Data { return r.data }

// ModelValue returns the fitted model (nil for a result read from JSON).
func (r *Result) ModelValue() Model { return r.model }

// Internal returns copies of the fitted parameter vector (internal scale:
// ln for Log parameters), the free mask, and the covariance of the free
// parameters (internal scale, in the order of the free ones).
func (r *Result) Internal() (p []float64, free []bool, cov [][]float64) {
	p = append([]float64(nil), r.pint...)
	free = append([]bool(nil), r.free...)
	cov = make([][]float64, len(r.cov))
	for i := range r.cov {
		cov[i] = append([]float64(nil), r.cov[i]...)
	}
	return p, free, cov
}

// LnD returns ln D and its standard error (D is Dt in m² when the time was
// not given). ok is false when the model has no D.
func (r *Result) LnD() (lnD, se float64, ok bool) {
	e := r.Param("D")
	if e == nil || !(e.Value > 0) {
		return 0, 0, false
	}
	return math.Log(e.Value), e.StdErrLn, true
}

// errNoCurve is returned by Curve for results read back from JSON.
var errNoCurve = errors.New("this result carries no model (it was read from a file); refit the profile to draw its curve")

// depths computes the case and decarburization depths asked for in o.
func (r *Result) depths(o Options) error {
	do := DepthOptions{Calibration: o.Calibration}
	if o.CaseThreshold != nil {
		e, err := CaseDepth(r, *o.CaseThreshold, do)
		if err != nil {
			return err
		}
		r.CaseDepth = e
	}
	if o.DecarbFraction > 0 {
		e, err := DecarbDepth(r, o.DecarbFraction, do)
		if err != nil {
			return err
		}
		r.DecarbDepth = e
	}
	return nil
}

func plural(n int, one, many string) string {
	if n == 1 {
		return one
	}
	return many
}

// failureReason says in words why the solver stopped, naming parameters by
// the names --fix takes.
func failureReason(m Model, sol *Solution, free []bool, p0 []float64) string {
	params := m.Params()
	switch {
	case sol.Status == IterationLimit:
		// Name the free parameter that travelled furthest in units of its
		// effect on the curve: it is the one the data do not hold.
		kk := countTrue(free)
		best, far := -1, 0.0
		if len(sol.JTJ) == kk*kk {
			k := 0
			for j, f := range free {
				if !f {
					continue
				}
				if move := math.Abs(sol.P[j]-p0[j]) * math.Sqrt(math.Abs(sol.JTJ[k*kk+k])); move > far {
					best, far = j, move
				}
				k++
			}
		}
		if best >= 0 {
			return fmt.Sprintf("%s while %s was still moving: the data may not bound it (is the base level reached? does the profile have the shape of this model?)", sol.Reason, params[best].Name)
		}
		return sol.Reason
	case sol.Stuck >= 0 && sol.Stuck < len(params):
		name := params[sol.Stuck].Name
		return fmt.Sprintf("%s has no effect on the curve at the final point: it ran off towards an asymptote (0 or infinity), so these data do not determine %s", name, name)
	case sol.Status == Unidentified:
		var idx []int
		for j, f := range free {
			if f {
				idx = append(idx, j)
			}
		}
		// The pair of free parameters whose Jacobian columns are most
		// nearly parallel is the pair the data cannot tell apart.
		k := len(idx)
		bi, bj, best := -1, -1, -1.0
		for a := 0; a < k; a++ {
			for b := a + 1; b < k; b++ {
				c := math.Abs(sol.JTJ[a*k+b]) / math.Sqrt(sol.JTJ[a*k+a]*sol.JTJ[b*k+b])
				if c > best {
					bi, bj, best = a, b, c
				}
			}
		}
		if bi >= 0 && finite(best) {
			return fmt.Sprintf("%s and %s cannot be told apart by these data: their effects on the curve are nearly the same (column correlation %.6f, condition number %.2g)", params[idx[bi]].Name, params[idx[bj]].Name, best, sol.Cond)
		}
		return fmt.Sprintf("the free parameters cannot all be determined from these data (condition number %.2g)", sol.Cond)
	}
	return sol.Reason
}

// distinctDepths counts the different depths among x.
func distinctDepths(x []float64) int {
	if sort.Float64sAreSorted(x) {
		n := 1
		for i := 1; i < len(x); i++ {
			if x[i] != x[i-1] {
				n++
			}
		}
		return n
	}
	seen := make(map[float64]struct{}, len(x))
	for _, v := range x {
		seen[v] = struct{}{}
	}
	return len(seen)
}

func countTrue(b []bool) int {
	n := 0
	for _, v := range b {
		if v {
			n++
		}
	}
	return n
}
