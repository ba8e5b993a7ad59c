package report

import (
	"bufio"
	"bytes"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"github.com/fickfit/fickfit/arrhenius"
	"github.com/fickfit/fickfit/fit"
	"github.com/fickfit/fickfit/fit/matano"
)

// Writers for the decision commands (arrhenius, backcalc, predict, compare,
// reference, matano) and, by delegation, for fit results. Each value is
// written in three ways:
//
//   - JSON: the value's own MarshalJSON shape (the contract, documented in
//     package arrhenius and fit/matano), with "fickfit_version" as the
//     first key, as the fit command writes it. Slices are wrapped in an
//     object: {"backcalc":[…],"cautions":[…]}, {"predictions":[…]},
//     {"references":[…]}, {"matano":[…]}. Indented by two spaces, '<', '>'
//     and '&' not escaped, a trailing newline; identical input gives
//     identical bytes.
//   - CSV: one or more tables in one stream. Every row starts with the
//     name of its table ("line", "point", …), its header row too, and an
//     empty line separates the tables, so that a script can read the
//     stream with a CSV reader that allows a varying number of fields and
//     split on the first column. Numbers are SI in shortest round-trip form
//     with the unit in the column name; an empty cell means not determined
//     (an open interval end) or not applicable.
//   - Text: for people; numbers rounded to what their intervals support
//     (format.go), units always written, temperatures in the user's unit
//     with kelvin beside, warnings under the number they concern and the
//     cautions at the end. The cautions of back-calculations and
//     predictions are written even with TextOptions.NoCautions: those
//     numbers feed decisions about parts.

// viewFaraday is the molar charge of one electron, N_A·e in C/mol, which
// converts an energy per mole to electronvolts per atom: 1 eV/atom =
// 96 485.332 12 J/mol (CODATA 2018; N_A and e are exact since the 2019 SI).
const viewFaraday = 6.02214076e23 * 1.602176634e-19

// viewLabel is the width of the label column of the text views.
const viewLabel = 15

// viewLineCautions accompany every Arrhenius line.
var viewLineCautions = []string{
	"D0 and Q describe the measured temperature range only; outside it the line is an extrapolation that assumes no change of diffusion mechanism, phase or composition.",
	"Intervals cover the scatter of the D values about the line (and the temperature uncertainty where one was given), not bias of the measurement method, the hold times or the furnace temperatures.",
	"Verify by metallography (microstructure, microhardness traverse or chemical profile) before acting on a number.",
	"The applicable specifications decide acceptance; defer to local codes and to licensed engineering judgement.",
}

// viewCompareCautions accompany every lot comparison.
var viewCompareCautions = []string{
	"The tests assume that each group follows a straight Arrhenius line and that the stated errors of ln D are right up to one common factor.",
	"A significant difference is not necessarily one that matters for the parts, and no significant difference does not show that the groups are equal: judge the size of the ratio and its interval.",
	"The applicable specifications decide acceptance; defer to local codes and to licensed engineering judgement.",
}

// viewReferenceCaution is the footnote of the reference table.
const viewReferenceCaution = "Rows marked * were written down from memory of the named source and not checked against a copy: check them against the handbook before use."

// viewMatanoCautions accompany every D(C) analysis.
var viewMatanoCautions = []string{
	"D(C) rests on the Boltzmann transformation: an infinite couple, D a function of concentration alone, fixed end compositions and no change of volume on diffusion.",
	"The band is a bootstrap of the whole smoothing procedure, the choice of the number of terms included: it covers the scatter of the measured points and the smoother's own uncertainty, not a bias of the measurement method.",
	"Verify by metallography before acting on a number; the applicable specifications decide acceptance; defer to local codes and to licensed engineering judgement.",
}

// viewValue is a value normalised to one of the forms the writers know.
type viewValue struct {
	report      *arrhenius.Report
	solutions   []*arrhenius.Solution
	predictions []*arrhenius.Prediction
	comparison  *arrhenius.Comparison
	references  []arrhenius.Reference
	matano      []*matano.Result
	fits        *Fits
}

// viewNormalise accepts the documented types and their obvious variants
// (a single value for a slice, a value for a pointer).
func viewNormalise(v any) (viewValue, error) {
	var out viewValue
	nilErr := func() (viewValue, error) {
		return out, fmt.Errorf("report: nothing to write (nil %T)", v)
	}
	switch x := v.(type) {
	case *arrhenius.Report:
		if x == nil {
			return nilErr()
		}
		out.report = x
	case arrhenius.Report:
		out.report = &x
	case *arrhenius.Line:
		if x == nil {
			return nilErr()
		}
		out.report = &arrhenius.Report{Lines: []arrhenius.Line{*x}}
	case arrhenius.Line:
		out.report = &arrhenius.Report{Lines: []arrhenius.Line{x}}
	case []*arrhenius.Solution:
		out.solutions = viewNonNil(x)
	case *arrhenius.Solution:
		if x == nil {
			return nilErr()
		}
		out.solutions = []*arrhenius.Solution{x}
	case []*arrhenius.Prediction:
		out.predictions = viewNonNil(x)
	case *arrhenius.Prediction:
		if x == nil {
			return nilErr()
		}
		out.predictions = []*arrhenius.Prediction{x}
	case *arrhenius.Comparison:
		if x == nil {
			return nilErr()
		}
		out.comparison = x
	case arrhenius.Comparison:
		out.comparison = &x
	case []arrhenius.Reference:
		out.references = nonNil(x)
	case arrhenius.Reference:
		out.references = []arrhenius.Reference{x}
	case []*matano.Result:
		out.matano = viewNonNil(x)
	case *matano.Result:
		if x == nil {
			return nilErr()
		}
		out.matano = []*matano.Result{x}
	case []*fit.Result:
		out.fits = &Fits{Results: viewNonNil(x)}
	case *fit.Result:
		if x == nil {
			return nilErr()
		}
		out.fits = &Fits{Results: []*fit.Result{x}}
	case Fits:
		out.fits = &x
	case *Fits:
		if x == nil {
			return nilErr()
		}
		out.fits = x
	case nil:
		return out, fmt.Errorf("report: nothing to write (nil value)")
	default:
		return out, fmt.Errorf("report: cannot write a value of type %T: the writers take an Arrhenius report, back-calculations, predictions, a comparison, reference rows, Matano results or fit results", v)
	}
	return out, nil
}

// viewNonNil drops nil pointers and never returns nil.
func viewNonNil[T any](s []*T) []*T {
	out := make([]*T, 0, len(s))
	for _, x := range s {
		if x != nil {
			out = append(out, x)
		}
	}
	return out
}

// JSON writes v as indented JSON with stable keys (the arrhenius and
// matano types' own MarshalJSON shapes, see the top of this file) and
// "fickfit_version" first; byte-identical for identical input; a trailing
// newline. Fit results are written by Fits.WriteJSON. An unsupported type
// is an error.
func JSON(w io.Writer, v any) error {
	n, err := viewNormalise(v)
	if err != nil {
		return err
	}
	version := versionOr("")
	switch {
	case n.fits != nil:
		return n.fits.WriteJSON(w)
	case n.report != nil:
		return viewWriteJSON(w, version, n.report)
	case n.comparison != nil:
		return viewWriteJSON(w, version, n.comparison)
	case n.solutions != nil:
		return viewWriteJSON(w, version, struct {
			Backcalc []*arrhenius.Solution `json:"backcalc"`
			Cautions []string              `json:"cautions"`
		}{n.solutions, viewSolutionCautions(n.solutions)})
	case n.predictions != nil:
		return viewWriteJSON(w, version, struct {
			Predictions []*arrhenius.Prediction `json:"predictions"`
		}{n.predictions})
	case n.references != nil:
		return viewWriteJSON(w, version, struct {
			References []arrhenius.Reference `json:"references"`
		}{n.references})
	}
	return viewWriteJSON(w, version, struct {
		Matano []*matano.Result `json:"matano"`
	}{n.matano})
}

