package report

import (
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
	"unicode/utf8"

	"github.com/fickfit/fickfit/fit"
	"github.com/fickfit/fickfit/profile"
)

// Number formatting for people. Every text view, table, figure label and
// report goes through these functions, so that a value is written the same
// way everywhere:
//
//   - The number of digits follows the uncertainty: the last digit shown is
//     the second significant digit of the (smaller) half-width of the
//     interval, and the value is rounded to the same place (JCGM 100:2008,
//     GUM §7.2.6: "it usually suffices to quote u to at most two significant
//     digits"). Without an interval, three significant digits.
//   - Units are always written, in the user's temperature unit with kelvin
//     beside, times in h/min, depths in µm or mm.
//   - An open end of an interval is said in words, not as a number.
//   - Negative numbers use the minus sign U+2212; ranges with a negative
//     end are written "a to b" so that the dash cannot be read as a minus.

const (
	minus   = "\u2212" // −
	times10 = " × 10"
	// DefaultDigits is the number of significant digits of a value written
	// without an interval.
	DefaultDigits = 3
	// maxDigits caps the significant digits of a value with a very narrow
	// interval; more would only repeat the solver's tolerance.
	maxDigits = 6
	// minDigits is the least number of significant digits of a value, even
	// when its interval is wider than the value itself (so that it never
	// rounds to 0).
	minDigits = 1
)

var superscript = map[rune]rune{
	'0': '⁰', '1': '¹', '2': '²', '3': '³', '4': '⁴',
	'5': '⁵', '6': '⁶', '7': '⁷', '8': '⁸', '9': '⁹', '-': '⁻',
}

// Superscript writes an integer with superscript digits: -11 → "⁻¹¹".
func Superscript(n int) string {
	var b strings.Builder
	for _, r := range strconv.Itoa(n) {
		b.WriteRune(superscript[r])
	}
	return b.String()
}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// exp10 is the decimal exponent of |v|: floor(log10|v|); 0 for v = 0.
func exp10(v float64) int {
	if v == 0 || !finite(v) {
		return 0
	}
	e := int(math.Floor(math.Log10(math.Abs(v))))
	// Guard against log10 landing just below an exact power of ten.
	if math.Abs(v) >= math.Pow(10, float64(e+1)) {
		e++
	}
	return e
}

// numFmt writes numbers for people with digits significant digits for a
// value that has no interval (TextOptions.Digits, the --digits option; 0
// means DefaultDigits); a value with an interval keeps the digits its
// interval supports. The package functions (LastDigit, Estimate, General…)
// are numFmt{}'s, for figures, the workbook and the HTML report.
type numFmt struct{ digits int }

// sig is the number of significant digits of a value without an interval.
func (n numFmt) sig() int {
	if n.digits <= 0 {
		return DefaultDigits
	}
	return n.digits
}

// LastDigit returns the decimal place (as a power of ten) of the last digit
// to show for value v with interval iv. The uncertainty u is the smaller
// finite half-width of the interval, and its digits follow the Particle
// Data Group's rounding rule (Review of Particle Physics, Introduction,
// "Rounding"; from memory): when the three leading digits of u are 100–354
// u keeps two significant digits, 355–949 one, 950–999 it rounds up to
// 1000 and keeps two. The value is rounded at the same place (GUM, JCGM
// 100:2008 §7.2.6), but keeps at least one and at most six significant
// digits. Without a usable interval it gives DefaultDigits significant
// digits.
func LastDigit(v float64, iv fit.Interval) int { return numFmt{}.lastDigit(v, iv) }

// lastDigit is LastDigit with n's digits for a value without an interval.
func (n numFmt) lastDigit(v float64, iv fit.Interval) int {
	u := math.Inf(1)
	if finite(iv.Lo) && v-iv.Lo > 0 {
		u = v - iv.Lo
	}
	if finite(iv.Hi) && iv.Hi-v > 0 && iv.Hi-v < u {
		u = iv.Hi - v
	}
	ev := exp10(v)
	if math.IsInf(u, 1) || !finite(v) {
		return ev - (n.sig() - 1)
	}
	eu := exp10(u)
	lead := leadDigits(u, eu)
	last := eu - 1
	if lead >= 355 {
		last = eu // 355–949: one digit; 950–999: rounds up to 10^(eu+1), two digits
	}
	if v == 0 {
		return last
	}
	if ev-last+1 > maxDigits {
		last = ev - maxDigits + 1
	}
	if ev-last+1 < minDigits {
		last = ev - minDigits + 1
	}
	return last
}

