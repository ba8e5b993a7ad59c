// Package stats is fickfit's small statistics kit: the two-sided quantile
// of a confidence level, a bracketing root finder and the type-7 sample
// quantile. Each rule is written here once and called from fit, arrhenius
// and report, so that an interval is worked out the same way everywhere.
package stats

import (
	"math"
	"sort"
	"sync"

	"gonum.org/v1/gonum/stat/distuv"
)

// TwoSided returns the two-sided quantile k of a confidence level, the k
// with P(|X| ≤ k) = level: the standard normal quantile Φ⁻¹((1 + level)/2)
// when dof ≤ 0 or +Inf (a variance taken as known), the Student-t quantile
// with dof degrees of freedom otherwise (a variance estimated from dof
// residual degrees of freedom). dof need not be a whole number
// (Satterthwaite's effective degrees of freedom). Values for whole dof are
// cached: a batch of fits asks for the same few again and again.
func TwoSided(level, dof float64) float64 {
	if dof <= 0 || math.IsInf(dof, 1) {
		dof = 0
	}
	whole := dof == math.Trunc(dof) && dof < 1e6
	key := [2]float64{level, dof}
	if whole {
		if v, ok := cache.Load(key); ok {
			return v.(float64)
		}
	}
	p := 0.5 + level/2
	var q float64
	if dof == 0 {
		q = distuv.UnitNormal.Quantile(p)
	} else {
		q = distuv.StudentsT{Mu: 0, Sigma: 1, Nu: dof}.Quantile(p)
	}
	if whole {
		cache.Store(key, q)
	}
	return q
}

var cache sync.Map

// Z returns the two-sided standard normal quantile of level: 1.959964… for 0.95.
func Z(level float64) float64 { return TwoSided(level, 0) }

// T returns the two-sided Student-t quantile of level on dof degrees of
// freedom; dof ≤ 0 gives the normal quantile.
func T(level float64, dof int) float64 { return TwoSided(level, float64(dof)) }

// Quantile returns the p-quantile of sorted (ascending) data by linear
// interpolation between order statistics: Hyndman & Fan, Am. Stat. 50
// (1996) 361–365, definition 7 (the default of R; from memory). p outside
// [0, 1] gives the end values; empty data give NaN. An upper order
// statistic of +Inf (a draw that gave no finite answer) makes the quantile
// +Inf unless p falls exactly on the finite one below it: an open end, not
// an invented number.
func Quantile(sorted []float64, p float64) float64 {
	n := len(sorted)
	if n == 0 {
		return math.NaN()
	}
	h := p * float64(n-1)
	i := int(math.Floor(h))
	if i < 0 {
		return sorted[0]
	}
	if i >= n-1 {
		return sorted[n-1]
	}
	lo, hi := sorted[i], sorted[i+1]
	if math.IsInf(hi, 1) {
		if h == float64(i) {
			return lo
		}
		return math.Inf(1)
	}
	return lo + (h-float64(i))*(hi-lo)
}

// BootstrapQuantile is the p-quantile of sorted data at the plotting
// position p(n + 1) (Hyndman & Fan, Amer. Statist. 50 (1996) 361–365,
// definition 6), linearly interpolated: the bootstrap convention of taking
// the (B + 1)p-th of B ordered replicates (A. C. Davison & D. V. Hinkley,
// Bootstrap Methods and their Application, CUP 1997, §5.2; from memory).
// Quantile (definition 7) takes the (1 + (B − 1)p)-th instead, which for
// B = 119 and p = 0.025 is the 3.95th rather than the 3rd and gives a
// narrower band when B is small. Empty data give NaN.
func BootstrapQuantile(sorted []float64, p float64) float64 {
	n := len(sorted)
	if n == 0 {
		return math.NaN()
	}
	h := p*float64(n+1) - 1 // 0-based position
	switch {
	case h <= 0:
		return sorted[0]
	case h >= float64(n-1):
		return sorted[n-1]
	}
	lo := int(math.Floor(h))
	return sorted[lo] + (h-float64(lo))*(sorted[lo+1]-sorted[lo])
}

// QuantileOf sorts a copy of data and returns its type-7 p-quantile.
func QuantileOf(data []float64, p float64) float64 {
	s := append([]float64(nil), data...)
	sort.Float64s(s)
	return Quantile(s, p)
}
