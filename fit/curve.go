package fit

import (
	"math"

	"github.com/fickfit/fickfit/internal/stats"
)

// Curve evaluates the fitted model at depths x (m) and returns the
// pointwise confidence band of the mean curve at the result's level, by the
// delta method: Var f(x) = gᵀ Σ g with g = ∂f/∂θ over the free parameters
// and Σ their covariance, the band ± t·√Var (Seber & Wild, Nonlinear
// Regression, 1989, §5.1; from memory).
func (r *Result) Curve(x []float64) (y, lo, hi []float64, err error) {
	if r.model == nil {
		return nil, nil, nil, errNoCurve
	}
	np := len(r.pint)
	n := len(x)
	y = make([]float64, n)
	lo = make([]float64, n)
	hi = make([]float64, n)
	jac := make([]float64, n*np)
	d := *r.data
	d.X, d.Y, d.W = x, nil, nil
	r.model.Eval(r.pint, &d, y, jac)
	q := r.bandQuantile()
	var idx []int
	for j, f := range r.free {
		if f {
			idx = append(idx, j)
		}
	}
	for i := 0; i < n; i++ {
		row := jac[i*np : (i+1)*np]
		var v float64
		for a, ja := range idx {
			for b, jb := range idx {
				v += row[ja] * r.cov[a][b] * row[jb]
			}
		}
		h := q * math.Sqrt(math.Max(v, 0))
		lo[i], hi[i] = y[i]-h, y[i]+h
	}
	return y, lo, hi, nil
}

// bandQuantile is the two-sided quantile of the fit's intervals: normal
// when σ is taken as known, Student t on the residual dof otherwise.
func (r *Result) bandQuantile() float64 {
	if r.Covariance == CovAbsolute {
		return stats.Z(r.CILevel)
	}
	return stats.T(r.CILevel, r.Stats.DOF)
}