// viewWriteJSON encodes v (an object), puts "fickfit_version" first,
// undoes the HTML escaping that nested MarshalJSON methods apply (the fit
// command's JSON does not escape either), indents by two spaces and ends
// with a newline.
func viewWriteJSON(w io.Writer, version string, v any) error {
	var buf bytes.Buffer
	enc := json.NewEncoder(&buf)
	enc.SetEscapeHTML(false)
	if err := enc.Encode(v); err != nil {
		return errorf("writing JSON: %w", err)
	}
	b := viewUnescapeHTML(bytes.TrimSpace(buf.Bytes()))
	if len(b) < 2 || b[0] != '{' {
		return errorf("writing JSON: %T is not written as an object", v)
	}
	ver, _ := json.Marshal(version) // a string always marshals
	head := append([]byte(`{"fickfit_version":`), ver...)
	if rest := bytes.TrimSpace(b[1:]); len(rest) > 0 && rest[0] != '}' {
		head = append(head, ',')
	}
	b = append(head, b[1:]...)
	var out bytes.Buffer
	if err := json.Indent(&out, b, "", "  "); err != nil {
		return errorf("writing JSON: %w", err)
	}
	out.WriteByte('\n')
	_, err := w.Write(out.Bytes())
	return err
}

// viewUnescapeHTML replaces the escapes \u003c, \u003e and \u0026 that
// encoding/json writes for '<', '>' and '&' by the characters. Escapes
// occur only inside strings, and every backslash there starts a
// two-character escape, so pairs are consumed whole: an escaped backslash
// followed by "u003c" is left alone.
func viewUnescapeHTML(b []byte) []byte {
	if !bytes.Contains(b, []byte(`\u00`)) {
		return b
	}
	out := make([]byte, 0, len(b))
	for i := 0; i < len(b); i++ {
		c := b[i]
		if c != '\\' || i+1 >= len(b) {
			out = append(out, c)
			continue
		}
		if b[i+1] == 'u' && i+5 < len(b) {
			r := byte(0)
			switch string(b[i+2 : i+6]) {
			case "003c":
				r = '<'
			case "003e":
				r = '>'
			case "0026":
				r = '&'
			}
			if r != 0 {
				out = append(out, r)
				i += 5
				continue
			}
		}
		out = append(out, c, b[i+1])
		i++
	}
	return out
}

// viewSolutionCautions is the union of the solutions' cautions in order;
// arrhenius.Cautions when none carries any.
func viewSolutionCautions(ss []*arrhenius.Solution) []string {
	var lists [][]string
	for _, s := range ss {
		lists = append(lists, s.Cautions)
	}
	return viewUnion(lists)
}

func viewPredictionCautions(ps []*arrhenius.Prediction) []string {
	var lists [][]string
	for _, p := range ps {
		lists = append(lists, p.Cautions)
	}
	return viewUnion(lists)
}

func viewUnion(lists [][]string) []string {
	seen := map[string]bool{}
	out := []string{}
	for _, l := range lists {
		for _, c := range l {
			if !seen[c] {
				seen[c] = true
				out = append(out, c)
			}
		}
	}
	if len(out) == 0 {
		out = append(out, arrhenius.Cautions...)
	}
	return out
}

// ---------------------------------------------------------------- CSV

// viewCSV writes tables into one CSV stream: each row starts with its
// table's name, tables are separated by an empty line.
type viewCSV struct {
	w      io.Writer
	cw     *csv.Writer
	tables int
	err    error
}

func newViewCSV(w io.Writer) *viewCSV { return &viewCSV{w: w, cw: csv.NewWriter(w)} }

// table starts a table with its header.
func (c *viewCSV) table(name string, header ...string) {
	if c.err != nil {
		return
	}
	if c.tables > 0 {
		c.cw.Flush()
		if c.err = c.cw.Error(); c.err != nil {
			return
		}
		_, c.err = io.WriteString(c.w, "\n")
	}
	c.tables++
	c.row(append([]string{"table"}, header...)...)
}

// add writes one row of the table name.
func (c *viewCSV) add(name string, cells ...string) { c.row(append([]string{name}, cells...)...) }

func (c *viewCSV) row(cells ...string) {
	if c.err == nil {
		c.err = c.cw.Write(cells)
	}
}

func (c *viewCSV) close() error {
	if c.err != nil {
		return c.err
	}
	c.cw.Flush()
	return c.cw.Error()
}

func viewBool(b bool) string { return strconv.FormatBool(b) }

func viewInt(i int) string { return strconv.Itoa(i) }

// viewCodes joins warning codes with ";".
func viewCodes(ws []fit.Warning) string {
	codes := make([]string, len(ws))
	for i, w := range ws {
		codes[i] = w.Code
	}
	return strings.Join(codes, ";")
}

// CSV writes v as one or more CSV tables (see the top of this file): units
// in the column names, numbers as plain numbers in full precision, "" for
// undefined. Fit results are written by Fits.WriteCSV (one table, no
// table column). An unsupported type is an error.
func CSV(w io.Writer, v any) error {
	n, err := viewNormalise(v)
	if err != nil {
		return err
	}
	if n.fits != nil {
		return n.fits.WriteCSV(w)
	}
	c := newViewCSV(w)
	switch {
	case n.report != nil:
		viewReportCSV(c, n.report)
	case n.comparison != nil:
		viewComparisonCSV(c, n.comparison)
	case n.solutions != nil:
		viewSolutionsCSV(c, n.solutions)
	case n.predictions != nil:
		viewPredictionsCSV(c, n.predictions)
	case n.references != nil:
		viewReferencesCSV(c, n.references)
	default:
		viewMatanoCSV(c, n.matano)
	}
	return c.close()
}

// viewPointCI is the interval of a point's D: its profile fit's own, or
// the Wald interval exp(ln D ± z·se) on ln D when none was given (as the
// line's JSON writes it).
func viewPointCI(p arrhenius.Point, level float64) fit.Interval {
	if p.CI.Lo != 0 || p.CI.Hi != 0 {
		return p.CI
	}
	if !(p.VarLnD > 0) {
		return fit.Interval{Lo: math.NaN(), Hi: math.NaN()}
	}
	h := viewZ(level) * math.Sqrt(p.VarLnD)
	return fit.Interval{Lo: math.Exp(p.LnD - h), Hi: math.Exp(p.LnD + h)}
}

// viewZ is the two-sided normal quantile for the level, by bisection on
// math.Erf (no distribution package needed for one number).
func viewZ(level float64) float64 {
	if !(level > 0 && level < 1) {
		level = 0.95
	}
	lo, hi := 0.0, 40.0
	for i := 0; i < 200; i++ {
		m := (lo + hi) / 2
		if math.Erf(m/math.Sqrt2) < level {
			lo = m
		} else {
			hi = m
		}
	}
	return (lo + hi) / 2
}

// viewDAtTemperatures are the temperatures (K) at which the text and CSV
// views give D on the line: the ends of the measured range and, between
// them, the centre in 1/T rounded to a whole degree of the user's unit.
func viewDAtTemperatures(l *arrhenius.Line, u TempUnit) []float64 {
	lo, hi := l.TRange()
	if !(lo > 0) || !(hi > lo) {
		if lo > 0 {
			return []float64{lo}
		}
		return nil
	}
	mid := u.ToKelvin(math.Round(u.FromKelvin(2 / (1/lo + 1/hi))))
	if !(mid > lo && mid < hi) {
		return []float64{lo, hi}
	}
	return []float64{lo, mid, hi}
}

