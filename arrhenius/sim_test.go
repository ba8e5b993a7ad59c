package arrhenius

// Simulation helpers for the self-checks (parameter recovery and interval
// coverage). The "true" values below are arbitrary inputs of the
// simulation, not check values: labelled self-checks, no source.

import (
	"fmt"
	"math"
	"math/rand/v2"

	"github.com/fickfit/fickfit/profile"
)

// Arbitrary true values for self-checks (of the order of carbon in
// austenite, chosen so that the simulated profiles look realistic).
const (
	simD0 = 2.3e-5   // m²/s
	simQ  = 148000.0 // J/mol
)

var simTemps = []float64{1123.15, 1173.15, 1223.15, 1273.15, 1323.15}

func simLnD(T float64) float64 { return math.Log(simD0) - simQ/(R*T) }

// simPoints draws a campaign of ln D points: reps points per temperature,
// each with standard error se and an optional temperature error sT.
func simPoints(rng *rand.Rand, reps int, se, sT float64) []Point {
	var pts []Point
	for _, T := range simTemps {
		for r := 0; r < reps; r++ {
			Tact := T + sT*rng.NormFloat64() // the furnace's real temperature
			pts = append(pts, Point{
				ID: fmt.Sprintf("T%.0f-%d", T, r+1), T: T, SigmaT: sT,
				LnD: simLnD(Tact) + se*rng.NormFloat64(), VarLnD: se * se,
			})
		}
	}
	return pts
}

// simProfile draws one erf profile (Crank 1975, ch. 3 erf solution) of
// npts points from the surface to depth xmax with noise sd in the value.
func simProfile(rng *rand.Rand, id string, T, t, cs, c0, xmax float64, npts int, sd float64) profile.Profile {
	D := math.Exp(simLnD(T))
	p := profile.Profile{ID: id, Source: id + ".csv", Temperature: T, Time: t, ValueUnit: "wt%",
		Depth: make([]float64, npts), Value: make([]float64, npts), Line: make([]int, npts)}
	for i := 0; i < npts; i++ {
		x := xmax * float64(i) / float64(npts-1)
		p.Depth[i] = x
		p.Value[i] = cs + (c0-cs)*math.Erf(x/(2*math.Sqrt(D*t))) + sd*rng.NormFloat64()
		p.Line[i] = i + 2
	}
	return p
}

// simCampaign draws reps erf profiles at each simulated temperature.
func simCampaign(rng *rand.Rand, reps, npts int) []profile.Profile {
	var ps []profile.Profile
	for _, T := range simTemps {
		for r := 0; r < reps; r++ {
			ps = append(ps, simProfile(rng, fmt.Sprintf("T%.0f-%d", T, r+1), T, 4*3600, 1.0, 0.2, 3e-3, npts, 0.01))
		}
	}
	return ps
}

func newRand(a, b uint64) *rand.Rand { return rand.New(rand.NewPCG(a, b)) }
