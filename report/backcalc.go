package report

import (
	"bufio"
	"fmt"
	"io"
	"math"
	"strconv"

	"github.com/fickfit/fickfit/arrhenius"
	"github.com/fickfit/fickfit/fit"
)

// Backcalc is the Document of back-calculated exposures (fickfit backcalc,
// and the parts marked unknown in a campaign). Its JSON is
// {"backcalc": […], "failed": […], "cautions": […]}; the cautions are the
// union of the solutions' own (arrhenius.Cautions when none has any) and
// are written in the text form even with TextOptions.NoCautions.
type Backcalc struct {
	Solutions []*arrhenius.Solution
	// Failed are the parts that could not be back-calculated, each with
	// its reason. The "failed" key and table are written only when there
	// are any.
	Failed []fit.Failure
}

// WriteJSON writes the solutions, the failed parts and the cautions.
func (b Backcalc) WriteJSON(w io.Writer) error {
	ss := nonNilPtrs(b.Solutions)
	return writeJSON(w, struct {
		envelope
		Backcalc []*arrhenius.Solution `json:"backcalc"`
		Failed   []fit.Failure         `json:"failed,omitempty"`
		Cautions []string              `json:"cautions"`
	}{envelope{versionOr("")}, ss, b.Failed, viewSolutionCautions(ss)})
}

// WriteCSV writes the tables backcalc, failed (when any part failed) and
// caution.
func (b Backcalc) WriteCSV(w io.Writer) error {
	return writeCSVTables(w, func(c *viewCSV) { viewSolutionsCSV(c, nonNilPtrs(b.Solutions), b.Failed) })
}

// WriteText writes each solution for people, the failed parts, then the
// cautions (always).
func (b Backcalc) WriteText(w io.Writer, o TextOptions) error {
	ss := nonNilPtrs(b.Solutions)
	return writeTextWithCautions(w, o, viewSolutionCautions(ss), true, func(bw *bufio.Writer) {
		viewSolutionsText(bw, ss, o)
		if len(b.Failed) > 0 {
			bw.WriteString("\nNot back-calculated:\n")
			for _, f := range b.Failed {
				writeWrapped(bw, "  "+f.ID+": ", f.Error, o.width())
			}
		}
	})
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

func viewSolutionsCSV(c *viewCSV, ss []*arrhenius.Solution, failed []fit.Failure) {
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
	if len(failed) > 0 {
		c.table("failed", "id", "lot", "kind", "error")
		for _, f := range failed {
			c.add("failed", f.ID, f.Lot, f.Kind, f.Error)
		}
	}
	viewCautionsCSV(c, viewSolutionCautions(ss))
}

var viewSolutionTargets = map[string]string{
	"unbounded-interval":              "solved",
	"no-interval":                     "solved",
	"implausible-temperature":         "T",
	"extrapolation":                   "T",
	"time-already-known":              "time",
	"observation-without-uncertainty": "Dt",
	"calibration-without-uncertainty": "calibration",
	"independent-D0-Q":                "calibration",
	"part-scatter":                    "calibration",
	"reference-literature":            "calibration",
}

func viewSolutionsText(w *bufio.Writer, ss []*arrhenius.Solution, o TextOptions) {
	viewEach(w, o, ss, "No back-calculation.", viewSolutionText)
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
	if s.Calibration.Method == "reference" {
		head += " — from literature values, not this laboratory's calibration"
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
		return t.n().temperatureEstimate(q.Value, q.CI, s.Level, u) + "; " + viewCIMethod(q.Method, s.MonteCarlo)
	}
	dur := func(q arrhenius.Quantity) string {
		if q.Given {
			return Duration(q.Value) + ", given"
		}
		if q.Method == "" && !finite(q.CI.Lo) && !finite(q.CI.Hi) {
			return t.n().viewDurationPlain(q.Value) + ", no interval"
		}
		if viewZeroWidth(q.CI) {
			return t.n().viewDurationPlain(q.Value) + ", " + viewZeroWidthText
		}
		return t.n().durationEstimate(q.Value, q.CI, s.Level) + "; " + viewCIMethod(q.Method, s.MonteCarlo)
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
			v = "every temperature (K) × " + t.n().viewAdjust(a.Value, a.CI, s.Level, "")
		} else {
			v = "every temperature " + t.n().viewAdjust(a.Value, a.CI, s.Level, "K")
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
	last := t.n().lastDigit(dt, div)
	dtText := Number(dt, last) + " m² (√Dt " + Depth(math.Sqrt(dt)) + ") from the part's profile"
	if se > 0 {
		dtText += ", u(ln Dt) " + Sig(se, 2)
	}
	t.field("Dt", dtText)
	t.warn(by["Dt"])

	if m := s.MonteCarlo; m != nil && (s.Temperature.Method != "monte-carlo" && s.Time.Method != "monte-carlo") {
		var mc string
		if s.SolveFor == "time" {
			mc = "median " + t.n().durationEstimate(m.Median, m.CI, s.Level)
		} else {
			mc = "median " + t.n().temperatureEstimate(m.Median, m.CI, s.Level, u)
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
	return numFmt{}.viewAdjust(v, ci, level, unit)
}

func (n numFmt) viewAdjust(v float64, ci fit.Interval, level float64, unit string) string {
	sign := ""
	if unit == "K" && v > 0 {
		sign = "+"
	}
	if !finite(ci.Lo) && !finite(ci.Hi) {
		s := sign + Sig(v, n.sig())
		if unit != "" {
			s += " " + unit
		}
		return s
	}
	s := sign + n.estimate(v, ci, level, unit)
	if unit != "" && finite(ci.Lo) && finite(ci.Hi) {
		s += " " + unit
	}
	return s
}
