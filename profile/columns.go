package profile

import (
	"regexp"
	"strings"
	"unicode/utf8"
)

// colKind says what a column holds.
type colKind int

const (
	colUnknown   colKind = iota // measured value or text, decided on the first data row
	colIgnore                   // blank header
	colID                       // profile id (long tables)
	colDepth                    // depth, converted to m
	colValue                    // measured value, file unit
	colSigma                    // standard uncertainty of the value
	colTemp                     // hold temperature, converted to K
	colTime                     // hold time, converted to s
	colTempSigma                // uncertainty of the temperature, K
	colThickness                // specimen thickness, m
	colLot                      // lot name
	colMaterial                 // material name
	colQuantity                 // what was measured
	colText                     // any other text, kept in Meta
)

// describe names a kind in messages.
func (k colKind) describe() string {
	switch k {
	case colID:
		return "profile id"
	case colDepth:
		return "depth"
	case colValue, colUnknown:
		return "value"
	case colSigma:
		return "sigma"
	case colTemp:
		return "temperature"
	case colTime:
		return "time"
	case colTempSigma:
		return "temperature sigma"
	case colThickness:
		return "thickness"
	case colLot:
		return "lot"
	case colMaterial:
		return "material"
	case colQuantity:
		return "quantity"
	}
	return "text"
}

// perProfile reports kinds whose cells must be constant within a profile.
func (k colKind) perProfile() bool { return k >= colTemp }

// numeric reports kinds whose cells are numbers with a unit in the header.
func (k colKind) numeric() bool { return k >= colTemp && k <= colThickness }

// column is one classified header cell.
type column struct {
	kind  colKind
	name  string // header as written (trimmed)
	key   string // lower-case header, the Meta key
	unit  string // unit as written in the header
	size  linear // for depth, time and thickness: the unit's size
	scale TemperatureScale
	// For value candidates: what the header says was measured.
	quantity, valueUnit string
	// signed marks a position column (across a couple's interface), which
	// may hold negative values.
	signed bool
}

var idNames = map[string]bool{
	"profile": true, "id": true, "specimen": true, "sample": true,
	"profile_id": true, "specimen_id": true, "sample_id": true,
}

// splitHeader splits a header into its name and unit: "depth_mm",
// "depth (mm)", "depth [in]", "depth/mm", "depth mm" all give ("depth", "mm");
// "C_wt%" gives ("C", "wt%"); "HV0.5" gives ("HV0.5", "").
func splitHeader(h string) (root, unit string) {
	h = strings.TrimSpace(h)
	if n := len(h); n > 1 && (h[n-1] == ')' || h[n-1] == ']') {
		open := byte('(')
		if h[n-1] == ']' {
			open = '['
		}
		if i := strings.LastIndexByte(h, open); i > 0 {
			return strings.TrimRight(h[:i], " _-"), strings.TrimSpace(h[i+1 : n-1])
		}
	}
	for _, sep := range []string{"_", " ", "/"} {
		if i := strings.LastIndex(h, sep); i > 0 && i < len(h)-1 {
			return strings.TrimRight(h[:i], " _-"), strings.TrimSpace(h[i+1:])
		}
	}
	return h, ""
}

// normKey lower-cases a name and joins its words with '_':
// "Temperature Sigma" → "temperature_sigma".
func normKey(s string) string {
	f := strings.FieldsFunc(strings.ToLower(s), func(r rune) bool {
		return r == ' ' || r == '_' || r == '-' || r == '\t'
	})
	return strings.Join(f, "_")
}

// latin1 returns s as UTF-8, reading it as ISO 8859-1 when it is not valid
// UTF-8 (spreadsheet exports on Windows write "°" and "µ" as one byte).
func latin1(s string) string {
	if utf8.ValidString(s) {
		return s
	}
	r := make([]rune, len(s))
	for i := 0; i < len(s); i++ {
		r[i] = rune(s[i])
	}
	return string(r)
}

// classify decides what a header cell names. Unit errors (a depth column
// without a unit, an unknown unit) are returned as errors of kind ErrUnit.
func classify(h string) (column, error) {
	name := strings.TrimSpace(latin1(h))
	c := column{name: name, key: strings.ToLower(name)}
	if name == "" {
		c.kind = colIgnore
		return c, nil
	}
	full := normKey(name)
	switch {
	case idNames[full]:
		c.kind = colID
		return c, nil
	case full == "lot":
		c.kind = colLot
		return c, nil
	case full == "material":
		c.kind = colMaterial
		return c, nil
	case full == "quantity":
		c.kind = colQuantity
		return c, nil
	case full == "sigma":
		c.kind = colSigma
		return c, nil
	}
	root, unit := splitHeader(name)
	c.unit = unit
	switch r := normKey(root); {
	case r == "depth" || r == "distance":
		return withLength(c, colDepth)
	case r == "position":
		c.signed = true
		return withLength(c, colDepth)
	case r == "thickness":
		return withLength(c, colThickness)
	case r == "temperature_sigma" || r == "temp_sigma" || r == "sigma_temperature" || r == "sigma_t":
		return withTemperature(c, colTempSigma)
	case r == "temperature" || r == "temp":
		return withTemperature(c, colTemp)
	case r == "time" || r == "elapsed":
		return withDuration(c, colTime)
	case r == "t" && unit != "":
		if _, err := TemperatureUnit(unit); err == nil {
			return withTemperature(c, colTemp)
		}
		return withDuration(c, colTime)
	case r == "sigma":
		c.kind = colSigma
		c.valueUnit = valueUnit(unit)
		return c, nil
	}
	c.kind = colUnknown
	c.quantity, c.valueUnit = valueHeader(name)
	return c, nil
}

