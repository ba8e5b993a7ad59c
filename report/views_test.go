package report

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"errors"
	"flag"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/fickfit/fickfit/arrhenius"
	"github.com/fickfit/fickfit/fit"
	"github.com/fickfit/fickfit/fit/matano"
	"github.com/fickfit/fickfit/internal/tempfmt"
	"github.com/fickfit/fickfit/profile"
)

// Golden files under testdata/report/views fix the layout of the text
// views (a regression check of the writers, not of the science: the
// numbers in them come from invented fixtures). Rewrite them with
//
//	go test ./report/ -run View -update-views
var viewUpdate = flag.Bool("update-views", false, "rewrite the golden files in testdata/report/views")

// Fixtures. Every number below is invented to exercise the writers: an
// Arrhenius line D0 = 3e-5 m²/s, Q = 150 kJ/mol, perturbed by a seeded
// generator. None of them is a check value.

const (
	viewFixD0 = 3e-5  // m²/s, invented
	viewFixQ  = 150e3 // J/mol, invented
)

// viewFixPoints returns n points per lot at 850–1000 °C, ln D scattered by
// 0.05 with a seeded generator; lot k has D multiplied by factor[k].
func viewFixPoints(lots []string, factor []float64) []arrhenius.Point {
	rng := rand.New(rand.NewPCG(11, 12))
	var pts []arrhenius.Point
	for k, lot := range lots {
		for i := 0; i < 5; i++ {
			T := 1123.15 + 37.5*float64(i)
			lnD := math.Log(viewFixD0*factor[k]) - viewFixQ/(arrhenius.R*T) + 0.05*rng.NormFloat64()
			pts = append(pts, arrhenius.Point{ID: lot + "-" + strconv.Itoa(i+1), Lot: lot, Source: "synthetic.csv",
				T: T, LnD: lnD, VarLnD: 0.05 * 0.05, Meta: map[string]string{"lot": lot}})
		}
	}
	return pts
}

func viewFixLine(t *testing.T, o *arrhenius.Options) *arrhenius.Line {
	t.Helper()
	l, err := arrhenius.TwoStage(viewFixPoints([]string{"L1"}, []float64{1}), o)
	if err != nil {
		t.Fatal(err)
	}
	return l
}

func viewFixReport(t *testing.T) *arrhenius.Report {
	t.Helper()
	r, err := arrhenius.TwoStageGroups(viewFixPoints([]string{"L1", "L2"}, []float64{1, 1.4}), "lot", &arrhenius.Options{TemperatureSigma: 3})
	if err != nil {
		t.Fatal(err)
	}
	return r
}

func viewFixSolutions(t *testing.T) []*arrhenius.Solution {
	t.Helper()
	l := viewFixLine(t, nil)
	// A part held 4 h whose Dt is what the invented line gives at 910 °C.
	T := 1183.15
	obs := arrhenius.Observation{ID: "P7", LnDt: math.Log(viewFixD0*4*3600) - viewFixQ/(arrhenius.R*T), VarLnDt: 0.06 * 0.06}
	a, err := arrhenius.SolveTemperature(obs, l.Calibration(), &arrhenius.SolveOptions{Time: 4 * 3600, Method: "both", Draws: 2000, Seed: 7})
	if err != nil {
		t.Fatal(err)
	}
	ex, err := arrhenius.Explicit(viewFixD0, 0.4*viewFixD0, viewFixQ, 4e3, 0)
	if err != nil {
		t.Fatal(err)
	}
	obs.ID = "P8"
	b, err := arrhenius.SolveTime(obs, ex, &arrhenius.SolveOptions{Temperature: T})
	if err != nil {
		t.Fatal(err)
	}
	return []*arrhenius.Solution{a, b}
}

func viewFixPredictions(t *testing.T) []*arrhenius.Prediction {
	t.Helper()
	cal := viewFixLine(t, nil).Calibration()
	e := arrhenius.Exposure{Temperature: 1198.15, Time: 5 * 3600}
	var depths []float64
	for i := 0; i <= 8; i++ {
		depths = append(depths, 0.25e-3*float64(i))
	}
	p, err := arrhenius.PredictProfile(cal, e, 1.0, 0.2, depths, nil)
	if err != nil {
		t.Fatal(err)
	}
	c, err := arrhenius.PredictCaseDepth(cal, e, 1.0, 0.2, 0.4, nil)
	if err != nil {
		t.Fatal(err)
	}
	p.CaseDepth, p.Threshold = c.CaseDepth, c.Threshold
	tt, err := arrhenius.TimeToDepth(cal, 1198.15, 1.0, 0.2, 0.4, 0.9e-3, nil)
	if err != nil {
		t.Fatal(err)
	}
	return []*arrhenius.Prediction{p, tt}
}

