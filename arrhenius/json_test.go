package arrhenius

import (
	"bytes"
	"encoding/json"
	"errors"
	"flag"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"github.com/fickfit/fickfit/fit"
)

var update = flag.Bool("update", false, "rewrite the golden JSON files in testdata/arrhenius")

// sameJSON compares two JSON documents: same keys and strings, numbers to
// a relative 1e-9 (last-bit differences between platforms are not changes
// of the contract).
func sameJSON(a, b any, path string) error {
	switch x := a.(type) {
	case map[string]any:
		y, ok := b.(map[string]any)
		if !ok || len(x) != len(y) {
			return fmt.Errorf("%s: object keys differ", path)
		}
		for k, v := range x {
			w, ok := y[k]
			if !ok {
				return fmt.Errorf("%s: key %q missing", path, k)
			}
			if err := sameJSON(v, w, path+"."+k); err != nil {
				return err
			}
		}
	case []any:
		y, ok := b.([]any)
		if !ok || len(x) != len(y) {
			return fmt.Errorf("%s: arrays differ in length", path)
		}
		for i := range x {
			if err := sameJSON(x[i], y[i], fmt.Sprintf("%s[%d]", path, i)); err != nil {
				return err
			}
		}
	case float64:
		y, ok := b.(float64)
		if !ok || math.Abs(x-y) > 1e-9*math.Max(math.Abs(x), math.Abs(y)) {
			return fmt.Errorf("%s: %v vs %v", path, a, b)
		}
	default:
		if !reflect.DeepEqual(a, b) {
			return fmt.Errorf("%s: %v vs %v", path, a, b)
		}
	}
	return nil
}

// TestGolden pins the JSON contract of `fickfit arrhenius --format json`
// (docs/output.md) for testdata/arrhenius/lots.csv, single and grouped.
func TestGolden(t *testing.T) {
	pts := readLots(t)
	for _, tc := range []struct{ file, by string }{{"line.golden.json", ""}, {"groups.golden.json", "lot"}} {
		rep, err := TwoStageGroups(pts, tc.by, &Options{TemperatureSigma: 2})
		if err != nil {
			t.Fatal(err)
		}
		got, err := json.MarshalIndent(rep, "", "  ")
		if err != nil {
			t.Fatal(err)
		}
		path := filepath.Join("..", "testdata", "arrhenius", tc.file)
		if *update {
			if err := os.WriteFile(path, append(got, '\n'), 0o644); err != nil {
				t.Fatal(err)
			}
			continue
		}
		want, err := os.ReadFile(path)
		if err != nil {
			t.Fatalf("%v (run with -update to create it)", err)
		}
		var g, w any
		if err := json.Unmarshal(got, &g); err != nil {
			t.Fatal(err)
		}
		if err := json.Unmarshal(want, &w); err != nil {
			t.Fatal(err)
		}
		if err := sameJSON(g, w, tc.file); err != nil {
			t.Errorf("JSON changed: %v\n(if intended, run go test -run Golden -update and note it on the issue)", err)
		}
	}
}

// TestReportRoundTrip: a written report is read back to the same calibration.
func TestReportRoundTrip(t *testing.T) {
	pts := readLots(t)
	for _, by := range []string{"", "lot"} {
		rep, err := TwoStageGroups(pts, by, nil)
		if err != nil {
			t.Fatal(err)
		}
		b, _ := json.Marshal(rep)
		back, err := ReadReport(bytes.NewReader(b), "mem.json")
		if err != nil {
			t.Fatal(err)
		}
		if len(back.Lines) != len(rep.Lines) || back.By != rep.By {
			t.Fatalf("by %q: %d lines back", by, len(back.Lines))
		}
		for i := range rep.Lines {
			a, c := rep.Lines[i].Calibration(), back.Lines[i].Calibration()
			if a.LnD0 != c.LnD0 || a.Q != c.Q || a.Cov != c.Cov || a.DOF != c.DOF || a.NoInterval != c.NoInterval || a.TMin != c.TMin || a.TMax != c.TMax {
				t.Errorf("by %q line %d: %+v vs %+v", by, i, a, c)
			}
		}
	}
	if !strings.Contains(string(mustJSON(t, Report{Lines: []Line{*mustLine(t)}})), `"corr_lnD0_Q"`) {
		t.Error("corr_lnD0_Q missing")
	}
}

func mustJSON(t *testing.T, v any) []byte {
	b, err := json.Marshal(v)
	if err != nil {
		t.Fatal(err)
	}
	return b
}

func mustLine(t *testing.T) *Line {
	l, err := TwoStage(readLots(t), nil)
	if err != nil {
		t.Fatal(err)
	}
	return l
}

