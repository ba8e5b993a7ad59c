package arrhenius

import (
	"math"
	"strings"

	"github.com/fickfit/fickfit/fit"
	"github.com/fickfit/fickfit/internal/stats"
)

// Point is one diffusion coefficient measured at one temperature: the
// input of the two-stage regression.
type Point struct {
	ID     string
	Source string // file the profile came from
	Lot    string
	// Meta holds the profile's metadata (lower-case keys) for grouping.
	Meta map[string]string
	// T is the hold temperature in K; SigmaT its standard uncertainty in K
	// (0 when not given).
	T, SigmaT float64
	// LnD is ln(D / (m²/s)); VarLnD its variance from the profile fit
	// (NaN when the fit gave none).
	LnD, VarLnD float64
	// CI is the profile fit's own interval of D (m²/s); an interval with
	// both ends 0 means none was given (see Interval).
	CI fit.Interval
}

// Interval returns the point's interval of D (m²/s) at the confidence
// level: the profile fit's own (CI) when it gave one, otherwise the Wald
// interval exp(ln D ± z·√Var(ln D)) with z the two-sided normal quantile
// of level. Both ends are NaN (not determined) when Var(ln D) is unknown.
// Every writer and figure takes a point's interval from here.
func (p Point) Interval(level float64) fit.Interval {
	if p.CI.Lo != 0 || p.CI.Hi != 0 {
		return p.CI
	}
	if !(p.VarLnD > 0) {
		return fit.Interval{Lo: nan, Hi: nan}
	}
	h := stats.Z(level) * math.Sqrt(p.VarLnD)
	return fit.Interval{Lo: math.Exp(p.LnD - h), Hi: math.Exp(p.LnD + h)}
}

// PointFromResult reads the point of one fitted profile: T, ln D and
// Var(ln D) = StdErrLn² of the "D" estimate. It refuses a result whose
// time was unknown (its "D" is then the product Dt in m²), one that did
// not converge, one with D fixed, and one without a temperature.
func PointFromResult(r *fit.Result) (Point, error) {
	if r == nil {
		return Point{}, badInput("", "result", "missing fit result")
	}
	e := func(field, format string, args ...any) error {
		err := badInput(r.ID, field, format, args...)
		err.Source = r.Source
		return err
	}
	if !r.Converged {
		return Point{}, e("fit", "the profile fit did not converge; fix the fit or leave this profile out")
	}
	d := r.Param("D")
	if d == nil {
		return Point{}, e("D", "the %s model has no parameter D; Arrhenius analysis needs a fitted D", r.Model)
	}
	if d.Fixed {
		return Point{}, e("D", "D was fixed in the fit, not measured; free it to use this profile")
	}
	if r.Time <= 0 {
		return Point{}, e("time", "the hold time is unknown, so the fit gave Dt (m²), not D; give the hold time (e.g. a `# time: 4 h` line) or use the profile for back-calculation instead")
	}
	if !(r.Temperature > 0) {
		return Point{}, e("temperature", "the hold temperature is not given; add it (e.g. a `# temperature: 925 C` line)")
	}
	if !(d.Value > 0) || !finite(d.Value) {
		return Point{}, e("D", "D = %g is not a positive number", d.Value)
	}
	v := nan
	switch {
	case d.StdErrLn > 0:
		v = d.StdErrLn * d.StdErrLn
	case d.StdErr > 0:
		v = (d.StdErr / d.Value) * (d.StdErr / d.Value)
	}
	meta := make(map[string]string, len(r.Meta)+2)
	for k, val := range r.Meta {
		meta[strings.ToLower(k)] = val
	}
	if _, ok := meta["material"]; !ok && r.Material != "" {
		meta["material"] = r.Material
	}
	if _, ok := meta["lot"]; !ok && r.Lot != "" {
		meta["lot"] = r.Lot
	}
	return Point{
		ID: r.ID, Source: r.Source, Lot: r.Lot, Meta: meta,
		T: r.Temperature, SigmaT: r.TemperatureSigma,
		LnD: math.Log(d.Value), VarLnD: v, CI: d.CI,
	}, nil
}

// PointsFromResults reads the points of many fitted profiles; the first
// unusable result stops it with an error naming the profile.
func PointsFromResults(rs []*fit.Result) ([]Point, error) {
	pts := make([]Point, 0, len(rs))
	for _, r := range rs {
		p, err := PointFromResult(r)
		if err != nil {
			return nil, err
		}
		pts = append(pts, p)
	}
	return pts, nil
}

// GroupKey returns the point's value of the grouping column by: "lot"
// (the Lot field, else Meta["lot"]) or any metadata key (case-insensitive).
// ok is false when the point has no such value.
func (p Point) GroupKey(by string) (string, bool) {
	return groupValue(by, p.Lot, "", p.Meta)
}

// groupValue is the value of the grouping column by for a profile with the
// given lot, material and metadata: lot and material from their own
// fields, anything else from the metadata (keys compared without case).
func groupValue(by, lot, material string, meta map[string]string) (string, bool) {
	key := strings.ToLower(strings.TrimSpace(by))
	switch {
	case key == "lot" && lot != "":
		return lot, true
	case key == "material" && material != "":
		return material, true
	}
	for k, v := range meta {
		if strings.ToLower(k) == key && strings.TrimSpace(v) != "" {
			return strings.TrimSpace(v), true
		}
	}
	return "", false
}

// GroupPoints splits points by the column by (see Point.GroupKey), keeping
// groups in order of first appearance. by == "" gives one group named "".
// A point without a value for the column is an error naming it.
func GroupPoints(pts []Point, by string) (names []string, groups [][]Point, err error) {
	return groupBy(pts, by, func(p Point) (string, bool, string, string) {
		v, ok := p.GroupKey(by)
		return v, ok, p.ID, p.Source
	})
}

// groupBy splits items by the value key gives (with the item's id and
// source for the error), keeping groups in order of first appearance.
func groupBy[T any](items []T, by string, key func(T) (value string, ok bool, id, source string)) (names []string, groups [][]T, err error) {
	if strings.TrimSpace(by) == "" {
		return []string{""}, [][]T{items}, nil
	}
	index := map[string]int{}
	for _, it := range items {
		v, ok, id, source := key(it)
		if !ok {
			e := badInput(id, by, "this profile has no value for the grouping column %q; add it to the file's metadata or choose another column", by)
			e.Source = source
			return nil, nil, e
		}
		i, seen := index[v]
		if !seen {
			i = len(names)
			index[v] = i
			names = append(names, v)
			groups = append(groups, nil)
		}
		groups[i] = append(groups[i], it)
	}
	return names, groups, nil
}
