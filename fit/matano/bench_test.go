package matano

import (
	"math"
	"testing"
)

// BenchmarkAnalyze: a 60-point couple, smoother chosen among 1–3 terms,
// 19 levels, 1000 bootstrap replicates (the defaults).
func BenchmarkAnalyze(b *testing.B) {
	const D, tm = 4e-14, 100 * 3600.0
	w := 2 * math.Sqrt(D*tm)
	p := couple(1, 60, -4*w, 4*w, tm, 0.1, func(x float64) float64 { return erfCouple(x, D, tm, 2, 30, 0) })
	b.ReportAllocs()
	for b.Loop() {
		if _, err := Analyze(p, 0, Options{}); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(b.Elapsed().Milliseconds())/float64(b.N), "ms/analysis")
}
