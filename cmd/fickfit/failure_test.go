package main

import (
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// failureCSV writes a per-profile CSV (depth in mm, C in wt%) into dir and
// returns its path. The data are constructed shapes, not measurements.
func failureCSV(t *testing.T, dir, name string, depthMM []float64, value func(i int, xmm float64) float64) string {
	t.Helper()
	var b strings.Builder
	fmt.Fprintf(&b, "# id: %s\n# time: 4 h\ndepth_mm,C_wt%%\n", strings.TrimSuffix(name, ".csv"))
	for i, x := range depthMM {
		fmt.Fprintf(&b, "%g,%.4f\n", x, value(i, x))
	}
	path := filepath.Join(dir, name)
	if err := os.WriteFile(path, []byte(b.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

// evenMM returns n depths spread evenly over (0, xmax] mm.
func evenMM(n int, xmax float64) []float64 {
	x := make([]float64, n)
	for i := range x {
		x[i] = math.Round(xmax*float64(i+1)/float64(n)*1e4) / 1e4
	}
	return x
}

// TestFailuresExplained runs inputs for which no trustworthy answer exists
// through the command line (common practice, no source; docs/output.md, "Exit status"): each
// must exit 1, write no output file, leave the input unchanged and say in
// one message which file, why (naming the parameter by the name --fix
// takes, or the feature of the data at fault) and what to do (fix a
// parameter, add or move points, another model).
func TestFailuresExplained(t *testing.T) {
	in := t.TempDir()
	rng := rand.New(rand.NewPCG(2, 3))
	flat := make([]float64, 14)
	for i := range flat {
		flat[i] = 0.5 + 0.01*rng.NormFloat64()
	}
	step := func(_ int, x float64) float64 {
		if x < 0.75 {
			return 0.9
		}
		return 0.2
	}
	alternate := func(hi, lo float64) func(int, float64) float64 {
		return func(i int, _ float64) float64 {
			if i%2 == 0 {
				return hi
			}
			return lo
		}
	}
	for _, tc := range []struct {
		name   string
		path   string
		flags  []string
		reason []string
	}{
		// Straight line: the plateau is never reached, D and C0 run off together.
		{"straight line", failureCSV(t, in, "line.csv", evenMM(12, 1.2), func(_ int, x float64) float64 { return 0.9 - 0.5*x }),
			nil, []string{"did not converge", "iteration limit (200)"}},
		// A step with x0 freed: √(Dt) → 0 between two points.
		{"step, x0 free", failureCSV(t, in, "step.csv", evenMM(14, 1.4), step),
			[]string{"--free", "x0"}, []string{"D has no effect"}},
		// Every point at one depth: the Jacobian has rank one.
		{"one depth", failureCSV(t, in, "onedepth.csv", []float64{0.1, 0.1, 0.1, 0.1, 0.1, 0.1, 0.1, 0.1}, alternate(0.8, 0.7)),
			nil, []string{"distinct depth"}},
		// Two depths cannot determine three parameters.
		{"two depths", failureCSV(t, in, "twodepths.csv", []float64{0.1, 0.1, 0.1, 0.1, 0.5, 0.5, 0.5, 0.5},
			func(i int, _ float64) float64 { return []float64{0.8, 0.81, 0.79, 0.8, 0.5, 0.51, 0.49, 0.5}[i] }),
			nil, []string{"distinct depth"}},
		// (A hump is no erf either, but the fit's failure path finds a
		// certified optimum with D open on both sides and says so: see
		// fit.TestHumpNoConfidentAnswer.)
		// Scatter about one level with x0 freed: nothing locates x0.
		{"x0 free on a flat profile", failureCSV(t, in, "flat.csv", evenMM(14, 1.4), func(i int, _ float64) float64 { return flat[i] }),
			[]string{"--free", "x0"}, []string{"x0"}},
		// The finite-slab model on a straight line: the data cannot tell a
		// larger D from a lower C0. The reason must name both.
		{"slab on a straight line", failureCSV(t, in, "slabline.csv", evenMM(12, 1.2), func(_ int, x float64) float64 { return 0.9 - 0.5*x }),
			[]string{"--model", "slab", "--thickness", "3mm"}, []string{"D and C0"}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			before := hashFile(t, tc.path)
			outDir := t.TempDir()
			outPath := filepath.Join(outDir, "out.json")
			args := append([]string{"fit", tc.path}, tc.flags...)
			args = append(args, "--format", "json", "-o", outPath)
			code, _, stderr := runCLI(t, args...)
			if code != exitNoAnswer {
				t.Errorf("exit %d, want %d; stderr: %s", code, exitNoAnswer, stderr)
			}
			if base := filepath.Base(tc.path); !strings.Contains(stderr, base) {
				t.Errorf("message does not name the file %s: %s", base, stderr)
			}
			for _, w := range tc.reason {
				if !strings.Contains(stderr, w) {
					t.Errorf("message lacks the reason %q: %s", w, stderr)
				}
			}
			suggests := false
			for _, w := range []string{"--fix", "add", "measure", "another model", "--model"} {
				suggests = suggests || strings.Contains(stderr, w)
			}
			if !suggests {
				t.Errorf("message suggests nothing to do: %s", stderr)
			}
			if entries, _ := os.ReadDir(outDir); len(entries) != 0 {
				t.Errorf("files written for a failed fit: %v", entries)
			}
			if hashFile(t, tc.path) != before {
				t.Errorf("input %s was modified", tc.path)
			}
		})
	}
}
