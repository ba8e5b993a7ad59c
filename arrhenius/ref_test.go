package arrhenius

import (
	"encoding/csv"
	"encoding/json"
	"errors"
	"math"
	"os"
	"strconv"
	"strings"
	"testing"

	"github.com/fickfit/fickfit/fit"
)

// TestReferenceTableRows: external check — every row of the built-in
// table equals its row of Callister & Rethwisch, Table 5.2, printed page
// 150, as copied into testdata/reference/diffusion_table.csv (see its
// header for the copy seen), and names the table's own primary source for
// the row (the footnote letter). No row is written from memory.
func TestReferenceTableRows(t *testing.T) {
	f, err := os.Open("../testdata/reference/diffusion_table.csv")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	cr := csv.NewReader(f)
	cr.Comment = '#'
	rows, err := cr.ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	foot := map[string]string{"b": "Adda & J. Philibert", "c": "Smithells Metals Reference Book, 7th ed.", "d": "Askill"}
	seen := map[string]bool{}
	for _, row := range rows[1:] {
		if row[5] == "" {
			continue
		}
		r, err := LookupReference(row[5])
		if err != nil {
			t.Errorf("%s: %v", row[5], err)
			continue
		}
		seen[r.Name] = true
		d0, _ := strconv.ParseFloat(row[2], 64)
		q, _ := strconv.ParseFloat(row[3], 64)
		if r.D0 != d0 || r.Q != q || r.Solute != row[0] {
			t.Errorf("%s: D0 %g Q %g solute %s, the table prints %g m²/s, %g J/mol for %s", r.Name, r.D0, r.Q, r.Solute, d0, q, row[0])
		}
		if !strings.Contains(r.Source, "Table 5.2") || !strings.Contains(r.Source, "page 150") || !strings.Contains(r.Source, foot[row[4]]) {
			t.Errorf("%s: source %q does not cite the table, page and footnote %s", r.Name, r.Source, row[4])
		}
		if r.FromMemory || len(r.Checks) != 0 {
			t.Errorf("%s: marked from memory or carries unverified checks", r.Name)
		}
	}
	for _, r := range References() {
		if !seen[r.Name] {
			t.Errorf("row %s is not in the copied table: a value nobody can check", r.Name)
		}
	}
}

// TestReferenceSpread: the row's spread enters the covariance: Var ln D at
// the centre of the range is (ln f)², Var Q is (qrel·Q)², and a user's
// spread replaces the default; f = 1, qrel = 0 gives no uncertainty.
func TestReferenceSpread(t *testing.T) {
	r, _ := LookupReference("C-in-gamma-Fe")
	c := r.Calibration()
	tc := 2 / (1/r.TMin + 1/r.TMax)
	_, v := c.LnD(tc)
	near(t, "Var ln D at centre", v, math.Pow(math.Log(DefaultSpreadFactor), 2), 1e-9)
	near(t, "u(Q)", math.Sqrt(c.Cov[1][1]), DefaultSpreadQ*r.Q, 1e-12)
	if !strings.Contains(c.Spread, "default") || !strings.Contains(c.Spread, "Lee, Matlock & Van Tyne") {
		t.Errorf("spread note %q", c.Spread)
	}
	c2, err := r.CalibrationWithSpread(1.2, 0.02)
	if err != nil {
		t.Fatal(err)
	}
	_, v2 := c2.LnD(tc)
	near(t, "user spread", v2, math.Pow(math.Log(1.2), 2), 1e-9)
	c0, _ := r.CalibrationWithSpread(1, 0)
	if c0.hasCov() {
		t.Error("f = 1, qrel = 0 left a covariance")
	}
	for _, bad := range [][2]float64{{0.9, 0.05}, {1.5, -0.1}, {1.5, 1}, {math.NaN(), 0}} {
		if _, err := r.CalibrationWithSpread(bad[0], bad[1]); err == nil {
			t.Errorf("spread %v accepted", bad)
		}
	}
}

// TestReferenceBackcalcCoversOffsetSteel: self-check. A part whose steel
// diffuses carbon 1.7 times faster than the table's row (a composition and
// alloy effect of the size the default spread allows for) is held 6 h at
// 885 °C; from the table's line its Dt reads as about 40 K hotter. The 95 %
// interval with the row's spread contains the true 885 °C; without the
// spread (the old behaviour) it does not.
func TestReferenceBackcalcCoversOffsetSteel(t *testing.T) {
	r, _ := LookupReference("C-in-gamma-Fe")
	Ttrue, tm := 885+273.15, 6*3600.0
	obs := Observation{ID: "part", LnDt: math.Log(1.7 * r.D(Ttrue) * tm), VarLnDt: 0.03 * 0.03}
	s, err := SolveTemperature(obs, r.Calibration(), &SolveOptions{Time: tm})
	if err != nil {
		t.Fatal(err)
	}
	off := s.Temperature.Value - Ttrue
	ci := s.Temperature.CI
	if off < 30 || off > 50 || !(ci.Lo <= Ttrue && Ttrue <= ci.Hi) || !hasWarning(s.Warnings, "reference-literature") {
		t.Errorf("T %g K (truth %g, offset %.1f K), CI %v, warnings %v", s.Temperature.Value, Ttrue, off, ci, s.Warnings)
	}
	bare, _ := r.CalibrationWithSpread(1, 0)
	s0, err := SolveTemperature(obs, bare, &SolveOptions{Time: tm})
	if err != nil {
		t.Fatal(err)
	}
	if s0.Temperature.CI.Lo <= Ttrue {
		t.Errorf("without the spread the interval %v already contains the truth: the test does not separate", s0.Temperature.CI)
	}
	t.Logf("offset %.1f K; interval with spread %.0f–%.0f K, without %.0f–%.0f K", off, ci.Lo, ci.Hi, s0.Temperature.CI.Lo, s0.Temperature.CI.Hi)
}

func TestLookupReference(t *testing.T) {
	for _, name := range []string{"C-in-gamma-Fe", "c-in-GAMMA-fe", " C-in-austenite ", "Zn-in-Cu"} {
		if _, err := LookupReference(name); err != nil {
			t.Errorf("%q: %v", name, err)
		}
	}
	_, err := LookupReference("N-in-unobtainium")
	if err == nil || !errors.Is(err, fit.ErrBadInput) {
		t.Fatalf("unknown name: %v", err)
	}
	for _, n := range ReferenceNames() {
		if !strings.Contains(err.Error(), n) {
			t.Errorf("error does not list %s: %v", n, err)
		}
	}
	r, _ := LookupReference("C-in-gamma-Fe")
	c := r.Calibration()
	if c.Method != "reference" || c.D0() != r.D0 && math.Abs(c.D0()/r.D0-1) > 1e-15 || c.Q != r.Q || c.TMin != 1000 {
		t.Errorf("calibration %+v", c)
	}
	seen := map[string]bool{}
	for _, r := range References() {
		if seen[r.Name] || r.Source == "" || !(r.TMin < r.TMax) || r.FromMemory {
			t.Errorf("row %s: duplicate, no source or bad range", r.Name)
		}
		seen[r.Name] = true
		if _, err := json.Marshal(r); err != nil {
			t.Error(err)
		}
	}
}
