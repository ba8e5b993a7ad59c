package profile

import (
	"fmt"
	"io"
	"maps"
	"math"
	"os"
	"sort"
	"strings"
)

// Calibration converts hardness to concentration and back from a measured
// table of (hardness, concentration) pairs, by the monotone cubic
// interpolant of Fritsch and Carlson (1980; see Monotone). It never
// extrapolates: values outside the calibrated range are errors of kind ErrRange.
type Calibration struct {
	Source string
	// Scale is the normalised hardness scale of the table, e.g. "HV0.5".
	Scale string
	// HardnessName and ConcentrationName are the headers as written.
	HardnessName, ConcentrationName string
	// Quantity and Unit describe the concentration column ("C", "wt%").
	Quantity, Unit string
	// Hardness and Concentration hold the table sorted by hardness;
	// Line holds the source line of each pair.
	Hardness, Concentration []float64
	Line                    []int

	// Margin is how far (in the hardness scale) a reading may lie beyond
	// an end of the calibrated range and still be used, clamped to the end
	// value (Apply); 0 means DefaultMarginFraction of the range.
	Margin float64

	f *Monotone // hardness → concentration
}

// DefaultMarginFraction is the default clamping margin of Apply, as a
// fraction of the calibrated hardness range: the scatter of single
// microhardness readings in a homogeneous core is of the order of a few
// per cent of the hardness (common practice, no source), so a reading
// just past an end is ordinary scatter, not a different material.
const DefaultMarginFraction = 0.05

// margin is the clamping margin in the hardness scale.
func (c *Calibration) margin() float64 {
	if c.Margin > 0 {
		return c.Margin
	}
	lo, hi := c.f.Domain()
	return DefaultMarginFraction * (hi - lo)
}

// SetMargin sets the clamping margin from "10HV", "10" (in the
// calibration's scale) or "5%" (of the calibrated range); "" keeps the
// default.
func (c *Calibration) SetMargin(s string) error {
	t := strings.TrimSpace(s)
	if t == "" {
		return nil
	}
	lo, hi := c.f.Domain()
	if p, ok := strings.CutSuffix(t, "%"); ok {
		v, err := parseNumber(p, true)
		if err != nil || v < 0 || v > 100 {
			return errorf(ErrValue, "calibration margin %s: give a percentage between 0 and 100 of the calibrated range", quote(s))
		}
		c.Margin = v / 100 * (hi - lo)
		if c.Margin == 0 {
			c.Margin = math.SmallestNonzeroFloat64 // 0 %: no clamping at all
		}
		return nil
	}
	n := numberPrefix(t)
	v, err := parseNumber(t[:n], true)
	if n == 0 || err != nil || v < 0 {
		return errorf(ErrValue, "calibration margin %s: give a hardness such as 10HV or a share of the range such as 5%%", quote(s))
	}
	if unit := strings.TrimSpace(t[n:]); unit != "" && !sameScale(unit, c.Scale) && !strings.EqualFold(unit, c.Scale) {
		return errorf(ErrUnit, "calibration margin %s is not in the calibration's scale %s", quote(s), c.Scale)
	}
	c.Margin = v
	if c.Margin == 0 {
		c.Margin = math.SmallestNonzeroFloat64
	}
	return nil
}

// ReadCalibration reads a calibration table from a CSV file (opened
// read-only); see ReadCalibrationCSV for the format.
func ReadCalibration(path string) (*Calibration, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, openError(path, err)
	}
	defer f.Close()
	return ReadCalibrationCSV(f, path)
}

// ReadCalibrationCSV reads a calibration table: optional "# key: value"
// lines, a header with exactly two columns, one naming a hardness scale
// (HV, HV0.5, HK, HRC, hardness_HV…) and one the concentration (C_wt%…),
// then one pair per row, in any order. At least 2 pairs; hardness values
// distinct and positive; concentration strictly monotone in hardness.
// Every error is an *Error naming the file and line.
func ReadCalibrationCSV(r io.Reader, name string) (*Calibration, error) {
	tr, err := openText(r, name)
	if err != nil {
		return nil, err
	}
	c := &Calibration{Source: name}
	hi, ci, err := c.columns(tr)
	if err != nil {
		return nil, err
	}
	if err := c.readRows(tr, hi, ci); err != nil {
		return nil, err
	}
	if err := c.check(tr.org, tr.headerLine); err != nil {
		return nil, err
	}
	c.f, err = NewMonotone(c.Hardness, c.Concentration)
	if err != nil {
		return nil, tr.org.errAt(0, -1, "", err, "check the table")
	}
	return c, nil
}

