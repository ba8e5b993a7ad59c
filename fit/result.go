package fit

import (
	"encoding/json"
	"fmt"
	"math"

	"github.com/fickfit/fickfit/internal/jsonx"
	"github.com/fickfit/fickfit/internal/tempfmt"
	"github.com/fickfit/fickfit/profile"
)

// Interval is a confidence interval. An open end is NaN (or ±Inf) and is
// written as null in JSON: "not determined by the data".
type Interval struct{ Lo, Hi float64 }

// Open reports whether either end is not determined.
func (iv Interval) Open() bool { return !finite(iv.Lo) || !finite(iv.Hi) }

// MarshalJSON writes [lo, hi] with null for an open end.
func (iv Interval) MarshalJSON() ([]byte, error) {
	return jsonx.Marshal([2]*float64{num(iv.Lo), num(iv.Hi)})
}

// UnmarshalJSON reads [lo, hi] with null for an open end.
func (iv *Interval) UnmarshalJSON(b []byte) error {
	var v [2]*float64
	if err := json.Unmarshal(b, &v); err != nil {
		return err
	}
	iv.Lo, iv.Hi = math.NaN(), math.NaN()
	if v[0] != nil {
		iv.Lo = *v[0]
	}
	if v[1] != nil {
		iv.Hi = *v[1]
	}
	return nil
}

// Estimate is one fitted (or fixed) parameter in reported units.
type Estimate struct {
	Name   string   `json:"name"`
	Value  float64  `json:"value"`
	Unit   string   `json:"unit"`
	StdErr float64  `json:"stderr"`
	CI     Interval `json:"ci"`
	Fixed  bool     `json:"fixed"`
	// StdErrLn is the standard error of ln(value) for parameters fitted on
	// the log scale (D, beta, M); 0 otherwise. Arrhenius weights use it.
	StdErrLn float64 `json:"stderr_ln,omitempty"`
}

// MarshalJSON writes non-finite numbers as null (a parameter at its limit
// has the value +∞ and no standard error).
func (e Estimate) MarshalJSON() ([]byte, error) {
	type plain Estimate
	return json.Marshal(struct {
		plain
		Value    *float64 `json:"value"`
		StdErr   *float64 `json:"stderr"`
		StdErrLn *float64 `json:"stderr_ln,omitempty"`
	}{plain(e), num(e.Value), num(e.StdErr), lnNum(e.StdErrLn)})
}

// lnNum is num with 0 (a parameter not on the log scale) left out too.
func lnNum(v float64) *float64 {
	if v == 0 || !finite(v) {
		return nil
	}
	return &v
}

// UnmarshalJSON reads null as NaN.
func (e *Estimate) UnmarshalJSON(b []byte) error {
	type plain Estimate
	var v struct {
		plain
		Value    *float64 `json:"value"`
		StdErr   *float64 `json:"stderr"`
		StdErrLn *float64 `json:"stderr_ln"`
	}
	if err := json.Unmarshal(b, &v); err != nil {
		return err
	}
	*e = Estimate(v.plain)
	e.Value, e.StdErr = val(v.Value), val(v.StdErr)
	e.StdErrLn = 0
	if v.StdErrLn != nil {
		e.StdErrLn = *v.StdErrLn
	}
	return nil
}

// Matrix is a small dense matrix of rows; non-finite entries (undefined,
// e.g. the correlations of a parameter at its limit) are written as null
// in JSON and read back as NaN.
type Matrix [][]float64

// MarshalJSON writes non-finite entries as null.
func (m Matrix) MarshalJSON() ([]byte, error) {
	if m == nil {
		return []byte("null"), nil
	}
	rows := make([][]*float64, len(m))
	for i, row := range m {
		rows[i] = make([]*float64, len(row))
		for j, v := range row {
			rows[i][j] = num(v)
		}
	}
	return json.Marshal(rows)
}

// UnmarshalJSON reads null entries as NaN.
func (m *Matrix) UnmarshalJSON(b []byte) error {
	var rows [][]*float64
	if err := json.Unmarshal(b, &rows); err != nil {
		return err
	}
	if rows == nil {
		*m = nil
		return nil
	}
	out := make(Matrix, len(rows))
	for i, row := range rows {
		out[i] = make([]float64, len(row))
		for j, v := range row {
			out[i][j] = val(v)
		}
	}
	*m = out
	return nil
}

