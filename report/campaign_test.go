package report

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"testing/fstest"

	"github.com/fickfit/fickfit/campaign"
	"github.com/fickfit/fickfit/fit"
	"github.com/fickfit/fickfit/profile"
)

// campaignOpts are fast options for tests: Wald intervals.
func campaignOpts() campaign.Options {
	return campaign.Options{Fit: fit.Options{CI: "wald"}, References: []string{"C-in-gamma-Fe"}, Version: "test"}
}

// runCampaign runs a campaign on invented files and returns its report.
func runCampaign(t testing.TB, reps int) (*CampaignReport, []string) {
	t.Helper()
	dir := t.TempDir()
	paths := writeCampaignFiles(t, dir, 11, reps)
	res, err := campaign.Run(paths, campaignOpts())
	if err != nil {
		t.Fatal(err)
	}
	return &CampaignReport{Result: res}, paths
}

func TestCampaign(t *testing.T) {
	res, paths := runCampaign(t, 2)
	if got, want := len(res.Profiles), 2*4*2+1; got != want {
		t.Fatalf("%d profiles, want %d", got, want)
	}
	if len(res.Failed) != 0 {
		t.Fatalf("failed fits: %+v", res.Failed)
	}
	if len(res.Inputs) != len(paths) {
		t.Errorf("%d inputs recorded, want %d", len(res.Inputs), len(paths))
	}
	for _, in := range res.Inputs {
		b, _ := os.ReadFile(in.Name)
		sum := sha256.Sum256(b)
		if in.SHA256 != hex.EncodeToString(sum[:]) || in.Bytes != int64(len(b)) {
			t.Errorf("%s: audit hash or size wrong", in.Name)
		}
	}
	// Sorted by lot, unknown part last.
	if res.Profiles[0].Lot != "L1" || res.Profiles[len(res.Profiles)-1].ID != "part-1" {
		t.Errorf("order: first %s, last %s", res.Profiles[0].ID, res.Profiles[len(res.Profiles)-1].ID)
	}
	if res.Lines == nil || len(res.Lines.Lines) != 2 {
		t.Fatalf("want 2 Arrhenius lines, got %+v (errors %+v)", res.Lines, res.LineErrors)
	}
	for _, l := range res.Lines.Lines {
		if len(l.Points) != 8 {
			t.Errorf("line %s has %d points, want 8", l.Group, len(l.Points))
		}
		for _, p := range l.Points {
			if p.ID == "part-1" {
				t.Error("the unknown part entered the calibration")
			}
		}
		// Self-check (parameter recovery on invented data): Q within 15 kJ/mol of the generating value.
		want := map[string]float64{"L1": 142e3, "L2": 145.5e3}[l.Group]
		if math.Abs(l.Q-want) > 15e3 {
			t.Errorf("lot %s: Q = %.0f J/mol, generated with %.0f", l.Group, l.Q, want)
		}
	}
	if res.Comparison == nil {
		t.Fatalf("no lot comparison: %s", res.ComparisonError)
	}
	if len(res.Parts) != 1 || res.Parts[0].Solution == nil {
		t.Fatalf("parts: %+v", res.Parts)
	}
	p := res.Parts[0]
	if p.SolveFor != "temperature" || p.Group != "L1" {
		t.Errorf("part solved for %q with group %q", p.SolveFor, p.Group)
	}
	// Self-check: the part was generated at 926 °C.
	if T := p.Solution.Temperature.Value; math.Abs(T-(926+273.15)) > 15 {
		t.Errorf("back-calculated T = %.1f K, generated at 1199.15 K", T)
	}
}