// columns finds the hardness and concentration columns in the header.
func (c *Calibration) columns(tr *textReader) (hi, ci int, err error) {
	var names []string
	var idx []int
	for i, h := range tr.header {
		if s := strings.TrimSpace(latin1(h)); s != "" {
			names, idx = append(names, s), append(idx, i)
		}
	}
	bad := func(i int, col string, e error, hint string) (int, int, error) {
		return 0, 0, tr.org.errAt(tr.headerLine, i, col, e, hint)
	}
	if len(names) != 2 {
		return bad(-1, "", errorf(ErrColumn, "a calibration table has two columns, hardness and concentration; found %d", len(names)),
			"keep one hardness column (e.g. HV0.5) and one concentration column (e.g. C_wt%)")
	}
	hi, ci = -1, -1
	for k, n := range names {
		if q, _ := valueHeader(n); q == "hardness" {
			if hi >= 0 {
				return bad(idx[k], n, errorf(ErrColumn, "two hardness columns"), "keep one hardness and one concentration column")
			}
			hi = k
		}
	}
	if hi < 0 {
		k := 0
		if _, u := valueHeader(names[0]); u != "" {
			k = 1 // the first is a concentration: the second was meant as hardness
		}
		return bad(idx[k], names[k], errorf(ErrUnit, "no known hardness scale in %s", quote(names[k])),
			"name the hardness column by its scale: HV, HV0.5, HV10, HK0.1, HRC, HRB, HR15N, HBW…")
	}
	if _, c.Scale = valueHeader(names[hi]); c.Scale == "" {
		return bad(idx[hi], names[hi], errorf(ErrUnit, "the hardness scale is not given"),
			"name the column by its scale, e.g. HV0.5 or hardness_HRC")
	}
	ci = 1 - hi
	c.HardnessName, c.ConcentrationName = names[hi], names[ci]
	c.Quantity, c.Unit = valueHeader(names[ci])
	if e, ok := tr.meta.get("quantity"); ok {
		c.Quantity = e.value
	}
	return idx[hi], idx[ci], nil
}

// readRows reads the (hardness, concentration) pairs.
func (c *Calibration) readRows(tr *textReader, hi, ci int) error {
	for {
		rec, line, err := tr.next()
		if err == io.EOF {
			return tr.finishMarks()
		}
		if err != nil {
			return err
		}
		if blankRow(rec) {
			continue
		}
		h, err := calNumber(tr, rec, hi, line, c.HardnessName)
		if err != nil {
			return err
		}
		v, err := calNumber(tr, rec, ci, line, c.ConcentrationName)
		if err != nil {
			return err
		}
		if !(h > 0) {
			return tr.org.errAt(line, hi, c.HardnessName, errorf(ErrValue, "hardness %s is not positive", fmtNum(h)),
				"fix the cell or remove the row")
		}
		if err := checkMeasured(h, "hardness", clip(cellAt(rec, hi))); err != nil {
			return tr.org.errAt(line, hi, c.HardnessName, err, "fix the cell or remove the row")
		}
		if err := checkMeasured(v, "concentration", clip(cellAt(rec, ci))); err != nil {
			return tr.org.errAt(line, ci, c.ConcentrationName, err, "fix the cell or remove the row")
		}
		c.Hardness, c.Concentration, c.Line = append(c.Hardness, h), append(c.Concentration, v), append(c.Line, line)
	}
}

func calNumber(tr *textReader, rec []string, i, line int, col string) (float64, error) {
	if n := lastNonBlank(rec); n >= len(tr.header) {
		return 0, tr.org.errAt(line, n, "", errorf(ErrColumn, "the row has more cells than the header"),
			"remove the extra cells")
	}
	v, err := parseNumber(cellAt(rec, i), tr.comma)
	if err != nil {
		return 0, tr.org.errAt(line, i, col, err, "fix the cell or remove the row")
	}
	return v, tr.noteMark(cellAt(rec, i), line, i, col)
}