// leadDigits returns the three leading digits of u > 0 (100–999), whose
// decimal exponent is eu. Near the ends of the float range, where 10^(eu−2)
// is not a normal number, they are read from u's shortest decimal form.
func leadDigits(u float64, eu int) int {
	if eu > -290 && eu < 290 {
		return int(math.Floor(u / math.Pow(10, float64(eu-2))))
	}
	m := strings.Replace(strconv.FormatFloat(u, 'e', 16, 64), ".", "", 1)
	lead, _ := strconv.Atoi(m[:3])
	return lead
}

// scaleSafe tells whether v can be rounded at 10^last with float
// arithmetic: the powers of ten involved, and v scaled by them, are normal
// numbers. Beyond (values below about 10⁻²⁹⁰ or above 10²⁹⁰), numbers are
// written from their decimal form instead (extreme).
func scaleSafe(v float64, last int) bool {
	e := exp10(v)
	return last > -290 && last < 290 && e > -290 && e < 290 && e-last < 290
}

// extreme writes v rounded at 10^last as "m × 10ⁿ" from its decimal form,
// with at least one and at most 17 significant digits: for the values
// scaleSafe refuses (a D of 10⁻³¹⁰, a time of 10³⁰⁸ s).
func extreme(v float64, last int) string {
	d := exp10(v) - last + 1
	if d < 1 {
		d = 1
	}
	if d > 17 {
		d = 17
	}
	f := strconv.FormatFloat(v, 'e', d-1, 64) // "-1.23e-310"
	i := strings.IndexByte(f, 'e')
	m, exp := f[:i], f[i+1:]
	n, _ := strconv.Atoi(exp)
	return strings.Replace(m, "-", minus, 1) + times10 + Superscript(n)
}

// SigDigits returns the last-digit place that shows v with sig significant digits.
func SigDigits(v float64, sig int) int {
	if sig < 1 {
		sig = 1
	}
	return exp10(v) - sig + 1
}

// useSci tells whether a value of this size is written in scientific notation.
func useSci(v float64) bool {
	a := math.Abs(v)
	return a != 0 && (a < 1e-3 || a >= 1e5)
}

// roundAt rounds v to a multiple of 10^last.
func roundAt(v float64, last int) float64 {
	if last >= 0 {
		p := math.Pow(10, float64(last))
		return math.Round(v/p) * p
	}
	p := math.Pow(10, float64(-last))
	return math.Round(v*p) / p
}

// Number writes v rounded at the decimal place 10^last: plainly for
// 10⁻³ ≤ |v| < 10⁵ ("0.812", "1198", "−512.3"), otherwise as
// "2.94 × 10⁻¹¹". NaN is written "n/a", ±Inf "∞"/"−∞".
func Number(v float64, last int) string {
	switch {
	case math.IsNaN(v):
		return "n/a"
	case math.IsInf(v, 1):
		return "∞"
	case math.IsInf(v, -1):
		return minus + "∞"
	}
	if !scaleSafe(v, last) {
		return extreme(v, last)
	}
	r := roundAt(v, last)
	if useSci(r) {
		e := exp10(r)
		return mantissa(r, e, last) + times10 + Superscript(e)
	}
	return plain(r, last)
}