func viewReportCSV(c *viewCSV, r *arrhenius.Report) {
	c.table("line", "group", "by", "method", "n_points", "n_temperatures",
		"D0_m2_s", "D0_ci_lo_m2_s", "D0_ci_hi_m2_s", "lnD0", "stderr_lnD0",
		"Q_J_mol", "Q_ci_lo_J_mol", "Q_ci_hi_J_mol", "stderr_Q_J_mol", "Q_eV",
		"corr_lnD0_Q", "cov_lnD0_lnD0", "cov_lnD0_Q_J_mol", "cov_Q_Q_J2_mol2",
		"dof", "ci_level", "ci_method", "chi2", "chi2_p", "birge_ratio", "birge_scaled",
		"temperature_min_K", "temperature_max_K",
		"share_temperature", "share_profiles", "halfwidth_Q_J_mol", "halfwidth_Q_profiles_only_J_mol",
		"warnings")
	for i := range r.Lines {
		l := &r.Lines[i]
		d0, q := l.D0CI(), l.QCI()
		lo, hi := l.TRange()
		method := "wald-normal"
		if l.Scaled {
			method = "wald-t"
		}
		row := []string{l.Group, l.By, l.Method, viewInt(len(l.Points)), viewInt(l.NTemperatures),
			csvNumber(l.D0()), csvNumber(d0.Lo), csvNumber(d0.Hi), csvNumber(l.LnD0), csvNumber(l.StdErrLnD0()),
			csvNumber(l.Q), csvNumber(q.Lo), csvNumber(q.Hi), csvNumber(l.StdErrQ()), csvNumber(l.Q / viewFaraday),
			csvNumber(l.Corr()), csvNumber(l.Cov[0][0]), csvNumber(l.Cov[0][1]), csvNumber(l.Cov[1][1]),
			viewInt(l.DOF), csvNumber(l.Level), method, csvNumber(l.ChiSq), csvNumber(l.ChiSqP),
			csvNumber(l.BirgeRatio), viewBool(l.Scaled), csvNumber(lo), csvNumber(hi)}
		if b := l.TempBudget; b != nil {
			row = append(row, csvNumber(b.ShareTemperature), csvNumber(b.ShareProfiles), csvNumber(b.HalfWidthQ), csvNumber(b.HalfWidthQProfiles))
		} else {
			row = append(row, "", "", "", "")
		}
		c.add("line", append(row, viewCodes(l.Warnings))...)
	}
	c.table("point", "group", "id", "lot", "source", "temperature_K", "temperature_sigma_K",
		"D_m2_s", "D_ci_lo_m2_s", "D_ci_hi_m2_s", "stderr_lnD", "D_line_m2_s", "residual_lnD", "weight", "standardized_residual")
	for i := range r.Lines {
		l := &r.Lines[i]
		for _, p := range l.Points {
			ci := viewPointCI(p.Point, l.Level)
			c.add("point", l.Group, p.ID, p.Lot, p.Source, csvNumber(p.T), csvNumber(p.SigmaT),
				csvNumber(math.Exp(p.LnD)), csvNumber(ci.Lo), csvNumber(ci.Hi), csvNumber(math.Sqrt(p.VarLnD)),
				csvNumber(math.Exp(p.Fitted)), csvNumber(p.Residual), csvNumber(p.Weight), csvNumber(p.Residual*math.Sqrt(p.Weight)))
		}
	}
	c.table("d_on_line", "group", "temperature_K", "D_m2_s", "D_ci_lo_m2_s", "D_ci_hi_m2_s", "ci_level")
	for i := range r.Lines {
		l := &r.Lines[i]
		for _, T := range viewDAtTemperatures(l, Kelvin) {
			d, ci := l.DAt(T)
			c.add("d_on_line", l.Group, csvNumber(T), csvNumber(d), csvNumber(ci.Lo), csvNumber(ci.Hi), csvNumber(l.Level))
		}
	}
}

// viewCalibrationCells are the calibration columns of back-calculations
// and predictions.
var viewCalibrationHeader = []string{"calibration_method", "calibration_source", "calibration_D0_m2_s", "calibration_Q_J_mol",
	"calibration_cov_lnD0_lnD0", "calibration_cov_lnD0_Q_J_mol", "calibration_cov_Q_Q_J2_mol2", "calibration_dof",
	"calibration_temperature_min_K", "calibration_temperature_max_K"}

func viewCalibrationCells(cal arrhenius.Calibration) []string {
	tmin, tmax := "", ""
	if cal.TMin > 0 {
		tmin = csvNumber(cal.TMin)
	}
	if cal.TMax > 0 {
		tmax = csvNumber(cal.TMax)
	}
	return []string{cal.Method, cal.Source, csvNumber(cal.D0()), csvNumber(cal.Q),
		csvNumber(cal.Cov[0][0]), csvNumber(cal.Cov[0][1]), csvNumber(cal.Cov[1][1]), viewInt(cal.DOF), tmin, tmax}
}

// viewQuantityCells writes value, ci_lo, ci_hi, given, ci_method.
func viewQuantityCells(q arrhenius.Quantity) []string {
	if q.Given {
		return []string{csvNumber(q.Value), "", "", "true", ""}
	}
	return []string{csvNumber(q.Value), csvNumber(q.CI.Lo), csvNumber(q.CI.Hi), "false", q.Method}
}

func viewSolutionsCSV(c *viewCSV, ss []*arrhenius.Solution) {
	h := []string{"id", "solve_for",
		"temperature_K", "temperature_ci_lo_K", "temperature_ci_hi_K", "temperature_given", "temperature_ci_method",
		"time_s", "time_ci_lo_s", "time_ci_hi_s", "time_given", "time_ci_method",
		"Dt_m2", "stderr_lnDt", "ci_level",
		"mc_draws", "mc_seed", "mc_unit", "mc_median", "mc_ci_lo", "mc_ci_hi", "mc_nonphysical_fraction",
		"log_adjustment_mode", "log_adjustment_unit", "log_adjustment", "log_adjustment_ci_lo", "log_adjustment_ci_hi"}
	h = append(h, viewCalibrationHeader...)
	c.table("backcalc", append(h, "warnings")...)
	for _, s := range ss {
		row := []string{s.ID, s.SolveFor}
		row = append(row, viewQuantityCells(s.Temperature)...)
		row = append(row, viewQuantityCells(s.Time)...)
		row = append(row, csvNumber(math.Exp(s.LnDt)), csvNumber(math.Sqrt(s.VarLnDt)), csvNumber(s.Level))
		if m := s.MonteCarlo; m != nil {
			unit := "K"
			if s.SolveFor == "time" {
				unit = "s"
			}
			row = append(row, viewInt(m.Draws), strconv.FormatUint(m.Seed, 10), unit, csvNumber(m.Median),
				csvNumber(m.CI.Lo), csvNumber(m.CI.Hi), csvNumber(m.NonPhysical))
		} else {
			row = append(row, "", "", "", "", "", "", "")
		}
		if a := s.Adjustment; a != nil {
			row = append(row, s.AdjustMode, a.Unit, csvNumber(a.Value), csvNumber(a.CI.Lo), csvNumber(a.CI.Hi))
		} else {
			row = append(row, "", "", "", "", "")
		}
		row = append(row, viewCalibrationCells(s.Calibration)...)
		c.add("backcalc", append(row, viewCodes(s.Warnings))...)
	}
	viewCautionsCSV(c, viewSolutionCautions(ss))
}

func viewCautionsCSV(c *viewCSV, cautions []string) {
	c.table("caution", "n", "text")
	for i, t := range cautions {
		c.add("caution", viewInt(i+1), t)
	}
}

