package matano

import (
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"github.com/fickfit/fickfit/fit/numeric"
	"github.com/fickfit/fickfit/profile"
)

// invariantCouple is a couple with exponential D(C) (×10 across the range)
// from the Crank–Nicolson solver, 60 points with 0.5 % scatter, values as
// fractions from 0.02 to 0.30 and depths in m with the interface at 0.
func invariantCouple(t *testing.T, seed uint64) *profile.Profile {
	t.Helper()
	const tm = 50 * 3600.0
	law := numeric.Exp{D: 1e-14, K: math.Log(10)}
	sol, L := boxCouple(t, law, tm)
	half := 6 * math.Sqrt(law.Max(0, 1)*tm)
	rng := rand.New(rand.NewPCG(seed, 5))
	p := &profile.Profile{ID: "inv", Time: tm}
	for i := 0; i < 60; i++ {
		x := L/2 - half + 2*half*float64(i)/59
		p.Depth = append(p.Depth, x-L/2)
		p.Value = append(p.Value, 0.02+0.28*(sol.At(x)+0.005*rng.NormFloat64()))
	}
	return p
}

// transformed returns p with depths x·ds + dx (a length unit read as if it
// were metres, and another origin) and values y·vs + vo.
func transformed(p *profile.Profile, ds, dx, vs, vo float64) *profile.Profile {
	q := *p
	q.Depth, q.Value = make([]float64, len(p.Depth)), make([]float64, len(p.Value))
	for i := range p.Depth {
		q.Depth[i] = p.Depth[i]*ds + dx
		q.Value[i] = p.Value[i]*vs + vo
	}
	return &q
}

func relDiff(a, b float64) float64 {
	if a == b {
		return 0
	}
	return math.Abs(a-b) / math.Max(math.Abs(a), math.Abs(b))
}

// TestUnitInvariance: the same couple written in other units must give the
// same D(C), band and Matano plane after unit scaling, to 1e-6 (issue 11;
// common practice, no source). Values in fraction, at% (×100) and ppm
// (×1e6, with an offset); depths as metres, as millimetre and micrometre
// numbers read as metres (D scales with length², the plane with length),
// with the origin moved, and mirrored. D is invariant to the value unit;
// it scales as the square of the length unit. (The smoother works on
// unit-free data rounded to 2⁻⁴⁰ of the range, so the agreement is to
// rounding, ~1e-15, band included.)
func TestUnitInvariance(t *testing.T) {
	for _, seed := range []uint64{1} {
		p := invariantCouple(t, seed)
		opt := Options{Resamples: 100, Seed: seed}
		base, err := Analyze(p, 0, opt)
		if err != nil {
			t.Fatal(err)
		}
		cases := []struct {
			name           string
			ds, dx, vs, vo float64
		}{
			{"at%", 1, 0, 100, 0},
			{"ppm with offset", 1, 0, 1e6, -3e4},
			{"mm numbers", 1e3, 0, 1, 0},
			{"µm numbers, other origin, at%", 1e6, 250, 100, 0},
			{"falling (mirrored), at%", -1, 0, 100, 0},
		}
		for _, c := range cases {
			q := transformed(p, c.ds, c.dx, c.vs, c.vo)
			o := opt
			o.Concentrations = make([]float64, len(base.Points))
			for i, pt := range base.Points {
				o.Concentrations[i] = pt.C*c.vs + c.vo
			}
			r, err := Analyze(q, 0, o)
			if err != nil {
				t.Fatalf("%s: %v", c.name, err)
			}
			name := fmt.Sprintf("seed %d, %s", seed, c.name)
			if r.Smooth.Terms() != base.Smooth.Terms() {
				t.Errorf("%s: %d terms, %d in fractions and metres", name, r.Smooth.Terms(), base.Smooth.Terms())
			}
			d2 := c.ds * c.ds
			worst := 0.0
			for i, pt := range r.Points {
				b := base.Points[i]
				for _, pair := range [][2]float64{{pt.D / d2, b.D}, {pt.CI.Lo / d2, b.CI.Lo}, {pt.CI.Hi / d2, b.CI.Hi}} {
					worst = math.Max(worst, relDiff(pair[0], pair[1]))
				}
			}
			if worst > 1e-6 {
				t.Errorf("%s: D(C) or its band differ by %.2g relative", name, worst)
			}
			span := p.Depth[len(p.Depth)-1] - p.Depth[0]
			if dev := math.Abs((*r.MatanoPlane-c.dx)/c.ds - *base.MatanoPlane); dev > 1e-6*span {
				t.Errorf("%s: Matano plane %.9g m, %.9g m in fractions and metres (%.2g of the span)", name, (*r.MatanoPlane-c.dx)/c.ds, *base.MatanoPlane, dev/span)
			}
			t.Logf("%s: %d terms, worst relative difference of D and band %.1e", name, r.Smooth.Terms(), worst)
		}
	}
}

// TestUnitInvarianceFromFiles: the same couple read from two files, one in
// µm and at%, one in mm and fractions (the readers convert to metres),
// gives the same D(C) and Matano plane to 1e-6 (common practice, no
// source).
func TestUnitInvarianceFromFiles(t *testing.T) {
	p := invariantCouple(t, 3)
	var um, mm strings.Builder
	um.WriteString("# id: inv\n# time: 50 h\nposition_um,Ni_at%\n")
	mm.WriteString("# id: inv\n# time: 50 h\nposition_mm,Ni_fraction\n")
	for i := range p.Depth {
		fmt.Fprintf(&um, "%.10g,%.10g\n", p.Depth[i]*1e6, p.Value[i]*100)
		fmt.Fprintf(&mm, "%.10g,%.10g\n", p.Depth[i]*1e3, p.Value[i])
	}
	read := func(s, name string) *profile.Profile {
		ps, err := profile.ReadCSV(strings.NewReader(s), name)
		if err != nil || len(ps) != 1 {
			t.Fatalf("%s: %v", name, err)
		}
		return &ps[0]
	}
	a, b := read(um.String(), "um.csv"), read(mm.String(), "mm.csv")
	ra, err := Analyze(a, 0, Options{Resamples: 100, Seed: 3})
	if err != nil {
		t.Fatal(err)
	}
	cs := make([]float64, len(ra.Points))
	for i, pt := range ra.Points {
		cs[i] = pt.C / 100
	}
	rb, err := Analyze(b, 0, Options{Resamples: 100, Seed: 3, Concentrations: cs})
	if err != nil {
		t.Fatal(err)
	}
	for i := range ra.Points {
		x, y := ra.Points[i], rb.Points[i]
		if d := math.Max(relDiff(x.D, y.D), math.Max(relDiff(x.CI.Lo, y.CI.Lo), relDiff(x.CI.Hi, y.CI.Hi))); d > 1e-6 {
			t.Errorf("C = %g at%%: D %v %v, %v %v (%.2g)", x.C, x.D, x.CI, y.D, y.CI, d)
		}
	}
	span := a.Depth[len(a.Depth)-1] - a.Depth[0]
	if d := math.Abs(*ra.MatanoPlane - *rb.MatanoPlane); d > 1e-6*span {
		t.Errorf("Matano plane %.9g m from µm, %.9g m from mm", *ra.MatanoPlane, *rb.MatanoPlane)
	}
}