func withLength(c column, k colKind) (column, error) {
	c.kind = k
	if c.unit == "" {
		return c, errorf(ErrUnit, "the %s column has no unit", k.describe())
	}
	f, err := lengthUnit(c.unit)
	c.size = f
	return c, err
}

func withDuration(c column, k colKind) (column, error) {
	c.kind = k
	if c.unit == "" {
		return c, errorf(ErrUnit, "the %s column has no unit", k.describe())
	}
	f, err := durationUnit(c.unit)
	c.size = f
	return c, err
}

func withTemperature(c column, k colKind) (column, error) {
	c.kind = k
	if c.unit == "" {
		return c, errorf(ErrUnit, "the %s column has no unit", k.describe())
	}
	s, err := TemperatureUnit(c.unit)
	c.scale = s
	return c, err
}

// unitHint tells how to name a column of kind k.
func unitHint(k colKind) string {
	switch k {
	case colDepth:
		return "put the unit in the header, e.g. depth_mm, depth_um, depth (in)"
	case colThickness:
		return "put the unit in the header, e.g. thickness_mm"
	case colTime:
		return "put the unit in the header, e.g. time_h, time_min"
	case colTemp:
		return "put the unit in the header, e.g. temperature_C, temperature_K, temperature_F"
	case colTempSigma:
		return "put the unit in the header, e.g. temperature_sigma_K"
	}
	return "check the column header"
}

// Hardness scales: Vickers HV and Knoop HK with an optional test force in
// kgf (HV0.5, HV10), Rockwell scales (HRC, HR15N…) and Brinell (HB, HBW).
// Scale names as in ISO 6507, ISO 4545, ISO 6508 and ISO 6506 (common
// practice; no particular edition relied on).
var hardnessRe = regexp.MustCompile(`^(?:(HV|HK)(\d+(?:\.\d+)?)?|HR(?:[A-HKLMPRSV]|15N|30N|45N|15T|30T|45T)|HB[WS]?(?:\d+(?:\.\d+)?/\d+(?:\.\d+)?)?)$`)

// scaleSpelling drops spaces and reads a decimal comma as a point.
var scaleSpelling = strings.NewReplacer(" ", "", ",", ".")

// HardnessScale returns the normalised scale name ("HV0.5", "HRC", "HK")
// when s names a hardness scale, and ok = false otherwise. Spaces are
// ignored and a decimal comma in the test force is accepted ("HV 0,5").
func HardnessScale(s string) (scale string, ok bool) {
	s = strings.TrimSpace(s)
	if s == "" || (s[0] != 'H' && s[0] != 'h') { // every scale starts with H: no need to ask the pattern
		return "", false
	}
	t := strings.ToUpper(scaleSpelling.Replace(s))
	if hardnessRe.MatchString(t) {
		return t, true
	}
	return "", false
}

// concentrationUnits maps lower-case spellings to the unit recorded in Profile.ValueUnit.
var concentrationUnits = map[string]string{
	"wt%": "wt%", "wt.%": "wt%", "wt-%": "wt%", "wt": "wt%", "%wt": "wt%",
	"mass%": "mass%", "mass-%": "mass%", "mass.%": "mass%",
	"at%": "at%", "at.%": "at%", "at-%": "at%", "%at": "at%",
	"mol%": "mol%", "mol.%": "mol%",
	"ppm": "ppm", "wppm": "wppm", "ppmw": "wppm", "appm": "appm", "ppma": "appm",
	"%": "%", "mg/kg": "mg/kg", "µg/g": "µg/g", "ug/g": "µg/g",
}

// valueUnit normalises a value unit ("wt.%" → "wt%", "hv0.5" → "HV0.5");
// "" when the unit is not one this package knows.
func valueUnit(u string) string {
	if v, ok := concentrationUnits[strings.ToLower(strings.TrimSpace(u))]; ok {
		return v
	}
	if s, ok := HardnessScale(u); ok {
		return s
	}
	return ""
}

// elementNames maps element names to symbols for the quantity field.
var elementNames = map[string]string{
	"carbon": "C", "nitrogen": "N", "boron": "B", "hydrogen": "H", "oxygen": "O",
	"aluminium": "Al", "aluminum": "Al", "chromium": "Cr", "nickel": "Ni",
	"silicon": "Si", "manganese": "Mn", "zinc": "Zn", "copper": "Cu",
}

// genericNames are value headers that say nothing about the quantity.
var genericNames = map[string]bool{
	"value": true, "values": true, "conc": true, "concentration": true, "y": true,
	"signal": true, "measured": true, "measurement": true,
}

// valueHeader reads quantity and unit from a value column header:
// "C_wt%" → ("C", "wt%"), "HV0.5" → ("hardness", "HV0.5"),
// "hardness_HV" → ("hardness", "HV"), "carbon (wt%)" → ("C", "wt%").
func valueHeader(h string) (quantity, unit string) {
	if s, ok := HardnessScale(h); ok {
		return "hardness", s
	}
	root, u := splitHeader(h)
	unit = valueUnit(u)
	if u != "" && unit == "" {
		root = h // "C_corr": the suffix is not a unit
	}
	r := normKey(root)
	switch {
	case r == "hardness" || r == "microhardness":
		return "hardness", unit
	case elementNames[r] != "":
		return elementNames[r], unit
	case genericNames[r]:
		return "", unit
	}
	if _, ok := HardnessScale(unit); ok && unit != "" {
		return "hardness", unit
	}
	return strings.TrimSpace(root), unit
}