func viewFixComparison(t *testing.T) *arrhenius.Comparison {
	t.Helper()
	c, err := arrhenius.Compare(viewFixPoints([]string{"L1", "L2"}, []float64{1, 1.4}), nil)
	if err != nil {
		t.Fatal(err)
	}
	return c
}

func viewFixMatano(t *testing.T) []*matano.Result {
	t.Helper()
	// An invented couple: constant D = 4e-14 m²/s for 100 h, levels 2 and 30,
	// seeded noise of 0.1.
	const D, tm = 4e-14, 100 * 3600.0
	rng := rand.New(rand.NewPCG(3, 4))
	p := &profile.Profile{ID: "couple-1", Time: tm}
	for i := 0; i <= 40; i++ {
		x := -600e-6 + 1200e-6*float64(i)/40
		p.Depth = append(p.Depth, x)
		p.Value = append(p.Value, 2+14*(1+math.Erf(x/(2*math.Sqrt(D*tm))))+0.1*rng.NormFloat64())
	}
	r, err := matano.Analyze(p, 0, matano.Options{Concentrations: []float64{2.5, 5, 10, 16, 22, 27, 40}, Resamples: 100, Seed: 1, Workers: 1})
	if err != nil {
		t.Fatal(err)
	}
	return []*matano.Result{r}
}

// viewAll returns every supported value with a name.
func viewAll(t *testing.T) []struct {
	name string
	v    any
} {
	return []struct {
		name string
		v    any
	}{
		{"arrhenius", viewFixReport(t)},
		{"arrhenius-single", &arrhenius.Report{Lines: []arrhenius.Line{*viewFixLine(t, nil)}}},
		{"backcalc", viewFixSolutions(t)},
		{"predict", viewFixPredictions(t)},
		{"compare", viewFixComparison(t)},
		{"reference", arrhenius.References()},
		{"matano", viewFixMatano(t)},
	}
}

// viewFlat joins the words of a text, so that wrapped sentences can be found.
func viewFlat(s string) string { return strings.Join(strings.Fields(s), " ") }

func viewTextOf(t *testing.T, v any, o TextOptions) string {
	t.Helper()
	var b bytes.Buffer
	if err := docOf(v).WriteText(&b, o); err != nil {
		t.Fatal(err)
	}
	return b.String()
}

func viewMustContain(t *testing.T, what, text string, want ...string) {
	t.Helper()
	ft := viewFlat(text)
	for _, w := range want {
		if !strings.Contains(ft, viewFlat(w)) {
			t.Errorf("%s: %q missing from\n%s", what, w, text)
		}
	}
}

func TestViewTextArrhenius(t *testing.T) {
	r := viewFixReport(t)
	out := viewTextOf(t, r, TextOptions{})
	for i := range r.Lines {
		l := &r.Lines[i]
		qk, ivk := l.Q/1e3, fit.Interval{Lo: l.QCI().Lo / 1e3, Hi: l.QCI().Hi / 1e3}
		last := LastDigit(qk, ivk)
		d0 := l.D0()
		viewMustContain(t, "arrhenius "+l.Group, out,
			"lot "+l.Group,
			Number(qk, last)+" kJ/mol (",
			"95 % CI "+IntervalAt(qk, ivk, last)+" kJ/mol",
			Number(d0, LastDigit(d0, l.D0CI()))+" m²/s",
			"corr(ln D0, Q) "+Number(l.Corr(), -4),
			"of Var(Q) from the temperatures",
		)
		for _, p := range l.Points {
			viewMustContain(t, "point", out, p.ID+" "+Temperature(p.T, Celsius))
		}
	}
	viewMustContain(t, "arrhenius", out, " eV", "850 °C (1123.15 K)", "D on the line", "Cautions:", viewLineCautions[0])
	if !strings.Contains(out, "Arrhenius lines by lot: 2 groups") {
		t.Errorf("group heading missing:\n%s", out)
	}
	// Kelvin: no °C anywhere.
	k := viewTextOf(t, r, TextOptions{TempUnit: Kelvin, NoCautions: true})
	if strings.Contains(k, "°C") || strings.Contains(k, "Cautions") {
		t.Errorf("kelvin view shows °C or cautions despite NoCautions:\n%s", k)
	}
}

