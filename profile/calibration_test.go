package profile

import (
	"errors"
	"math"
	"math/rand/v2"
	"path/filepath"
	"sort"
	"strings"
	"testing"
)

// Self-check: on random strictly increasing (and decreasing) data the
// Fritsch–Carlson interpolant is monotone between every pair of nodes,
// passes through the nodes and stays within the data range. Seeded RNG.
func TestMonotonePreservesMonotonicity(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for trial := 0; trial < 200; trial++ {
		n := 2 + rng.IntN(15)
		x, y := make([]float64, n), make([]float64, n)
		for i := range x {
			x[i] = rng.Float64() * 100
			y[i] = rng.ExpFloat64() * math.Pow(10, float64(rng.IntN(6)-3))
		}
		sort.Float64s(x)
		sort.Float64s(y)
		if !strictly(x) {
			continue
		}
		if trial%2 == 1 { // decreasing data too
			for i, j := 0, n-1; i < j; i, j = i+1, j-1 {
				y[i], y[j] = y[j], y[i]
			}
		}
		f, err := NewMonotone(x, y)
		if err != nil {
			t.Fatal(err)
		}
		sign := 1.0
		if y[n-1] < y[0] {
			sign = -1
		}
		prev := f.At(x[0])
		for k := 0; k <= 2000; k++ {
			v := x[0] + (x[n-1]-x[0])*float64(k)/2000
			fv := f.At(v)
			if sign*(fv-prev) < -1e-12*math.Abs(prev) {
				t.Fatalf("trial %d: not monotone at %v: %v after %v", trial, v, fv, prev)
			}
			prev = fv
		}
		for i := range x {
			if f.At(x[i]) != y[i] {
				t.Fatalf("trial %d: f(x[%d]) = %v, want %v", trial, i, f.At(x[i]), y[i])
			}
		}
	}
}

func strictly(x []float64) bool {
	for i := 1; i < len(x); i++ {
		if !(x[i] > x[i-1]) {
			return false
		}
	}
	return true
}

// A cubic Hermite interpolant with tangents equal to a constant slope
// reproduces a straight line (common practice, no source).
func TestMonotoneExactOnLinearData(t *testing.T) {
	x := []float64{0, 0.5, 2, 3.5, 10}
	y := make([]float64, len(x))
	for i, v := range x {
		y[i] = 3 - 0.7*v
	}
	f, err := NewMonotone(x, y)
	if err != nil {
		t.Fatal(err)
	}
	for v := 0.0; v <= 10; v += 0.01 {
		if got := f.At(v); math.Abs(got-(3-0.7*v)) > 1e-13 {
			t.Fatalf("f(%v) = %v, want %v", v, got, 3-0.7*v)
		}
		if d := f.Deriv(v); math.Abs(d+0.7) > 1e-12 {
			t.Fatalf("f'(%v) = %v", v, d)
		}
	}
	if !math.IsNaN(f.At(-0.001)) || !math.IsNaN(f.At(10.001)) || !math.IsNaN(f.Deriv(11)) {
		t.Error("extrapolated")
	}
	for _, yv := range []float64{3, 2.3, -4} {
		if got := f.Inverse(yv); math.Abs(got-(3-yv)/0.7) > 1e-12 {
			t.Errorf("Inverse(%v) = %v", yv, got)
		}
	}
	if !math.IsNaN(f.Inverse(3.1)) {
		t.Error("inverse extrapolated")
	}
}

// Fritsch & Carlson (1980) intend no overshoot on flat stretches: data with
// a plateau stay exactly flat on it (self-check).
func TestMonotoneFlatSegment(t *testing.T) {
	f, err := NewMonotone([]float64{0, 1, 2, 3, 4}, []float64{0, 1, 1, 1, 5})
	if err != nil {
		t.Fatal(err)
	}
	for v := 1.0; v <= 3; v += 0.05 {
		if f.At(v) != 1 {
			t.Fatalf("f(%v) = %v on the plateau", v, f.At(v))
		}
	}
	if !math.IsNaN(f.Inverse(1)) {
		t.Error("Inverse on data that are not strictly monotone must be NaN")
	}
	for _, bad := range [][2][]float64{
		{{0}, {1}}, {{0, 1}, {1}}, {{0, 0}, {1, 2}}, {{1, 0}, {1, 2}}, {{0, math.NaN()}, {1, 2}},
	} {
		if _, err := NewMonotone(bad[0], bad[1]); err == nil {
			t.Errorf("NewMonotone(%v) accepted", bad)
		}
	}
}

