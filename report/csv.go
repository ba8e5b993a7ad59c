package report

import (
	"bufio"
	"io"
	"strconv"
	"strings"
	"unicode"
	"unicode/utf8"

	"github.com/fickfit/fickfit/fit"
)

// csvParamColumns names the columns of a parameter other than D: the
// value column carries the SI unit in its name for lengths and velocities
// ("x0_m", "beta_m_s") and no unit for levels in the profile's own unit
// (given in the value_unit column; M is in value_unit·m).
func csvParamColumns(name string, rs []*fit.Result) (value string) {
	for _, r := range rs {
		if e := r.Param(name); e != nil {
			switch e.Unit {
			case "m":
				return name + "_m"
			case "m/s":
				return name + "_m_s"
			case "m2/s":
				return name + "_m2_s"
			}
			return name
		}
	}
	return name
}

// WriteCSV writes one row per profile (fitted ones, then failed ones) with
// the columns
//
//	id, lot, temperature_K, time_s, model, D_m2_s, D_ci_lo, D_ci_hi,
//	D_stderr, Dt_m2, Dt_ci_lo, Dt_ci_hi, then for every other parameter
//	P: P (unit in the name for SI lengths: x0_m, xm_m, beta_m_s), P_stderr,
//	P_ci_lo, P_ci_hi, P_fixed; then value_unit, n, dof, rss, rmse, r2,
//	aicc, chi2_red, chi2_p, runs_p, cond, ci_level, ci_method, covariance,
//	converged, source, material, warnings (codes separated by ";"), error.
//
// When the hold time is unknown the fitted quantity is Dt: the D columns
// stay empty and the Dt columns hold it. Empty cells mean "not
// determined" (an open interval end) or "not applicable". Numbers are SI
// in shortest round-trip form. (FitCSV writes the same table row by row.)
func (f Fits) WriteCSV(w io.Writer) error {
	t := newFitTable(f.Results)
	bw := bufio.NewWriterSize(w, 64<<10)
	buf := t.appendHeader(nil)
	for _, r := range f.Results {
		buf = t.appendRow(buf, r)
		if len(buf) >= 32<<10 {
			if _, err := bw.Write(buf); err != nil {
				return err
			}
			buf = buf[:0]
		}
	}
	for _, fl := range f.Failed {
		buf = t.appendFailed(buf, fl)
	}
	// Inputs not read (--keep-going): no id, the file as source.
	for _, n := range f.NotRead {
		buf = t.appendNotRead(buf, n)
	}
	if _, err := bw.Write(buf); err != nil {
		return err
	}
	return bw.Flush()
}

// fitTable is the layout of the fit results table (Fits.WriteCSV): the
// header, the parameters other than D in column order, and the depth
// kinds with columns.
type fitTable struct {
	header []string
	others []string
	depths []depthColumn
}

// newFitTable lays out the table for the parameters of rs: every
// parameter name in registry order; a parameter's column name takes its
// unit from the first result that has it.
func newFitTable(rs []*fit.Result) *fitTable {
	t := &fitTable{}
	for _, n := range paramNames(rs) {
		if n != "D" {
			t.others = append(t.others, n)
		}
	}
	t.header = []string{"id", "lot", "temperature_K", "time_s", "model", "D_m2_s", "D_ci_lo", "D_ci_hi", "D_stderr", "Dt_m2", "Dt_ci_lo", "Dt_ci_hi"}
	for _, n := range t.others {
		c := csvParamColumns(n, rs)
		t.header = append(t.header, c, n+"_stderr", n+"_ci_lo", n+"_ci_hi", n+"_fixed")
	}
	t.header = append(t.header, "value_unit", "n", "dof", "rss", "rmse", "r2", "aicc", "chi2_red", "chi2_p", "runs_p", "cond",
		"ci_level", "ci_method", "covariance", "converged", "source", "material", "warnings", "error")
	// Case and decarburization depths, when any profile has one: the
	// criterion as given, the level searched for (value_unit), the depth
	// from the fitted curve with its interval, and from the points.
	t.depths = depthColumns(rs)
	for _, d := range t.depths {
		t.header = append(t.header, d.prefix+"_threshold", d.prefix+"_level", d.prefix+"_depth_m", d.prefix+"_depth_ci_lo_m",
			d.prefix+"_depth_ci_hi_m", d.prefix+"_depth_from_data_m")
	}
	return t
}