// TestViewQElectronvolt: external check of the kJ/mol → eV conversion:
// 1 eV per particle = N_A·e·1 V = 96.485 332 12 kJ/mol (CODATA 2018; N_A
// and e exact in the 2019 SI; the Faraday constant 96 485.332 12 C/mol).
func TestViewQElectronvolt(t *testing.T) {
	if math.Abs(viewFaraday-96485.33212) > 1e-5 {
		t.Errorf("N_A·e = %.8f C/mol, want 96485.33212", viewFaraday)
	}
	tests := []struct {
		q    float64
		ci   fit.Interval
		want string
	}{
		{1.5 * 96485.33212, fit.Interval{Lo: math.NaN(), Hi: math.NaN()}, "145 kJ/mol (1.50 eV)"},
		{2 * 96485.33212, fit.Interval{Lo: 2*96485.33212 - 965, Hi: 2*96485.33212 + 965}, "193.0 kJ/mol (2.000 eV), 95 % CI 192.0–193.9 kJ/mol (1.990–2.010 eV)"},
	}
	for _, tc := range tests {
		if got := viewQ(tc.q, tc.ci, 0.95); got != tc.want {
			t.Errorf("viewQ(%g) = %q, want %q", tc.q, got, tc.want)
		}
	}
}

func TestViewTextBackcalc(t *testing.T) {
	ss := viewFixSolutions(t)
	// Cautions are written even when the caller asks for none.
	out := viewTextOf(t, ss, TextOptions{NoCautions: true})
	a, b := ss[0], ss[1]
	viewMustContain(t, "backcalc", out,
		"part P7", "part P8",
		TemperatureEstimate(a.Temperature.Value, a.Temperature.CI, a.Level, Celsius),
		"Fieller's theorem",
		"4 h, given",
		"seed 7", "2000 draws",
		DurationEstimate(b.Time.Value, b.Time.CI, b.Level),
		"910 °C (1183.15 K), given",
		"D0 and Q given explicitly",
		"Cautions:")
	for _, c := range arrhenius.Cautions {
		viewMustContain(t, "caution", out, c)
	}
	for _, s := range ss {
		for _, w := range s.Warnings {
			viewMustContain(t, "warning "+w.Code, out, w.Message)
		}
	}
	// Fahrenheit: the solved temperature in °F with kelvin beside.
	f := viewTextOf(t, ss[:1], TextOptions{TempUnit: Fahrenheit})
	viewMustContain(t, "fahrenheit", f, TemperatureEstimate(a.Temperature.Value, a.Temperature.CI, a.Level, Fahrenheit))
}

func TestViewTextPredict(t *testing.T) {
	ps := viewFixPredictions(t)
	out := viewTextOf(t, ps, TextOptions{NoCautions: true})
	p, tt := ps[0], ps[1]
	cd := p.CaseDepth
	viewMustContain(t, "predict", out,
		"Predicted profile: 925 °C (1198.15 K) for 5 h",
		"depth (mm)",
		viewLength(cd.Value, cd.CI, p.Level)+" at level 0.4",
		"Hold time to reach a case depth",
		DurationEstimate(tt.Time.Value, tt.Time.CI, tt.Level),
		"case depth 900 µm at level 0.4",
		"Cautions:", arrhenius.Cautions[2])
	rows := 0
	for _, line := range strings.Split(out, "\n") {
		if f := strings.Fields(line); len(f) == 4 && f[0] == "2.00" {
			rows++
		}
	}
	if len(p.Profile) != 9 || rows != 1 {
		t.Errorf("profile table: want one row at 2 mm:\n%s", out)
	}
}

func TestViewTextCompare(t *testing.T) {
	c := viewFixComparison(t)
	out := viewTextOf(t, c, TextOptions{})
	viewMustContain(t, "compare", out, "Verdict: Lots L1 and L2 differ", "at 922.65 °C (1195.8 K)", "Cautions:", viewCompareCautions[1])
	for _, ft := range c.Tests {
		viewMustContain(t, "test", out, ft.Description)
	}
	for _, r := range c.Ratios {
		last := LastDigit(r.Value, r.CI)
		viewMustContain(t, "ratio", out, Number(r.Value, last)+" "+IntervalAt(r.Value, r.CI, last))
	}
	// The verdict comes before the tables.
	if strings.Index(out, "Verdict") > strings.Index(out, "F-tests") {
		t.Errorf("verdict not first:\n%s", out)
	}
}

