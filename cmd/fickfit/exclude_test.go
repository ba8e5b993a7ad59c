package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/xuri/excelize/v2"
)

// exclFitJSON is the part of fickfit fit --format json these tests read.
type exclFitJSON struct {
	Fits []struct {
		ID     string `json:"id"`
		Params []struct {
			Name  string  `json:"name"`
			Value float64 `json:"value"`
		} `json:"params"`
		Stats struct {
			N int `json:"n"`
		} `json:"stats"`
	} `json:"fits"`
}

func fitD(t *testing.T, args ...string) (d float64, n int) {
	t.Helper()
	code, out, errs := runCLI(t, append([]string{"fit", "--format", "json"}, args...)...)
	if code != 0 {
		t.Fatalf("fit %v: exit %d: %s", args, code, errs)
	}
	var f exclFitJSON
	if err := json.Unmarshal([]byte(out), &f); err != nil || len(f.Fits) != 1 {
		t.Fatalf("fit output: %v\n%s", err, out)
	}
	for _, p := range f.Fits[0].Params {
		if p.Name == "D" {
			return p.Value, f.Fits[0].Stats.N
		}
	}
	t.Fatal("no D")
	return 0, 0
}

// --exclude takes the named point out of the fit (common practice, no
// source): D changes, n drops by one, and a fit of the file without that
// line gives the same D to the last digit.
func TestExcludePointOnFit(t *testing.T) {
	in := "../../testdata/demo/coupons/F7-2291-880-1.csv"
	dir := t.TempDir()
	ex := filepath.Join(dir, "exclusions.csv")
	os.WriteFile(ex, []byte("file,profile,depth_um,line,reason\nF7-2291-880-1.csv,F7-2291-880-1,50,9,oxide layer\nother.csv,NOT-HERE,10,,\n"), 0o644)
	d0, n0 := fitD(t, in)
	d1, n1 := fitD(t, in, "--exclude", ex)
	if n1 != n0-1 || d1 == d0 {
		t.Errorf("with the exclusion: n %d → %d, D %g → %g", n0, n1, d0, d1)
	}
	b, _ := os.ReadFile(in)
	lines := strings.Split(string(b), "\n")
	if !strings.HasPrefix(lines[8], "0.050,") {
		t.Fatalf("line 9 of the demo coupon is %q", lines[8])
	}
	// The same file with line 9 blanked (a blank line keeps the numbering).
	lines[8] = ""
	cut := filepath.Join(dir, "F7-2291-880-1.csv")
	os.WriteFile(cut, []byte(strings.Join(lines, "\n")), 0o644)
	if d2, _ := fitD(t, cut); d2 != d1 {
		t.Errorf("D with the point excluded %v, with the line removed %v", d1, d2)
	}
	_, _, errs := runCLI(t, "fit", in, "--exclude", ex, "--format", "json")
	if !strings.Contains(errs, "1 rows concern profiles not among the inputs (NOT-HERE)") {
		t.Errorf("no note on the unused row: %q", errs)
	}
	after, _ := os.ReadFile(in)
	if string(after) != string(b) {
		t.Error("the input was modified")
	}
}

func TestExcludeErrors(t *testing.T) {
	in := "../../testdata/demo/coupons/F7-2291-880-1.csv"
	ex := filepath.Join(t.TempDir(), "ex.csv")
	os.WriteFile(ex, []byte("profile,depth_um\nF7-2291-880-1,51\n"), 0o644)
	code, _, errs := runCLI(t, "fit", in, "--exclude", ex)
	if code != exitBadInput || !strings.Contains(errs, `ex.csv:2: profile "F7-2291-880-1" has no point at depth 51 µm`) {
		t.Errorf("exit %d: %s", code, errs)
	}
	code, _, errs = runCLI(t, "fit", in, "--exclude", filepath.Join(t.TempDir(), "missing.csv"))
	if code != exitBadInput || !strings.Contains(errs, "missing.csv") {
		t.Errorf("exit %d: %s", code, errs)
	}
}

