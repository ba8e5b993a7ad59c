package fit

import (
	"errors"
	"math"
	"strings"
	"testing"

	"github.com/fickfit/fickfit/profile"
)

// panicky is a model whose evaluation panics: a programming error inside
// one model must cost one profile its answer, not the batch.
type panicky struct{ Erf }

func (panicky) Name() string { return "panicky" }
func (panicky) Eval(p []float64, d *Data, f, jac []float64) {
	var s []float64
	_ = s[len(p)] // index out of range
}

// TestFitAllRecoversPanic: common practice, no source (a batch job keeps
// going past one failure). The invented profile is an erf curve.
func TestFitAllRecoversPanic(t *testing.T) {
	x := []float64{1e-4, 2e-4, 3e-4, 4e-4, 5e-4, 6e-4, 8e-4, 1e-3}
	y := make([]float64, len(x))
	for i, xi := range x {
		y[i] = 0.2 + 0.7*math.Erfc(xi/(2*math.Sqrt(1e-11*14400)))
	}
	ps := []profile.Profile{
		{ID: "good", Source: "a.csv", Depth: x, Value: y, Time: 14400},
		{ID: "bad", Source: "b.csv", Depth: x, Value: y, Time: 14400},
	}
	var calls int
	rs, errs := FitAll(ps[:1], Options{CI: "wald"}, &BatchOptions{Progress: func(done, total int) { calls++ }})
	if errs[0] != nil || rs[0] == nil || calls != 1 {
		t.Fatalf("good profile: %v, %d progress calls", errs[0], calls)
	}
	rs, errs = FitAll(ps, Options{CI: "wald", Custom: panicky{}}, nil)
	for i := range ps {
		if rs[i] != nil || errs[i] == nil {
			t.Fatalf("%s: a panicking model gave %v, %v", ps[i].ID, rs[i], errs[i])
		}
		if !errors.Is(errs[i], ErrNoAnswer) || !strings.Contains(errs[i].Error(), ps[i].ID) ||
			!strings.Contains(errs[i].Error(), "internal error") {
			t.Errorf("error %q: want ErrNoAnswer naming %s", errs[i], ps[i].ID)
		}
	}
}
