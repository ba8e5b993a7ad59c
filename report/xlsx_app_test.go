package report

import (
	"bytes"
	"context"
	"fmt"
	"image"
	"image/color"
	"image/png"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/xuri/excelize/v2"

	"github.com/fickfit/fickfit"
	"github.com/fickfit/fickfit/campaign"
	"github.com/fickfit/fickfit/fit"
)

// needTool returns the path of the first of names on PATH. A missing tool
// fails the test in CI (CI=true: .ci/run installs it) and skips it
// elsewhere.
func needTool(t *testing.T, why string, names ...string) string {
	t.Helper()
	for _, n := range names {
		if p, err := exec.LookPath(n); err == nil {
			return p
		}
	}
	if os.Getenv("CI") == "true" {
		t.Fatalf("%s not found (%s): CI must install it; .ci/run installs libreoffice-calc-nogui and poppler-utils from Debian", names[0], why)
	}
	t.Skipf("%s not installed (%s); this check runs in CI", names[0], why)
	return ""
}

// TestWorkbookInSpreadsheetApp opens the demo workbook the way a lab opens
// it: LibreOffice Calc (headless) prints it to PDF, poppler renders the
// pages, and the test looks at what a reader sees. The workbook is the demo
// campaign's, trimmed to two profile sheets (the first coupon and the
// unknown part) beside the summary, Arrhenius, lot-comparison,
// back-calculation and audit sheets, to keep the conversion short.
func TestWorkbookInSpreadsheetApp(t *testing.T) {
	if testing.Short() {
		t.Skip("-short: the spreadsheet application is not started")
	}
	soffice := needTool(t, "LibreOffice Calc, to print the workbook", "soffice", "libreoffice")
	pdftoppm := needTool(t, "poppler-utils, to render the printed pages", "pdftoppm")
	pdftotext := needTool(t, "poppler-utils, to read the printed pages", "pdftotext")

	res, err := campaign.RunFS(fickfit.Demo(), campaign.Options{Fit: fit.Options{CI: "wald"}, Version: "test"})
	if err != nil {
		t.Fatal(err)
	}
	trimmed := *res
	trimmed.Results = []*fit.Result{res.Results[0], res.Results[len(res.Results)-1]}
	rep := &CampaignReport{Result: &trimmed}
	var wb bytes.Buffer
	if err := rep.WriteWorkbook(&wb, CampaignOptions{}); err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	book := filepath.Join(dir, "demo.xlsx")
	if err := os.WriteFile(book, wb.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}

	// The cell formats, read back: counts are integers, D scientific with
	// three or four significant digits, levels fixed with their digits.
	f, err := excelize.OpenReader(bytes.NewReader(wb.Bytes()))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	format := func(sheet, ref string) string {
		t.Helper()
		id, err := f.GetCellStyle(sheet, ref)
		if err != nil {
			t.Fatal(err)
		}
		st, err := f.GetStyle(id)
		if err != nil {
			t.Fatal(err)
		}
		if st.CustomNumFmt != nil {
			return *st.CustomNumFmt
		}
		return map[int]string{0: "General", 1: "0", 2: "0.00"}[st.NumFmt]
	}
	findRow := func(sheet, label string) int {
		t.Helper()
		rows, _ := f.GetRows(sheet)
		for i, row := range rows {
			if len(row) > 0 && row[0] == label {
				return i + 1
			}
		}
		t.Fatalf("%s: no row %q", sheet, label)
		return 0
	}
	sciDigits := regexp.MustCompile(`^0\.(0{2,3})E\+00$`)
	for _, r := range trimmed.Results {
		for _, name := range []string{"n", "dof", "iterations"} {
			if got := format(r.ID, cell(2, findRow(r.ID, name))); got != "0" {
				t.Errorf("%s: %s formatted %q, want an integer", r.ID, name, got)
			}
		}
		if got := format(r.ID, cell(2, findRow(r.ID, "D"))); !sciDigits.MatchString(got) {
			t.Errorf("%s: D formatted %q, want scientific with 3 or 4 significant digits", r.ID, got)
		}
		cs := r.Param("Cs")
		want := xlNumFmt(cs.Value, paramLast(cs.Value, cs.CI, cs.Fixed))
		if got := format(r.ID, cell(2, findRow(r.ID, "Cs"))); got != want || strings.Contains(got, "E") {
			t.Errorf("%s: Cs formatted %q, want fixed %q (the HTML's digits)", r.ID, got, want)
		}
	}
	header, _ := f.GetRows(SheetSummary)
	nCol := 0
	for i, h := range header[0] {
		if h == "n" {
			nCol = i + 1
		}
	}
	if nCol == 0 {
		t.Fatalf("the summary has no column n: %q", header[0])
	}
	if got := format(SheetSummary, cell(nCol, 2)); got != "0" {
		t.Errorf("summary n formatted %q, want an integer", got)
	}
	for _, col := range []int{9, 10, 11} { // points, temperatures, dof
		if got := format(SheetArrhenius, cell(col, 3)); got != "0" {
			t.Errorf("Arrhenius %s3 formatted %q, want an integer", colName(col), got)
		}
	}

	// Print it.
	ctx, cancel := context.WithTimeout(context.Background(), 5*time.Minute)
	defer cancel()
	start := time.Now()
	cmd := exec.CommandContext(ctx, soffice, "-env:UserInstallation=file://"+filepath.ToSlash(filepath.Join(dir, "lo-profile")),
		"--headless", "--norestore", "--nolockcheck", "--convert-to", "pdf", "--outdir", dir, book)
	// A private home and profile (no clash with a running LibreOffice), and
	// one locale, so that the printed numbers read the same everywhere.
	cmd.Env = append(os.Environ(), "HOME="+dir, "LC_ALL=C.UTF-8")
	if out, err := cmd.CombinedOutput(); err != nil {
		t.Fatalf("LibreOffice: %v\n%s", err, out)
	}
	t.Logf("LibreOffice printed the workbook in %.1f s", time.Since(start).Seconds())
	pdf := filepath.Join(dir, "demo.pdf")
	text, err := exec.CommandContext(ctx, pdftotext, "-layout", pdf, "-").Output()
	if err != nil {
		t.Fatalf("pdftotext: %v", err)
	}
	pages := strings.Split(strings.TrimRight(string(text), "\f"), "\f")

	// Each page names its sheet in the footer ("fickfit test  <sheet>  page i of n").
	footer := regexp.MustCompile(`fickfit test\s+(.+?)\s+page (\d+) of (\d+)\s*$`)
	sheetPages := map[string][]int{}
	for i, p := range pages {
		m := footer.FindStringSubmatch(strings.TrimRight(p, "\n "))
		if m == nil {
			t.Fatalf("page %d has no footer naming its sheet:\n%s", i+1, p)
		}
		sheetPages[m[1]] = append(sheetPages[m[1]], i+1)
	}
	t.Logf("%d printed pages: %v", len(pages), sheetPages)

	render := func(page int) image.Image {
		t.Helper()
		base := filepath.Join(dir, fmt.Sprintf("page%d", page))
		if out, err := exec.CommandContext(ctx, pdftoppm, "-r", "100", "-png", "-singlefile", "-f", strconv.Itoa(page), "-l", strconv.Itoa(page),
			pdf, base).CombinedOutput(); err != nil {
			t.Fatalf("pdftoppm: %v\n%s", err, out)
		}
		b, err := os.ReadFile(base + ".png")
		if err != nil {
			t.Fatal(err)
		}
		img, err := png.Decode(bytes.NewReader(b))
		if err != nil {
			t.Fatal(err)
		}
		return img
	}

	for _, r := range trimmed.Results {
		ps := sheetPages[r.ID]
		// One page per profile sheet, with its chart.
		if len(ps) != 1 {
			t.Errorf("profile sheet %s prints on %d pages (%v), want 1", r.ID, len(ps), ps)
			continue
		}
		page := pages[ps[0]-1]
		if !strings.Contains(page, r.ID+" — ") || !strings.Contains(page, "against depth") {
			t.Errorf("%s: the chart's title is not on the sheet's page", r.ID)
		}
		// The counts as a reader sees them.
		for name, want := range map[string]int{"n": r.Stats.N, "dof": r.Stats.DOF, "iterations": r.Stats.Iterations} {
			m := regexp.MustCompile(`(?m)^\s*` + name + `\s+(\S+)`).FindStringSubmatch(page)
			if m == nil || m[1] != strconv.Itoa(want) {
				t.Errorf("%s: %s printed as %q, want %d", r.ID, name, m, want)
			}
		}
		// The measured points inside the chart's plot area.
		img := render(ps[0])
		box, ok := colourBox(img, colPlotArea, 1)
		if !ok {
			t.Errorf("%s: no plot area (ground %s) on the printed page", r.ID, xlHex(colPlotArea))
			continue
		}
		pts, cols := countNear(img, box, colData, 40)
		fitPx, _ := countNear(img, box, colFit, 40)
		bandPx, _ := countNear(img, box, colBandLine, 40)
		t.Logf("%s: plot area %v; observed-point colour %d px in %d columns, curve %d px, band lines %d px", r.ID, box, pts, cols, fitPx, bandPx)
		// A marker is about 8 px across at 100 dpi; half the points showing
		// whole is a loose floor that a chart without its points fails.
		if pts < 20*len(r.Residuals) || cols < 2*len(r.Residuals) {
			t.Errorf("%s: %d pixels in %d columns of the observed-point colour %s inside the plot area %v, want ≥ %d in ≥ %d columns",
				r.ID, pts, cols, xlHex(colData), box, 20*len(r.Residuals), 2*len(r.Residuals))
		}
		// Tick labels of the value axis in ink, not in a grey too faint to
		// print: dark pixels in the strip left of the plot area.
		strip := image.Rect(box.Min.X-35, box.Min.Y, box.Min.X-3, box.Max.Y)
		if dark := countDark(img, strip, 150); dark < 40 {
			t.Errorf("%s: %d dark pixels among the value axis's tick labels %v, want ≥ 40", r.ID, dark, strip)
		} else {
			t.Logf("%s: %d dark pixels among the value axis's tick labels", r.ID, dark)
		}
		if fitPx < 100 {
			t.Errorf("%s: the fitted curve (%s) shows %d pixels in the plot area", r.ID, xlHex(colFit), fitPx)
		}
		if bandPx < 20 {
			t.Errorf("%s: the band lines (%s) show %d pixels in the plot area", r.ID, xlHex(colBandLine), bandPx)
		}
	}

	// The Arrhenius chart: its points, and its horizontal axis along the
	// bottom although every ln D is negative.
	ap := sheetPages[SheetArrhenius]
	if len(ap) == 0 {
		t.Fatal("the Arrhenius sheet did not print")
	}
	last := ap[len(ap)-1]
	img := render(last)
	box, ok := colourBox(img, colPlotArea, 1)
	if !ok {
		t.Fatal("Arrhenius chart: no plot area on its last page")
	}
	for g := range trimmed.Lines.Lines {
		if n, _ := countNear(img, box, seriesColor(g), 40); n < 100 {
			t.Errorf("Arrhenius chart: group %d (%s) shows %d pixels", g+1, xlHex(seriesColor(g)), n)
		}
	}
	words, err := exec.CommandContext(ctx, pdftotext, "-bbox", "-f", strconv.Itoa(last), "-l", strconv.Itoa(last), pdf, "-").Output()
	if err != nil {
		t.Fatalf("pdftotext -bbox: %v", err)
	}
	// Tick labels sit within 25 pt of the plot area; the tables above the
	// chart are further up. The 10⁴/T labels must lie below the plot area
	// (they sat above it when the axis crossed at ln D = 0).
	plotTop, plotBottom := float64(box.Min.Y)*72/100, float64(box.Max.Y)*72/100
	xTop, yBottom := xAxisLabelsBelow(string(words), plotTop-25)
	t.Logf("Arrhenius chart: plot area %.1f–%.1f pt from the top; 10⁴/T labels from %.1f pt down, ln D labels down to %.1f pt",
		plotTop, plotBottom, xTop, yBottom)
	if xTop == 1e9 || yBottom == 0 {
		t.Errorf("Arrhenius chart: tick labels not found on the page")
	} else if xTop < plotBottom-1 {
		t.Errorf("Arrhenius chart: the 10⁴/T labels (top at %.1f pt) are not below the plot area (bottom at %.1f pt)", xTop, plotBottom)
	}
}