func TestViewTextReference(t *testing.T) {
	refs := arrhenius.References()
	out := viewTextOf(t, refs, TextOptions{})
	for _, r := range refs {
		viewMustContain(t, "reference", out, r.Name, r.Solute+" in "+r.Host)
	}
	// Values as the table gives them, not padded with digits it does not have.
	viewMustContain(t, "reference", out, "2.3 × 10⁻⁵", "148", "727–1394 °C (1000–1667 K)", "[1]", "printed page 150",
		"D within a factor 1.5", "not on a calibration of your own steel")
	if strings.Contains(out, "[1] *") || strings.Contains(out, viewReferenceCaution) {
		t.Errorf("a checked row is marked as written from memory:\n%s", out)
	}
}

func TestViewTextMatano(t *testing.T) {
	rs := viewFixMatano(t)
	out := viewTextOf(t, rs, TextOptions{})
	viewMustContain(t, "matano", out, "couple-1", "Boltzmann–Matano", "anneal 100 h", "Matano plane", "D (m²/s)",
		"n/a outside the end compositions", "Cautions:")
	for _, w := range rs[0].Warnings {
		viewMustContain(t, "warning", out, w.Message)
	}
}

func TestViewGolden(t *testing.T) {
	for _, tc := range viewAll(t) {
		t.Run(tc.name, func(t *testing.T) {
			got := viewTextOf(t, tc.v, TextOptions{})
			path := filepath.Join("..", "testdata", "report", "views", tc.name+".txt")
			if *viewUpdate {
				if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
					t.Fatal(err)
				}
				if err := os.WriteFile(path, []byte(got), 0o644); err != nil {
					t.Fatal(err)
				}
				return
			}
			want, err := os.ReadFile(path)
			if err != nil {
				t.Fatalf("%v (run with -update-views to create it)", err)
			}
			if got != string(want) {
				t.Errorf("%s changed; if intended, rerun with -update-views.\ngot:\n%s", path, got)
			}
		})
	}
}

func TestViewJSONStable(t *testing.T) {
	for _, tc := range viewAll(t) {
		t.Run(tc.name, func(t *testing.T) {
			var a, b bytes.Buffer
			if err := docOf(tc.v).WriteJSON(&a); err != nil {
				t.Fatal(err)
			}
			if err := docOf(tc.v).WriteJSON(&b); err != nil {
				t.Fatal(err)
			}
			if !bytes.Equal(a.Bytes(), b.Bytes()) {
				t.Error("two runs differ")
			}
			out := a.Bytes()
			if !bytes.HasPrefix(out, []byte("{\n  \"fickfit_version\": ")) || !bytes.HasSuffix(out, []byte("}\n")) {
				t.Errorf("want fickfit_version first and a trailing newline:\n%.200s", out)
			}
			if !json.Valid(out) {
				t.Fatal("invalid JSON")
			}
			if bytes.Contains(out, []byte(`\u003c`)) || bytes.Contains(out, []byte(`\u0026`)) {
				t.Error("HTML escapes left in the output")
			}
		})
	}
}

