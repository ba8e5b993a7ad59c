// Package longtable writes seeded long tables of synthetic diffusion
// profiles for benchmarks: one row per point, the rows of a profile
// together, as a lab's database export would hold them. The numbers are
// invented (constant-surface erf profiles with Gaussian noise); they time
// the program and are never check values.
package longtable

import (
	"bufio"
	"io"
	"math"
	"math/rand/v2"
	"strconv"
)

// Options describe the table.
type Options struct {
	// Profiles and Points are the number of profiles and of points each.
	Profiles, Points int
	// Seed seeds the generator: the same options give the same bytes.
	Seed uint64
	// Prefix starts every id ("S" when empty), so that tables written with
	// other prefixes can be read together.
	Prefix string
	// Campaign writes the table a campaign reads: a lot column (two lots),
	// four hold temperatures (880–970 °C) with D from an Arrhenius law per
	// lot, and one profile in 500 marked unknown (its temperature left
	// out, to be back-calculated). Otherwise every profile is at 925 °C
	// for 4 h with D log-uniform in 1e-12…1e-10 m²/s.
	Campaign bool
}

// Header is the header row of the plain table.
const Header = "specimen,temperature_C,time_h,depth_um,C_wt%"

// campaignHeader is the header row of the campaign table.
const campaignHeader = "specimen,lot,temperature_C,time_h,depth_um,C_wt%,unknown"

// Write writes the table to w, streaming: it holds one row at a time.
// Depths are evenly spaced over 0…3·2√(Dt) in µm (3 decimals), values
// Cs + (C0 − Cs)·erf(x/2√(Dt)) + 0.005·N(0,1) in wt% (4 decimals), Cs in
// 0.8–1.0, C0 in 0.1–0.3.
func Write(w io.Writer, o Options) error {
	bw := bufio.NewWriterSize(w, 1<<16)
	rng := rand.New(rand.NewPCG(o.Seed, 7))
	if o.Campaign {
		bw.WriteString(campaignHeader + "\n")
	} else {
		bw.WriteString(Header + "\n")
	}
	const hold = 4 * 3600.0
	temps := []float64{880, 910, 940, 970}
	row := make([]byte, 0, 96)
	for k := 0; k < o.Profiles; k++ {
		var D float64
		lot, tc, unknown := "", 925.0, false
		if o.Campaign {
			lot = "L1"
			// Invented demo lines: Q = 140 / 146 kJ/mol, D0 = 1.6e-5 / 3.1e-5 m²/s.
			q, d0 := 140e3, 1.6e-5
			if k%2 == 1 {
				lot, q, d0 = "L2", 146e3, 3.1e-5
			}
			tc = temps[(k/2)%len(temps)]
			D = d0 * math.Exp(-q/(8.314462618*(tc+273.15))) * math.Exp(0.05*rng.NormFloat64())
			unknown = k%500 == 499
		} else {
			D = math.Pow(10, -12+2*rng.Float64())
		}
		cs, c0 := 0.8+0.2*rng.Float64(), 0.1+0.2*rng.Float64()
		L := 2 * math.Sqrt(D*hold)
		prefix := o.Prefix
		if prefix == "" {
			prefix = "S"
		}
		id := prefix + strconv.Itoa(k)
		for i := 0; i < o.Points; i++ {
			x := 3 * L * float64(i) / float64(o.Points-1)
			row = append(row[:0], id...)
			row = append(row, ',')
			if o.Campaign {
				row = append(row, lot...)
				row = append(row, ',')
			}
			if !unknown {
				row = strconv.AppendFloat(row, tc, 'f', -1, 64)
			}
			row = append(row, ",4,"...)
			row = strconv.AppendFloat(row, x*1e6, 'f', 3, 64)
			row = append(row, ',')
			row = strconv.AppendFloat(row, cs+(c0-cs)*math.Erf(x/L)+0.005*rng.NormFloat64(), 'f', 4, 64)
			if o.Campaign {
				if unknown {
					row = append(row, ",temperature"...)
				} else {
					row = append(row, ',')
				}
			}
			row = append(row, '\n')
			if _, err := bw.Write(row); err != nil {
				return err
			}
		}
	}
	return bw.Flush()
}
