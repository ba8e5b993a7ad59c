package fit

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/fickfit/fickfit/profile"
)

// synthErf makes a seeded noisy constant-surface profile (self-check data,
// not a check value).
func synthErf(seed uint64, n int, xmax, D, t, cs, c0, noise float64) *profile.Profile {
	rng := rand.New(rand.NewPCG(seed, 1))
	p := &profile.Profile{ID: "synthetic", Time: t, Temperature: 1198.15, ValueUnit: "wt%"}
	for i := 0; i < n; i++ {
		x := xmax * float64(i) / float64(n-1)
		v := cs + (c0-cs)*math.Erf(x/(2*math.Sqrt(D*t))) + noise*rng.NormFloat64()
		p.Depth = append(p.Depth, x)
		p.Value = append(p.Value, v)
		p.Line = append(p.Line, i+2)
	}
	return p
}

// TestErfRecovery is a self-check by simulation (not an external check):
// parameters of seeded synthetic profiles are recovered across D from
// 1e-14 to 1e-9 m²/s with depths scaled from µm to mm.
func TestErfRecovery(t *testing.T) {
	for _, tc := range []struct {
		name      string
		D, t      float64
		cs, c0    float64
		inDiffuse bool
	}{
		{"carburize", 3e-11, 4 * 3600, 0.95, 0.20, true},
		{"decarb", 2e-11, 2 * 3600, 0.05, 0.80, false},
		{"slow", 1e-14, 10 * 3600, 1.2, 0.1, true},
		{"fast", 1e-9, 600, 0.9, 0.0, true},
		{"thin", 1e-13, 60, 5, 1, true},
	} {
		t.Run(tc.name, func(t *testing.T) {
			L := 2 * math.Sqrt(tc.D*tc.t)
			p := synthErf(7, 40, 3*L, tc.D, tc.t, tc.cs, tc.c0, 0.005*math.Abs(tc.cs-tc.c0))
			r, err := Fit(p, Options{CI: "wald"})
			if err != nil {
				t.Fatal(err)
			}
			D := r.Param("D")
			if rel := math.Abs(D.Value/tc.D - 1); rel > 0.05 {
				t.Errorf("D = %g, want %g (rel err %.3f)", D.Value, tc.D, rel)
			}
			if !(D.CI.Lo < D.Value && D.Value < D.CI.Hi) {
				t.Errorf("CI %v does not contain estimate %g", D.CI, D.Value)
			}
		})
	}
}
