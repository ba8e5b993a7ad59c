package report

import (
	"math"
	"strconv"
	"strings"
	"testing"
	"unicode/utf8"

	"github.com/fickfit/fickfit/fit"
)

// readSci reads back "m × 10ⁿ" or a plain number written by Number.
func readSci(s string) (float64, bool) {
	s = strings.ReplaceAll(s, minus, "-")
	mant, exp := s, 0
	if i := strings.Index(s, times10); i >= 0 {
		mant = s[:i]
		sup := map[rune]byte{'⁰': '0', '¹': '1', '²': '2', '³': '3', '⁴': '4', '⁵': '5', '⁶': '6', '⁷': '7', '⁸': '8', '⁹': '9', '⁻': '-'}
		var b []byte
		for _, r := range s[i+len(times10):] {
			b = append(b, sup[r])
		}
		e, err := strconv.Atoi(string(b))
		if err != nil {
			return 0, false
		}
		exp = e
	}
	m, err := strconv.ParseFloat(mant, 64)
	if err != nil {
		return 0, false
	}
	v, _ := strconv.ParseFloat(strconv.FormatFloat(m, 'f', -1, 64)+"e"+strconv.Itoa(exp), 64)
	return v, true
}

// TestExtremeNumbers: values at the ends of the float range (a D of
// 10⁻³¹⁰ m²/s, a time of 10³⁰⁸ s) are written as short numbers that read
// back to the value, never as NaN, ∞ or hundreds of digits (common
// practice, no source).
func TestExtremeNumbers(t *testing.T) {
	values := []float64{math.SmallestNonzeroFloat64, 1e-320, 1e-310, 2.2250738585072014e-308, 2.2e-308, 1.234e-300, 1e-291, 1e291,
		1e300, 1e308, math.MaxFloat64, -1e-310, -1e308, -math.MaxFloat64}
	for _, v := range values {
		iv := fit.Interval{Lo: v * 0.9, Hi: v * 1.1}
		outs := map[string]string{
			"Sig": Sig(v, 3), "General": General(v), "Estimate": Estimate(v, iv, 0.95, "m2/s"),
			"Duration": Duration(v), "DurationEstimate": DurationEstimate(v, iv, 0.95), "Depth": Depth(v),
			"Temperature": Temperature(v, Celsius), "DAlternative": DAlternative(v, iv), "viewDurationPlain": viewDurationPlain(v),
			"Number": Number(v, LastDigit(v, iv)), "IntervalAt": Interval(v, iv), "viewD": viewD(math.Abs(v), iv, 0.95, ""),
		}
		for name, s := range outs {
			if strings.Contains(s, "NaN") || strings.Contains(s, "n/a") || strings.Contains(s, "Inf") ||
				strings.Contains(s, "∞") && math.Abs(v) < math.MaxFloat64/2 {
				t.Errorf("%s(%g) = %q", name, v, s)
			}
			if n := utf8.RuneCountInString(s); n > 110 {
				t.Errorf("%s(%g) is %d characters long: %.60q…", name, v, n, s)
			}
		}
		got, ok := readSci(Sig(v, 3))
		if math.IsInf(got, 0) && math.Abs(v) > 1.79e308 {
			continue // 1.80 × 10³⁰⁸ is right, and beyond the float range
		}
		if !ok || math.Abs(got-v) > 0.006*math.Abs(v) {
			t.Errorf("Sig(%g, 3) = %q reads back as %g", v, Sig(v, 3), got)
		}
	}
	if got := Duration(1e308); got != "2.78 × 10³⁰⁴ h" {
		t.Errorf("Duration(1e308) = %q", got)
	}
	if got := Sig(1e-310, 3); got != "1.00 × 10⁻³¹⁰" {
		t.Errorf("Sig(1e-310, 3) = %q", got)
	}
}
