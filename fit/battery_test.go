package fit

import (
	"bufio"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"sort"
	"strconv"
	"strings"
	"testing"

	"github.com/fickfit/fickfit/profile"
)

// batteryCase is one profile of the random battery with its options.
type batteryCase struct {
	id, model, scale string
	freeX0           bool
	faces            int
	p                *profile.Profile
}

// readBattery reads testdata/reference/battery_inputs.csv (synthetic inputs
// written by gen_battery_inputs.py; not check values).
func readBattery(t *testing.T) []batteryCase {
	t.Helper()
	f, err := os.Open(filepath.Join(refDir, "battery_inputs.csv"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	var out []batteryCase
	idx := map[string]int{}
	sc := bufio.NewScanner(f)
	header := false
	line := 0
	for sc.Scan() {
		line++
		s := sc.Text()
		if strings.HasPrefix(s, "#") || s == "" {
			continue
		}
		if !header {
			header = true
			continue
		}
		c := strings.Split(s, ",")
		if len(c) != 9 {
			t.Fatalf("battery_inputs.csv:%d: %d fields", line, len(c))
		}
		num := func(i int) float64 {
			v, err := strconv.ParseFloat(c[i], 64)
			if err != nil {
				t.Fatalf("battery_inputs.csv:%d: %v", line, err)
			}
			return v
		}
		k, ok := idx[c[0]]
		if !ok {
			unit := map[string]string{"fraction": "fraction", "percent": "at%", "ppm": "ppm", "HV": "HV"}[c[3]]
			faces, _ := strconv.Atoi(c[6])
			out = append(out, batteryCase{id: c[0], model: c[1], scale: c[3], freeX0: c[2] == "1", faces: faces,
				p: &profile.Profile{ID: c[0], Source: "battery_inputs.csv", Time: num(4), Thickness: num(5), ValueUnit: unit}})
			k = len(out) - 1
			idx[c[0]] = k
		}
		out[k].p.Depth = append(out[k].p.Depth, num(7))
		out[k].p.Value = append(out[k].p.Value, num(8))
		out[k].p.Line = append(out[k].p.Line, line)
	}
	if err := sc.Err(); err != nil {
		t.Fatal(err)
	}
	return out
}

// TestRandomBattery: 600 seeded random profiles (100 each of erf, erf with
// x0 free, masstransfer, thinfilm, couple and slab, values as fraction, %,
// ppm or a hardness-like a·y + b) fitted as a user would, against the
// optima computed independently by scipy 1.10.1 (numpy 1.24.2, Python
// 3.11.2; Debian python3-scipy): least_squares, MINPACK LM with analytic
// Jacobians, 16 starts from a separable-least-squares grid, the least RSS
// kept — testdata/reference/scipy_battery.py → scipy_battery.json.
//
// The bars: no fit may come back as an answer whose RSS exceeds
// the reference optimum by more than 1e-6 relative unless it says so (a
// multiple-optima warning); at least 99 % must match the reference D to
// 1e-6 relative (a fit that gives no answer counts as a miss). The share is
// taken over the profiles where scipy's point is an interior optimum (the
// script classifies it: an identified point, levels within ten data ranges);
// on the others (13 of 600: masstransfer with β → 0, Cp → ±10⁶ %, a slab
// with C0 → −4e11) MINPACK stopped on a valley that runs off to a limit of
// the model, and "no answer" is the honest outcome there. A fit below the
// reference optimum by more than 1e-6 would mean the reference missed the
// optimum, which fails the test too.
func TestRandomBattery(t *testing.T) {
	cases := readBattery(t)
	var ref struct {
		Versions map[string]string `json:"versions"`
		Fits     map[string]struct {
			Model string    `json:"model"`
			D     float64   `json:"D"`
			RSS   float64   `json:"rss"`
			P     []float64 `json:"params"`
			Kind  string    `json:"kind"`
		} `json:"fits"`
	}
	readJSON(t, "battery_scipy.json", &ref)
	if ref.Versions["scipy"] != "1.10.1" {
		t.Fatalf("reference from scipy %q, want 1.10.1", ref.Versions["scipy"])
	}
	if len(cases) < 500 || len(ref.Fits) != len(cases) {
		t.Fatalf("%d profiles, %d reference fits", len(cases), len(ref.Fits))
	}
	type tally struct{ n, interior, match, matchInterior, noAnswer, worse, warned int }
	byModel := map[string]*tally{}
	var all tally
	for _, bc := range cases {
		rf, ok := ref.Fits[bc.id]
		if !ok {
			t.Fatalf("%s: no reference fit", bc.id)
		}
		key := bc.model
		if bc.freeX0 {
			key += "-x0"
		}
		if byModel[key] == nil {
			byModel[key] = &tally{}
		}
		tl := byModel[key]
		tl.n++
		all.n++
		interior := rf.Kind == "interior"
		if interior {
			tl.interior++
			all.interior++
		}
		o := Options{Model: bc.model, CI: "wald", Faces: bc.faces}
		if bc.freeX0 {
			o.Free = []string{"x0"}
		}
		r, err := Fit(bc.p, o)
		if err != nil {
			tl.noAnswer++
			all.noAnswer++
			t.Logf("%s (%s, scipy %s): no answer (scipy D = %.6g, RSS %.6g): %v", bc.id, bc.scale, rf.Kind, rf.D, rf.RSS, err)
			continue
		}
		D := r.Param("D").Value
		rel := math.Abs(D/rf.D - 1)
		if rel <= 1e-6 {
			tl.match++
			all.match++
			if interior {
				tl.matchInterior++
				all.matchInterior++
			}
		}
		excess := r.Stats.RSS/rf.RSS - 1
		switch {
		case excess > 1e-6 && !hasWarning(r, "multiple-optima", ""):
			tl.worse++
			all.worse++
			t.Errorf("%s (%s): reported without a warning at RSS %.10g, %.3g above scipy's optimum %.10g (D = %.6g, scipy %.6g)", bc.id, bc.scale, r.Stats.RSS, excess, rf.RSS, D, rf.D)
		case excess > 1e-6:
			tl.warned++
			all.warned++
			t.Logf("%s (%s): RSS %.3g above scipy's, with a multiple-optima warning", bc.id, bc.scale, excess)
		case excess < -1e-6:
			t.Errorf("%s (%s): RSS %.10g below scipy's %.10g by %.3g: the reference missed the optimum (D = %.6g, scipy %.6g)", bc.id, bc.scale, r.Stats.RSS, rf.RSS, -excess, D, rf.D)
		case rel > 1e-6:
			t.Logf("%s (%s): same RSS (%.2g relative) but D = %.10g, scipy %.10g (rel %.2g)", bc.id, bc.scale, excess, D, rf.D, rel)
		}
	}
	keys := make([]string, 0, len(byModel))
	for k := range byModel {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	for _, k := range keys {
		tl := byModel[k]
		t.Logf("%-13s %3d profiles (%3d interior optima): %3d match D to 1e-6 (%3d of the interior), %d no answer, %d worse than scipy silently, %d worse with a warning",
			k, tl.n, tl.interior, tl.match, tl.matchInterior, tl.noAnswer, tl.worse, tl.warned)
	}
	t.Logf("all: %d of %d match D to 1e-6 (%.1f %%); of the %d interior optima %d (%.1f %%)", all.match, all.n, 100*float64(all.match)/float64(all.n),
		all.interior, all.matchInterior, 100*float64(all.matchInterior)/float64(all.interior))
	if float64(all.matchInterior) < 0.99*float64(all.interior) {
		t.Errorf("only %d of %d fits match scipy's D to 1e-6 where scipy found an interior optimum (%s); need 99 %%", all.matchInterior, all.interior, fmt.Sprintf("%.1f %%", 100*float64(all.matchInterior)/float64(all.interior)))
	}
	if all.n-all.interior > all.n/20 {
		t.Errorf("%d of %d reference points run off to a limit of the model: the battery tests too little", all.n-all.interior, all.n)
	}
}
