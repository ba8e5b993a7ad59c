package fit

import (
	"fmt"
	"math"
	"regexp"
	"strconv"
	"strings"

	"github.com/fickfit/fickfit/internal/jsonx"
	"github.com/fickfit/fickfit/internal/stats"
	"github.com/fickfit/fickfit/profile"
)

// ThresholdKind says how a depth criterion sets its level.
type ThresholdKind int

const (
	// Absolute is a fixed level: "550 HV1", "0.35 wt%".
	Absolute ThresholdKind = iota
	// OverCore is a margin above the core level: "core+50HV".
	OverCore
)

// Threshold is a case-depth criterion: the depth at which the profile
// falls to a stated level. Common conventions (from memory; defer to the
// applicable specification):
//
//   - carburized cases: 550 HV1 absolute (ISO 2639, case hardening depth);
//   - nitrided cases: core hardness + 50 HV (DIN 50190-3, nitriding
//     hardness depth);
//   - a carbon level, e.g. 0.35 wt% C, when a concentration profile is
//     measured directly.
type Threshold struct {
	Kind ThresholdKind
	// Value is the level (Absolute) or the margin over the core (OverCore),
	// in Unit.
	Value float64
	// Unit is the normalised unit: a hardness scale as profile.HardnessScale
	// gives it ("HV1", "HV", "HRC") or a concentration unit ("wt%", "at%",
	// "%", "ppm"…).
	Unit string
	// Element is an element symbol written after a concentration unit
	// ("0.4%C" → "C"); "" when none was given.
	Element string
}

// String writes the threshold back in the form ParseThreshold reads.
func (t Threshold) String() string {
	v := strconv.FormatFloat(t.Value, 'g', -1, 64)
	u := t.Unit + t.Element
	if t.Kind == OverCore {
		return "core+" + v + u
	}
	return v + u
}

// Hardness reports whether the threshold is stated on a hardness scale.
func (t Threshold) Hardness() bool {
	_, ok := profile.HardnessScale(t.Unit)
	return ok
}

var (
	thresholdRe = regexp.MustCompile(`^(?i)(core\s*\+\s*)?([0-9]+(?:[.,][0-9]*)?|[.,][0-9]+)(?:e[+-]?[0-9]+)?\s*(.*)$`)
	// A concentration unit with an optional element symbol: "wt%", "wt.%C", "%C", "at-%N".
	concUnitRe = regexp.MustCompile(`^(?i)(wt|mass|at|mol)?\s*[.-]?\s*%\s*([A-Z][a-z]?)?$`)
)

// ParseThreshold reads a case-depth criterion:
//
//	550HV  550 HV1  550 HV 0.5  52 HRC    absolute hardness
//	core+50HV  core + 50 HV0.5            margin over the core hardness
//	0.35wt%  0.4%C  0.5 at%N  300 ppm     absolute concentration
//
// A unit is required (a bare number is ambiguous). Decimal commas are
// accepted. The value must be positive. Errors wrap ErrBadInput and say
// which forms are accepted.
func ParseThreshold(s string) (Threshold, error) {
	src := strings.TrimSpace(s)
	m := thresholdRe.FindStringSubmatch(src)
	if m == nil {
		return Threshold{}, fmt.Errorf("%w: case-depth threshold %q is not understood: write a level with its unit (550HV1, 0.35wt%%) or a margin over the core (core+50HV)", ErrBadInput, s)
	}
	num := strings.ReplaceAll(src[len(m[1]):len(src)-len(m[3])], ",", ".")
	v, err := strconv.ParseFloat(strings.TrimSpace(num), 64)
	if err != nil || !finite(v) {
		return Threshold{}, fmt.Errorf("%w: case-depth threshold %q: %q is not a number", ErrBadInput, s, num)
	}
	if !(v > 0) {
		return Threshold{}, fmt.Errorf("%w: case-depth threshold %q must be a positive level or margin", ErrBadInput, s)
	}
	t := Threshold{Value: v}
	if m[1] != "" {
		t.Kind = OverCore
	}
	unit := strings.TrimSpace(m[3])
	switch {
	case unit == "":
		return Threshold{}, fmt.Errorf("%w: case-depth threshold %q has no unit: write e.g. %sHV1 or %swt%%", ErrBadInput, s, num, num)
	case isHardness(unit):
		t.Unit, _ = profile.HardnessScale(unit)
	default:
		if c := concUnitRe.FindStringSubmatch(unit); c != nil {
			t.Unit = strings.ToLower(c[1]) + "%"
			if t.Unit == "mass%" {
				t.Unit = "wt%"
			}
			t.Element = c[2]
			if t.Element != "" {
				t.Element = strings.ToUpper(t.Element[:1]) + strings.ToLower(t.Element[1:])
			}
		} else if u, ok := ppmUnits[strings.ToLower(unit)]; ok {
			t.Unit = u
		} else {
			return Threshold{}, fmt.Errorf("%w: unknown unit %q in case-depth threshold %q: use a hardness scale (HV, HV1, HV0.5, HK, HRC…) or a concentration unit (wt%%, at%%, %%, ppm)", ErrBadInput, unit, s)
		}
	}
	return t, nil
}

