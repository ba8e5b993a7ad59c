package numeric

import (
	"fmt"
	"math"

	"github.com/fickfit/fickfit/fit"
)

// Surface is the condition at the exposed surface x = 0.
type Surface int

const (
	// SurfaceFixed holds the surface at Cs from t = 0 (an atmosphere in
	// equilibrium with the surface).
	SurfaceFixed Surface = iota
	// SurfaceMassTransfer sets the flux into the body to β(Cp − C(0, t)):
	// −D ∂C/∂x = β(Cp − C) at x = 0 (Crank 1975, ch. 3, "surface
	// evaporation"; from memory). β (m/s) is taken as constant in time.
	SurfaceMassTransfer
	// SurfaceSealed lets nothing through (zero flux); useful with an
	// initial profile, e.g. a diffusion couple in a closed box.
	SurfaceSealed
)

// String is the surface condition's name: "fixed", "mass-transfer" or "sealed".
func (s Surface) String() string {
	switch s {
	case SurfaceFixed:
		return "fixed"
	case SurfaceMassTransfer:
		return "mass-transfer"
	case SurfaceSealed:
		return "sealed"
	}
	return fmt.Sprintf("Surface(%d)", int(s))
}

// Far is the condition at the far face x = Thickness of a finite body.
// It is ignored for a semi-infinite body (Thickness 0).
type Far int

const (
	// FarSealed: the far face lets nothing through (one face exposed).
	FarSealed Far = iota
	// FarSymmetric: both faces see the same surface condition; the solver
	// works on the half thickness with zero flux at the mid-plane.
	FarSymmetric
	// FarFixed: the far face is held at C0.
	FarFixed
)

// Problem describes one anneal of a one-dimensional body.
type Problem struct {
	// DC is the law D(C) at the reference temperature (m²/s). Required.
	DC Diffusivity
	// Schedule multiplies D over time, D(C, t) = D_C(C)·Factor(t);
	// nil means isothermal at the reference temperature (factor 1).
	Schedule Schedule
	// Time is the anneal time in s (> 0).
	Time float64
	// C0 is the initial uniform concentration (also the far-face level
	// for FarFixed).
	C0 float64
	// Initial, when not nil, gives the initial concentration at depth x (m)
	// instead of the uniform C0. Only for a finite body (Thickness > 0);
	// with FarSymmetric it must be symmetric about the mid-plane.
	Initial func(x float64) float64
	// Surface is the condition at x = 0; the zero value is SurfaceFixed.
	Surface Surface
	// Cs is the surface concentration for SurfaceFixed.
	Cs float64
	// Beta (m/s, > 0) and Cp (the concentration in equilibrium with the
	// atmosphere) define SurfaceMassTransfer.
	Beta, Cp float64
	// Thickness is the body's thickness in m; 0 means semi-infinite.
	Thickness float64
	// Far is the condition at x = Thickness; the zero value is FarSealed.
	Far Far
}

// Options tune the discretisation. The zero value gives the defaults
// listed with each field; they reproduce the constant-D error-function
// solution to better than 1e-4 of the concentration range.
type Options struct {
	// Nodes is the number of grid nodes, both ends included; 0 means 400.
	// At least 20.
	Nodes int
	// Steps is the number of time steps; 0 means 100. At least 8.
	Steps int
	// Stretch is s in the grid map x = L·sinh(s·ξ)/sinh(s): the spacing
	// grows by cosh(s) from the surface to the far end. 0 means 3; a
	// negative value gives a uniform grid; at most 8.
	Stretch float64
	// Grading is g in the time levels τₖ = τ_end·(k/M)^g, shorter steps at
	// the start where the profile is steep; 0 means 2; in [1, 4] (1 gives
	// uniform steps in τ).
	Grading float64
	// Startup is the number of fully implicit half steps that replace the
	// first Startup/2 Crank–Nicolson steps (Rannacher start-up). 0 means 8;
	// a negative value means none (pure Crank–Nicolson, which leaves
	// oscillations behind a jump at the surface). Must be even.
	Startup int
	// Depth sizes a semi-infinite domain as L = Depth·√(Dmax·τ), τ = ∫F dt
	// and Dmax the largest D over the concentration range; beyond L the
	// body keeps C0 (erfc(Depth/2) of the range, 1.5e-12 at the default).
	// A finite body is truncated the same way when it is thicker. 0 means
	// 10; at least 6.
	Depth float64
	// Tol stops Newton's iteration when max|δC| ≤ Tol·ΔC, ΔC the
	// concentration range of the problem; 0 means 1e-10; at most 1e-4.
	Tol float64
	// MaxNewton is the largest number of Newton iterations per step before
	// the step is split in two; 0 means 25.
	MaxNewton int
}

type options struct {
	nodes, steps, startup, maxNewton int
	stretch, grading, depth, tol     float64
}

