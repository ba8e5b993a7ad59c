package arrhenius

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"sort"
	"strings"

	"github.com/fickfit/fickfit/fit"
	"github.com/fickfit/fickfit/internal/jsonx"
)

// The JSON written by `fickfit arrhenius --format json` (docs/output.md):
//
//	{"method":"two-stage",
//	 "D0":{"value":2.3e-5,"unit":"m2/s","ci":[lo,hi],"ln_value":-10.68,"stderr_ln":0.9},
//	 "Q":{"value":148000,"unit":"J/mol","ci":[lo,hi],"stderr":9000},
//	 "corr_lnD0_Q":0.999,"cov_lnD0_Q":[[v00,v01],[v01,v11]],"dof":13,
//	 "ci_level":0.95,"ci_method":"wald-t","chi2":…,"chi2_p":…,  ("wald-normal" when not scaled)
//	 "birge_ratio":1.2,"birge_scaled":true,"n_temperatures":5,
//	 "temperature_range_K":[1123.15,1323.15],
//	 "points":[{"id":"A3","temperature_K":1198.15,"D":2.9e-11,"ci":[lo,hi],
//	            "stderr_ln":0.05,"D_line":2.8e-11,"residual_ln":0.03,"weight":400}],
//	 "temperature_uncertainty":{"halfwidth_Q":…,"halfwidth_Q_profiles_only":…,
//	            "share_temperature":0.3,"share_profiles":0.7,"iterations":5,"converged":true},
//	 "warnings":[{"code":"…","message":"…"}]}
//
// and, when grouped, {"by":"lot","groups":[{"group":"L1", …the same keys…}, …]}.
// Open interval ends and undefined numbers are null. "cov_lnD0_Q" and
// "dof" let the line be reused for back-calculation (LoadCalibration).

// EstimateJSON is the wire form of D0 or Q in LineJSON.
type EstimateJSON struct {
	Value    float64      `json:"value"`
	Unit     string       `json:"unit"`
	CI       fit.Interval `json:"ci"`
	LnValue  *float64     `json:"ln_value,omitempty"`
	StdErrLn *float64     `json:"stderr_ln,omitempty"`
	StdErr   *float64     `json:"stderr,omitempty"`
}

// PointJSON is the wire form of one point of a line.
type PointJSON struct {
	ID       string       `json:"id"`
	Source   string       `json:"source,omitempty"`
	Lot      string       `json:"lot,omitempty"`
	T        float64      `json:"temperature_K"`
	SigmaT   float64      `json:"temperature_sigma_K,omitempty"`
	D        float64      `json:"D"`
	CI       fit.Interval `json:"ci"`
	StdErrLn *float64     `json:"stderr_ln"`
	DLine    float64      `json:"D_line"`
	Residual float64      `json:"residual_ln"`
	Weight   *float64     `json:"weight"`
	// Regression diagnostics (influence.go); null where not defined.
	Leverage    *float64 `json:"leverage"`
	Studentized *float64 `json:"studentized_residual"`
	Cook        *float64 `json:"cooks_distance"`
}

// DOnLineJSON is D on the line at one temperature: the band of the mean
// line ("ci") and the prediction interval of a single new part.
type DOnLineJSON struct {
	T  float64      `json:"temperature_K"`
	D  float64      `json:"D"`
	CI fit.Interval `json:"ci"`
	PI fit.Interval `json:"prediction_interval"`
}

// BudgetJSON is the wire form of a TemperatureBudget.
type BudgetJSON struct {
	HalfWidthQ         *float64 `json:"halfwidth_Q"`
	HalfWidthQProfiles *float64 `json:"halfwidth_Q_profiles_only"`
	ShareTemperature   float64  `json:"share_temperature"`
	ShareProfiles      float64  `json:"share_profiles"`
	Iterations         int      `json:"iterations"`
	Converged          bool     `json:"converged"`
}

// LineJSON is the wire form of a Line, with the keys shown above. It has
// no MarshalJSON of its own, so that a document can embed it beside keys
// of its own (report writes "fickfit_version" first).
type LineJSON struct {
	Group         string        `json:"group,omitempty"`
	Method        string        `json:"method"`
	D0            EstimateJSON  `json:"D0"`
	Q             EstimateJSON  `json:"Q"`
	Corr          *float64      `json:"corr_lnD0_Q"`
	Cov           [2][2]float64 `json:"cov_lnD0_Q"`
	DOF           int           `json:"dof"`
	CILevel       float64       `json:"ci_level"`
	CIMethod      string        `json:"ci_method"`
	ChiSq         *float64      `json:"chi2"`
	ChiSqP        *float64      `json:"chi2_p"`
	Birge         *float64      `json:"birge_ratio"`
	Scaled        bool          `json:"birge_scaled"`
	NTemperatures int           `json:"n_temperatures"`
	TRange        [2]float64    `json:"temperature_range_K"`
	Points        []PointJSON   `json:"points"`
	Budget        *BudgetJSON   `json:"temperature_uncertainty,omitempty"`
	PartVar       *float64      `json:"part_var_lnD"`
	DOnLine       []DOnLineJSON `json:"d_on_line"`
	Iterations    int           `json:"iterations,omitempty"`
	Warnings      []fit.Warning `json:"warnings"`
}

