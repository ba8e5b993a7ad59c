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
	// Time is the hold time in s (0 when not given: then D is reported as Dt).
	Time float64 `json:"time_s"`
	// Temperature is the hold temperature in K (0 when not given).
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
	FreeNames   []string    `json:"free_names"`
	Correlation [][]float64 `json:"correlation"`

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
	pint  []float64   // all parameters, internal scale
	free  []bool      // which are free
	cov   [][]float64 // covariance of free parameters, internal scale
}

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
