package report

import (
	"bytes"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/xuri/excelize/v2"

	"github.com/fickfit/fickfit/fit"
)

// TestLargeCampaignShowsFlaggedProfiles: above the limit, every profile
// stays in the tables, and figures (SVG only), report.html sections and
// workbook sheets go to the parts marked unknown first, then the profiles
// with a warning, at most maxDetailed; the report says so (common
// practice, no source).
func TestLargeCampaignShowsFlaggedProfiles(t *testing.T) {
	res, _ := runCampaign(t, 2)
	defer func(e, m int) { everyProfileLimit, maxDetailed = e, m }(everyProfileLimit, maxDetailed)
	everyProfileLimit, maxDetailed = 5, 3
	// Give two ordinary profiles a warning, so that parts and warnings compete.
	var ordinary []*fit.Result
	for _, r := range res.Results {
		if len(r.Warnings) == 0 && r.ID != "part-1" {
			ordinary = append(ordinary, r)
		}
	}
	for _, r := range ordinary[:3] {
		r.Warn("residual-pattern", "test warning")
	}
	d := res.details()
	if d.every || len(d.shown) != 3 || d.flagged < 4 {
		t.Fatalf("details: every %v, %d shown, %d flagged", d.every, len(d.shown), d.flagged)
	}
	for _, r := range res.Results {
		if r.ID == "part-1" && !d.shows(r) {
			t.Error("the unknown part is not shown")
		}
	}
	dir := filepath.Join(t.TempDir(), "out")
	if _, err := WriteCampaign(dir, res.Result, CampaignOptions{}); err != nil {
		t.Fatal(err)
	}
	figs, _ := os.ReadDir(filepath.Join(dir, DirFigures))
	svg, png := 0, 0
	for _, e := range figs {
		n := e.Name()
		if strings.HasPrefix(n, "profile-") {
			if strings.HasSuffix(n, ".svg") {
				svg++
			} else {
				png++
			}
		}
	}
	if svg != 3 || png != 0 {
		t.Errorf("%d profile SVG and %d PNG figures, want 3 and 0", svg, png)
	}
	if _, err := os.Stat(filepath.Join(dir, DirFigures, "arrhenius.png")); err != nil {
		t.Error("the Arrhenius figure has no PNG")
	}
	html, err := os.ReadFile(filepath.Join(dir, FileHTML))
	if err != nil {
		t.Fatal(err)
	}
	h := string(html)
	if n := strings.Count(h, `<article class="profile"`); n != 3 {
		t.Errorf("%d profile sections, want 3", n)
	}
	for _, r := range res.Results {
		if !strings.Contains(h, ">"+r.ID+"<") {
			t.Errorf("profile %s missing from the summary table", r.ID)
		}
	}
	if !strings.Contains(h, "at most 3 of them") || strings.Count(h, `">figure</a>`) != 3 {
		t.Error("report.html does not state the rule or link the figures")
	}
	book, err := os.ReadFile(filepath.Join(dir, FileWorkbook))
	if err != nil {
		t.Fatal(err)
	}
	f, err := excelize.OpenReader(bytes.NewReader(book))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	sheets := 0
	for _, s := range f.GetSheetList() {
		for _, r := range res.Results {
			if s == r.ID {
				sheets++
			}
		}
	}
	if sheets != 3 {
		t.Errorf("%d profile sheets, want 3", sheets)
	}
	rows, _ := f.GetRows(SheetSummary)
	if len(rows) != 1+len(res.Results)+len(res.Failed) {
		t.Errorf("summary sheet has %d rows for %d profiles", len(rows), len(res.Results))
	}
}