// Stats summarises the quality of a fit.
type Stats struct {
	N    int     `json:"n"`
	DOF  int     `json:"dof"`
	RSS  float64 `json:"rss"`  // weighted when weights are given
	RMSE float64 `json:"rmse"` // sqrt(RSS/dof)
	R2   float64 `json:"r2"`
	AICc float64 `json:"aicc"`
	// Chi2Red is RSS/dof; with weights from σ it is the reduced χ².
	Chi2Red float64 `json:"chi2_red"`
	// Chi2P is P(χ²_dof ≥ RSS) when weights come from σ; NaN otherwise.
	Chi2P float64 `json:"chi2_p"`
	// RunsP is the two-sided p-value of the Wald–Wolfowitz runs test on residual signs.
	RunsP float64 `json:"runs_p"`
	// Cond is the condition number of JᵀWJ at the solution (internal scale).
	Cond       float64 `json:"cond"`
	Iterations int     `json:"iterations"`
}

// MarshalJSON writes non-finite numbers as null.
func (s Stats) MarshalJSON() ([]byte, error) {
	return jsonx.Marshal(struct {
		N          int      `json:"n"`
		DOF        int      `json:"dof"`
		RSS        *float64 `json:"rss"`
		RMSE       *float64 `json:"rmse"`
		R2         *float64 `json:"r2"`
		AICc       *float64 `json:"aicc"`
		Chi2Red    *float64 `json:"chi2_red"`
		Chi2P      *float64 `json:"chi2_p"`
		RunsP      *float64 `json:"runs_p"`
		Cond       *float64 `json:"cond"`
		Iterations int      `json:"iterations"`
	}{s.N, s.DOF, num(s.RSS), num(s.RMSE), num(s.R2), num(s.AICc), num(s.Chi2Red),
		num(s.Chi2P), num(s.RunsP), num(s.Cond), s.Iterations})
}

// UnmarshalJSON reads null as NaN.
func (s *Stats) UnmarshalJSON(b []byte) error {
	var v struct {
		N          int      `json:"n"`
		DOF        int      `json:"dof"`
		RSS        *float64 `json:"rss"`
		RMSE       *float64 `json:"rmse"`
		R2         *float64 `json:"r2"`
		AICc       *float64 `json:"aicc"`
		Chi2Red    *float64 `json:"chi2_red"`
		Chi2P      *float64 `json:"chi2_p"`
		RunsP      *float64 `json:"runs_p"`
		Cond       *float64 `json:"cond"`
		Iterations int      `json:"iterations"`
	}
	if err := json.Unmarshal(b, &v); err != nil {
		return err
	}
	*s = Stats{N: v.N, DOF: v.DOF, Iterations: v.Iterations,
		RSS: val(v.RSS), RMSE: val(v.RMSE), R2: val(v.R2), AICc: val(v.AICc),
		Chi2Red: val(v.Chi2Red), Chi2P: val(v.Chi2P), RunsP: val(v.RunsP), Cond: val(v.Cond)}
	return nil
}

// Residual is one point of the profile with the fitted value.
type Residual struct {
	Depth    float64 `json:"depth_m"`
	Observed float64 `json:"observed"`
	Fitted   float64 `json:"fitted"`
	Residual float64 `json:"residual"`
	Line     int     `json:"line,omitempty"` // source line or row
}

// Warning is a plain-language note on what the data cannot support.
// Code is short and stable, for scripts; Message is for people.
type Warning struct {
	Code string `json:"code"`
	// Message may hold absolute temperatures as marks of package
	// internal/tempfmt, rendered in the reader's unit by the writers of
	// package report and in kelvin in JSON; use Text to read it.
	Message string `json:"message"`
}

// Text is the message with its temperatures written in kelvin.
func (w Warning) Text() string { return tempfmt.Plain(w.Message) }

// MarshalJSON writes {"code","message"} with the temperatures of the
// message in kelvin (JSON is a machine output: kelvin, docs/output.md).
func (w Warning) MarshalJSON() ([]byte, error) {
	return jsonx.Marshal(struct {
		Code    string `json:"code"`
		Message string `json:"message"`
	}{w.Code, tempfmt.Plain(w.Message)})
}

