package numeric

import (
	"fmt"
	"math"
	"sort"
	"sync"

	"github.com/fickfit/fickfit/fit"
)

// Config chooses the numerical fit model. The zero value is a constant D
// with a fixed surface concentration on a semi-infinite or finite body
// (from the data's thickness), isothermal, default grid.
type Config struct {
	// DC is the concentration law: LawConst (or ""), LawExp or LawTable.
	//   const: D(C) = D; parameters D, Cs, C0.
	//   exp:   D(C) = D·exp(k·(C − C0)), D the diffusivity at the far-field
	//          level C0; parameters D, k, Cs, C0.
	//   table: D(C) = D·T(C)/T(c₁), T the user's Table and c₁ its first
	//          (lowest) concentration: the table's shape is kept and the
	//          whole table is scaled, the fitted D being its value at c₁;
	//          parameters D, Cs, C0.
	DC Law
	// Table is the D(C) table for DC LawTable.
	Table *Table
	// Surface is SurfaceFixed (the zero value; parameter Cs) or
	// SurfaceMassTransfer (parameters beta in m/s and Cp instead of Cs).
	Surface Surface
	// Schedule multiplies D over the hold (furnace log); nil means
	// isothermal. The fitted D is then the value at the schedule's
	// reference temperature. A schedule needs the real hold time: with an
	// unknown time (Data.Time = 1, D standing for Dt) it is meaningless.
	Schedule Schedule
	// SemiInfinite ignores the specimen thickness in the data. Otherwise a
	// positive Data.Thickness makes a finite body: Faces 1 exposes one face
	// (the other sealed), Faces 2 (or 0) both faces to the same atmosphere.
	SemiInfinite bool
	// Options tune the solver (zero value: defaults).
	Options Options
}

// Model is the numerical solution of Fick's second law as a fit.Model
// (name "numeric"). Parameters, in order: D (ln scale, m²/s); k (1/value,
// exp only); Cs (value) or beta (ln scale, m/s) and Cp (value); C0 (value).
// Its Jacobian is not a finite difference: the solver
// propagates the forward sensitivities ∂C/∂p through every time step (the
// derivative of the discrete step equations, see engine.sensitivities), so
// each Jacobian costs about one extra solve and matches the model values to
// the Newton tolerance. A Model is safe for concurrent use: each Eval takes
// a workspace from a pool.
type Model struct {
	cfg                          Config
	opt                          options
	params                       []fit.Param
	iD, iK, iCs, iBeta, iCp, iC0 int // indices in the parameter vector; −1 if absent
	tabC1, tabD1                 float64
	pool                         sync.Pool
	fixLength                    float64 // tests: freeze the truncation depth
}

// The numerical model is described in the fit registry (its title in
// reports) but not built by name: it needs a Config (NewModel).
func init() {
	fit.Register(fit.Info{Name: "numeric", Title: "numerical solution with concentration-dependent D", Rank: 100}, nil)
}

// NewModel checks the configuration and returns the model.
func NewModel(c Config) (*Model, error) {
	opt, err := c.Options.resolve()
	if err != nil {
		return nil, err
	}
	m := &Model{cfg: c, opt: opt, iD: 0, iK: -1, iCs: -1, iBeta: -1, iCp: -1}
	m.params = []fit.Param{{Name: "D", Log: true, Unit: "m2/s", Free: true}}
	if m.cfg.DC, err = ParseLaw(string(c.DC)); err != nil {
		return nil, err
	}
	switch m.cfg.DC {
	case LawExp:
		m.iK = len(m.params)
		m.params = append(m.params, fit.Param{Name: "k", Unit: "1/value", Free: true})
	case LawTable:
		if c.Table == nil {
			return nil, fmt.Errorf("%w: numeric model: D(C) form \"table\" needs a table of (C, D) rows", fit.ErrBadInput)
		}
		m.tabC1, m.tabD1 = c.Table.First()
	}
	switch c.Surface {
	case SurfaceFixed:
		m.iCs = len(m.params)
		m.params = append(m.params, fit.Param{Name: "Cs", Unit: "value", Free: true})
	case SurfaceMassTransfer:
		m.iBeta = len(m.params)
		m.iCp = m.iBeta + 1
		m.params = append(m.params,
			fit.Param{Name: "beta", Log: true, Unit: "m/s", Free: true},
			fit.Param{Name: "Cp", Unit: "value", Free: true})
	default:
		return nil, fmt.Errorf("%w: numeric model: the surface must take up or give off material (fixed or mass-transfer), not %s", fit.ErrBadInput, c.Surface)
	}
	m.iC0 = len(m.params)
	m.params = append(m.params, fit.Param{Name: "C0", Unit: "value", Free: true})
	m.pool.New = func() any { return newEngine(m.opt) }
	return m, nil
}

