package profile

import (
	"math"
	"strconv"
	"strings"
	"unicode"
	"unicode/utf8"
)

// Conversion factors to SI. Exact by definition of the units:
// NIST SP 811 (2008), Appendix B ("Conversion factors"), values from memory:
// 1 in = 0.0254 m exactly, 1 mil (thou) = 2.54e-5 m exactly, 1 min = 60 s,
// 1 h = 3600 s, 1 d = 86400 s; T/K = t/°C + 273.15; T/K = (t/°F + 459.67)·5/9.
const (
	metresPerInch = 0.0254
	metresPerMil  = 2.54e-5
	kelvinAt0C    = 273.15
)

// Bounds of the quantities the readers accept (common practice, no
// source). They are generous by orders of magnitude and exist to catch a
// wrong unit or a pasted overflow such as 1e308 at the line that holds it,
// before the number reaches a fit whose arithmetic would overflow.
const (
	// maxKelvin bounds hold temperatures and their uncertainty: no solid
	// material survives 6000 K.
	maxKelvin = 6000
	// maxSeconds and minSeconds bound hold times: about 317 years, and a
	// nanosecond (pulsed-laser treatments are the shortest).
	maxSeconds = 1e10
	minSeconds = 1e-9
	// maxMetres bounds depths, positions and thicknesses: no diffusion
	// profile is a metre deep.
	maxMetres = 1
	// maxMeasured bounds measured values, sigma and calibration values in
	// the file's own unit (one part per billion of a whole is 1e9).
	maxMeasured = 1e12
	// minSigma is the smallest standard uncertainty read, in the value's
	// unit; below it the weights 1/σ² would dwarf everything else.
	minSigma = 1e-12
	// minDiffusivity and maxDiffusivity bound a tabulated D(C): solids
	// diffuse at 1e-30 m²/s and more, gases at about 1e-5 m²/s.
	minDiffusivity = 1e-40
	maxDiffusivity = 1e-2
)

// checkKelvin refuses a temperature k (kelvin) at or below absolute zero
// or above maxKelvin; s is the temperature as written.
func checkKelvin(k float64, s string) error {
	switch {
	case !(k > 0):
		return errorf(ErrValue, "temperature %s is %s K, not above absolute zero", s, fmtNum(k))
	case k > maxKelvin:
		return errorf(ErrValue, "temperature %s is above %d K (no solid survives that)", s, maxKelvin)
	}
	return nil
}

// checkSeconds refuses a time t (seconds) outside [minSeconds, maxSeconds];
// s is the time as written.
func checkSeconds(t float64, s string) error {
	switch {
	case !(t > 0):
		return errorf(ErrValue, "time %s is not positive", s)
	case t > maxSeconds:
		return errorf(ErrValue, "time %s is longer than 1e10 s (317 years)", s)
	case t < minSeconds:
		return errorf(ErrValue, "time %s is shorter than 1 ns", s)
	}
	return nil
}

// checkMetres refuses a length m (metres) beyond maxMetres; s is the
// length as written.
func checkMetres(m float64, what, s string) error {
	if math.Abs(m) > maxMetres || math.IsNaN(m) {
		return errorf(ErrValue, "%s %s is beyond 1 m (no diffusion profile is that deep)", what, s)
	}
	return nil
}

// checkSigma refuses a standard uncertainty outside [minSigma, maxMeasured].
func checkSigma(v float64, s string) error {
	switch {
	case v > maxMeasured:
		return errorf(ErrValue, "sigma %s is beyond 1e12, too large to be an uncertainty in any unit", s)
	case v < minSigma:
		return errorf(ErrValue, "sigma %s is below 1e-12: a weight 1/σ² that large would swamp every other point", s)
	}
	return nil
}

// checkMeasured refuses a measured number beyond ±maxMeasured; what names
// it and s is the number as written.
func checkMeasured(v float64, what, s string) error {
	if math.Abs(v) > maxMeasured || math.IsNaN(v) {
		return errorf(ErrValue, "%s %s is beyond ±1e12, too large to be a measurement in any unit", what, s)
	}
	return nil
}

// linear is a unit that is a fixed multiple of the SI unit. For decimal
// submultiples the value is divided by an exact power of ten (50 µm gives
// exactly the double nearest 5e-5 m); other units are multiplied.
type linear struct{ mul, div float64 }

// si converts v to the SI unit.
func (l linear) si(v float64) float64 {
	if l.div != 1 {
		return v / l.div
	}
	return v * l.mul
}

// factor returns SI units per unit.
func (l linear) factor() float64 { return l.mul / l.div }