// colourBox is the bounding box of the rows and columns holding at least
// 40 pixels within tol (per channel) of c: a filled area, without the
// stray antialiased pixels of text that happen to come near c.
func colourBox(img image.Image, c color.NRGBA, tol int) (image.Rectangle, bool) {
	b := img.Bounds()
	rows, cols := make([]int, b.Dy()), make([]int, b.Dx())
	for y := b.Min.Y; y < b.Max.Y; y++ {
		for x := b.Min.X; x < b.Max.X; x++ {
			if near(img.At(x, y), c, tol) {
				rows[y-b.Min.Y]++
				cols[x-b.Min.X]++
			}
		}
	}
	span := func(counts []int, off int) (lo, hi int, ok bool) {
		lo, hi = -1, -1
		for i, n := range counts {
			if n >= 40 {
				if lo < 0 {
					lo = i
				}
				hi = i
			}
		}
		return lo + off, hi + off + 1, lo >= 0
	}
	x0, x1, okx := span(cols, b.Min.X)
	y0, y1, oky := span(rows, b.Min.Y)
	return image.Rect(x0, y0, x1, y1), okx && oky
}

// countNear counts the pixels within tol (per channel) of c inside box, and
// the pixel columns holding any.
func countNear(img image.Image, box image.Rectangle, c color.NRGBA, tol int) (pixels, columns int) {
	for x := box.Min.X; x < box.Max.X; x++ {
		inCol := false
		for y := box.Min.Y; y < box.Max.Y; y++ {
			if near(img.At(x, y), c, tol) {
				pixels++
				inCol = true
			}
		}
		if inCol {
			columns++
		}
	}
	return pixels, columns
}

