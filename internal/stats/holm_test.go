package stats

import (
	"math"
	"testing"
)

// TestHolmPublishedExample: the four-hypothesis example of the article
// "Holm–Bonferroni method" (Wikipedia, procedure section; also worked on
// geeksforgeeks.org, "Holm-Bonferroni Method"): p = 0.01, 0.04, 0.03,
// 0.005 at α = 0.05 rejects H1 and H4 only. The adjusted values are hand
// values from Holm's definition (Holm 1979): 4·0.005, 3·0.01, 2·0.03 and
// max(0.06, 1·0.04).
func TestHolmPublishedExample(t *testing.T) {
	got := Holm([]float64{0.01, 0.04, 0.03, 0.005})
	want := []float64{0.03, 0.06, 0.06, 0.02}
	for i := range want {
		if math.Abs(got[i]-want[i]) > 1e-15 {
			t.Errorf("H%d: adjusted p %g, want %g", i+1, got[i], want[i])
		}
	}
	var rejected []int
	for i, p := range got {
		if p < 0.05 {
			rejected = append(rejected, i+1)
		}
	}
	if len(rejected) != 2 || rejected[0] != 1 || rejected[1] != 4 {
		t.Errorf("rejected %v, the example rejects H1 and H4", rejected)
	}
}

// TestHolmSixTests: the six p-values of metricgate.com's page "Holm-
// Bonferroni correction" (its R example, p.adjust(…, "holm")); the
// adjusted values are hand values from the definition: 6·0.005, 5·0.01,
// 4·0.03, max(0.12, 3·0.04), 2·0.07, max(0.14, 0.20).
func TestHolmSixTests(t *testing.T) {
	got := Holm([]float64{0.01, 0.04, 0.20, 0.03, 0.005, 0.07})
	want := []float64{0.05, 0.12, 0.20, 0.12, 0.03, 0.14}
	for i := range want {
		if math.Abs(got[i]-want[i]) > 1e-12 {
			t.Errorf("test %d: adjusted p %g, want %g", i+1, got[i], want[i])
		}
	}
}

// TestHolmEdges: capped at 1, NaN left out of the count, ties kept monotone.
func TestHolmEdges(t *testing.T) {
	got := Holm([]float64{0.6, math.NaN(), 0.5})
	if got[0] != 1 || !math.IsNaN(got[1]) || got[2] != 1 {
		t.Errorf("got %v", got)
	}
	got = Holm([]float64{0.02, 0.02})
	if got[0] != 0.04 || got[1] != 0.04 {
		t.Errorf("ties: %v", got)
	}
	if len(Holm(nil)) != 0 {
		t.Error("nil")
	}
}