// TestLoadCalibration reads a calibration file and picks groups.
func TestLoadCalibration(t *testing.T) {
	dir := t.TempDir()
	rep, _ := TwoStageGroups(readLots(t), "lot", nil)
	path := filepath.Join(dir, "cal.json")
	os.WriteFile(path, mustJSON(t, rep), 0o644)
	c, err := LoadCalibration(path, "L2")
	if err != nil {
		t.Fatal(err)
	}
	if c.Q != rep.Lines[1].Q || !strings.Contains(c.Source, "cal.json") {
		t.Errorf("calibration %+v", c)
	}
	if _, err := LoadCalibration(path, ""); err == nil || !strings.Contains(err.Error(), "L1, L2") {
		t.Errorf("no group chosen: %v", err)
	}
	if _, err := LoadCalibration(path, "L7"); err == nil || !strings.Contains(err.Error(), "groups: L1, L2") {
		t.Errorf("unknown group: %v", err)
	}
	bad := filepath.Join(dir, "bad.json")
	os.WriteFile(bad, []byte("{\n  \"method\": \"two-stage\",\n  \"Q\": {\"value\": 12,,}\n}"), 0o644)
	_, err = LoadCalibration(bad, "")
	var e *Error
	if !errors.As(err, &e) || e.Line != 3 || !errors.Is(err, fit.ErrBadInput) || !strings.Contains(err.Error(), "bad.json:3") {
		t.Errorf("syntax error: %v", err)
	}
	if _, err := LoadCalibration(filepath.Join(dir, "none.json"), ""); err == nil {
		t.Error("missing file accepted")
	}
	other := filepath.Join(dir, "fits.json")
	os.WriteFile(other, []byte(`{"fits":[]}`), 0o644)
	if _, err := LoadCalibration(other, ""); err == nil || !strings.Contains(err.Error(), "not an Arrhenius result") {
		t.Errorf("fit JSON given as calibration: %v", err)
	}
}

// FuzzReadReport: the calibration reader never panics and either errors or
// returns lines whose calibrations are valid.
func FuzzReadReport(f *testing.F) {
	for _, name := range []string{"line.golden.json", "groups.golden.json"} {
		if b, err := os.ReadFile(filepath.Join("..", "testdata", "arrhenius", name)); err == nil {
			f.Add(b)
		}
	}
	f.Add([]byte(`{"method":"x","Q":{"value":-1},"D0":{"value":0}}`))
	f.Add([]byte(`{"groups":[{"method":"two-stage","Q":{"value":1e5},"D0":{"value":1e-5},"cov_lnD0_Q":[[1,0],[0,1]]}]}`))
	f.Fuzz(func(t *testing.T, b []byte) {
		r, err := ReadReport(bytes.NewReader(b), "fuzz.json")
		if err != nil {
			return
		}
		for _, l := range r.Lines {
			if err := l.Calibration().validate(); err != nil {
				t.Fatalf("invalid calibration accepted: %v", err)
			}
		}
	})
}

// TestJSONWithoutIntervals: results without intervals or with open ends
// still marshal, with null where a number is undefined.
func TestJSONWithoutIntervals(t *testing.T) {
	two, err := TwoStage([]Point{{ID: "a", T: 1150, LnD: -26, VarLnD: 0.01}, {ID: "b", T: 1250, LnD: -24.5, VarLnD: 0.01}}, &Options{TemperatureSigma: 3})
	if err != nil {
		t.Fatal(err)
	}
	b := mustJSON(t, two)
	for _, want := range []string{`"ci":[null,null]`, `"birge_ratio":null`, `"halfwidth_Q":null`} {
		if !strings.Contains(string(b), want) {
			t.Errorf("%s missing in %s", want, b)
		}
	}
	cal := testCalibration(t)
	cal.Cov[1][1] = 4 * cal.Q * cal.Q // Q not significant: open ends, many non-physical draws
	cal.Cov[0][1] = 0
	s, err := SolveTemperature(Observation{LnDt: simLnD(1200) + math.Log(3600)}, cal, &SolveOptions{Time: 3600, Method: "both", Draws: 1000})
	if err != nil {
		t.Fatal(err)
	}
	if b := mustJSON(t, s); !strings.Contains(string(b), `"ci":[null,null]`) {
		t.Errorf("open interval not null: %s", b)
	}
	p, err := PredictProfile(two.Calibration(), Exposure{Temperature: 1200, Time: 3600}, 1, 0.2, []float64{0, 1e-4}, nil)
	if err != nil {
		t.Fatal(err)
	}
	if b := mustJSON(t, p); !strings.Contains(string(b), `"lo":null`) {
		t.Errorf("profile band not null: %s", b)
	}
}
