package fit

import (
	"math"
	"sort"
)

// Couple is a diffusion couple: two semi-infinite bodies at uniform levels
// CL (x < xm) and CR (x > xm) joined at t = 0 at the interface xm, with D
// independent of concentration:
//
//	C(x) = (CL + CR)/2 + (CR − CL)/2·erf((x − xm)/(2√(Dt)))
//
// (Crank, The Mathematics of Diffusion, 2nd ed., 1975, ch. 2, §2.4,
// extended initial distributions; section number from memory). The depth
// axis is the position across the couple and may be negative. When D
// depends on concentration, use Boltzmann–Matano instead.
//
// Parameters: D (fitted as ln D), CL, CR, xm (m, free by default).
type Couple struct{}

func init() {
	Register(Info{Name: "couple", Title: "diffusion couple of two semi-infinite bodies", InAuto: true, Rank: 50, Couple: true,
		Applies: func(d *Data) (bool, string) {
			if interiorStep(d.X, d.Y) {
				return true, "couple tried: the values step between two plateaus inside the measured range."
			}
			return false, ""
		}}, func() Model { return Couple{} })
}

// Name implements Model.
func (Couple) Name() string { return "couple" }

// Params implements Model.
func (Couple) Params() []Param {
	return []Param{
		{Name: "D", Log: true, Unit: "m2/s", Free: true},
		{Name: "CL", Unit: "value", Free: true},
		{Name: "CR", Unit: "value", Free: true},
		{Name: "xm", Unit: "m", Free: true},
	}
}

// Eval implements Model, written as C = CL·erfc(v)/2 + CR·erfc(−v)/2 so
// that both tails keep full relative precision. With
// ∂C/∂v = (CR − CL)/√π·exp(−v²): ∂v/∂lnD = −v/2, ∂v/∂xm = −1/(2√(Dt)).
func (Couple) Eval(p []float64, d *Data, f, jac []float64) {
	inv := 1 / (2 * math.Sqrt(math.Exp(p[0])*d.Time))
	cl, cr, xm := p[1], p[2], p[3]
	k := (cr - cl) / math.SqrtPi
	for i, x := range d.X {
		v := (x - xm) * inv
		el, er := math.Erfc(v)/2, math.Erfc(-v)/2
		f[i] = cl*el + cr*er
		if jac != nil {
			gv := k * math.Exp(-v*v)
			row := jac[4*i : 4*i+4]
			row[0] = -gv * v / 2
			row[1] = el
			row[2] = er
			row[3] = -gv * inv
		}
	}
}

// Start implements Model: candidate interfaces (the position where the
// depth-ordered data cross the level half-way between the two ends, the
// origin when it lies inside the data, and eleven evenly spaced interior
// positions) times a scan of diffusion lengths, with CL and CR from linear
// least squares at each node (separable least squares, as in
// MassTransfer.Start).
func (Couple) Start(d *Data, p []float64) error {
	x, y := sortedByDepth(d)
	xmin, xmax := x[0], x[len(x)-1]
	span := xmax - xmin
	if !(span > 0) {
		return errNoStart("couple")
	}
	left, right := levels(y)
	cands := []float64{crossing(x, y, (left+right)/2)}
	if xmin < 0 && xmax > 0 {
		cands = append(cands, 0)
	}
	for k := 1; k <= 11; k++ {
		cands = append(cands, xmin+span*float64(k)/12)
	}
	g := make([]float64, len(d.X))
	best := math.Inf(1)
	for _, xm := range cands {
		if !finite(xm) {
			continue
		}
		s := scanLengths(d, span/200, 2*span, 40, g, func(l float64, g []float64) {
			for i, x := range d.X {
				g[i] = math.Erfc(-(x-xm)/l) / 2
			}
		}, nil)
		if s.ok && s.rss < best {
			best = s.rss
			p[0] = math.Log(s.l * s.l / (4 * d.Time))
			p[1], p[2], p[3] = s.a, s.a+s.b, xm
		}
	}
	if math.IsInf(best, 1) {
		return errNoStart("couple")
	}
	return nil
}

// Diagnose implements Diagnoser: both end levels must be reached within the
// data for CL, CR and D to be separated.
func (Couple) Diagnose(r *Result) {
	D, xm := r.Param("D"), r.Param("xm")
	if D == nil || xm == nil {
		return
	}
	l := 2 * math.Sqrt(D.Value*r.data.Time)
	xs := append([]float64(nil), r.data.X...)
	sort.Float64s(xs)
	// erfc(1.4) ≈ 0.048: within 5 % of the end level (common practice, no source).
	if (xm.Value-xs[0])/l < 1.4 {
		r.Warn("plateau-not-reached", "The left end level CL is not reached within the data (the first point is %.2f diffusion lengths 2√(Dt) from the interface): CL and D are poorly determined. Measure farther into the left-hand body.", (xm.Value-xs[0])/l)
	}
	if (xs[len(xs)-1]-xm.Value)/l < 1.4 {
		r.Warn("plateau-not-reached", "The right end level CR is not reached within the data (the last point is %.2f diffusion lengths 2√(Dt) from the interface): CR and D are poorly determined. Measure farther into the right-hand body.", (xs[len(xs)-1]-xm.Value)/l)
	}
}

// crossing returns the first position at which the position-ordered
// profile crosses level, by linear interpolation; NaN when it never does.
func crossing(x, y []float64, level float64) float64 {
	for i := 1; i < len(x); i++ {
		a, b := y[i-1]-level, y[i]-level
		if a == 0 {
			return x[i-1]
		}
		if (a < 0) != (b < 0) {
			t := a / (a - b)
			return x[i-1] + t*(x[i]-x[i-1])
		}
	}
	return math.NaN()
}
