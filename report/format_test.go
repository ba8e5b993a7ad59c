package report

import (
	"fmt"
	"math"
	"strings"
	"testing"

	"github.com/fickfit/fickfit/fit"
	"github.com/fickfit/fickfit/internal/tempfmt"
)

// The rounding rule under test: the uncertainty's digits by the Particle
// Data Group rule (Review of Particle Physics, Introduction, "Rounding";
// from memory) and the value rounded at the same place (JCGM 100:2008, GUM
// §7.2.6). The expected strings below follow those rules by hand.

var nan = math.NaN()

func TestSuperscript(t *testing.T) {
	for _, c := range []struct {
		n    int
		want string
	}{{0, "⁰"}, {-11, "⁻¹¹"}, {5, "⁵"}, {123, "¹²³"}, {-4, "⁻⁴"}} {
		if got := Superscript(c.n); got != c.want {
			t.Errorf("Superscript(%d) = %q, want %q", c.n, got, c.want)
		}
	}
}

func TestLastDigit(t *testing.T) {
	for _, c := range []struct {
		name string
		v    float64
		iv   fit.Interval
		want int
	}{
		{"symmetric", 2.94e-11, fit.Interval{Lo: 2.81e-11, Hi: 3.08e-11}, -13},
		{"asymmetric takes smaller side", 10, fit.Interval{Lo: 9.95, Hi: 12}, -2},
		{"no interval: 3 digits", 2.9437e-11, fit.Interval{Lo: nan, Hi: nan}, -13},
		{"one open end uses the other", 5.0, fit.Interval{Lo: 4.2, Hi: nan}, -1},
		{"capped at 6 digits", 1.0, fit.Interval{Lo: 1 - 1e-12, Hi: 1 + 1e-12}, -5},
		{"at least 1 digit", 2.9, fit.Interval{Lo: -50, Hi: 60}, 0},
		{"at least 1 digit, small value", 0.02, fit.Interval{Lo: -5, Hi: 5}, -2},
		{"fixed value: default digits", 0.2, fit.Interval{Lo: 0.2, Hi: 0.2}, -3},
	} {
		if got := LastDigit(c.v, c.iv); got != c.want {
			t.Errorf("%s: LastDigit(%g, %v) = %d, want %d", c.name, c.v, c.iv, got, c.want)
		}
	}
}

func TestNumber(t *testing.T) {
	for _, c := range []struct {
		v    float64
		last int
		want string
	}{
		{2.9437e-11, -13, "2.94 × 10⁻¹¹"},
		{0.81234, -3, "0.812"},
		{1198.15, 0, "1198"},
		{-512.34, -1, "−512.3"},
		{9.996e-11, -13, "1.000 × 10⁻¹⁰"}, // rounding carries into the exponent
		{0.000123, -6, "1.23 × 10⁻⁴"},
		{123456, 3, "1.23 × 10⁵"},
		{-0.0004, -4, "−4 × 10⁻⁴"},
		{-0.00001, -3, "0.000"}, // rounds to zero: no negative zero
		{0, -2, "0.00"},
		{nan, 0, "n/a"},
		{math.Inf(1), 0, "∞"},
		{math.Inf(-1), 0, "−∞"},
		{42, 1, "40"},
	} {
		if got := Number(c.v, c.last); got != c.want {
			t.Errorf("Number(%g, %d) = %q, want %q", c.v, c.last, got, c.want)
		}
	}
}