func TestViewJSONRoundTrip(t *testing.T) {
	// Arrhenius: the file a later backcalc reads as its calibration.
	r := viewFixReport(t)
	var b bytes.Buffer
	if err := docOf(r).WriteJSON(&b); err != nil {
		t.Fatal(err)
	}
	back, err := arrhenius.ReadReport(&b, "line.json")
	if err != nil {
		t.Fatal(err)
	}
	if back.By != "lot" || len(back.Lines) != 2 {
		t.Fatalf("read back %d lines by %q", len(back.Lines), back.By)
	}
	for i := range r.Lines {
		g, w := back.Lines[i], r.Lines[i]
		if g.Group != w.Group || g.Q != w.Q || g.LnD0 != w.LnD0 || g.Cov != w.Cov || g.DOF != w.DOF || len(g.Points) != len(w.Points) {
			t.Errorf("line %d: read back %+v, wrote %+v", i, g, w)
		}
	}

	// Back-calculation.
	ss := viewFixSolutions(t)
	b.Reset()
	if err := docOf(ss).WriteJSON(&b); err != nil {
		t.Fatal(err)
	}
	var doc struct {
		Version  string `json:"fickfit_version"`
		Backcalc []struct {
			SolveFor    string `json:"solve_for"`
			ID          string `json:"id"`
			Temperature struct {
				Value float64      `json:"value"`
				CI    fit.Interval `json:"ci"`
			} `json:"temperature_K"`
			Time struct {
				Value float64 `json:"value"`
			} `json:"time_s"`
		} `json:"backcalc"`
		Cautions []string `json:"cautions"`
	}
	if err := json.Unmarshal(b.Bytes(), &doc); err != nil {
		t.Fatal(err)
	}
	if doc.Version != DefaultVersion || len(doc.Backcalc) != 2 || len(doc.Cautions) != len(arrhenius.Cautions) {
		t.Fatalf("doc: %+v", doc)
	}
	if g := doc.Backcalc[0]; g.ID != "P7" || g.SolveFor != "temperature" || g.Temperature.Value != ss[0].Temperature.Value || g.Temperature.CI != ss[0].Temperature.CI {
		t.Errorf("solution 0 read back as %+v", g)
	}
	if g := doc.Backcalc[1]; g.SolveFor != "time" || g.Time.Value != ss[1].Time.Value {
		t.Errorf("solution 1 read back as %+v", g)
	}

	// Wrappers of the other slices, and the comparison as it marshals.
	keys := func(v any) map[string]json.RawMessage {
		b.Reset()
		if err := docOf(v).WriteJSON(&b); err != nil {
			t.Fatal(err)
		}
		var m map[string]json.RawMessage
		if err := json.Unmarshal(b.Bytes(), &m); err != nil {
			t.Fatal(err)
		}
		return m
	}
	for _, tc := range []struct {
		v    any
		key  string
		want int
	}{
		{viewFixPredictions(t), "predictions", 2},
		{arrhenius.References(), "references", len(arrhenius.References())},
		{viewFixMatano(t), "matano", 1},
	} {
		var list []json.RawMessage
		if err := json.Unmarshal(keys(tc.v)[tc.key], &list); err != nil || len(list) != tc.want {
			t.Errorf("%s: %d entries (%v), want %d", tc.key, len(list), err, tc.want)
		}
	}
	c := viewFixComparison(t)
	m := keys(c)
	var verdict string
	if err := json.Unmarshal(m["verdict"], &verdict); err != nil || verdict != tempfmt.Plain(c.Verdict) || strings.Contains(verdict, "⟦") {
		t.Errorf("verdict read back as %q (%v)", verdict, err)
	}
	var empty map[string]json.RawMessage
	b.Reset()
	if err := docOf([]*arrhenius.Prediction{}).WriteJSON(&b); err != nil {
		t.Fatal(err)
	}
	if err := json.Unmarshal(b.Bytes(), &empty); err != nil || string(empty["predictions"]) != "[]" {
		t.Errorf("empty predictions: %s", b.String())
	}
}

// viewTables reads a views CSV stream: a row whose first cell is "table"
// is a header and starts a table; the first cell of every row under it
// names the table. It returns the tables with rows by name, each a header
// and rows.
func viewTables(t *testing.T, data []byte) map[string][][]string {
	t.Helper()
	rd := csv.NewReader(bytes.NewReader(data))
	rd.FieldsPerRecord = -1
	recs, err := rd.ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	out := map[string][][]string{}
	var header []string
	name := ""
	for _, r := range recs {
		if r[0] == "table" {
			header, name = r, ""
			continue
		}
		if header == nil {
			t.Fatalf("row before any header: %v", r)
		}
		if name == "" {
			name = r[0]
			if _, dup := out[name]; dup {
				t.Fatalf("table %s twice", name)
			}
			out[name] = [][]string{header}
		}
		if r[0] != name {
			t.Errorf("row of table %s under the header of %s: %v", r[0], name, r)
		}
		if len(r) != len(header) {
			t.Errorf("%s: row of %d fields under a header of %d", name, len(r), len(header))
		}
		out[name] = append(out[name], r)
	}
	return out
}

// viewCell returns column col of row i (1-based among rows) of a table.
func viewCell(t *testing.T, tb [][]string, i int, col string) string {
	t.Helper()
	for j, h := range tb[0] {
		if h == col {
			return tb[i][j]
		}
	}
	t.Fatalf("no column %q in %v", col, tb[0])
	return ""
}

