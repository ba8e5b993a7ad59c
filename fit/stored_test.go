package fit

import (
	"encoding/json"
	"flag"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/fickfit/fickfit/profile"
)

var update = flag.Bool("update", false, "rewrite the stored cases and their intervals in testdata/fit")

const storedDir = "../testdata/fit"

// storedCase is a profile stored as a CSV file (seeded synthetic data
// written once; self-check data, not a check value) with the options it is
// fitted with.
type storedCase struct {
	name, file string
	o          Options
	make       func() *profile.Profile // writes the file with -update
	unit       string                  // depth column unit
	meta       string                  // metadata lines
}

func storedCases() []storedCase {
	slab := func() *profile.Profile { p, _ := slabLate(0.1, 2); return p }
	return []storedCase{
		{"slab-late C0 free", "slab_late.csv", Options{Model: "slab"}, slab, "um", "# time: 1 h\n# thickness: 2 mm\n"},
		{"slab-late C0 fixed", "slab_late.csv", Options{Model: "slab", Fixed: map[string]float64{"C0": 0.1}}, slab, "um", "# time: 1 h\n# thickness: 2 mm\n"},
		{"masstransfer at its limit", "masstransfer_fast.csv", Options{Model: "masstransfer"}, func() *profile.Profile { return nestedProfile(1) }, "mm", "# time: 4 h\n"},
		{"erf shallow", "erf_shallow.csv", Options{}, func() *profile.Profile { return shallowProfile(0.6) }, "um", "# time: 4 h\n"},
		{"couple in at%", "couple_atpct.csv", Options{Model: "couple"}, func() *profile.Profile {
			p := invCases()[4].p
			return transformed(p, 100, 0, 1)
		}, "um", "# time: 100 h\n"},
	}
}

// writeStored writes a profile as a per-profile CSV (depths in the given
// unit, values as read).
func writeStored(t *testing.T, path, unit, meta string, p *profile.Profile) {
	var b strings.Builder
	fmt.Fprintf(&b, "# id: %s\n%s# Seeded synthetic data for the stored-interval test (self-check data, not a check value).\n", strings.TrimSuffix(filepath.Base(path), ".csv"), meta)
	scale := map[string]float64{"um": 1e6, "mm": 1e3}[unit]
	col := "depth"
	for _, x := range p.Depth {
		if x < 0 {
			col = "position" // across a couple's interface
		}
	}
	fmt.Fprintf(&b, "%s_%s,value\n", col, unit)
	for i := range p.Depth {
		fmt.Fprintf(&b, "%.10g,%.10g\n", p.Depth[i]*scale, p.Value[i])
	}
	if err := os.WriteFile(path, []byte(b.String()), 0o644); err != nil {
		t.Fatal(err)
	}
}

// storedResult is what the golden file keeps of a fit.
type storedResult struct {
	Params   []storedParam `json:"params"`
	Warnings []string      `json:"warnings"`
}

type storedParam struct {
	Name  string   `json:"name"`
	Value *float64 `json:"value"`
	Lo    *float64 `json:"lo"`
	Hi    *float64 `json:"hi"`
}

func keep(r *Result) storedResult {
	var s storedResult
	for _, e := range r.Params {
		s.Params = append(s.Params, storedParam{e.Name, num(e.Value), num(e.CI.Lo), num(e.CI.Hi)})
	}
	for _, w := range r.Warnings {
		s.Warnings = append(s.Warnings, w.Code)
	}
	return s
}

// TestStoredIntervals: intervals are identical between runs (bit for bit,
// two fits in one process) and between builds (against the values stored
// in testdata/fit/intervals.golden.json, to 1e-9 relative: the last digits
// that a fused multiply–add on another architecture can touch; open ends
// must stay open, warnings must match). The stored cases are the ones that
// used to move: a slab late in the uptake with C0 free (an upper bound of
// D was reported where the series broke down numerically), the same with
// C0 fixed, masstransfer at its limit β → ∞, a shallow erf profile, and a
// couple in at% (regression self-check; the values are our own).
// Regenerate with `go test ./fit -run StoredIntervals -update` only after
// a deliberate change, and say why in the commit.
func TestStoredIntervals(t *testing.T) {
	golden := filepath.Join(storedDir, "intervals.golden.json")
	got := map[string]storedResult{}
	for _, sc := range storedCases() {
		path := filepath.Join(storedDir, sc.file)
		if *update {
			if err := os.MkdirAll(storedDir, 0o755); err != nil {
				t.Fatal(err)
			}
			writeStored(t, path, sc.unit, sc.meta, sc.make())
		}
		ps, err := profile.Read(path)
		if err != nil {
			t.Fatal(err)
		}
		a, err := Fit(&ps[0], sc.o)
		if err != nil {
			t.Fatalf("%s: %v", sc.name, err)
		}
		b, err := Fit(&ps[0], sc.o)
		if err != nil {
			t.Fatal(err)
		}
		for i := range a.Params {
			x, y := a.Params[i], b.Params[i]
			for _, pair := range [][2]float64{{x.Value, y.Value}, {x.CI.Lo, y.CI.Lo}, {x.CI.Hi, y.CI.Hi}} {
				if math.Float64bits(pair[0]) != math.Float64bits(pair[1]) {
					t.Errorf("%s: %s differs between two runs: %v, %v", sc.name, x.Name, x, y)
				}
			}
		}
		got[sc.name] = keep(a)
	}
	if *update {
		out, err := json.MarshalIndent(got, "", "  ")
		if err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(golden, append(out, '\n'), 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	raw, err := os.ReadFile(golden)
	if err != nil {
		t.Fatal(err)
	}
	var want map[string]storedResult
	if err := json.Unmarshal(raw, &want); err != nil {
		t.Fatal(err)
	}
	for name, g := range got {
		w, ok := want[name]
		if !ok {
			t.Errorf("%s: not in %s", name, golden)
			continue
		}
		if strings.Join(g.Warnings, " ") != strings.Join(w.Warnings, " ") {
			t.Errorf("%s: warnings %v, stored %v", name, g.Warnings, w.Warnings)
		}
		for i, gp := range g.Params {
			wp := w.Params[i]
			for k, pair := range [][2]*float64{{gp.Value, wp.Value}, {gp.Lo, wp.Lo}, {gp.Hi, wp.Hi}} {
				what := []string{"value", "lower end", "upper end"}[k]
				switch {
				case (pair[0] == nil) != (pair[1] == nil):
					t.Errorf("%s: %s %s is %v, stored %v (open in one, a number in the other)", name, gp.Name, what, val(pair[0]), val(pair[1]))
				case pair[0] != nil && !(math.Abs(*pair[0]-*pair[1]) <= 1e-9*math.Abs(*pair[1])):
					t.Errorf("%s: %s %s %.15g, stored %.15g", name, gp.Name, what, *pair[0], *pair[1])
				}
			}
		}
	}
}