func viewPredictionsCSV(c *viewCSV, ps []*arrhenius.Prediction) {
	h := []string{"prediction", "kind", "temperature_K", "time_s", "time_ci_lo_s", "time_ci_hi_s", "time_given", "time_ci_method",
		"history", "Dt_m2", "Dt_ci_lo_m2", "Dt_ci_hi_m2", "Dt_given", "Cs", "C0", "threshold",
		"case_depth_m", "case_depth_ci_lo_m", "case_depth_ci_hi_m", "case_depth_given", "ci_level"}
	h = append(h, viewCalibrationHeader...)
	c.table("prediction", append(h, "warnings")...)
	for i, p := range ps {
		row := []string{viewInt(i + 1), p.Kind, csvNumber(p.Temperature.Value)}
		row = append(row, viewQuantityCells(p.Time)...)
		row = append(row, p.HistorySource)
		dt := viewQuantityCells(p.Dt)
		row = append(row, dt[0], dt[1], dt[2], dt[3], csvNumber(p.Cs), csvNumber(p.C0), "")
		if p.Kind != "profile" || p.CaseDepth != nil {
			row[len(row)-1] = csvNumber(p.Threshold)
		}
		if cd := p.CaseDepth; cd != nil {
			q := viewQuantityCells(*cd)
			row = append(row, q[0], q[1], q[2], q[3])
		} else {
			row = append(row, "", "", "", "")
		}
		row = append(row, csvNumber(p.Level))
		row = append(row, viewCalibrationCells(p.Calibration)...)
		c.add("prediction", append(row, viewCodes(p.Warnings))...)
	}
	c.table("profile", "prediction", "depth_m", "value", "band_lo", "band_hi")
	for i, p := range ps {
		for _, pp := range p.Profile {
			c.add("profile", viewInt(i+1), csvNumber(pp.Depth), csvNumber(pp.Value), csvNumber(pp.Lo), csvNumber(pp.Hi))
		}
	}
	viewCautionsCSV(c, viewPredictionCautions(ps))
}

func viewComparisonCSV(c *viewCSV, cmp *arrhenius.Comparison) {
	c.table("comparison", "by", "groups", "n_points", "differ", "p", "alpha", "ci_level", "scale", "verdict", "warnings")
	np := make([]string, len(cmp.NPoints))
	for i, n := range cmp.NPoints {
		np[i] = viewInt(n)
	}
	c.add("comparison", cmp.By, strings.Join(cmp.Groups, ";"), strings.Join(np, ";"), viewBool(cmp.Differ),
		csvNumber(cmp.PMain), csvNumber(cmp.Alpha), csvNumber(cmp.Level), csvNumber(cmp.Scale), cmp.Verdict, viewCodes(cmp.Warnings))
	c.table("test", "test", "description", "F", "df1", "df2", "p", "rss_reduced", "rss_full")
	for _, t := range cmp.Tests {
		c.add("test", t.Name, t.Description, csvNumber(t.F), viewInt(t.DF1), viewInt(t.DF2), csvNumber(t.P),
			csvNumber(t.RSSReduced), csvNumber(t.RSSFull))
	}
	c.table("ratio", "group", "reference", "temperature_K", "D_ratio", "ci_lo", "ci_hi", "p", "model")
	for _, r := range cmp.Ratios {
		c.add("ratio", r.Group, r.Reference, csvNumber(r.TRef), csvNumber(r.Value), csvNumber(r.CI.Lo), csvNumber(r.CI.Hi),
			csvNumber(r.P), r.Model)
	}
}

func viewReferencesCSV(c *viewCSV, refs []arrhenius.Reference) {
	c.table("reference", "name", "aliases", "solute", "host", "D0_m2_s", "Q_J_mol", "valid_min_K", "valid_max_K",
		"range_note", "source", "from_memory")
	memory := false
	for _, r := range refs {
		c.add("reference", r.Name, strings.Join(r.Aliases, ";"), r.Solute, r.Host, csvNumber(r.D0), csvNumber(r.Q),
			csvNumber(r.TMin), csvNumber(r.TMax), r.RangeNote, r.Source, viewBool(r.FromMemory))
		memory = memory || r.FromMemory
	}
	if memory {
		viewCautionsCSV(c, []string{strings.Replace(viewReferenceCaution, "Rows marked *", "Rows with from_memory true", 1)})
	}
}

func viewMatanoCSV(c *viewCSV, rs []*matano.Result) {
	c.table("matano", "id", "method", "matano_plane_m", "time_s", "smoother_terms", "smoother_rmse", "C_left", "C_right", "warnings")
	for _, r := range rs {
		plane := ""
		if r.MatanoPlane != nil {
			plane = csvNumber(*r.MatanoPlane)
		}
		terms, cl, cr := "", "", ""
		if s := r.Smooth; s != nil {
			terms, cl, cr = viewInt(s.Terms()), csvNumber(s.CL), csvNumber(s.CR)
		}
		c.add("matano", r.ID, r.Method, plane, csvNumber(r.Time), terms, csvNumber(r.RMSE), cl, cr, viewCodes(r.Warnings))
	}
	c.table("point", "id", "C", "D_m2_s", "D_ci_lo_m2_s", "D_ci_hi_m2_s")
	for _, r := range rs {
		for _, p := range r.Points {
			c.add("point", r.ID, csvNumber(p.C), csvNumber(p.D), csvNumber(p.CI.Lo), csvNumber(p.CI.Hi))
		}
	}
}

// ---------------------------------------------------------------- text

// Text writes v for people: aligned, units always shown, significant
// figures set by the interval, warnings next to the number they concern,
// and the cautions at the end (always for back-calculations and
// predictions; see TextOptions.NoCautions for the others). Fit results are
// written by Fits.WriteText. An unsupported type is an error.
func Text(w io.Writer, v any, o TextOptions) error {
	n, err := viewNormalise(v)
	if err != nil {
		return err
	}
	if n.fits != nil {
		return n.fits.WriteText(w, o)
	}
	bw := bufio.NewWriter(w)
	var cautions []string
	always := false
	switch {
	case n.report != nil:
		viewReportText(bw, n.report, o)
		cautions = viewLineCautions
	case n.comparison != nil:
		viewComparisonText(bw, n.comparison, o)
		cautions = viewCompareCautions
	case n.solutions != nil:
		viewSolutionsText(bw, n.solutions, o)
		cautions, always = viewSolutionCautions(n.solutions), true
	case n.predictions != nil:
		viewPredictionsText(bw, n.predictions, o)
		cautions, always = viewPredictionCautions(n.predictions), true
	case n.references != nil:
		viewReferencesText(bw, n.references, o)
	default:
		viewMatanoText(bw, n.matano, o)
		cautions = viewMatanoCautions
	}
	if len(cautions) > 0 && (always || !o.NoCautions) {
		bw.WriteString("\n")
		writeCautions(bw, cautions, o.width())
	}
	return bw.Flush()
}

// viewText carries the writer and options of one text view.
type viewText struct {
	w *bufio.Writer
	o TextOptions
}

// field writes "  label        text", the text wrapped under itself.
func (t viewText) field(label, text string) {
	pad := viewLabel - len([]rune(label))
	if pad < 1 {
		pad = 1
	}
	writeWrapped(t.w, "  "+label+strings.Repeat(" ", pad), text, t.o.width())
}

// warn writes warnings under the line they concern.
func (t viewText) warn(ws []fit.Warning) {
	for _, w := range ws {
		writeWrapped(t.w, "      ! ", w.Message, t.o.width())
	}
}

// line writes a heading or free text, wrapped.
func (t viewText) line(prefix, text string) { writeWrapped(t.w, prefix, text, t.o.width()) }

// viewByCode sorts warnings into the targets named by their codes; the
// rest go to "".
func viewByCode(ws []fit.Warning, target map[string]string) map[string][]fit.Warning {
	out := map[string][]fit.Warning{}
	for _, w := range ws {
		out[target[w.Code]] = append(out[target[w.Code]], w)
	}
	return out
}