// Name implements fit.Model.
func (m *Model) Name() string { return "numeric" }

// DC returns the resolved concentration law.
func (m *Model) DC() Law { return m.cfg.DC }

// Params implements fit.Model.
func (m *Model) Params() []fit.Param { return append([]fit.Param(nil), m.params...) }

// body returns the thickness and far condition the model uses for d.
func (m *Model) body(d *fit.Data) (float64, Far) {
	if m.cfg.SemiInfinite || d.Thickness <= 0 {
		return 0, FarSealed
	}
	if d.Faces == 1 {
		return d.Thickness, FarSealed
	}
	return d.Thickness, FarSymmetric
}

// check validates the data against the model.
func (m *Model) check(d *fit.Data) error {
	if !(d.Time > 0) || math.IsInf(d.Time, 0) {
		return fmt.Errorf("%w: numeric model: time %g s must be positive", fit.ErrBadInput, d.Time)
	}
	if d.Faces < 0 || d.Faces > 2 {
		return fmt.Errorf("%w: numeric model: %d exposed faces; use 1 or 2", fit.ErrBadInput, d.Faces)
	}
	if len(d.X) == 0 || len(d.Y) != len(d.X) {
		return fmt.Errorf("%w: numeric model: %d depths and %d values", fit.ErrBadInput, len(d.X), len(d.Y))
	}
	th, _ := m.body(d)
	for i, x := range d.X {
		if !(x >= 0) || math.IsInf(x, 0) {
			return fmt.Errorf("%w: numeric model: point %d has depth %g m; depths must be ≥ 0 from the exposed surface", fit.ErrBadInput, i+1, x)
		}
		if th > 0 && x > th*(1+1e-9) {
			return fmt.Errorf("%w: numeric model: point %d lies at %g m, beyond the thickness %g m; check the depth unit or the thickness", fit.ErrBadInput, i+1, x, th)
		}
	}
	return nil
}

// Start implements fit.Model: Cs from the shallowest points, C0 from the
// deepest, D from the depth where the profile is half-way between them as
// for the erf solution (erf(u) = ½ at u = 0.476936; Abramowitz & Stegun,
// Handbook of Mathematical Functions, 1964, Table 7.1, value from memory),
// k = 0; for mass transfer Cp and β such that h√(Dt) = 2, where the surface
// sits at 1 − erfcx(2) ≈ 0.745 of the way from C0 to Cp (Crank 1975,
// ch. 3; from memory).
func (m *Model) Start(d *fit.Data, p []float64) error {
	if err := m.check(d); err != nil {
		return err
	}
	if len(p) != len(m.params) {
		return fmt.Errorf("%w: numeric model: %d starting values for %d parameters", fit.ErrBadInput, len(p), len(m.params))
	}
	idx := make([]int, len(d.X))
	for i := range idx {
		idx[i] = i
	}
	sort.SliceStable(idx, func(a, b int) bool { return d.X[idx[a]] < d.X[idx[b]] })
	k := len(idx) / 6
	k = max(1, min(k, 5))
	var cs, c0 float64
	for i := 0; i < k; i++ {
		cs += d.Y[idx[i]]
		c0 += d.Y[idx[len(idx)-1-i]]
	}
	cs /= float64(k)
	c0 /= float64(k)
	mid := (cs + c0) / 2
	xmax := d.X[idx[len(idx)-1]]
	xh := xmax
	if xh <= 0 {
		xh = 1e-6
	}
	for a := 1; a < len(idx); a++ {
		y0, y1 := d.Y[idx[a-1]]-mid, d.Y[idx[a]]-mid
		if cs > c0 {
			y0, y1 = -y0, -y1
		}
		if y0 < 0 && y1 >= 0 {
			x0, x1 := d.X[idx[a-1]], d.X[idx[a]]
			if v := x0 + y0/(y0-y1)*(x1-x0); v > 0 {
				xh = v
			}
			break
		}
	}
	sdt := xh / (2 * 0.4769362762044699)
	D := sdt * sdt / d.Time
	p[m.iD] = math.Log(D)
	if m.cfg.DC == LawTable {
		// The law's shape at C0 is T(C0)/T(c₁): start so that D(C0) matches.
		t, _ := m.cfg.Table.At(c0)
		p[m.iD] = math.Log(D * m.tabD1 / t)
	}
	if m.iK >= 0 {
		p[m.iK] = 0
	}
	if m.iCs >= 0 {
		p[m.iCs] = cs
	}
	if m.iBeta >= 0 {
		const h = 2.0 // h√(Dt)
		p[m.iBeta] = math.Log(h * D / math.Sqrt(D*d.Time))
		p[m.iCp] = c0 + (cs-c0)/(1-fit.Erfcx(h))
	}
	p[m.iC0] = c0
	return nil
}

