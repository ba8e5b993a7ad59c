package main

import (
	"bufio"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// oddTruth is one row of testdata/odd/truth.tsv: the parameters a profile
// of the odd catalogue was generated with (testdata/odd/generate.go).
type oddTruth struct {
	file, id string
	param    string // "D" (m²/s, the file gives a time) or "Dt" (m², no time)
	value    float64
	cs, c0   float64
}

func readOddTruth(t *testing.T) []oddTruth {
	t.Helper()
	f, err := os.Open("../../testdata/odd/truth.tsv")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	var rows []oddTruth
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		line := sc.Text()
		if strings.HasPrefix(line, "#") || strings.TrimSpace(line) == "" {
			continue
		}
		c := strings.Split(line, "\t")
		if len(c) != 6 {
			t.Fatalf("truth.tsv: row %q: want 6 fields", line)
		}
		var v [3]float64
		for i, s := range c[3:] {
			if v[i], err = strconv.ParseFloat(s, 64); err != nil {
				t.Fatalf("truth.tsv: row %q: %v", line, err)
			}
		}
		rows = append(rows, oddTruth{file: c[0], id: c[1], param: c[2], value: v[0], cs: v[1], c0: v[2]})
	}
	if err := sc.Err(); err != nil {
		t.Fatal(err)
	}
	return rows
}

// fitJSON is the part of `fickfit fit --format json` this test reads.
type fitJSON struct {
	Fits []struct {
		ID        string  `json:"id"`
		Converged bool    `json:"converged"`
		Time      float64 `json:"time_s"`
		Params    []struct {
			Name  string  `json:"name"`
			Value float64 `json:"value"`
			Unit  string  `json:"unit"`
			Fixed bool    `json:"fixed"`
		} `json:"params"`
	} `json:"fits"`
}

// TestOddCatalogueFits fits every file of testdata/odd through the command
// line and compares the fitted D (or Dt when the file gives no time), Cs and
// C0 with the values the file was generated from.
//
// Self-check (parameter recovery through the reading path), not an external
// check: the generating values are invented fixtures (testdata/odd/truth.tsv,
// written by testdata/odd/generate.go). The data are the model rounded to 4
// decimals without noise, so the fit must land within 1 % on D and 0.005 on
// Cs and C0 unless a reader got a unit, a separator, a decimal comma or a
// line wrong. The inputs must be left byte for byte unchanged.
func TestOddCatalogueFits(t *testing.T) {
	dir := "../../testdata/odd"
	truth := readOddTruth(t)
	byFile := map[string][]oddTruth{}
	var files []string
	for _, r := range truth {
		if byFile[r.file] == nil {
			files = append(files, r.file)
		}
		byFile[r.file] = append(byFile[r.file], r)
	}
	entries, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	for _, e := range entries {
		switch n := e.Name(); {
		case n == "README.md", n == "cases.tsv", n == "truth.tsv", n == "generate.go":
		case byFile[n] == nil:
			t.Errorf("%s has no generating values in truth.tsv", n)
		}
	}
	for _, file := range files {
		t.Run(file, func(t *testing.T) {
			path := filepath.Join(dir, file)
			before := hashFile(t, path)
			code, stdout, stderr := runCLI(t, "fit", path, "--format", "json")
			if after := hashFile(t, path); after != before {
				t.Errorf("input %s was modified", path)
			}
			if code != 0 {
				t.Fatalf("exit %d, want 0; stderr: %s", code, stderr)
			}
			var out fitJSON
			if err := json.Unmarshal([]byte(stdout), &out); err != nil {
				t.Fatalf("output is not JSON: %v\n%s", err, stdout)
			}
			want := byFile[file]
			if len(out.Fits) != len(want) {
				t.Fatalf("%d fits, want %d", len(out.Fits), len(want))
			}
			for _, w := range want {
				checkOddFit(t, &out, w)
			}
		})
	}
}

func checkOddFit(t *testing.T, out *fitJSON, w oddTruth) {
	t.Helper()
	for _, f := range out.Fits {
		if f.ID != w.id {
			continue
		}
		if !f.Converged {
			t.Errorf("%s: not converged", w.id)
		}
		// Without a time the D parameter is the product Dt, in m².
		wantUnit := "m2/s"
		if w.param == "Dt" {
			wantUnit = "m2"
		}
		if (w.param == "Dt") != (f.Time == 0) {
			t.Errorf("%s: time_s %v, but truth.tsv gives %s", w.id, f.Time, w.param)
		}
		got := map[string]float64{}
		for _, p := range f.Params {
			got[p.Name] = p.Value
			if p.Name == "D" && (p.Unit != wantUnit || p.Fixed) {
				t.Errorf("%s: D in %q (fixed %v), want %q and free", w.id, p.Unit, p.Fixed, wantUnit)
			}
		}
		if d, ok := got["D"]; !ok || !(math.Abs(d-w.value) <= 0.01*w.value) {
			t.Errorf("%s: %s = %g, want %g within 1 %%", w.id, w.param, d, w.value)
		}
		for _, c := range []struct {
			name string
			want float64
		}{{"Cs", w.cs}, {"C0", w.c0}} {
			if v, ok := got[c.name]; !ok || !(math.Abs(v-c.want) <= 0.005) {
				t.Errorf("%s: %s = %g, want %g ± 0.005", w.id, c.name, v, c.want)
			}
		}
		return
	}
	t.Errorf("no fit for profile %s", w.id)
}
