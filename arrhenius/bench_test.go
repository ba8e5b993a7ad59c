package arrhenius

import (
	"math"
	"testing"
)

// Run with: go test ./arrhenius -run '^$' -bench . -benchmem

func BenchmarkTwoStage15(b *testing.B) {
	pts := simPoints(newRand(1, 2), 3, 0.05, 0)
	b.ReportAllocs()
	for b.Loop() {
		if _, err := TwoStage(pts, nil); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(b.Elapsed().Microseconds())/float64(b.N), "µs/line")
}

func BenchmarkTwoStage15TemperatureSigma(b *testing.B) {
	pts := simPoints(newRand(1, 2), 3, 0.05, 0)
	b.ReportAllocs()
	for b.Loop() {
		if _, err := TwoStage(pts, &Options{TemperatureSigma: 3}); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(b.Elapsed().Microseconds())/float64(b.N), "µs/line")
}

// BenchmarkGlobal15x50: 15 separate erf fits for the start, then the
// stacked fit of 750 points with 32 free parameters.
func BenchmarkGlobal15x50(b *testing.B) {
	ps := simCampaign(newRand(3, 4), 3, 50)
	b.ReportAllocs()
	for b.Loop() {
		if _, err := Global(ps, nil); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(b.Elapsed().Milliseconds())/float64(b.N), "ms/fit")
}

func BenchmarkFiellerBackcalc(b *testing.B) {
	cal := testCalibration(b)
	obs := Observation{LnDt: simLnD(1200) + math.Log(3600), VarLnDt: 0.01}
	o := &SolveOptions{Time: 3600}
	b.ReportAllocs()
	for b.Loop() {
		if _, err := SolveTemperature(obs, cal, o); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/1000, "µs/solve")
}

func BenchmarkMonteCarloBackcalc10k(b *testing.B) {
	cal := testCalibration(b)
	obs := Observation{LnDt: simLnD(1200) + math.Log(3600), VarLnDt: 0.01}
	o := &SolveOptions{Time: 3600, Method: "monte-carlo", Draws: 10000, Seed: 1}
	b.ReportAllocs()
	for b.Loop() {
		if _, err := SolveTemperature(obs, cal, o); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(b.Elapsed().Microseconds())/float64(b.N)/1000, "ms/solve")
}

func BenchmarkIntegralDFurnaceLog(b *testing.B) {
	h := furnaceLog()
	b.ReportAllocs()
	for b.Loop() {
		if _, err := IntegralD(h, 2.3e-5, 148e3); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/1000, "µs/integral")
}