func TestEstimate(t *testing.T) {
	for _, c := range []struct {
		name  string
		v     float64
		iv    fit.Interval
		level float64
		unit  string
		want  string
	}{
		{"D with interval", 2.9437e-11, fit.Interval{Lo: 2.8112e-11, Hi: 3.0825e-11}, 0.95, "m2/s",
			"2.94 × 10⁻¹¹ m²/s, 95 % CI 2.81–3.08 × 10⁻¹¹"},
		{"concentration", 0.81234, fit.Interval{Lo: 0.8004, Hi: 0.8243}, 0.95, "wt%",
			"0.812 wt%, 95 % CI 0.800–0.824"},
		{"open upper end", 3.14e-12, fit.Interval{Lo: 3.14e-12 * 0.66, Hi: math.Inf(1)}, 0.95, "m2/s",
			"3.1 × 10⁻¹² m²/s, 95 % CI > 2.1 × 10⁻¹² (upper bound not determined by the data)"},
		{"open lower end", 7.7, fit.Interval{Lo: nan, Hi: 9.31}, 0.9, "HV",
			"7.7 HV, 90 % CI < 9.3 (lower bound not determined by the data)"},
		{"both open", 7.7, fit.Interval{Lo: nan, Hi: nan}, 0.95, "HV",
			"7.70 HV, 95 % CI not bounded by the data"},
		{"wide log interval spans decades", 1.0e-12, fit.Interval{Lo: 4.0e-14, Hi: 2.1e-10}, 0.95, "m2/s",
			"1.0 × 10⁻¹² m²/s, 95 % CI 4.0 × 10⁻¹⁴ – 2.1 × 10⁻¹⁰"},
		{"ends a decade apart are written end by end", 6.9e-12, fit.Interval{Lo: 3.5e-12, Hi: 1.061e-10}, 0.95, "m2/s",
			"6.9 × 10⁻¹² m²/s, 95 % CI 3.5 × 10⁻¹² – 1.1 × 10⁻¹⁰"},
		{"negative end", 0.09, fit.Interval{Lo: -0.12, Hi: 0.30}, 0.95, "wt%",
			"0.09 wt%, 95 % CI −0.12 to 0.30"},
		{"fixed parameter", 0.2, fit.Interval{Lo: 0.2, Hi: 0.2}, 0.95, "wt%", "0.200 wt%"},
		{"no unit", 0.42, fit.Interval{Lo: 0.40, Hi: 0.44}, 0.99, "", "0.420, 99 % CI 0.400–0.440"},
		{"Q in J/mol", 147812, fit.Interval{Lo: 141000, Hi: 154700}, 0.95, "J/mol",
			"1.48 × 10⁵ J/mol, 95 % CI 1.41–1.55 × 10⁵"},
	} {
		if got := Estimate(c.v, c.iv, c.level, c.unit); got != c.want {
			t.Errorf("%s:\n got %q\nwant %q", c.name, got, c.want)
		}
	}
}

func TestDAlternative(t *testing.T) {
	for _, c := range []struct {
		d    float64
		iv   fit.Interval
		want string
	}{
		{2.9437e-11, fit.Interval{Lo: 2.81e-11, Hi: 3.08e-11}, "29.4 µm²/s"},
		{3.2e-13, fit.Interval{Lo: nan, Hi: nan}, "0.320 µm²/s"},
		{2.3e-5, fit.Interval{Lo: 1.9e-5, Hi: 2.8e-5}, "0.23 cm²/s"},
		{4e-17, fit.Interval{Lo: nan, Hi: nan}, "4.00 × 10⁻¹³ cm²/s"},
		{0, fit.Interval{}, ""},
	} {
		if got := DAlternative(c.d, c.iv); got != c.want {
			t.Errorf("DAlternative(%g) = %q, want %q", c.d, got, c.want)
		}
	}
}

func TestTemperature(t *testing.T) {
	for _, c := range []struct {
		k    float64
		u    TempUnit
		want string
	}{
		{1198.15, Celsius, "925 °C (1198.15 K)"},
		{1198.15, "", "925 °C (1198.15 K)"},
		{1198.15, Kelvin, "1198.15 K"},
		{1198.15, Fahrenheit, "1697 °F (1198.15 K)"},
		{1200, Celsius, "926.85 °C (1200 K)"},
		{0, Celsius, "not given"},
	} {
		if got := Temperature(c.k, c.u); got != c.want {
			t.Errorf("Temperature(%g, %q) = %q, want %q", c.k, c.u, got, c.want)
		}
	}
	if got := TemperatureShort(1198.15, Celsius); got != "925 °C" {
		t.Errorf("TemperatureShort = %q", got)
	}
}

