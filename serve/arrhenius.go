package serve

import (
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"net/http"
	"strings"

	"github.com/fickfit/fickfit/arrhenius"
	"github.com/fickfit/fickfit/campaign"
	"github.com/fickfit/fickfit/fit"
	"github.com/fickfit/fickfit/internal/jsonx"
	"github.com/fickfit/fickfit/profile"
	"github.com/fickfit/fickfit/report"
)

type arrPoint struct {
	ID     string   `json:"id"`
	Group  string   `json:"group"`
	T      float64  `json:"temperature_K"`
	D      float64  `json:"D"`
	Lo     *float64 `json:"lo"`
	Hi     *float64 `json:"hi"`
	Reason string   `json:"reason,omitempty"`
}

type arrLine struct {
	Group    string     `json:"group"`
	D0       string     `json:"D0"`
	Q        string     `json:"Q"`
	Points   int        `json:"n_points"`
	Temps    int        `json:"n_temperatures"`
	Birge    string     `json:"birge"`
	Warnings []string   `json:"warnings"`
	Curve    []arrCurve `json:"curve"`
}

type arrCurve struct {
	T  float64  `json:"temperature_K"`
	D  float64  `json:"D"`
	Lo *float64 `json:"lo"`
	Hi *float64 `json:"hi"`
}

type arrView struct {
	By              string      `json:"by"`
	Method          string      `json:"method"`
	Unit            string      `json:"temperature_unit"`
	Lines           []arrLine   `json:"lines"`
	Points          []arrPoint  `json:"points"`
	LeftOut         []arrPoint  `json:"left_out"`
	LineErrors      []string    `json:"line_errors"`
	Verdict         string      `json:"verdict"`
	Tests           [][4]string `json:"tests"`
	Ratios          []string    `json:"ratios"`
	ComparisonError string      `json:"comparison_error"`
	Parts           []partView  `json:"parts"`
	Notes           []string    `json:"notes"`
}

type partView struct {
	ID       string   `json:"id"`
	Lot      string   `json:"lot"`
	Text     string   `json:"text"`
	Warnings []string `json:"warnings"`
}

func (s *session) handleArrhenius(w http.ResponseWriter, r *http.Request) {
	res, u, err := s.campaignRun()
	if err != nil {
		fail(w, http.StatusBadRequest, err)
		return
	}
	v := arrView{By: res.By, Method: res.Method, Unit: u.Symbol(), Lines: []arrLine{}, Points: []arrPoint{}, LeftOut: []arrPoint{},
		LineErrors: []string{}, Tests: [][4]string{}, Ratios: []string{}, Parts: []partView{}, Notes: []string{}}
	for _, n := range res.Notes {
		v.Notes = append(v.Notes, report.Temps(n, u))
	}
	if res.Lines != nil {
		for i := range res.Lines.Lines {
			l := &res.Lines.Lines[i]
			al := arrLine{Group: l.Group, D0: report.D0Text(l), Q: report.QText(l.Q, l.QCI(), l.Level), Points: len(l.Points),
				Temps: l.NTemperatures, Birge: report.Number(l.BirgeRatio, -2), Warnings: []string{}}
			for _, wn := range l.Warnings {
				al.Warnings = append(al.Warnings, report.Temps(wn.Message, u))
			}
			tlo, thi := l.TRange()
			for k := 0; k <= 40; k++ {
				T := 1 / (1/(tlo-15) + (1/(thi+15)-1/(tlo-15))*float64(k)/40)
				d, ci := l.DAt(T)
				al.Curve = append(al.Curve, arrCurve{T: T, D: d, Lo: num(ci.Lo, false), Hi: num(ci.Hi, false)})
			}
			for _, p := range l.Points {
				iv := p.Interval(l.Level)
				v.Points = append(v.Points, arrPoint{ID: p.ID, Group: l.Group, T: p.T, D: math.Exp(p.LnD), Lo: num(iv.Lo, false), Hi: num(iv.Hi, false)})
			}
			v.Lines = append(v.Lines, al)
		}
	}
	for _, f := range res.LineErrors {
		v.LineErrors = append(v.LineErrors, strings.TrimSpace(f.Group+": "+report.Temps(f.Error, u)))
	}
	if res.Excluded != nil {
		for _, r := range res.Results {
			lo, ok := res.Excluded.IsLeftOut(r.ID)
			if !ok {
				continue
			}
			p, err := arrhenius.PointFromResult(r)
			if err != nil {
				continue
			}
			g, _ := p.GroupKey(res.By)
			iv := p.Interval(res.Options.Level)
			v.LeftOut = append(v.LeftOut, arrPoint{ID: p.ID, Group: g, T: p.T, D: math.Exp(p.LnD), Lo: num(iv.Lo, false), Hi: num(iv.Hi, false), Reason: lo.Reason})
		}
	}
	if c := res.Comparison; c != nil {
		v.Verdict = report.Temps(c.Verdict, u)
		for _, t := range c.Tests {
			v.Tests = append(v.Tests, [4]string{t.Description, report.Number(t.F, -2), fmt.Sprintf("%d, %d", t.DF1, t.DF2), report.Sig(t.P, 2)})
		}
		for _, r := range c.Ratios {
			v.Ratios = append(v.Ratios, fmt.Sprintf("D(%s) / D(%s) at %s = %s; p = %s (%s)", r.Group, r.Reference,
				report.Temperature(r.TRef, u), report.RatioText(r.Value, r.CI, c.Level), report.Sig(r.P, 2), r.Model))
		}
	}
	v.ComparisonError = report.Temps(res.ComparisonError, u)
	for _, p := range res.Parts {
		pv := partView{ID: p.ID, Lot: p.Lot, Text: report.PartText(p, u), Warnings: []string{}}
		if p.Solution != nil {
			for _, wn := range p.Solution.Warnings {
				pv.Warnings = append(pv.Warnings, report.Temps(wn.Message, u))
			}
		}
		v.Parts = append(v.Parts, pv)
	}
	writeJSON(w, http.StatusOK, v)
}