// plain writes v with max(0, −last) decimals and a true minus sign; a
// value that would need more than 15 digits before or 17 after the point
// is written as "m × 10ⁿ" instead.
func plain(v float64, last int) string {
	dec := 0
	if last < 0 {
		dec = -last
	}
	if a := math.Abs(v); finite(v) && (a >= 1e15 || dec > 17 && a != 0 && a < 1e-3) {
		return extreme(v, max(last, exp10(v)-16))
	}
	s := strconv.FormatFloat(v, 'f', dec, 64)
	if s == "-0" || strings.Trim(s, "-0.") == "" {
		s = strings.TrimPrefix(s, "-")
	}
	return strings.Replace(s, "-", minus, 1)
}

// mantissa writes v/10^e with e−last decimals.
func mantissa(v float64, e, last int) string {
	dec := e - last
	if dec < 0 {
		dec = 0
	}
	m := v / math.Pow(10, float64(e))
	return plain(m, -dec)
}

// Sig writes v with sig significant digits: Sig(2.9437e-11, 3) = "2.94 × 10⁻¹¹".
func Sig(v float64, sig int) string { return Number(v, SigDigits(v, sig)) }

// General writes a number with DefaultDigits significant digits.
func General(v float64) string { return numFmt{}.general(v) }

// general writes a number with n's significant digits.
func (n numFmt) general(v float64) string { return Sig(v, n.sig()) }

// Estimate writes a value with its unit and its interval at the given level:
//
//	2.94 × 10⁻¹¹ m²/s, 95 % CI 2.81–3.08 × 10⁻¹¹
//	0.812 wt%, 95 % CI 0.800–0.824
//	3.1 × 10⁻¹² m²/s, 95 % CI > 2.0 × 10⁻¹² (upper bound not determined by the data)
//
// The unit is written as given through PrettyUnit. A degenerate interval
// (lo = hi = v, a fixed parameter) is left out.
func Estimate(v float64, iv fit.Interval, level float64, unit string) string {
	return numFmt{}.estimate(v, iv, level, unit)
}

// estimate is Estimate with n's digits for a value without an interval.
func (n numFmt) estimate(v float64, iv fit.Interval, level float64, unit string) string {
	last := n.lastDigit(v, iv)
	s := Number(v, last)
	if u := PrettyUnit(unit); u != "" {
		s += " " + u
	}
	if degenerate(v, iv) {
		return s
	}
	return s + ", " + Level(level) + " CI " + IntervalAt(v, iv, last)
}

// degenerate reports an interval of zero width at the value: a fixed parameter.
func degenerate(v float64, iv fit.Interval) bool { return iv.Lo == v && iv.Hi == v }

// Level writes a confidence level: 0.95 → "95 %".
func Level(level float64) string {
	if level <= 0 || level >= 1 {
		level = 0.95
	}
	return strconv.FormatFloat(roundAt(100*level, -2), 'f', -1, 64) + " %"
}

// Interval writes an interval with the digits its value calls for; see IntervalAt.
func Interval(v float64, iv fit.Interval) string { return IntervalAt(v, iv, LastDigit(v, iv)) }

// IntervalAt writes the interval iv of the value v, both ends rounded at
// 10^last:
//
//	2.81–3.08 × 10⁻¹¹    (one shared power of ten when the ends are of the value's order)
//	4.0 × 10⁻¹⁴ – 2.1 × 10⁻¹⁰   (each end its own power when they span decades)
//	−0.12 to 0.30        (a negative end: "to", not a dash)
//	> 3.1 × 10⁻¹² (upper bound not determined by the data)
//	< 7.7 (lower bound not determined by the data)
//	not bounded by the data
func IntervalAt(v float64, iv fit.Interval, last int) string {
	loOK, hiOK := finite(iv.Lo), finite(iv.Hi)
	switch {
	case !loOK && !hiOK:
		return "not bounded by the data"
	case !hiOK:
		return "> " + Sig(iv.Lo, 2) + " (upper bound not determined by the data)"
	case !loOK:
		return "< " + Sig(iv.Hi, 2) + " (lower bound not determined by the data)"
	}
	sep := "–"
	if iv.Lo < 0 || iv.Hi < 0 {
		sep = " to "
	}
	ref := v
	if !finite(ref) || ref == 0 {
		ref = math.Max(math.Abs(iv.Lo), math.Abs(iv.Hi))
	}
	if useSci(ref) {
		e := exp10(roundAt(ref, last))
		if scaleSafe(ref, last) && scaleSafe(iv.Lo, last) && scaleSafe(iv.Hi, last) && shareExponent(iv, e) {
			return mantissa(roundAt(iv.Lo, last), e, last) + sep + mantissa(roundAt(iv.Hi, last), e, last) + times10 + Superscript(e)
		}
		if sep == "–" {
			sep = " – "
		}
		return Sig(iv.Lo, 2) + sep + Sig(iv.Hi, 2)
	}
	lo, hi := roundAt(iv.Lo, last), roundAt(iv.Hi, last)
	if useSci(lo) && lo != 0 || useSci(hi) {
		if sep == "–" {
			sep = " – "
		}
		return Sig(iv.Lo, 2) + sep + Sig(iv.Hi, 2)
	}
	return plain(lo, last) + sep + plain(hi, last)
}

