package serve

import (
	"bytes"
	"fmt"
	"math"
	"math/rand/v2"
	"testing"
	"time"
)

// longTable writes a long table of n invented profiles (erf profiles
// with seeded noise; two lots, four temperatures, 16 points each): the
// size of a large lab export, for benchmarks only.
func longTable(n int) []byte {
	rng := rand.New(rand.NewPCG(7, 11))
	var b bytes.Buffer
	b.WriteString("specimen,lot,temperature_C,time_h,depth_mm,C_wt%\n")
	temps := []float64{880, 910, 940, 970}
	for i := 0; i < n; i++ {
		lot := []string{"L1", "L2"}[i%2]
		tc := temps[(i/2)%4]
		th := 4.0
		T := tc + 273.15
		D := 2.5e-5 * math.Exp(-147e3/(8.314462618*T))
		for k := 0; k < 16; k++ {
			x := 0.05 + 0.1*float64(k)
			c := 0.2 + (0.95-0.2)*math.Erfc(x*1e-3/(2*math.Sqrt(D*th*3600))) + 0.004*rng.NormFloat64()
			fmt.Fprintf(&b, "S%05d,%s,%g,%g,%.3f,%.4f\n", i, lot, tc, th, x, c)
		}
	}
	return b.Bytes()
}

// waitFitted waits for the background fitting to finish.
func waitFitted(s *session) {
	for {
		if _, _, running := s.progress(); !running {
			return
		}
		time.Sleep(5 * time.Millisecond)
	}
}

// BenchmarkLoad2000 loads a 2,000-profile long table and fits every
// profile on all cores, as an upload does.
func BenchmarkLoad2000(b *testing.B) {
	data := longTable(2000)
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		s := newSession("bench")
		f := s.load("long.csv", "", data)
		if f.Error != "" || len(f.IDs) != 2000 {
			b.Fatalf("%s: %d profiles", f.Error, len(f.IDs))
		}
		s.kick()
		waitFitted(s)
		s.close()
	}
	b.ReportMetric(float64(b.Elapsed().Milliseconds())/float64(b.N), "ms/load+fit")
}

// BenchmarkRefit is the latency of a click on a point: the exclusion
// toggled and the profile fitted again (the default erf model with
// profile-likelihood intervals).
func BenchmarkRefit(b *testing.B) {
	s := newSession("bench")
	s.load("long.csv", "", longTable(4))
	e := s.entries[0]
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if err := s.toggle(e.p.ID, 3, false, ""); err != nil {
			b.Fatal(err)
		}
		s.fitNow(e)
		if e.err != nil {
			b.Fatal(e.err)
		}
	}
	b.ReportMetric(float64(b.Elapsed().Microseconds())/float64(b.N)/1000, "ms/refit")
}