func TestTemperatureEstimate(t *testing.T) {
	for _, c := range []struct {
		name string
		k    float64
		iv   fit.Interval
		u    TempUnit
		want string
	}{
		{"celsius", 1204.3, fit.Interval{Lo: 1191.2, Hi: 1217.4}, Celsius,
			"931 °C (1204 K), 95 % CI 918–944 °C"},
		{"kelvin", 1204.3, fit.Interval{Lo: 1191.2, Hi: 1217.4}, Kelvin,
			"1204 K, 95 % CI 1191–1217 K"},
		{"open", 1204.3, fit.Interval{Lo: 1191.2, Hi: nan}, Celsius,
			"931 °C (1204 K), 95 % CI > 918 °C (upper bound not determined by the data)"},
	} {
		if got := TemperatureEstimate(c.k, c.iv, 0.95, c.u); got != c.want {
			t.Errorf("%s:\n got %q\nwant %q", c.name, got, c.want)
		}
	}
}

func TestDuration(t *testing.T) {
	for _, c := range []struct {
		s    float64
		want string
	}{
		{45, "45 s"}, {90 * 60, "90 min"}, {14400, "4 h"}, {4.5 * 3600, "4.5 h"},
		{36 * 3600, "36 h"}, {100.5, "100.5 s"}, {3600, "1 h"}, {3000, "50 min"}, {0, "not given"}, {1234567, "342.94 h"},
	} {
		if got := Duration(c.s); got != c.want {
			t.Errorf("Duration(%g) = %q, want %q", c.s, got, c.want)
		}
	}
	if got := DurationEstimate(6.2*3600, fit.Interval{Lo: 5.8 * 3600, Hi: 6.7 * 3600}, 0.95); got != "6.2 h, 95 % CI 5.8–6.7 h" {
		t.Errorf("DurationEstimate = %q", got)
	}
}

func TestDepth(t *testing.T) {
	for _, c := range []struct {
		m    float64
		want string
	}{
		{250e-6, "250 µm"}, {1.25e-3, "1.25 mm"}, {12.5e-6, "12.5 µm"}, {0.9999e-3, "999.9 µm"},
		{3.14159e-3, "3.142 mm"}, {0, "0 µm"},
	} {
		if got := Depth(c.m); got != c.want {
			t.Errorf("Depth(%g) = %q, want %q", c.m, got, c.want)
		}
	}
}

func TestParseTempUnit(t *testing.T) {
	for in, want := range map[string]TempUnit{"": Celsius, "°C": Celsius, "K": Kelvin, "kelvin": Kelvin, "F": Fahrenheit, "°f": Fahrenheit} {
		got, err := ParseTempUnit(in)
		if err != nil || got != want {
			t.Errorf("ParseTempUnit(%q) = %q, %v", in, got, err)
		}
	}
	if _, err := ParseTempUnit("R"); err == nil {
		t.Error("ParseTempUnit(R): no error")
	}
}

func TestTable(t *testing.T) {
	tb := Table{Header: []string{"id", "D (m²/s)", "R²"}, Align: []Align{Left, Right, Right}}
	tb.Add("A1", "2.94 × 10⁻¹¹", "0.998")
	tb.Add("B12", "3.1 × 10⁻¹²", "0.95")
	want := "" +
		"id       D (m²/s)     R²\n" +
		"────────────────────────\n" +
		"A1   2.94 × 10⁻¹¹  0.998\n" +
		"B12   3.1 × 10⁻¹²   0.95\n"
	if got := tb.String(); got != want {
		t.Errorf("table:\n%s\nwant:\n%s", got, want)
	}
}