// shareExponent tells whether both ends read well as mantissas of 10^e:
// neither below 0.1·10^e (which would show as 0.0x) nor at or above
// 100·10^e, and, for positive ends, less than a decade apart (a wider
// interval is written end by end, each with two digits).
func shareExponent(iv fit.Interval, e int) bool {
	p := math.Pow(10, float64(e))
	for _, b := range []float64{iv.Lo, iv.Hi} {
		a := math.Abs(b) / p
		if b != 0 && (a < 0.1 || a >= 100) {
			return false
		}
	}
	if iv.Lo > 0 && iv.Hi/iv.Lo >= 10 {
		return false
	}
	return true
}

// PrettyUnit writes an internal unit for people: "m2/s" → "m²/s",
// "J/mol" stays, "value*m" → "value·m", "1/m" → "m⁻¹".
func PrettyUnit(u string) string {
	r := strings.NewReplacer("m2/s", "m²/s", "cm2", "cm²", "um2", "µm²", "m2", "m²", "m3", "m³",
		"1/m", "m⁻¹", "1/K", "K⁻¹", "1/s", "s⁻¹", "*", "·", "um", "µm")
	return r.Replace(u)
}

// DAlternative writes a diffusion coefficient (m²/s) in the unit that reads
// best beside it: µm²/s for 10⁻¹⁵ ≤ D < 10⁻⁸ m²/s ("29.4 µm²/s"), cm²/s
// otherwise ("0.32 cm²/s", "2.9 × 10⁻¹⁵ cm²/s" is never chosen for small D).
// The digits follow the interval as in Estimate. It returns "" for D ≤ 0.
func DAlternative(d float64, iv fit.Interval) string { return numFmt{}.dAlternative(d, iv) }

// dAlternative is DAlternative with n's digits for a value without an interval.
func (n numFmt) dAlternative(d float64, iv fit.Interval) string {
	if !(d > 0) || !finite(d) {
		return ""
	}
	last := n.lastDigit(d, iv)
	f, unit := 1e-4, "cm²/s"
	if d >= 1e-15 && d < 1e-8 {
		f, unit = 1e-12, "µm²/s"
	}
	shift := int(math.Round(math.Log10(f)))
	if !finite(d / f) {
		return ""
	}
	return Number(d/f, last-shift) + " " + unit
}

// TempUnit is the temperature unit a user reads and writes.
type TempUnit string

// Temperature units. The zero value "" means degrees Celsius.
const (
	Celsius    TempUnit = "C"
	Kelvin     TempUnit = "K"
	Fahrenheit TempUnit = "F"
)

// ParseTempUnit accepts "C", "°C", "celsius", "K", "kelvin", "F", "°F",
// "fahrenheit" (any case); "" means Celsius.
func ParseTempUnit(s string) (TempUnit, error) {
	switch strings.ToLower(strings.TrimPrefix(strings.TrimSpace(s), "°")) {
	case "", "c", "celsius", "degc":
		return Celsius, nil
	case "k", "kelvin":
		return Kelvin, nil
	case "f", "fahrenheit", "degf":
		return Fahrenheit, nil
	}
	return "", fmt.Errorf("unknown temperature unit %q: use C, K or F", s)
}

