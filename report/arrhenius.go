package report

import (
	"bufio"
	"fmt"
	"io"
	"math"
	"strings"

	"github.com/fickfit/fickfit/arrhenius"
)

// Arrhenius is the Document of Arrhenius lines: one line, or one line per
// group (fickfit arrhenius). Its JSON is the line's wire form
// (arrhenius.LineJSON) or {"by", "groups": […]}.
type Arrhenius struct {
	Report *arrhenius.Report
	// NotUsed are the inputs the lines were fitted without (--keep-going);
	// written as "not_used" (JSON), a not_used table (CSV) and a list (text).
	NotUsed []NotUsed
}

func (a Arrhenius) report() *arrhenius.Report {
	if a.Report == nil {
		return &arrhenius.Report{}
	}
	return a.Report
}

// WriteJSON writes the lines with "fickfit_version" first.
func (a Arrhenius) WriteJSON(w io.Writer) error {
	r := a.report()
	head := envelope{versionOr("")}
	if !r.Grouped() {
		return writeJSON(w, struct {
			envelope
			arrhenius.LineJSON
			NotUsed []NotUsed `json:"not_used,omitempty"`
		}{head, r.Lines[0].JSON(), a.NotUsed})
	}
	return writeJSON(w, struct {
		envelope
		By      string           `json:"by,omitempty"`
		Groups  []arrhenius.Line `json:"groups"`
		NotUsed []NotUsed        `json:"not_used,omitempty"`
	}{head, r.By, nonNil(r.Lines), a.NotUsed})
}

// WriteCSV writes the tables line, point and d_on_line.
func (a Arrhenius) WriteCSV(w io.Writer) error {
	return writeCSVTables(w, func(c *viewCSV) {
		viewReportCSV(c, a.report())
		viewNotUsedCSV(c, a.NotUsed)
	})
}

// WriteText writes each line for people, then the cautions of Arrhenius lines.
func (a Arrhenius) WriteText(w io.Writer, o TextOptions) error {
	return writeTextWithCautions(w, o, viewLineCautions, false, func(bw *bufio.Writer) {
		viewReportText(bw, a.report(), o)
		writeNotUsedText(bw, "Not used:", a.NotUsed, o.width())
	})
}

// viewLineCautions accompany every Arrhenius line.
var viewLineCautions = []string{
	"D0 and Q describe the measured temperature range only; outside it the line is an extrapolation that assumes no change of diffusion mechanism, phase or composition.",
	"Intervals cover the scatter of the D values about the line (and the temperature uncertainty where one was given), not bias of the measurement method, the hold times or the furnace temperatures.",
	"Verify by metallography (microstructure, microhardness traverse or chemical profile) before acting on a number.",
	"The applicable specifications decide acceptance; defer to local codes and to licensed engineering judgement.",
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
		"D_m2_s", "D_ci_lo_m2_s", "D_ci_hi_m2_s", "stderr_lnD", "D_line_m2_s", "residual_lnD", "weight", "standardized_residual",
		"leverage", "studentized_residual", "cooks_distance")
	for i := range r.Lines {
		l := &r.Lines[i]
		for _, p := range l.Points {
			ci := p.Interval(l.Level)
			c.add("point", l.Group, p.ID, p.Lot, p.Source, csvNumber(p.T), csvNumber(p.SigmaT),
				csvNumber(math.Exp(p.LnD)), csvNumber(ci.Lo), csvNumber(ci.Hi), csvNumber(math.Sqrt(p.VarLnD)),
				csvNumber(math.Exp(p.Fitted)), csvNumber(p.Residual), csvNumber(p.Weight), csvNumber(p.Residual*math.Sqrt(p.Weight)),
				csvNumber(p.Leverage), csvNumber(p.Studentized), csvNumber(p.Cook))
		}
	}
	c.table("d_on_line", "group", "temperature_K", "D_m2_s", "D_ci_lo_m2_s", "D_ci_hi_m2_s", "ci_level", "D_pi_lo_m2_s", "D_pi_hi_m2_s")
	for i := range r.Lines {
		l := &r.Lines[i]
		for _, T := range viewDAtTemperatures(l, Kelvin) {
			d, ci := l.DAt(T)
			_, pi := l.PredictAt(T)
			c.add("d_on_line", l.Group, csvNumber(T), csvNumber(d), csvNumber(ci.Lo), csvNumber(ci.Hi), csvNumber(l.Level),
				csvNumber(pi.Lo), csvNumber(pi.Hi))
		}
	}
}

var viewLineTargets = map[string]string{
	"two-temperatures":                 "Q",
	"scatter-exceeds-errors":           "fit",
	"scatter-not-scaled":               "fit",
	"temperature-uncertainty-ignored":  "budget",
	"effective-variance-not-converged": "budget",
	"q-unusual":                        "Q",
	"q-interval-below-zero":            "Q",
	"suspect-point":                    "points",
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

	t.field("D0", t.n().viewD(l.D0(), l.D0CI(), l.Level, "no interval: fewer than three temperatures"))
	q := t.n().viewQ(l.Q, l.QCI(), l.Level)
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
	tb := Table{Header: []string{"id", "T", "D (m²/s)", Level(l.Level) + " CI", "residual ln D", "in σ", "leverage", "studentized", "Cook's D"},
		Align: []Align{Left, Left, Right, Left, Right, Right, Right, Right, Right}, Indent: "  "}
	for _, p := range l.Points {
		d := math.Exp(p.LnD)
		ci := p.Interval(l.Level)
		last := t.n().lastDigit(d, ci)
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
		diag := func(v float64, last int) string {
			if !finite(v) {
				return ""
			}
			return Number(v, last)
		}
		tb.Add(p.ID, temp, Number(d, last), civ, Number(p.Residual, -3), z, diag(p.Leverage, -2), diag(p.Studentized, -1), diag(p.Cook, -2))
	}
	t.w.WriteString("\n")
	tb.WriteTo(t.w)
	t.warn(by["points"])

	// D on the line.
	ts := viewDAtTemperatures(l, u)
	if len(ts) > 0 {
		t.w.WriteString("\n")
		band := "confidence band of the mean line"
		if !l.HasCI {
			band = "no band: fewer than three temperatures"
		}
		if l.HasCI {
			band += "; a single new part: prediction interval"
		}
		t.line("  ", "D on the line ("+band+")")
		dt := Table{Header: []string{"T", "D (m²/s)", Level(l.Level) + " CI (mean line)", Level(l.Level) + " PI (single part)"}, Align: []Align{Left, Right, Left, Left}, Indent: "  "}
		for _, T := range ts {
			d, ci := l.DAt(T)
			_, pi := l.PredictAt(T)
			last := t.n().lastDigit(d, ci)
			civ, piv := "", ""
			if l.HasCI {
				civ = IntervalAt(d, ci, last)
			}
			if finite(pi.Lo) && finite(pi.Hi) {
				piv = IntervalAt(d, pi, last)
			}
			val := Number(d, last)
			if alt := t.n().dAlternative(d, ci); alt != "" {
				val += " (" + alt + ")"
			}
			dt.Add(Temperature(T, u), val, civ, piv)
		}
		dt.WriteTo(t.w)
	}
}