func viewExact(t *testing.T, what, s string, want float64) {
	t.Helper()
	got, err := strconv.ParseFloat(s, 64)
	if err != nil || got != want {
		t.Errorf("%s = %q, want %v exactly", what, s, want)
	}
}

func TestViewCSV(t *testing.T) {
	csvOf := func(v any) map[string][][]string {
		var b bytes.Buffer
		if err := docOf(v).WriteCSV(&b); err != nil {
			t.Fatal(err)
		}
		return viewTables(t, b.Bytes())
	}
	r := viewFixReport(t)
	tb := csvOf(r)
	for _, name := range []string{"line", "point", "d_on_line"} {
		if tb[name] == nil {
			t.Fatalf("table %s missing", name)
		}
	}
	if len(tb["line"]) != 3 || len(tb["point"]) != 11 {
		t.Errorf("line rows %d, point rows %d", len(tb["line"])-1, len(tb["point"])-1)
	}
	l := &r.Lines[1]
	viewExact(t, "Q_J_mol", viewCell(t, tb["line"], 2, "Q_J_mol"), l.Q)
	viewExact(t, "D0_ci_hi_m2_s", viewCell(t, tb["line"], 2, "D0_ci_hi_m2_s"), l.D0CI().Hi)
	viewExact(t, "temperature_K", viewCell(t, tb["point"], 6, "temperature_K"), l.Points[0].T)
	viewExact(t, "temperature_sigma_K", viewCell(t, tb["point"], 6, "temperature_sigma_K"), 3)

	ss := viewFixSolutions(t)
	tb = csvOf(ss)
	bc := tb["backcalc"]
	viewExact(t, "temperature_K", viewCell(t, bc, 1, "temperature_K"), ss[0].Temperature.Value)
	viewExact(t, "temperature_ci_lo_K", viewCell(t, bc, 1, "temperature_ci_lo_K"), ss[0].Temperature.CI.Lo)
	viewExact(t, "time_ci_hi_s", viewCell(t, bc, 2, "time_ci_hi_s"), ss[1].Time.CI.Hi)
	if g := viewCell(t, bc, 2, "temperature_ci_lo_K"); g != "" {
		t.Errorf("a given temperature has an interval %q", g)
	}
	if g := viewCell(t, bc, 2, "mc_seed"); g != "" {
		t.Errorf("no Monte Carlo, but mc_seed %q", g)
	}
	if len(tb["caution"]) != 1+len(arrhenius.Cautions) {
		t.Errorf("cautions: %v", tb["caution"])
	}

	ps := viewFixPredictions(t)
	tb = csvOf(ps)
	viewExact(t, "case_depth_m", viewCell(t, tb["prediction"], 1, "case_depth_m"), ps[0].CaseDepth.Value)
	viewExact(t, "time_s", viewCell(t, tb["prediction"], 2, "time_s"), ps[1].Time.Value)
	if len(tb["profile"]) != 1+len(ps[0].Profile) {
		t.Errorf("profile rows %d", len(tb["profile"])-1)
	}
	viewExact(t, "depth_m", viewCell(t, tb["profile"], 9, "depth_m"), ps[0].Profile[8].Depth)

	c := viewFixComparison(t)
	tb = csvOf(c)
	viewExact(t, "F", viewCell(t, tb["test"], 1, "F"), c.Tests[0].F)
	viewExact(t, "D_ratio", viewCell(t, tb["ratio"], 1, "D_ratio"), c.Ratios[0].Value)

	refs := arrhenius.References()
	tb = csvOf(refs)
	viewExact(t, "D0_m2_s", viewCell(t, tb["reference"], 1, "D0_m2_s"), refs[0].D0)
	if viewCell(t, tb["reference"], 1, "from_memory") != "false" || tb["caution"] != nil || viewCell(t, tb["reference"], 1, "spread_D_factor") != "1.5" {
		t.Error("checked rows marked from memory, or the spread missing")
	}

	ms := viewFixMatano(t)
	tb = csvOf(ms)
	pts := tb["point"]
	viewExact(t, "D_m2_s", viewCell(t, pts, 1, "D_m2_s"), ms[0].Points[0].D)
	// 40 lies beyond the couple's end compositions: D undefined, cell empty.
	if g := viewCell(t, pts, 7, "D_m2_s"); g != "" {
		t.Errorf("D outside the ends written as %q", g)
	}
}

