package report

import (
	"fmt"
	"math"
	"regexp"
	"strings"

	"github.com/xuri/excelize/v2"

	"github.com/fickfit/fickfit/fit"
)

// The look of the workbook as a spreadsheet application shows and prints
// it: number formats with the reports' digits, charts in the house style,
// and the print setup of a sheet.

// Number formats. A cell shows a number with the digits the text and HTML
// reports give it (paramLast, LastDigit, SigDigits in format.go); the cell
// keeps the full value.

// xlNumFmt is the number format that shows v as Number(v, last) writes it:
// fixed with the decimals of the place 10^last, or, where Number uses a
// power of ten, scientific with the same significant digits.
func xlNumFmt(v float64, last int) string {
	if r := roundAt(v, last); finite(r) && useSci(r) {
		return xlSciFmt(exp10(r) - last + 1)
	}
	if last >= 0 {
		return "0"
	}
	return "0." + strings.Repeat("0", -last)
}

// xlSciFmt is the scientific format with sig significant digits: 3 → "0.00E+00".
func xlSciFmt(sig int) string {
	if sig <= 1 {
		return "0E+00"
	}
	return "0." + strings.Repeat("0", sig-1) + "E+00"
}

// xlDFmt is the format of a diffusion coefficient (or Dt) and of its
// interval's ends: scientific, with the significant digits its interval
// supports (LastDigit) held to three or four, so that D columns read
// alike from row to row.
func xlDFmt(v float64, iv fit.Interval) string {
	sig := exp10(v) - LastDigit(v, iv) + 1
	return xlSciFmt(max(3, min(4, sig)))
}

// numStyle returns the style of the number format code, made once.
func (x *xlWriter) numStyle(code string) int {
	if id, ok := x.st.byFormat[code]; ok || x.err != nil {
		return id
	}
	id, err := x.f.NewStyle(&excelize.Style{CustomNumFmt: &code})
	if err != nil {
		x.err = err
		return 0
	}
	x.st.byFormat[code] = id
	return id
}

// num is the style showing v rounded at 10^last (xlNumFmt).
func (x *xlWriter) num(v float64, last int) int { return x.numStyle(xlNumFmt(v, last)) }

// sig is the style showing v with n significant digits.
func (x *xlWriter) sig(v float64, n int) int { return x.num(v, SigDigits(v, n)) }

// dStyle is the style of a diffusion coefficient with interval iv (xlDFmt).
func (x *xlWriter) dStyle(v float64, iv fit.Interval) int { return x.numStyle(xlDFmt(v, iv)) }

// dataDecimals is the fewest decimals (at most maxDec) that write every
// value of vs exactly: the resolution the data were recorded with.
func dataDecimals(vs []float64, maxDec int) int {
	for d := 0; d < maxDec; d++ {
		p := math.Pow(10, float64(d))
		exact := true
		for _, v := range vs {
			if w := v * p; finite(w) && math.Abs(w-math.Round(w)) > 1e-6*math.Max(1, math.Abs(w)) {
				exact = false
				break
			}
		}
		if exact {
			return d
		}
	}
	return maxDec
}

// fixedFmt is the fixed format with dec decimals.
func fixedFmt(dec int) string { return xlNumFmt(1, -dec) }

// Page layout: the charts' heights (pixels) and the most rows of a profile
// sheet printed on one page.
const (
	profileChartPx     = 380
	arrheniusChartPx   = 420
	profileOnePageRows = 70
)

// chartPrintRows is the number of rows a chart px high covers, counted
// generously: spreadsheet programs' default row heights differ (15 pt in
// Excel, less in LibreOffice with the fonts it substitutes), and a print
// area that ends above the chart's bottom cuts its legend off.
func chartPrintRows(px int) int { return px/16 + 2 }

// Workbook chart colours beyond the figures': the plot area's ground and
// the dashed ends of a profile's confidence band.
var (
	colPlotArea = rgbHex(0xf5f7f8)
	colBandLine = rgbHex(0x6e3a2b)
)

// chartText is a chart or axis title in ink.
func chartText(text string, size float64, bold bool) excelize.ChartTitle {
	return excelize.ChartTitle{Paragraph: []excelize.RichTextRun{{Text: text,
		Font: &excelize.Font{Family: "Calibri", Size: size, Bold: bold, Color: xlHex(colInk)}}}}
}

// chartAxis is an axis with ink labels (excelize's default is a 15 % grey
// that prints too faint to read), a title, an optional minimum and, with
// rules, faint lines across the plot at its labels.
func chartAxis(title string, minimum *float64, rules bool) excelize.ChartAxis {
	return excelize.ChartAxis{Minimum: minimum, MajorGridLines: rules,
		Font:  excelize.Font{Family: "Calibri", Size: 9, Color: xlHex(colInk)},
		Title: chartText(title, 9, false)}
}

// addChart adds a chart in the house style (ink text, legend below, a
// faint ground to the plot area), then applies edits to its XML.
func (x *xlWriter) addChart(sheet, at string, c *excelize.Chart, edits ...chartEdit) {
	if x.err != nil {
		return
	}
	c.Legend = excelize.ChartLegend{Position: "bottom", Font: &excelize.Font{Family: "Calibri", Size: 9, Color: xlHex(colInk)}}
	c.PlotArea.Fill = solid(xlHex(colPlotArea))
	if x.err = x.f.AddChart(sheet, at, c); x.err != nil {
		return
	}
	x.charts++
	x.patchChart(x.charts, edits...)
}