// problem builds the solver problem for parameters p (internal scale) and
// the sensitivity specifications into sp (nil when not wanted).
func (m *Model) problem(p []float64, d *fit.Data, sp []sensSpec) Problem {
	D := math.Exp(p[m.iD])
	c0 := p[m.iC0]
	pr := Problem{Schedule: m.cfg.Schedule, Time: d.Time, C0: c0, Surface: m.cfg.Surface}
	pr.Thickness, pr.Far = m.body(d)
	switch m.cfg.DC {
	case LawConst:
		pr.DC = Const{D}
	case LawExp:
		pr.DC = Exp{D: D, K: p[m.iK], Cref: c0}
	case LawTable:
		pr.DC = scaled{t: m.cfg.Table, f: D / m.tabD1}
	}
	if m.iCs >= 0 {
		pr.Cs = p[m.iCs]
	} else {
		pr.Beta, pr.Cp = math.Exp(p[m.iBeta]), p[m.iCp]
	}
	if sp != nil {
		for j := range sp {
			sp[j] = sensSpec{}
		}
		sp[m.iD].law[0] = 1 // every law's first gradient is ∂D/∂ln(scale)
		if m.iK >= 0 {
			sp[m.iK].law[1] = 1
			sp[m.iC0].law[2] = 1 // Cref = C0 in the exponential law
		}
		sp[m.iC0].init, sp[m.iC0].far = 1, 1
		if m.iCs >= 0 {
			sp[m.iCs].cs = 1
		} else {
			sp[m.iBeta].beta = pr.Beta
			sp[m.iCp].cp = 1
		}
	}
	return pr
}

// Eval implements fit.Model. Where the solver cannot give an answer (a
// parameter set with a non-positive D, a diverging Newton iteration) the
// values are NaN, which the least-squares solver treats as a failed step.
func (m *Model) Eval(p []float64, d *fit.Data, f, jac []float64) {
	e := m.pool.Get().(*engine)
	defer m.pool.Put(e)
	np := len(m.params)
	var sp []sensSpec
	if jac != nil {
		if cap(e.specBuf) < np {
			e.specBuf = make([]sensSpec, np)
		}
		sp = e.specBuf[:np]
	}
	pr := m.problem(p, d, sp)
	fail := func() {
		for i := range f {
			f[i] = math.NaN()
		}
		for i := range jac {
			jac[i] = math.NaN()
		}
	}
	if m.check(d) != nil {
		fail()
		return
	}
	e.fixL, e.rungs = m.fixLength, true
	if err := e.setup(&pr, sp); err != nil {
		fail()
		return
	}
	if err := e.run(); err != nil {
		fail()
		return
	}
	half := pr.Thickness
	if pr.Far == FarSymmetric {
		half /= 2
	}
	for i, x := range d.X {
		if pr.Far == FarSymmetric && pr.Thickness > 0 && x > half {
			x = pr.Thickness - x
		}
		var row []float64
		if jac != nil {
			row = jac[i*np : (i+1)*np]
		}
		if x > e.length {
			// Beyond a truncated domain the body has not changed.
			f[i] = pr.C0
			for j := range row {
				row[j] = 0
			}
			if row != nil {
				row[m.iC0] = 1
			}
			continue
		}
		k, w := stencil(e.x, x)
		f[i] = w[0]*e.c[k] + w[1]*e.c[k+1] + w[2]*e.c[k+2] + w[3]*e.c[k+3]
		for j := range row {
			s := e.s[j*e.n : (j+1)*e.n]
			row[j] = w[0]*s[k] + w[1]*s[k+1] + w[2]*s[k+2] + w[3]*s[k+3]
		}
	}
}

// Solve runs the model's forward problem for reported parameter values
// (D in m²/s, β in m/s, levels in the profile's unit), named as in Params,
// on the body and time of d: a convenience for predictions and plots.
func (m *Model) Solve(values map[string]float64, d *fit.Data) (*Solution, error) {
	p := make([]float64, len(m.params))
	for j, pa := range m.params {
		v, ok := values[pa.Name]
		if !ok {
			return nil, fmt.Errorf("%w: numeric model: no value for parameter %s", fit.ErrBadInput, pa.Name)
		}
		if pa.Log {
			if !(v > 0) {
				return nil, fmt.Errorf("%w: numeric model: %s = %g must be positive", fit.ErrBadInput, pa.Name, v)
			}
			v = math.Log(v)
		}
		p[j] = v
	}
	pr := m.problem(p, d, nil)
	e := m.pool.Get().(*engine)
	defer m.pool.Put(e)
	return e.solve(&pr, nil)
}