// errWriter fails on the first write.
type errWriter struct{}

func (errWriter) Write([]byte) (int, error) { return 0, errors.New("disk full") }

func TestViewWriteError(t *testing.T) {
	ss := viewFixSolutions(t)
	if err := docOf(ss).WriteJSON(errWriter{}); err == nil {
		t.Error("JSON: write error lost")
	}
	if err := docOf(ss).WriteCSV(errWriter{}); err == nil {
		t.Error("CSV: write error lost")
	}
	if err := docOf(ss).WriteText(errWriter{}, TextOptions{}); err == nil {
		t.Error("Text: write error lost")
	}
}

// TestViewNoInterval: a line from two temperatures carries no interval;
// the views say so instead of printing an empty or made-up one.
func TestViewNoInterval(t *testing.T) {
	pts := viewFixPoints([]string{"L1"}, []float64{1})[:2]
	l, err := arrhenius.TwoStage(pts, nil)
	if err != nil {
		t.Fatal(err)
	}
	out := viewTextOf(t, l, TextOptions{})
	viewMustContain(t, "two temperatures", out, "no interval: fewer than three temperatures", "Birge ratio n/a")
	if strings.Contains(out, "not bounded") {
		t.Errorf("open interval shown as unbounded:\n%s", out)
	}
	obs := arrhenius.Observation{ID: "P", LnDt: math.Log(1e-7), VarLnDt: 0.01}
	s, err := arrhenius.SolveTemperature(obs, l.Calibration(), &arrhenius.SolveOptions{Time: 3600})
	if err != nil {
		t.Fatal(err)
	}
	out = viewTextOf(t, s, TextOptions{})
	viewMustContain(t, "solution", out, ", no interval", "no interval (two temperatures)")
	var b bytes.Buffer
	if err := docOf(s).WriteCSV(&b); err != nil {
		t.Fatal(err)
	}
	tb := viewTables(t, b.Bytes())
	if g := viewCell(t, tb["backcalc"], 1, "temperature_ci_lo_K"); g != "" {
		t.Errorf("open end written as %q", g)
	}
}

func TestViewGiven(t *testing.T) {
	tests := []struct {
		v    float64
		want string
	}{
		{2.3e-5, "2.3 × 10⁻⁵"},
		{math.Exp(math.Log(2.3e-5)), "2.3 × 10⁻⁵"}, // not 2.30000 × 10⁻⁵
		{148, "148"},
		{0.35, "0.35"},
		{1.0 / 3, "0.333333"},
		{-0.2, "−0.2"},
		{0, "0"},
	}
	for _, tc := range tests {
		if got := viewGiven(tc.v); got != tc.want {
			t.Errorf("viewGiven(%v) = %q, want %q", tc.v, got, tc.want)
		}
	}
}

// TestViewZeroWidth: a reference row taken as exact (no spread) carries
// no uncertainty, so a prediction from it has an interval of zero width;
// the text says so and names no interval method.
func TestViewZeroWidth(t *testing.T) {
	ref, err := arrhenius.LookupReference("C-in-gamma-Fe")
	if err != nil {
		t.Fatal(err)
	}
	cal, err := ref.CalibrationWithSpread(1, 0)
	if err != nil {
		t.Fatal(err)
	}
	p, err := arrhenius.TimeToDepth(cal, 1198.15, 1.0, 0.2, 0.35, 0.9e-3, nil)
	if err != nil {
		t.Fatal(err)
	}
	out := viewTextOf(t, p, TextOptions{})
	viewMustContain(t, "zero width", out, viewDurationPlain(p.Time.Value)+", interval of zero width", "D0 2.3 × 10⁻⁵ m²/s",
		"based on 727–1394 °C (1000–1667 K)", "Cautions:")
	if strings.Contains(out, "Wald") {
		t.Errorf("an interval method named for a zero-width interval:\n%s", out)
	}
}