// A row without a depth leaves the profile out of the Arrhenius line and
// the comparison; campaign records every exclusion in results.json, the
// HTML audit trail and exclusions.csv (read back by --exclude).
func TestExcludeProfileFromLines(t *testing.T) {
	demo := "../../testdata/demo"
	ex := filepath.Join(t.TempDir(), "ex.csv")
	os.WriteFile(ex, []byte("file,profile,depth_um,line,reason\n"+
		"lims-export-BAR-2307.csv,F7-2307-940-2,,,door opened\n"+
		"F7-2291-880-1.csv,F7-2291-880-1,50,9,oxide layer\n"), 0o644)
	points := func(args ...string) int {
		code, out, errs := runCLI(t, append([]string{"arrhenius", "--by", "lot", "--format", "json", filepath.Join(demo, "coupons"), filepath.Join(demo, "lims-export-BAR-2307.csv")}, args...)...)
		if code != 0 {
			t.Fatalf("arrhenius: %d %s", code, errs)
		}
		var r struct {
			Groups []struct {
				Points []struct{ ID string } `json:"points"`
			} `json:"groups"`
		}
		json.Unmarshal([]byte(out), &r)
		n := 0
		for _, g := range r.Groups {
			n += len(g.Points)
		}
		return n
	}
	if a, b := points(), points("--exclude", ex); b != a-1 {
		t.Errorf("points %d without and %d with the exclusions", a, b)
	}
	out := filepath.Join(t.TempDir(), "rep")
	code, _, errs := runCLI(t, "campaign", filepath.Join(demo, "coupons"), filepath.Join(demo, "lims-export-BAR-2307.csv"), "--exclude", ex, "--out", out, "--no-png")
	if code != 0 {
		t.Fatalf("campaign: %d %s", code, errs)
	}
	var doc struct {
		Exclusions struct {
			Points  []struct{ Profile, Reason string } `json:"points"`
			LeftOut []struct{ Profile string }         `json:"left_out"`
		} `json:"exclusions"`
		Options struct {
			Exclusions string `json:"exclusions_file"`
		} `json:"options"`
	}
	b, _ := os.ReadFile(filepath.Join(out, "results.json"))
	if err := json.Unmarshal(b, &doc); err != nil {
		t.Fatal(err)
	}
	if len(doc.Exclusions.Points) != 1 || doc.Exclusions.Points[0].Reason != "oxide layer" || len(doc.Exclusions.LeftOut) != 1 || doc.Options.Exclusions != "ex.csv" {
		t.Errorf("results.json exclusions: %+v", doc)
	}
	html, _ := os.ReadFile(filepath.Join(out, "report.html"))
	if !strings.Contains(string(html), "<td>oxide layer</td>") || !strings.Contains(string(html), "F7-2291-880-1.csv:9") {
		t.Error("report.html's audit trail lacks the exclusion")
	}
	book, err := excelize.OpenFile(filepath.Join(out, "results.xlsx"))
	if err != nil {
		t.Fatal(err)
	}
	rows, _ := book.GetRows("Audit")
	book.Close()
	found := false
	for _, r := range rows {
		found = found || strings.Contains(strings.Join(r, "|"), "F7-2291-880-1|F7-2291-880-1.csv:9|50|0.89|oxide layer")
	}
	if !found {
		t.Errorf("the workbook's audit sheet lacks the exclusion: %q", rows)
	}
	// The folder's exclusions.csv reproduces the same fit.
	d1, _ := fitD(t, filepath.Join(demo, "coupons/F7-2291-880-1.csv"), "--exclude", ex)
	d2, _ := fitD(t, filepath.Join(demo, "coupons/F7-2291-880-1.csv"), "--exclude", filepath.Join(out, "exclusions.csv"))
	if d1 != d2 {
		t.Errorf("D %v with the original exclusions, %v with the report's copy", d1, d2)
	}
}