// countDark counts the pixels in box whose channels are all below level.
func countDark(img image.Image, box image.Rectangle, level uint8) int {
	n := 0
	for y := box.Min.Y; y < box.Max.Y; y++ {
		for x := box.Min.X; x < box.Max.X; x++ {
			p := color.NRGBAModel.Convert(img.At(x, y)).(color.NRGBA)
			if p.R < level && p.G < level && p.B < level {
				n++
			}
		}
	}
	return n
}

func near(v color.Color, c color.NRGBA, tol int) bool {
	p := color.NRGBAModel.Convert(v).(color.NRGBA)
	d := func(a, b uint8) bool { return int(a)-int(b) <= tol && int(b)-int(a) <= tol }
	return d(p.R, c.R) && d(p.G, c.G) && d(p.B, c.B)
}

// xAxisLabelsBelow reads pdftotext -bbox output of the Arrhenius page and
// returns the top of the highest 10⁴/T tick label (a number from 7.5 to
// 9.5 with at most one decimal) and the bottom of the lowest ln D tick
// label (a negative number with at most one decimal), in points from the
// top of the page, among the words below top.
func xAxisLabelsBelow(bbox string, top float64) (xTop, yBottom float64) {
	word := regexp.MustCompile(`<word xMin="[^"]+" yMin="([^"]+)" xMax="[^"]+" yMax="([^"]+)">([^<]*)</word>`)
	tick := regexp.MustCompile(`^-?[0-9]+(\.[0-9])?$`)
	xTop = 1e9
	for _, m := range word.FindAllStringSubmatch(bbox, -1) {
		label := strings.Replace(m[3], "−", "-", 1)
		y0, _ := strconv.ParseFloat(m[1], 64)
		y1, _ := strconv.ParseFloat(m[2], 64)
		if !tick.MatchString(label) || y0 < top {
			continue
		}
		v, _ := strconv.ParseFloat(label, 64)
		switch {
		case v >= 7.5 && v <= 9.5:
			xTop = min(xTop, y0)
		case v < 0:
			yBottom = max(yBottom, y1)
		}
	}
	return xTop, yBottom
}
