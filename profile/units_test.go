package profile

import (
	"errors"
	"math"
	"strings"
	"testing"
)

// close reports |a−b| ≤ tol·max(1,|b|).
func near(a, b, tol float64) bool { return math.Abs(a-b) <= tol*math.Max(1, math.Abs(b)) }

// Conversion factors: NIST SP 811 (2008), Appendix B, values from memory
// (1 in = 0.0254 m exactly, 1 mil = 2.54e-5 m exactly, T/K = t/°C + 273.15,
// T/K = (t/°F − 32)·5/9 + 273.15, 1 h = 3600 s, 1 d = 86400 s).
func TestParseTemperature(t *testing.T) {
	tests := []struct {
		in   string
		want float64
	}{
		{"925 C", 1198.15},
		{"925C", 1198.15},
		{"925 °C", 1198.15},
		{"925°C", 1198.15},
		{"925 degC", 1198.15},
		{"925 ℃", 1198.15},
		{"925,5 C", 1198.65},
		{"1198 K", 1198},
		{"1198.15K", 1198.15},
		{"1700 F", (1700-32)*5.0/9 + 273.15},
		{"1700°F", (1700-32)*5.0/9 + 273.15},
		{"32 F", 273.15},
		{"-40 C", 233.15},
		{"−40 °F", 233.15}, // U+2212 minus; −40 °F = −40 °C
		{"1e3 K", 1000},
		{" 925 celsius ", 1198.15},
	}
	for _, tt := range tests {
		got, err := ParseTemperature(tt.in)
		if err != nil || !near(got, tt.want, 1e-12) {
			t.Errorf("ParseTemperature(%q) = %v, %v; want %v", tt.in, got, err, tt.want)
		}
	}
}

func TestParseTemperatureErrors(t *testing.T) {
	tests := []struct {
		in       string
		kind     error
		fragment string
	}{
		{"-300 C", ErrValue, "absolute zero"},
		{"−300 °C", ErrValue, "absolute zero"},
		{"0 K", ErrValue, "absolute zero"},
		{"-460 F", ErrValue, "absolute zero"},
		{"925", ErrUnit, "no unit"},
		{"925 X", ErrUnit, "K, C (°C) or F (°F)"},
		{"925 C 3", ErrUnit, "unknown"},
		{"NaN C", ErrNumber, "number"},
		{"Inf K", ErrNumber, "number"},
		{"1e999 K", ErrNumber, "finite"},
		{"", ErrNumber, "no temperature"},
		{"1,000 C", ErrNumber, "ambiguous"},
		{"0x10 K", ErrUnit, "unknown"},
	}
	for _, tt := range tests {
		_, err := ParseTemperature(tt.in)
		if !errors.Is(err, tt.kind) || !strings.Contains(err.Error(), tt.fragment) {
			t.Errorf("ParseTemperature(%q) error %v; want kind %v with %q", tt.in, err, tt.kind, tt.fragment)
		}
	}
}

func TestParseDuration(t *testing.T) {
	tests := []struct {
		in   string
		want float64
	}{
		{"4 h", 14400}, {"4h", 14400}, {"90 min", 5400}, {"3600 s", 3600},
		{"1.5 d", 129600}, {"2 hr", 7200}, {"30 minutes", 1800}, {"1,5 h", 5400},
		{"4 h 30 min", 16200}, {"2 hours", 7200}, {"10 sec", 10},
	}
	for _, tt := range tests {
		got, err := ParseDuration(tt.in)
		if err != nil || got != tt.want {
			t.Errorf("ParseDuration(%q) = %v, %v; want %v", tt.in, got, err, tt.want)
		}
	}
	for _, bad := range []string{"0 h", "-1 h", "4", "4 weeks", "NaN h", "h", "4 h -30 min", "1e400 s"} {
		if _, err := ParseDuration(bad); err == nil {
			t.Errorf("ParseDuration(%q) accepted", bad)
		}
	}
}

func TestParseLength(t *testing.T) {
	tests := []struct {
		in   string
		want float64
	}{
		{"12 mm", 0.012}, {"0.5 in", 0.0127}, {"1 in", 0.0254}, {"20 mil", 20 * 25.4e-6},
		{"1 mil", 25.4e-6}, {"800 um", 800e-6}, {"800 µm", 800e-6}, {"800 μm", 800e-6},
		{"0.0012 m", 0.0012}, {"0 mm", 0}, {"1,5 mm", 0.0015}, {"2 cm", 0.02},
	}
	for _, tt := range tests {
		got, err := ParseLength(tt.in)
		if err != nil || !near(got, tt.want, 1e-15) {
			t.Errorf("ParseLength(%q) = %v, %v; want %v", tt.in, got, err, tt.want)
		}
	}
	for _, bad := range []string{"-1 mm", "12", "12 furlongs", "Inf mm"} {
		if _, err := ParseLength(bad); err == nil {
			t.Errorf("ParseLength(%q) accepted", bad)
		}
	}
}