// String is the unit's flag form: "C", "K" or "F" ("" is "C").
func (u TempUnit) String() string {
	if u == "" {
		return string(Celsius)
	}
	return string(u)
}

// MarshalText writes the unit's flag form.
func (u TempUnit) MarshalText() ([]byte, error) { return []byte(u.String()), nil }

// UnmarshalText reads a unit as ParseTempUnit does.
func (u *TempUnit) UnmarshalText(b []byte) error {
	v, err := ParseTempUnit(string(b))
	if err != nil {
		return err
	}
	*u = v
	return nil
}

// Symbol is the unit's symbol: "°C", "K", "°F".
func (u TempUnit) Symbol() string {
	switch u {
	case Kelvin:
		return "K"
	case Fahrenheit:
		return "°F"
	}
	return "°C"
}

// scale is the unit as the profile package's temperature scale, which
// holds the conversion formulas for both edges of the program.
func (u TempUnit) scale() profile.TemperatureScale {
	switch u {
	case Kelvin:
		return profile.Kelvin
	case Fahrenheit:
		return profile.Fahrenheit
	}
	return profile.Celsius
}

// FromKelvin converts a temperature in K to the unit.
func (u TempUnit) FromKelvin(k float64) float64 { return u.scale().FromKelvin(k) }

// ToKelvin converts a temperature in the unit to K.
func (u TempUnit) ToKelvin(t float64) float64 { return u.scale().ToKelvin(t) }

// trimmed writes v with at most dec decimals and no trailing zeros; from
// 10¹⁵ on, with six significant digits as "m × 10ⁿ".
func trimmed(v float64, dec int) string {
	if !finite(v) {
		return "n/a"
	}
	if math.Abs(v) >= 1e15 {
		return Sig(v, 6)
	}
	s := strconv.FormatFloat(roundAt(v, -dec), 'f', dec, 64)
	if strings.Contains(s, ".") {
		s = strings.TrimRight(strings.TrimRight(s, "0"), ".")
	}
	if s == "-0" {
		s = "0"
	}
	return strings.Replace(s, "-", minus, 1)
}

// Temperature writes a given temperature (K) in the user's unit with kelvin
// beside: "925 °C (1198.15 K)"; in kelvin alone when the unit is K. Values
// are written to at most two decimals without trailing zeros. 0 (not given)
// is written "not given"; a temperature beyond 10⁶ K (no solid, a sign of
// a wrong number) in kelvin alone, "1.00 × 10³⁰⁸ K".
func Temperature(k float64, u TempUnit) string {
	if k == 0 {
		return "not given"
	}
	if !finite(k) {
		return "n/a"
	}
	if u == Kelvin || math.Abs(k) >= 1e6 {
		return trimmed(k, 2) + " K"
	}
	return trimmed(u.FromKelvin(k), 2) + " " + u.Symbol() + " (" + trimmed(k, 2) + " K)"
}

// TemperatureShort writes a temperature in the user's unit only: "925 °C"
// (beyond 10⁶ K in kelvin, as Temperature).
func TemperatureShort(k float64, u TempUnit) string {
	if k == 0 {
		return "not given"
	}
	if !finite(k) || math.Abs(k) >= 1e6 {
		return Temperature(k, Kelvin)
	}
	return trimmed(u.FromKelvin(k), 1) + " " + u.Symbol()
}

// TemperatureEstimate writes an estimated temperature with its interval,
// digits following the interval, in the user's unit with kelvin beside:
// "931 °C (1204 K), 95 % CI 918–944 °C".
func TemperatureEstimate(k float64, iv fit.Interval, level float64, u TempUnit) string {
	return numFmt{}.temperatureEstimate(k, iv, level, u)
}

