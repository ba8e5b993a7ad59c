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
	return s, err
}

// xlWriter accumulates the first error of many excelize calls.
type xlWriter struct {
	f   *excelize.File
	st  xlStyles
	err error
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
	x := &xlWriter{f: f, st: st}
	names := newSheetNamer(SheetSummary, SheetArrhenius, SheetLots, SheetParts, SheetAudit)
	if err := f.SetSheetName("Sheet1", SheetSummary); err != nil {
		return err
	}
	u := o.TempUnit
	x.summarySheet(res, u)
	total := len(res.Results)
	for i, r := range res.Results {
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
	cols := []string{"id", "lot", "T (" + u.Symbol() + ")", "T (K)", "t (h)", "model", "D (m²/s)",
		"D " + level + " CI low (m²/s)", "D " + level + " CI high (m²/s)", "Dt (m²)", "Cs", "C0", "value unit",
		"R²", "RMSE", "n", "warnings", "source"}
	x.header(s, 1, cols...)
	row := 2
	hasCase := false
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
			if r.Time > 0 {
				x.set(s, 7, row, d.Value, x.st.sci)
				x.set(s, 8, row, d.CI.Lo, x.st.sci)
				x.set(s, 9, row, d.CI.Hi, x.st.sci)
				x.set(s, 10, row, d.Value*r.Time, x.st.sci)
			} else {
				x.set(s, 10, row, d.Value, x.st.sci)
			}
		}
		for k, name := range []string{"Cs", "C0"} {
			if e := r.Param(name); e != nil {
				x.set(s, 11+k, row, e.Value, x.st.fixed4)
			}
		}
		x.set(s, 13, row, r.ValueUnit, 0)
		x.set(s, 14, row, r.Stats.R2, x.st.fixed4)
		x.set(s, 15, row, r.Stats.RMSE, x.st.sci)
		x.set(s, 16, row, r.Stats.N, x.st.int0)
		var ws []string
		for _, w := range r.Warnings {
			ws = append(ws, warnText(w, u))
		}
		x.set(s, 17, row, strings.Join(ws, "\n"), x.st.text)
		x.set(s, 18, row, r.Source, 0)
		if e := r.CaseDepth; e != nil {
			hasCase = true
			x.set(s, 19, row, e.Depth*1e3, x.st.fixed4)
			x.set(s, 20, row, e.CI.Lo*1e3, x.st.fixed4)
			x.set(s, 21, row, e.CI.Hi*1e3, x.st.fixed4)
			x.set(s, 22, row, e.FromData*1e3, x.st.fixed4)
			x.set(s, 23, row, e.Threshold, 0)
		}
		row++
	}
	if hasCase {
		for i, h := range []string{"case depth (mm)", "case depth " + level + " CI low (mm)", "case depth " + level + " CI high (mm)",
			"case depth from the points (mm)", "case threshold"} {
			x.set(s, 19+i, 1, h, x.st.header)
		}
	}
	for _, fl := range res.Failed {
		x.set(s, 1, row, fl.ID, 0)
		x.set(s, 2, row, fl.Lot, 0)
		x.set(s, 17, row, "not fitted: "+fl.Error, x.st.text)
		x.set(s, 18, row, fl.Source, 0)
		row++
	}
	x.widths(s, 18, 11, 9, 9, 7, 8, 12, 14, 14, 12, 9, 9, 8, 8, 11, 5, 60, 30)
	x.freeze(s, 1)
	if x.err == nil && row > 2 {
		x.err = x.f.AutoFilter(s, "A1:"+cell(len(cols), row-1), nil)
	}
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
	// Parameters.
	pr := 10
	x.header(s, pr, "parameter", "value", "unit", "std. error", Level(r.CILevel)+" CI low", Level(r.CILevel)+" CI high", "fixed")
	for i, e := range r.Params {
		row := pr + 1 + i
		style := x.st.fixed4
		if e.Unit == "m2/s" || e.Unit == "m2" || e.Unit == "m" || e.Unit == "m/s" {
			style = x.st.sci
		}
		name := e.Name
		if name == "D" && r.Time == 0 {
			name = "Dt"
		}
		x.set(s, 1, row, name, 0)
		x.set(s, 2, row, e.Value, style)
		x.set(s, 3, row, PrettyUnit(e.Unit), 0)
		if !e.Fixed {
			x.set(s, 4, row, e.StdErr, style)
			x.set(s, 5, row, e.CI.Lo, style)
			x.set(s, 6, row, e.CI.Hi, style)
		}
		x.set(s, 7, row, e.Fixed, 0)
	}
	st := r.Stats
	sr := pr + len(r.Params) + 2
	x.set(s, 1, sr, "statistics", x.st.bold)
	for i, kv := range [][2]any{{"n", float64(st.N)}, {"dof", float64(st.DOF)}, {"RSS", st.RSS}, {"RMSE", st.RMSE}, {"R²", st.R2},
		{"AICc", st.AICc}, {"χ²red", st.Chi2Red}, {"runs test p", st.RunsP}, {"condition number", st.Cond}} {
		x.set(s, 1, sr+1+i, kv[0], 0)
		x.set(s, 2, sr+1+i, kv[1], x.st.sci)
	}
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
	wr := sr + 11
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
	xmax := 0.0
	for _, p := range r.Residuals {
		xmax = math.Max(xmax, p.Depth)
	}
	f, du := DepthScale(xmax * 1.05)
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
	for i, p := range r.Residuals {
		row := 2 + i
		x.set(s, dc, row, p.Depth/f, x.st.fixed4)
		x.set(s, dc+1, row, p.Observed, x.st.fixed4)
		x.set(s, dc+2, row, p.Fitted, x.st.fixed4)
		x.set(s, dc+3, row, p.Residual, x.st.sci)
	}
	n := len(r.Residuals)
	const m = 61
	gx := make([]float64, m)
	for i := range gx {
		gx[i] = xmax * 1.04 * float64(i) / float64(m-1)
	}
	gy, lo, hi, cerr := r.Curve(gx)
	if cerr == nil {
		for i := range gx {
			x.set(s, dc+5, 2+i, gx[i]/f, x.st.fixed4)
			x.set(s, dc+6, 2+i, gy[i], x.st.fixed4)
			x.set(s, dc+7, 2+i, lo[i], x.st.fixed4)
			x.set(s, dc+8, 2+i, hi[i], x.st.fixed4)
		}
	}
	x.widths(s, 20, 26, 10, 12, 12, 12, 8, 2, 12, 14, 14, 14, 2, 14, 16, 14, 14)
	if x.err != nil || n == 0 {
		return
	}
	// Series names refer to header cells: a literal name would be stored
	// as a formula, which spreadsheet programs reject.
	name := func(col int) string { return fmt.Sprintf("%s!$%s$1", quoteSheet(s), colName(col)) }
	series := []excelize.ChartSeries{{
		Name: name(dc + 1), Categories: rng(s, dc, 2, n+1), Values: rng(s, dc+1, 2, n+1),
		Marker: excelize.ChartMarker{Symbol: "circle", Size: 5, Fill: solid("FFFFFF"), Border: excelize.LineOptions{Type: excelize.LineSolid, Fill: solid(xlHex(colData)), Width: 1}},
		Line:   excelize.LineOptions{Type: excelize.LineNone}, Fill: solid(xlHex(colData)),
	}}
	if cerr == nil {
		series = append(series,
			excelize.ChartSeries{Name: name(dc + 6), Categories: rng(s, dc+5, 2, m+1), Values: rng(s, dc+6, 2, m+1),
				Marker: excelize.ChartMarker{Symbol: "none"}, Line: excelize.LineOptions{Type: excelize.LineSolid, Width: 1.75, Smooth: true}, Fill: solid(xlHex(colFit))},
			excelize.ChartSeries{Name: name(dc + 7), Categories: rng(s, dc+5, 2, m+1), Values: rng(s, dc+7, 2, m+1),
				Marker: excelize.ChartMarker{Symbol: "none"}, Line: excelize.LineOptions{Type: excelize.LineSolid, Width: 0.75, Dash: excelize.LineDashDash, Smooth: true}, Fill: solid(xlHex(tint(colFit, 0.55)))},
			excelize.ChartSeries{Name: name(dc + 8), Categories: rng(s, dc+5, 2, m+1), Values: rng(s, dc+8, 2, m+1),
				Marker: excelize.ChartMarker{Symbol: "none"}, Line: excelize.LineOptions{Type: excelize.LineSolid, Width: 0.75, Dash: excelize.LineDashDash, Smooth: true}, Fill: solid(xlHex(tint(colFit, 0.55)))},
		)
	} else {
		series = append(series, excelize.ChartSeries{Name: name(dc + 2), Categories: rng(s, dc, 2, n+1), Values: rng(s, dc+2, 2, n+1),
			Marker: excelize.ChartMarker{Symbol: "none"}, Line: excelize.LineOptions{Type: excelize.LineSolid, Width: 1.75}, Fill: solid(xlHex(colFit))})
	}
	zero := 0.0
	x.err = x.f.AddChart(s, cell(1, wr+len(r.Warnings)+2), &excelize.Chart{
		Type: excelize.Scatter, Series: series,
		Title:     excelize.ChartTitle{Paragraph: []excelize.RichTextRun{{Text: r.ID + " — " + valueLabel(r) + " against depth"}}},
		Legend:    excelize.ChartLegend{Position: "bottom"},
		XAxis:     excelize.ChartAxis{Minimum: &zero, Title: excelize.ChartTitle{Paragraph: []excelize.RichTextRun{{Text: "depth (" + du + ")"}}}},
		YAxis:     excelize.ChartAxis{MajorGridLines: true, Title: excelize.ChartTitle{Paragraph: []excelize.RichTextRun{{Text: valueLabel(r)}}}},
		Dimension: excelize.ChartDimension{Width: 640, Height: 380},
	})
}