// chartEdit is a change to a chart's XML that excelize's options cannot
// make. Its pattern must match: should an excelize upgrade change the XML,
// writing the workbook fails (and the tests with it) rather than quietly
// dropping the change.
type chartEdit struct {
	what        string
	re          *regexp.Regexp
	replacement string
}

var (
	// Tick marks outside the axes, as on the figures.
	editTickMarks = chartEdit{"tick marks", regexp.MustCompile(`<majorTickMark val="none"></majorTickMark>`),
		`<majorTickMark val="out"></majorTickMark>`}
	// Axis lines in muted ink rather than excelize's 15 % grey.
	editAxisLines = chartEdit{"axis lines",
		regexp.MustCompile(`(<tickLblPos val="[a-zA-Z]+"></tickLblPos><spPr><a:ln[^>]*>)<a:solidFill><a:schemeClr val="tx1">.*?</a:schemeClr></a:solidFill>`),
		`${1}<a:solidFill><a:srgbClr val="5C6A74"></a:srgbClr></a:solidFill>`}
	// The horizontal axis crosses the vertical one at its minimum, not at
	// zero, so that it lies along the bottom when every value is negative
	// (ln D).
	editXAxisAtBottom = chartEdit{"horizontal axis at the bottom",
		regexp.MustCompile(`(<valAx><axId val="100000000"></axId>.*?)<crosses val="autoZero"></crosses>`),
		`${1}<crosses val="min"></crosses>`}
)

// patchChart applies edits to the n-th chart of the workbook (1-based, in
// the order added; the workbook is new, so chart n is xl/charts/chartn.xml).
func (x *xlWriter) patchChart(n int, edits ...chartEdit) {
	if x.err != nil || len(edits) == 0 {
		return
	}
	part := fmt.Sprintf("xl/charts/chart%d.xml", n)
	v, _ := x.f.Pkg.Load(part)
	b, ok := v.([]byte)
	if !ok {
		x.err = fmt.Errorf("writing the workbook: chart part %s not found", part)
		return
	}
	str := string(b)
	for _, e := range edits {
		if !e.re.MatchString(str) {
			x.err = fmt.Errorf("writing the workbook: cannot set the %s of chart %d (excelize writes charts differently than expected)", e.what, n)
			return
		}
		str = e.re.ReplaceAllString(str, e.replacement)
	}
	x.f.Pkg.Store(part, []byte(str))
}

// pageSetup prepares a sheet for print: the print area from A1 to
// (lastCol, lastRow), landscape or portrait, scaled to one page wide and
// tall pages high (0: as many as the rows need), the first titleRows rows
// repeated on every page, and a footer with the program, the sheet and the
// page. The paper size is left to the printer's default.
func (x *xlWriter) pageSetup(sheet string, lastCol, lastRow int, landscape bool, tall, titleRows int) {
	if x.err != nil {
		return
	}
	orient := "portrait"
	if landscape {
		orient = "landscape"
	}
	one, fit := 1, true
	margin, edge := 0.5, 0.3
	steps := []func() error{
		func() error {
			return x.f.SetPageLayout(sheet, &excelize.PageLayoutOptions{Orientation: &orient, FitToWidth: &one, FitToHeight: &tall})
		},
		func() error { return x.f.SetSheetProps(sheet, &excelize.SheetPropsOptions{FitToPage: &fit}) },
		func() error {
			return x.f.SetPageMargins(sheet, &excelize.PageLayoutMarginsOptions{Left: &margin, Right: &margin, Top: &margin,
				Bottom: &margin, Header: &edge, Footer: &edge})
		},
		func() error {
			return x.f.SetDefinedName(&excelize.DefinedName{Name: "_xlnm.Print_Area", Scope: sheet,
				RefersTo: fmt.Sprintf("%s!$A$1:$%s$%d", quoteSheet(sheet), colName(lastCol), lastRow)})
		},
		func() error {
			if titleRows <= 0 {
				return nil
			}
			return x.f.SetDefinedName(&excelize.DefinedName{Name: "_xlnm.Print_Titles", Scope: sheet,
				RefersTo: fmt.Sprintf("%s!$1:$%d", quoteSheet(sheet), titleRows)})
		},
		func() error {
			// & starts a code in a header or footer: a literal one is doubled.
			version := strings.ReplaceAll(x.version, "&", "&&")
			return x.f.SetHeaderFooter(sheet, &excelize.HeaderFooterOptions{
				OddFooter: "&L&8fickfit " + version + "&C&8&A&R&8page &P of &N"})
		},
	}
	for _, step := range steps {
		if x.err = step(); x.err != nil {
			return
		}
	}
}

// pageBreakAfter starts a new printed page below row.
func (x *xlWriter) pageBreakAfter(sheet string, row int) {
	if x.err == nil {
		x.err = x.f.InsertPageBreak(sheet, cell(1, row+1))
	}
}

// chartMarkers are the workbook's marker shapes of groups, in the order
// of the figures' (seriesGlyphs) where the format has the shape.
var chartMarkers = []string{"circle", "square", "triangle", "diamond", "x", "star", "plus", "dash"}
