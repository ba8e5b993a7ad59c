package report

import (
	"archive/zip"
	"bytes"
	"html"
	"io"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/xuri/excelize/v2"
)

var (
	chartFormula = regexp.MustCompile(`<f>([^<]*)</f>`)
	sheetRef     = regexp.MustCompile(`^'[^']+'!\$[A-Z]+\$[0-9]+(:\$[A-Z]+\$[0-9]+)?$`)
)

func TestSheetNamer(t *testing.T) {
	n := newSheetNamer(SheetSummary, SheetAudit)
	for _, c := range []struct{ in, want string }{
		{"A1", "A1"},
		{"a1", "a1~2"}, // unique without regard to case
		{"A1", "A1~3"},
		{"x[1]:y*z?/\\w", "x_1__y_z___w"},
		{"summary", "summary~2"}, // reserved by the summary sheet
		{"History", "History~2"}, // reserved by Excel
		{"'quoted'", "quoted"},
		{"", "profile"},
		{strings.Repeat("L", 40), strings.Repeat("L", 31)},
		{strings.Repeat("L", 40), strings.Repeat("L", 29) + "~2"},
		{"µ-sample-ünïcode-ñame-longer-than-31", "µ-sample-ünïcode-ñame-longer-th"},
	} {
		got := n.name(c.in)
		if got != c.want {
			t.Errorf("name(%q) = %q, want %q", c.in, got, c.want)
		}
		if len([]rune(got)) > 31 || strings.ContainsAny(got, `[]:*?/\`) {
			t.Errorf("name(%q) = %q is not a valid sheet name", c.in, got)
		}
	}
}

func TestWorkbook(t *testing.T) {
	res, _ := runCampaign(t, 1)
	var buf bytes.Buffer
	if err := res.WriteWorkbook(&buf, CampaignOptions{}); err != nil {
		t.Fatal(err)
	}
	f, err := excelize.OpenReader(bytes.NewReader(buf.Bytes()))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	sheets := f.GetSheetList()
	want := []string{SheetSummary}
	for _, r := range res.Results {
		want = append(want, r.ID)
	}
	want = append(want, SheetArrhenius, SheetLots, SheetParts, SheetAudit)
	if strings.Join(sheets, "|") != strings.Join(want, "|") {
		t.Fatalf("sheets %v, want %v", sheets, want)
	}
	num := func(sheet, ref string) float64 {
		t.Helper()
		v, err := f.GetCellValue(sheet, ref, excelize.Options{RawCellValue: true})
		if err != nil {
			t.Fatal(err)
		}
		x, err := strconv.ParseFloat(v, 64)
		if err != nil {
			t.Fatalf("%s!%s = %q is not a number", sheet, ref, v)
		}
		return x
	}
	// Summary: header units and numbers as numbers with formats.
	if h, _ := f.GetCellValue(SheetSummary, "G1"); h != "D (m²/s)" {
		t.Errorf("G1 header %q", h)
	}
	r0 := res.Results[0]
	// Spreadsheets hold 15 significant digits.
	close := func(a, b float64) bool { return a == b || (a-b)/b < 1e-14 && (b-a)/b < 1e-14 }
	if got, want := num(SheetSummary, "G2"), r0.Param("D").Value; !close(got, want) {
		t.Errorf("Summary!G2 = %v, want D = %v", got, want)
	}
	if got := num(SheetSummary, "D2"); got != r0.Temperature {
		t.Errorf("Summary!D2 = %v, want T = %v", got, r0.Temperature)
	}
	sid, _ := f.GetCellStyle(SheetSummary, "G2")
	st, err := f.GetStyle(sid)
	if err != nil || st.CustomNumFmt == nil || !strings.Contains(*st.CustomNumFmt, "E+00") {
		t.Errorf("D cell has no scientific number format: %+v", st)
	}
	// A profile sheet: depth, observed, fitted, residual columns.
	s := r0.ID
	if h, _ := f.GetCellValue(s, "I1"); h != "depth (mm)" {
		t.Errorf("%s!I1 = %q", s, h)
	}
	p := r0.Residuals[0]
	if got := num(s, "I2"); !close(got, p.Depth/1e-3) {
		t.Errorf("%s!I2 depth = %v, want %v", s, got, p.Depth/1e-3)
	}
	if got := num(s, "J2"); !close(got, p.Observed) {
		t.Errorf("observed %v, want %v", got, p.Observed)
	}
	if got := num(s, "L2"); !close(got, p.Residual) {
		t.Errorf("residual %v, want %v", got, p.Residual)
	}
	// Arrhenius: each point's influence on its line beside its residual,
	// the same numbers as the text, CSV and JSON (arrhenius.Influence).
	arows, err := f.GetRows(SheetArrhenius)
	if err != nil {
		t.Fatal(err)
	}
	hdr := -1
	for i, row := range arows {
		if len(row) > 1 && row[0] == "group" && row[1] == "id" {
			hdr = i
		}
	}
	if hdr < 0 {
		t.Fatal("Arrhenius sheet: no points table")
	}
	wantHdr := []string{"residual (ln D)", "leverage", "studentized residual", "Cook's distance", "chart series"}
	if got := arows[hdr][10:]; strings.Join(got, "|") != strings.Join(wantHdr, "|") {
		t.Errorf("Arrhenius points header ends %q, want %q", got, wantHdr)
	}
	checked := 0
	row := hdr + 2 // 1-based row of the first point
	for _, l := range res.Lines.Lines {
		for _, p := range l.Points {
			for col, want := range map[string]float64{"L": p.Leverage, "M": p.Studentized, "N": p.Cook} {
				v, _ := f.GetCellValue(SheetArrhenius, col+strconv.Itoa(row), excelize.Options{RawCellValue: true})
				if !finite(want) {
					if v != "" {
						t.Errorf("Arrhenius!%s%d = %q, want empty (not defined)", col, row, v)
					}
					continue
				}
				if got := num(SheetArrhenius, col+strconv.Itoa(row)); !close(got, want) {
					t.Errorf("Arrhenius!%s%d = %v, want %v", col, row, got, want)
				}
				checked++
			}
			row++
		}
	}
	if checked == 0 {
		t.Error("no influence value on the Arrhenius sheet")
	}
	// Audit: every input with its SHA-256.
	rows, _ := f.GetRows(SheetAudit)
	var found int
	for _, in := range res.Inputs {
		for _, row := range rows {
			if len(row) > 1 && row[0] == in.Name && row[1] == in.SHA256 {
				found++
			}
		}
	}
	if found != len(res.Inputs) {
		t.Errorf("audit lists %d of %d inputs with their SHA-256", found, len(res.Inputs))
	}
	joined := ""
	for _, row := range rows {
		joined += strings.Join(row, " ") + "\n"
	}
	for _, w := range []string{"fickfit test", "Crank", "Bates", "Efron", "metallography"} {
		if !strings.Contains(joined, w) {
			t.Errorf("audit sheet lacks %q", w)
		}
	}
	// Native charts: one per profile sheet and one on the Arrhenius sheet,
	// all scatter charts referring to the sheets' cells.
	zr, err := zip.NewReader(bytes.NewReader(buf.Bytes()), int64(buf.Len()))
	if err != nil {
		t.Fatal(err)
	}
	charts := 0
	for _, zf := range zr.File {
		if !strings.HasPrefix(zf.Name, "xl/charts/chart") {
			continue
		}
		charts++
		rc, _ := zf.Open()
		b, _ := io.ReadAll(rc)
		rc.Close()
		x := string(b)
		if !strings.Contains(x, "<scatterChart>") || !strings.Contains(x, "<xVal>") {
			t.Errorf("%s is not a scatter chart with x values", zf.Name)
		}
		// Every formula is a sheet reference (a literal series name stored
		// as a formula makes spreadsheet programs repair the file).
		for _, m := range chartFormula.FindAllStringSubmatch(x, -1) {
			if !sheetRef.MatchString(html.UnescapeString(m[1])) {
				t.Errorf("%s: formula %q is not a sheet reference", zf.Name, m[1])
			}
		}
	}
	if want := len(res.Results) + 1; charts != want {
		t.Errorf("%d charts, want %d", charts, want)
	}
	// How the charts look where excelize's defaults fail a reader (the
	// spreadsheet application itself is TestWorkbookInSpreadsheetApp's):
	// tick labels and titles in ink, points drawn in their colour (not an
	// open white marker, which LibreOffice shows as nothing), and the
	// Arrhenius chart's horizontal axis crossing at the minimum of ln D.
	txPr := regexp.MustCompile(`<txPr>.*?</txPr>`)
	for _, zf := range zr.File {
		if !strings.HasPrefix(zf.Name, "xl/charts/chart") {
			continue
		}
		rc, _ := zf.Open()
		b, _ := io.ReadAll(rc)
		rc.Close()
		x := string(b)
		for _, tp := range txPr.FindAllString(x, -1) {
			if strings.Contains(tp, "<a:defRPr") && !strings.Contains(tp, `<a:srgbClr val="`+xlHex(colInk)+`">`) {
				t.Errorf("%s: text not in ink: %s", zf.Name, tp)
			}
		}
		if strings.Contains(x, "<marker><symbol val=\"circle\"></symbol><size val=\"6\"></size><spPr><a:solidFill><a:srgbClr val=\"FFFFFF\">") {
			t.Errorf("%s: white-filled markers", zf.Name)
		}
		if strings.Contains(x, "Arrhenius plot") && !strings.Contains(x, `<crosses val="min"></crosses>`) {
			t.Errorf("%s: the Arrhenius chart's horizontal axis crosses at ln D = 0 (the top of the chart)", zf.Name)
		}
	}
	// Print setup: every sheet has a print area and fits its width.
	for _, sheet := range sheets {
		found := false
		for _, dn := range f.GetDefinedName() {
			if dn.Name == "_xlnm.Print_Area" && dn.Scope == sheet {
				found = true
			}
		}
		if !found {
			t.Errorf("sheet %s has no print area", sheet)
		}
		pl, err := f.GetPageLayout(sheet)
		if err != nil || pl.FitToWidth == nil || *pl.FitToWidth != 1 {
			t.Errorf("sheet %s does not print one page wide: %+v %v", sheet, pl, err)
		}
	}
}
