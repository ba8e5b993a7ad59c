package fit

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"runtime"
	"testing"

	"github.com/fickfit/fickfit/internal/longtable"
	"github.com/fickfit/fickfit/internal/measure"
	"github.com/fickfit/fickfit/profile"
)

// source hands the profiles of ps to FitEach one by one, as profile.Each
// hands those of files.
func source(ps []profile.Profile) func(yield func(*profile.Profile) error) error {
	return func(yield func(*profile.Profile) error) error {
		for k := range ps {
			if err := yield(&ps[k]); err != nil {
				return err
			}
		}
		return nil
	}
}

// batchProfiles makes n seeded synthetic constant-surface profiles of
// points points each (invented numbers for timing and self-checks, not check
// values): D log-uniform in 1e-12…1e-10 m²/s, t = 4 h, Cs in 0.8–1.0,
// C0 in 0.1–0.3, depths evenly over 0…3·2√(Dt), noise 0.005.
func batchProfiles(n, points int, seed uint64) []profile.Profile {
	rng := rand.New(rand.NewPCG(seed, 7))
	ps := make([]profile.Profile, n)
	const t = 4 * 3600
	for k := range ps {
		D := math.Pow(10, -12+2*rng.Float64())
		cs, c0 := 0.8+0.2*rng.Float64(), 0.1+0.2*rng.Float64()
		L := 2 * math.Sqrt(D*t)
		p := profile.Profile{ID: fmt.Sprintf("B%05d", k), Time: t, Temperature: 1198.15, ValueUnit: "wt%",
			Depth: make([]float64, points), Value: make([]float64, points)}
		for i := 0; i < points; i++ {
			x := 3 * L * float64(i) / float64(points-1)
			p.Depth[i] = x
			p.Value[i] = cs + (c0-cs)*math.Erf(x/L) + 0.005*rng.NormFloat64()
		}
		ps[k] = p
	}
	return ps
}

// BenchmarkFitAll10k fits 10,000 seeded 50-point erf profiles with Wald
// intervals through FitAll (all cores). The target is under 2 s per batch
// on 2 cores; reported as s/batch and µs/fit.
func BenchmarkFitAll10k(b *testing.B) {
	ps := batchProfiles(10000, 50, 1)
	o := Options{CI: "wald"}
	b.ReportAllocs()
	failed := 0
	for b.Loop() {
		_, errs := FitAll(ps, o, nil)
		failed = 0
		for _, err := range errs {
			if err != nil {
				failed++
			}
		}
	}
	if failed > 0 {
		b.Errorf("%d of %d fits failed", failed, len(ps))
	}
	perBatch := b.Elapsed().Seconds() / float64(b.N)
	b.ReportMetric(perBatch, "s/batch")
	b.ReportMetric(perBatch/float64(len(ps))*1e6, "µs/fit")
}

// BenchmarkFitEach10k fits the profiles of BenchmarkFitAll10k through
// FitEach, each result handed to a done that only reads it (a summary
// row): with results kept, and with their storage lent to later fits
// (Reuse). Reported: µs/fit, and allocations per fit.
func BenchmarkFitEach10k(b *testing.B) {
	ps := batchProfiles(10000, 50, 1)
	o := Options{CI: "wald"}
	for _, reuse := range []bool{false, true} {
		b.Run(fmt.Sprintf("reuse=%v", reuse), func(b *testing.B) {
			b.ReportAllocs()
			failed := 0
			sum := 0.0
			for b.Loop() {
				failed = 0
				err := FitEach(source(ps), o, &BatchOptions{Reuse: reuse}, func(p *profile.Profile, r *Result, err error) error {
					if err != nil {
						failed++
						return nil
					}
					sum += r.Params[0].Value + r.Stats.RunsP
					return nil
				})
				if err != nil {
					b.Fatal(err)
				}
			}
			if failed > 0 {
				b.Errorf("%d of %d fits failed", failed, len(ps))
			}
			b.ReportMetric(b.Elapsed().Seconds()/float64(b.N)/float64(len(ps))*1e6, "µs/fit")
		})
	}
}

// BenchmarkFitLongTable20k fits the profiles of the throughput
// comparison's table (internal/longtable: 20,000 × 50 points, read once)
// with Wald intervals as fickfit fit --format csv does: FitEach, results
// reused, a done that only reads each result. Reported: µs per fit (wall,
// all cores) and CPU µs per fit.
func BenchmarkFitLongTable20k(b *testing.B) {
	var buf bytes.Buffer
	if err := longtable.Write(&buf, longtable.Options{Profiles: 20000, Points: 50, Seed: 5}); err != nil {
		b.Fatal(err)
	}
	ps, err := profile.ReadCSV(&buf, "long.csv")
	if err != nil {
		b.Fatal(err)
	}
	o := Options{CI: CIWald}
	b.ReportAllocs()
	cpu0 := measure.CPU()
	failed := 0
	for b.Loop() {
		failed = 0
		err := FitEach(source(ps), o, &BatchOptions{Reuse: true}, func(p *profile.Profile, r *Result, err error) error {
			if err != nil {
				failed++
			}
			return nil
		})
		if err != nil {
			b.Fatal(err)
		}
	}
	if failed > 0 {
		b.Errorf("%d of %d fits failed", failed, len(ps))
	}
	b.ReportMetric(b.Elapsed().Seconds()/float64(b.N)/float64(len(ps))*1e6, "µs/fit")
	if cpu := measure.CPU(); cpu > 0 {
		b.ReportMetric((cpu-cpu0).Seconds()/float64(b.N)/float64(len(ps))*1e6, "cpu-µs/fit")
	}
}

