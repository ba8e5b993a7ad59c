package report

import (
	"fmt"
	"io"
	"math"
	"strings"
	"unicode/utf8"

	"github.com/xuri/excelize/v2"

	"github.com/fickfit/fickfit/arrhenius"
	"github.com/fickfit/fickfit/campaign"
	"github.com/fickfit/fickfit/fit"
)

// Sheet names of the workbook.
const (
	SheetSummary   = "Summary"
	SheetArrhenius = "Arrhenius"
	SheetLots      = "Lot comparison"
	SheetParts     = "Back-calculation"
	SheetAudit     = "Audit"
)

// sheetNamer makes valid, unique sheet names: at most 31 characters, none
// of []:*?/\, not starting or ending with an apostrophe, not the reserved
// "History", unique without regard to case.
type sheetNamer struct{ used map[string]bool }

func newSheetNamer(reserved ...string) *sheetNamer {
	s := &sheetNamer{used: map[string]bool{"history": true}}
	for _, r := range reserved {
		s.used[strings.ToLower(r)] = true
	}
	return s
}

func (s *sheetNamer) name(base string) string {
	clean := strings.Map(func(r rune) rune {
		if strings.ContainsRune(`[]:*?/\`, r) || r < 32 {
			return '_'
		}
		return r
	}, base)
	clean = strings.Trim(clean, "' ")
	if clean == "" {
		clean = "profile"
	}
	cut := func(str string, n int) string {
		if utf8.RuneCountInString(str) <= n {
			return str
		}
		return string([]rune(str)[:n])
	}
	name := cut(clean, 31)
	for k := 2; s.used[strings.ToLower(name)]; k++ {
		suffix := fmt.Sprintf("~%d", k)
		name = strings.TrimRight(cut(clean, 31-len(suffix)), "' ") + suffix
	}
	s.used[strings.ToLower(name)] = true
	return name
}

// cell returns the A1 reference of column col (1-based) and row.
func cell(col, row int) string {
	n, _ := excelize.CoordinatesToCellName(col, row)
	return n
}

// colName returns the letters of column col (1-based).
func colName(col int) string {
	n, _ := excelize.ColumnNumberToName(col)
	return n
}

// xlStyles are the workbook's cell styles.
type xlStyles struct {
	header, title, note, sci, fixed2, fixed4, int0, text, temp, bold int
	// byFormat holds the styles made for number formats (numStyle).
	byFormat map[string]int
}

func newXLStyles(f *excelize.File) (xlStyles, error) {
	var s xlStyles
	var err error
	mk := func(st *excelize.Style) int {
		if err != nil {
			return 0
		}
		var id int
		id, err = f.NewStyle(st)
		return id
	}
	font := func(bold bool, size float64, color string) *excelize.Font {
		return &excelize.Font{Family: "Calibri", Size: size, Bold: bold, Color: color}
	}
	sci := "0.000E+00"
	f2, f4, t1 := "0.00", "0.0000", "0.0"
	s.header = mk(&excelize.Style{Font: font(true, 10, "1D2A33"), Fill: excelize.Fill{Type: "pattern", Pattern: 1, Color: []string{"E8EDF0"}},
		Border:    []excelize.Border{{Type: "bottom", Color: "5C6A74", Style: 1}},
		Alignment: &excelize.Alignment{WrapText: true, Vertical: "top"}})
	s.title = mk(&excelize.Style{Font: font(true, 13, "1D2A33")})
	s.note = mk(&excelize.Style{Font: font(false, 9, "5C6A74"), Alignment: &excelize.Alignment{WrapText: true, Vertical: "top"}})
	s.sci = mk(&excelize.Style{CustomNumFmt: &sci})
	s.fixed2 = mk(&excelize.Style{CustomNumFmt: &f2})
	s.fixed4 = mk(&excelize.Style{CustomNumFmt: &f4})
	s.int0 = mk(&excelize.Style{NumFmt: 1})
	s.text = mk(&excelize.Style{Alignment: &excelize.Alignment{WrapText: true, Vertical: "top"}})
	s.temp = mk(&excelize.Style{CustomNumFmt: &t1})
	s.bold = mk(&excelize.Style{Font: font(true, 11, "1D2A33")})
	s.byFormat = map[string]int{}
	return s, err
}

// xlWriter accumulates the first error of many excelize calls.
type xlWriter struct {
	f   *excelize.File
	st  xlStyles
	err error
	// charts counts the charts added; version is the program's, for footers.
	charts  int
	version string
}

func (x *xlWriter) set(sheet string, col, row int, v any, style int) {
	if x.err != nil {
		return
	}
	ref := cell(col, row)
	switch t := v.(type) {
	case float64:
		if !finite(t) {
			return // empty cell: not determined
		}
	case nil:
		return
	}
	if x.err = x.f.SetCellValue(sheet, ref, v); x.err == nil && style > 0 {
		x.err = x.f.SetCellStyle(sheet, ref, ref, style)
	}
}

func (x *xlWriter) header(sheet string, row int, cols ...string) {
	for i, c := range cols {
		x.set(sheet, i+1, row, c, x.st.header)
	}
}

// twoLines makes a row two lines tall: header cells wrap, and spreadsheet
// programs do not all grow a row to fit its wrapped text.
func (x *xlWriter) twoLines(sheet string, row int) {
	if x.err == nil {
		x.err = x.f.SetRowHeight(sheet, row, 30)
	}
}

func (x *xlWriter) widths(sheet string, w ...float64) {
	for i, v := range w {
		if x.err == nil {
			x.err = x.f.SetColWidth(sheet, colName(i+1), colName(i+1), v)
		}
	}
}

func (x *xlWriter) freeze(sheet string, row int) {
	if x.err != nil {
		return
	}
	x.err = x.f.SetPanes(sheet, &excelize.Panes{Freeze: true, YSplit: row, TopLeftCell: cell(1, row+1), ActivePane: "bottomLeft"})
}

// quoteSheet quotes a sheet name for a formula reference.
func quoteSheet(s string) string { return "'" + strings.ReplaceAll(s, "'", "''") + "'" }

func rng(sheet string, col, r0, r1 int) string {
	return fmt.Sprintf("%s!$%s$%d:$%s$%d", quoteSheet(sheet), colName(col), r0, colName(col), r1)
}

func solid(hex string) excelize.Fill {
	return excelize.Fill{Type: "pattern", Pattern: 1, Color: []string{hex}}
}

func xlHex(c interface{ RGBA() (r, g, b, a uint32) }) string {
	r, g, b, _ := c.RGBA()
	return fmt.Sprintf("%02X%02X%02X", r>>8, g>>8, b>>8)
}

// WriteWorkbook writes the campaign as an XLSX workbook: a summary sheet
// (one row per profile), a sheet per profile with depth, observed, fitted
// and residual columns, the fitted curve with its band and a native
// scatter chart, an Arrhenius sheet with its chart, the lot comparison and
// back-calculation when there are any, and an Audit sheet (inputs with
// SHA-256, options, version, method notes, cautions). Numbers are stored
// as numbers with number formats; units are in the headers.
func (res *CampaignReport) WriteWorkbook(w io.Writer, o CampaignOptions) error {
	f := excelize.NewFile()
	defer f.Close()
	st, err := newXLStyles(f)
	if err != nil {
		return err
	}
	x := &xlWriter{f: f, st: st, version: res.Version}
	names := newSheetNamer(SheetSummary, SheetArrhenius, SheetLots, SheetParts, SheetAudit)
	if err := f.SetSheetName("Sheet1", SheetSummary); err != nil {
		return err
	}
	u := o.TempUnit
	x.summarySheet(res, u)
	total := len(res.Results)
	detail := res.details() // a sheet for each profile shown one by one
	for i, r := range res.Results {
		if !detail.shows(r) {
			continue
		}
		sheet := names.name(r.ID)
		if _, err := f.NewSheet(sheet); err != nil {
			return err
		}
		x.profileSheet(sheet, r, u)
		o.progress("workbook", i+1, total)
		if x.err != nil {
			return x.err
		}
	}
	if res.Lines != nil && len(res.Lines.Lines) > 0 {
		if _, err := f.NewSheet(SheetArrhenius); err != nil {
			return err
		}
		x.arrheniusSheet(res, u)
	}
	if res.Comparison != nil {
		if _, err := f.NewSheet(SheetLots); err != nil {
			return err
		}
		x.lotsSheet(res, u)
	}
	if len(res.Parts) > 0 {
		if _, err := f.NewSheet(SheetParts); err != nil {
			return err
		}
		x.partsSheet(res, u)
	}
	if _, err := f.NewSheet(SheetAudit); err != nil {
		return err
	}
	x.auditSheet(res)
	if x.err != nil {
		return x.err
	}
	f.SetActiveSheet(0)
	// Fixed document properties: no timestamps, so reruns differ only in
	// what excelize itself stamps.
	if err := f.SetDocProps(&excelize.DocProperties{Title: "fickfit campaign report", Creator: "fickfit " + res.Version,
		Description: "Diffusion coefficients fitted by Fick's-law solutions; see the Audit sheet."}); err != nil {
		return err
	}
	_, err = f.WriteTo(w)
	return err
}

func (x *xlWriter) summarySheet(res *CampaignReport, u TempUnit) {
	s := SheetSummary
	level := Level(res.Options.Level)
	hasCase := false
	for _, r := range res.Results {
		hasCase = hasCase || r.CaseDepth != nil
	}
	cols := []string{"id", "lot", "T (" + u.Symbol() + ")", "T (K)", "t (h)", "model", "D (m²/s)",
		"D " + level + " CI low (m²/s)", "D " + level + " CI high (m²/s)", "Dt (m²)"}
	widths := []float64{18, 11, 9, 9, 7, 8, 12, 14, 14, 12}
	// The case depth stands beside D, where a reader looks for a
	// profile's result (columns K–O when any profile has one).
	caseCol := len(cols) + 1
	if hasCase {
		cols = append(cols, "case depth (mm)", "case depth "+level+" CI low (mm)", "case depth "+level+" CI high (mm)",
			"case depth from the points (mm)", "case threshold")
		widths = append(widths, 10, 12, 12, 12, 12)
	}
	rest := len(cols) + 1 // Cs, C0, value unit, R², RMSE, n, warnings, source
	cols = append(cols, "Cs", "C0", "value unit", "R²", "RMSE", "n", "warnings", "source")
	widths = append(widths, 9, 9, 8, 8, 11, 5, 40, 28)
	warnCol, srcCol := rest+6, rest+7
	x.header(s, 1, cols...)
	if x.err == nil { // the case-depth headers wrap to three lines
		x.err = x.f.SetRowHeight(s, 1, 44)
	}
	row := 2
	for _, r := range res.Results {
		x.set(s, 1, row, r.ID, 0)
		x.set(s, 2, row, r.Lot, 0)
		if r.Temperature > 0 {
			x.set(s, 3, row, u.FromKelvin(r.Temperature), x.st.temp)
			x.set(s, 4, row, r.Temperature, x.st.fixed2)
		}
		if r.Time > 0 {
			x.set(s, 5, row, r.Time/3600, x.st.fixed2)
		}
		x.set(s, 6, row, r.Model, 0)
		if d := r.Param("D"); d != nil {
			ds := x.dStyle(d.Value, d.CI)
			if r.Time > 0 {
				x.set(s, 7, row, d.Value, ds)
				x.set(s, 8, row, d.CI.Lo, ds)
				x.set(s, 9, row, d.CI.Hi, ds)
				x.set(s, 10, row, d.Value*r.Time, ds)
			} else {
				x.set(s, 10, row, d.Value, ds)
			}
		}
		if e := r.CaseDepth; e != nil {
			mm := x.num(e.Depth*1e3, LastDigit(e.Depth*1e3, fit.Interval{Lo: e.CI.Lo * 1e3, Hi: e.CI.Hi * 1e3}))
			x.set(s, caseCol, row, e.Depth*1e3, mm)
			x.set(s, caseCol+1, row, e.CI.Lo*1e3, mm)
			x.set(s, caseCol+2, row, e.CI.Hi*1e3, mm)
			x.set(s, caseCol+3, row, e.FromData*1e3, x.sig(e.FromData*1e3, 4))
			x.set(s, caseCol+4, row, e.Threshold, 0)
		}
		for k, name := range []string{"Cs", "C0"} {
			if e := r.Param(name); e != nil {
				x.set(s, rest+k, row, e.Value, x.num(e.Value, paramLast(e.Value, e.CI, e.Fixed)))
			}
		}
		x.set(s, rest+2, row, r.ValueUnit, 0)
		x.set(s, rest+3, row, r.Stats.R2, x.st.fixed4)
		x.set(s, rest+4, row, r.Stats.RMSE, x.sig(r.Stats.RMSE, 2))
		x.set(s, rest+5, row, r.Stats.N, x.st.int0)
		var ws []string
		for _, w := range r.Warnings {
			ws = append(ws, warnText(w, u))
		}
		x.set(s, warnCol, row, strings.Join(ws, "\n"), x.st.text)
		x.set(s, srcCol, row, r.Source, 0)
		row++
	}
	for _, fl := range res.Failed {
		x.set(s, 1, row, fl.ID, 0)
		x.set(s, 2, row, fl.Lot, 0)
		x.set(s, warnCol, row, "not fitted: "+fl.Error, x.st.text)
		x.set(s, srcCol, row, fl.Source, 0)
		row++
	}
	x.widths(s, widths...)
	x.freeze(s, 1)
	if x.err == nil && row > 2 {
		x.err = x.f.AutoFilter(s, "A1:"+cell(len(cols), row-1), nil)
	}
	// After the filter, which rewrites the sheet's properties. The print
	// area ends at the warnings: the source path is for the screen.
	x.pageSetup(s, warnCol, max(row-1, 1), true, 0, 1)
}

func (x *xlWriter) profileSheet(s string, r *fit.Result, u TempUnit) {
	x.set(s, 1, 1, r.ID, x.st.title)
	meta := [][2]any{
		{"source", r.Source}, {"lot", r.Lot},
		{"temperature (" + u.Symbol() + ")", nil}, {"temperature (K)", nil}, {"time (h)", nil},
		{"model", ModelDescription(r.Model)},
		{"interval", Level(r.CILevel) + " " + CIMethodDescription(r.CIMethod) + ", covariance " + r.Covariance.String()},
	}
	if r.Temperature > 0 {
		meta[2][1], meta[3][1] = u.FromKelvin(r.Temperature), r.Temperature
	}
	if r.Time > 0 {
		meta[4][1] = r.Time / 3600
	}
	for i, m := range meta {
		x.set(s, 1, 2+i, m[0], x.st.bold)
		style := 0
		if _, ok := m[1].(float64); ok {
			style = x.st.fixed2
		}
		x.set(s, 2, 2+i, m[1], style)
	}
	// Depths of the sheet (data columns, positions among the parameters).
	xmax := 0.0
	for _, p := range r.Residuals {
		xmax = math.Max(xmax, p.Depth)
	}
	f, du := DepthScale(xmax * 1.05)

	// Parameters, with the digits the text and HTML reports give them:
	// D and Dt scientific, positions in the sheet's depth unit, levels and
	// the rest fixed or scientific as their intervals allow.
	pr := 10
	x.header(s, pr, "parameter", "value", "unit", "std. error", Level(r.CILevel)+" CI low", Level(r.CILevel)+" CI high", "fixed")
	for i, e := range r.Params {
		row := pr + 1 + i
		v, iv, se, unit := e.Value, e.CI, e.StdErr, PrettyUnit(e.Unit)
		if e.Unit == "m" {
			v, iv, se, unit = v/f, fit.Interval{Lo: iv.Lo / f, Hi: iv.Hi / f}, se/f, du
		}
		style := x.num(v, paramLast(v, iv, e.Fixed))
		if e.Unit == "m2/s" || e.Unit == "m2" {
			style = x.dStyle(v, iv)
		}
		name := e.Name
		if name == "D" && r.Time == 0 {
			name = "Dt"
		}
		x.set(s, 1, row, name, 0)
		x.set(s, 2, row, v, style)
		x.set(s, 3, row, unit, 0)
		if !e.Fixed {
			x.set(s, 4, row, se, x.sig(se, 2))
			x.set(s, 5, row, iv.Lo, style)
			x.set(s, 6, row, iv.Hi, style)
		}
		fixed := "no"
		if e.Fixed {
			fixed = "yes"
		}
		x.set(s, 7, row, fixed, 0)
	}
	st := r.Stats
	sr := pr + len(r.Params) + 2
	x.set(s, 1, sr, "statistics", x.st.bold)
	// Counts as integers; the rest with the digits of the HTML report.
	type statRow struct {
		name  string
		v     any
		style int
	}
	stats := []statRow{
		{"n", st.N, x.st.int0}, {"dof", st.DOF, x.st.int0}, {"iterations", st.Iterations, x.st.int0},
		{"RSS", st.RSS, x.sig(st.RSS, 2)}, {"RMSE", st.RMSE, x.sig(st.RMSE, 2)}, {"R²", st.R2, x.st.fixed4},
		{"AICc", st.AICc, x.num(st.AICc, -1)}, {"χ²red", st.Chi2Red, x.sig(st.Chi2Red, 2)},
	}
	if finite(st.Chi2P) {
		stats = append(stats, statRow{"P(χ²)", st.Chi2P, x.sig(st.Chi2P, 2)})
	}
	stats = append(stats, statRow{"runs test p", st.RunsP, x.sig(st.RunsP, 2)}, statRow{"condition number", st.Cond, x.sig(st.Cond, 2)})
	for i, kv := range stats {
		x.set(s, 1, sr+1+i, kv.name, 0)
		x.set(s, 2, sr+1+i, kv.v, kv.style)
	}
	wr := sr + len(stats) + 2
	for i, e := range []*fit.DepthEstimate{r.CaseDepth, r.DecarbDepth} {
		if e == nil {
			continue
		}
		name := "case depth"
		if e.Kind == "decarburization" {
			name = "decarburization depth"
		}
		c := 4 + 2*i
		x.set(s, c, sr, name+" at "+e.Threshold, x.st.bold)
		for k, kv := range [][2]any{{"level (" + e.Unit + ")", e.Level}, {"depth (mm)", e.Depth * 1e3},
			{Level(e.CILevel) + " CI low (mm)", e.CI.Lo * 1e3}, {Level(e.CILevel) + " CI high (mm)", e.CI.Hi * 1e3},
			{"from the points (mm)", e.FromData * 1e3}} {
			x.set(s, c, sr+1+k, kv[0], 0)
			x.set(s, c+1, sr+1+k, kv[1], x.st.fixed4)
		}
	}
	if len(r.Warnings) > 0 {
		x.set(s, 1, wr, "warnings", x.st.bold)
		for i, w := range r.Warnings {
			x.set(s, 1, wr+1+i, warnText(w, u), x.st.note)
			if x.err == nil {
				x.err = x.f.MergeCell(s, cell(1, wr+1+i), cell(7, wr+1+i))
			}
			if x.err == nil {
				x.err = x.f.SetRowHeight(s, wr+1+i, 30)
			}
		}
	}

	// Data columns beside the block: depth, observed, fitted, residual.
	vu := r.ValueUnit
	if vu == "" {
		vu = "value"
	}
	const dc = 9 // column I
	for i, h := range []string{"depth (" + du + ")", "observed (" + vu + ")", "fitted (" + vu + ")", "residual (" + vu + ")", "",
		"curve depth (" + du + ")", "curve fitted (" + vu + ")", "band low (" + vu + ")", "band high (" + vu + ")"} {
		if h != "" {
			x.set(s, dc+i, 1, h, x.st.header)
		}
	}
	// Measured depths and values with the decimals they were recorded with;
	// computed values (fitted, residual, curve, band) with one more.
	n := len(r.Residuals)
	depths, obs := make([]float64, n), make([]float64, n)
	for i, p := range r.Residuals {
		depths[i], obs[i] = p.Depth/f, p.Observed
	}
	dDec, vDec := dataDecimals(depths, 4), dataDecimals(obs, 5)
	depthSt, obsSt := x.numStyle(fixedFmt(dDec)), x.numStyle(fixedFmt(vDec))
	calcSt, gridSt := x.numStyle(fixedFmt(vDec+1)), x.numStyle(fixedFmt(dDec+1))
	for i, p := range r.Residuals {
		row := 2 + i
		x.set(s, dc, row, depths[i], depthSt)
		x.set(s, dc+1, row, p.Observed, obsSt)
		x.set(s, dc+2, row, p.Fitted, calcSt)
		x.set(s, dc+3, row, p.Residual, calcSt)
	}
	const m = 61
	gx := make([]float64, m)
	for i := range gx {
		gx[i] = xmax * 1.04 * float64(i) / float64(m-1)
	}
	gy, lo, hi, cerr := r.Curve(gx)
	if cerr == nil {
		for i := range gx {
			x.set(s, dc+5, 2+i, gx[i]/f, gridSt)
			x.set(s, dc+6, 2+i, gy[i], calcSt)
			x.set(s, dc+7, 2+i, lo[i], calcSt)
			x.set(s, dc+8, 2+i, hi[i], calcSt)
		}
	}
	x.widths(s, 20, 26, 10, 12, 12, 12, 8, 2, 12, 14, 14, 14, 2, 14, 16, 14, 14)
	chartRow := wr + len(r.Warnings) + 2
	// Printed: the sheet's block, its chart and the measured data (columns
	// A–L) on one page; the curve's grid (N–Q) is the chart's source and is
	// left out. A long profile runs on over further pages, the chart kept
	// whole on the first.
	last := max(chartRow+chartPrintRows(profileChartPx), n+1)
	tall := 1
	if last > profileOnePageRows {
		tall = 0
		x.pageBreakAfter(s, chartRow+chartPrintRows(profileChartPx))
	}
	x.pageSetup(s, dc+3, last, true, tall, 1)
	if x.err != nil || n == 0 {
		return
	}
	// Series names refer to header cells: a literal name would be stored
	// as a formula, which spreadsheet programs reject. Every series states
	// its marker and line in full: spreadsheet programs differ in what they
	// assume for what is left out (LibreOffice draws a marker in its fill
	// colour only, so a white-filled "open" marker vanishes).
	name := func(col int) string { return fmt.Sprintf("%s!$%s$1", quoteSheet(s), colName(col)) }
	noMarker := excelize.ChartMarker{Symbol: "none"}
	series := []excelize.ChartSeries{{
		Name: name(dc + 1), Categories: rng(s, dc, 2, n+1), Values: rng(s, dc+1, 2, n+1),
		Marker: excelize.ChartMarker{Symbol: "circle", Size: 6, Fill: solid(xlHex(colData)),
			Border: excelize.LineOptions{Type: excelize.LineSolid, Fill: solid(xlHex(colData)), Width: 0.75}},
		Line: excelize.LineOptions{Type: excelize.LineNone}, Fill: solid(xlHex(colData)),
	}}
	if cerr == nil {
		// The band's ends over the curve, thin and dark enough to be seen
		// where the band is narrower than the curve's line.
		bandLine := excelize.LineOptions{Type: excelize.LineSolid, Width: 1, Dash: excelize.LineDashDash}
		series = append(series,
			excelize.ChartSeries{Name: name(dc + 6), Categories: rng(s, dc+5, 2, m+1), Values: rng(s, dc+6, 2, m+1),
				Marker: noMarker, Line: excelize.LineOptions{Type: excelize.LineSolid, Width: 1.5}, Fill: solid(xlHex(colFit))},
			excelize.ChartSeries{Name: name(dc + 7), Categories: rng(s, dc+5, 2, m+1), Values: rng(s, dc+7, 2, m+1),
				Marker: noMarker, Line: bandLine, Fill: solid(xlHex(colBandLine))},
			excelize.ChartSeries{Name: name(dc + 8), Categories: rng(s, dc+5, 2, m+1), Values: rng(s, dc+8, 2, m+1),
				Marker: noMarker, Line: bandLine, Fill: solid(xlHex(colBandLine))},
		)
	} else {
		series = append(series, excelize.ChartSeries{Name: name(dc + 2), Categories: rng(s, dc, 2, n+1), Values: rng(s, dc+2, 2, n+1),
			Marker: noMarker, Line: excelize.LineOptions{Type: excelize.LineSolid, Width: 1.5}, Fill: solid(xlHex(colFit))})
	}
	zero := 0.0
	x.addChart(s, cell(1, chartRow), &excelize.Chart{
		Type: excelize.Scatter, Series: series,
		Title:     chartText(r.ID+" — "+valueLabel(r)+" against depth", 11, true),
		XAxis:     chartAxis("depth ("+du+")", &zero, false),
		YAxis:     chartAxis(valueLabel(r), nil, true),
		Dimension: excelize.ChartDimension{Width: 640, Height: profileChartPx},
	}, editTickMarks, editAxisLines)
}

func (x *xlWriter) arrheniusSheet(res *CampaignReport, u TempUnit) {
	s := SheetArrhenius
	lines := res.Lines.Lines
	level := Level(lines[0].Level)
	x.set(s, 1, 1, "Arrhenius lines ("+res.Method+"), ln D = ln D0 − Q/(RT), R = 8.314462618 J/(mol·K)", x.st.title)
	x.header(s, 2, "group", "D0 (m²/s)", "D0 "+level+" CI low", "D0 "+level+" CI high", "Q (kJ/mol)", "Q "+level+" CI low", "Q "+level+" CI high",
		"corr(ln D0, Q)", "points", "temperatures", "dof", "Birge ratio", "scaled")
	x.twoLines(s, 2)
	for i, l := range lines {
		row := 3 + i
		d0 := l.D0CI()
		q := l.QCI()
		d0s := x.dStyle(l.D0(), d0)
		qs := x.num(l.Q/1e3, LastDigit(l.Q/1e3, fit.Interval{Lo: q.Lo / 1e3, Hi: q.Hi / 1e3}))
		x.set(s, 1, row, groupLabel(l), 0)
		x.set(s, 2, row, l.D0(), d0s)
		x.set(s, 3, row, d0.Lo, d0s)
		x.set(s, 4, row, d0.Hi, d0s)
		x.set(s, 5, row, l.Q/1e3, qs)
		x.set(s, 6, row, q.Lo/1e3, qs)
		x.set(s, 7, row, q.Hi/1e3, qs)
		x.set(s, 8, row, l.Corr(), x.st.fixed4)
		x.set(s, 9, row, len(l.Points), x.st.int0)
		x.set(s, 10, row, l.NTemperatures, x.st.int0)
		x.set(s, 11, row, l.DOF, x.st.int0)
		x.set(s, 12, row, l.BirgeRatio, x.st.fixed2)
		scaled := "no"
		if l.Scaled {
			scaled = "yes"
		}
		x.set(s, 13, row, scaled, 0)
	}
	pr := 4 + len(lines)
	const seriesCol = 15 // the chart series' names
	x.header(s, pr, "group", "id", "T ("+u.Symbol()+")", "T (K)", "10⁴/T (1/K)", "D (m²/s)", "D CI low (m²/s)", "D CI high (m²/s)",
		"ln D", "ln D on line", "residual (ln D)", "leverage", "studentized residual", "Cook's distance", "chart series")
	x.twoLines(s, pr)
	row := pr + 1
	type span struct{ r0, r1 int }
	var spans []span
	for _, l := range lines {
		r0 := row
		x.set(s, seriesCol, row, groupLabel(l), 0)
		x.set(s, seriesCol, row+1, groupLabel(l)+" line", 0)
		for _, p := range l.Points {
			lo, hi := pointCI(p.Point, l.Level)
			x.set(s, 1, row, groupLabel(l), 0)
			x.set(s, 2, row, p.ID, 0)
			x.set(s, 3, row, u.FromKelvin(p.T), x.st.temp)
			x.set(s, 4, row, p.T, x.st.fixed2)
			ds := x.dStyle(math.Exp(p.LnD), fit.Interval{Lo: lo, Hi: hi})
			x.set(s, 5, row, invT(p.T), x.st.fixed4)
			x.set(s, 6, row, math.Exp(p.LnD), ds)
			x.set(s, 7, row, lo, ds)
			x.set(s, 8, row, hi, ds)
			x.set(s, 9, row, p.LnD, x.st.fixed4)
			x.set(s, 10, row, p.Fitted, x.st.fixed4)
			x.set(s, 11, row, p.Residual, x.st.fixed4)
			// The point's influence on its line (empty where it is not
			// defined: a line through two temperatures, or a point with
			// leverage 1).
			x.set(s, 12, row, p.Leverage, x.st.fixed4)
			x.set(s, 13, row, p.Studentized, x.st.fixed2)
			x.set(s, 14, row, p.Cook, x.st.fixed4)
			row++
		}
		spans = append(spans, span{r0, row - 1})
	}
	x.widths(s, 16, 18, 10, 10, 12, 12, 14, 14, 10, 12, 14, 10, 12, 10, 16)
	// The chart below the tables, so that the sheet prints one page wide.
	chartRow := row + 1
	x.pageSetup(s, seriesCol, chartRow+chartPrintRows(arrheniusChartPx), true, 0, 0)
	if x.err != nil {
		return
	}
	var series []excelize.ChartSeries
	for i := range lines {
		col := xlHex(seriesColor(i))
		sp := spans[i]
		if sp.r1 < sp.r0 {
			continue
		}
		series = append(series,
			excelize.ChartSeries{Name: fmt.Sprintf("%s!$%s$%d", quoteSheet(s), colName(seriesCol), sp.r0), Categories: rng(s, 5, sp.r0, sp.r1), Values: rng(s, 9, sp.r0, sp.r1),
				Marker: excelize.ChartMarker{Symbol: chartMarkers[i%len(chartMarkers)], Size: 6, Fill: solid(col),
					Border: excelize.LineOptions{Type: excelize.LineSolid, Fill: solid(col), Width: 0.75}},
				Line: excelize.LineOptions{Type: excelize.LineNone}, Fill: solid(col)},
			excelize.ChartSeries{Name: fmt.Sprintf("%s!$%s$%d", quoteSheet(s), colName(seriesCol), sp.r0+1), Categories: rng(s, 5, sp.r0, sp.r1), Values: rng(s, 10, sp.r0, sp.r1),
				Marker: excelize.ChartMarker{Symbol: "none"}, Line: excelize.LineOptions{Type: excelize.LineSolid, Width: 1.5}, Fill: solid(col)})
	}
	x.addChart(s, cell(1, chartRow), &excelize.Chart{
		Type: excelize.Scatter, Series: series,
		Title:     chartText("Arrhenius plot: ln D against 10⁴/T", 11, true),
		XAxis:     chartAxis("10⁴/T (1/K)", nil, false),
		YAxis:     chartAxis("ln(D / (m²/s))", nil, true),
		Dimension: excelize.ChartDimension{Width: 760, Height: arrheniusChartPx},
	}, editTickMarks, editAxisLines, editXAxisAtBottom)
}

func (x *xlWriter) lotsSheet(res *CampaignReport, u TempUnit) {
	s := SheetLots
	c := res.Comparison
	x.set(s, 1, 1, "Lot comparison by "+c.By+": "+Temps(c.Verdict, u), x.st.title)
	x.header(s, 3, "test", "description", "F", "df1", "df2", "p")
	for i, t := range c.Tests {
		row := 4 + i
		x.set(s, 1, row, t.Name, 0)
		x.set(s, 2, row, t.Description, x.st.text)
		x.set(s, 3, row, t.F, x.st.fixed2)
		x.set(s, 4, row, t.DF1, x.st.int0)
		x.set(s, 5, row, t.DF2, x.st.int0)
		x.set(s, 6, row, t.P, x.sig(t.P, 2))
	}
	rr := 5 + len(c.Tests)
	level := Level(c.Level)
	x.header(s, rr, "group", "reference", "T ("+u.Symbol()+")", "T (K)", "D ratio", "ratio "+level+" CI low", "ratio "+level+" CI high", "p", "model")
	x.twoLines(s, rr)
	for i, r := range c.Ratios {
		row := rr + 1 + i
		x.set(s, 1, row, r.Group, 0)
		x.set(s, 2, row, r.Reference, 0)
		x.set(s, 3, row, u.FromKelvin(r.TRef), x.st.temp)
		x.set(s, 4, row, r.TRef, x.st.fixed2)
		rs := x.num(r.Value, LastDigit(r.Value, r.CI))
		x.set(s, 5, row, r.Value, rs)
		x.set(s, 6, row, r.CI.Lo, rs)
		x.set(s, 7, row, r.CI.Hi, rs)
		x.set(s, 8, row, r.P, x.sig(r.P, 2))
		x.set(s, 9, row, r.Model, 0)
	}
	if len(c.Pairs) > 0 {
		pr := rr + len(c.Ratios) + 2
		x.header(s, pr, "group A", "group B", "T ("+u.Symbol()+")", "T (K)", "D ratio B/A", "ratio "+level+" CI low", "ratio "+level+" CI high",
			"p", "p adjusted (Holm)", "differ", "model")
		for i, p := range c.Pairs {
			row := pr + 1 + i
			x.set(s, 1, row, p.A, 0)
			x.set(s, 2, row, p.B, 0)
			x.set(s, 3, row, u.FromKelvin(p.TRef), x.st.temp)
			x.set(s, 4, row, p.TRef, x.st.fixed2)
			ps := x.num(p.Ratio, LastDigit(p.Ratio, p.CI))
			x.set(s, 5, row, p.Ratio, ps)
			x.set(s, 6, row, p.CI.Lo, ps)
			x.set(s, 7, row, p.CI.Hi, ps)
			x.set(s, 8, row, p.P, x.sig(p.P, 2))
			x.set(s, 9, row, p.PAdjusted, x.sig(p.PAdjusted, 2))
			x.set(s, 10, row, pairVerdict(p), 0)
			x.set(s, 11, row, p.Model, 0)
		}
	}
	x.widths(s, 24, 60, 10, 8, 10, 14, 14, 10, 16)
	lastCol, lastRow := 9, rr+len(c.Ratios)
	if len(c.Pairs) > 0 {
		lastCol, lastRow = 11, rr+len(c.Ratios)+2+len(c.Pairs)
	}
	x.pageSetup(s, lastCol, lastRow, true, 0, 0)
}

func (x *xlWriter) partsSheet(res *CampaignReport, u TempUnit) {
	s := SheetParts
	x.set(s, 1, 1, "Back-calculated exposures of the parts marked unknown", x.st.title)
	level := Level(res.Options.Level)
	x.header(s, 3, "id", "lot", "solved for", "T ("+u.Symbol()+")", "T "+level+" CI low", "T "+level+" CI high", "T (K)",
		"t (h)", "t "+level+" CI low (h)", "t "+level+" CI high (h)", "interval method", "calibration", "error / warnings")
	x.twoLines(s, 3)
	for i, p := range res.Parts {
		row := 4 + i
		x.set(s, 1, row, p.ID, 0)
		x.set(s, 2, row, p.Lot, 0)
		x.set(s, 3, row, p.SolveFor, 0)
		if sol := p.Solution; sol != nil {
			T, t := sol.Temperature, sol.Time
			// Solved values with the digits of their intervals (to the
			// degree at least, as TemperatureEstimate writes them); given
			// ones as before.
			tU, tK, th := x.st.temp, x.st.fixed2, x.st.fixed2
			if !T.Given {
				ivU := fit.Interval{Lo: u.FromKelvin(T.CI.Lo), Hi: u.FromKelvin(T.CI.Hi)}
				tU = x.num(u.FromKelvin(T.Value), min(0, LastDigit(u.FromKelvin(T.Value), ivU)))
				tK = x.num(T.Value, min(0, LastDigit(T.Value, T.CI)))
			}
			if !t.Given {
				th = x.num(t.Value/3600, LastDigit(t.Value/3600, fit.Interval{Lo: t.CI.Lo / 3600, Hi: t.CI.Hi / 3600}))
			}
			x.set(s, 4, row, u.FromKelvin(T.Value), tU)
			x.set(s, 7, row, T.Value, tK)
			x.set(s, 8, row, t.Value/3600, th)
			if !T.Given {
				x.set(s, 5, row, u.FromKelvin(T.CI.Lo), tU)
				x.set(s, 6, row, u.FromKelvin(T.CI.Hi), tU)
				x.set(s, 11, row, T.Method, 0)
			}
			if !t.Given {
				x.set(s, 9, row, t.CI.Lo/3600, th)
				x.set(s, 10, row, t.CI.Hi/3600, th)
				x.set(s, 11, row, t.Method, 0)
			}
			x.set(s, 12, row, sol.Calibration.Source, x.st.text)
			var ws []string
			for _, w := range sol.Warnings {
				ws = append(ws, warnText(w, u))
			}
			x.set(s, 13, row, strings.Join(ws, "\n"), x.st.text)
		} else {
			x.set(s, 13, row, Temps(p.Error, u), x.st.text)
		}
	}
	cr := 6 + len(res.Parts)
	x.set(s, 1, cr, "Cautions", x.st.bold)
	for i, c := range arrhenius.Cautions {
		x.set(s, 1, cr+1+i, c, x.st.note)
		if x.err == nil {
			x.err = x.f.MergeCell(s, cell(1, cr+1+i), cell(13, cr+1+i))
		}
		if x.err == nil {
			x.err = x.f.SetRowHeight(s, cr+1+i, 30)
		}
	}
	x.widths(s, 16, 10, 12, 10, 12, 12, 10, 8, 12, 12, 14, 40, 50)
	x.pageSetup(s, 13, cr+len(arrhenius.Cautions), true, 0, 0)
}

func (x *xlWriter) auditSheet(res *CampaignReport) {
	s := SheetAudit
	x.set(s, 1, 1, "Audit trail", x.st.title)
	x.set(s, 1, 2, "software", x.st.bold)
	x.set(s, 2, 2, "fickfit "+res.Version, 0)
	row := 4
	x.header(s, row, "input file", "SHA-256", "bytes")
	for i, in := range res.Inputs {
		x.set(s, 1, row+1+i, in.Name, 0)
		x.set(s, 2, row+1+i, in.SHA256, 0)
		x.set(s, 3, row+1+i, in.Bytes, x.st.int0)
	}
	row += len(res.Inputs) + 2
	x.header(s, row, "option", "value")
	for i, kv := range auditPairs(res.audit()) {
		x.set(s, 1, row+1+i, kv[0], 0)
		x.set(s, 2, row+1+i, kv[1], 0)
	}
	row += len(auditPairs(res.audit())) + 2
	x.set(s, 1, row, "method notes", x.st.bold)
	for i, n := range MethodNotes() {
		x.set(s, 1, row+1+i, n.Topic, x.st.text)
		x.set(s, 2, row+1+i, n.Text+" Source: "+n.Source+".", x.st.note)
		if x.err == nil {
			x.err = x.f.SetRowHeight(s, row+1+i, 42)
		}
	}
	row += len(MethodNotes()) + 2
	x.set(s, 1, row, "cautions", x.st.bold)
	for i, c := range res.Cautions {
		x.set(s, 2, row+1+i, c, x.st.note)
		if x.err == nil {
			x.err = x.f.SetRowHeight(s, row+1+i, 30)
		}
	}
	last := row + len(res.Cautions)
	if rows := excludedRows(res.Excluded); len(rows) > 0 {
		row = last + 2
		x.header(s, row, "excluded (profile)", "file, line", "depth (µm)", "value", "reason")
		for i, r := range rows {
			for j, v := range r {
				x.set(s, 1+j, row+1+i, v, x.st.text)
			}
		}
		last = row + len(rows)
	}
	x.widths(s, 34, 100, 10)
	x.pageSetup(s, 3, last, false, 0, 0)
}

// auditPairs lists the options as (name, value) for the audit trail.
func auditPairs(a campaign.AuditOptions) [][2]string {
	f := func(v float64, zero string) string {
		if v == 0 {
			return zero
		}
		return fmt.Sprint(v)
	}
	join := func(s []string) string {
		if len(s) == 0 {
			return "none"
		}
		return strings.Join(s, ", ")
	}
	by := a.By
	if by == "" {
		by = "none (one line)"
	}
	return append([][2]string{
		{"model", a.Model}, {"interval method", a.CIMethod}, {"confidence level", fmt.Sprint(a.Level)},
		{"σ taken as known (absolute)", fmt.Sprint(a.AbsoluteSigma)}, {"fixed parameters", join(a.Fixed)},
		{"freed parameters", join(a.Free)}, {"grouped by", by}, {"Arrhenius method", a.Method},
		{"temperature uncertainty (K)", f(a.TSigma, "none beyond the profiles' own")},
		{"comparison temperature (K)", f(a.TRef, "where the data are centred")},
		{"reference lines", join(a.References)}, {"back-calculation interval", a.SolveMethod},
		{"temperature unit", a.TempUnit},
	}, exclusionsPair(a)...)
}

// exclusionsPair lists the options that are written only when used: the
// case-depth threshold, the hardness calibration and the exclusions file.
func exclusionsPair(a campaign.AuditOptions) [][2]string {
	var out [][2]string
	for _, kv := range [][2]string{{"case-depth threshold", a.CaseThreshold},
		{"hardness calibration", a.HardnessCalibration}, {"exclusions file", a.Exclusions}} {
		if kv[1] != "" {
			out = append(out, kv)
		}
	}
	return out
}