var ppmUnits = map[string]string{"ppm": "ppm", "wppm": "wppm", "ppmw": "wppm", "appm": "appm", "ppma": "appm"}

func isHardness(u string) bool {
	_, ok := profile.HardnessScale(u)
	return ok
}

// hardnessFamily splits "HV0.5" into ("HV", "0.5"); other scales have no load.
func hardnessFamily(s string) (family, load string) {
	if strings.HasPrefix(s, "HV") || strings.HasPrefix(s, "HK") {
		return s[:2], s[2:]
	}
	return s, ""
}

// sameUnit decides whether a threshold unit can be compared with a
// profile's value unit without conversion. note, when not empty, says what
// was assumed.
func sameUnit(th, vu string) (ok bool, note string) {
	if vu == "" {
		return true, fmt.Sprintf("The profile's value unit is not known; the threshold is taken in the profile's own values (as %s).", th)
	}
	if isHardness(th) != isHardness(vu) {
		return false, ""
	}
	if isHardness(th) {
		pv, _ := profile.HardnessScale(vu)
		if pv == th {
			return true, ""
		}
		ft, lt := hardnessFamily(th)
		fp, lp := hardnessFamily(pv)
		if ft != fp {
			return false, ""
		}
		if lt != "" && lp != "" {
			return true, fmt.Sprintf("The threshold is stated in %s but the profile was measured in %s: the two test forces are compared as one scale; check that the specification allows the test force used.", th, pv)
		}
		return true, ""
	}
	norm := func(u string) string {
		u = strings.ToLower(strings.ReplaceAll(u, " ", ""))
		if u == "mass%" {
			return "wt%"
		}
		return u
	}
	a, b := norm(th), norm(vu)
	switch {
	case a == b:
		return true, ""
	case a == "%" || b == "%":
		if strings.HasSuffix(a, "%") && strings.HasSuffix(b, "%") {
			return true, fmt.Sprintf("The threshold unit %s and the profile unit %s are taken to be the same percentage.", th, vu)
		}
	case strings.HasSuffix(a, "ppm") && strings.HasSuffix(b, "ppm"):
		if a == "ppm" || b == "ppm" {
			return true, fmt.Sprintf("The threshold unit %s and the profile unit %s are taken to be the same ppm.", th, vu)
		}
	}
	return false, ""
}