func TestCampaignDeterministic(t *testing.T) {
	dir := t.TempDir()
	paths := writeCampaignFiles(t, dir, 12, 1)
	outs := [2]string{filepath.Join(t.TempDir(), "a"), filepath.Join(t.TempDir(), "b")}
	for _, out := range outs {
		res, err := campaign.Run(paths, campaignOpts())
		if err != nil {
			t.Fatal(err)
		}
		if _, err := WriteCampaign(out, res, CampaignOptions{NoPNG: true}); err != nil {
			t.Fatal(err)
		}
	}
	for _, name := range []string{FileJSON, FileCSV, FileResiduals, FileArrhenius, FileBackcalc, FileSummary, FileHTML} {
		a, err1 := os.ReadFile(filepath.Join(outs[0], name))
		b, err2 := os.ReadFile(filepath.Join(outs[1], name))
		if err1 != nil || err2 != nil {
			t.Fatalf("%s: %v %v", name, err1, err2)
		}
		if !bytes.Equal(a, b) {
			t.Errorf("%s differs between two runs on the same inputs", name)
		}
	}
	var doc map[string]json.RawMessage
	b, _ := os.ReadFile(filepath.Join(outs[0], FileJSON))
	if err := json.Unmarshal(b, &doc); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"fickfit_version", "inputs", "options", "fits", "failed", "arrhenius", "lot_comparison", "backcalc", "notes", "cautions"} {
		if _, ok := doc[k]; !ok {
			t.Errorf("results.json lacks %q", k)
		}
	}
}

func TestWriteCampaignFiles(t *testing.T) {
	res, paths := runCampaign(t, 1)
	out := filepath.Join(t.TempDir(), "report")
	var stages []string
	opts := CampaignOptions{Progress: func(stage string, done, total int) {
		if done > total {
			t.Errorf("progress %s: %d of %d", stage, done, total)
		}
		if len(stages) == 0 || stages[len(stages)-1] != stage {
			stages = append(stages, stage)
		}
	}}
	files, err := WriteCampaign(out, res.Result, opts)
	if err != nil {
		t.Fatal(err)
	}
	if got := strings.Join(stages, ","); got != "figures,workbook,write" {
		t.Errorf("progress stages %s, want figures,workbook,write", got)
	}
	want := map[string]bool{FileJSON: true, FileCSV: true, FileResiduals: true, FileArrhenius: true, FileBackcalc: true,
		FileSummary: true, FileWorkbook: true, FileHTML: true,
		"figures/arrhenius.svg": true, "figures/arrhenius.png": true, "figures/lots.svg": true, "figures/lots.png": true,
		"figures/profile-part-1.svg": true, "figures/profile-L1-880-1.png": true}
	got := map[string]bool{}
	for _, f := range files {
		rel, _ := filepath.Rel(out, f)
		got[filepath.ToSlash(rel)] = true
		if fi, err := os.Stat(f); err != nil || fi.Size() == 0 {
			t.Errorf("%s missing or empty", f)
		}
	}
	for w := range want {
		if !got[w] {
			t.Errorf("%s not written", w)
		}
	}
	if n := len(res.Results); len(files) != 8+2*(n+2) {
		t.Errorf("%d files written, want %d", len(files), 8+2*(n+2))
	}
	// No temporary files left behind.
	filepath.Walk(out, func(p string, fi os.FileInfo, err error) error {
		if strings.Contains(filepath.Base(p), ".tmp-") {
			t.Errorf("left-over temporary file %s", p)
		}
		return nil
	})
	// A second run without Force refuses and changes nothing.
	before, _ := os.ReadFile(filepath.Join(out, FileJSON))
	if _, err := WriteCampaign(out, res.Result, CampaignOptions{}); !errors.Is(err, ErrExists) {
		t.Errorf("rewrite without Force: %v, want ErrExists", err)
	}
	after, _ := os.ReadFile(filepath.Join(out, FileJSON))
	if !bytes.Equal(before, after) {
		t.Error("refused run changed results.json")
	}
	if _, err := WriteCampaign(out, res.Result, CampaignOptions{Force: true}); err != nil {
		t.Errorf("rewrite with Force: %v", err)
	}
	// An input inside the output folder with an output's name is never replaced.
	inDir := filepath.Dir(paths[0])
	input := filepath.Join(inDir, FileCSV)
	os.WriteFile(input, []byte("depth_mm,C_wt%\n0.1,0.5\n"), 0o644)
	res.Inputs = append(res.Inputs, campaign.InputFile{Name: input})
	if _, err := WriteCampaign(inDir, res.Result, CampaignOptions{Force: true}); !errors.Is(err, ErrWouldOverwriteInput) {
		t.Errorf("writing over an input: %v, want ErrWouldOverwriteInput", err)
	}
	if b, _ := os.ReadFile(input); string(b) != "depth_mm,C_wt%\n0.1,0.5\n" {
		t.Error("input file changed")
	}
}