// check sorts the pairs by hardness and refuses too few, repeated
// hardness values and a concentration that is not strictly monotone.
func (c *Calibration) check(org origin, headerLine int) error {
	n := len(c.Hardness)
	if n < 2 {
		line := headerLine
		if n == 1 {
			line = c.Line[0]
		}
		return org.errAt(line, -1, "", errorf(ErrNoData, "the calibration has %d pair(s); at least 2 are needed", n),
			"add measured (hardness, concentration) pairs covering the range of the profiles")
	}
	ord := make([]int, n)
	for i := range ord {
		ord[i] = i
	}
	sort.SliceStable(ord, func(a, b int) bool { return c.Hardness[ord[a]] < c.Hardness[ord[b]] })
	h, v, l := make([]float64, n), make([]float64, n), make([]int, n)
	for k, i := range ord {
		h[k], v[k], l[k] = c.Hardness[i], c.Concentration[i], c.Line[i]
	}
	c.Hardness, c.Concentration, c.Line = h, v, l
	for k := 1; k < n; k++ {
		if h[k] == h[k-1] {
			return org.errAt(l[k], -1, c.HardnessName, errorf(ErrValue,
				"hardness %s appears twice (also line %d)", fmtNum(h[k]), l[k-1]),
				"average the repeated measurements into one row, or remove one")
		}
	}
	if direction(v) == 0 {
		k := firstBreak(v)
		return org.errAt(l[k], -1, c.ConcentrationName, errorf(ErrValue,
			"concentration %s at hardness %s breaks the monotone order (line %d: %s at hardness %s)",
			fmtNum(v[k]), fmtNum(h[k]), l[k-1], fmtNum(v[k-1]), fmtNum(h[k-1])),
			"a calibration must rise (or fall) strictly with hardness; check the row or remove it")
	}
	return nil
}

// firstBreak returns the first k where v stops following the direction of v[1]−v[0].
func firstBreak(v []float64) int {
	s := math.Copysign(1, v[1]-v[0])
	for k := 1; k < len(v); k++ {
		if d := v[k] - v[k-1]; d == 0 || math.Copysign(1, d) != s {
			return k
		}
	}
	return len(v) - 1
}

// ToConcentration converts a hardness in the calibration's scale to
// concentration; outside the calibrated hardness range it returns an
// error of kind ErrRange (no extrapolation).
func (c *Calibration) ToConcentration(h float64) (float64, error) {
	v := c.f.At(h)
	if math.IsNaN(v) {
		lo, hi := c.f.Domain()
		return math.NaN(), errorf(ErrRange, "hardness %s %s is outside the calibrated range %s–%s %s",
			fmtNum(h), c.Scale, fmtNum(lo), fmtNum(hi), c.Scale)
	}
	return v, nil
}

// ToHardness converts a concentration to hardness by inverting the same
// interpolant (so ToHardness(ToConcentration(h)) = h to rounding);
// outside the calibrated concentration range it returns an ErrRange error.
func (c *Calibration) ToHardness(conc float64) (float64, error) {
	h := c.f.Inverse(conc)
	if math.IsNaN(h) {
		lo, hi := c.f.Range()
		return math.NaN(), errorf(ErrRange, "concentration %s %s is outside the calibrated range %s–%s %s",
			fmtNum(conc), c.Unit, fmtNum(lo), fmtNum(hi), c.Unit)
	}
	return h, nil
}

