package report

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"errors"
	"io"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/fickfit/fickfit/fit"
	"github.com/fickfit/fickfit/profile"
)

func threeFits(t *testing.T) (Fits, []profile.Profile) {
	t.Helper()
	rng := rand.New(rand.NewPCG(1, 2))
	ps := []profile.Profile{
		synth{id: "A1", lot: "L1", tempC: 925, hours: 4, cs: 0.95, c0: 0.2}.profile(rng),
		synth{id: "A2", lot: "L1", tempC: 880, hours: 5, cs: 0.9, c0: 0.2, sigmaCol: true}.profile(rng),
		// Too few points for three free parameters with an error estimate: a bad-input failure.
		synth{id: "A3", lot: "L2", tempC: 900, hours: 3, cs: 0.95, c0: 0.2, n: 4}.profile(rng),
		// No time: D stands for Dt.
		synth{id: "A4", lot: "L2", tempC: 940, hours: 3, cs: 0.95, c0: 0.2, hideTime: true}.profile(rng),
	}
	rs, errs := fit.FitAll(ps, fit.Options{CI: "wald"}, nil)
	f := NewFits(ps, rs, errs)
	f.Version = "1.2.3-test"
	if len(f.Results) != 3 || len(f.Failed) != 1 {
		t.Fatalf("expected 3 fits and 1 failure, got %d and %d (%v)", len(f.Results), len(f.Failed), errs)
	}
	return f, ps
}

func TestFitsJSON(t *testing.T) {
	f, _ := threeFits(t)
	var a, b bytes.Buffer
	if err := f.WriteJSON(&a); err != nil {
		t.Fatal(err)
	}
	if err := f.WriteJSON(&b); err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(a.Bytes(), b.Bytes()) {
		t.Fatal("two writes of the same fits differ")
	}
	var doc map[string]json.RawMessage
	if err := json.Unmarshal(a.Bytes(), &doc); err != nil {
		t.Fatalf("not JSON: %v", err)
	}
	for _, k := range []string{"fickfit_version", "fits", "failed", "cautions"} {
		if _, ok := doc[k]; !ok {
			t.Errorf("key %q missing", k)
		}
	}
	var v string
	json.Unmarshal(doc["fickfit_version"], &v)
	if v != "1.2.3-test" {
		t.Errorf("version %q", v)
	}
	var fits []map[string]json.RawMessage
	if err := json.Unmarshal(doc["fits"], &fits); err != nil {
		t.Fatal(err)
	}
	// docs/output.md keys of one fit.
	for _, k := range []string{"id", "model", "converged", "time_s", "temperature_K", "ci_level", "ci_method", "params", "stats", "residuals", "warnings", "covariance"} {
		if _, ok := fits[0][k]; !ok {
			t.Errorf("fit key %q missing", k)
		}
	}
	// Round trip: the numbers read back equal the numbers written.
	var back []fit.Result
	if err := json.Unmarshal(doc["fits"], &back); err != nil {
		t.Fatal(err)
	}
	for i, r := range f.Results {
		if back[i].Param("D").Value != r.Param("D").Value || back[i].Stats.RSS != r.Stats.RSS ||
			len(back[i].Residuals) != len(r.Residuals) {
			t.Errorf("%s: round trip changed numbers", r.ID)
		}
	}
	var failed []fit.Failure
	json.Unmarshal(doc["failed"], &failed)
	if len(failed) != 1 || failed[0].ID != "A3" || failed[0].Kind != "bad input" || !strings.Contains(failed[0].Error, "A3") {
		t.Errorf("failed = %+v", failed)
	}
	// Empty lists are [] not null.
	var empty bytes.Buffer
	if err := (Fits{}).WriteJSON(&empty); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(empty.String(), `"fits": []`) || !strings.Contains(empty.String(), `"failed": []`) {
		t.Errorf("empty fits:\n%s", empty.String())
	}
	if strings.Contains(a.String(), `"warnings": null`) {
		t.Error("warnings written as null")
	}
}

func readCSV(t *testing.T, b []byte) (header []string, rows []map[string]string) {
	t.Helper()
	recs, err := csv.NewReader(bytes.NewReader(b)).ReadAll()
	if err != nil {
		t.Fatalf("not CSV: %v", err)
	}
	header = recs[0]
	for _, r := range recs[1:] {
		m := map[string]string{}
		for i, h := range header {
			m[h] = r[i]
		}
		rows = append(rows, m)
	}
	return header, rows
}