// appendHeader appends the header row.
func (t *fitTable) appendHeader(buf []byte) []byte { return appendCSVRecord(buf, t.header) }

// appendRow appends the row of a fitted profile: the same bytes as
// encoding/csv writes for its fields, numbers formatted into buf.
func (t *fitTable) appendRow(buf []byte, r *fit.Result) []byte {
	buf = appendCSVField(buf, r.ID)
	buf = appendCSVField(append(buf, ','), r.Lot)
	buf = appendCSVGiven(append(buf, ','), r.Temperature)
	buf = appendCSVGiven(append(buf, ','), r.Time)
	buf = appendCSVField(append(buf, ','), r.Model)
	d := r.Param("D")
	switch {
	case d == nil:
		buf = append(buf, ",,,,,,,"...)
	case r.Time > 0:
		for _, v := range [...]float64{d.Value, d.CI.Lo, d.CI.Hi, d.StdErr, d.Value * r.Time, d.CI.Lo * r.Time, d.CI.Hi * r.Time} {
			buf = appendCSVNumber(append(buf, ','), v)
		}
	default:
		buf = append(buf, ",,,,"...)
		for _, v := range [...]float64{d.Value, d.CI.Lo, d.CI.Hi} {
			buf = appendCSVNumber(append(buf, ','), v)
		}
	}
	for _, n := range t.others {
		e := r.Param(n)
		if e == nil {
			buf = append(buf, ",,,,,"...)
			continue
		}
		for _, v := range [...]float64{e.Value, e.StdErr, e.CI.Lo, e.CI.Hi} {
			buf = appendCSVNumber(append(buf, ','), v)
		}
		buf = strconv.AppendBool(append(buf, ','), e.Fixed)
	}
	s := r.Stats
	buf = appendCSVField(append(buf, ','), r.ValueUnit)
	buf = strconv.AppendInt(append(buf, ','), int64(s.N), 10)
	buf = strconv.AppendInt(append(buf, ','), int64(s.DOF), 10)
	for _, v := range [...]float64{s.RSS, s.RMSE, s.R2, s.AICc, s.Chi2Red, s.Chi2P, s.RunsP, s.Cond, r.CILevel} {
		buf = appendCSVNumber(append(buf, ','), v)
	}
	buf = appendCSVField(append(buf, ','), r.CIMethod.String())
	buf = appendCSVField(append(buf, ','), r.Covariance.String())
	buf = strconv.AppendBool(append(buf, ','), r.Converged)
	buf = appendCSVField(append(buf, ','), r.Source)
	buf = appendCSVField(append(buf, ','), r.Material)
	buf = append(buf, ',')
	if len(r.Warnings) > 0 {
		codes := make([]string, len(r.Warnings))
		for i, wn := range r.Warnings {
			codes[i] = wn.Code
		}
		buf = appendCSVField(buf, strings.Join(codes, ";"))
	}
	buf = append(buf, ',') // the error column is empty
	for _, d := range t.depths {
		e := d.of(r)
		if e == nil {
			buf = append(buf, ",,,,,,"...)
			continue
		}
		buf = appendCSVField(append(buf, ','), e.Threshold)
		for _, v := range [...]float64{e.Level, e.Depth, e.CI.Lo, e.CI.Hi, e.FromData} {
			buf = appendCSVNumber(append(buf, ','), v)
		}
	}
	return append(buf, '\n')
}

// appendNotRead appends the row of an input that was not read
// (--keep-going): its id, the file as source and the reason.
func (t *fitTable) appendNotRead(buf []byte, n NotUsed) []byte {
	row := make([]string, len(t.header))
	row[0] = n.ID
	for i, h := range t.header {
		switch h {
		case "source":
			row[i] = n.where()
		case "error":
			row[i] = "not read: " + n.Reason
		}
	}
	return appendCSVRecord(buf, row)
}

