package report

import (
	"bufio"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
	"unicode/utf8"

	"github.com/fickfit/fickfit/fit"
)

// TextOptions control the text views. The zero value writes temperatures
// in °C with kelvin beside, numbers without an interval to three
// significant digits, wraps at 100 columns and ends with the cautions.
type TextOptions struct {
	// TempUnit is the user's temperature unit; "" means °C.
	TempUnit TempUnit
	// Digits is the number of significant digits of a number written
	// without an interval (a value with an interval keeps the digits the
	// interval supports); 0 means DefaultDigits.
	Digits int
	// Width is the column at which warnings and cautions wrap; 0 means 100.
	Width int
	// NoCautions leaves the cautions out (for a caller that writes them once
	// at the end of a longer output).
	NoCautions bool
}

// num is the number formatter of the options' digits.
func (o TextOptions) num() numFmt { return numFmt{o.Digits} }

func (o TextOptions) width() int {
	if o.Width <= 0 {
		return 100
	}
	return o.Width
}

// paramText is one parameter written for people.
type paramText struct {
	Name, Value, SE, CI string
}

// formatParam writes a parameter: value with unit (D also in µm²/s or
// cm²/s), standard error with two significant digits, interval with the
// value's digits; lengths in µm or mm.
func formatParam(e fit.Estimate, n numFmt) paramText {
	pt := paramText{Name: e.Name}
	v, iv, se, unit := e.Value, e.CI, e.StdErr, e.Unit
	switch unit {
	case "m", "m2":
		if unit == "m" {
			ref := math.Abs(v)
			if finite(iv.Lo) {
				ref = math.Max(ref, math.Abs(iv.Lo))
			}
			if finite(iv.Hi) {
				ref = math.Max(ref, math.Abs(iv.Hi))
			}
			f, u := DepthScale(ref)
			v, se, iv, unit = v/f, se/f, fit.Interval{Lo: iv.Lo / f, Hi: iv.Hi / f}, u
		}
	}
	last := n.paramLast(v, iv, e.Fixed)
	pt.Value = Number(v, last)
	if u := PrettyUnit(unit); u != "" {
		pt.Value += " " + u
	}
	if unit == "m2/s" {
		if alt := n.dAlternative(v, iv); alt != "" {
			pt.Value += " (" + alt + ")"
		}
	}
	if e.Fixed {
		pt.SE, pt.CI = "", "fixed"
		return pt
	}
	if se > 0 && finite(se) {
		pt.SE = Sig(se, 2)
	}
	pt.CI = IntervalAt(v, iv, last)
	return pt
}

// paramLast is the decimal place of the last digit shown of a parameter's
// value: the interval's (LastDigit), or DefaultDigits significant digits
// for a fixed parameter (0 for a fixed 0). The text views, the HTML report
// and the workbook's number formats all take it from here.
func paramLast(v float64, iv fit.Interval, fixed bool) int { return numFmt{}.paramLast(v, iv, fixed) }

// paramLast is paramLast with n's digits for a value without an interval.
func (n numFmt) paramLast(v float64, iv fit.Interval, fixed bool) int {
	if !fixed {
		return n.lastDigit(v, iv)
	}
	if v == 0 {
		return 0
	}
	return SigDigits(v, n.sig())
}

// statsParts lists the statistics of a fit, each "name value".
func statsParts(r *fit.Result) []string {
	s := r.Stats
	weighted := finite(s.Chi2P)
	vu := r.ValueUnit
	rssUnit, rmseUnit := "", ""
	if !weighted && vu != "" {
		rssUnit, rmseUnit = " ("+vu+")²", " "+vu
	}
	parts := []string{
		"n " + strconv.Itoa(s.N),
		"dof " + strconv.Itoa(s.DOF),
		"RSS " + Sig(s.RSS, 2) + rssUnit,
		"RMSE " + Sig(s.RMSE, 2) + rmseUnit,
		"R² " + r2Text(s.R2),
		"AICc " + Number(s.AICc, -1),
		"χ²red " + Sig(s.Chi2Red, 2),
	}
	if weighted {
		parts = append(parts, "P(χ²) "+Sig(s.Chi2P, 2))
	}
	parts = append(parts, "runs p "+Sig(s.RunsP, 2), "cond "+Sig(s.Cond, 2), covarianceText(r.Covariance))
	return parts
}

// r2Text writes R² with four decimals (more only say how close to 1).
func r2Text(v float64) string { return Number(v, -4) }

// covarianceText says how the covariance was scaled.
func covarianceText(c fit.Covariance) string {
	if c == fit.CovAbsolute {
		return "covariance absolute (σ taken as known)"
	}
	return "covariance scaled by χ²red"
}