func (x *xlWriter) arrheniusSheet(res *CampaignReport, u TempUnit) {
	s := SheetArrhenius
	lines := res.Lines.Lines
	level := Level(lines[0].Level)
	x.set(s, 1, 1, "Arrhenius lines ("+res.Method+"), ln D = ln D0 − Q/(RT), R = 8.314462618 J/(mol·K)", x.st.title)
	x.header(s, 2, "group", "D0 (m²/s)", "D0 "+level+" CI low", "D0 "+level+" CI high", "Q (kJ/mol)", "Q "+level+" CI low", "Q "+level+" CI high",
		"corr(ln D0, Q)", "points", "temperatures", "dof", "Birge ratio", "scaled")
	for i, l := range lines {
		row := 3 + i
		d0 := l.D0CI()
		q := l.QCI()
		x.set(s, 1, row, groupLabel(l), 0)
		x.set(s, 2, row, l.D0(), x.st.sci)
		x.set(s, 3, row, d0.Lo, x.st.sci)
		x.set(s, 4, row, d0.Hi, x.st.sci)
		x.set(s, 5, row, l.Q/1e3, x.st.fixed2)
		x.set(s, 6, row, q.Lo/1e3, x.st.fixed2)
		x.set(s, 7, row, q.Hi/1e3, x.st.fixed2)
		x.set(s, 8, row, l.Corr(), x.st.fixed4)
		x.set(s, 9, row, len(l.Points), x.st.int0)
		x.set(s, 10, row, l.NTemperatures, x.st.int0)
		x.set(s, 11, row, l.DOF, x.st.int0)
		x.set(s, 12, row, l.BirgeRatio, x.st.fixed2)
		x.set(s, 13, row, l.Scaled, 0)
	}
	pr := 4 + len(lines)
	x.header(s, pr, "group", "id", "T ("+u.Symbol()+")", "T (K)", "10⁴/T (1/K)", "D (m²/s)", "D CI low (m²/s)", "D CI high (m²/s)",
		"ln D", "ln D on line", "residual (ln D)", "chart series")
	row := pr + 1
	type span struct{ r0, r1 int }
	var spans []span
	for _, l := range lines {
		r0 := row
		x.set(s, 12, row, groupLabel(l), 0)
		x.set(s, 12, row+1, groupLabel(l)+" line", 0)
		for _, p := range l.Points {
			lo, hi := pointCI(p.Point, l.Level)
			x.set(s, 1, row, groupLabel(l), 0)
			x.set(s, 2, row, p.ID, 0)
			x.set(s, 3, row, u.FromKelvin(p.T), x.st.temp)
			x.set(s, 4, row, p.T, x.st.fixed2)
			x.set(s, 5, row, invT(p.T), x.st.fixed4)
			x.set(s, 6, row, math.Exp(p.LnD), x.st.sci)
			x.set(s, 7, row, lo, x.st.sci)
			x.set(s, 8, row, hi, x.st.sci)
			x.set(s, 9, row, p.LnD, x.st.fixed4)
			x.set(s, 10, row, p.Fitted, x.st.fixed4)
			x.set(s, 11, row, p.Residual, x.st.fixed4)
			row++
		}
		spans = append(spans, span{r0, row - 1})
	}
	x.widths(s, 16, 18, 10, 10, 12, 12, 14, 14, 10, 12, 14, 16, 8)
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
			excelize.ChartSeries{Name: fmt.Sprintf("%s!$L$%d", quoteSheet(s), sp.r0), Categories: rng(s, 5, sp.r0, sp.r1), Values: rng(s, 9, sp.r0, sp.r1),
				Marker: excelize.ChartMarker{Symbol: []string{"circle", "square", "triangle", "diamond"}[i%4], Size: 6, Fill: solid(col), Border: excelize.LineOptions{Type: excelize.LineSolid, Fill: solid(col)}},
				Line:   excelize.LineOptions{Type: excelize.LineNone}, Fill: solid(col)},
			excelize.ChartSeries{Name: fmt.Sprintf("%s!$L$%d", quoteSheet(s), sp.r0+1), Categories: rng(s, 5, sp.r0, sp.r1), Values: rng(s, 10, sp.r0, sp.r1),
				Marker: excelize.ChartMarker{Symbol: "none"}, Line: excelize.LineOptions{Type: excelize.LineSolid, Width: 1.5}, Fill: solid(col)})
	}
	x.err = x.f.AddChart(s, cell(14, pr), &excelize.Chart{
		Type: excelize.Scatter, Series: series,
		Title:     excelize.ChartTitle{Paragraph: []excelize.RichTextRun{{Text: "Arrhenius plot: ln D against 10⁴/T"}}},
		Legend:    excelize.ChartLegend{Position: "bottom"},
		XAxis:     excelize.ChartAxis{Title: excelize.ChartTitle{Paragraph: []excelize.RichTextRun{{Text: "10⁴/T (1/K)"}}}},
		YAxis:     excelize.ChartAxis{MajorGridLines: true, Title: excelize.ChartTitle{Paragraph: []excelize.RichTextRun{{Text: "ln(D / (m²/s))"}}}},
		Dimension: excelize.ChartDimension{Width: 640, Height: 400},
	})
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
		x.set(s, 3, row, t.F, x.st.fixed4)
		x.set(s, 4, row, t.DF1, x.st.int0)
		x.set(s, 5, row, t.DF2, x.st.int0)
		x.set(s, 6, row, t.P, x.st.sci)
	}
	rr := 5 + len(c.Tests)
	level := Level(c.Level)
	x.header(s, rr, "group", "reference", "T ("+u.Symbol()+")", "T (K)", "D ratio", "ratio "+level+" CI low", "ratio "+level+" CI high", "p", "model")
	for i, r := range c.Ratios {
		row := rr + 1 + i
		x.set(s, 1, row, r.Group, 0)
		x.set(s, 2, row, r.Reference, 0)
		x.set(s, 3, row, u.FromKelvin(r.TRef), x.st.temp)
		x.set(s, 4, row, r.TRef, x.st.fixed2)
		x.set(s, 5, row, r.Value, x.st.fixed4)
		x.set(s, 6, row, r.CI.Lo, x.st.fixed4)
		x.set(s, 7, row, r.CI.Hi, x.st.fixed4)
		x.set(s, 8, row, r.P, x.st.sci)
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
			x.set(s, 5, row, p.Ratio, x.st.fixed4)
			x.set(s, 6, row, p.CI.Lo, x.st.fixed4)
			x.set(s, 7, row, p.CI.Hi, x.st.fixed4)
			x.set(s, 8, row, p.P, x.st.sci)
			x.set(s, 9, row, p.PAdjusted, x.st.sci)
			x.set(s, 10, row, pairVerdict(p), 0)
			x.set(s, 11, row, p.Model, 0)
		}
	}
	x.widths(s, 24, 60, 10, 8, 10, 14, 14, 10, 16)
}