// DepthEstimate is a case depth or a decarburization depth, from the
// fitted curve (with a confidence interval) and from the data alone.
// Non-finite numbers mean "not reached" and are written as null in JSON.
type DepthEstimate struct {
	// Kind is "case" or "decarburization".
	Kind string `json:"kind"`
	// Depth is where the fitted curve reaches Level, m.
	Depth float64 `json:"depth_m"`
	// CI is the confidence interval of Depth at CILevel.
	CI      Interval `json:"ci"`
	CILevel float64  `json:"ci_level"`
	// FromData is where the measured points, joined by straight lines in
	// depth order, first reach LevelFromData, m.
	FromData float64 `json:"from_data_m"`
	// Threshold is the criterion as given ("550HV1", "core+50HV",
	// "95% recovery").
	Threshold string `json:"threshold"`
	// Level and LevelFromData are the levels searched for, in Unit: they
	// differ when the criterion depends on the core (fitted C0 or mean of
	// the deepest points).
	Level         float64 `json:"level"`
	LevelFromData float64 `json:"level_from_data"`
	// Core is the fitted plateau C0 and CoreFromData the mean of the
	// deepest points, in Unit.
	Core         float64 `json:"core"`
	CoreFromData float64 `json:"core_from_data"`
	// Surface is the fitted value at depth 0 and SurfaceFromData the value
	// of the shallowest point (decarburization only; NaN otherwise).
	Surface         float64 `json:"surface"`
	SurfaceFromData float64 `json:"surface_from_data"`
	Unit            string  `json:"unit"`
	// Method says how each number was obtained.
	Method string   `json:"method"`
	Notes  []string `json:"notes"`
}

// MarshalJSON writes non-finite numbers as null.
func (e DepthEstimate) MarshalJSON() ([]byte, error) {
	type out struct {
		Kind            string   `json:"kind"`
		Depth           *float64 `json:"depth_m"`
		CI              Interval `json:"ci"`
		CILevel         float64  `json:"ci_level"`
		FromData        *float64 `json:"from_data_m"`
		Threshold       string   `json:"threshold"`
		Level           *float64 `json:"level"`
		LevelFromData   *float64 `json:"level_from_data"`
		Core            *float64 `json:"core"`
		CoreFromData    *float64 `json:"core_from_data"`
		Surface         *float64 `json:"surface"`
		SurfaceFromData *float64 `json:"surface_from_data"`
		Unit            string   `json:"unit"`
		Method          string   `json:"method"`
		Notes           []string `json:"notes"`
	}
	return jsonx.Marshal(out{e.Kind, num(e.Depth), e.CI, e.CILevel, num(e.FromData), e.Threshold,
		num(e.Level), num(e.LevelFromData), num(e.Core), num(e.CoreFromData), num(e.Surface),
		num(e.SurfaceFromData), e.Unit, e.Method, e.Notes})
}

// DepthOptions control CaseDepth and DecarbDepth. The zero value averages
// the 3 deepest points for the core from data and uses no calibration.
type DepthOptions struct {
	// DeepPoints is the number of deepest points averaged for the core
	// (base) level from the data; 0 means 3.
	DeepPoints int
	// Calibration, when not nil, converts between hardness and
	// concentration so that a hardness threshold can be applied to a
	// concentration profile converted from hardness (or the reverse). The
	// conversion never extrapolates.
	Calibration *profile.Calibration
}

// HardnessProxyNote is said wherever hardness itself was fitted as if it
// were a concentration.
const HardnessProxyNote = "Hardness was fitted directly as a stand-in for concentration (proxy mode): the fitted curve and depths are fine as a smooth description of the traverse, but D is a diffusion coefficient only where hardness is close to linear in concentration over the whole range of the profile. Convert with a hardness–concentration calibration (--hardness-calibration) for a D to compare or to use in Arrhenius."

// DepthCaution goes with every predicted depth.
const DepthCaution = "Case and decarburization depths from a fitted model rest on its assumptions (D constant, or the stated function of concentration; the boundary condition of the model) and on the traverse measured; verify by metallographic examination or a hardness traverse as the applicable specification requires, and defer to that specification and to qualified engineering judgement before accepting parts."