// conditionsText writes "880 °C (1153.15 K), 5 h".
func conditionsText(r *fit.Result, u TempUnit) string {
	var parts []string
	if r.Temperature > 0 {
		t := Temperature(r.Temperature, u)
		if r.TemperatureSigma > 0 {
			t += " ± " + trimmed(r.TemperatureSigma, 2) + " K"
		}
		parts = append(parts, t)
	} else {
		parts = append(parts, "temperature not given")
	}
	if r.Time > 0 {
		parts = append(parts, Duration(r.Time))
	} else {
		parts = append(parts, "time not given")
	}
	if r.Thickness > 0 {
		parts = append(parts, Depth(r.Thickness)+" thick")
	}
	return strings.Join(parts, ", ")
}

// WriteText writes one compact block per profile, then the profiles that
// gave no fit, then the cautions.
func (f Fits) WriteText(w io.Writer, o TextOptions) error {
	bw := bufio.NewWriter(w)
	for i, r := range f.Results {
		if i > 0 {
			bw.WriteString("\n")
		}
		writeResultText(bw, r, o)
	}
	if len(f.Failed) > 0 {
		if len(f.Results) > 0 {
			bw.WriteString("\n")
		}
		bw.WriteString("Not fitted:\n")
		for _, fl := range f.Failed {
			writeWrapped(bw, "  "+fl.ID+": ", fl.Error, o.width())
		}
	}
	writeNotUsedText(bw, "Not read:", f.NotRead, o.width())
	if !o.NoCautions {
		bw.WriteString("\n")
		writeCautions(bw, fit.Cautions, o.width())
	}
	return bw.Flush()
}

// writeCautions writes a numbered list of cautions.
func writeCautions(w *bufio.Writer, cautions []string, width int) {
	w.WriteString("Cautions:\n")
	for i, c := range cautions {
		writeWrapped(w, "  "+strconv.Itoa(i+1)+". ", c, width)
	}
}

// writeResultText writes one profile's block.
func writeResultText(w *bufio.Writer, r *fit.Result, o TextOptions) {
	head := r.ID
	if r.Lot != "" {
		head += "   lot " + r.Lot
	}
	if r.Source != "" && r.Source != r.ID {
		head += "   " + r.Source
	}
	w.WriteString(head + "\n")
	writeParts(w, "  ", []string{conditionsText(r, o.TempUnit), ModelDescription(r.Model),
		Level(r.CILevel) + " CI by " + CIMethodDescription(r.CIMethod)}, " · ", o.width())
	if !r.Converged {
		w.WriteString("  the fit did not converge: no numbers are reported\n")
	}
	byTarget := map[string][]fit.Warning{}
	for _, wn := range r.Warnings {
		t := warningTarget(r, wn)
		byTarget[t] = append(byTarget[t], wn)
	}
	tb := Table{Header: []string{"", "estimate", "SE", Level(r.CILevel) + " CI"}, Indent: "  ", Align: []Align{Left, Left, Right, Left}}
	for _, e := range r.Params {
		p := formatParam(e, o.num())
		if e.Name == "D" && r.Time == 0 {
			p.Name = "Dt" // the time is unknown: the fitted quantity is Dt in m²
		}
		tb.Add(p.Name, p.Value, p.SE, p.CI)
	}
	lines := strings.Split(strings.TrimRight(tb.String(), "\n"), "\n")
	// lines[0] header, lines[1] rule, then one per parameter.
	for i, l := range lines {
		w.WriteString(l + "\n")
		if k := i - 2; k >= 0 && k < len(r.Params) {
			for _, wn := range byTarget[r.Params[k].Name] {
				writeWrapped(w, "      ! ", warnText(wn, o.TempUnit), o.width())
			}
		}
	}
	writeParts(w, "  ", statsParts(r), " · ", o.width())
	for _, wn := range byTarget["stats"] {
		writeWrapped(w, "      ! ", warnText(wn, o.TempUnit), o.width())
	}
	for _, wn := range byTarget[""] {
		writeWrapped(w, "  ! ", warnText(wn, o.TempUnit), o.width())
	}
	for _, e := range []*fit.DepthEstimate{r.CaseDepth, r.DecarbDepth} {
		if e != nil {
			writeDepthText(w, r, e, o)
		}
	}
	if r.Selection != nil {
		writeSelectionText(w, r.Selection, o)
	}
}

// writeDepthText writes a case or decarburization depth: from the fitted
// curve with its interval, and from the points.
func writeDepthText(w *bufio.Writer, r *fit.Result, e *fit.DepthEstimate, o TextOptions) {
	head, notes := depthSentence(r, e, o.num())
	writeWrapped(w, "  ", head, o.width())
	for _, n := range notes {
		writeWrapped(w, "      · ", n, o.width())
	}
}