func (x *xlWriter) partsSheet(res *CampaignReport, u TempUnit) {
	s := SheetParts
	x.set(s, 1, 1, "Back-calculated exposures of the parts marked unknown", x.st.title)
	level := Level(res.Options.Level)
	x.header(s, 3, "id", "lot", "solved for", "T ("+u.Symbol()+")", "T "+level+" CI low", "T "+level+" CI high", "T (K)",
		"t (h)", "t "+level+" CI low (h)", "t "+level+" CI high (h)", "interval method", "calibration", "error / warnings")
	for i, p := range res.Parts {
		row := 4 + i
		x.set(s, 1, row, p.ID, 0)
		x.set(s, 2, row, p.Lot, 0)
		x.set(s, 3, row, p.SolveFor, 0)
		if sol := p.Solution; sol != nil {
			T, t := sol.Temperature, sol.Time
			x.set(s, 4, row, u.FromKelvin(T.Value), x.st.temp)
			x.set(s, 7, row, T.Value, x.st.fixed2)
			x.set(s, 8, row, t.Value/3600, x.st.fixed2)
			if !T.Given {
				x.set(s, 5, row, u.FromKelvin(T.CI.Lo), x.st.temp)
				x.set(s, 6, row, u.FromKelvin(T.CI.Hi), x.st.temp)
				x.set(s, 11, row, T.Method, 0)
			}
			if !t.Given {
				x.set(s, 9, row, t.CI.Lo/3600, x.st.fixed2)
				x.set(s, 10, row, t.CI.Hi/3600, x.st.fixed2)
				x.set(s, 11, row, t.Method, 0)
			}
			x.set(s, 12, row, sol.Calibration.Source, x.st.text)
			var ws []string
			for _, w := range sol.Warnings {
				ws = append(ws, warnText(w, u))
			}
			x.set(s, 13, row, strings.Join(ws, "\n"), x.st.text)
		} else {
			x.set(s, 13, row, p.Error, x.st.text)
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
		x.set(s, 1, row+1+i, n.Topic, 0)
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
	x.widths(s, 34, 100, 10)
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
	return [][2]string{
		{"model", a.Model}, {"interval method", a.CIMethod}, {"confidence level", fmt.Sprint(a.Level)},
		{"σ taken as known (absolute)", fmt.Sprint(a.AbsoluteSigma)}, {"fixed parameters", join(a.Fixed)},
		{"freed parameters", join(a.Free)}, {"grouped by", by}, {"Arrhenius method", a.Method},
		{"temperature uncertainty (K)", f(a.TSigma, "none beyond the profiles' own")},
		{"comparison temperature (K)", f(a.TRef, "where the data are centred")},
		{"reference lines", join(a.References)}, {"back-calculation interval", a.SolveMethod},
		{"temperature unit", a.TempUnit},
	}
}