// Write one row of the built-in reference table for people.
func ExampleReferences_WriteText() {
	ref, _ := arrhenius.LookupReference("Cu-in-Cu")
	_ = References{ref}.WriteText(os.Stdout, TextOptions{Width: 72})
	// Output:
	// Reference diffusion data (built-in table; D = D0·exp(−Q/(RT)))
	//
	//   name      solute in host             D0 (m²/s)  Q (kJ/mol)  valid range               source
	//   ────────────────────────────────────────────────────────────────────────────────────────────
	//   Cu-in-Cu  Cu in Cu, self-diffusion  2.5 × 10⁻⁵         200  427–1084 °C (700–1357 K)  [1]
	//
	//   [1] W. D. Callister Jr. & D. G. Rethwisch, Materials Science and
	//       Engineering: An Introduction (Wiley), Table 5.2 "A Tabulation of
	//       Diffusion Data", printed page 150 (9th/10th-edition layout; the
	//       edition is not printed on the page checked); the table's own
	//       source for this row: J. Askill, Tracer Diffusion Data for Metals,
	//       Alloys, and Simple Oxides, IFI/Plenum, 1970
	//
	//   Spread put on every row when it is used (backcalc, predict;
	//   --reference-spread and --reference-Q-uncertainty set it): D within a
	//   factor 1.5 at the centre of the row's range and Q within 5 %, one
	//   standard uncertainty. Basis: a handbook row describes a pure host, not
	//   this part's alloy and composition; for carbon in austenite D depends
	//   on carbon content and alloying (Lee, Matlock & Van Tyne, ISIJ
	//   International 51 (2011) 1903–1911); the factors are engineering
	//   judgement, no source.
	//
	//   Answers from these rows rest on published handbook values, not on a
	//   calibration of your own steel and furnace: calibrate (fickfit
	//   arrhenius on coupons treated at three or more temperatures) before
	//   deciding on parts.
}

// TestViewHistoryLevel: the level of a logged treatment (invented log:
// 1 h ramp from 800 °C, 4 h at 900 °C, 1 h down) solved from a part.
func TestViewHistoryLevel(t *testing.T) {
	h := &profile.History{Source: "furnace.csv", Time: []float64{0, 3600, 5 * 3600, 6 * 3600},
		Temp: []float64{1073.15, 1173.15, 1173.15, 1073.15}, Line: []int{2, 3, 4, 5}}
	cal := viewFixLine(t, nil).Calibration()
	// An invented Dt somewhat above what the log gives as logged.
	lnDt := math.Log(cal.D(1188.15) * 5.5 * 3600)
	s, err := arrhenius.SolveHistoryLevel(arrhenius.Observation{ID: "P9", LnDt: lnDt, VarLnDt: 0.05 * 0.05}, cal, h, arrhenius.Shift, nil)
	if err != nil {
		t.Fatal(err)
	}
	out := viewTextOf(t, s, TextOptions{})
	a := s.Adjustment
	viewMustContain(t, "history", out, "Back-calculated hold temperature of the log: part P9",
		"every temperature "+viewAdjust(a.Value, a.CI, s.Level, "K"), "log duration 6 h, given", "interval by test inversion")
	if !strings.HasPrefix(viewAdjust(a.Value, a.CI, s.Level, "K"), "+") {
		t.Errorf("a positive shift is written without its sign: %s", out)
	}
	var b bytes.Buffer
	if err := docOf(s).WriteCSV(&b); err != nil {
		t.Fatal(err)
	}
	tb := viewTables(t, b.Bytes())
	viewExact(t, "log_adjustment", viewCell(t, tb["backcalc"], 1, "log_adjustment"), a.Value)
	if g := viewCell(t, tb["backcalc"], 1, "log_adjustment_mode"); g != "shift" {
		t.Errorf("mode %q", g)
	}
}

// docOf gives the Document of a result value for the table-driven tests.
func docOf(v any) Document {
	switch x := v.(type) {
	case Document:
		return x
	case *arrhenius.Report:
		return Arrhenius{Report: x}
	case *arrhenius.Line:
		return Arrhenius{Report: &arrhenius.Report{Lines: []arrhenius.Line{*x}}}
	case []*arrhenius.Solution:
		return Backcalc{Solutions: x}
	case *arrhenius.Solution:
		return Backcalc{Solutions: []*arrhenius.Solution{x}}
	case []*arrhenius.Prediction:
		return Predictions(x)
	case *arrhenius.Prediction:
		return Predictions{x}
	case *arrhenius.Comparison:
		return Comparison{Comparison: x}
	case []arrhenius.Reference:
		return References(x)
	case arrhenius.Reference:
		return References{x}
	case []*matano.Result:
		return Matano(x)
	case *matano.Result:
		return Matano{x}
	case []*fit.Result:
		return Fits{Results: x}
	}
	panic(fmt.Sprintf("docOf: no Document for %T", v))
}
