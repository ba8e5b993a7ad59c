package profile

import (
	"errors"
	"math"
	"strings"
	"testing"
)

func TestMarkOf(t *testing.T) {
	for s, want := range map[string]mark{
		"1": markNone, "1e-3": markNone, "0,861": markComma, "12,5": markComma, "1,0250": markComma,
		"1,025": markCommaAmbiguous, "-1,025": markCommaAmbiguous, "999,999": markCommaAmbiguous,
		"1000,250": markComma, "0.861": markDot, "1.025": markDotAmbiguous, "−2.500": markDotAmbiguous,
		"1.025e3": markDot, "0.125": markDot, ".125": markDot,
	} {
		if got := markOf(s); got != want {
			t.Errorf("markOf(%q) = %d, want %d", s, got, want)
		}
	}
}

// TestAmbiguousDecimals: a number whose mark may be a thousands separator
// is read only when the file's other numbers show that mark as decimal
// (common practice, no source).
func TestAmbiguousDecimals(t *testing.T) {
	for _, tc := range []struct {
		name, text string
		line       int    // 0: read without error
		frag, hint string // message and hint fragments
		value      float64
	}{
		{"thousands dot among decimal commas", "depth_um;C_wt%\n50;0,861\n1.025;0,395\n", 3,
			`"1.025" is ambiguous: the point may be a thousands separator (1025) or a decimal point (1.025), and this file writes decimals with a comma ("0,861" at line 2)`,
			"write 1,025 if it is a decimal, or 1025 if it is a whole number", 0},
		{"ambiguous first, decimal comma later", "depth_um;C_wt%\n1.025;0,395\n50;0,861\n", 2, `"1.025" is ambiguous`, "", 0},
		{"thousands comma among decimal points (tab)", "depth_um\tC_wt%\n50\t0.861\n1,025\t0.395\n", 3,
			`"1,025" is ambiguous: the comma may be a thousands separator (1025) or a decimal comma (1.025), and this file writes decimals with a point ("0.861" at line 2)`,
			"write 1.025 if it is a decimal", 0},
		{"no evidence either way", "depth_um;HV0.5\n1.025;650\n2.050;600\n", 2,
			"no other number in the file shows which", "write 1.0250 if it is a decimal, or 1025", 0},
		{"decimal commas throughout", "depth_mm;C_wt%\n1,025;0,395\n0,05;0,861\n", 0, "", "", 1.025e-3},
		{"decimal points throughout (tab)", "depth_mm\tC_wt%\n1.025\t0.395\n0.05\t0.861\n", 0, "", "", 1.025e-3},
		{"comma file, unambiguous point", "depth_mm;C_wt%\n1.5;0,395\n0,05;0,861\n", 0, "", "", 1.5e-3},
		{"comma separator: a point is a point", "depth_mm,C_wt%\n1.025,0.395\n", 0, "", "", 1.025e-3},
		{"per-profile column", "profile;temperature_C;depth_mm;C_wt%\nA;1.025;0,1;0,8\n", 2, `"1.025" is ambiguous`, "", 0},
	} {
		ps, err := ReadCSV(strings.NewReader(tc.text), "d.csv")
		if tc.line == 0 {
			if err != nil || math.Abs(ps[0].Depth[0]-tc.value) > 1e-15*tc.value {
				t.Errorf("%s: %v, %v", tc.name, err, ps)
			}
			continue
		}
		var e *Error
		if !errors.As(err, &e) || !errors.Is(err, ErrNumber) || e.Line != tc.line ||
			!strings.Contains(err.Error(), tc.frag) || !strings.Contains(e.Hint, tc.hint) {
			t.Errorf("%s: %v; want line %d, %q, hint %q", tc.name, err, tc.line, tc.frag, tc.hint)
		}
	}
	if _, err := ReadHistoryCSV(strings.NewReader("time_h;temperature_C\n0;20,5\n1.025;925\n"), "h.csv"); err == nil ||
		!strings.Contains(err.Error(), "h.csv:3:") || !strings.Contains(err.Error(), "ambiguous") {
		t.Errorf("history: %v", err)
	}
	if _, err := ReadCalibrationCSV(strings.NewReader("HV0.5;C_wt%\n200;0,15\n1.025;0,95\n"), "c.csv"); err == nil ||
		!strings.Contains(err.Error(), "c.csv:3:") || !strings.Contains(err.Error(), "ambiguous") {
		t.Errorf("calibration: %v", err)
	}
}