func TestCampaignFS(t *testing.T) {
	dir := t.TempDir()
	writeCampaignFiles(t, dir, 13, 1)
	o := campaignOpts()
	var stages []string
	o.Progress = func(stage string, done, total int) {
		if len(stages) == 0 || stages[len(stages)-1] != stage {
			stages = append(stages, stage)
		}
	}
	res, err := campaign.RunFS(os.DirFS(dir), o)
	if err != nil {
		t.Fatal(err)
	}
	if got := strings.Join(stages, ","); got != "read,fit,arrhenius" {
		t.Errorf("progress stages %s", got)
	}
	if len(res.Results) != 9 || len(res.Parts) != 1 {
		t.Errorf("%d fits, %d parts", len(res.Results), len(res.Parts))
	}
	for _, in := range res.Inputs {
		if filepath.IsAbs(in.Name) || len(in.SHA256) != 64 {
			t.Errorf("input %+v", in)
		}
	}
	// The same id in two files is an error naming both.
	b, _ := os.ReadFile(filepath.Join(dir, "L1-880-1.csv"))
	fsys := fstest.MapFS{"a/one.csv": {Data: b}, "b/two.csv": {Data: b}}
	if _, err := campaign.RunFS(fsys, campaignOpts()); !errors.Is(err, profile.ErrDuplicate) || !strings.Contains(err.Error(), "a/one.csv") {
		t.Errorf("duplicate ids: %v", err)
	}
	if _, err := campaign.RunFS(fstest.MapFS{"book.xlsx": {Data: []byte("PK")}}, campaignOpts()); !errors.Is(err, fit.ErrBadInput) {
		t.Errorf("workbook in FS: %v", err)
	}
	if _, err := campaign.RunFS(fstest.MapFS{"notes.md": {Data: []byte("x")}}, campaignOpts()); err == nil {
		t.Error("no profile files: no error")
	}
}

func TestCampaignBadInput(t *testing.T) {
	dir := t.TempDir()
	paths := writeCampaignFiles(t, dir, 14, 1)
	o := campaignOpts()
	o.References = []string{"unobtainium-in-Fe"}
	if _, err := campaign.Run(paths, o); !errors.Is(err, fit.ErrBadInput) {
		t.Errorf("unknown reference: %v", err)
	}
	if _, err := campaign.Run(nil, campaignOpts()); !errors.Is(err, fit.ErrBadInput) {
		t.Errorf("no inputs: %v", err)
	}
	bad := filepath.Join(dir, "bad.csv")
	os.WriteFile(bad, []byte("depth_mm,C_wt%\n0.1,abc\n"), 0o644)
	_, err := campaign.Run([]string{bad}, campaignOpts())
	var pe *profile.Error
	if !errors.As(err, &pe) || pe.Line != 2 {
		t.Errorf("bad cell: %v (want a profile.Error at line 2)", err)
	}
}

func TestCampaignPartWithoutCalibration(t *testing.T) {
	dir := t.TempDir()
	paths := writeCampaignFiles(t, dir, 15, 1)
	// A part of a lot with no calibration profiles.
	b, _ := os.ReadFile(filepath.Join(dir, "part-1.csv"))
	other := strings.Replace(strings.Replace(string(b), "# lot: L1", "# lot: L9", 1), "# id: part-1", "# id: part-9", 1)
	p9 := filepath.Join(dir, "part-9.csv")
	os.WriteFile(p9, []byte(other), 0o644)
	res, err := campaign.Run(append(paths, p9), campaignOpts())
	if err != nil {
		t.Fatal(err)
	}
	var found bool
	for _, p := range res.Parts {
		if p.ID == "part-9" {
			found = true
			if p.Solution != nil || !strings.Contains(p.Error, "no Arrhenius line for lot L9") {
				t.Errorf("part-9: %+v", p)
			}
		}
	}
	if !found {
		t.Error("part-9 not reported")
	}
}

