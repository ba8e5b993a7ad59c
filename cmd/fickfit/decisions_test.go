package main

// Through the command line, on invented data (constructed here, not check
// values): the decisions a lab signs — lot comparisons with many lots,
// suspect points, reference back-calculations, case depth, partial runs.

import (
	"archive/zip"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/fickfit/fickfit/arrhenius"
)

// invented Arrhenius parameters of the simulated steels.
const (
	simD0 = 2.3e-5 // m²/s
	simQ  = 148e3  // J/mol
)

// erfCoupon writes an invented carburized coupon: 26 points to 2 mm of the
// erf solution with D = factor·D0·exp(−Q/(R·Tact)) and noise 0.006 wt%,
// labelled with the temperature as written (tempText) and the time.
func erfCoupon(t *testing.T, dir, id, lot, tempText string, Tact, hours, factor float64, rng *rand.Rand, extra string) string {
	t.Helper()
	D := factor * simD0 * math.Exp(-simQ/(arrhenius.R*Tact))
	tt := hours * 3600
	var b strings.Builder
	fmt.Fprintf(&b, "# id: %s\n# lot: %s\n# temperature: %s\n# time: %g h\n%sdepth_mm,C_wt%%\n", id, lot, tempText, hours, extra)
	for i := 1; i <= 26; i++ {
		x := 2.0 * float64(i) / 26
		v := 0.95 + (0.2-0.95)*math.Erf(x*1e-3/(2*math.Sqrt(D*tt))) + 0.006*rng.NormFloat64()
		fmt.Fprintf(&b, "%.3f,%.4f\n", x, v)
	}
	path := filepath.Join(dir, id+".csv")
	if err := os.WriteFile(path, []byte(b.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

// threeLotCampaign writes lots A, B, C at 880–970 °C, two coupons each;
// C diffuses exactly as A, B 1.5 times faster.
func threeLotCampaign(t *testing.T) string {
	dir := t.TempDir()
	rng := rand.New(rand.NewPCG(14, 1))
	for _, lot := range []struct {
		name   string
		factor float64
	}{{"A", 1}, {"B", 1.5}, {"C", 1}} {
		for _, tc := range []float64{880, 910, 940, 970} {
			for rep := 1; rep <= 2; rep++ {
				erfCoupon(t, dir, fmt.Sprintf("%s-%g-%d", lot.name, tc, rep), lot.name, fmt.Sprintf("%g C", tc), tc+273.15, 4, lot.factor, rng, "")
			}
		}
	}
	return dir
}

// TestThreeLotsTwoIdentical: compare and campaign with three lots, C
// identical to A. Every pair is reported with its ratio, interval, p and
// Holm-adjusted p; A–C is not called different; the verdict says so pair
// by pair in text, HTML, XLSX and JSON; a °F run never says °C.
func TestThreeLotsTwoIdentical(t *testing.T) {
	dir := threeLotCampaign(t)
	code, out, errs := runCLI(t, "compare", dir, "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var cmp struct {
		Differ bool `json:"differ"`
		Pairs  []struct {
			A, B      string
			Ratio     float64    `json:"ratio"`
			CI        [2]float64 `json:"ci"`
			P         float64    `json:"p"`
			PAdjusted float64    `json:"p_adjusted"`
			Differ    bool       `json:"differ"`
		} `json:"pairs"`
		Verdict string `json:"verdict"`
	}
	if err := json.Unmarshal([]byte(out), &cmp); err != nil {
		t.Fatal(err)
	}
	if !cmp.Differ || len(cmp.Pairs) != 3 {
		t.Fatalf("differ %v, %d pairs", cmp.Differ, len(cmp.Pairs))
	}
	for _, p := range cmp.Pairs {
		same := p.A+p.B == "AC"
		if p.Differ == same || p.PAdjusted < p.P || (same && !(p.CI[0] < 1 && 1 < p.CI[1])) {
			t.Errorf("pair %s–%s: ratio %.3f %v p %.3g adjusted %.3g differ %v", p.A, p.B, p.Ratio, p.CI, p.P, p.PAdjusted, p.Differ)
		}
	}
	if !strings.Contains(cmp.Verdict, "A and C: no significant difference") || strings.Contains(cmp.Verdict, "°C") {
		t.Errorf("verdict %q", cmp.Verdict)
	}
	code, out, _ = runCLI(t, "compare", dir, "--temperature-unit", "F")
	if code != 0 || !strings.Contains(out, "A and B differ") || !strings.Contains(out, "°F") || strings.Contains(out, "°C") {
		t.Errorf("°F text (exit %d):\n%s", code, out)
	}
	rep := filepath.Join(t.TempDir(), "rep")
	if code, _, errs := runCLI(t, "campaign", dir, "--out", rep, "--no-png", "--temperature-unit", "F"); code != 0 {
		t.Fatalf("campaign exit %d: %s", code, errs)
	}
	html, _ := os.ReadFile(filepath.Join(rep, "report.html"))
	sum, _ := os.ReadFile(filepath.Join(rep, "summary.txt"))
	for name, b := range map[string][]byte{"report.html": html, "summary.txt": sum} {
		s := string(b)
		if !strings.Contains(s, "A and C: no significant difference") || !strings.Contains(s, "Holm") || strings.Contains(s, "°C") {
			t.Errorf("%s lacks the pairwise verdict or writes °C", name)
		}
	}
	if !strings.Contains(string(html), "<td class=\"nw\">A – C</td>") {
		t.Error("report.html has no pair table")
	}
	if s := xlsxStrings(t, filepath.Join(rep, "results.xlsx")); !strings.Contains(s, "p adjusted (Holm)") || !strings.Contains(s, "no significant difference") {
		t.Error("results.xlsx has no pair table")
	}
}

// TestCelsiusReadAsKelvin: one coupon of a campaign has its 927 °C written
// as 927 K. The Arrhenius output names it, with how far it lies from the
// line through the others and the likely slip; the line's Q is flagged.
func TestCelsiusReadAsKelvin(t *testing.T) {
	dir := t.TempDir()
	rng := rand.New(rand.NewPCG(14, 2))
	for _, tc := range []float64{880, 910, 940, 970} {
		for rep := 1; rep <= 3; rep++ {
			erfCoupon(t, dir, fmt.Sprintf("L-%g-%d", tc, rep), "L", fmt.Sprintf("%g C", tc), tc+273.15, 4, 1, rng, "")
		}
	}
	erfCoupon(t, dir, "X-slip", "L", "927 K", 927+273.15, 4, 1, rng, "")
	code, out, errs := runCLI(t, "arrhenius", dir, "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var l struct {
		Warnings []struct{ Code, Message string } `json:"warnings"`
		Points   []struct {
			ID          string   `json:"id"`
			Studentized *float64 `json:"studentized_residual"`
			Cook        *float64 `json:"cooks_distance"`
			Leverage    *float64 `json:"leverage"`
		} `json:"points"`
	}
	if err := json.Unmarshal([]byte(out), &l); err != nil {
		t.Fatal(err)
	}
	codes := map[string]string{}
	for _, w := range l.Warnings {
		codes[w.Code] = w.Message
	}
	if m := codes["suspect-point"]; !strings.Contains(m, "Profile X-slip at 927 K lies") || !strings.Contains(m, "was its temperature 927 °C, not 927 K?") {
		t.Errorf("suspect point: %q", m)
	}
	if codes["q-unusual"] == "" && codes["q-interval-below-zero"] == "" {
		t.Errorf("Q not flagged: %v", codes)
	}
	for _, p := range l.Points {
		if p.Studentized == nil || p.Cook == nil || p.Leverage == nil {
			t.Errorf("%s lacks diagnostics", p.ID)
		}
	}
	// The people's text says it in the reader's unit beside the point.
	_, txt, _ := runCLI(t, "arrhenius", dir)
	if !strings.Contains(txt, "Profile X-slip at 653.85 °C (927 K) lies") || !strings.Contains(txt, "Cook's D") {
		t.Errorf("text:\n%s", txt)
	}
}

// TestReferenceIntervalCoversOffsetSteel: a part of a steel whose carbon
// diffuses 1.7 times faster than the handbook row, held 6 h at 885 °C,
// back-calculated from the reference table: the answer lies about 40 °C
// from the truth, and its interval — with the row's own spread — contains
// the truth. The headline says the answer rests on literature values.
func TestReferenceIntervalCoversOffsetSteel(t *testing.T) {
	dir := t.TempDir()
	rng := rand.New(rand.NewPCG(14, 3))
	Ttrue := 885 + 273.15
	part := erfCoupon(t, dir, "part-17", "P", "885 C", Ttrue, 6, 1.7, rng, "")
	code, out, errs := runCLI(t, "backcalc", part, "--solve", "temperature", "--time", "6h", "--reference", "C-in-gamma-Fe", "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var doc struct {
		Backcalc []struct {
			T struct {
				Value float64    `json:"value"`
				CI    [2]float64 `json:"ci"`
			} `json:"temperature_K"`
			Warnings    []struct{ Code string } `json:"warnings"`
			Calibration struct {
				Spread string `json:"spread"`
			} `json:"calibration"`
		} `json:"backcalc"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	s := doc.Backcalc[0]
	off := s.T.Value - Ttrue
	if math.Abs(off) < 30 || !(s.T.CI[0] <= Ttrue && Ttrue <= s.T.CI[1]) || !strings.Contains(s.Calibration.Spread, "factor 1.5") {
		t.Errorf("T %.1f K (truth %.2f, off %.1f K), CI %v, spread %q", s.T.Value, Ttrue, off, s.T.CI, s.Calibration.Spread)
	}
	t.Logf("reference back-calculation: %.1f K off the truth, 95 %% CI %.0f–%.0f K contains %.2f K", off, s.T.CI[0], s.T.CI[1], Ttrue)
	_, txt, _ := runCLI(t, "backcalc", part, "--solve", "temperature", "--time", "6h", "--reference", "C-in-gamma-Fe")
	if flat := strings.Join(strings.Fields(txt), " "); !strings.Contains(flat, "from literature values, not this laboratory's calibration") || !strings.Contains(flat, "calibrate") {
		t.Errorf("headline:\n%s", txt)
	}
	// The spread can be set; taken as exact, the interval no longer holds the truth.
	_, out, _ = runCLI(t, "backcalc", part, "--solve", "temperature", "--time", "6h", "--reference", "C-in-gamma-Fe",
		"--reference-spread", "1", "--reference-Q-uncertainty", "0%", "--format", "json")
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	if ci := doc.Backcalc[0].T.CI; ci[0] <= Ttrue {
		t.Errorf("without spread the interval %v still contains the truth: the check does not separate", ci)
	}
}

// TestKeepGoingBrokenFile: a folder with one broken file and one profile
// with values below a detection limit. Without --keep-going the broken
// file stops the run; with it, it is listed with its line and why, the
// rest is computed, and the exit status is 4.
func TestKeepGoingBrokenFile(t *testing.T) {
	dir := t.TempDir()
	rng := rand.New(rand.NewPCG(14, 4))
	for _, tc := range []float64{880, 910, 940, 970} {
		for rep, lot := range []string{"K", "M"} {
			erfCoupon(t, dir, fmt.Sprintf("K-%g-%d", tc, rep+1), lot, fmt.Sprintf("%g C", tc), tc+273.15, 4, 1, rng, "")
		}
	}
	broken := filepath.Join(dir, "broken.csv")
	os.WriteFile(broken, []byte("# id: broken\n# temperature: 900 C\n# time: 4 h\ndepth_mm,C_wt%\n0.1,0.9\n0.2,0.8x\n"), 0o644)
	// A coupon whose last two values are below the lab's detection limit.
	nd := erfCoupon(t, dir, "K-925-nd", "K", "925 C", 925+273.15, 4, 1, rng, "")
	b, _ := os.ReadFile(nd)
	lines := strings.Split(strings.TrimSpace(string(b)), "\n")
	lines[len(lines)-2] = strings.Split(lines[len(lines)-2], ",")[0] + ",<0.21"
	lines[len(lines)-1] = strings.Split(lines[len(lines)-1], ",")[0] + ",n.d."
	os.WriteFile(nd, []byte(strings.Join(lines, "\n")+"\n"), 0o644)

	if code, _, errs := runCLI(t, "fit", dir); code != 2 || !strings.Contains(errs, "broken.csv:6") {
		t.Errorf("without --keep-going: exit %d, %s", code, errs)
	}
	code, out, errs := runCLI(t, "fit", dir, "--keep-going", "--format", "json")
	if code != exitPartial || !strings.Contains(errs, "left out") {
		t.Errorf("fit --keep-going: exit %d, %s", code, errs)
	}
	var fits struct {
		Fits []struct {
			ID         string `json:"id"`
			BelowLimit []struct {
				Text string `json:"text"`
				Line int    `json:"line"`
			} `json:"below_limit"`
			Warnings []struct{ Code, Message string } `json:"warnings"`
		} `json:"fits"`
		NotRead []struct {
			File   string `json:"file"`
			Line   int    `json:"line"`
			Reason string `json:"reason"`
		} `json:"not_read"`
	}
	if err := json.Unmarshal([]byte(out), &fits); err != nil {
		t.Fatal(err)
	}
	if len(fits.Fits) != 9 || len(fits.NotRead) != 1 || fits.NotRead[0].Line != 6 || !strings.Contains(fits.NotRead[0].Reason, `"0.8x" is not a number`) {
		t.Errorf("%d fits, not read %+v", len(fits.Fits), fits.NotRead)
	}
	for _, f := range fits.Fits {
		if f.ID != "K-925-nd" {
			continue
		}
		warned := false
		for _, w := range f.Warnings {
			warned = warned || (w.Code == "below-detection-limit" && strings.Contains(w.Message, `"n.d."`))
		}
		if len(f.BelowLimit) != 2 || f.BelowLimit[0].Text != "<0.21" || f.BelowLimit[1].Line != 31 || !warned {
			t.Errorf("below limit %+v, warnings %+v", f.BelowLimit, f.Warnings)
		}
	}
	for _, cmd := range [][]string{{"arrhenius", dir, "--keep-going"}, {"compare", dir, "--keep-going"}} {
		code, out, _ := runCLI(t, cmd...)
		if code != exitPartial || !strings.Contains(out, "Not used:") || !strings.Contains(out, "broken.csv:6") {
			t.Errorf("%s: exit %d\n%s", cmd[0], code, out)
		}
	}
	rep := filepath.Join(t.TempDir(), "rep")
	code, _, errs = runCLI(t, "campaign", dir, "--out", rep, "--no-png", "--keep-going")
	if code != exitPartial {
		t.Fatalf("campaign --keep-going: exit %d, %s", code, errs)
	}
	html, _ := os.ReadFile(filepath.Join(rep, "report.html"))
	if !strings.Contains(string(html), `id="not-used"`) || !strings.Contains(string(html), "broken.csv:6") {
		t.Error("report.html lacks the Not used section")
	}
	var res struct {
		NotRead []struct{ File string } `json:"not_read"`
	}
	b, _ = os.ReadFile(filepath.Join(rep, "results.json"))
	if json.Unmarshal(b, &res) != nil || len(res.NotRead) != 1 {
		t.Errorf("results.json not_read %+v", res.NotRead)
	}
	// --below-limit refuse stops at the first such value, naming it.
	if code, _, errs := runCLI(t, "fit", nd, "--below-limit", "refuse"); code != 2 || !strings.Contains(errs, `"<0.21"`) {
		t.Errorf("refuse: exit %d %s", code, errs)
	}
}

// TestCaseDepthEverywhere: with a case-depth threshold the campaign writes
// the case depth with its interval and criterion into results.csv,
// report.html, results.xlsx and the profile figure; predict --figure draws
// the schedule.
func TestCaseDepthEverywhere(t *testing.T) {
	rep := filepath.Join(t.TempDir(), "rep")
	if code, _, errs := runCLI(t, "campaign", demoDir+"/coupons", "--out", rep, "--no-png", "--case-threshold", "0.35wt%"); code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	csv, _ := os.ReadFile(filepath.Join(rep, "results.csv"))
	head := strings.SplitN(string(csv), "\n", 2)[0]
	for _, col := range []string{"case_threshold", "case_level", "case_depth_m", "case_depth_ci_lo_m", "case_depth_ci_hi_m", "case_depth_from_data_m"} {
		if !strings.Contains(head, col) {
			t.Errorf("results.csv lacks %s", col)
		}
	}
	html, _ := os.ReadFile(filepath.Join(rep, "report.html"))
	if !strings.Contains(string(html), "case depth at 0.35wt%") || !strings.Contains(string(html), "Case depth at 0.35wt% (level 0.350 wt%)") {
		t.Error("report.html lacks the case depth")
	}
	if s := xlsxStrings(t, filepath.Join(rep, "results.xlsx")); !strings.Contains(s, "case depth 95 % CI low (mm)") {
		t.Error("results.xlsx lacks the case depth")
	}
	svg, _ := os.ReadFile(filepath.Join(rep, "figures", "profile-F7-2291-880-1.svg"))
	if !strings.Contains(string(svg), "case depth at 0.35wt%") || !strings.Contains(string(svg), "threshold level") {
		t.Error("profile figure lacks the case depth")
	}
	fig := filepath.Join(t.TempDir(), "plan.svg")
	code, out, errs := runCLI(t, "predict", "--calibration", goldenDir+"/arrhenius.json:BAR-2291", "--temperature", "925C", "--time", "5h",
		"--Cs", "1.0", "--C0", "0.2", "--case-threshold", "0.35wt%", "--figure", fig)
	b, _ := os.ReadFile(fig)
	if code != 0 || !strings.Contains(string(b), "prediction interval of a single part") || !strings.Contains(out, "single part") {
		t.Errorf("predict --figure: exit %d %s", code, errs)
	}
}

// TestSmallThings: the small things a user trips on (issue 14, item 9, and
// absurd inputs, item 7).
func TestSmallThings(t *testing.T) {
	good := demoDir + "/coupons/F7-2291-880-1.csv"
	cases := []struct {
		args []string
		code int
		want []string
	}{
		{[]string{"fit", good, "--resamples", "0", "--ci", "bootstrap"}, 2, []string{"--resamples 0", "at least 100"}},
		{[]string{"fit", demoDir + "/coupons", "--model", "erff"}, 2, []string{"numeric", "auto", " erf,", "masstransfer"}},
		{[]string{"fit", demoDir + "/coupons", "--fix", "Q=1"}, 2, []string{"12 profiles could not be fitted", "F7-2291-880-1, F7-2291-880-2", `no parameter "Q"`}},
		{[]string{"fit", good, "--history", "h.csv", "--Q", "142"}, 2, []string{`"142" has no unit`, "142kJ/mol"}},
		{[]string{"predict", "--D0", "2.3e-5", "--Q", "142J/mol", "--temperature", "925C", "--time", "4h", "--Cs", "1", "--C0", "0.2"}, 2, []string{"below any activation energy"}},
		{[]string{"predict", "--reference", "C-in-gamma-Fe", "--temperature", "1e308K", "--time", "4h", "--Cs", "1", "--C0", "0.2"}, 2, []string{"above 6000 K"}},
	}
	for _, c := range cases {
		code, _, errs := runCLI(t, c.args...)
		if code != c.code || strings.Count(errs, "fickfit:") != 1 {
			t.Errorf("%v: exit %d (want %d), %d messages: %s", c.args, code, c.code, strings.Count(errs, "fickfit:"), errs)
		}
		for _, w := range c.want {
			if n := strings.Count(errs, w); n != 1 {
				t.Errorf("%v: message has %q %d times (want once): %s", c.args, w, n, errs)
			}
		}
	}
	// A couple written with x_um is told about position_um at once.
	dir := t.TempDir()
	couple := filepath.Join(dir, "couple.csv")
	os.WriteFile(couple, []byte("# time: 100 h\nx_um,Ni_at%\n-50,99\n-20,90\n0,50\n20,10\n50,1\n"), 0o644)
	if code, _, errs := runCLI(t, "matano", couple); code != 2 || !strings.Contains(errs, `"position_um"`) {
		t.Errorf("x_um: exit %d %s", code, errs)
	}
	// A part marked unknown: time is not also warned time-missing.
	rng := rand.New(rand.NewPCG(14, 5))
	cdir := t.TempDir()
	for _, tc := range []float64{880, 910, 940, 970} {
		erfCoupon(t, cdir, fmt.Sprintf("U-%g", tc), "U", fmt.Sprintf("%g C", tc), tc+273.15, 4, 1, rng, "")
	}
	part := erfCoupon(t, cdir, "part-t", "U", "925 C", 925+273.15, 5, 1, rng, "# unknown: time\n")
	b, _ := os.ReadFile(part)
	os.WriteFile(part, []byte(strings.Replace(string(b), "# time: 5 h\n", "", 1)), 0o644)
	rep := filepath.Join(t.TempDir(), "rep")
	if code, _, errs := runCLI(t, "campaign", cdir, "--out", rep, "--no-png"); code != 0 {
		t.Fatalf("campaign exit %d %s", code, errs)
	}
	sum, _ := os.ReadFile(filepath.Join(rep, "summary.txt"))
	if strings.Contains(string(sum), "time-missing") || !strings.Contains(string(sum), "part-t") {
		t.Errorf("unknown: time part warned time-missing:\n%s", sum)
	}
	// A furnace log with a single-sample spike is flagged.
	log := filepath.Join(dir, "log.csv")
	os.WriteFile(log, []byte("time_h,temperature_C\n0,20\n1,925\n2,925\n2.5,1500\n3,925\n4,925\n5,20\n"), 0o644)
	code, out, _ := runCLI(t, "predict", "--reference", "C-in-gamma-Fe", "--history", log, "--Cs", "1", "--C0", "0.2", "--points", "3")
	if code != 0 || !strings.Contains(out, "single-sample spike") || !strings.Contains(out, "line 5") {
		t.Errorf("spike: exit %d\n%s", code, out)
	}
}

// TestHardnessCalibrationClamp: a traverse whose core reads a few HV below
// the calibration's lowest point is fitted, the readings clamped with a
// warning and a count; one far outside is left out with its line.
func TestHardnessCalibrationClamp(t *testing.T) {
	dir := t.TempDir()
	cal := filepath.Join(dir, "cal.csv")
	os.WriteFile(cal, []byte("HV0.5,C_wt%\n300,0.2\n450,0.35\n600,0.5\n750,0.65\n850,0.8\n"), 0o644)
	var b strings.Builder
	b.WriteString("# id: T1\n# temperature: 925 C\n# time: 5 h\ndepth_mm,HV0.5\n")
	D, tt := simD0*math.Exp(-simQ/(arrhenius.R*1198.15)), 5*3600.0
	rng := rand.New(rand.NewPCG(14, 6))
	for i := 1; i <= 24; i++ {
		x := 2.0 * float64(i) / 24
		c := 0.8 + (0.2-0.8)*math.Erf(x*1e-3/(2*math.Sqrt(D*tt)))
		hv := 300 + (c-0.2)*1000 + 4*rng.NormFloat64()
		if i == 24 {
			hv = 291 // a few HV below the calibration's lowest point: core scatter
		}
		if i == 23 {
			hv = 150 // far outside: a bad reading
		}
		fmt.Fprintf(&b, "%.3f,%.1f\n", x, hv)
	}
	tr := filepath.Join(dir, "t1.csv")
	os.WriteFile(tr, []byte(b.String()), 0o644)
	code, out, errs := runCLI(t, "fit", tr, "--hardness-calibration", cal, "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var fits struct {
		Fits []struct {
			Stats    struct{ N int } `json:"stats"`
			Warnings []struct{ Code, Message string }
		} `json:"fits"`
	}
	json.Unmarshal([]byte(out), &fits)
	got := map[string]string{}
	for _, w := range fits.Fits[0].Warnings {
		got[w.Code] = w.Message
	}
	if fits.Fits[0].Stats.N != 23 || !strings.Contains(got["calibration-clamped"], "291 HV0.5") ||
		!strings.Contains(got["calibration-out-of-range"], "line 27") {
		t.Errorf("n %d, warnings %v", fits.Fits[0].Stats.N, got)
	}
}

// xlsxStrings returns the shared strings of a workbook as one string.
func xlsxStrings(t *testing.T, path string) string {
	t.Helper()
	b, err := readZipMember(path, "xl/sharedStrings.xml")
	if err != nil {
		t.Fatal(err)
	}
	return string(b)
}

// readZipMember reads one member of a zip archive (a workbook).
func readZipMember(path, name string) ([]byte, error) {
	z, err := zip.OpenReader(path)
	if err != nil {
		return nil, err
	}
	defer z.Close()
	for _, f := range z.File {
		if f.Name == name {
			r, err := f.Open()
			if err != nil {
				return nil, err
			}
			defer r.Close()
			return io.ReadAll(r)
		}
	}
	return nil, fmt.Errorf("%s: no member %s", path, name)
}

// TestFahrenheitCampaignSentences: a °F campaign in which one lot was
// treated at a single temperature (1725 °F, 1213.7055… K): no output file
// writes °C, a raw floating-point kelvin value, +Inf or an unrendered
// temperature mark; the reasons are said in °F (kelvin in JSON).
func TestFahrenheitCampaignSentences(t *testing.T) {
	dir := threeLotCampaign(t)
	rng := rand.New(rand.NewPCG(14, 7))
	for rep := 1; rep <= 2; rep++ {
		erfCoupon(t, dir, fmt.Sprintf("D-1725F-%d", rep), "D", "1725 F", (1725+459.67)*5/9, 4, 1, rng, "")
	}
	rep := filepath.Join(t.TempDir(), "rep")
	code, out, errs := runCLI(t, "campaign", dir, "--out", rep, "--no-png", "--temperature-unit", "F")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	if !strings.Contains(out, "one temperature (1725 °F (1213.71 K))") {
		t.Errorf("summary does not give the lot's temperature in °F:\n%s", out)
	}
	filepath.Walk(rep, func(p string, fi os.FileInfo, err error) error {
		if err != nil || fi.IsDir() {
			return nil
		}
		var b []byte
		if strings.HasSuffix(p, ".xlsx") {
			b = []byte(xlsxStrings(t, p))
		} else {
			b, _ = os.ReadFile(p)
		}
		s := string(b)
		machine := strings.HasSuffix(p, ".json") || strings.HasSuffix(p, ".csv")
		for _, bad := range []string{"1213.7055", "⟦", "+Inf"} {
			// Machine files keep every temperature in full (temperature_K).
			if strings.Contains(s, bad) && !(machine && bad == "1213.7055") {
				t.Errorf("%s contains %q", filepath.Base(p), bad)
			}
		}
		if i := strings.Index(s, "°C"); !machine && i >= 0 {
			t.Errorf("%s writes °C in a °F campaign: …%s…", filepath.Base(p), s[max(0, i-80):i+4])
		}
		return nil
	})
}