func TestReadCalibration(t *testing.T) {
	c, err := ReadCalibration(filepath.Join("..", "testdata", "profile", "calibration", "HV05_C.csv"))
	if err != nil {
		t.Fatal(err)
	}
	if c.Scale != "HV0.5" || c.Quantity != "C" || c.Unit != "wt%" || len(c.Hardness) != 7 {
		t.Fatalf("%+v", c)
	}
	for i, h := range c.Hardness { // the table passes through its own points
		if v, err := c.ToConcentration(h); err != nil || v != c.Concentration[i] {
			t.Errorf("ToConcentration(%v) = %v, %v", h, v, err)
		}
	}
	for h := 200.0; h <= 880; h += 7 { // round trip through the inverse
		v, err := c.ToConcentration(h)
		if err != nil {
			t.Fatal(err)
		}
		back, err := c.ToHardness(v)
		if err != nil || math.Abs(back-h) > 1e-9 {
			t.Errorf("ToHardness(ToConcentration(%v)) = %v, %v", h, back, err)
		}
	}
	if _, err := c.ToConcentration(199); !errors.Is(err, ErrRange) || !strings.Contains(err.Error(), "200–880") {
		t.Errorf("below range: %v", err)
	}
	if _, err := c.ToHardness(1.2); !errors.Is(err, ErrRange) {
		t.Errorf("above range: %v", err)
	}
}

func TestCalibrationOrderAndErrors(t *testing.T) {
	c, err := ReadCalibrationCSV(strings.NewReader("C (wt%);hardness_HV\n0,5;550\n0,2;250\n0,35;400\n"), "cal.csv")
	if err != nil {
		t.Fatal(err)
	}
	if !sameFloats(c.Hardness, []float64{250, 400, 550}) || c.Line[0] != 3 || c.Scale != "HV" {
		t.Errorf("%+v", c)
	}
	tests := []struct{ in, frag string }{
		{"HV0.5,C_wt%,x\n1,2,3\n", "two columns"},
		{"HV0.5,HV1\n1,2\n", "two hardness columns"},
		{"hardness,C_wt%\n1,2\n2,3\n", "scale is not given"},
		{"HV0.5,C_wt%\n", "at least 2"},
		{"HV0.5,C_wt%\n100,abc\n", "not a number"},
		{"HV0.5,C_wt%\n-100,0.1\n200,0.2\n", "not positive"},
		{"HV0.5,C_wt%\n100,0.1\n200,0.1\n", "monotone"},
		{"HV0.5,C_wt%\n100,0.1\n200,0.2,5\n", "more cells"},
	}
	for _, tt := range tests {
		_, err := ReadCalibrationCSV(strings.NewReader(tt.in), "cal.csv")
		var e *Error
		if !errors.As(err, &e) || !strings.Contains(err.Error(), tt.frag) || !strings.Contains(err.Error(), "cal.csv:") {
			t.Errorf("%q: %v", tt.in, err)
		}
	}
}