// depthSentence says a case or decarburization depth in one sentence —
// the criterion as given and the level it means, the depth from the fitted
// curve with its interval, and from the points — and returns the notes
// that go with it (those not already among the profile's warnings).
func depthSentence(r *fit.Result, e *fit.DepthEstimate, n numFmt) (string, []string) {
	name := "case depth"
	if e.Kind == "decarburization" {
		name = "decarburization depth"
	}
	fitted := "not reached by the fitted curve"
	if finite(e.Depth) {
		fitted = n.depthInterval(e.Depth, e.CI, e.CILevel) + " from the fitted curve"
	}
	data := "not reached by the measured points"
	if finite(e.FromData) {
		data = Depth(e.FromData) + " from the measured points"
	}
	level := ""
	if finite(e.Level) {
		level = fmt.Sprintf(" (level %s %s)", n.general(e.Level), e.Unit)
	}
	said := map[string]bool{}
	for _, wn := range r.Warnings {
		said[wn.Message] = true
	}
	var notes []string
	for _, note := range e.Notes {
		if !said[note] { // the proxy note is already among the warnings
			notes = append(notes, note)
		}
	}
	return fmt.Sprintf("%s at %s%s: %s; %s.", name, e.Threshold, level, fitted, data), notes
}

// depthShort writes a depth with its interval for a table cell:
// "0.82 mm (0.79–0.85)", "not reached".
func depthShort(e *fit.DepthEstimate) string {
	if e == nil {
		return ""
	}
	if !finite(e.Depth) {
		return "not reached"
	}
	f, unit := DepthScale(math.Max(e.Depth, e.CI.Hi))
	v, iv := e.Depth/f, fit.Interval{Lo: e.CI.Lo / f, Hi: e.CI.Hi / f}
	last := LastDigit(v, iv)
	s := Number(v, last) + " " + unit
	if finite(iv.Lo) || finite(iv.Hi) {
		s += " (" + IntervalAt(v, iv, last) + ")"
	}
	return s
}

// DepthInterval writes a depth with its interval in one unit ("0.82 mm,
// 95 % CI 0.79–0.85 mm"); open ends are said in words.
func DepthInterval(d float64, ci fit.Interval, level float64) string {
	return numFmt{}.depthInterval(d, ci, level)
}

func (n numFmt) depthInterval(d float64, ci fit.Interval, level float64) string {
	f, unit := DepthScale(d)
	scaled := fit.Interval{Lo: ci.Lo / f, Hi: ci.Hi / f}
	return n.estimate(d/f, scaled, level, unit)
}

// writeSelectionText writes the model comparison of --model auto.
func writeSelectionText(w *bufio.Writer, s *fit.Selection, o TextOptions) {
	var parts []string
	for _, c := range s.Candidates {
		if !c.Fitted {
			note := "not fitted"
			if c.Note != "" {
				note += ": " + c.Note
			}
			parts = append(parts, fmt.Sprintf("%s %s", c.Model, note))
			continue
		}
		parts = append(parts, fmt.Sprintf("%s ΔAICc %s (weight %s)", c.Model, Number(c.DeltaAICc, -1), Number(c.Weight, -2)))
	}
	writeWrapped(w, "  ", fmt.Sprintf("model chosen by %s: %s. Candidates: %s.", s.Criterion, s.Chosen, strings.Join(parts, "; ")), o.width())
	for _, t := range s.Tests {
		writeWrapped(w, "      · ", fmt.Sprintf("F-test %s inside %s: F = %s on (%d, %d) dof, p = %s. %s", t.Reduced, t.Full, Sig(t.F, 3), t.DF1, t.DF2, pText(t.P), t.Note), o.width())
	}
	for _, n := range s.Notes {
		writeWrapped(w, "      · ", n, o.width())
	}
}

func pText(p float64) string {
	if !finite(p) {
		return "not defined"
	}
	if p < 0.001 {
		return "< 0.001"
	}
	return Sig(p, 2)
}

// writeWrapped writes prefix+text wrapped at width, continuation lines
// indented under the text.
func writeWrapped(w *bufio.Writer, prefix, text string, width int) {
	indent := strings.Repeat(" ", utf8.RuneCountInString(prefix))
	line := prefix
	n := utf8.RuneCountInString(prefix)
	first := true
	for _, word := range strings.Fields(text) {
		wl := utf8.RuneCountInString(word)
		if !first && n+1+wl > width {
			w.WriteString(line + "\n")
			line, n, first = indent, len(indent), true
		}
		if !first {
			line += " "
			n++
		}
		line += word
		n += wl
		first = false
	}
	w.WriteString(line + "\n")
}

// writeParts writes parts joined by sep, breaking lines only between parts.
func writeParts(w *bufio.Writer, prefix string, parts []string, sep string, width int) {
	indent := strings.Repeat(" ", utf8.RuneCountInString(prefix))
	line := prefix
	n := utf8.RuneCountInString(prefix)
	for i, p := range parts {
		pl := utf8.RuneCountInString(p)
		switch {
		case i == 0:
		case n+utf8.RuneCountInString(sep)+pl > width:
			w.WriteString(strings.TrimRight(line+sep, " ") + "\n")
			line, n = indent, len(indent)
		default:
			line += sep
			n += utf8.RuneCountInString(sep)
		}
		line += p
		n += pl
	}
	w.WriteString(line + "\n")
}
