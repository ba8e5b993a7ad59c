package report

import (
	"math"
	"strings"

	"github.com/fickfit/fickfit/arrhenius"
	"github.com/fickfit/fickfit/fit"
	"github.com/fickfit/fickfit/internal/phys"
)

// What a back-calculation or prediction rests on, written the same way in
// both views.

// viewFaraday converts an energy per mole to electronvolts per atom.
const viewFaraday = phys.Faraday

// viewQ writes an activation energy in kJ/mol and eV per atom, each with
// the digits its interval supports:
// "148.0 kJ/mol (1.534 eV), 95 % CI 141.2–154.8 kJ/mol (1.463–1.604 eV)".
// Without interval (both ends open) three significant digits.
func viewQ(q float64, ci fit.Interval, level float64) string { return numFmt{}.viewQ(q, ci, level) }

func (n numFmt) viewQ(q float64, ci fit.Interval, level float64) string {
	k, ivk := q/1e3, fit.Interval{Lo: ci.Lo / 1e3, Hi: ci.Hi / 1e3}
	e, ive := q/viewFaraday, fit.Interval{Lo: ci.Lo / viewFaraday, Hi: ci.Hi / viewFaraday}
	if !finite(ci.Lo) && !finite(ci.Hi) {
		return Sig(k, n.sig()) + " kJ/mol (" + Sig(e, n.sig()) + " eV)"
	}
	lk, le := n.lastDigit(k, ivk), n.lastDigit(e, ive)
	return Number(k, lk) + " kJ/mol (" + Number(e, le) + " eV), " + Level(level) + " CI " +
		IntervalAt(k, ivk, lk) + " kJ/mol (" + IntervalAt(e, ive, le) + " eV)"
}

// viewCalibrationCells are the calibration columns of back-calculations
// and predictions.
var viewCalibrationHeader = []string{"calibration_method", "calibration_source", "calibration_D0_m2_s", "calibration_Q_J_mol",
	"calibration_cov_lnD0_lnD0", "calibration_cov_lnD0_Q_J_mol", "calibration_cov_Q_Q_J2_mol2", "calibration_dof",
	"calibration_temperature_min_K", "calibration_temperature_max_K"}

func viewCalibrationCells(cal arrhenius.Calibration) []string {
	tmin, tmax := "", ""
	if cal.TMin > 0 {
		tmin = csvNumber(cal.TMin)
	}
	if cal.TMax > 0 {
		tmax = csvNumber(cal.TMax)
	}
	return []string{cal.Method, cal.Source, csvNumber(cal.D0()), csvNumber(cal.Q),
		csvNumber(cal.Cov[0][0]), csvNumber(cal.Cov[0][1]), csvNumber(cal.Cov[1][1]), viewInt(cal.DOF), tmin, tmax}
}

// viewPICells writes the prediction interval of a single part (two
// cells, empty when there is none).
func viewPICells(q *arrhenius.Quantity) []string {
	if q == nil || q.PI == nil {
		return []string{"", ""}
	}
	return []string{csvNumber(q.PI.Lo), csvNumber(q.PI.Hi)}
}

// viewQuantityCells writes value, ci_lo, ci_hi, given, ci_method.
func viewQuantityCells(q arrhenius.Quantity) []string {
	if q.Given {
		return []string{csvNumber(q.Value), "", "", "true", ""}
	}
	return []string{csvNumber(q.Value), csvNumber(q.CI.Lo), csvNumber(q.CI.Hi), "false", q.Method}
}

// viewCalibration writes what a back-calculation or prediction rests on.
func (t viewText) calibration(cal arrhenius.Calibration, ws []fit.Warning) {
	src := cal.Source
	if src == "" {
		src = cal.Method
	}
	t.field("calibration", src)
	u0, uq := math.Sqrt(cal.Cov[0][0]), math.Sqrt(cal.Cov[1][1])
	var parts []string
	if uq > 0 {
		q := cal.Q
		lk := t.n().lastDigit(q/1e3, fit.Interval{Lo: (q - uq) / 1e3, Hi: (q + uq) / 1e3})
		le := t.n().lastDigit(q/viewFaraday, fit.Interval{Lo: (q - uq) / viewFaraday, Hi: (q + uq) / viewFaraday})
		parts = append(parts, "Q "+Number(q/1e3, lk)+" kJ/mol ("+Number(q/viewFaraday, le)+" eV), u(Q) "+
			Number(uq/1e3, lk)+" kJ/mol")
	} else {
		parts = append(parts, "Q "+viewGiven(cal.Q/1e3)+" kJ/mol ("+Sig(cal.Q/viewFaraday, t.n().sig())+" eV)")
	}
	if u0 > 0 {
		parts = append(parts, "D0 "+Sig(cal.D0(), t.n().sig())+" m²/s, u(ln D0) "+Sig(u0, 2))
	} else {
		parts = append(parts, "D0 "+viewGiven(cal.D0())+" m²/s")
	}
	switch {
	case cal.NoInterval:
		parts = append(parts, "no interval (two temperatures)")
	case u0 > 0 && uq > 0:
		parts = append(parts, "corr(ln D0, Q) "+Number(cal.Cov[0][1]/(u0*uq), -4), viewQuantile(cal.DOF))
	default:
		parts = append(parts, "no uncertainty of its own")
	}
	if cal.TMin > 0 && cal.TMax > 0 {
		dec := 2
		if cal.Method == "reference" {
			dec = 0 // a table's range is an approximate phase field
		}
		parts = append(parts, "based on "+viewTempRange(cal.TMin, cal.TMax, t.o.TempUnit, dec))
	}
	writeParts(t.w, strings.Repeat(" ", viewLabel+2), parts, "; ", t.o.width())
	if cal.Spread != "" {
		writeWrapped(t.w, strings.Repeat(" ", viewLabel+2), Temps(cal.Spread, t.o.TempUnit), t.o.width())
	}
	t.warn(ws)
}
