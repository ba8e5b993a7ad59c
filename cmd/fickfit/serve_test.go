package main

import (
	"bytes"
	"encoding/json"
	"io"
	"net/http"
	"os"
	"strings"
	"testing"
)

// page asks the workbench's API (as the page does) and decodes the answer.
func page(t *testing.T, method, url string, body []byte, v any) {
	t.Helper()
	req, _ := http.NewRequest(method, url, bytes.NewReader(body))
	resp, err := http.DefaultClient.Do(req)
	if err != nil {
		t.Fatal(err)
	}
	defer resp.Body.Close()
	b, _ := io.ReadAll(resp.Body)
	if resp.StatusCode != 200 {
		t.Fatalf("%s %s: %d %s", method, url, resp.StatusCode, b)
	}
	if v != nil {
		if err := json.Unmarshal(b, v); err != nil {
			t.Fatalf("%s: %v", b, err)
		}
	}
}

// The workbench's settings give the numbers of the same flags on the
// command line, to the last digit (common practice, no source): the
// hardness calibration with a case-depth threshold, and auto model
// selection with Wald intervals and a held parameter.
func TestWorkbenchSettingsMatchTheCommandLine(t *testing.T) {
	cases := []struct {
		name, file string
		cal        string
		settings   string
		flags      []string
	}{
		{"hardness calibration", "../../testdata/profile/B7_hardness.csv", "../../testdata/profile/calibration/HV05_C.csv",
			`{"case_threshold":"0.4wt%"}`, []string{"--hardness-calibration", "../../testdata/profile/calibration/HV05_C.csv", "--case-threshold", "0.4wt%"}},
		{"auto, wald, fixed", "../../testdata/demo/coupons/F7-2291-910-2.csv", "",
			`{"model":"auto","ci":"wald","level":0.9,"fix":["C0=0.19"]}`, []string{"--model", "auto", "--ci", "wald", "--level", "0.9", "--fix", "C0=0.19"}},
		{"bootstrap", "../../testdata/demo/coupons/F7-2291-970-1.csv", "",
			`{"ci":"bootstrap"}`, []string{"--ci", "bootstrap"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, url := workbench(t, c.file)
			if c.cal != "" {
				b, _ := os.ReadFile(c.cal)
				page(t, "POST", url+"api/calibration?name=HV05_C.csv", b, nil)
			}
			page(t, "POST", url+"api/settings", []byte(c.settings), nil)
			var rows struct {
				Rows []struct{ ID string } `json:"rows"`
			}
			page(t, "GET", url+"api/profiles", nil, &rows)
			var v struct {
				Fit json.RawMessage `json:"fit"`
			}
			page(t, "GET", url+"api/profile?id="+rows.Rows[0].ID, nil, &v)
			// The page's fit is the command line's JSON, number for number
			// (the calibration's name is the upload's name on the page).
			code, out, errs := runCLI(t, append([]string{"fit", "--format", "json", c.file}, c.flags...)...)
			if code != 0 {
				t.Fatalf("fit: %d %s", code, errs)
			}
			var doc struct {
				Fits []json.RawMessage `json:"fits"`
			}
			json.Unmarshal([]byte(out), &doc)
			a, b := withoutCalibrationName(t, v.Fit), withoutCalibrationName(t, doc.Fits[0])
			if a != b {
				t.Errorf("the page's fit differs from fickfit fit %s:\npage %s\ncli  %s", strings.Join(c.flags, " "), a, b)
			}
			if !strings.Contains(a, `"D"`) {
				t.Errorf("no D in %s", a)
			}
		})
	}
}

// withoutCalibrationName writes a fit's JSON again without meta.calibration.
func withoutCalibrationName(t *testing.T, raw json.RawMessage) string {
	t.Helper()
	var m map[string]any
	if err := json.Unmarshal(raw, &m); err != nil {
		t.Fatal(err)
	}
	if meta, ok := m["meta"].(map[string]any); ok {
		delete(meta, "calibration")
	}
	b, _ := json.Marshal(m)
	return string(b)
}

