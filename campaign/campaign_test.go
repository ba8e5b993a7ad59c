package campaign

import (
	"fmt"
	"os"
	"testing"

	"github.com/fickfit/fickfit"
	"github.com/fickfit/fickfit/fit"
	"github.com/fickfit/fickfit/profile"
)

func TestUnknownOf(t *testing.T) {
	for _, c := range []struct {
		meta    string
		T, time float64
		want    string
		err     bool
	}{
		{"", 1200, 3600, "", false},
		{"no", 1200, 3600, "", false},
		{"temperature", 0, 3600, "temperature", false},
		{"Time", 1200, 0, "time", false},
		{"yes", 0, 3600, "temperature", false},
		{"1", 1200, 0, "time", false},
		{"true", 1200, 3600, "temperature", false},
		{"yes", 0, 0, "", true},
		{"maybe", 1200, 3600, "", true},
	} {
		p := profile.Profile{Temperature: c.T, Time: c.time, Meta: map[string]string{"unknown": c.meta}}
		got, err := unknownOf(&p)
		if got != c.want || (err != nil) != c.err {
			t.Errorf("unknown=%q T=%g t=%g: %q, %v", c.meta, c.T, c.time, got, err)
		}
	}
}

func TestQuantityOf(t *testing.T) {
	for _, c := range []struct {
		p    profile.Profile
		want string
	}{
		{profile.Profile{Quantity: "N"}, "N"},
		{profile.Profile{ValueName: "C_wt%"}, "C"},
		{profile.Profile{ValueName: "carbon (wt%)"}, "carbon"},
		{profile.Profile{ValueName: "HV0.5"}, "HV0.5"},
	} {
		if got := QuantityOf(&c.p); got != c.want {
			t.Errorf("QuantityOf(%+v) = %q, want %q", c.p, got, c.want)
		}
	}
}

func ExampleRunFS() {
	// The CLI's demo runs this on its embedded files; here a folder of the
	// module's demo campaign stands in.
	res, err := RunFS(os.DirFS("../testdata/demo"), Options{Fit: fit.Options{CI: "wald"}})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(len(res.Results), "profiles fitted,", len(res.Lines.Lines), "Arrhenius lines")
	for _, p := range res.Parts {
		fmt.Println("back-calculated:", p.ID, p.SolveFor, p.Solution != nil)
	}
	// Output:
	// 25 profiles fitted, 2 Arrhenius lines
	// back-calculated: pinion-7731 temperature true
}

// TestRunFSDemo runs the embedded demo campaign (invented data) and checks
// what the campaign computed, without writing anything: every profile
// fitted, one line per lot, the lots compared, the pinion back-calculated
// within the furnace range. Self-check of the orchestration, not of the
// science.
func TestRunFSDemo(t *testing.T) {
	var stages []string
	res, err := RunFS(fickfit.Demo(), Options{Fit: fit.Options{CI: "wald"}, Progress: func(stage string, done, total int) {
		if len(stages) == 0 || stages[len(stages)-1] != stage {
			stages = append(stages, stage)
		}
	}})
	if err != nil {
		t.Fatal(err)
	}
	if got := fmt.Sprint(stages); got != "[read fit arrhenius]" {
		t.Errorf("stages %s", got)
	}
	if len(res.Results) != 25 || len(res.Failed) != 0 || len(res.Profiles) != 25 {
		t.Errorf("%d fitted, %d failed of %d", len(res.Results), len(res.Failed), len(res.Profiles))
	}
	if res.Lines == nil || len(res.Lines.Lines) != 2 || res.Comparison == nil {
		t.Fatalf("lines %+v, comparison %v", res.Lines, res.Comparison)
	}
	if len(res.Parts) != 1 || res.Parts[0].Solution == nil {
		t.Fatalf("parts %+v", res.Parts)
	}
	if T := res.Parts[0].Solution.Temperature.Value; !(T > 1153 && T < 1244) {
		t.Errorf("pinion at %g K, outside the calibration range", T)
	}
	if res.Options.TempUnit != "" {
		t.Errorf("the campaign recorded an output unit %q; the writer does", res.Options.TempUnit)
	}
}