func num(v float64) *float64 { return jsonx.Num(v) }

func val(p *float64) float64 { return jsonx.Val(p) }

// MarshalJSON writes the line in the shape documented above.
func (l Line) MarshalJSON() ([]byte, error) { return jsonx.Marshal(l.JSON()) }

// JSON returns the line's wire form.
func (l Line) JSON() LineJSON {
	lnD0 := l.LnD0
	j := LineJSON{
		Group: l.Group, Method: l.Method,
		D0:  EstimateJSON{Value: l.D0(), Unit: "m2/s", CI: l.D0CI(), LnValue: &lnD0, StdErrLn: num(l.StdErrLnD0())},
		Q:   EstimateJSON{Value: l.Q, Unit: "J/mol", CI: l.QCI(), StdErr: num(l.StdErrQ())},
		Cov: l.Cov, DOF: l.DOF, CILevel: l.Level, CIMethod: "wald-normal",
		Corr: num(l.Corr()), ChiSq: num(l.ChiSq), ChiSqP: num(l.ChiSqP), Birge: num(l.BirgeRatio),
		Scaled: l.Scaled, NTemperatures: l.NTemperatures, Iterations: l.Iterations,
		Warnings: l.Warnings, Points: make([]PointJSON, len(l.Points)),
	}
	if l.Scaled {
		j.CIMethod = "wald-t"
	}
	j.TRange[0], j.TRange[1] = l.TRange()
	if j.Warnings == nil {
		j.Warnings = []fit.Warning{}
	}
	for i, p := range l.Points {
		ci := p.Interval(l.Level)
		se := math.Sqrt(p.VarLnD)
		j.Points[i] = PointJSON{ID: p.ID, Source: p.Source, Lot: p.Lot, T: p.T, SigmaT: p.SigmaT,
			D: math.Exp(p.LnD), CI: ci, StdErrLn: num(se), DLine: math.Exp(p.Fitted),
			Residual: p.Residual, Weight: num(p.Weight),
			Leverage: num(p.Leverage), Studentized: num(p.Studentized), Cook: num(p.Cook)}
	}
	j.PartVar = num(l.PartVar())
	j.DOnLine = []DOnLineJSON{}
	for _, T := range l.DOnLineTemperatures() {
		d, ci := l.DAt(T)
		_, pi := l.PredictAt(T)
		j.DOnLine = append(j.DOnLine, DOnLineJSON{T: T, D: d, CI: ci, PI: pi})
	}
	if b := l.TempBudget; b != nil {
		j.Budget = &BudgetJSON{HalfWidthQ: num(b.HalfWidthQ), HalfWidthQProfiles: num(b.HalfWidthQProfiles),
			ShareTemperature: b.ShareTemperature, ShareProfiles: b.ShareProfiles,
			Iterations: b.Iterations, Converged: b.Converged}
	}
	return j
}

// UnmarshalJSON reads a line written by MarshalJSON. The points keep what
// the JSON holds (id, temperature, D, its interval and standard error).
func (l *Line) UnmarshalJSON(b []byte) error {
	var j LineJSON
	if err := json.Unmarshal(b, &j); err != nil {
		return err
	}
	lnD0 := math.Log(j.D0.Value)
	if j.D0.LnValue != nil {
		lnD0 = *j.D0.LnValue
	}
	*l = Line{Group: j.Group, Method: j.Method, LnD0: lnD0, Q: j.Q.Value, Cov: j.Cov, DOF: j.DOF,
		Level: j.CILevel, ChiSq: val(j.ChiSq), ChiSqP: val(j.ChiSqP), BirgeRatio: val(j.Birge),
		Scaled: j.Scaled, NTemperatures: j.NTemperatures, HasCI: !j.Q.CI.Open(),
		Iterations: j.Iterations, Warnings: j.Warnings}
	for _, p := range j.Points {
		se := val(p.StdErrLn)
		l.Points = append(l.Points, LinePoint{
			Point:  Point{ID: p.ID, Source: p.Source, Lot: p.Lot, T: p.T, SigmaT: p.SigmaT, LnD: math.Log(p.D), VarLnD: se * se, CI: p.CI},
			Fitted: math.Log(p.DLine), Residual: p.Residual, Weight: val(p.Weight),
			Influence: Influence{Leverage: val(p.Leverage), Studentized: val(p.Studentized), Cook: val(p.Cook), OutlierP: nan},
		})
	}
	if bj := j.Budget; bj != nil {
		l.TempBudget = &TemperatureBudget{HalfWidthQ: val(bj.HalfWidthQ), HalfWidthQProfiles: val(bj.HalfWidthQProfiles),
			ShareTemperature: bj.ShareTemperature, ShareProfiles: bj.ShareProfiles,
			Iterations: bj.Iterations, Converged: bj.Converged}
	}
	return nil
}

