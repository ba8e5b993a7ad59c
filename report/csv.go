package report

import (
	"io"
	"strconv"
	"strings"

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
// in shortest round-trip form.
func (f Fits) WriteCSV(w io.Writer) error {
	names := paramNames(f.Results)
	var others []string
	for _, n := range names {
		if n != "D" {
			others = append(others, n)
		}
	}
	header := []string{"id", "lot", "temperature_K", "time_s", "model", "D_m2_s", "D_ci_lo", "D_ci_hi", "D_stderr", "Dt_m2", "Dt_ci_lo", "Dt_ci_hi"}
	for _, n := range others {
		c := csvParamColumns(n, f.Results)
		header = append(header, c, n+"_stderr", n+"_ci_lo", n+"_ci_hi", n+"_fixed")
	}
	header = append(header, "value_unit", "n", "dof", "rss", "rmse", "r2", "aicc", "chi2_red", "chi2_p", "runs_p", "cond",
		"ci_level", "ci_method", "covariance", "converged", "source", "material", "warnings", "error")
	// Case and decarburization depths, when any profile has one: the
	// criterion as given, the level searched for (value_unit), the depth
	// from the fitted curve with its interval, and from the points.
	depths := depthColumns(f.Results)
	for _, d := range depths {
		header = append(header, d.prefix+"_threshold", d.prefix+"_level", d.prefix+"_depth_m", d.prefix+"_depth_ci_lo_m",
			d.prefix+"_depth_ci_hi_m", d.prefix+"_depth_from_data_m")
	}
	cw := newCSVWriter(w)
	if err := cw.Write(header); err != nil {
		return err
	}
	for _, r := range f.Results {
		row := []string{r.ID, r.Lot, csvGiven(r.Temperature), csvGiven(r.Time), r.Model}
		d := r.Param("D")
		switch {
		case d == nil:
			row = append(row, "", "", "", "", "", "", "")
		case r.Time > 0:
			row = append(row, csvNumber(d.Value), csvNumber(d.CI.Lo), csvNumber(d.CI.Hi), csvNumber(d.StdErr),
				csvNumber(d.Value*r.Time), csvNumber(d.CI.Lo*r.Time), csvNumber(d.CI.Hi*r.Time))
		default:
			row = append(row, "", "", "", "", csvNumber(d.Value), csvNumber(d.CI.Lo), csvNumber(d.CI.Hi))
		}
		for _, n := range others {
			e := r.Param(n)
			if e == nil {
				row = append(row, "", "", "", "", "")
				continue
			}
			row = append(row, csvNumber(e.Value), csvNumber(e.StdErr), csvNumber(e.CI.Lo), csvNumber(e.CI.Hi), strconv.FormatBool(e.Fixed))
		}
		s := r.Stats
		codes := make([]string, len(r.Warnings))
		for i, wn := range r.Warnings {
			codes[i] = wn.Code
		}
		row = append(row, r.ValueUnit, strconv.Itoa(s.N), strconv.Itoa(s.DOF), csvNumber(s.RSS), csvNumber(s.RMSE),
			csvNumber(s.R2), csvNumber(s.AICc), csvNumber(s.Chi2Red), csvNumber(s.Chi2P), csvNumber(s.RunsP), csvNumber(s.Cond),
			csvNumber(r.CILevel), r.CIMethod.String(), r.Covariance.String(), strconv.FormatBool(r.Converged), r.Source, r.Material,
			strings.Join(codes, ";"), "")
		for _, d := range depths {
			if e := d.of(r); e != nil {
				row = append(row, e.Threshold, csvNumber(e.Level), csvNumber(e.Depth), csvNumber(e.CI.Lo), csvNumber(e.CI.Hi), csvNumber(e.FromData))
			} else {
				row = append(row, "", "", "", "", "", "")
			}
		}
		if err := cw.Write(row); err != nil {
			return err
		}
	}
	for _, fl := range f.Failed {
		row := make([]string, len(header))
		row[0], row[1] = fl.ID, fl.Lot
		set := func(col, v string) {
			for i, h := range header {
				if h == col {
					row[i] = v
				}
			}
		}
		set("converged", "false")
		set("source", fl.Source)
		set("error", fl.Error)
		if err := cw.Write(row); err != nil {
			return err
		}
	}
	// Inputs not read (--keep-going): no id, the file as source.
	for _, n := range f.NotRead {
		row := make([]string, len(header))
		row[0] = n.ID
		for i, h := range header {
			switch h {
			case "source":
				row[i] = n.where()
			case "error":
				row[i] = "not read: " + n.Reason
			}
		}
		if err := cw.Write(row); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
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