// viewQ writes an activation energy in kJ/mol and eV per atom, each with
// the digits its interval supports:
// "148.0 kJ/mol (1.534 eV), 95 % CI 141.2–154.8 kJ/mol (1.463–1.604 eV)".
// Without interval (both ends open) three significant digits.
func viewQ(q float64, ci fit.Interval, level float64) string {
	k, ivk := q/1e3, fit.Interval{Lo: ci.Lo / 1e3, Hi: ci.Hi / 1e3}
	e, ive := q/viewFaraday, fit.Interval{Lo: ci.Lo / viewFaraday, Hi: ci.Hi / viewFaraday}
	if !finite(ci.Lo) && !finite(ci.Hi) {
		return Sig(k, DefaultDigits) + " kJ/mol (" + Sig(e, DefaultDigits) + " eV)"
	}
	lk, le := LastDigit(k, ivk), LastDigit(e, ive)
	return Number(k, lk) + " kJ/mol (" + Number(e, le) + " eV), " + Level(level) + " CI " +
		IntervalAt(k, ivk, lk) + " kJ/mol (" + IntervalAt(e, ive, le) + " eV)"
}

// viewD writes a diffusion coefficient (or D0) with its interval and the
// unit that reads best beside m²/s: "2.3 × 10⁻⁵ m²/s (0.23 cm²/s), 95 % CI
// 1.1–4.8 × 10⁻⁵ m²/s". none is said instead of an interval when both
// ends are open.
func viewD(d float64, ci fit.Interval, level float64, none string) string {
	open := !finite(ci.Lo) && !finite(ci.Hi)
	last := LastDigit(d, ci)
	s := Number(d, last) + " m²/s"
	if alt := DAlternative(d, ci); alt != "" {
		s += " (" + alt + ")"
	}
	if open {
		if none != "" {
			s += " (" + none + ")"
		}
		return s
	}
	return s + ", " + Level(level) + " CI " + IntervalAt(d, ci, last) + " m²/s"
}

// viewTempRange writes "850–950 °C (1123.15–1223.15 K)", or kelvin alone;
// the user's unit with at most dec decimals, kelvin with at most two.
func viewTempRange(lo, hi float64, u TempUnit, dec int) string {
	rng := func(a, b float64, dec int) string {
		sep := "–"
		if a < 0 || b < 0 {
			sep = " to "
		}
		return trimmed(a, dec) + sep + trimmed(b, dec)
	}
	if u == Kelvin {
		return rng(lo, hi, 2) + " K"
	}
	return rng(u.FromKelvin(lo), u.FromKelvin(hi), dec) + " " + u.Symbol() + " (" + rng(lo, hi, 2) + " K)"
}

// viewTempPlain writes a solved temperature without interval to a whole
// degree: "931 °C (1204 K)".
func viewTempPlain(k float64, u TempUnit) string {
	if u == Kelvin {
		return trimmed(k, 0) + " K"
	}
	return trimmed(u.FromKelvin(k), 0) + " " + u.Symbol() + " (" + trimmed(k, 0) + " K)"
}

// viewDurationPlain writes a solved time without interval to three
// significant digits: "6.23 h".
func viewDurationPlain(s float64) string {
	f, unit := 3600.0, "h"
	switch {
	case math.Abs(s) < 120:
		f, unit = 1, "s"
	case math.Abs(s) < 7200:
		f, unit = 60, "min"
	}
	return Sig(s/f, DefaultDigits) + " " + unit
}

// viewLength writes a length (m) in µm or mm with its interval:
// "0.85 mm, 95 % CI 0.80–0.90 mm".
func viewLength(m float64, ci fit.Interval, level float64) string {
	ref := math.Abs(m)
	if finite(ci.Hi) {
		ref = math.Max(ref, math.Abs(ci.Hi))
	}
	f, unit := DepthScale(ref)
	v, iv := m/f, fit.Interval{Lo: ci.Lo / f, Hi: ci.Hi / f}
	if !finite(ci.Lo) && !finite(ci.Hi) {
		return Sig(v, DefaultDigits) + " " + unit
	}
	out := Estimate(v, iv, level, unit)
	if finite(iv.Lo) && finite(iv.Hi) && !degenerate(v, iv) {
		out += " " + unit
	}
	return out
}

// viewGiven writes a number given by the user (or a table) with the
// fewest significant digits, at most six, that give it back to a relative
// 10⁻¹² (so that 2.3e-5 recovered through exp(ln 2.3e-5) is still "2.3").
func viewGiven(v float64) string {
	if !finite(v) || v == 0 {
		return Number(v, 0)
	}
	for d := 1; d < maxDigits; d++ {
		back, err := strconv.ParseFloat(strconv.FormatFloat(v, 'e', d-1, 64), 64)
		if err == nil && math.Abs(back-v) <= 1e-12*math.Abs(v) {
			return Sig(v, d)
		}
	}
	return Sig(v, maxDigits)
}

// viewZeroWidth tells an interval of zero width: a calibration and a
// part without uncertainty.
func viewZeroWidth(iv fit.Interval) bool { return finite(iv.Lo) && iv.Lo == iv.Hi }

const viewZeroWidthText = "interval of zero width (no uncertainty was given)"

// viewP writes a p-value: "< 0.001" or two significant digits.
func viewP(p float64) string {
	if !finite(p) {
		return "n/a"
	}
	if p < 0.001 {
		return "< 0.001"
	}
	return Sig(p, 2)
}

// viewCIMethod says how an interval was obtained.
func viewCIMethod(m string, mc *arrhenius.MonteCarlo) string {
	switch m {
	case "fieller":
		return "interval by Fieller's theorem"
	case "wald-log":
		return "Wald interval on the log scale"
	case "test-inversion":
		return "interval by test inversion"
	case "monte-carlo":
		if mc != nil {
			return fmt.Sprintf("Monte Carlo percentile interval (%d draws, seed %d)", mc.Draws, mc.Seed)
		}
		return "Monte Carlo percentile interval"
	}
	return m
}

// viewQuantile says which quantile the intervals of a calibration use.
func viewQuantile(dof int) string {
	if dof > 0 {
		return "Student t on " + viewInt(dof) + " dof"
	}
	return "normal quantile (covariance taken as known)"
}

// viewCalibration writes what a back-calculation or prediction rests on.
func (t viewText) calibration(cal arrhenius.Calibration, ws []fit.Warning) {
	src := cal.Source
	if src == "" {
		src = cal.Method
	}
	t.field("calibration", src)
	u0, uq := math.Sqrt(cal.Cov[0][0]), math.Sqrt(cal.Cov[1][1])
	var parts []string
	if uq > 0 {
		q := cal.Q
		lk := LastDigit(q/1e3, fit.Interval{Lo: (q - uq) / 1e3, Hi: (q + uq) / 1e3})
		le := LastDigit(q/viewFaraday, fit.Interval{Lo: (q - uq) / viewFaraday, Hi: (q + uq) / viewFaraday})
		parts = append(parts, "Q "+Number(q/1e3, lk)+" kJ/mol ("+Number(q/viewFaraday, le)+" eV), u(Q) "+
			Number(uq/1e3, lk)+" kJ/mol")
	} else {
		parts = append(parts, "Q "+viewGiven(cal.Q/1e3)+" kJ/mol ("+Sig(cal.Q/viewFaraday, DefaultDigits)+" eV)")
	}
	if u0 > 0 {
		parts = append(parts, "D0 "+Sig(cal.D0(), DefaultDigits)+" m²/s, u(ln D0) "+Sig(u0, 2))
	} else {
		parts = append(parts, "D0 "+viewGiven(cal.D0())+" m²/s")
	}
	switch {
	case cal.NoInterval:
		parts = append(parts, "no interval (two temperatures)")
	case u0 > 0 && uq > 0:
		parts = append(parts, "corr(ln D0, Q) "+Number(cal.Cov[0][1]/(u0*uq), -4), viewQuantile(cal.DOF))
	default:
		parts = append(parts, "no uncertainty of its own")
	}
	if cal.TMin > 0 && cal.TMax > 0 {
		dec := 2
		if cal.Method == "reference" {
			dec = 0 // a table's range is an approximate phase field
		}
		parts = append(parts, "based on "+viewTempRange(cal.TMin, cal.TMax, t.o.TempUnit, dec))
	}
	writeParts(t.w, strings.Repeat(" ", viewLabel+2), parts, "; ", t.o.width())
	t.warn(ws)
}