// CaseDepth returns the depth at which the fitted profile, and the
// measured points, fall from the surface level to the threshold.
//
// From the fit: the root of f(x) = level on the side from the surface to
// the core, found by bracketing and the shared root finder (stats.Root) to 1e-13 relative; the core
// is the fitted C0. Its interval comes from the delta method on ln x*:
// with x* defined implicitly by f(x*, θ) = L(θ), ∂x*/∂θ = −(∂f/∂θ − ∂L/∂θ)/(∂f/∂x)
// (implicit-function theorem; ∂f/∂x by a central difference), Var ln x* =
// gᵀΣg/x*², and x*·exp(±q·se) with q the fit's Student-t (or normal, for
// absolute σ) quantile. Working on ln x* keeps the interval positive.
//
// From the data: points sorted by depth (repeated depths averaged), joined
// by straight lines; the first crossing is reported. The core from data is
// the mean of the DeepPoints deepest points.
//
// Errors wrap ErrBadInput when the threshold's unit does not match the
// profile, when the level lies outside the fitted profile's range, or when
// the model has no core level (couple).
func CaseDepth(r *Result, th Threshold, o DepthOptions) (*DepthEstimate, error) {
	c, err := newDepthCurve(r)
	if err != nil {
		return nil, err
	}
	conv, note, err := thresholdConversion(th, r.ValueUnit, o.Calibration)
	if err != nil {
		return nil, err
	}
	e := &DepthEstimate{Kind: "case", Threshold: th.String(), Unit: r.ValueUnit, Surface: math.NaN(), SurfaceFromData: math.NaN()}
	if note != "" {
		e.Notes = append(e.Notes, note)
	}
	level := func(core float64) (float64, error) {
		v := th.Value
		if th.Kind == OverCore {
			cv, err := conv.toThreshold(core)
			if err != nil {
				return math.NaN(), err
			}
			v += cv
		}
		return conv.fromThreshold(v)
	}
	// ∂L/∂C0: 1 without a calibration, else by a central difference.
	dLevel := func(core float64) float64 {
		if th.Kind != OverCore {
			return 0
		}
		if conv.cal == nil {
			return 1
		}
		h := 1e-6 * math.Max(math.Abs(core), 1e-9)
		a, err1 := level(core + h)
		b, err2 := level(core - h)
		if err1 != nil || err2 != nil {
			return math.NaN()
		}
		return (a - b) / (2 * h)
	}
	fs := c.value(0)
	e.Core = c.p[c.jC0]
	if e.Level, err = level(e.Core); err != nil {
		return nil, fmt.Errorf("%w: case-depth threshold %s: %v", ErrBadInput, th, err)
	}
	if !between(e.Level, fs, e.Core) {
		return nil, fmt.Errorf("%w: case-depth threshold %s (level %.4g %s) lies outside the fitted profile, which runs from %.4g at the surface to the core level %.4g %s: the depth is not defined. Choose a level between them", ErrBadInput, th, e.Level, r.ValueUnit, fs, e.Core, r.ValueUnit)
	}
	dL := make([]float64, len(c.p))
	dL[c.jC0] = dLevel(e.Core)
	c.solve(e, dL)

	// From the data.
	x, y := c.sortedData()
	e.CoreFromData, e.Notes = deepMean(y, o.DeepPoints, e.Notes)
	e.LevelFromData, err = level(e.CoreFromData)
	if err != nil {
		e.LevelFromData = math.NaN()
		e.Notes = append(e.Notes, fmt.Sprintf("No level from the data: %v.", err))
	}
	e.FromData, e.Notes = firstCrossing(x, y, e.LevelFromData, fs > e.Core, e.Notes)
	e.Method = "fit: root of the fitted curve, core = fitted C0, interval by the delta method on ln(depth) through the parameter covariance; data: linear interpolation between measured points in depth order"
	e.finishNotes(r)
	return e, nil
}

