package numeric

import (
	"math"
	"testing"

	"github.com/fickfit/fickfit/fit"
)

// carburizing is a typical gas-carburizing hold: 925 °C for 4 h, carbon
// from 0.2 to 1.0 wt%, D = 1.5e-11 m²/s at 0.2 wt% rising ×3 over the range
// (order of magnitude for carbon in austenite; value from memory, used only
// to size the benchmark).
var carburizing = Problem{
	DC:   Exp{D: 1.5e-11, K: math.Log(3) / 0.8, Cref: 0.2},
	Time: 4 * 3600, C0: 0.2, Cs: 1.0,
}

// BenchmarkForwardCarburizing: one forward solve on the default grid (400
// nodes, 100 graded steps). Target ≤ 5 ms.
func BenchmarkForwardCarburizing(b *testing.B) {
	b.ReportAllocs()
	var s *Solution
	for b.Loop() {
		var err error
		if s, err = Solve(carburizing, Options{}); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(b.Elapsed().Microseconds())/1000/float64(b.N), "ms/solve")
	b.ReportMetric(float64(s.NewtonIterations)/float64(s.Steps), "newton/step")
}

// BenchmarkEvalJacobian: one model evaluation with the sensitivity
// Jacobian (four parameters) at 50 depths, workspace reused.
func BenchmarkEvalJacobian(b *testing.B) {
	m := mustModel(b, Config{DC: "exp"})
	d := &fit.Data{Time: 4 * 3600}
	for i := 0; i < 50; i++ {
		d.X = append(d.X, 2e-3*float64(i)/49)
	}
	d.Y = make([]float64, 50)
	p := []float64{math.Log(1.5e-11), math.Log(3) / 0.8, 1.0, 0.2}
	f, jac := make([]float64, 50), make([]float64, 200)
	b.ReportAllocs()
	for b.Loop() {
		m.Eval(p, d, f, jac)
	}
	b.ReportMetric(float64(b.Elapsed().Microseconds())/1000/float64(b.N), "ms/eval")
}

// BenchmarkFitExp50: a full least-squares fit (fit.Solve with the model)
// of a 50-point profile with the exponential D(C): four free parameters,
// starting from Model.Start. Target ≤ 250 ms.
func BenchmarkFitExp50(b *testing.B) {
	truth := exactExp(b, 1.5e-11, math.Log(3)/0.8, 1.0, 0.2, 4*3600)
	p := synth(42, 50, 2e-3, 4*3600, 0.008, truth.At)
	d := &fit.Data{X: p.Depth, Y: p.Value, Time: p.Time}
	m := mustModel(b, Config{DC: "exp"})
	pr := fit.Problem{Y: d.Y, Func: func(q, f, jac []float64) { m.Eval(q, d, f, jac) }}
	p0 := make([]float64, 4)
	var sol *fit.Solution
	b.ReportAllocs()
	for b.Loop() {
		if err := m.Start(d, p0); err != nil {
			b.Fatal(err)
		}
		var err error
		if sol, err = fit.Solve(pr, p0, nil); err != nil {
			b.Fatal(err)
		}
		if !sol.Converged {
			b.Fatalf("no convergence: %s", sol.Reason)
		}
	}
	b.ReportMetric(float64(b.Elapsed().Microseconds())/1000/float64(b.N), "ms/fit")
	b.ReportMetric(float64(sol.Iterations), "jacobians/fit")
}
