package fit

import (
	"math"

	"github.com/fickfit/fickfit/profile"
)

// Diagnoser is implemented by models that have checks of their own beyond
// the generic ones (the semi-infinite models check penetration depth).
type Diagnoser interface {
	Diagnose(r *Result)
}

// diagnose adds plain-language warnings where the data cannot support the
// answer. Thresholds are common practice, no source.
func (r *Result) diagnose() {
	if r.Time == 0 {
		what := "the value reported as D is the product Dt in m²"
		if r.Param("beta") != nil {
			what = "the values reported as D and beta are the products Dt (m²) and βt (m)"
		}
		r.Warn("time-missing", "No hold time was given, so D cannot be separated from time: %s. Give the time (--time 4h or a '# time: 4 h' line) to get D.", what)
	}
	if _, ok := profile.HardnessScale(r.ValueUnit); ok {
		r.Warn("hardness-proxy", "%s", HardnessProxyNote)
	}
	if e := r.Param("D"); e != nil && !e.Fixed && e.StdErrLn > 0.5 {
		r.Warn("d-uncertain", "D is poorly determined: its relative standard uncertainty is %.0f %% (over 50 %%). More points across the diffusion zone, or fixing a level with --fix, would help.", 100*e.StdErrLn)
	}
	if p := r.Stats.RunsP; p < 0.01 {
		r.Warn("residual-pattern", "The residuals are systematically patterned (runs test p = %.2g < 0.01): the %s model does not describe the shape of this profile. Consider another model (--model auto).", p, r.Model)
	}
	if r.Stats.Cond > 1e8 {
		r.Warn("ill-conditioned", "The parameters are strongly entangled (condition number %.2g): their individual values are unreliable even if the curve fits.", r.Stats.Cond)
	}
	if in, ok := Lookup(r.Model); ok && in.SemiInfinite {
		r.penetrationChecks()
	}
	if d, ok := r.model.(Diagnoser); ok {
		d.Diagnose(r)
	}
}

// penetrationChecks compares the diffusion length 2√(Dt) with the depths
// measured and the specimen thickness.
func (r *Result) penetrationChecks() {
	e := r.Param("D")
	if e == nil {
		return
	}
	dt := e.Value * r.data.Time
	pen := 2 * math.Sqrt(dt)
	x0 := 0.0
	if p := r.Param("x0"); p != nil {
		x0 = p.Value
	}
	xmax, xmin := math.Inf(-1), math.Inf(1)
	for _, x := range r.data.X {
		xmax = math.Max(xmax, x-x0)
		if x-x0 > 0 {
			xmin = math.Min(xmin, x-x0)
		}
	}
	if r.Model == "erf" && r.Param("C0") != nil && !r.Param("C0").Fixed && xmax/pen < 1.4 {
		// erfc(1.4) ≈ 0.048: the deepest point is still more than 5 % of the
		// way from the base level.
		r.Warn("plateau-not-reached", "The base level C0 is never reached within the data (the deepest point is at %.2f diffusion lengths 2√(Dt)); C0 and D are poorly determined. Measure deeper, or fix C0 at the known base composition with --fix C0=….", xmax/pen)
	}
	if pen > 3*xmax {
		r.Warn("penetration-beyond-data", "The fitted diffusion length 2√(Dt) = %s is %.1f times the deepest point: the data cover only the start of the profile and D is extrapolated.", fmtLength(pen), pen/xmax)
	}
	if pen < xmin {
		r.Warn("penetration-below-first-step", "The fitted diffusion length 2√(Dt) = %s is shallower than the first measured depth (%s): the profile is not resolved. Use finer steps near the surface.", fmtLength(pen), fmtLength(xmin))
	}
	if r.Thickness > 0 && r.Thickness < 2*pen {
		r.Warn("thin-section", "The specimen is %s thick, less than about 4√(Dt) = %s: the semi-infinite assumption of the %s model is broken. Use --model slab.", fmtLength(r.Thickness), fmtLength(2*pen), r.Model)
	}
}

// fmtLength writes a length in µm or mm for messages.
func fmtLength(m float64) string {
	if m < 1e-3 {
		return sprintf("%.3g µm", m*1e6)
	}
	return sprintf("%.3g mm", m*1e3)
}
