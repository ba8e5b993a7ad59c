package tempfmt

import (
	"math"
	"testing"
)

func TestRenderAndPlain(t *testing.T) {
	s := "at " + Mark(1213.7055555555555) + " and " + Mark(300) + "."
	if got := Plain(s); got != "at 1213.71 K and 300 K." {
		t.Errorf("Plain = %q", got)
	}
	got := Render(s, func(k float64) string { return strconvF(k - 273.15) })
	if got != "at 940.56 and 26.85." {
		t.Errorf("Render = %q", got)
	}
	if Plain("no marks") != "no marks" {
		t.Error("text without marks changed")
	}
	if got := Plain("broken ⟦T:12"); got != "broken ⟦T:12" {
		t.Errorf("damaged mark: %q", got)
	}
	if got := Plain("⟦T:x⟧ ok"); got != "⟦T:x⟧ ok" {
		t.Errorf("bad number: %q", got)
	}
}

func TestKelvinEdges(t *testing.T) {
	for _, c := range []struct {
		k    float64
		want string
	}{{1e308, "1e+308 K"}, {math.Inf(1), "not a number of kelvin"}, {math.NaN(), "not a number of kelvin"}, {1198.15, "1198.15 K"}, {-0.001, "0 K"}} {
		if got := Kelvin(c.k); got != c.want {
			t.Errorf("Kelvin(%g) = %q, want %q", c.k, got, c.want)
		}
	}
}

func strconvF(v float64) string {
	return Kelvin(v)[:len(Kelvin(v))-2]
}