// appendFailed appends the row of a profile that gave no fit: id, lot,
// converged false, source and the error; every other cell empty.
func (t *fitTable) appendFailed(buf []byte, fl fit.Failure) []byte {
	row := make([]string, len(t.header))
	row[0], row[1] = fl.ID, fl.Lot
	set := func(col, v string) {
		for i, h := range t.header {
			if h == col {
				row[i] = v
			}
		}
	}
	set("converged", "false")
	set("source", fl.Source)
	set("error", fl.Error)
	return appendCSVRecord(buf, row)
}

// appendCSVRecord appends one record as newCSVWriter writes it (comma,
// "\n" line ends).
func appendCSVRecord(buf []byte, fields []string) []byte {
	for i, f := range fields {
		if i > 0 {
			buf = append(buf, ',')
		}
		buf = appendCSVField(buf, f)
	}
	return append(buf, '\n')
}

// appendCSVField appends one text cell as newCSVWriter writes it: made
// inert (EscapeText, SafeCell), then as encoding/csv's Writer writes a
// field with a comma and without CRLF: quoted when it holds a comma, a
// quote, '\r' or '\n', starts with white space or is `\.`, quotes doubled.
// (Numbers need neither step: appendCSVNumber writes them directly.)
func appendCSVField(buf []byte, s string) []byte {
	s = SafeCell(EscapeText(s))
	if !csvNeedsQuotes(s) {
		return append(buf, s...)
	}
	buf = append(buf, '"')
	for i := 0; i < len(s); i++ {
		if s[i] == '"' {
			buf = append(buf, '"')
		}
		buf = append(buf, s[i])
	}
	return append(buf, '"')
}

// csvNeedsQuotes is encoding/csv's Writer.fieldNeedsQuotes for a comma.
func csvNeedsQuotes(s string) bool {
	if s == "" {
		return false
	}
	if s == `\.` {
		return true
	}
	for i := 0; i < len(s); i++ {
		if c := s[i]; c == '\n' || c == '\r' || c == '"' || c == ',' {
			return true
		}
	}
	r, _ := utf8.DecodeRuneInString(s)
	return unicode.IsSpace(r)
}

// appendCSVNumber appends csvNumber(v): shortest round-trip form, nothing
// for a number that is not finite.
func appendCSVNumber(buf []byte, v float64) []byte {
	if !finite(v) {
		return buf
	}
	return strconv.AppendFloat(buf, v, 'g', -1, 64)
}

// appendCSVGiven appends csvGiven(v): nothing when v is 0 (not given).
func appendCSVGiven(buf []byte, v float64) []byte {
	if v == 0 {
		return buf
	}
	return appendCSVNumber(buf, v)
}

// depthColumn is a kind of depth estimate that gets columns.
type depthColumn struct {
	prefix string
	of     func(r *fit.Result) *fit.DepthEstimate
}

// depthColumns lists the depth kinds any of rs carries: case, decarb.
func depthColumns(rs []*fit.Result) []depthColumn {
	var out []depthColumn
	all := []depthColumn{
		{"case", func(r *fit.Result) *fit.DepthEstimate { return r.CaseDepth }},
		{"decarb", func(r *fit.Result) *fit.DepthEstimate { return r.DecarbDepth }},
	}
	for _, d := range all {
		for _, r := range rs {
			if d.of(r) != nil {
				out = append(out, d)
				break
			}
		}
	}
	return out
}

// WriteResidualsCSV writes one row per measured point of every fitted
// profile: id, depth_m, observed, fitted, residual, line (the source line
// or row; empty when unknown). Observed, fitted and residual are in the
// profile's value unit, given in value_unit.
func (f Fits) WriteResidualsCSV(w io.Writer) error {
	cw := newCSVWriter(w)
	if err := cw.Write([]string{"id", "depth_m", "observed", "fitted", "residual", "value_unit", "line"}); err != nil {
		return err
	}
	for _, r := range f.Results {
		for _, p := range r.Residuals {
			line := ""
			if p.Line > 0 {
				line = strconv.Itoa(p.Line)
			}
			if err := cw.Write([]string{r.ID, csvNumber(p.Depth), csvNumber(p.Observed), csvNumber(p.Fitted),
				csvNumber(p.Residual), r.ValueUnit, line}); err != nil {
				return err
			}
		}
	}
	cw.Flush()
	return cw.Error()
}