// ------------------------------------------------ Arrhenius line (text)

var viewLineTargets = map[string]string{
	"two-temperatures":                 "Q",
	"scatter-exceeds-errors":           "fit",
	"scatter-not-scaled":               "fit",
	"temperature-uncertainty-ignored":  "budget",
	"effective-variance-not-converged": "budget",
}

func viewGroupName(l *arrhenius.Line) string {
	by := l.By
	if by == "" {
		by = "group"
	}
	return by + " " + l.Group
}

func viewReportText(w *bufio.Writer, r *arrhenius.Report, o TextOptions) {
	t := viewText{w, o}
	if len(r.Lines) == 0 {
		w.WriteString("No Arrhenius line.\n")
		return
	}
	if len(r.Lines) > 1 || r.By != "" {
		by := r.By
		if by == "" {
			by = "group"
		}
		groups := "groups"
		if len(r.Lines) == 1 {
			groups = "group"
		}
		fmt.Fprintf(w, "Arrhenius lines by %s: %d %s\n\n", by, len(r.Lines), groups)
	}
	for i := range r.Lines {
		if i > 0 {
			w.WriteString("\n")
		}
		viewLineText(t, &r.Lines[i])
	}
}

func viewLineText(t viewText, l *arrhenius.Line) {
	u := t.o.TempUnit
	method := l.Method
	switch l.Method {
	case "two-stage":
		method = "two-stage weighted regression of ln D on 1/(RT)"
	case "global":
		method = "global fit of all profiles with shared ln D0 and Q"
	}
	head := "Arrhenius line"
	if l.Group != "" {
		head += ", " + viewGroupName(l)
	}
	lo, hi := l.TRange()
	head += ": " + method + ", " + viewInt(len(l.Points)) + " points at " + viewInt(l.NTemperatures) + " temperatures"
	if lo > 0 {
		head += ", " + viewTempRange(lo, hi, u, 2)
	}
	t.line("", head)
	by := viewByCode(l.Warnings, viewLineTargets)

	t.field("D0", viewD(l.D0(), l.D0CI(), l.Level, "no interval: fewer than three temperatures"))
	q := viewQ(l.Q, l.QCI(), l.Level)
	if !l.HasCI {
		q += " (no interval: fewer than three temperatures)"
	}
	t.field("Q", q)
	t.warn(by["Q"])
	if l.HasCI || finite(l.Corr()) {
		t.field("corr(ln D0, Q)", Number(l.Corr(), -4))
	}
	var fitParts []string
	fitParts = append(fitParts, "dof "+viewInt(l.DOF))
	if finite(l.ChiSq) && l.DOF > 0 {
		chi := "χ² " + Sig(l.ChiSq, 3)
		if finite(l.ChiSqP) {
			chi += " (p " + viewP(l.ChiSqP) + ")"
		}
		fitParts = append(fitParts, chi)
	}
	switch {
	case !finite(l.BirgeRatio):
		fitParts = append(fitParts, "Birge ratio n/a (no degrees of freedom)")
	case l.Scaled:
		fitParts = append(fitParts, "Birge ratio "+Sig(l.BirgeRatio, 3)+": covariance scaled by its square, "+viewQuantile(l.DOF))
	default:
		fitParts = append(fitParts, "Birge ratio "+Sig(l.BirgeRatio, 3)+": stated errors kept, normal quantile")
	}
	if l.Iterations > 0 {
		fitParts = append(fitParts, viewInt(l.Iterations)+" iterations")
	}
	writeParts(t.w, "  fit"+strings.Repeat(" ", viewLabel-3), fitParts, " · ", t.o.width())
	t.warn(by["fit"])
	if b := l.TempBudget; b != nil {
		s := fmt.Sprintf("%s of Var(Q) from the temperatures, %s from the profiles",
			trimmed(100*b.ShareTemperature, 0)+" %", trimmed(100*b.ShareProfiles, 0)+" %")
		if finite(b.HalfWidthQ) && finite(b.HalfWidthQProfiles) {
			last := SigDigits(b.HalfWidthQ/1e3, 2)
			s += "; half-width of Q's interval " + Number(b.HalfWidthQ/1e3, last) + " kJ/mol (" +
				Number(b.HalfWidthQProfiles/1e3, last) + " kJ/mol with the temperatures taken as exact)"
		}
		if !b.Converged {
			s += "; the iteration did not converge"
		}
		t.field("temperatures", s)
	}
	t.warn(by["budget"])
	t.warn(by[""])

	// Points.
	tb := Table{Header: []string{"id", "T", "D (m²/s)", Level(l.Level) + " CI", "residual ln D", "in σ"},
		Align: []Align{Left, Left, Right, Left, Right, Right}, Indent: "  "}
	for _, p := range l.Points {
		d := math.Exp(p.LnD)
		ci := viewPointCI(p.Point, l.Level)
		last := LastDigit(d, ci)
		civ := ""
		if finite(ci.Lo) || finite(ci.Hi) {
			civ = IntervalAt(d, ci, last)
		}
		temp := Temperature(p.T, u)
		if p.SigmaT > 0 {
			temp += " ± " + trimmed(p.SigmaT, 2) + " K"
		}
		z := ""
		if p.Weight > 0 {
			z = Number(p.Residual*math.Sqrt(p.Weight), -2)
		}
		tb.Add(p.ID, temp, Number(d, last), civ, Number(p.Residual, -3), z)
	}
	t.w.WriteString("\n")
	tb.WriteTo(t.w)

	// D on the line.
	ts := viewDAtTemperatures(l, u)
	if len(ts) > 0 {
		t.w.WriteString("\n")
		band := "confidence band of the mean line"
		if !l.HasCI {
			band = "no band: fewer than three temperatures"
		}
		t.line("  ", "D on the line ("+band+")")
		dt := Table{Header: []string{"T", "D (m²/s)", Level(l.Level) + " CI"}, Align: []Align{Left, Right, Left}, Indent: "  "}
		for _, T := range ts {
			d, ci := l.DAt(T)
			last := LastDigit(d, ci)
			civ := ""
			if l.HasCI {
				civ = IntervalAt(d, ci, last)
			}
			val := Number(d, last)
			if alt := DAlternative(d, ci); alt != "" {
				val += " (" + alt + ")"
			}
			dt.Add(Temperature(T, u), val, civ)
		}
		dt.WriteTo(t.w)
	}
}

// ------------------------------------------------ back-calculation (text)

var viewSolutionTargets = map[string]string{
	"unbounded-interval":              "solved",
	"no-interval":                     "solved",
	"implausible-temperature":         "T",
	"extrapolation":                   "T",
	"time-already-known":              "time",
	"observation-without-uncertainty": "Dt",
	"calibration-without-uncertainty": "calibration",
	"independent-D0-Q":                "calibration",
}

func viewSolutionsText(w *bufio.Writer, ss []*arrhenius.Solution, o TextOptions) {
	viewEach(w, o, ss, "No back-calculation.", viewSolutionText)
}

// viewEach writes each item with write, a blank line between items, or the
// empty sentence when there is none.
func viewEach[T any](w *bufio.Writer, o TextOptions, items []T, empty string, write func(viewText, T)) {
	if len(items) == 0 {
		w.WriteString(empty + "\n")
		return
	}
	t := viewText{w, o}
	for i, it := range items {
		if i > 0 {
			w.WriteString("\n")
		}
		write(t, it)
	}
}