type backcalcRequest struct {
	ID    string `json:"id"`
	Solve string `json:"solve"`
	Known string `json:"known"`
	Group string `json:"group"`
}

type backcalcView struct {
	ID       string          `json:"id"`
	Line     string          `json:"line"`
	Text     string          `json:"text"`
	Solution json.RawMessage `json:"solution"`
	Warnings []string        `json:"warnings"`
	Cautions []string        `json:"cautions"`
}

func (s *session) handleBackcalc(w http.ResponseWriter, r *http.Request) {
	var q backcalcRequest
	b, err := readBody(w, r, 1<<20)
	if err == nil {
		err = json.Unmarshal(b, &q)
	}
	if err != nil {
		fail(w, http.StatusBadRequest, err)
		return
	}
	v, err := s.backcalc(q)
	if err != nil {
		fail(w, http.StatusBadRequest, errors.New(strings.TrimPrefix(err.Error(), fit.ErrBadInput.Error()+": ")))
		return
	}
	writeJSON(w, http.StatusOK, v)
}

// backcalc solves the part's temperature or time on the current line of
// its group (or the group asked for), as fickfit backcalc does with the
// line's calibration.
func (s *session) backcalc(q backcalcRequest) (*backcalcView, error) {
	res, u, err := s.campaignRun()
	if err != nil {
		return nil, err
	}
	var rr *fit.Result
	for _, x := range res.Results {
		if x.ID == q.ID {
			rr = x
		}
	}
	if rr == nil {
		return nil, fmt.Errorf("profile %q has no fit to back-calculate from", q.ID)
	}
	if res.Lines == nil || len(res.Lines.Lines) == 0 {
		return nil, errors.New("there is no Arrhenius line yet: load calibration coupons held at three or more temperatures")
	}
	group := q.Group
	if group == "" {
		pt := arrhenius.Point{Lot: rr.Lot, Meta: map[string]string{}}
		for k, v := range rr.Meta {
			pt.Meta[strings.ToLower(k)] = v
		}
		group, _ = pt.GroupKey(res.By)
	}
	var line *arrhenius.Line
	for i := range res.Lines.Lines {
		if res.Lines.Lines[i].Group == group || len(res.Lines.Lines) == 1 {
			line = &res.Lines.Lines[i]
		}
	}
	if line == nil {
		return nil, fmt.Errorf("there is no Arrhenius line for %s %q: choose a line", res.By, group)
	}
	so := &arrhenius.SolveOptions{Level: res.Options.Level, Seed: defaultSeed}
	known := strings.TrimSpace(q.Known)
	obs, err := arrhenius.ObservationFromResult(rr)
	if err != nil {
		return nil, err
	}
	var sol *arrhenius.Solution
	switch q.Solve {
	case "time":
		if known != "" {
			if so.Temperature, err = profile.ParseTemperature(known); err != nil {
				return nil, fmt.Errorf("temperature: %v", err)
			}
		}
		sol, err = arrhenius.SolveTime(obs, line.Calibration(), so)
	default:
		if known != "" {
			if so.Time, err = profile.ParseDuration(known); err != nil {
				return nil, fmt.Errorf("time: %v", err)
			}
		}
		sol, err = arrhenius.SolveTemperature(obs, line.Calibration(), so)
	}
	if err != nil {
		return nil, err
	}
	raw, err := jsonx.Marshal(sol)
	if err != nil {
		return nil, err
	}
	solveFor := "temperature"
	if q.Solve == "time" {
		solveFor = "time"
	}
	v := &backcalcView{ID: rr.ID, Line: line.Group, Solution: raw, Warnings: []string{}, Cautions: sol.Cautions,
		Text: report.PartText(partOf(rr, sol, solveFor), u)}
	for _, wn := range sol.Warnings {
		v.Warnings = append(v.Warnings, report.Temps(wn.Message, u))
	}
	return v, nil
}

// partOf is a back-calculated part for report.PartText.
func partOf(r *fit.Result, s *arrhenius.Solution, solveFor string) campaign.Part {
	return campaign.Part{ID: r.ID, Lot: r.Lot, SolveFor: solveFor, Solution: s}
}
