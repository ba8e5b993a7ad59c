package profile_test

import (
	"errors"
	"fmt"
	"strings"

	"github.com/fickfit/fickfit/profile"
)

func ExampleParseTemperature() {
	for _, s := range []string{"925 C", "1700°F", "1198 K"} {
		k, _ := profile.ParseTemperature(s)
		fmt.Printf("%s = %.2f K\n", s, k)
	}
	_, err := profile.ParseTemperature("-300 C")
	fmt.Println(err)
	// Output:
	// 925 C = 1198.15 K
	// 1700°F = 1199.82 K
	// 1198 K = 1198.00 K
	// temperature "-300 C" is -26.85 K, not above absolute zero
}

func ExampleParseDuration() {
	s, _ := profile.ParseDuration("4 h 30 min")
	fmt.Println(s, "s")
	// Output: 16200 s
}

func ExampleReadCSV() {
	const data = `# id: A3
# temperature: 925 C
# time: 4 h
depth_mm;C_wt%
0,05;0,87
0,10;0,84
`
	ps, err := profile.ReadCSV(strings.NewReader(data), "A3.csv")
	if err != nil {
		fmt.Println(err)
		return
	}
	p := ps[0]
	fmt.Println(p.ID, p.Quantity, p.ValueUnit, p.Temperature, "K", p.Time, "s")
	fmt.Println(p.Depth, p.Value, p.Line)
	// Output:
	// A3 C wt% 1198.15 K 14400 s
	// [5e-05 0.0001] [0.87 0.84] [5 6]
}

func ExampleReadCSV_longTable() {
	const data = `specimen,temperature_C,time_h,depth_um,HV0.5
B2,900,4,50,780
B1,925,4,50,810
B2,900,4,100,700
`
	ps, _ := profile.ReadCSV(strings.NewReader(data), "campaign.csv")
	for _, p := range ps {
		fmt.Println(p.ID, p.Temperature, p.Len(), p.Quantity, p.ValueUnit)
	}
	// Output:
	// B2 1173.15 2 hardness HV0.5
	// B1 1198.15 1 hardness HV0.5
}

func ExampleRead() {
	ps, err := profile.Read("../testdata/profile/A3.csv")
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(ps[0].ID, ps[0].Material, ps[0].Lot, ps[0].Len(), "points")
	// Output: A3 20MnCr5 L1 12 points
}

func ExampleError() {
	_, err := profile.ReadCSV(strings.NewReader("depth_mm,C_wt%\n0.1,0.8\n0.4x,0.5\n"), "coupon.csv")
	fmt.Println(err)
	var e *profile.Error
	if errors.As(err, &e) {
		fmt.Println(e.Line, e.Column, errors.Is(err, profile.ErrNumber))
	}
	// Output:
	// coupon.csv:3: column "depth_mm": "0.4x" is not a number — fix the cell or remove the row
	// 3 depth_mm true
}

func ExampleCalibration_Apply() {
	cal, _ := profile.ReadCalibrationCSV(strings.NewReader("HV0.5,C_wt%\n250,0.2\n550,0.5\n820,0.8\n"), "cal.csv")
	hard, _ := profile.ReadCSV(strings.NewReader("depth_mm,HV0.5\n0.1,700\n0.5,400\n"), "B7.csv")
	conc, err := cal.Apply(&hard[0])
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%s %s %.3f %.3f\n", conc.Quantity, conc.ValueUnit, conc.Value[0], conc.Value[1])
	_, err = cal.ToConcentration(900)
	fmt.Println(err)
	// Output:
	// C wt% 0.665 0.348
	// hardness 900 HV0.5 is outside the calibrated range 250–820 HV0.5
}

func ExampleMonotone() {
	// Tangents at x = 0, 1: 1 and 0 (secants 1 and 0 differ in sign), so
	// f(0.5) = h10·1 + h01·1 = 0.125 + 0.5 (cubic Hermite basis); flat on [1, 2].
	f, _ := profile.NewMonotone([]float64{0, 1, 2, 3}, []float64{0, 1, 1, 2})
	fmt.Println(f.At(0.5), f.At(1.5), f.At(4))
	// Output: 0.625 1 NaN
}

func ExampleReadHistoryCSV() {
	h, _ := profile.ReadHistoryCSV(strings.NewReader("time_h,temperature_C\n0,20\n1,925\n5,925\n"), "log.csv")
	fmt.Println(h.Time, h.Temp)
	// Output: [0 3600 18000] [293.15 1198.15 1198.15]
}