func TestFitsCSV(t *testing.T) {
	f, _ := threeFits(t)
	var a, b bytes.Buffer
	if err := f.WriteCSV(&a); err != nil {
		t.Fatal(err)
	}
	f.WriteCSV(&b)
	if !bytes.Equal(a.Bytes(), b.Bytes()) {
		t.Fatal("CSV not deterministic")
	}
	header, rows := readCSV(t, a.Bytes())
	want := []string{"id", "lot", "temperature_K", "time_s", "model", "D_m2_s", "D_ci_lo", "D_ci_hi"}
	for i, h := range want {
		if header[i] != h {
			t.Fatalf("column %d = %q, want %q (header %v)", i, header[i], h, header)
		}
	}
	for _, h := range []string{"Cs", "C0", "x0_m", "x0_fixed", "r2", "runs_p", "warnings", "error"} {
		if !contains(header, h) {
			t.Errorf("column %q missing from %v", h, header)
		}
	}
	if len(rows) != 4 {
		t.Fatalf("%d rows, want 4 (3 fitted + 1 failed)", len(rows))
	}
	for i, r := range f.Results {
		row := rows[i]
		if row["id"] != r.ID {
			t.Errorf("row %d id %q", i, row["id"])
		}
		d := r.Param("D")
		col := "D_m2_s"
		if r.Time == 0 {
			col = "Dt_m2"
			if row["D_m2_s"] != "" {
				t.Errorf("%s: D_m2_s filled though time is unknown", r.ID)
			}
		}
		got, err := strconv.ParseFloat(row[col], 64)
		if err != nil || got != d.Value {
			t.Errorf("%s: %s = %q, want %v", r.ID, col, row[col], d.Value)
		}
		if row["x0_fixed"] != "true" {
			t.Errorf("%s: x0_fixed = %q", r.ID, row["x0_fixed"])
		}
	}
	if rows[3]["id"] != "A3" || rows[3]["converged"] != "false" || rows[3]["error"] == "" {
		t.Errorf("failed row: %v", rows[3])
	}

	var res bytes.Buffer
	if err := f.WriteResidualsCSV(&res); err != nil {
		t.Fatal(err)
	}
	_, rrows := readCSV(t, res.Bytes())
	n := 0
	for _, r := range f.Results {
		n += len(r.Residuals)
	}
	if len(rrows) != n {
		t.Errorf("%d residual rows, want %d", len(rrows), n)
	}
	first := f.Results[0].Residuals[0]
	if v, _ := strconv.ParseFloat(rrows[0]["residual"], 64); v != first.Residual {
		t.Errorf("first residual %v, want %v", v, first.Residual)
	}
}

func contains(ss []string, s string) bool {
	for _, x := range ss {
		if x == s {
			return true
		}
	}
	return false
}

func TestFitsText(t *testing.T) {
	f, _ := threeFits(t)
	var b bytes.Buffer
	if err := f.WriteText(&b, TextOptions{}); err != nil {
		t.Fatal(err)
	}
	out := b.String()
	for _, want := range []string{
		"A1   lot L1   synthetic/A1.csv",
		"925 °C (1198.15 K), 4 h",
		"constant surface concentration (erf solution)",
		"95 % CI by Wald (Student t)",
		"m²/s (", "µm²/s)",
		"wt%",
		"R² 0.9", "runs p", "covariance scaled by χ²red",
		"covariance scaled by χ²red",
		"Not fitted:", "A3:",
		"Cautions:", "metallography",
	} {
		if !strings.Contains(out, want) {
			t.Errorf("text lacks %q:\n%s", want, out)
		}
	}
	// The profile without time says D is Dt, next to D.
	block := out[strings.Index(out, "A4"):]
	dl := lineWith(block, "  Dt ")
	if !strings.Contains(dl, " m² ") {
		t.Errorf("A4 Dt line should carry m²: %q", dl)
	}
	next := lineAfter(block, dl)
	if !strings.Contains(next, "! No hold time was given") {
		t.Errorf("time-missing warning not next to D: %q", next)
	}
	if strings.Contains(out, "NaN") || strings.Contains(out, "e-") {
		t.Errorf("raw float formatting in text:\n%s", out)
	}
	// Temperature unit choice.
	b.Reset()
	f.WriteText(&b, TextOptions{TempUnit: Kelvin, NoCautions: true})
	if !strings.Contains(b.String(), "1198.15 K, 4 h") || strings.Contains(b.String(), "Cautions") {
		t.Errorf("kelvin text:\n%s", b.String())
	}
}