// DecarbDepth returns the depth at which an out-diffusion profile (lower at
// the surface than in the bulk) has recovered the fraction (0 < fraction < 1;
// 0 means 0.95) of the way from the surface value to the base level:
// level = Cs + fraction·(C0 − Cs). From the fit, Cs is the fitted value at
// depth 0 and C0 the fitted base; from the data, Cs is the shallowest
// point and C0 the mean of the DeepPoints deepest points. The interval is
// the delta method on ln x* as in CaseDepth, with ∂L/∂θ = (1 − fraction)·
// ∂f(0)/∂θ + fraction·∂C0/∂θ. For the erf model x* = x0 + 2√(Dt)·erfinv(fraction).
func DecarbDepth(r *Result, fraction float64, o DepthOptions) (*DepthEstimate, error) {
	if fraction == 0 {
		fraction = 0.95
	}
	if !(fraction > 0 && fraction < 1) {
		return nil, fmt.Errorf("%w: decarburization fraction %g must lie between 0 and 1 (e.g. 0.95 for 95 %% recovery)", ErrBadInput, fraction)
	}
	c, err := newDepthCurve(r)
	if err != nil {
		return nil, err
	}
	e := &DepthEstimate{Kind: "decarburization", Threshold: fmt.Sprintf("%g%% recovery", 100*fraction), Unit: r.ValueUnit}
	e.Surface = c.value(0)
	e.Core = c.p[c.jC0]
	if !(e.Surface < e.Core) {
		return nil, fmt.Errorf("%w: the fitted profile is not depleted at the surface (%.4g at the surface, %.4g in the bulk): decarburization depth applies to out-diffusion profiles; for an enriched case use a case-depth threshold", ErrBadInput, e.Surface, e.Core)
	}
	e.Level = e.Surface + fraction*(e.Core-e.Surface)
	dL := c.jacAt(0)
	for j := range dL {
		dL[j] *= 1 - fraction
	}
	dL[c.jC0] += fraction
	c.solve(e, dL)

	x, y := c.sortedData()
	e.CoreFromData, e.Notes = deepMean(y, o.DeepPoints, e.Notes)
	e.SurfaceFromData = y[0]
	e.Notes = append(e.Notes, fmt.Sprintf("Surface value from the data: the shallowest point, at %s.", fmtLength(x[0])))
	e.LevelFromData = e.SurfaceFromData + fraction*(e.CoreFromData-e.SurfaceFromData)
	if e.SurfaceFromData < e.CoreFromData {
		e.FromData, e.Notes = firstCrossing(x, y, e.LevelFromData, false, e.Notes)
	} else {
		e.FromData = math.NaN()
		e.Notes = append(e.Notes, "The shallowest point is not below the deepest ones: no decarburization depth from the data.")
	}
	e.Method = "fit: root of the fitted curve (surface = fitted value at depth 0, base = fitted C0), interval by the delta method on ln(depth) through the parameter covariance; data: linear interpolation between measured points in depth order"
	e.finishNotes(r)
	return e, nil
}

func (e *DepthEstimate) finishNotes(r *Result) {
	if isHardness(r.ValueUnit) {
		e.Notes = append(e.Notes, HardnessProxyNote)
	}
	e.Notes = append(e.Notes, DepthCaution)
}

// depthCurve is the fitted curve of a Result, evaluated one depth at a time.
type depthCurve struct {
	r    *Result
	m    Model
	d    Data
	p    []float64
	free []bool
	cov  [][]float64
	jC0  int
	xmax float64 // deepest depth the root may lie at
	deep float64 // deepest measured depth
}

func newDepthCurve(r *Result) (*depthCurve, error) {
	m := r.ModelValue()
	if m == nil {
		return nil, errNoCurve
	}
	if m.Name() == "couple" {
		return nil, fmt.Errorf("%w: case and decarburization depths are measured from a surface; the couple model has none", ErrBadInput)
	}
	c := &depthCurve{r: r, m: m, d: *r.Data(), jC0: -1}
	c.p, c.free, c.cov = r.Internal()
	for j, pa := range m.Params() {
		if pa.Name == "C0" {
			c.jC0 = j
		}
	}
	if c.jC0 < 0 {
		return nil, fmt.Errorf("%w: the %s model has no core level C0, so no depth to a threshold can be defined", ErrBadInput, m.Name())
	}
	c.d.Y, c.d.W = nil, nil
	for _, x := range c.d.X {
		c.deep = math.Max(c.deep, x)
	}
	c.xmax = math.Inf(1)
	if m.Name() == "slab" && c.d.Thickness > 0 {
		// Depths are measured to the centre plane (two faces) or the sealed face.
		c.xmax = slabLength(&c.d) / 2
	}
	return c, nil
}