// Result is everything known about one fitted profile: the answer and how
// it was obtained travel together.
type Result struct {
	ID       string `json:"id"`
	Source   string `json:"source,omitempty"`
	Lot      string `json:"lot,omitempty"`
	Material string `json:"material,omitempty"`
	Model    string `json:"model"`
	// ValueUnit is the unit of the measured values ("wt%", "HV"…).
	ValueUnit string `json:"value_unit,omitempty"`
	Converged bool   `json:"converged"`
	// Time is the hold time in s (0 when not given: then D is reported as
	// Dt; null in JSON).
	Time float64 `json:"time_s"`
	// Temperature is the hold temperature in K (0 when not given; null in
	// JSON).
	Temperature      float64 `json:"temperature_K"`
	TemperatureSigma float64 `json:"temperature_sigma_K,omitempty"`
	Thickness        float64 `json:"thickness_m,omitempty"`

	CILevel float64 `json:"ci_level"`
	// CIMethod is how the intervals were obtained: CIWald, CIProfile,
	// CIBootstrapBCa or CIBootstrapPercentile.
	CIMethod CIMethod `json:"ci_method"`
	// Covariance tells how the covariance was scaled: CovScaled (by the
	// reduced χ², the default) or CovAbsolute (σ taken as known).
	Covariance Covariance `json:"covariance"`

	Params []Estimate `json:"params"`
	// Correlation is the correlation matrix of the free parameters, in the
	// order of FreeNames (internal scale, ln for Log parameters).
	FreeNames   []string `json:"free_names"`
	Correlation Matrix   `json:"correlation"`

	Stats     Stats      `json:"stats"`
	Residuals []Residual `json:"residuals"`
	Warnings  []Warning  `json:"warnings"`

	// Meta carries the profile's metadata (for grouping by any key).
	Meta map[string]string `json:"meta,omitempty"`

	// Selection records the model comparison when the model was chosen
	// automatically (--model auto).
	Selection *Selection `json:"selection,omitempty"`
	// BelowLimit lists the values the profile gave as below a detection
	// limit, left out of the fit (profile.BelowLimit); a warning says so.
	BelowLimit []profile.BelowLimit `json:"below_limit,omitempty"`

	// CaseDepth and DecarbDepth are filled when asked for (--case-threshold,
	// --decarb-fraction).
	CaseDepth   *DepthEstimate `json:"case_depth,omitempty"`
	DecarbDepth *DepthEstimate `json:"decarb_depth,omitempty"`

	// Internal state for curves, bands and re-fits; not serialised.
	model Model
	data  *Data
	pint  []float64 // all parameters, internal scale
	// lim is 1 + the index of a free log-scale parameter that sits at its
	// limit (+∞; see atLimit); 0 means none.
	lim int
	// p0 is the model's start from the data (internal scale).
	p0   []float64
	free []bool      // which are free
	cov  [][]float64 // covariance of free parameters, internal scale
}

// MarshalJSON writes the result with its fields' tags, except that a hold
// time or temperature that was not given (0) is null, not 0: a script
// must not read 0 s or 0 K as a measured value. Reading it back gives 0
// again.
func (r Result) MarshalJSON() ([]byte, error) {
	type plain Result // the same fields without this method
	b, err := jsonx.Marshal(plain(r))
	if err != nil {
		return nil, err
	}
	return jsonx.ZeroAsNull(b, "time_s", "temperature_K")
}

// limit returns the index of the parameter at its limit, or −1.
func (r *Result) limit() int { return r.lim - 1 }

// Param returns the estimate with the given name, or nil.
func (r *Result) Param(name string) *Estimate {
	for i := range r.Params {
		if r.Params[i].Name == name {
			return &r.Params[i]
		}
	}
	return nil
}

// Warn appends a warning.
func (r *Result) Warn(code, format string, args ...any) {
	r.Warnings = append(r.Warnings, Warning{Code: code, Message: sprintf(format, args...)})
}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

func num(v float64) *float64 { return jsonx.Num(v) }

func val(p *float64) float64 { return jsonx.Val(p) }

func sprintf(format string, args ...any) string {
	if len(args) == 0 {
		return format
	}
	return fmt.Sprintf(format, args...)
}