var (
	metre = linear{1, 1}
	micro = linear{1, 1e6}
	inch  = linear{metresPerInch, 1}
	mil   = linear{metresPerMil, 1}
)

// lengthUnits maps a lower-case unit spelling to its size.
var lengthUnits = map[string]linear{
	"m": metre, "cm": {1, 1e2}, "mm": {1, 1e3}, "nm": {1, 1e9},
	"um": micro, "µm": micro, "μm": micro, "micron": micro, "microns": micro,
	"micrometre": micro, "micrometer": micro, "micrometres": micro, "micrometers": micro,
	"in": inch, "inch": inch, "inches": inch,
	"mil": mil, "mils": mil, "thou": mil,
}

// durationUnits maps a lower-case unit spelling to its size.
var durationUnits = map[string]linear{
	"s": {1, 1}, "sec": {1, 1}, "secs": {1, 1}, "second": {1, 1}, "seconds": {1, 1},
	"min": {60, 1}, "mins": {60, 1}, "minute": {60, 1}, "minutes": {60, 1},
	"h": {3600, 1}, "hr": {3600, 1}, "hrs": {3600, 1}, "hour": {3600, 1}, "hours": {3600, 1},
	"d": {86400, 1}, "day": {86400, 1}, "days": {86400, 1},
}

const (
	validLengthUnits      = "m, cm, mm, um (µm), nm, in, mil"
	validDurationUnits    = "s, min, h (hr), d"
	validTemperatureUnits = "K, C (°C) or F (°F)"
)

// TemperatureScale is a temperature unit. Its zero value is not a scale.
type TemperatureScale int

// The temperature scales a file may use.
const (
	Kelvin TemperatureScale = iota + 1
	Celsius
	Fahrenheit
)

// String returns the unit symbol: "K", "°C" or "°F".
func (s TemperatureScale) String() string {
	switch s {
	case Kelvin:
		return "K"
	case Celsius:
		return "°C"
	case Fahrenheit:
		return "°F"
	}
	return "?"
}

// ToKelvin converts a temperature on scale s to kelvin:
// T = t + 273.15 for °C and T = (t − 32)·5/9 + 273.15 for °F
// (NIST SP 811 (2008), Appendix B.8, values from memory).
func (s TemperatureScale) ToKelvin(v float64) float64 {
	switch s {
	case Celsius:
		return v + kelvinAt0C
	case Fahrenheit:
		return (v-32)*5/9 + kelvinAt0C
	}
	return v
}

// FromKelvin converts a temperature in kelvin to scale s (the inverse of
// ToKelvin).
func (s TemperatureScale) FromKelvin(k float64) float64 {
	switch s {
	case Celsius:
		return k - kelvinAt0C
	case Fahrenheit:
		return (k-kelvinAt0C)*9/5 + 32
	}
	return k
}

// DeltaToKelvin converts a temperature difference on scale s to kelvin:
// 1 °C = 1 K and 1 °F = 5/9 K as differences.
func (s TemperatureScale) DeltaToKelvin(d float64) float64 {
	if s == Fahrenheit {
		return d * 5 / 9
	}
	return d
}

// degreeSigns removes degree signs (and their look-alikes) from a unit.
var degreeSigns = strings.NewReplacer("℃", "c", "℉", "f", "°", "", "º", "", "˚", "")

// TemperatureUnit returns the scale named by u: "K", "C", "°C", "degC",
// "celsius", "F", "°F", "kelvin"… (case-insensitive).
func TemperatureUnit(u string) (TemperatureScale, error) {
	n := degreeSigns.Replace(strings.ToLower(strings.TrimSpace(u)))
	n = strings.TrimPrefix(strings.TrimPrefix(n, "degrees"), "deg")
	n = strings.TrimSpace(n)
	switch n {
	case "k", "kelvin":
		return Kelvin, nil
	case "c", "celsius", "centigrade":
		return Celsius, nil
	case "f", "fahrenheit":
		return Fahrenheit, nil
	}
	return 0, unknownUnit("temperature", u, validTemperatureUnits)
}

// LengthUnit returns the number of metres in one u: "mm" → 1e-3,
// "um"/"µm" → 1e-6, "in" → 0.0254, "mil" → 2.54e-5 (case-insensitive).
func LengthUnit(u string) (float64, error) {
	l, err := lengthUnit(u)
	if err != nil {
		return 0, err
	}
	return l.factor(), nil
}

func lengthUnit(u string) (linear, error) {
	if l, ok := lengthUnits[strings.ToLower(strings.TrimSpace(u))]; ok {
		return l, nil
	}
	return linear{}, unknownUnit("length", u, validLengthUnits)
}