func TestPrettyUnit(t *testing.T) {
	for in, want := range map[string]string{"m2/s": "m²/s", "m2": "m²", "wt%*m": "wt%·m", "1/m": "m⁻¹", "J/mol": "J/mol"} {
		if got := PrettyUnit(in); got != want {
			t.Errorf("PrettyUnit(%q) = %q, want %q", in, got, want)
		}
	}
}

func TestCSVNumber(t *testing.T) {
	if csvNumber(nan) != "" || csvNumber(math.Inf(1)) != "" || csvNumber(2.5e-11) != "2.5e-11" {
		t.Error("csvNumber")
	}
}

func ExampleEstimate() {
	d := 2.9437e-11
	ci := fit.Interval{Lo: 2.8112e-11, Hi: 3.0825e-11}
	fmt.Println("D =", Estimate(d, ci, 0.95, "m2/s"))
	fmt.Println("  =", DAlternative(d, ci))
	fmt.Println("T =", Temperature(1198.15, Celsius))
	fmt.Println("t =", Duration(4*3600))
	// Output:
	// D = 2.94 × 10⁻¹¹ m²/s, 95 % CI 2.81–3.08 × 10⁻¹¹
	//   = 29.4 µm²/s
	// T = 925 °C (1198.15 K)
	// t = 4 h
}

func FuzzNumber(f *testing.F) {
	f.Add(2.94e-11, 2.8e-11, 3.1e-11)
	f.Add(-1.0, -2.0, 5.0)
	f.Add(0.0, 0.0, 0.0)
	f.Fuzz(func(t *testing.T, v, lo, hi float64) {
		s := Estimate(v, fit.Interval{Lo: lo, Hi: hi}, 0.95, "m2/s")
		if s == "" || strings.Contains(s, "NaN") || strings.Contains(s, "e+") || strings.Contains(s, "e-") {
			t.Errorf("Estimate(%g, [%g, %g]) = %q", v, lo, hi, s)
		}
	})
}

func TestGeneralAndInterval(t *testing.T) {
	if got := General(2.9437e-11); got != "2.94 × 10⁻¹¹" {
		t.Errorf("General = %q", got)
	}
	if got := General(1198.15); got != "1200" {
		t.Errorf("General(1198.15) = %q", got)
	}
	if got := Interval(2.9437e-11, fit.Interval{Lo: 2.8112e-11, Hi: 3.0825e-11}); got != "2.81–3.08 × 10⁻¹¹" {
		t.Errorf("Interval = %q", got)
	}
	if got := Interval(5, fit.Interval{Lo: 4.123, Hi: 5.9}); got != "4.1–5.9" {
		t.Errorf("Interval plain = %q", got)
	}
}

// TestHugeTemperatureNeverInf: a temperature of 1e308 K (a wrong number
// that got through) is never written "+Inf", in any unit or view.
func TestHugeTemperatureNeverInf(t *testing.T) {
	for _, u := range []TempUnit{Celsius, Kelvin, Fahrenheit} {
		for _, s := range []string{Temperature(1e308, u), TemperatureShort(1e308, u),
			TemperatureEstimate(1e308, fit.Interval{Lo: 1e307, Hi: math.Inf(1)}, 0.95, u),
			viewTempPlain(1e308, u), viewTempRange(1e300, 1e308, u, 0), Temps("at "+tempfmt.Mark(1e308), u)} {
			if strings.Contains(s, "Inf") || strings.Contains(s, "NaN") {
				t.Errorf("%s: %q", u, s)
			}
		}
	}
	if got := Temperature(1e308, Fahrenheit); !strings.HasPrefix(got, "1.00") || !strings.HasSuffix(got, " × 10³⁰⁸ K") {
		t.Errorf("Temperature(1e308, F) = %q", got)
	}
}
