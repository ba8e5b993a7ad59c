package main

import (
	"bytes"
	"encoding/json"
	"flag"
	"os"
	"path/filepath"
	"reflect"
	"strconv"
	"strings"
	"testing"
)

// The golden files under testdata/golden pin the output contract
// (docs/output.md): every command's JSON, CSV and text on the demo data
// (testdata/demo, invented) and the campaign folder's JSON and CSV files.
// They are a regression check of the writers, not of the science. After an
// intended change of an output, rewrite them with
//
//	go test ./cmd/fickfit -run Golden -update
//
// and read the diff before committing it.
var update = flag.Bool("update", false, "rewrite the golden files in testdata/golden")

const (
	demoDir   = "../../testdata/demo"
	goldenDir = "../../testdata/golden"
)

// goldenCommands are the command lines whose standard output is pinned,
// each in every format. Paths are relative, so that the files name the
// same sources on every machine. They run in order: backcalc and predict
// read the Arrhenius line the arrhenius case wrote.
var goldenCommands = []struct {
	name string
	args []string
}{
	{"fit", []string{"fit", demoDir + "/coupons", demoDir + "/lims-export-BAR-2307.csv"}},
	{"fit-auto", []string{"fit", demoDir + "/coupons/F7-2291-880-1.csv", demoDir + "/coupons/F7-2291-970-2.csv",
		"--model", "auto", "--case-threshold", "0.35wt%", "--temperature-unit", "F"}},
	{"arrhenius", []string{"arrhenius", demoDir + "/coupons", demoDir + "/lims-export-BAR-2307.csv", "--by", "lot"}},
	{"compare", []string{"compare", demoDir + "/coupons", demoDir + "/lims-export-BAR-2307.csv", "--by", "lot"}},
	{"backcalc", []string{"backcalc", demoDir + "/unknown/pinion-7731.csv", "--solve", "temperature", "--time", "6h",
		"--calibration", goldenDir + "/arrhenius.json:BAR-2291", "--method", "both"}},
	{"backcalc-time", []string{"backcalc", demoDir + "/unknown/pinion-7731.csv", "--solve", "time", "--temperature", "925C",
		"--reference", "C-in-gamma-Fe"}},
	{"predict", []string{"predict", "--calibration", goldenDir + "/arrhenius.json:BAR-2291", "--temperature", "925C", "--time", "5h",
		"--Cs", "1.0", "--C0", "0.2", "--case-threshold", "0.35wt%", "--points", "11"}},
	{"predict-target", []string{"predict", "--reference", "C-in-gamma-Fe", "--temperature", "925C",
		"--Cs", "1.0", "--C0", "0.2", "--case-threshold", "0.35wt%", "--target-depth", "0.9mm"}},
	{"reference", []string{"reference"}},
	{"matano", []string{"matano", goldenDir + "/couple-NiCu.csv", "--resamples", "200"}},
}

var goldenExt = map[string]string{"text": ".txt", "json": ".json", "csv": ".csv"}

// checkGolden compares got with testdata/golden/name, or rewrites it with -update.
func checkGolden(t *testing.T, name string, got []byte) {
	t.Helper()
	path := filepath.Join(goldenDir, name)
	if *update {
		if err := os.WriteFile(path, got, 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	want, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("%v (run with -update to create it)", err)
	}
	if !bytes.Equal(got, want) {
		t.Errorf("%s changed; if intended, rerun with -update and read the diff.\n%s", path, firstDiff(string(want), string(got)))
	}
}

// firstDiff shows the first line that differs.
func firstDiff(want, got string) string {
	wl, gl := strings.Split(want, "\n"), strings.Split(got, "\n")
	for i := 0; i < len(wl) || i < len(gl); i++ {
		var w, g string
		if i < len(wl) {
			w = wl[i]
		}
		if i < len(gl) {
			g = gl[i]
		}
		if w != g {
			return "line " + itoa(i+1) + ":\nwant: " + w + "\ngot:  " + g
		}
	}
	return "(lengths differ)"
}

func itoa(i int) string { return strconv.Itoa(i) }

func TestGoldenCommands(t *testing.T) {
	for _, gc := range goldenCommands {
		for _, format := range []string{"json", "csv", "text"} {
			t.Run(gc.name+"/"+format, func(t *testing.T) {
				code, stdout, stderr := runCLI(t, append(append([]string{}, gc.args...), "--format", format)...)
				if code != 0 {
					t.Fatalf("exit %d: %s", code, stderr)
				}
				checkGolden(t, gc.name+goldenExt[format], []byte(stdout))
			})
		}
	}
}

// TestGoldenCampaign pins the machine-readable files of the demo's report
// folder, and checks that its CSV files are the commands' own: the
// campaign's arrhenius.csv is what fickfit arrhenius --format csv writes
// for the same profiles.
func TestGoldenCampaign(t *testing.T) {
	out := filepath.Join(t.TempDir(), "report")
	code, _, stderr := runCLI(t, "campaign", demoDir+"/coupons", demoDir+"/lims-export-BAR-2307.csv", demoDir+"/unknown",
		"--out", out, "--no-png")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	for _, f := range []string{"results.json", "results.csv", "residuals.csv", "arrhenius.csv", "backcalc.csv", "summary.txt"} {
		b, err := os.ReadFile(filepath.Join(out, f))
		if err != nil {
			t.Fatal(err)
		}
		checkGolden(t, "campaign-"+f, b)
	}
	// The lot comparison in results.json is what fickfit compare writes
	// (the same bytes: no HTML escaping in either).
	var doc struct {
		Comparison json.RawMessage `json:"lot_comparison"`
	}
	b, _ := os.ReadFile(filepath.Join(out, "results.json"))
	if err := json.Unmarshal(b, &doc); err != nil {
		t.Fatal(err)
	}
	_, cmp, _ := runCLI(t, "compare", demoDir+"/coupons", demoDir+"/lims-export-BAR-2307.csv", "--by", "lot", "--format", "json")
	var c1, c2 map[string]any
	json.Unmarshal(doc.Comparison, &c1)
	json.Unmarshal([]byte(cmp), &c2)
	delete(c2, "fickfit_version")
	if !reflect.DeepEqual(c1, c2) || !strings.Contains(string(b), `(p < 0.001)`) {
		t.Errorf("results.json's lot_comparison differs from fickfit compare --format json")
	}
	_, want, _ := runCLI(t, "arrhenius", demoDir+"/coupons", demoDir+"/lims-export-BAR-2307.csv", "--by", "lot", "--format", "csv")
	got, _ := os.ReadFile(filepath.Join(out, "arrhenius.csv"))
	if string(got) != want {
		t.Errorf("campaign arrhenius.csv differs from fickfit arrhenius --format csv:\n%s", firstDiff(want, string(got)))
	}
}