// DurationUnit returns the number of seconds in one u: "s" → 1,
// "min" → 60, "h"/"hr" → 3600, "d" → 86400 (case-insensitive).
func DurationUnit(u string) (float64, error) {
	l, err := durationUnit(u)
	if err != nil {
		return 0, err
	}
	return l.factor(), nil
}

func durationUnit(u string) (linear, error) {
	if l, ok := durationUnits[strings.ToLower(strings.TrimSpace(u))]; ok {
		return l, nil
	}
	return linear{}, unknownUnit("time", u, validDurationUnits)
}

func unknownUnit(what, u, valid string) error {
	if strings.TrimSpace(u) == "" {
		return errorf(ErrUnit, "no %s unit given (use %s)", what, valid)
	}
	return errorf(ErrUnit, "unknown %s unit %s (use %s)", what, quote(u), valid)
}

// ParseTemperature reads a temperature with its unit, "925 C", "925°C",
// "1198 K", "1700 F", and returns kelvin. The result must be above 0 K
// and at most 6000 K.
func ParseTemperature(s string) (float64, error) {
	v, u, err := splitQuantity(s, "temperature", "925 C or 1198 K")
	if err != nil {
		return 0, err
	}
	sc, err := TemperatureUnit(u)
	if err != nil {
		return 0, err
	}
	k := sc.ToKelvin(v)
	if err := checkKelvin(k, quote(s)); err != nil {
		return 0, err
	}
	return k, nil
}

// ParseTemperatureDelta reads a temperature difference with its unit, such
// as the uncertainty "3 K", "3 C" or "5 F", and returns kelvin (1 °F = 5/9 K).
// The difference must not be negative nor above 6000 K.
func ParseTemperatureDelta(s string) (float64, error) {
	v, u, err := splitQuantity(s, "temperature difference", "3 K or 3 C")
	if err != nil {
		return 0, err
	}
	sc, err := TemperatureUnit(u)
	if err != nil {
		return 0, err
	}
	if v < 0 {
		return 0, errorf(ErrValue, "temperature difference %s is negative", quote(s))
	}
	d := sc.DeltaToKelvin(v)
	if d > maxKelvin {
		return 0, errorf(ErrValue, "temperature difference %s is above %d K", quote(s), maxKelvin)
	}
	return d, nil
}

// ParseDuration reads a time with its unit, "4 h", "90 min", "3600 s",
// "1.5 d", "2 hr", or a sum of such terms ("4 h 30 min"), and returns
// seconds. The result must lie between 1 ns and 1e10 s (317 years).
func ParseDuration(s string) (float64, error) {
	total, rest := 0.0, s
	for {
		v, u, tail, err := nextQuantity(rest, "time", "4 h or 90 min")
		if err != nil {
			return 0, err
		}
		f, err := durationUnit(u)
		if err != nil {
			return 0, err
		}
		if v < 0 {
			return 0, errorf(ErrValue, "time %s is negative", quote(s))
		}
		total += f.si(v)
		if rest = tail; strings.TrimSpace(rest) == "" {
			break
		}
	}
	if err := checkSeconds(total, quote(s)); err != nil {
		return 0, err
	}
	return total, nil
}

// ParseLength reads a length with its unit, "12 mm", "0.5 in", "20 mil",
// "800 µm", "0.0012 m", and returns metres. Negative lengths and lengths
// beyond 1 m are refused.
func ParseLength(s string) (float64, error) {
	v, u, err := splitQuantity(s, "length", "12 mm or 0.5 in")
	if err != nil {
		return 0, err
	}
	f, err := lengthUnit(u)
	if err != nil {
		return 0, err
	}
	if v < 0 {
		return 0, errorf(ErrValue, "length %s is negative", quote(s))
	}
	m := f.si(v)
	if err := checkMetres(m, "length", quote(s)); err != nil {
		return 0, err
	}
	return m, nil
}

// splitQuantity splits "925,5 °C" into 925.5 and "°C"; the whole string
// must be one number and one unit.
func splitQuantity(s, what, example string) (float64, string, error) {
	v, u, tail, err := nextQuantity(s, what, example)
	if err == nil && strings.TrimSpace(tail) != "" {
		err = errorf(ErrUnit, "unknown %s unit %s", what, quote(strings.TrimSpace(u+" "+tail)))
	}
	return v, u, err
}

