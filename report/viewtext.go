package report

import (
	"bufio"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"github.com/fickfit/fickfit/arrhenius"
	"github.com/fickfit/fickfit/fit"
	"github.com/fickfit/fickfit/internal/tempfmt"
)

// Helpers shared by the text and CSV views of the decision results
// (arrhenius, backcalc, predict, compare, reference, matano).

// Temps renders the temperature marks of a sentence written by the
// science packages (internal/tempfmt) in the reader's unit, as
// Temperature writes them: "925 °C (1198.15 K)".
func Temps(s string, u TempUnit) string {
	return tempfmt.Render(s, func(k float64) string { return Temperature(k, u) })
}

// warnText is a warning's message for people, in the reader's unit.
func warnText(w fit.Warning, u TempUnit) string { return Temps(w.Message, u) }

// viewLabel is the width of the label column of the text views.
const viewLabel = 15

func viewUnion(lists [][]string) []string {
	seen := map[string]bool{}
	out := []string{}
	for _, l := range lists {
		for _, c := range l {
			if !seen[c] {
				seen[c] = true
				out = append(out, c)
			}
		}
	}
	if len(out) == 0 {
		out = append(out, arrhenius.Cautions...)
	}
	return out
}

// viewCSV writes tables into one CSV stream: each row starts with its
// table's name, tables are separated by an empty line.
type viewCSV struct {
	w      io.Writer
	cw     *csvWriter
	tables int
	err    error
}

func newViewCSV(w io.Writer) *viewCSV { return &viewCSV{w: w, cw: newCSVWriter(w)} }

// table starts a table with its header.
func (c *viewCSV) table(name string, header ...string) {
	if c.err != nil {
		return
	}
	if c.tables > 0 {
		c.cw.Flush()
		if c.err = c.cw.Error(); c.err != nil {
			return
		}
		_, c.err = io.WriteString(c.w, "\n")
	}
	c.tables++
	c.row(append([]string{"table"}, header...)...)
}

// add writes one row of the table name.
func (c *viewCSV) add(name string, cells ...string) { c.row(append([]string{name}, cells...)...) }

func (c *viewCSV) row(cells ...string) {
	if c.err == nil {
		c.err = c.cw.Write(cells)
	}
}

func (c *viewCSV) close() error {
	if c.err != nil {
		return c.err
	}
	c.cw.Flush()
	return c.cw.Error()
}

func viewBool(b bool) string { return strconv.FormatBool(b) }

func viewInt(i int) string { return strconv.Itoa(i) }

// viewCodes joins warning codes with ";".
func viewCodes(ws []fit.Warning) string {
	codes := make([]string, len(ws))
	for i, w := range ws {
		codes[i] = w.Code
	}
	return strings.Join(codes, ";")
}

func viewCautionsCSV(c *viewCSV, cautions []string) {
	c.table("caution", "n", "text")
	for i, t := range cautions {
		c.add("caution", viewInt(i+1), t)
	}
}

// viewText carries the writer and options of one text view.
type viewText struct {
	w *bufio.Writer
	o TextOptions
}

// n is the number formatter of the view's options.
func (t viewText) n() numFmt { return t.o.num() }

// field writes "  label        text", the text wrapped under itself.
func (t viewText) field(label, text string) {
	pad := viewLabel - len([]rune(label))
	if pad < 1 {
		pad = 1
	}
	writeWrapped(t.w, "  "+label+strings.Repeat(" ", pad), text, t.o.width())
}

// warn writes warnings under the line they concern.
func (t viewText) warn(ws []fit.Warning) {
	for _, w := range ws {
		writeWrapped(t.w, "      ! ", warnText(w, t.o.TempUnit), t.o.width())
	}
}

// line writes a heading or free text, wrapped.
func (t viewText) line(prefix, text string) { writeWrapped(t.w, prefix, text, t.o.width()) }

// viewByCode sorts warnings into the targets named by their codes; the
// rest go to "".
func viewByCode(ws []fit.Warning, target map[string]string) map[string][]fit.Warning {
	out := map[string][]fit.Warning{}
	for _, w := range ws {
		out[target[w.Code]] = append(out[target[w.Code]], w)
	}
	return out
}

// viewEach writes each item with write, a blank line between items, or the
// empty sentence when there is none.
func viewEach[T any](w *bufio.Writer, o TextOptions, items []T, empty string, write func(viewText, T)) {
	if len(items) == 0 {
		w.WriteString(empty + "\n")
		return
	}
	t := viewText{w, o}
	for i, it := range items {
		if i > 0 {
			w.WriteString("\n")
		}
		write(t, it)
	}
}

// viewD writes a diffusion coefficient (or D0) with its interval and the
// unit that reads best beside m²/s: "2.3 × 10⁻⁵ m²/s (0.23 cm²/s), 95 % CI
// 1.1–4.8 × 10⁻⁵ m²/s". none is said instead of an interval when both
// ends are open.
func viewD(d float64, ci fit.Interval, level float64, none string) string {
	return numFmt{}.viewD(d, ci, level, none)
}

func (n numFmt) viewD(d float64, ci fit.Interval, level float64, none string) string {
	open := !finite(ci.Lo) && !finite(ci.Hi)
	last := n.lastDigit(d, ci)
	s := Number(d, last) + " m²/s"
	if alt := n.dAlternative(d, ci); alt != "" {
		s += " (" + alt + ")"
	}
	if open {
		if none != "" {
			s += " (" + none + ")"
		}
		return s
	}
	return s + ", " + Level(level) + " CI " + IntervalAt(d, ci, last) + " m²/s"
}

