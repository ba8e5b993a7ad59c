package fit

import (
	"math"
	"sort"
)

// Erf is the constant-surface solution for a semi-infinite body whose
// surface is held at Cs from t = 0 and whose initial uniform level is C0:
//
//	C(x) = Cs + (C0 − Cs)·erf(u),  u = (x − x0) / (2√(Dt))
//
// (Crank, The Mathematics of Diffusion, 2nd ed., 1975, ch. 3, the
// error-function solution for a constant surface concentration; section
// numbers from memory.) It covers in-diffusion (Cs > C0, carburizing,
// nitriding) and out-diffusion (Cs < C0, decarburization) alike. x0 is a
// surface offset (material removed before the first measurement, or a
// depth-zero error) and is fixed at 0 unless freed.
//
// Parameters: D (fitted as ln D), Cs, C0, x0.
type Erf struct{}

func init() {
	Register(Info{Name: "erf", Title: "constant surface concentration (erf solution)", SemiInfinite: true, InAuto: true, Rank: 10},
		func() Model { return Erf{} })
}

// Name implements Model.
func (Erf) Name() string { return "erf" }

// erfParams is shared by every call of Params: callers only read it.
var erfParams = []Param{
	{Name: "D", Log: true, Unit: "m2/s", Free: true},
	{Name: "Cs", Unit: "value", Free: true},
	{Name: "C0", Unit: "value", Free: true},
	{Name: "x0", Unit: "m", Free: false},
}

// Params implements Model. The slice is shared: do not modify it.
func (Erf) Params() []Param { return erfParams }

// erfHalf is the u at which erf(u) = 1/2 (Abramowitz & Stegun, Handbook of
// Mathematical Functions, 1964, Table 7.1: 0.476936; value from memory).
const erfHalf = 0.4769362762044699

// Start implements Model: Cs from the shallowest points, C0 from the deepest,
// and √(Dt) from the depth where the profile is half-way between them.
func (Erf) Start(d *Data, p []float64) error {
	x, y := sortedByDepth(d)
	cs, c0 := levels(y)
	p[1], p[2], p[3] = cs, c0, 0
	xh := halfDepth(x, y, cs, c0)
	sdt := xh / (2 * erfHalf)
	p[0] = math.Log(sdt * sdt / d.Time)
	return nil
}

// Eval implements Model.
func (Erf) Eval(p []float64, d *Data, f, jac []float64) {
	sqDt := math.Sqrt(math.Exp(p[0]) * d.Time)
	inv := 1 / (2 * sqDt)
	cs, c0, x0 := p[1], p[2], p[3]
	dc := c0 - cs
	for i, x := range d.X {
		u := (x - x0) * inv
		e := math.Erf(u)
		f[i] = cs + dc*e
		if jac != nil {
			g := dc * (2 / math.SqrtPi) * math.Exp(-u*u) // ∂f/∂u
			row := jac[4*i : 4*i+4]
			row[0] = -0.5 * u * g // ∂u/∂lnD = −u/2
			row[1] = 1 - e
			row[2] = e
			row[3] = -g * inv
		}
	}
}

// sortedByDepth returns the data ordered by depth: the data themselves when
// they already are (the usual case), sorted copies otherwise.
func sortedByDepth(d *Data) (x, y []float64) {
	if sort.Float64sAreSorted(d.X) {
		return d.X, d.Y
	}
	idx := make([]int, len(d.X))
	for i := range idx {
		idx[i] = i
	}
	sort.SliceStable(idx, func(a, b int) bool { return d.X[idx[a]] < d.X[idx[b]] })
	x = make([]float64, len(idx))
	y = make([]float64, len(idx))
	for k, i := range idx {
		x[k], y[k] = d.X[i], d.Y[i]
	}
	return x, y
}

// levels estimates the surface and deep levels from depth-ordered values:
// the mean of the shallowest and of the deepest sixth of the points (at
// least one, at most five each). Common practice, no source.
func levels(y []float64) (surface, deep float64) {
	m := len(y) / 6
	if m < 1 {
		m = 1
	}
	if m > 5 {
		m = 5
	}
	for i := 0; i < m; i++ {
		surface += y[i]
		deep += y[len(y)-1-i]
	}
	return surface / float64(m), deep / float64(m)
}

// halfDepth returns the first depth at which the depth-ordered profile
// crosses the mid level between cs and c0, by linear interpolation. When it
// never crosses (the plateau is not reached), it returns the deepest depth;
// a degenerate profile gives a quarter of the depth range.
func halfDepth(x, y []float64, cs, c0 float64) float64 {
	mid := (cs + c0) / 2
	xmax := x[len(x)-1]
	if xmax <= 0 {
		xmax = 1e-6
	}
	sign := 1.0
	if c0 < cs {
		sign = -1
	}
	for i := 1; i < len(x); i++ {
		a, b := sign*(y[i-1]-mid), sign*(y[i]-mid)
		if a < 0 && b >= 0 {
			t := a / (a - b)
			xh := x[i-1] + t*(x[i]-x[i-1])
			if xh > 0 {
				return xh
			}
			break
		}
	}
	if cs == c0 {
		return xmax / 4
	}
	return xmax
}