func lineWith(s, sub string) string {
	for _, l := range strings.Split(s, "\n") {
		if strings.HasPrefix(l, sub) {
			return l
		}
	}
	return ""
}

func lineAfter(s, line string) string {
	ls := strings.Split(s, "\n")
	for i, l := range ls {
		if l == line && i+1 < len(ls) {
			return ls[i+1]
		}
	}
	return ""
}

func TestWarningNextToItsNumber(t *testing.T) {
	// Data that stop well before the base level: the fit warns that C0 is
	// not reached, and the text puts that warning under the C0 row.
	rng := rand.New(rand.NewPCG(3, 4))
	p := synth{id: "S1", tempC: 925, hours: 4, cs: 0.95, c0: 0.2, xmax: 0.5e-3}.profile(rng)
	r, err := fit.Fit(&p, fit.Options{CI: "wald"})
	if err != nil {
		t.Fatal(err)
	}
	if warningTarget(r, fit.Warning{Code: "plateau-not-reached"}) != "C0" {
		t.Fatal("plateau warning not mapped to C0")
	}
	hasPlateau := false
	for _, w := range r.Warnings {
		hasPlateau = hasPlateau || w.Code == "plateau-not-reached"
	}
	if !hasPlateau {
		t.Skip("fixture did not trigger the plateau warning; nothing to place")
	}
	var b bytes.Buffer
	Fits{Results: []*fit.Result{r}}.WriteText(&b, TextOptions{NoCautions: true})
	c0 := lineWith(b.String(), "  C0 ")
	if next := lineAfter(b.String(), c0); !strings.Contains(next, "! The base level C0 is never reached") {
		t.Errorf("line after C0 = %q\n%s", next, b.String())
	}
}

func TestOutputWriteFile(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "out.json")
	write := func(s string) func(io.Writer) error {
		return func(w io.Writer) error { _, err := io.WriteString(w, s); return err }
	}
	if err := (Output{}).WriteFile(path, write("one")); err != nil {
		t.Fatal(err)
	}
	if err := (Output{}).WriteFile(path, write("two")); !errors.Is(err, ErrExists) {
		t.Errorf("second write without Force: %v, want ErrExists", err)
	}
	if err := (Output{Force: true}).WriteFile(path, write("two")); err != nil {
		t.Fatal(err)
	}
	// A failing writer leaves the old content and no temporary file.
	boom := errors.New("boom")
	err := WriteFileAtomic(path, func(w io.Writer) error {
		io.WriteString(w, "half")
		return boom
	})
	if !errors.Is(err, boom) {
		t.Errorf("error %v does not wrap the writer's", err)
	}
	if b, _ := os.ReadFile(path); string(b) != "two" {
		t.Errorf("content after failed write = %q", b)
	}
	entries, _ := os.ReadDir(dir)
	if len(entries) != 1 {
		t.Errorf("left-over files: %v", entries)
	}
	// Inputs are never replaced, even with Force, even by another spelling.
	in := filepath.Join(dir, "in.csv")
	os.WriteFile(in, []byte("depth_um,C\n"), 0o644)
	alias := filepath.Join(dir, ".", "sub", "..", "in.csv")
	os.Mkdir(filepath.Join(dir, "sub"), 0o755)
	err = Output{Force: true, Inputs: []string{in}}.WriteFile(alias, write("x"))
	if !errors.Is(err, ErrWouldOverwriteInput) {
		t.Errorf("overwriting input: %v", err)
	}
	if b, _ := os.ReadFile(in); string(b) != "depth_um,C\n" {
		t.Error("input changed")
	}
	// A folder in the way is an error.
	if err := WriteFileAtomic(filepath.Join(dir, "sub"), write("x")); err == nil {
		t.Error("writing over a folder: no error")
	}
}

// TestOutputWriteFileLarge writes several writeback chunks in uneven
// pieces: the file holds every byte once, in order (the early writeback
// only advises the kernel).
func TestOutputWriteFileLarge(t *testing.T) {
	path := filepath.Join(t.TempDir(), "big.csv")
	want := make([]byte, 3*writebackChunk+12345)
	for i := range want {
		want[i] = byte('a' + i%26)
	}
	err := WriteFileAtomic(path, func(w io.Writer) error {
		for rest := want; len(rest) > 0; {
			n := min(len(rest), 70001)
			if _, err := w.Write(rest[:n]); err != nil {
				return err
			}
			rest = rest[n:]
		}
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	got, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(got, want) {
		t.Errorf("file of %d bytes differs from the %d written", len(got), len(want))
	}
}