func viewSolutionText(t viewText, s *arrhenius.Solution) {
	u := t.o.TempUnit
	what := map[string]string{"temperature": "temperature", "time": "hold time", "hold-temperature": "hold temperature of the log"}[s.SolveFor]
	if what == "" {
		what = s.SolveFor
	}
	head := "Back-calculated " + what
	if s.ID != "" {
		head += ": part " + s.ID
	}
	t.line("", head)
	by := viewByCode(s.Warnings, viewSolutionTargets)
	solvedT := s.SolveFor != "time"

	temp := func(q arrhenius.Quantity) string {
		if q.Given {
			return Temperature(q.Value, u) + ", given"
		}
		if q.Method == "" && !finite(q.CI.Lo) && !finite(q.CI.Hi) {
			return viewTempPlain(q.Value, u) + ", no interval"
		}
		if viewZeroWidth(q.CI) {
			return viewTempPlain(q.Value, u) + ", " + viewZeroWidthText
		}
		return TemperatureEstimate(q.Value, q.CI, s.Level, u) + "; " + viewCIMethod(q.Method, s.MonteCarlo)
	}
	dur := func(q arrhenius.Quantity) string {
		if q.Given {
			return Duration(q.Value) + ", given"
		}
		if q.Method == "" && !finite(q.CI.Lo) && !finite(q.CI.Hi) {
			return viewDurationPlain(q.Value) + ", no interval"
		}
		if viewZeroWidth(q.CI) {
			return viewDurationPlain(q.Value) + ", " + viewZeroWidthText
		}
		return DurationEstimate(q.Value, q.CI, s.Level) + "; " + viewCIMethod(q.Method, s.MonteCarlo)
	}

	tLabel := "T"
	if s.SolveFor == "hold-temperature" {
		tLabel = "hold T"
	}
	t.field(tLabel, temp(s.Temperature))
	if solvedT {
		t.warn(by["solved"])
	}
	t.warn(by["T"])
	if a := s.Adjustment; a != nil {
		var v string
		if s.AdjustMode == "scale" {
			v = "every temperature (K) × " + viewAdjust(a.Value, a.CI, s.Level, "")
		} else {
			v = "every temperature " + viewAdjust(a.Value, a.CI, s.Level, "K")
		}
		t.field("log level", v)
	}
	tmLabel := "hold time"
	if s.SolveFor == "hold-temperature" {
		tmLabel = "log duration"
	}
	t.field(tmLabel, dur(s.Time))
	if !solvedT {
		t.warn(by["solved"])
	}
	t.warn(by["time"])

	se := math.Sqrt(s.VarLnDt)
	dt := math.Exp(s.LnDt)
	div := fit.Interval{Lo: dt * math.Exp(-se), Hi: dt * math.Exp(se)}
	last := LastDigit(dt, div)
	dtText := Number(dt, last) + " m² (√Dt " + Depth(math.Sqrt(dt)) + ") from the part's profile"
	if se > 0 {
		dtText += ", u(ln Dt) " + Sig(se, 2)
	}
	t.field("Dt", dtText)
	t.warn(by["Dt"])

	if m := s.MonteCarlo; m != nil && (s.Temperature.Method != "monte-carlo" && s.Time.Method != "monte-carlo") {
		var mc string
		if s.SolveFor == "time" {
			mc = "median " + DurationEstimate(m.Median, m.CI, s.Level)
		} else {
			mc = "median " + TemperatureEstimate(m.Median, m.CI, s.Level, u)
		}
		mc += fmt.Sprintf(" (%d draws, seed %d", m.Draws, m.Seed)
		if m.NonPhysical > 0 {
			mc += "; " + Sig(100*m.NonPhysical, 2) + " % of the draws gave no physical answer"
		}
		t.field("Monte Carlo", mc+")")
	} else if m != nil && m.NonPhysical > 0 {
		t.field("Monte Carlo", Sig(100*m.NonPhysical, 2)+" % of the draws gave no physical answer (counted beyond the upper end)")
	}
	t.calibration(s.Calibration, by["calibration"])
	t.warn(by[""])
}

// viewAdjust writes the level adjustment of a log: "+12 K, 95 % CI 5–19 K".
func viewAdjust(v float64, ci fit.Interval, level float64, unit string) string {
	sign := ""
	if unit == "K" && v > 0 {
		sign = "+"
	}
	if !finite(ci.Lo) && !finite(ci.Hi) {
		s := sign + Sig(v, DefaultDigits)
		if unit != "" {
			s += " " + unit
		}
		return s
	}
	s := sign + Estimate(v, ci, level, unit)
	if unit != "" && finite(ci.Lo) && finite(ci.Hi) {
		s += " " + unit
	}
	return s
}

// ------------------------------------------------ predictions (text)

var viewPredictionTargets = map[string]string{
	"extrapolation":                   "hold",
	"no-interval":                     "Dt",
	"calibration-without-uncertainty": "calibration",
	"mean-line-band":                  "Dt",
}

func viewPredictionsText(w *bufio.Writer, ps []*arrhenius.Prediction, o TextOptions) {
	viewEach(w, o, ps, "No prediction.", viewPredictionText)
}

func viewPredictionText(t viewText, p *arrhenius.Prediction) {
	u := t.o.TempUnit
	by := viewByCode(p.Warnings, viewPredictionTargets)
	var hold string
	switch {
	case p.HistorySource != "":
		hold = "log " + p.HistorySource + ", " + Duration(p.Time.Value) + "; effective temperature " + Temperature(p.Temperature.Value, u)
	case p.Kind == "time-to-depth":
		hold = Temperature(p.Temperature.Value, u)
	default:
		hold = Temperature(p.Temperature.Value, u) + " for " + Duration(p.Time.Value)
	}
	switch p.Kind {
	case "profile":
		t.line("", "Predicted profile: "+hold)
	case "case-depth":
		t.line("", "Predicted case depth: "+hold)
	case "time-to-depth":
		t.line("", "Hold time to reach a case depth at "+hold)
	default:
		t.line("", "Prediction ("+p.Kind+"): "+hold)
	}
	t.warn(by["hold"])
	if p.Kind == "time-to-depth" {
		if cd := p.CaseDepth; cd != nil {
			t.field("target", "case depth "+Depth(cd.Value)+" at level "+viewGiven(p.Threshold))
		}
		q := p.Time
		var tm string
		switch {
		case q.Method == "" && !finite(q.CI.Lo) && !finite(q.CI.Hi):
			tm = viewDurationPlain(q.Value) + ", no interval"
		case viewZeroWidth(q.CI):
			tm = viewDurationPlain(q.Value) + ", " + viewZeroWidthText
		default:
			tm = DurationEstimate(q.Value, q.CI, p.Level) + "; " + viewCIMethod(q.Method, nil)
		}
		t.field("hold time", tm)
		t.warn(by["Dt"])
		t.field("Dt needed", Sig(p.Dt.Value, DefaultDigits)+" m² (√Dt "+Depth(math.Sqrt(p.Dt.Value))+")")
	} else {
		d := p.Dt
		var s string
		if !finite(d.CI.Lo) && !finite(d.CI.Hi) {
			s = Sig(d.Value, DefaultDigits) + " m², no band"
		} else if viewZeroWidth(d.CI) {
			s = Sig(d.Value, DefaultDigits) + " m², band of zero width"
		} else {
			last := LastDigit(d.Value, d.CI)
			s = Number(d.Value, last) + " m², " + Level(p.Level) + " CI " + IntervalAt(d.Value, d.CI, last) + " m²"
		}
		t.field("Dt", s+" (√Dt "+Depth(math.Sqrt(d.Value))+")")
		t.warn(by["Dt"])
	}
	t.field("levels", "surface Cs "+viewGiven(p.Cs)+", base C0 "+viewGiven(p.C0)+" (in the unit they were given in); erf solution, semi-infinite body")
	if cd := p.CaseDepth; cd != nil && p.Kind != "time-to-depth" {
		t.field("case depth", viewLength(cd.Value, cd.CI, p.Level)+" at level "+viewGiven(p.Threshold))
	}
	t.calibration(p.Calibration, by["calibration"])
	t.warn(by[""])
	if len(p.Profile) > 0 {
		viewProfileTable(t, p)
	}
}

