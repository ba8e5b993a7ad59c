package report

import (
	"bufio"
	"io"
	"math"
	"strconv"

	"github.com/fickfit/fickfit/arrhenius"
	"github.com/fickfit/fickfit/fit"
)

// Predictions is the Document of forward predictions (fickfit predict):
// profiles, case depths and times to a case depth. Its JSON is
// {"predictions": […]}; its cautions are written in the text form even
// with TextOptions.NoCautions.
type Predictions []*arrhenius.Prediction

// WriteJSON writes the predictions.
func (p Predictions) WriteJSON(w io.Writer) error {
	return writeJSON(w, struct {
		envelope
		Predictions []*arrhenius.Prediction `json:"predictions"`
	}{envelope{versionOr("")}, nonNilPtrs(p)})
}

// WriteCSV writes the tables prediction, profile and caution.
func (p Predictions) WriteCSV(w io.Writer) error {
	return writeCSVTables(w, func(c *viewCSV) { viewPredictionsCSV(c, nonNilPtrs(p)) })
}

// WriteText writes each prediction for people, then the cautions (always).
func (p Predictions) WriteText(w io.Writer, o TextOptions) error {
	ps := nonNilPtrs(p)
	return writeTextWithCautions(w, o, viewPredictionCautions(ps), true, func(bw *bufio.Writer) { viewPredictionsText(bw, ps, o) })
}

func viewPredictionCautions(ps []*arrhenius.Prediction) []string {
	var lists [][]string
	for _, p := range ps {
		lists = append(lists, p.Cautions)
	}
	return viewUnion(lists)
}

func viewPredictionsCSV(c *viewCSV, ps []*arrhenius.Prediction) {
	h := []string{"prediction", "kind", "temperature_K", "time_s", "time_ci_lo_s", "time_ci_hi_s", "time_given", "time_ci_method",
		"history", "Dt_m2", "Dt_ci_lo_m2", "Dt_ci_hi_m2", "Dt_given", "Cs", "C0", "threshold",
		"case_depth_m", "case_depth_ci_lo_m", "case_depth_ci_hi_m", "case_depth_given", "ci_level",
		"time_pi_lo_s", "time_pi_hi_s", "Dt_pi_lo_m2", "Dt_pi_hi_m2", "case_depth_pi_lo_m", "case_depth_pi_hi_m"}
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
		row = append(row, viewPICells(&p.Time)...)
		row = append(row, viewPICells(&p.Dt)...)
		row = append(row, viewPICells(p.CaseDepth)...)
		row = append(row, viewCalibrationCells(p.Calibration)...)
		c.add("prediction", append(row, viewCodes(p.Warnings))...)
	}
	c.table("profile", "prediction", "depth_m", "value", "band_lo", "band_hi", "part_lo", "part_hi")
	for i, p := range ps {
		for _, pp := range p.Profile {
			c.add("profile", viewInt(i+1), csvNumber(pp.Depth), csvNumber(pp.Value), csvNumber(pp.Lo), csvNumber(pp.Hi),
				csvNumber(pp.PartLo), csvNumber(pp.PartHi))
		}
	}
	viewCautionsCSV(c, viewPredictionCautions(ps))
}

var viewPredictionTargets = map[string]string{
	"extrapolation":                   "hold",
	"no-interval":                     "Dt",
	"calibration-without-uncertainty": "calibration",
	"mean-line-band":                  "Dt",
	"reference-literature":            "calibration",
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
	if p.Calibration.Method == "reference" {
		t.line("", "  (from literature values, not this laboratory's calibration)")
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
			tm = t.n().viewDurationPlain(q.Value) + ", no interval"
		case viewZeroWidth(q.CI):
			tm = t.n().viewDurationPlain(q.Value) + ", " + viewZeroWidthText
		default:
			tm = t.n().durationEstimate(q.Value, q.CI, p.Level) + "; " + viewCIMethod(q.Method, nil)
		}
		t.field("hold time", tm)
		if pi := q.PI; pi != nil {
			t.field("single part", Level(p.Level)+" prediction interval "+viewDurationInterval(q.Value, *pi))
		}
		t.warn(by["Dt"])
		t.field("Dt needed", t.n().general(p.Dt.Value)+" m² (√Dt "+Depth(math.Sqrt(p.Dt.Value))+")")
	} else {
		d := p.Dt
		sq := " (√Dt " + Depth(math.Sqrt(d.Value)) + ")"
		var s string
		if !finite(d.CI.Lo) && !finite(d.CI.Hi) {
			s = t.n().general(d.Value) + " m²" + sq + ", no band"
		} else if viewZeroWidth(d.CI) {
			s = t.n().general(d.Value) + " m²" + sq + ", band of zero width"
		} else {
			last := t.n().lastDigit(d.Value, d.CI)
			s = Number(d.Value, last) + " m²" + sq + ", " + Level(p.Level) + " CI " + IntervalAt(d.Value, d.CI, last) + " m² (mean line)"
			if pi := d.PI; pi != nil {
				s += "; single part " + Level(p.Level) + " PI " + IntervalAt(d.Value, *pi, last) + " m²"
			}
		}
		t.field("Dt", s)
		t.warn(by["Dt"])
	}
	t.field("levels", "surface Cs "+viewGiven(p.Cs)+", base C0 "+viewGiven(p.C0)+" (in the unit they were given in); erf solution, semi-infinite body")
	if cd := p.CaseDepth; cd != nil && p.Kind != "time-to-depth" {
		t.field("case depth", t.n().viewLength(cd.Value, cd.CI, p.Level)+" at level "+viewGiven(p.Threshold)+" (mean line)")
		if pi := cd.PI; pi != nil {
			t.field("single part", "case depth "+Level(p.Level)+" prediction interval "+viewLengthInterval(cd.Value, *pi))
		}
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
	last := SigDigits(rng, t.n().sig())
	if hmax > 0 {
		last = t.n().lastDigit(rng, fit.Interval{Lo: rng - hmax, Hi: rng + hmax})
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
	tb := Table{Header: []string{"depth (" + unit + ")", "C", Level(p.Level) + " band (mean line)", Level(p.Level) + " single part"}, Align: []Align{Right, Right, Left, Left}, Indent: "  "}
	for _, pp := range p.Profile {
		band, part := "", ""
		if finite(pp.Lo) && finite(pp.Hi) {
			band = IntervalAt(pp.Value, fit.Interval{Lo: pp.Lo, Hi: pp.Hi}, last)
		}
		if finite(pp.PartLo) && finite(pp.PartHi) {
			part = IntervalAt(pp.Value, fit.Interval{Lo: pp.PartLo, Hi: pp.PartHi}, last)
		}
		tb.Add(strconv.FormatFloat(roundAt(pp.Depth/f, -dec), 'f', dec, 64), Number(pp.Value, last), band, part)
	}
	tb.WriteTo(t.w)
}
