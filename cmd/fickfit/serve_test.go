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