// nextQuantity reads one number and the unit word after it from s and
// returns the rest of s (starting at the next number, if any).
func nextQuantity(s, what, example string) (v float64, unit, tail string, err error) {
	s = strings.TrimSpace(s)
	n := numberPrefix(s)
	if n == 0 {
		if s == "" {
			return 0, "", "", errorf(ErrNumber, "no %s given (write e.g. %s)", what, example)
		}
		return 0, "", "", errorf(ErrNumber, "%s does not start with a number (write e.g. %s)", quote(s), example)
	}
	num := s[:n]
	if ambiguousComma(num) {
		return 0, "", "", errorf(ErrNumber, "%s is ambiguous: decimal comma or thousands separator? (write %s or %s)",
			quote(num), clip(strings.ReplaceAll(num, ",", ".")), clip(strings.ReplaceAll(num, ",", "")))
	}
	if v, err = parseNumber(num, true); err != nil {
		return 0, "", "", err
	}
	rest := strings.TrimSpace(s[n:])
	m := unitPrefix(rest)
	unit, tail = strings.TrimSpace(rest[:m]), rest[m:]
	if unit == "" {
		return 0, "", "", errorf(ErrUnit, "no unit in %s (write e.g. %s)", quote(s), example)
	}
	return v, unit, tail, nil
}

// unitPrefix returns the length of the unit word at the start of s: it
// runs up to the next digit or sign that starts another term.
func unitPrefix(s string) int {
	for i, r := range s {
		if unicode.IsDigit(r) || r == '+' || r == '-' || r == '−' {
			return i
		}
	}
	return len(s)
}

// numberPrefix returns the length of the decimal number at the start of s
// (sign, digits, one '.' or ',', exponent), or 0 if there is none.
func numberPrefix(s string) int {
	i := 0
	if r, w := utf8.DecodeRuneInString(s); r == '+' || r == '-' || r == '−' {
		i = w
	}
	digits := 0
	for ; i < len(s) && s[i] >= '0' && s[i] <= '9'; i++ {
		digits++
	}
	if i < len(s) && (s[i] == '.' || s[i] == ',') {
		i++
		for ; i < len(s) && s[i] >= '0' && s[i] <= '9'; i++ {
			digits++
		}
	}
	if digits == 0 {
		return 0
	}
	if i < len(s) && (s[i] == 'e' || s[i] == 'E') {
		j := i + 1
		if j < len(s) && (s[j] == '+' || s[j] == '-') {
			j++
		}
		k := j
		for ; k < len(s) && s[k] >= '0' && s[k] <= '9'; k++ {
		}
		if k > j {
			i = k
		}
	}
	return i
}

// ambiguousComma reports numbers like "1,000" or "12,500" that read as a
// thousands separator in one locale and a decimal comma in another.
// A leading zero ("0,125") is never a thousands group.
func ambiguousComma(s string) bool {
	s = strings.TrimLeft(s, "+-−")
	i := strings.IndexByte(s, ',')
	if i < 1 || i > 3 || s[0] == '0' {
		return false
	}
	frac := s[i+1:]
	if len(frac) != 3 {
		return false
	}
	for _, c := range frac {
		if c < '0' || c > '9' {
			return false
		}
	}
	return true
}

// parseNumber parses a decimal number as people and spreadsheets write
// it: optional sign ('+', '-' or the minus sign U+2212), digits, one
// decimal point, optional exponent. With comma set, a single ',' is taken
// as the decimal separator. Thousands separators, hexadecimal, "NaN" and
// "Inf" are refused.
func parseNumber(s string, comma bool) (float64, error) {
	t := strings.TrimSpace(s)
	if strings.HasPrefix(t, "−") {
		t = "-" + t[len("−"):]
	}
	if comma && strings.Count(t, ",") == 1 && !strings.Contains(t, ".") {
		t = strings.Replace(t, ",", ".", 1)
	}
	if t == "" {
		return 0, errorf(ErrNumber, "the cell is blank")
	}
	if !plainDecimal(t) {
		return 0, errorf(ErrNumber, "%s is not a number", quote(s))
	}
	v, err := strconv.ParseFloat(t, 64)
	if err != nil || math.IsInf(v, 0) || math.IsNaN(v) {
		return 0, errorf(ErrNumber, "%s is not a finite number", quote(s))
	}
	return v, nil
}

// plainDecimal reports whether t is [sign] digits [. digits] [e [sign] digits]
// with at least one mantissa digit.
func plainDecimal(t string) bool {
	return numberPrefix(t) == len(t) && !strings.Contains(t, ",") && !strings.HasPrefix(t, "−")
}

// fmtNum formats a number compactly for messages.
func fmtNum(v float64) string { return strconv.FormatFloat(v, 'g', 6, 64) }