// Exact factors (NIST SP 811 (2008), Appendix B, values from memory).
func TestUnitFactorsExact(t *testing.T) {
	if f, _ := LengthUnit("in"); f != 0.0254 {
		t.Errorf("LengthUnit(in) = %v, want 0.0254 exactly", f)
	}
	if f, _ := LengthUnit("mil"); !near(f, 25.4e-6, 1e-15) {
		t.Errorf("LengthUnit(mil) = %v, want 25.4 µm", f)
	}
	if f, _ := LengthUnit("MM"); f != 1e-3 {
		t.Errorf("LengthUnit(MM) = %v", f)
	}
	if f, _ := DurationUnit("d"); f != 86400 {
		t.Errorf("DurationUnit(d) = %v", f)
	}
	if _, err := LengthUnit("yd"); !errors.Is(err, ErrUnit) || !strings.Contains(err.Error(), "mm") {
		t.Errorf("LengthUnit(yd) error %v should list the valid units", err)
	}
	if _, err := DurationUnit("fortnight"); !errors.Is(err, ErrUnit) || !strings.Contains(err.Error(), "min") {
		t.Errorf("DurationUnit error %v should list the valid units", err)
	}
	// 50 µm must be the double nearest 5e-5 m (divided, not multiplied by 1e-6).
	if got, _ := ParseLength("50 um"); got != 5e-5 {
		t.Errorf("ParseLength(50 um) = %v, want exactly 5e-5", got)
	}
}

func TestParseTemperatureDelta(t *testing.T) {
	tests := []struct {
		in   string
		want float64
	}{
		{"3K", 3}, {"3 C", 3}, {"3 °C", 3}, {"5 F", 25.0 / 9}, {"0 K", 0},
	}
	for _, tt := range tests {
		got, err := ParseTemperatureDelta(tt.in)
		if err != nil || !near(got, tt.want, 1e-15) {
			t.Errorf("ParseTemperatureDelta(%q) = %v, %v; want %v", tt.in, got, err, tt.want)
		}
	}
	if _, err := ParseTemperatureDelta("-3 K"); !errors.Is(err, ErrValue) {
		t.Errorf("negative delta: %v", err)
	}
}

func TestTemperatureScale(t *testing.T) {
	for _, u := range []string{"K", "k", "kelvin"} {
		if s, err := TemperatureUnit(u); err != nil || s != Kelvin {
			t.Errorf("TemperatureUnit(%q) = %v, %v", u, s, err)
		}
	}
	for _, u := range []string{"C", "°C", "degC", "ºC", "Celsius", "℃"} {
		if s, err := TemperatureUnit(u); err != nil || s != Celsius {
			t.Errorf("TemperatureUnit(%q) = %v, %v", u, s, err)
		}
	}
	if Fahrenheit.DeltaToKelvin(9) != 5 || Celsius.ToKelvin(0) != 273.15 || Kelvin.String() != "K" {
		t.Error("scale methods")
	}
}

func TestParseNumber(t *testing.T) {
	ok := []struct {
		in    string
		comma bool
		want  float64
	}{
		{"0.5", false, 0.5}, {"0,5", true, 0.5}, {"-1e-3", false, -1e-3}, {"+2", false, 2},
		{".5", false, 0.5}, {"5.", false, 5}, {"−3", false, -3}, {" 7 ", false, 7}, {"1E3", false, 1000},
	}
	for _, tt := range ok {
		if got, err := parseNumber(tt.in, tt.comma); err != nil || got != tt.want {
			t.Errorf("parseNumber(%q, %v) = %v, %v", tt.in, tt.comma, got, err)
		}
	}
	for _, bad := range []string{"0,5", "NaN", "nan", "Inf", "-inf", "infinity", "0x1p3", "1_000", "1.2.3", "", "1e", "e5", "1,0,0", "0.4x", "1 000"} {
		if _, err := parseNumber(bad, false); !errors.Is(err, ErrNumber) {
			t.Errorf("parseNumber(%q) = %v, want ErrNumber", bad, err)
		}
	}
	if _, err := parseNumber("1.000,5", true); err == nil {
		t.Error("1.000,5 accepted")
	}
}

// TestScaleRoundTrip: FromKelvin inverts ToKelvin on every scale; 212 °F is
// 373.15 K (NIST SP 811 (2008), Appendix B.8, value from memory).
func TestScaleRoundTrip(t *testing.T) {
	for _, s := range []TemperatureScale{Kelvin, Celsius, Fahrenheit} {
		for _, v := range []float64{-40, 0, 25, 925, 1700} {
			if got := s.FromKelvin(s.ToKelvin(v)); math.Abs(got-v) > 1e-9 {
				t.Errorf("%v: %g → %g", s, v, got)
			}
		}
	}
	if k := Fahrenheit.ToKelvin(212); math.Abs(k-373.15) > 1e-9 {
		t.Errorf("212 °F = %g K", k)
	}
}