func (c *depthCurve) value(x float64) float64 {
	d := c.d
	d.X = []float64{x}
	f := []float64{0}
	c.m.Eval(c.p, &d, f, nil)
	return f[0]
}

func (c *depthCurve) jacAt(x float64) []float64 {
	d := c.d
	d.X = []float64{x}
	jac := make([]float64, len(c.p))
	c.m.Eval(c.p, &d, []float64{0}, jac)
	return jac
}

// solve finds the root of f(x) = e.Level between the surface and the core
// and its delta-method interval; dL is ∂L/∂θ (internal scale).
func (c *depthCurve) solve(e *DepthEstimate, dL []float64) {
	e.Depth, e.CI = math.NaN(), Interval{math.NaN(), math.NaN()}
	e.CILevel = c.r.CILevel
	s := 1.0 // sign of f − L on the surface side
	if c.value(0) < e.Level {
		s = -1
	}
	g := func(x float64) float64 { return s * (c.value(x) - e.Level) }
	// Bracket: grow from the deepest measured depth (at most 2⁴⁰ times).
	lo, hi := 0.0, math.Max(c.deep, 1e-9)
	for k := 0; g(hi) > 0; k++ {
		if hi >= c.xmax || k > 40 {
			e.Notes = append(e.Notes, "The fitted curve does not reach the level within the specimen: not reached.")
			return
		}
		lo, hi = hi, math.Min(2*hi, c.xmax)
	}
	x, ok := stats.Root(g, lo, g(lo), hi, g(hi), 1e-13)
	if !ok {
		e.Notes = append(e.Notes, "The fitted curve does not cross the level cleanly within the specimen: not determined.")
		return
	}
	e.Depth = x
	if x > c.deep {
		e.Notes = append(e.Notes, fmt.Sprintf("The fitted depth %s lies beyond the deepest measured point (%s): it is an extrapolation of the model.", fmtLength(x), fmtLength(c.deep)))
	}
	// Delta method on ln x*.
	h := 1e-6 * x
	fx := (c.value(x+h) - c.value(x-h)) / (2 * h)
	jac := c.jacAt(x)
	var idx []int
	for j, f := range c.free {
		if f {
			idx = append(idx, j)
		}
	}
	gr := make([]float64, len(idx))
	for a, j := range idx {
		gr[a] = -(jac[j] - dL[j]) / fx / x
	}
	var v float64
	for a := range idx {
		for b := range idx {
			v += gr[a] * c.cov[a][b] * gr[b]
		}
	}
	if !(v >= 0) || !(fx != 0) || len(c.cov) != len(idx) {
		e.Notes = append(e.Notes, "No confidence interval: the slope of the fitted curve or the covariance is not usable at this depth.")
		return
	}
	q := c.r.bandQuantile()
	se := math.Sqrt(v)
	e.CI = Interval{x * math.Exp(-q*se), x * math.Exp(q*se)}
}

// sortedData returns the measured points in depth order with repeated
// depths averaged.
func (c *depthCurve) sortedData() (x, y []float64) {
	xs, ys := sortedByDepth(c.r.Data())
	for i := 0; i < len(xs); {
		j, sum := i, 0.0
		for ; j < len(xs) && xs[j] == xs[i]; j++ {
			sum += ys[j]
		}
		x = append(x, xs[i])
		y = append(y, sum/float64(j-i))
		i = j
	}
	return x, y
}