// temperatureEstimate is TemperatureEstimate with n's digits.
func (n numFmt) temperatureEstimate(k float64, iv fit.Interval, level float64, u TempUnit) string {
	if !finite(k) || math.Abs(k) >= 1e6 {
		// No solid: a wrong number; kelvin alone, in powers of ten.
		return n.estimate(k, iv, level, "K")
	}
	// The digits are decided on the kelvin interval; a °F step is smaller,
	// which the scale factor allows for.
	last := n.lastDigit(k, iv)
	lastU := n.lastDigit(u.FromKelvin(k), fit.Interval{Lo: u.FromKelvin(iv.Lo), Hi: u.FromKelvin(iv.Hi)})
	if !finite(iv.Lo) || !finite(iv.Hi) {
		last, lastU = 0, 0
	}
	if last > 0 {
		last = 0
	}
	if lastU > 0 {
		lastU = 0
	}
	val := func(t float64) string { return plain(roundAt(t, lastU), lastU) }
	var s string
	if u == Kelvin {
		s = plain(roundAt(k, last), last) + " K"
	} else {
		s = val(u.FromKelvin(k)) + " " + u.Symbol() + " (" + plain(roundAt(k, last), last) + " K)"
	}
	ivU := fit.Interval{Lo: u.FromKelvin(iv.Lo), Hi: u.FromKelvin(iv.Hi)}
	if !finite(iv.Lo) {
		ivU.Lo = math.NaN()
	}
	if !finite(iv.Hi) {
		ivU.Hi = math.NaN()
	}
	var ci string
	switch {
	case !finite(ivU.Lo) && !finite(ivU.Hi):
		ci = "not bounded by the data"
	case !finite(ivU.Hi):
		ci = "> " + val(ivU.Lo) + " " + u.Symbol() + " (upper bound not determined by the data)"
	case !finite(ivU.Lo):
		ci = "< " + val(ivU.Hi) + " " + u.Symbol() + " (lower bound not determined by the data)"
	default:
		sep := "–"
		if ivU.Lo < 0 || ivU.Hi < 0 {
			sep = " to "
		}
		ci = val(ivU.Lo) + sep + val(ivU.Hi) + " " + u.Symbol()
	}
	return s + ", " + Level(level) + " CI " + ci
}

// Duration writes a time given in s: "45 s", "90 min", "1 h", "4 h",
// "4.5 h", "36 h". Below 2 min in s, below 2 h in min (whole hours in h),
// otherwise in h; at most two decimals, no trailing zeros. Below 0.01 s and
// from 10⁶ h on, three significant digits ("2.78 × 10³⁰⁴ h"). 0 (not
// given) is written "not given".
func Duration(s float64) string {
	switch {
	case s == 0:
		return "not given"
	case !finite(s):
		return "n/a"
	case math.Abs(s) < 0.01:
		return Sig(s, DefaultDigits) + " s"
	case math.Abs(s/3600) >= 1e6:
		return Sig(s/3600, DefaultDigits) + " h"
	case math.Abs(s) < 120:
		return trimmed(s, 2) + " s"
	case math.Abs(s) < 7200 && math.Abs(s/3600-math.Round(s/3600)) > 1e-9:
		return trimmed(s/60, 2) + " min"
	}
	return trimmed(s/3600, 2) + " h"
}

// DurationEstimate writes an estimated time with its interval, digits
// following the interval: "6.2 h, 95 % CI 5.8–6.7 h".
func DurationEstimate(s float64, iv fit.Interval, level float64) string {
	return numFmt{}.durationEstimate(s, iv, level)
}

// durationEstimate is DurationEstimate with n's digits.
func (n numFmt) durationEstimate(s float64, iv fit.Interval, level float64) string {
	f, unit := 3600.0, "h"
	switch {
	case math.Abs(s) < 120:
		f, unit = 1, "s"
	case math.Abs(s) < 7200:
		f, unit = 60, "min"
	}
	scaled := fit.Interval{Lo: iv.Lo / f, Hi: iv.Hi / f}
	out := n.estimate(s/f, scaled, level, unit)
	if finite(iv.Lo) && finite(iv.Hi) && !degenerate(s, iv) {
		out += " " + unit
	}
	return out
}