// TestPhysicalBounds: numbers beyond the bounds of the package (common
// practice, no source) are refused where they are read, with the bound
// in the message; the edges themselves are accepted.
func TestPhysicalBounds(t *testing.T) {
	for _, tc := range []struct {
		f    func(string) (float64, error)
		in   string
		frag string
	}{
		{ParseTemperature, "1e308 C", "above 6000 K"},
		{ParseTemperature, "6001 K", "above 6000 K"},
		{ParseTemperatureDelta, "1e308 K", "above 6000 K"},
		{ParseDuration, "1e308 s", "longer than 1e10 s"},
		{ParseDuration, "1e308 h", "longer than 1e10 s"},
		{ParseDuration, "1e-12 s", "shorter than 1 ns"},
		{ParseLength, "1e308 mm", "beyond 1 m"},
		{ParseLength, "1001 mm", "beyond 1 m"},
	} {
		if _, err := tc.f(tc.in); !errors.Is(err, ErrValue) || !strings.Contains(err.Error(), tc.frag) {
			t.Errorf("%q: %v; want %q", tc.in, err, tc.frag)
		}
	}
	for _, tc := range []struct {
		f  func(string) (float64, error)
		in string
	}{{ParseTemperature, "6000 K"}, {ParseDuration, "1e10 s"}, {ParseDuration, "1e-9 s"},
		{ParseLength, "1000 mm"}, {ParseTemperatureDelta, "6000 K"}} {
		if _, err := tc.f(tc.in); err != nil {
			t.Errorf("%q refused: %v", tc.in, err)
		}
	}
	for _, tc := range []struct{ csv, frag string }{
		{"depth_mm,C_wt%\n0.1,0.8\n0.2,1e308\n", "value 1e308 is beyond ±1e12"},
		{"depth_mm,C_wt%\n0.1,0.8\n0.2,-2e12\n", "value -2e12 is beyond ±1e12"},
		{"depth_mm,C_wt%\n0.1,0.8\n1e308,0.5\n", "depth 1e308 mm is beyond 1 m"},
		{"depth_um,C_wt%,sigma\n1,0.8,0.1\n2,0.5,1e-200\n", "sigma 1e-200 is below 1e-12"},
		{"depth_um,C_wt%,sigma\n1,0.8,0.1\n2,0.5,1e13\n", "sigma 1e13 is beyond 1e12"},
		{"profile,temperature_C,depth_mm,C_wt%\nA,925,0.1,0.8\nB,1e308,0.1,0.8\n", "temperature 1e308 is above 6000 K"},
		{"profile,time_h,depth_mm,C_wt%\nA,4,0.1,0.8\nB,1e308,0.1,0.8\n", "time 1e308 is longer than 1e10 s"},
		{"profile,thickness_mm,depth_mm,C_wt%\nA,4,0.1,0.8\nB,1e308,0.1,0.8\n", "thickness 1e308 is beyond 1 m"},
		{"profile,temperature_sigma_K,depth_mm,C_wt%\nA,4,0.1,0.8\nB,1e308,0.1,0.8\n", "temperature sigma 1e308 is above 6000 K"},
	} {
		_, err := ReadCSV(strings.NewReader(tc.csv), "b.csv")
		var e *Error
		if !errors.As(err, &e) || !errors.Is(err, ErrValue) || e.Line != 3 || !strings.Contains(err.Error(), tc.frag) {
			t.Errorf("%q: %v; want line 3 and %q", tc.csv, err, tc.frag)
		}
	}
	if _, err := ReadHistoryCSV(strings.NewReader("time_h,temperature_C\n0,20\n1e308,925\n"), "h.csv"); err == nil ||
		!strings.Contains(err.Error(), "h.csv:3:") || !strings.Contains(err.Error(), "longer than") {
		t.Errorf("history time 1e308: %v", err)
	}
	if _, err := ReadHistoryCSV(strings.NewReader("time_h,temperature_C\n0,20\n1,1e308\n"), "h.csv"); err == nil ||
		!strings.Contains(err.Error(), "h.csv:3:") || !strings.Contains(err.Error(), "above 6000 K") {
		t.Errorf("history temperature 1e308: %v", err)
	}
	if _, err := ReadCalibrationCSV(strings.NewReader("HV0.5,C_wt%\n200,0.15\n1e308,0.35\n"), "c.csv"); err == nil ||
		!strings.Contains(err.Error(), "c.csv:3:") || !strings.Contains(err.Error(), "beyond ±1e12") {
		t.Errorf("calibration 1e308: %v", err)
	}
	if _, _, err := ReadDiffusivityTableCSV(strings.NewReader("C_wt%,D_m2/s\n0.1,1e-11\n0.2,1e308\n"), "d.csv"); err == nil ||
		!strings.Contains(err.Error(), "d.csv:3:") || !strings.Contains(err.Error(), "outside") {
		t.Errorf("D table 1e308: %v", err)
	}
}
