package main

import (
	"math"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"testing"

	"github.com/fickfit/fickfit/fit"
)

// slopedBase is a throw-away model registered only by this test: the erf
// solution on a base level that rises linearly with depth,
// C = C0 + g·x + (Cs − C0)·erfc(x/(2√(Dt))). It exists to show that a
// model registered once is known to auto-selection, the text view, the CSV
// columns and the report without any other list.
type slopedBase struct{}

func (slopedBase) Name() string { return "sloped-base" }

func (slopedBase) Params() []fit.Param {
	return []fit.Param{
		{Name: "D", Log: true, Unit: "m2/s", Free: true},
		{Name: "Cs", Unit: "value", Free: true},
		{Name: "C0", Unit: "value", Free: true},
		{Name: "g", Unit: "value/m", Free: true},
	}
}

func (slopedBase) Start(d *fit.Data, p []float64) error {
	q := make([]float64, 4) // erf's D, Cs, C0, x0
	if err := (fit.Erf{}).Start(d, q); err != nil {
		return err
	}
	copy(p, q[:3])
	p[3] = 0
	return nil
}

func (slopedBase) Eval(p []float64, d *fit.Data, f, jac []float64) {
	D, cs, c0, g := math.Exp(p[0]), p[1], p[2], p[3]
	for i, x := range d.X {
		u := x / (2 * math.Sqrt(D*d.Time))
		e := math.Erfc(u)
		f[i] = c0 + g*x + (cs-c0)*e
		if jac != nil {
			j := jac[i*4 : i*4+4]
			j[0] = (cs - c0) * u * math.Exp(-u*u) / math.SqrtPi // ∂f/∂ln D
			j[1], j[2], j[3] = e, 1-e, x
		}
	}
}

const slopedTitle = "erf solution on a sloped base (throw-away test model)"

var (
	registerSloped sync.Once
	slopedOn       bool // auto-selection tries the model only inside the test
)

func withSlopedBase(t *testing.T) {
	registerSloped.Do(func() {
		fit.Register(fit.Info{Name: "sloped-base", Title: slopedTitle, InAuto: true, Rank: 60,
			Applies: func(*fit.Data) (bool, string) { return slopedOn, "" }},
			func() fit.Model { return slopedBase{} })
	})
	slopedOn = true
	t.Cleanup(func() { slopedOn = false })
}

// TestRegisteredModelEverywhere: a model registered in one place (here, a
// test) is tried by --model auto, named in the text view, given its
// parameter columns in the CSV and described in the campaign report,
// without a second list anywhere. Common practice, no source.
func TestRegisteredModelEverywhere(t *testing.T) {
	withSlopedBase(t)
	coupon := demoDir + "/coupons/F7-2291-910-1.csv"

	_, out, stderr := runCLI(t, "fit", coupon, "--model", "auto", "--ci", "wald")
	if !strings.Contains(out, "sloped-base ΔAICc") && !strings.Contains(out, "sloped-base not fitted") {
		t.Errorf("--model auto did not try the registered model:\n%s%s", out, stderr)
	}
	code, out, stderr := runCLI(t, "fit", coupon, "--model", "sloped-base", "--ci", "wald")
	if code != 0 || !strings.Contains(strings.Join(strings.Fields(out), " "), slopedTitle) {
		t.Errorf("text view does not name the model (exit %d):\n%s%s", code, out, stderr)
	}
	_, out, _ = runCLI(t, "fit", coupon, "--model", "sloped-base", "--ci", "wald", "--format", "csv")
	header := strings.Split(strings.SplitN(out, "\n", 2)[0], ",")
	if !contains(header, "g") || !contains(header, "g_stderr") {
		t.Errorf("CSV has no columns for the parameter g: %v", header)
	}
	dir := filepath.Join(t.TempDir(), "report")
	code, _, stderr = runCLI(t, "campaign", demoDir+"/coupons", "--out", dir, "--no-png", "--ci", "wald", "--model", "sloped-base")
	if code != 0 {
		t.Fatalf("campaign: exit %d: %s", code, stderr)
	}
	html, err := os.ReadFile(filepath.Join(dir, "report.html"))
	if err != nil {
		t.Fatal(err)
	}
	if n := strings.Count(string(html), slopedTitle); n < 2 { // a profile's section and the method notes
		t.Errorf("report.html names the model %d times, want it in the profiles and the method notes", n)
	}
}

func contains(list []string, s string) bool {
	for _, v := range list {
		if v == s {
			return true
		}
	}
	return false
}

// TestPanickingModelIsAProfileError: a model that panics costs its
// profiles their answer, in fit as in campaign, and never crashes the
// command. Common practice, no source.
func TestPanickingModelIsAProfileError(t *testing.T) {
	registerPanicky.Do(func() {
		fit.Register(fit.Info{Name: "panicky", Title: "a model that panics (test)"}, func() fit.Model { return panicky{} })
	})
	coupon := demoDir + "/coupons/F7-2291-910-1.csv"
	code, _, stderr := runCLI(t, "fit", coupon, "--model", "panicky", "--ci", "wald")
	if code != exitNoAnswer || !strings.Contains(stderr, "internal error while fitting") || !strings.Contains(stderr, "F7-2291-910-1") {
		t.Errorf("fit: exit %d, %s", code, stderr)
	}
	dir := filepath.Join(t.TempDir(), "report")
	code, out, stderr := runCLI(t, "campaign", coupon, "--out", dir, "--no-png", "--ci", "wald", "--model", "panicky")
	if code != 0 || !strings.Contains(strings.Join(strings.Fields(out), " "), "internal error while fitting") {
		t.Errorf("campaign: exit %d\n%s%s", code, out, stderr)
	}
}

var registerPanicky sync.Once

type panicky struct{ slopedBase }

func (panicky) Name() string { return "panicky" }

func (panicky) Eval(p []float64, d *fit.Data, f, jac []float64) { panic("evaluation failed") }