// Report is the document `fickfit arrhenius --format json` writes: one
// line, or one line per group when By is set.
type Report struct {
	By    string // grouping column; "" for a single line
	Lines []Line
}

// Grouped tells which JSON shape the report has: grouped lines
// ({"by":…,"groups":[…]}) unless it is one line without a grouping column.
func (r Report) Grouped() bool { return r.By != "" || len(r.Lines) != 1 }

// MarshalJSON writes a single line as its own object and grouped lines as
// {"by":…,"groups":[…]}.
func (r Report) MarshalJSON() ([]byte, error) {
	if !r.Grouped() {
		return jsonx.Marshal(r.Lines[0])
	}
	lines := r.Lines
	if lines == nil {
		lines = []Line{}
	}
	return jsonx.Marshal(struct {
		By     string `json:"by,omitempty"`
		Groups []Line `json:"groups"`
	}{r.By, lines})
}

// UnmarshalJSON reads either shape.
func (r *Report) UnmarshalJSON(b []byte) error {
	var probe struct {
		By     string          `json:"by"`
		Groups json.RawMessage `json:"groups"`
		Method *string         `json:"method"`
	}
	if err := json.Unmarshal(b, &probe); err != nil {
		return err
	}
	if probe.Groups != nil {
		var ls []Line
		if err := json.Unmarshal(probe.Groups, &ls); err != nil {
			return err
		}
		for i := range ls {
			ls[i].By = probe.By
		}
		*r = Report{By: probe.By, Lines: ls}
		return nil
	}
	if probe.Method == nil {
		return errors.New(`neither "groups" nor "method" found: this is not an Arrhenius result written by fickfit arrhenius --format json`)
	}
	var l Line
	if err := json.Unmarshal(b, &l); err != nil {
		return err
	}
	*r = Report{Lines: []Line{l}}
	return nil
}

// Line returns the line of the named group; with group == "" it returns
// the only line, and an error listing the groups when there are several.
func (r *Report) Line(group string) (*Line, error) {
	var names []string
	for i := range r.Lines {
		names = append(names, r.Lines[i].Group)
		if r.Lines[i].Group == group || (group == "" && len(r.Lines) == 1) {
			return &r.Lines[i], nil
		}
	}
	sort.Strings(names)
	if group == "" {
		return nil, badInput("", "group", "the calibration holds %d groups (%s); choose one", len(r.Lines), strings.Join(names, ", "))
	}
	return nil, badInput(group, "group", "no such group in the calibration (groups: %s)", strings.Join(names, ", "))
}

// ReadReport reads a Report from JSON. name labels errors (a file name);
// a syntax error gives its line.
func ReadReport(rd io.Reader, name string) (*Report, error) {
	b, err := io.ReadAll(rd)
	if err != nil {
		return nil, &Error{Source: name, Msg: "cannot read: " + err.Error(), Kind: fit.ErrBadInput}
	}
	var r Report
	if err := json.Unmarshal(b, &r); err != nil {
		e := &Error{Source: name, Msg: "not a valid Arrhenius JSON result (" + err.Error() + "); give the file written by `fickfit arrhenius --format json`", Kind: fit.ErrBadInput}
		var se *json.SyntaxError
		var te *json.UnmarshalTypeError
		switch {
		case errors.As(err, &se):
			e.Line = 1 + bytes.Count(b[:min(int(se.Offset), len(b))], []byte("\n"))
		case errors.As(err, &te):
			e.Line = 1 + bytes.Count(b[:min(int(te.Offset), len(b))], []byte("\n"))
			e.Field = te.Field
		}
		return nil, e
	}
	for i := range r.Lines {
		c := r.Lines[i].Calibration()
		if err := c.validate(); err != nil {
			var e *Error
			if errors.As(err, &e) {
				e.Source = name
				e.ID = r.Lines[i].Group
			}
			return nil, err
		}
	}
	return &r, nil
}

// LoadCalibration reads the Arrhenius JSON file at path (opened read-only)
// and returns the calibration of the named group ("" for an ungrouped file).
func LoadCalibration(path, group string) (Calibration, error) {
	f, err := os.Open(path)
	if err != nil {
		return Calibration{}, &Error{Source: path, Msg: "cannot open the calibration: " + err.Error(), Kind: fit.ErrBadInput}
	}
	defer f.Close()
	r, err := ReadReport(f, path)
	if err != nil {
		return Calibration{}, err
	}
	l, err := r.Line(group)
	if err != nil {
		var e *Error
		if errors.As(err, &e) {
			e.Source = path
		}
		return Calibration{}, err
	}
	c := l.Calibration()
	c.Source = fmt.Sprintf("%s, from %s", c.Source, path)
	return c, nil
}