// viewTempRange writes "850–950 °C (1123.15–1223.15 K)", or kelvin alone;
// the user's unit with at most dec decimals, kelvin with at most two.
func viewTempRange(lo, hi float64, u TempUnit, dec int) string {
	rng := func(a, b float64, dec int) string {
		sep := "–"
		if a < 0 || b < 0 {
			sep = " to "
		}
		return trimmed(a, dec) + sep + trimmed(b, dec)
	}
	if u == Kelvin {
		return rng(lo, hi, 2) + " K"
	}
	return rng(u.FromKelvin(lo), u.FromKelvin(hi), dec) + " " + u.Symbol() + " (" + rng(lo, hi, 2) + " K)"
}

// viewTempPlain writes a solved temperature without interval to a whole
// degree: "931 °C (1204 K)".
func viewTempPlain(k float64, u TempUnit) string {
	if u == Kelvin {
		return trimmed(k, 0) + " K"
	}
	return trimmed(u.FromKelvin(k), 0) + " " + u.Symbol() + " (" + trimmed(k, 0) + " K)"
}

// viewDurationPlain writes a solved time without interval to three (n's)
// significant digits: "6.23 h".
func viewDurationPlain(s float64) string { return numFmt{}.viewDurationPlain(s) }

func (n numFmt) viewDurationPlain(s float64) string {
	f, unit := 3600.0, "h"
	switch {
	case math.Abs(s) < 120:
		f, unit = 1, "s"
	case math.Abs(s) < 7200:
		f, unit = 60, "min"
	}
	return Sig(s/f, n.sig()) + " " + unit
}

// viewLength writes a length (m) in µm or mm with its interval:
// "0.85 mm, 95 % CI 0.80–0.90 mm".
func viewLength(m float64, ci fit.Interval, level float64) string {
	return numFmt{}.viewLength(m, ci, level)
}

func (n numFmt) viewLength(m float64, ci fit.Interval, level float64) string {
	ref := math.Abs(m)
	if finite(ci.Hi) {
		ref = math.Max(ref, math.Abs(ci.Hi))
	}
	f, unit := DepthScale(ref)
	v, iv := m/f, fit.Interval{Lo: ci.Lo / f, Hi: ci.Hi / f}
	if !finite(ci.Lo) && !finite(ci.Hi) {
		return Sig(v, n.sig()) + " " + unit
	}
	out := n.estimate(v, iv, level, unit)
	if finite(iv.Lo) && finite(iv.Hi) && !degenerate(v, iv) {
		out += " " + unit
	}
	return out
}

// viewLengthInterval writes an interval of a length (m) in the unit of
// its value, "0.70–1.02 mm", with the digits the interval supports.
func viewLengthInterval(m float64, iv fit.Interval) string {
	f, unit := DepthScale(math.Max(math.Abs(m), math.Abs(iv.Hi)))
	v, s := m/f, fit.Interval{Lo: iv.Lo / f, Hi: iv.Hi / f}
	return IntervalAt(v, s, LastDigit(v, s)) + " " + unit
}

// viewDurationInterval writes an interval of a time (s) in the unit of
// its value, "5.8–6.7 h".
func viewDurationInterval(t float64, iv fit.Interval) string {
	f, unit := 3600.0, "h"
	switch {
	case math.Abs(t) < 120:
		f, unit = 1, "s"
	case math.Abs(t) < 7200:
		f, unit = 60, "min"
	}
	v, s := t/f, fit.Interval{Lo: iv.Lo / f, Hi: iv.Hi / f}
	return IntervalAt(v, s, LastDigit(v, s)) + " " + unit
}

// viewGiven writes a number given by the user (or a table) with the
// fewest significant digits, at most six, that give it back to a relative
// 10⁻¹² (so that 2.3e-5 recovered through exp(ln 2.3e-5) is still "2.3").
func viewGiven(v float64) string {
	if !finite(v) || v == 0 {
		return Number(v, 0)
	}
	for d := 1; d < maxDigits; d++ {
		back, err := strconv.ParseFloat(strconv.FormatFloat(v, 'e', d-1, 64), 64)
		if err == nil && math.Abs(back-v) <= 1e-12*math.Abs(v) {
			return Sig(v, d)
		}
	}
	return Sig(v, maxDigits)
}

// viewZeroWidth tells an interval of zero width: a calibration and a
// part without uncertainty.
func viewZeroWidth(iv fit.Interval) bool { return finite(iv.Lo) && iv.Lo == iv.Hi }

const viewZeroWidthText = "interval of zero width (no uncertainty was given)"

// viewP writes a p-value: "< 0.001" or two significant digits.
func viewP(p float64) string {
	if !finite(p) {
		return "n/a"
	}
	if p < 0.001 {
		return "< 0.001"
	}
	return Sig(p, 2)
}

// viewCIMethod says how an interval was obtained.
func viewCIMethod(m string, mc *arrhenius.MonteCarlo) string {
	switch m {
	case "fieller":
		return "interval by Fieller's theorem"
	case "wald-log":
		return "Wald interval on the log scale"
	case "test-inversion":
		return "interval by test inversion"
	case "monte-carlo":
		if mc != nil {
			return fmt.Sprintf("Monte Carlo percentile interval (%d draws, seed %d)", mc.Draws, mc.Seed)
		}
		return "Monte Carlo percentile interval"
	}
	return m
}

// viewQuantile says which quantile the intervals of a calibration use.
func viewQuantile(dof int) string {
	if dof > 0 {
		return "Student t on " + viewInt(dof) + " dof"
	}
	return "normal quantile (covariance taken as known)"
}