func TestCalibrationApply(t *testing.T) {
	c, err := ReadCalibrationCSV(strings.NewReader("HV0.5,C_wt%\n200,0.1\n400,0.3\n600,0.5\n800,0.7\n"), "cal.csv")
	if err != nil {
		t.Fatal(err)
	}
	p := Profile{ID: "H1", Source: "h.csv", Quantity: "hardness", ValueName: "HV0.5", ValueUnit: "HV0.5",
		Depth: []float64{1e-4, 2e-4}, Value: []float64{700, 300}, Sigma: []float64{10, 10}, Line: []int{4, 5},
		Meta: map[string]string{"id": "H1"}}
	q, err := c.Apply(&p)
	if err != nil {
		t.Fatal(err)
	}
	// Linear calibration (slope 0.001 wt%/HV): exact values and σ = 0.001·10.
	if !sameFloats(q.Value, []float64{0.6, 0.2}) || !sameFloats(q.Sigma, []float64{0.01, 0.01}) ||
		q.ValueUnit != "wt%" || q.Quantity != "C" || q.Meta["calibration"] != "cal.csv" || p.Value[0] != 700 || p.Meta["calibration"] != "" {
		t.Errorf("applied: %+v (original %+v)", q, p)
	}
	// A core reading a little below the lowest calibration point (190 HV,
	// within 5 % of the 600 HV range = 30 HV) is clamped to 200 HV with a
	// note; one far below (150 HV) is left out with a note; none is
	// extrapolated.
	p.Value[1] = 190
	q, err = c.Apply(&p)
	if err != nil || !sameFloats(q.Value, []float64{0.6, 0.1}) || len(q.Notes) != 1 || q.Notes[0].Code != "calibration-clamped" ||
		!strings.Contains(q.Notes[0].Message, "190 HV0.5 at 0.2 mm (line 5)") || !strings.Contains(q.Notes[0].Message, "margin 30 HV0.5") {
		t.Errorf("clamped: %v %+v", err, q)
	}
	p.Value[1] = 150
	q, err = c.Apply(&p)
	if err != nil || len(q.Value) != 1 || q.Line[0] != 4 || len(q.Notes) != 1 || q.Notes[0].Code != "calibration-out-of-range" ||
		!strings.Contains(q.Notes[0].Message, "(line 5)") || len(q.Sigma) != 1 {
		t.Errorf("left out: %v %+v", err, q)
	}
	if err := c.SetMargin("60HV0.5"); err != nil {
		t.Fatal(err)
	}
	if q, _ = c.Apply(&p); len(q.Value) != 2 || q.Value[1] != 0.1 {
		t.Errorf("margin 60 HV: %+v", q)
	}
	for _, bad := range []string{"-5%", "abc", "10HRC", "120%"} {
		if err := c.SetMargin(bad); err == nil {
			t.Errorf("margin %q accepted", bad)
		}
	}
	p.Value[0], p.Value[1] = 50, 1000
	_, err = c.Apply(&p)
	if !errors.Is(err, ErrRange) {
		t.Errorf("nothing usable: %v", err)
	}
	p.ValueUnit = "HV10"
	if _, err := c.Apply(&p); !errors.Is(err, ErrUnit) {
		t.Errorf("scale mismatch: %v", err)
	}
	for a, b := range map[string]string{"HV": "HV0.5", "hv0,5": "HV0.5", "HRC": "HRC"} {
		if !sameScale(a, b) {
			t.Errorf("sameScale(%q, %q) false", a, b)
		}
	}
	for a, b := range map[string]string{"HV1": "HV0.5", "HK0.5": "HV0.5", "HRC": "HRB", "wt%": "wt%"} {
		if sameScale(a, b) {
			t.Errorf("sameScale(%q, %q) true", a, b)
		}
	}
}

func TestReadHistory(t *testing.T) {
	h, err := ReadHistory(filepath.Join("..", "testdata", "profile", "history", "furnace_F2.csv"))
	if err != nil {
		t.Fatal(err)
	}
	if h.Len() != 8 || h.Time[1] != 1800 || h.Temp[0] != 293.15 || h.Line[0] != 4 || h.Meta["furnace"] != "F2" {
		t.Errorf("%+v", h)
	}
	h, err = ReadHistoryCSV(strings.NewReader("T_K;elapsed_min\n1000;0\n1100,5;30\n"), "log.csv")
	if err != nil || !sameFloats(h.Temp, []float64{1000, 1100.5}) || !sameFloats(h.Time, []float64{0, 1800}) {
		t.Errorf("%+v, %v", h, err)
	}
	tests := []struct{ in, frag string }{
		{"time_h,temperature_C\n0,20\n2024-05-01T10:00,30\n", "clock times"},
		{"time_h,depth_mm\n0,20\n1,30\n", "needs a time column and a temperature column"},
		{"time_h,temp_C,T_K\n0,20,300\n", "two temperature columns"},
		{"time,temp_C\n0,20\n", "no unit"},
		{"time_h,temp_C\n1,20\n0.5,30\n", "does not increase"},
	}
	for _, tt := range tests {
		_, err := ReadHistoryCSV(strings.NewReader(tt.in), "log.csv")
		var e *Error
		if !errors.As(err, &e) || !strings.Contains(err.Error(), tt.frag) || !strings.Contains(err.Error(), "log.csv:") {
			t.Errorf("%q: %v", tt.in, err)
		}
	}
	if _, err := ReadHistory("log.xlsx"); !errors.Is(err, ErrFormat) {
		t.Errorf("xlsx history: %v", err)
	}
}