// Exclusions made on the page, saved and given to the command line with
// --exclude, reproduce the page's campaign (Arrhenius lines, lot
// comparison, back-calculated part) and its back-calculation from the
// current line, number for number (common practice, no source).
func TestWorkbenchExclusionsReproducedByTheCommandLine(t *testing.T) {
	demo := "../../testdata/demo"
	inputs := []string{demo + "/coupons", demo + "/lims-export-BAR-2307.csv", demo + "/unknown"}
	_, url := workbench(t, inputs...)
	page(t, "POST", url+"api/exclude", []byte(`{"id":"F7-2291-880-1","index":0,"reason":"oxide layer"}`), nil)
	page(t, "POST", url+"api/exclude", []byte(`{"id":"F7-2307-970-2","index":5,"reason":"indent on a carbide"}`), nil)
	page(t, "POST", url+"api/exclude", []byte(`{"id":"F7-2307-940-2","whole":true,"reason":"door opened"}`), nil)
	dir := t.TempDir()
	resp, err := http.Get(url + "api/exclusions.csv")
	if err != nil {
		t.Fatal(err)
	}
	ex, _ := io.ReadAll(resp.Body)
	resp.Body.Close()
	exFile := dir + "/exclusions.csv"
	os.WriteFile(exFile, ex, 0o644)

	// The campaign: the page's export against campaign --exclude.
	pageOut, cliOut := dir+"/page", dir+"/cli"
	body, _ := json.Marshal(map[string]any{"folder": pageOut})
	page(t, "POST", url+"api/export", body, nil)
	if code, _, errs := runCLI(t, append(append([]string{"campaign"}, inputs...), "--exclude", exFile, "--out", cliOut, "--no-png")...); code != 0 {
		t.Fatalf("campaign: %s", errs)
	}
	var a, b map[string]any
	for _, x := range []struct {
		dir string
		m   *map[string]any
	}{{pageOut, &a}, {cliOut, &b}} {
		raw, _ := os.ReadFile(x.dir + "/results.json")
		if err := json.Unmarshal(raw, x.m); err != nil {
			t.Fatal(err)
		}
	}
	for _, key := range []string{"fits", "failed", "arrhenius", "lot_comparison", "backcalc", "exclusions", "options"} {
		ja, _ := json.Marshal(stripSources(a[key]))
		jb, _ := json.Marshal(stripSources(b[key]))
		if string(ja) != string(jb) {
			i := 0
			for i < len(ja) && i < len(jb) && ja[i] == jb[i] {
				i++
			}
			t.Errorf("results.json %q differs at byte %d:\npage …%.300s\ncli  …%.300s", key, i, ja[max(0, i-100):], jb[max(0, i-100):])
		}
	}
	if pts := a["exclusions"].(map[string]any)["points"].([]any); len(pts) != 2 {
		t.Errorf("%d excluded points in the page's results.json", len(pts))
	}

	// The back-calculation from the current line of lot BAR-2291.
	var bc struct {
		Solution json.RawMessage `json:"solution"`
	}
	page(t, "POST", url+"api/backcalc", []byte(`{"id":"pinion-7731","solve":"temperature"}`), &bc)
	line := dir + "/line.json"
	if code, _, errs := runCLI(t, "arrhenius", "--by", "lot", demo+"/coupons", demo+"/lims-export-BAR-2307.csv", "--exclude", exFile, "--format", "json", "-o", line); code != 0 {
		t.Fatalf("arrhenius: %s", errs)
	}
	code, out, errs := runCLI(t, "backcalc", demo+"/unknown/pinion-7731.csv", "--calibration", line+":BAR-2291", "--exclude", exFile, "--format", "json")
	if code != 0 {
		t.Fatalf("backcalc: %s", errs)
	}
	var cli struct {
		Backcalc []json.RawMessage `json:"backcalc"`
	}
	json.Unmarshal([]byte(out), &cli)
	var ps, cs map[string]any
	json.Unmarshal(bc.Solution, &ps)
	json.Unmarshal(cli.Backcalc[0], &cs)
	pt, _ := json.Marshal(ps["temperature_K"])
	ct, _ := json.Marshal(cs["temperature_K"])
	if string(pt) != string(ct) || !strings.Contains(string(pt), `"ci":[`) {
		t.Errorf("back-calculated temperature: page %s, command line %s", pt, ct)
	}
}

// stripSources drops the file names (the page's "source" and "file" are
// as loaded; the numbers must agree).
func stripSources(v any) any {
	switch x := v.(type) {
	case map[string]any:
		for k, e := range x {
			if k == "source" || k == "calibration" && isString(e) {
				delete(x, k)
				continue
			}
			x[k] = stripSources(e)
		}
	case []any:
		for i := range x {
			x[i] = stripSources(x[i])
		}
	}
	return v
}

func isString(v any) bool { _, ok := v.(string); return ok }
