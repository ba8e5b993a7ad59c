package report

import (
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/fickfit/fickfit/profile"
)

// Test fixtures: invented profiles drawn from the erf solution with a
// seeded generator. They exercise the writers; they are not check values.

const gasR = 8.314462618 // J/(mol K), CODATA 2018

type synth struct {
	id, lot   string
	tempC     float64 // °C
	hours     float64
	d0, q     float64 // invented Arrhenius line for D
	cs, c0    float64
	noise     float64
	xmax      float64 // m
	n         int
	unknown   string // value of the "unknown" metadata key, if any
	hideTemp  bool   // leave the temperature out (unknown part)
	hideTime  bool
	sigmaCol  bool
	dOverride float64
}

func (s synth) profile(rng *rand.Rand) profile.Profile {
	if s.n == 0 {
		s.n = 24
	}
	if s.xmax == 0 {
		s.xmax = 2e-3
	}
	if s.d0 == 0 {
		s.d0, s.q = 2.1e-5, 142e3
	}
	if s.noise == 0 {
		s.noise = 0.008
	}
	T := s.tempC + 273.15
	D := s.d0 * math.Exp(-s.q/(gasR*T))
	if s.dOverride > 0 {
		D = s.dOverride
	}
	t := s.hours * 3600
	p := profile.Profile{ID: s.id, Source: "synthetic/" + s.id + ".csv", Lot: s.lot, Quantity: "C",
		Temperature: T, Time: t, ValueName: "C_wt%", ValueUnit: "wt%",
		Meta: map[string]string{"id": s.id, "lot": s.lot}}
	if s.lot == "" {
		delete(p.Meta, "lot")
	}
	if s.unknown != "" {
		p.Meta["unknown"] = s.unknown
	}
	if s.hideTemp {
		p.Temperature = 0
	}
	if s.hideTime {
		p.Time = 0
	}
	x0 := s.xmax / float64(s.n) * 0.5
	for i := 0; i < s.n; i++ {
		x := x0 + s.xmax*float64(i)/float64(s.n)
		v := s.cs + (s.c0-s.cs)*math.Erf(x/(2*math.Sqrt(D*t))) + s.noise*rng.NormFloat64()
		p.Depth = append(p.Depth, x)
		p.Value = append(p.Value, v)
		p.Line = append(p.Line, 9+i)
		if s.sigmaCol {
			p.Sigma = append(p.Sigma, s.noise)
		}
	}
	return p
}

// campaignProfiles returns an invented two-lot campaign of 3 temperatures ×
// reps per lot, plus one part with an unknown temperature.
func campaignProfiles(seed uint64, reps int) []profile.Profile {
	rng := rand.New(rand.NewPCG(seed, 7))
	var ps []profile.Profile
	lots := []struct {
		name  string
		d0, q float64
	}{{"L1", 2.1e-5, 142e3}, {"L2", 3.4e-5, 145.5e3}}
	temps := []float64{880, 910, 940, 970}
	hours := []float64{5, 4, 3, 2.5}
	for _, l := range lots {
		for i, tc := range temps {
			for r := 1; r <= reps; r++ {
				s := synth{id: fmt.Sprintf("%s-%d-%d", l.name, int(tc), r), lot: l.name, tempC: tc + rng.NormFloat64(),
					hours: hours[i], d0: l.d0, q: l.q, cs: 0.95, c0: 0.2}
				p := s.profile(rng)
				p.Temperature = math.Round((tc+273.15)*100) / 100 // the nominal temperature is what the file says
				ps = append(ps, p)
			}
		}
	}
	u := synth{id: "part-1", lot: "L1", tempC: 926, hours: 6, cs: 0.95, c0: 0.2, unknown: "temperature", hideTemp: true}
	ps = append(ps, u.profile(rng))
	return ps
}

// writeCampaignFiles writes an invented campaign as input files in dir:
// lot L1 as one CSV per profile with metadata lines, lot L2 as one long
// table, and the unknown part as its own file. It returns the paths.
func writeCampaignFiles(t testing.TB, dir string, seed uint64, reps int) []string {
	t.Helper()
	ps := campaignProfiles(seed, reps)
	var paths []string
	var long strings.Builder
	long.WriteString("specimen,lot,temperature_K,time_s,depth_um,C_wt%\n")
	for _, p := range ps {
		if p.Lot == "L2" {
			for i := range p.Depth {
				fmt.Fprintf(&long, "%s,%s,%.2f,%g,%.3f,%.4f\n", p.ID, p.Lot, p.Temperature, p.Time, p.Depth[i]*1e6, p.Value[i])
			}
			continue
		}
		var b strings.Builder
		fmt.Fprintf(&b, "# id: %s\n# lot: %s\n# quantity: C\n", p.ID, p.Lot)
		if p.Temperature > 0 {
			fmt.Fprintf(&b, "# temperature: %.2f K\n", p.Temperature)
		}
		if p.Time > 0 {
			fmt.Fprintf(&b, "# time: %g s\n", p.Time)
		}
		if u := p.Meta["unknown"]; u != "" {
			fmt.Fprintf(&b, "# unknown: %s\n", u)
		}
		b.WriteString("depth_mm,C_wt%\n")
		for i := range p.Depth {
			fmt.Fprintf(&b, "%.4f,%.4f\n", p.Depth[i]*1e3, p.Value[i])
		}
		path := filepath.Join(dir, p.ID+".csv")
		if err := os.WriteFile(path, []byte(b.String()), 0o644); err != nil {
			t.Fatal(err)
		}
		paths = append(paths, path)
	}
	lp := filepath.Join(dir, "long-L2.csv")
	if err := os.WriteFile(lp, []byte(long.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	return append(paths, lp)
}
