package stats

import (
	"math"
	"sort"
)

// Holm adjusts p-values of m tests for multiplicity by Holm's step-down
// method (S. Holm, "A simple sequentially rejective multiple test
// procedure", Scand. J. Statist. 6 (1979) 65–70): with the p-values sorted
// ascending, p₍ᵢ₎ becomes max over j ≤ i of min(1, (m − j + 1)·p₍ⱼ₎), and
// each adjusted value returns to its input position. Rejecting the tests
// whose adjusted p is below α keeps the family-wise error rate at α for
// any dependence between the tests. The result is what R's
// p.adjust(p, method = "holm") gives. A NaN p-value is left NaN and not
// counted in m.
func Holm(p []float64) []float64 {
	out := make([]float64, len(p))
	var idx []int
	for i, v := range p {
		out[i] = math.NaN()
		if !math.IsNaN(v) {
			idx = append(idx, i)
		}
	}
	sort.SliceStable(idx, func(a, b int) bool { return p[idx[a]] < p[idx[b]] })
	m := len(idx)
	run := 0.0
	for k, i := range idx {
		v := math.Min(1, float64(m-k)*p[i])
		run = math.Max(run, v)
		out[i] = run
	}
	return out
}
