package fit

import "math"

// ThinFilm is an instantaneous plane source of M per unit area deposited
// on the surface of a semi-infinite body at t = 0, the surface reflecting
// (no flux through it), on a uniform background C0:
//
//	C(x) = C0 + M/√(πDt)·exp(−x²/(4Dt))
//
// (Crank, The Mathematics of Diffusion, 2nd ed., 1975, ch. 2: the plane
// source in an infinite medium, §2.2, doubled by reflection at the
// boundary x = 0, §2.3; section numbers from memory). The amount in excess
// of C0 is conserved, ∫₀^∞ (C − C0) dx = M, so M carries the unit of the
// value times metres (e.g. wt%·m).
//
// Parameters: D (fitted as ln D), M (fitted as ln M, "value*m"), C0.
type ThinFilm struct{}

func init() {
	Register(Info{Name: "thinfilm", Title: "thin-film source (Gaussian)", SemiInfinite: true, InAuto: true, Rank: 30},
		func() Model { return ThinFilm{} })
}

// Name implements Model.
func (ThinFilm) Name() string { return "thinfilm" }

// Params implements Model.
func (ThinFilm) Params() []Param {
	return []Param{
		{Name: "D", Log: true, Unit: "m2/s", Free: true},
		{Name: "M", Log: true, Unit: "value*m", Free: true},
		{Name: "C0", Unit: "value", Free: true},
	}
}

// Eval implements Model. With G = M/√(πDt)·exp(−q), q = x²/(4Dt):
// ∂C/∂lnM = G, ∂C/∂lnD = G·(q − 1/2), ∂C/∂C0 = 1.
func (ThinFilm) Eval(p []float64, d *Data, f, jac []float64) {
	dt := math.Exp(p[0]) * d.Time
	amp := math.Exp(p[1]) / math.Sqrt(math.Pi*dt)
	inv4 := 1 / (4 * dt)
	c0 := p[2]
	for i, x := range d.X {
		q := x * x * inv4
		g := amp * math.Exp(-q)
		f[i] = c0 + g
		if jac != nil {
			row := jac[3*i : 3*i+3]
			row[0] = g * (q - 0.5)
			row[1] = g
			row[2] = 1
		}
	}
}

// Start implements Model: a scan of diffusion lengths 2√(Dt) with the
// background C0 and the amount M > 0 from linear least squares at each
// length (separable least squares, as in MassTransfer.Start). A profile
// that does not fall from a surface peak has no positive M and gives an
// error.
func (ThinFilm) Start(d *Data, p []float64) error {
	g := make([]float64, len(d.X))
	s := scanLengths(d, depthScale(d)/100, 10*depthScale(d), 64, g, func(l float64, g []float64) {
		amp := 2 / (math.SqrtPi * l) // 1/√(πDt) with l = 2√(Dt)
		for i, x := range d.X {
			u := x / l
			g[i] = amp * math.Exp(-u*u)
		}
	}, func(a, b float64) bool { return b > 0 })
	if !s.ok {
		return errNoStart("thinfilm")
	}
	p[0] = math.Log(s.l * s.l / (4 * d.Time))
	p[1] = math.Log(s.b)
	p[2] = s.a
	return nil
}