// viewProfileTable writes the predicted profile. The value column keeps
// one number of decimals for all rows: two significant digits of the
// widest band half-width (so that every band is shown with at least that
// precision), or three significant digits of |Cs − C0| without bands.
func viewProfileTable(t viewText, p *arrhenius.Prediction) {
	maxDepth, hmax := 0.0, 0.0
	for _, pp := range p.Profile {
		maxDepth = math.Max(maxDepth, pp.Depth)
		if finite(pp.Lo) && finite(pp.Hi) {
			hmax = math.Max(hmax, math.Max(pp.Value-pp.Lo, pp.Hi-pp.Value))
		}
	}
	rng := math.Abs(p.Cs - p.C0)
	last := SigDigits(rng, DefaultDigits)
	if hmax > 0 {
		last = LastDigit(rng, fit.Interval{Lo: rng - hmax, Hi: rng + hmax})
	}
	f, unit := DepthScale(maxDepth)
	// Depths with the fewest decimals (at most three) that write them all exactly.
	dec := 3
	for d := 0; d < 3; d++ {
		ok := true
		for _, pp := range p.Profile {
			v := pp.Depth / f
			if math.Abs(roundAt(v, -d)-v) > 1e-9*math.Max(1, math.Abs(v)) {
				ok = false
				break
			}
		}
		if ok {
			dec = d
			break
		}
	}
	t.w.WriteString("\n")
	tb := Table{Header: []string{"depth (" + unit + ")", "C", Level(p.Level) + " band"}, Align: []Align{Right, Right, Left}, Indent: "  "}
	for _, pp := range p.Profile {
		band := ""
		if finite(pp.Lo) && finite(pp.Hi) {
			band = IntervalAt(pp.Value, fit.Interval{Lo: pp.Lo, Hi: pp.Hi}, last)
		}
		tb.Add(strconv.FormatFloat(roundAt(pp.Depth/f, -dec), 'f', dec, 64), Number(pp.Value, last), band)
	}
	tb.WriteTo(t.w)
}

// ------------------------------------------------ comparison (text)

func viewComparisonText(w *bufio.Writer, c *arrhenius.Comparison, o TextOptions) {
	t := viewText{w, o}
	u := o.TempUnit
	groups := make([]string, len(c.Groups))
	for i, g := range c.Groups {
		groups[i] = g
		if i < len(c.NPoints) {
			groups[i] += " (" + viewInt(c.NPoints[i]) + " points)"
		}
	}
	t.line("", "Comparison by "+c.By+": "+strings.Join(groups, ", "))
	w.WriteString("\n")
	t.line("  Verdict: ", c.Verdict)
	w.WriteString("\n")
	t.line("  ", "Extra-sum-of-squares F-tests at the "+trimmed(100*c.Alpha, 2)+" % significance level (the first is the main test)")
	tb := Table{Header: []string{"test", "F", "df", "p"}, Align: []Align{Left, Right, Left, Right}, Indent: "  "}
	for _, ft := range c.Tests {
		tb.Add(ft.Description, Sig(ft.F, 3), viewInt(ft.DF1)+", "+viewInt(ft.DF2), viewP(ft.P))
	}
	tb.WriteTo(w)
	if len(c.Ratios) > 0 {
		w.WriteString("\n")
		t.line("  ", "Ratio of D to the reference group")
		rt := Table{Header: []string{"group", "reference", "T", "D ratio", Level(c.Level) + " CI", "p", "model"},
			Align: []Align{Left, Left, Left, Right, Left, Right, Left}, Indent: "  "}
		for _, r := range c.Ratios {
			last := LastDigit(r.Value, r.CI)
			rt.Add(r.Group, r.Reference, Temperature(r.TRef, u), Number(r.Value, last), IntervalAt(r.Value, r.CI, last), viewP(r.P), r.Model)
		}
		rt.WriteTo(w)
	}
	if c.Scale > 1 {
		t.line("  ", "The covariance of the ratios was scaled by "+Sig(c.Scale, 3)+" (the squared Birge ratio of the most general model): the points scatter more than their stated errors.")
	}
	for _, wn := range c.Warnings {
		t.line("  ! ", wn.Message)
	}
}

// ------------------------------------------------ reference table (text)

func viewReferencesText(w *bufio.Writer, refs []arrhenius.Reference, o TextOptions) {
	t := viewText{w, o}
	u := o.TempUnit
	t.line("", "Reference diffusion data (built-in table; D = D0·exp(−Q/(RT)))")
	var sources []string
	index := map[string]int{}
	memory := false
	tb := Table{Header: []string{"name", "solute in host", "D0 (m²/s)", "Q (kJ/mol)", "valid range", "source"},
		Align: []Align{Left, Left, Right, Right, Left, Left}, Indent: "  "}
	for _, r := range refs {
		k, ok := index[r.Source]
		if !ok {
			sources = append(sources, r.Source)
			k = len(sources)
			index[r.Source] = k
		}
		src := "[" + viewInt(k) + "]"
		if r.FromMemory {
			src += " *"
			memory = true
		}
		rng := "not stated"
		if r.TMin > 0 && r.TMax > 0 {
			// The ranges are approximate phase fields: whole degrees.
			rng = viewTempRange(r.TMin, r.TMax, u, 0)
		}
		tb.Add(r.Name, r.Solute+" in "+r.Host, viewGiven(r.D0), viewGiven(r.Q/1e3), rng, src)
	}
	w.WriteString("\n")
	tb.WriteTo(w)
	w.WriteString("\n")
	for i, s := range sources {
		t.line("  ["+viewInt(i+1)+"] ", s)
	}
	if memory {
		w.WriteString("\n")
		t.line("  ", viewReferenceCaution)
	}
}

// ------------------------------------------------ Matano (text)

func viewMatanoText(w *bufio.Writer, rs []*matano.Result, o TextOptions) {
	t := viewText{w, o}
	if len(rs) == 0 {
		w.WriteString("No Matano analysis.\n")
		return
	}
	for i, r := range rs {
		if i > 0 {
			w.WriteString("\n")
		}
		method := r.Method
		switch r.Method {
		case matano.BoltzmannMatano:
			method = "Boltzmann–Matano"
		case matano.SauerFreise:
			method = "Sauer–Freise"
		}
		head := "D(C) of couple " + r.ID + ": " + method
		if r.Time > 0 {
			head += ", anneal " + Duration(r.Time)
		}
		t.line("", head)
		if r.MatanoPlane != nil {
			t.field("Matano plane", "at depth "+Depth(*r.MatanoPlane)+" in the profile's depth coordinate")
		}
		if s := r.Smooth; s != nil {
			terms := "terms"
			if s.Terms() == 1 {
				terms = "term"
			}
			t.field("smoother", fmt.Sprintf("%d erf %s, end levels %s and %s, RMSE %s", s.Terms(), terms,
				Sig(s.CL, 4), Sig(s.CR, 4), Sig(r.RMSE, 2)))
		}
		t.warn(r.Warnings)
		last := 0
		if s := r.Smooth; s != nil && s.CR != s.CL {
			last = SigDigits(math.Abs(s.CR-s.CL), 4)
		}
		ciHead := "CI (bootstrap percentile)"
		if r.Level > 0 && r.Level < 1 {
			ciHead = Level(r.Level) + " CI (bootstrap percentile)"
		}
		tb := Table{Header: []string{"C", "D (m²/s)", ciHead}, Align: []Align{Right, Right, Left}, Indent: "  "}
		for _, p := range r.Points {
			c := Sig(p.C, 4)
			if r.Smooth != nil && r.Smooth.CR != r.Smooth.CL {
				c = Number(p.C, last)
			}
			if !finite(p.D) {
				tb.Add(c, "n/a", "outside the end compositions")
				continue
			}
			dl := LastDigit(p.D, p.CI)
			civ := ""
			if finite(p.CI.Lo) || finite(p.CI.Hi) {
				civ = IntervalAt(p.D, p.CI, dl)
			}
			tb.Add(c, Number(p.D, dl), civ)
		}
		w.WriteString("\n")
		tb.WriteTo(w)
	}
}