// DepthScale chooses the unit for depths up to max (m): µm below 1 mm,
// otherwise mm. It returns the factor to divide metres by and the symbol.
func DepthScale(max float64) (factor float64, unit string) {
	if math.Abs(max) < 1e-3 {
		return 1e-6, "µm"
	}
	return 1e-3, "mm"
}

// Depth writes a depth (m) in µm below 1 mm, otherwise in mm, to four
// significant digits at most: "250 µm", "1.25 mm".
func Depth(m float64) string {
	if !finite(m) {
		return "n/a"
	}
	if math.Abs(m) >= 1e3 {
		return Sig(m, 4) + " m"
	}
	f, unit := DepthScale(m)
	v := m / f
	if a := math.Abs(v); a != 0 && a < 1e-3 {
		return Sig(v, 4) + " " + unit
	}
	last := SigDigits(v, 4)
	if last > 0 {
		last = 0
	}
	return trimmed(roundAt(v, last), -last) + " " + unit
}

// Align is the horizontal alignment of a table column.
type Align int

// Column alignments. The zero value aligns left.
const (
	Left Align = iota
	Right
)

// Table is a plain-text table with aligned columns, for terminals and text
// reports. Widths are counted in runes: every character used in this
// package's output (×, ⁻, µ, °, −) is one column wide in a monospaced font.
type Table struct {
	Header []string
	// Align holds each column's alignment; missing entries align left.
	Align []Align
	Rows  [][]string
	// Indent is written before every line.
	Indent string
	// Gap is the number of spaces between columns; 0 means 2.
	Gap int
}

// Add appends a row.
func (t *Table) Add(cells ...string) { t.Rows = append(t.Rows, cells) }

// WriteTo writes the table: header, a rule of "─", rows. Trailing spaces
// are trimmed from every line.
func (t *Table) WriteTo(w io.Writer) (int64, error) {
	ncol := len(t.Header)
	for _, r := range t.Rows {
		if len(r) > ncol {
			ncol = len(r)
		}
	}
	width := make([]int, ncol)
	measure := func(r []string) {
		for i, c := range r {
			if n := utf8.RuneCountInString(c); n > width[i] {
				width[i] = n
			}
		}
	}
	measure(t.Header)
	for _, r := range t.Rows {
		measure(r)
	}
	gap := t.Gap
	if gap <= 0 {
		gap = 2
	}
	var b strings.Builder
	line := func(r []string) {
		var l strings.Builder
		l.WriteString(t.Indent)
		for i := 0; i < ncol; i++ {
			c := ""
			if i < len(r) {
				c = r[i]
			}
			pad := strings.Repeat(" ", width[i]-utf8.RuneCountInString(c))
			if i < len(t.Align) && t.Align[i] == Right {
				l.WriteString(pad + c)
			} else {
				l.WriteString(c + pad)
			}
			if i < ncol-1 {
				l.WriteString(strings.Repeat(" ", gap))
			}
		}
		b.WriteString(strings.TrimRight(l.String(), " "))
		b.WriteByte('\n')
	}
	if len(t.Header) > 0 {
		line(t.Header)
		total := 0
		for i, wd := range width {
			total += wd
			if i < ncol-1 {
				total += gap
			}
		}
		b.WriteString(t.Indent + strings.Repeat("─", total) + "\n")
	}
	for _, r := range t.Rows {
		line(r)
	}
	n, err := io.WriteString(w, b.String())
	return int64(n), err
}

// String returns the table as text.
func (t *Table) String() string {
	var b strings.Builder
	t.WriteTo(&b) //nolint:errcheck // strings.Builder never fails
	return b.String()
}

// csvGiven writes a quantity for which 0 means "not given" (a hold time, a
// temperature in kelvin): empty when not given, else as csvNumber.
func csvGiven(v float64) string {
	if v == 0 {
		return ""
	}
	return csvNumber(v)
}

// csvNumber writes a number for CSV files: shortest round-trip form, empty
// for NaN and ±Inf (not determined).
func csvNumber(v float64) string {
	if !finite(v) {
		return ""
	}
	return strconv.FormatFloat(v, 'g', -1, 64)
}