// TestFitAllOrderAndDeterminism: FitAll returns the results in input order,
// each identical (to the last bit, through the JSON the command line
// writes) to a one-at-a-time Fit of the same profile, and identical between
// two parallel runs, whatever the scheduling (common practice, no source).
func TestFitAllOrderAndDeterminism(t *testing.T) {
	ps := batchProfiles(600, 50, 3)
	o := Options{CI: "wald"}
	run1, errs1 := FitAll(ps, o, nil)
	run2, errs2 := FitAll(ps, o, nil)
	for i := range ps {
		if errs1[i] != nil || errs2[i] != nil {
			t.Fatalf("profile %d: %v / %v", i, errs1[i], errs2[i])
		}
		if run1[i].ID != ps[i].ID || run2[i].ID != ps[i].ID {
			t.Fatalf("result %d is %s / %s, want %s", i, run1[i].ID, run2[i].ID, ps[i].ID)
		}
		one, err := Fit(&ps[i], o)
		if err != nil {
			t.Fatal(err)
		}
		a, b, c := batchJSON(t, run1[i]), batchJSON(t, run2[i]), batchJSON(t, one)
		if !bytes.Equal(a, b) || !bytes.Equal(a, c) {
			t.Fatalf("profile %s: results differ between runs or from a single fit:\n%s\n%s\n%s", ps[i].ID, a, b, c)
		}
	}
}

func batchJSON(t *testing.T, r *Result) []byte {
	t.Helper()
	b, err := json.Marshal(r)
	if err != nil {
		t.Fatal(err)
	}
	return b
}

// writeLongTable writes a long table of profiles × points rows to path
// (internal/longtable: seeded erf profiles as in batchProfiles, depths in
// µm), streaming, so the writer itself holds next to nothing.
func writeLongTable(path string, profiles, points int) error {
	f, err := os.Create(path)
	if err != nil {
		return err
	}
	if err := longtable.Write(f, longtable.Options{Profiles: profiles, Points: points, Seed: 5}); err != nil {
		f.Close()
		return err
	}
	return f.Close()
}

// BenchmarkReadFit1M reads a long table of 20,000 profiles × 50 points
// (10⁶ points, about 30 MB of text) with profile.Read and fits every
// profile with Wald intervals. The memory target is under 300 MB for 10⁶
// points: reported as the largest heap seen (peak-heap-MB, sampled every
// ms) and the memory obtained from the OS (sys-MB, an upper bound on what
// the Go runtime holds). For the resident set of the whole process run the
// test binary under /usr/bin/time -v with -test.bench BenchmarkReadFit1M.
func BenchmarkReadFit1M(b *testing.B) {
	const profiles, points = 20000, 50
	path := filepath.Join(b.TempDir(), "long1M.csv")
	if err := writeLongTable(path, profiles, points); err != nil {
		b.Fatal(err)
	}
	runtime.GC()
	sampler := measure.StartPeakHeap()
	o := Options{CI: "wald"}
	failed := 0
	for b.Loop() {
		ps, err := profile.Read(path)
		if err != nil {
			b.Fatal(err)
		}
		if len(ps) != profiles {
			b.Fatalf("%d profiles, want %d", len(ps), profiles)
		}
		_, errs := FitAll(ps, o, nil)
		failed = 0
		for _, err := range errs {
			if err != nil {
				failed++
			}
		}
	}
	peak := sampler.Stop()
	if failed > 0 {
		b.Errorf("%d of %d fits failed", failed, profiles)
	}
	var ms runtime.MemStats
	runtime.ReadMemStats(&ms)
	b.ReportMetric(b.Elapsed().Seconds()/float64(b.N), "s/1M-points")
	b.ReportMetric(float64(peak)/(1<<20), "peak-heap-MB")
	b.ReportMetric(float64(ms.Sys)/(1<<20), "sys-MB")
}

// TestFitEachMatchesFitAll: FitEach hands every profile on in input order
// with the result (to the last bit, through JSON) and the error FitAll
// gives it, including failures, also when results lend their storage to
// later fits (Reuse) (self-check).
func TestFitEachMatchesFitAll(t *testing.T) {
	ps := batchProfiles(300, 50, 4)
	ps[7].Value = make([]float64, 50) // all equal: bad input
	ps[8].Depth, ps[8].Value = ps[8].Depth[:3], ps[8].Value[:3]
	for k := 20; k < 40; k++ { // other lengths and weights: storage of other sizes
		ps[k].Depth, ps[k].Value = ps[k].Depth[:k], ps[k].Value[:k]
		ps[k].Sigma = make([]float64, len(ps[k].Depth))
		for i := range ps[k].Sigma {
			ps[k].Sigma[i] = 0.004 + 0.0001*float64(i)
		}
	}
	for _, o := range []Options{{CI: "wald"}, {CI: "wald", Free: []string{"x0"}}, {}} {
		want, werrs := FitAll(ps, o, nil)
		for _, reuse := range []bool{false, true} {
			i, calls := 0, 0
			err := FitEach(source(ps), o, &BatchOptions{Reuse: reuse, Progress: func(done, total int) { calls++ }}, func(p *profile.Profile, r *Result, err error) error {
				if p != &ps[i] {
					t.Fatalf("profile %d handed on as %s", i, p.ID)
				}
				if fmt.Sprint(err) != fmt.Sprint(werrs[i]) {
					t.Fatalf("profile %d: error %v, FitAll %v", i, err, werrs[i])
				}
				if err == nil && !bytes.Equal(batchJSON(t, r), batchJSON(t, want[i])) {
					t.Fatalf("reuse %v, profile %d: result differs from FitAll's", reuse, i)
				}
				i++
				return nil
			})
			if err != nil || i != len(ps) || calls != len(ps) {
				t.Fatalf("%d of %d profiles done, %d progress calls, error %v", i, len(ps), calls, err)
			}
		}
	}
}