// Apply converts a hardness profile to a concentration profile. The
// profile's value unit must be the calibration's scale (HV0.5 and HV0.5;
// a scale without test force, "HV", matches any HV). Sigma, when given, is
// carried through the local slope: σc = |dc/dh|·σh (first-order
// propagation, common practice). A reading beyond an end of the calibrated
// range by at most the margin (Margin; by default 5 % of the range) is
// converted as that end and counted in a note; a reading further out is
// left out of the profile and listed in a note (profile.Note, carried to
// the fit's warnings). Nothing is extrapolated. A profile none of whose
// readings can be used is an *Error of kind ErrRange.
func (c *Calibration) Apply(p *Profile) (Profile, error) {
	file, sheet := splitSource(p.Source)
	if !sameScale(p.ValueUnit, c.Scale) {
		return Profile{}, &Error{File: file, Sheet: sheet, Column: p.ValueName, Err: errorf(ErrUnit,
			"profile %s is in %s but the calibration %s is in %s", quote(p.ID), quote(p.ValueUnit), c.Source, c.Scale),
			Hint: "use a calibration measured on the same hardness scale and test force"}
	}
	q := *p
	q.Depth, q.Value, q.Line, q.Sigma = nil, nil, nil, nil
	if p.Sigma != nil {
		q.Sigma = []float64{}
	}
	lo, hi := c.f.Domain()
	m := c.margin()
	var clamped, dropped []string
	where := func(i int) string {
		at := fmt.Sprintf("%s %s at %s mm", fmtNum(p.Value[i]), c.Scale, fmtNum(p.Depth[i]*1e3))
		if i < len(p.Line) && p.Line[i] > 0 {
			at += fmt.Sprintf(" (line %d)", p.Line[i])
		}
		return at
	}
	for i, h := range p.Value {
		hc := h
		switch {
		case h < lo && lo-h <= m:
			hc = lo
			clamped = append(clamped, where(i))
		case h > hi && h-hi <= m:
			hc = hi
			clamped = append(clamped, where(i))
		case h < lo || h > hi:
			dropped = append(dropped, where(i))
			continue
		}
		v, err := c.ToConcentration(hc)
		if err != nil {
			return Profile{}, &Error{File: file, Sheet: sheet, Column: p.ValueName, Err: err}
		}
		q.Depth = append(q.Depth, p.Depth[i])
		q.Value = append(q.Value, v)
		if i < len(p.Line) {
			q.Line = append(q.Line, p.Line[i])
		}
		if p.Sigma != nil {
			q.Sigma = append(q.Sigma, math.Abs(c.f.Deriv(hc))*p.Sigma[i])
		}
	}
	list := func(s []string) string {
		if len(s) > 8 {
			return strings.Join(s[:8], "; ") + fmt.Sprintf("; and %d more", len(s)-8)
		}
		return strings.Join(s, "; ")
	}
	rng := fmt.Sprintf("%s–%s %s", fmtNum(lo), fmtNum(hi), c.Scale)
	q.Notes = append([]Note(nil), p.Notes...)
	if len(clamped) > 0 {
		q.Notes = append(q.Notes, Note{Code: "calibration-clamped", Message: fmt.Sprintf(
			"%d hardness reading(s) lay beyond the calibrated range %s by at most the margin %s %s and were converted as the nearest end value: %s. Such a point stands for the end of the calibration, not for its own reading.",
			len(clamped), rng, fmtNum(m), c.Scale, list(clamped))})
	}
	if len(dropped) > 0 {
		q.Notes = append(q.Notes, Note{Code: "calibration-out-of-range", Message: fmt.Sprintf(
			"%d hardness reading(s) lay beyond the calibrated range %s by more than the margin %s %s and were left out of the fit (no extrapolation): %s. Extend the calibration to cover them.",
			len(dropped), rng, fmtNum(m), c.Scale, list(dropped))})
	}
	if len(q.Depth) == 0 {
		return Profile{}, &Error{File: file, Sheet: sheet, Column: p.ValueName, Err: errorf(ErrRange,
			"profile %s: every hardness reading lies beyond the calibrated range %s by more than the margin %s %s", quote(p.ID), rng, fmtNum(m), c.Scale),
			Hint: "use a calibration measured over the hardness range of this traverse"}
	}
	q.ValueName, q.ValueUnit, q.Quantity = c.ConcentrationName, c.Unit, c.Quantity
	q.Meta = maps.Clone(p.Meta)
	if q.Meta == nil {
		q.Meta = map[string]string{}
	}
	q.Meta["calibration"] = c.Source
	q.Meta["hardness_unit"] = p.ValueUnit
	return q, nil
}

// sameScale reports whether two hardness scales match: same method and
// scale letters, and the same test force when both give one.
func sameScale(a, b string) bool {
	sa, ok1 := HardnessScale(a)
	sb, ok2 := HardnessScale(b)
	if !ok1 || !ok2 {
		return false
	}
	if sa == sb {
		return true
	}
	fa, la := splitLoad(sa)
	fb, lb := splitLoad(sb)
	return fa == fb && (fa == "HV" || fa == "HK") && (la == "" || lb == "")
}

// splitLoad splits "HV0.5" into ("HV", "0.5").
func splitLoad(s string) (family, load string) {
	if strings.HasPrefix(s, "HV") || strings.HasPrefix(s, "HK") {
		return s[:2], s[2:]
	}
	return s, ""
}