func (o Options) resolve() (options, error) {
	r := options{nodes: o.Nodes, steps: o.Steps, startup: o.Startup, maxNewton: o.MaxNewton,
		stretch: o.Stretch, grading: o.Grading, depth: o.Depth, tol: o.Tol}
	bad := func(format string, args ...any) (options, error) {
		return options{}, fmt.Errorf("%w: numeric solver: "+format, append([]any{fit.ErrBadInput}, args...)...)
	}
	if r.nodes == 0 {
		r.nodes = 400
	}
	if r.nodes < 20 || r.nodes > 1<<20 {
		return bad("Nodes = %d; use between 20 and %d (0 gives 400)", o.Nodes, 1<<20)
	}
	if r.steps == 0 {
		r.steps = 100
	}
	if r.steps < 8 || r.steps > 1<<22 {
		return bad("Steps = %d; use between 8 and %d (0 gives 100)", o.Steps, 1<<22)
	}
	switch {
	case r.stretch == 0:
		r.stretch = 3
	case r.stretch < 0:
		r.stretch = 0
	case r.stretch > 8 || math.IsNaN(r.stretch):
		return bad("Stretch = %g; use at most 8 (0 gives 3, negative a uniform grid)", o.Stretch)
	}
	if r.grading == 0 {
		r.grading = 2
	}
	if !(r.grading >= 1 && r.grading <= 4) {
		return bad("Grading = %g; use a value in [1, 4] (0 gives 2)", o.Grading)
	}
	switch {
	case r.startup == 0:
		r.startup = 8
	case r.startup < 0:
		r.startup = 0
	case r.startup%2 != 0:
		return bad("Startup = %d implicit half steps; it must be even (0 gives 8)", o.Startup)
	}
	if r.startup/2 > r.steps {
		return bad("Startup = %d half steps exceed the %d steps", r.startup, r.steps)
	}
	if r.depth == 0 {
		r.depth = 10
	}
	if !(r.depth >= 6) || math.IsInf(r.depth, 0) {
		return bad("Depth = %g; the domain must reach at least 6√(Dt) (0 gives 10)", o.Depth)
	}
	if r.tol == 0 {
		r.tol = 1e-10
	}
	if !(r.tol > 0 && r.tol <= 1e-4) {
		return bad("Tol = %g; use a value in (0, 1e-4] (0 gives 1e-10)", o.Tol)
	}
	if r.maxNewton == 0 {
		r.maxNewton = 25
	}
	if r.maxNewton < 2 {
		return bad("MaxNewton = %d; use at least 2 (0 gives 25)", o.MaxNewton)
	}
	return r, nil
}

// Solution is the concentration profile at the end of the anneal, with the
// book-keeping of how it was obtained.
type Solution struct {
	// X holds the grid nodes (m), from the surface to Length.
	X []float64
	// C holds the concentrations at the nodes at Time.
	C []float64
	// Length is the computed domain: the body's (half) thickness, or the
	// truncation depth of a semi-infinite body.
	Length float64
	// Uptake is ∫J(0, t)dt, the amount per unit area that entered through
	// the surface (concentration unit × m; negative for out-diffusion).
	Uptake float64
	// FarUptake is the amount per unit area that entered through the far
	// face (FarFixed only).
	FarUptake float64
	// Gain is the change of content, Σ Vᵢ (Cᵢ(end) − Cᵢ(0)); it equals
	// Uptake + FarUptake to the Newton tolerance (conservation).
	Gain float64
	// EffectiveTime is τ = ∫₀ᵗ F dt′ in s (Time when isothermal).
	EffectiveTime float64
	// Steps is the number of time steps taken, splits included;
	// NewtonIterations the total number of Newton iterations.
	Steps, NewtonIterations int

	thickness float64 // physical thickness (0: semi-infinite)
	symmetric bool
	truncated bool
	beyond    float64 // value beyond a truncated domain
}

// At returns the concentration at depth x (m) by cubic interpolation
// between the nodes: the initial level beyond a truncated domain, the
// mirror image beyond the mid-plane of a symmetric body, and NaN outside
// the body.
func (s *Solution) At(x float64) float64 {
	if s.symmetric && x > s.thickness/2 {
		x = s.thickness - x
	}
	switch {
	case !(x >= 0), s.thickness > 0 && x > s.thickness*(1+1e-12):
		return math.NaN()
	case x > s.Length:
		if s.truncated {
			return s.beyond
		}
		return math.NaN()
	}
	j, w := stencil(s.X, x)
	return w[0]*s.C[j] + w[1]*s.C[j+1] + w[2]*s.C[j+2] + w[3]*s.C[j+3]
}

// Content returns Σ Vᵢ Cᵢ over the domain (concentration × m per unit area).
func (s *Solution) Content() float64 {
	var m float64
	n := len(s.X)
	for i := range s.X {
		lo, hi := s.X[max(i-1, 0)], s.X[min(i+1, n-1)]
		if i == 0 {
			lo = s.X[0]
		}
		if i == n-1 {
			hi = s.X[n-1]
		}
		vl := (s.X[i] - lo) / 2
		vr := (hi - s.X[i]) / 2
		m += (vl + vr) * s.C[i]
	}
	return m
}

// Solve integrates the problem to p.Time and returns the final profile.
func Solve(p Problem, o Options) (*Solution, error) {
	opt, err := o.resolve()
	if err != nil {
		return nil, err
	}
	e := newEngine(opt)
	return e.solve(&p, nil)
}