func TestCampaignSummary(t *testing.T) {
	res, _ := runCampaign(t, 1)
	var b bytes.Buffer
	if err := res.WriteSummary(&b, TextOptions{}); err != nil {
		t.Fatal(err)
	}
	out := b.String()
	for _, want := range []string{"Profiles", "L1-880-1", "Arrhenius lines (two-stage, 95 % CI)", "lot L1: D0 = ", "kJ/mol",
		"Lot comparison by lot", "Back-calculated parts", "part-1 (lot L1): T = ", "°C", "Cautions:", "metallography"} {
		if !strings.Contains(out, want) {
			t.Errorf("summary lacks %q:\n%s", want, out)
		}
	}
}

func TestCampaignFolder(t *testing.T) {
	// A folder stands for its profile files; hidden files, spreadsheet lock
	// files and other extensions are skipped, as profile.ReadAll does.
	dir := t.TempDir()
	writeCampaignFiles(t, dir, 16, 1)
	os.WriteFile(filepath.Join(dir, ".hidden.csv"), []byte("junk"), 0o644)
	os.WriteFile(filepath.Join(dir, "~$lock.xlsx"), []byte("junk"), 0o644)
	os.WriteFile(filepath.Join(dir, "notes.md"), []byte("junk"), 0o644)
	os.Mkdir(filepath.Join(dir, "sub"), 0o755)
	res, err := campaign.Run([]string{dir}, campaignOpts())
	if err != nil {
		t.Fatal(err)
	}
	if len(res.Inputs) != 6 { // 4 L1 coupons, the part, the long table
		t.Errorf("%d inputs hashed: %+v", len(res.Inputs), res.Inputs)
	}
	for _, in := range res.Inputs {
		if strings.Contains(in.Name, "hidden") || strings.Contains(in.Name, "lock") || strings.HasSuffix(in.Name, ".md") {
			t.Errorf("%s should have been skipped", in.Name)
		}
	}
	if _, err := campaign.Run([]string{filepath.Join(dir, "missing.csv")}, campaignOpts()); err == nil {
		t.Error("missing file: no error")
	}
}

func TestCampaignOneLineAndFailures(t *testing.T) {
	dir := t.TempDir()
	paths := writeCampaignFiles(t, dir, 17, 1)
	// A coupon with too few points for the model: reported, not fatal.
	short := filepath.Join(dir, "short.csv")
	os.WriteFile(short, []byte("# id: S1\n# lot: L1\n# temperature: 900 C\n# time: 4 h\ndepth_mm,C_wt%\n0.1,0.8\n0.3,0.5\n0.6,0.3\n"), 0o644)
	o := campaignOpts()
	o.By = "none"
	res, err := campaign.Run(append(paths, short), o)
	if err != nil {
		t.Fatal(err)
	}
	if len(res.Failed) != 1 || res.Failed[0].ID != "S1" || res.Failed[0].Kind != "bad input" {
		t.Errorf("failed: %+v", res.Failed)
	}
	if res.Lines == nil || len(res.Lines.Lines) != 1 || res.Lines.Lines[0].Group != "" {
		t.Fatalf("one line through all profiles expected: %+v", res.Lines)
	}
	if res.Comparison != nil {
		t.Error("a comparison with a single group")
	}
	if len(res.Parts) != 1 || res.Parts[0].Solution == nil {
		t.Errorf("the part is back-calculated from the single line: %+v", res.Parts)
	}
	out := filepath.Join(t.TempDir(), "r")
	files, err := WriteCampaign(out, res, CampaignOptions{NoPNG: true})
	if err != nil {
		t.Fatal(err)
	}
	for _, f := range files {
		if strings.Contains(f, "lots.") {
			t.Error("lots figure written without a comparison")
		}
	}
	html, _ := os.ReadFile(filepath.Join(out, FileHTML))
	if !strings.Contains(string(html), "not fitted: ") || strings.Contains(string(html), `id="lots"`) {
		t.Error("HTML: failed profile missing or an empty lots section")
	}
	var sum bytes.Buffer
	(&CampaignReport{Result: res}).WriteSummary(&sum, TextOptions{NoCautions: true})
	if !strings.Contains(sum.String(), "not fitted: S1") || strings.Contains(sum.String(), "Cautions") {
		t.Errorf("summary:\n%s", sum.String())
	}
}