// deepMean is the mean of the k deepest values (k = 0 → 3), with a note.
func deepMean(y []float64, k int, notes []string) (float64, []string) {
	if k <= 0 {
		k = 3
	}
	if k > len(y) {
		k = len(y)
	}
	var s float64
	for _, v := range y[len(y)-k:] {
		s += v
	}
	m := s / float64(k)
	return m, append(notes, fmt.Sprintf("Core (base) level from the data: mean of the %d deepest points = %.4g.", k, m))
}

// firstCrossing returns the first depth at which the depth-ordered points,
// joined by straight lines, reach level coming from the surface side
// (above the level when fromAbove). Not reached gives NaN and a note.
func firstCrossing(x, y []float64, level float64, fromAbove bool, notes []string) (float64, []string) {
	if !finite(level) {
		return math.NaN(), notes
	}
	s := 1.0
	if !fromAbove {
		s = -1
	}
	if s*(y[0]-level) <= 0 {
		return math.NaN(), append(notes, fmt.Sprintf("From the data: the shallowest point (%s) is already past the level %.4g: not reached (no depth can be read from the data).", fmtLength(x[0]), level))
	}
	var cross []float64
	for i := 1; i < len(x); i++ {
		a, b := s*(y[i-1]-level), s*(y[i]-level)
		if a > 0 && b <= 0 {
			cross = append(cross, x[i-1]+a/(a-b)*(x[i]-x[i-1]))
		}
	}
	if len(cross) == 0 {
		return math.NaN(), append(notes, fmt.Sprintf("From the data: the level %.4g is not reached; the deepest point (%s) is still on the surface side.", level, fmtLength(x[len(x)-1])))
	}
	if len(cross) > 1 {
		notes = append(notes, fmt.Sprintf("From the data: the points cross the level %d times (scatter); the first crossing is reported.", len(cross)))
	}
	return cross[0], notes
}

func between(v, a, b float64) bool {
	lo, hi := math.Min(a, b), math.Max(a, b)
	return v > lo && v < hi
}

// unitConversion maps profile values to the threshold's unit and back:
// the identity, or a hardness–concentration calibration.
type unitConversion struct {
	cal      *profile.Calibration
	toHard   bool // profile in concentration, threshold in hardness
	identity bool
}

func (u unitConversion) toThreshold(v float64) (float64, error) {
	switch {
	case u.identity:
		return v, nil
	case u.toHard:
		return u.cal.ToHardness(v)
	}
	return u.cal.ToConcentration(v)
}

func (u unitConversion) fromThreshold(v float64) (float64, error) {
	switch {
	case u.identity:
		return v, nil
	case u.toHard:
		return u.cal.ToConcentration(v)
	}
	return u.cal.ToHardness(v)
}

// thresholdConversion decides how a threshold applies to a profile with
// value unit vu.
func thresholdConversion(th Threshold, vu string, cal *profile.Calibration) (unitConversion, string, error) {
	if ok, note := sameUnit(th.Unit, vu); ok {
		return unitConversion{identity: true}, note, nil
	}
	if cal != nil {
		// One side is hardness in the calibration's scale, the other a
		// concentration in its unit.
		hardTh := th.Hardness()
		hardU, concU := th.Unit, vu
		if !hardTh {
			hardU, concU = vu, th.Unit
		}
		okH, _ := sameUnit(hardU, cal.Scale)
		okC, _ := sameUnit(concU, cal.Unit)
		if isHardness(hardU) && !isHardness(concU) && okH && okC {
			return unitConversion{cal: cal, toHard: hardTh}, fmt.Sprintf("The threshold in %s is converted through the calibration %s (monotone interpolation, no extrapolation).", th.Unit, cal.Source), nil
		}
	}
	return unitConversion{}, "", fmt.Errorf("%w: the case-depth threshold is in %s but the profile's values are in %s: state the threshold in %s, or give a hardness–concentration calibration to convert", ErrBadInput, th.Unit, vu, vu)
}
