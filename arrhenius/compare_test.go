package arrhenius

import (
	"errors"
	"math"
	"strings"
	"testing"

	"github.com/fickfit/fickfit/fit"
	"github.com/fickfit/fickfit/internal/stats"
	"github.com/fickfit/fickfit/internal/tempfmt"
)

// twoLots simulates two lots with D of L2 = ratio × D of L1 at every temperature.
func twoLots(seed uint64, ratio float64) []Point {
	rng := newRand(seed, 1)
	var pts []Point
	for _, lot := range []string{"L1", "L2"} {
		for _, p := range simPoints(rng, 2, 0.06, 0) {
			p.Lot = lot
			p.ID = lot + "-" + p.ID
			if lot == "L2" {
				p.LnD += math.Log(ratio)
			}
			pts = append(pts, p)
		}
	}
	return pts
}

// TestCompareSelfCheck: self-check by simulation. With one true line the
// main F-test rejects at the 5 % level in about 5 % of 1000 replicates
// (accepted 3–7.5 %); with D of L2 = 1.3 × D of L1 the ratio's 95 %
// interval covers 1.3 in 92–98 % of them.
func TestCompareSelfCheck(t *testing.T) {
	reject := coverage(1000, func(i int) bool {
		c, err := Compare(twoLots(uint64(1000+i), 1), nil)
		if err != nil {
			t.Fatal(err)
		}
		return c.Differ
	})
	cov := coverage(1000, func(i int) bool {
		c, err := Compare(twoLots(uint64(5000+i), 1.3), &CompareOptions{TRef: 1198.15})
		if err != nil {
			t.Fatal(err)
		}
		r := c.Ratios[0]
		return r.CI.Lo <= 1.3 && 1.3 <= r.CI.Hi
	})
	t.Logf("self-check: false-difference rate %.3f (nominal 0.05), ratio coverage %.3f (nominal 0.95), 1000 replicates each", reject, cov)
	if reject < 0.03 || reject > 0.075 {
		t.Errorf("rejection rate %.3f under one common line", reject)
	}
	if cov < 0.92 || cov > 0.98 {
		t.Errorf("ratio coverage %.3f", cov)
	}
}

// TestCompareSingleTemperature: lots measured at one temperature each
// cannot have their own lines; the common-Q model is used and said.
func TestCompareSingleTemperature(t *testing.T) {
	var pts []Point
	for _, p := range twoLots(7, 1.5) {
		if p.T == 1223.15 || (p.Lot == "L1" && p.T == 1273.15) {
			pts = append(pts, p)
		}
	}
	c, err := Compare(pts, nil)
	if err != nil {
		t.Fatal(err)
	}
	if len(c.Tests) != 1 || c.Tests[0].Name != "common-Q-vs-common" || c.Ratios[0].Model != "common Q" || !hasWarning(c.Warnings, "no-separate-lines") {
		t.Errorf("tests %+v ratios %+v warnings %v", c.Tests, c.Ratios, c.Warnings)
	}
}

func TestCompareVerdictNoDifference(t *testing.T) {
	c, err := Compare(twoLots(1001, 1), &CompareOptions{TRef: 1198.15})
	if err != nil {
		t.Fatal(err)
	}
	if c.Differ || !strings.HasPrefix(c.Verdict, "No significant difference between lots L1 and L2 at the 5 % level (p = ") ||
		!strings.Contains(c.Verdict, "does not show that they are equal") {
		t.Errorf("verdict %q", c.Verdict)
	}
}

func TestCompareBadInput(t *testing.T) {
	pts := twoLots(3, 1)
	one := pts[:10]
	if _, err := Compare(one, nil); err == nil || !errors.Is(err, fit.ErrBadInput) || !strings.Contains(err.Error(), "one lot") {
		t.Errorf("one lot: %v", err)
	}
	if _, err := Compare(pts, &CompareOptions{Reference: "L9"}); err == nil || !strings.Contains(err.Error(), "L1, L2") {
		t.Errorf("unknown reference: %v", err)
	}
	c, err := Compare(pts, &CompareOptions{Reference: "L2"})
	if err != nil || c.Ratios[0].Group != "L1" || c.Ratios[0].Reference != "L2" {
		t.Errorf("reference L2: %v", err)
	}
}

// threeLots simulates lots A, B, C with D(B) = ratioB·D(A) and D(C) = ratioC·D(A).
func threeLots(seed uint64, ratioB, ratioC float64) []Point {
	rng := newRand(seed, 3)
	var pts []Point
	for k, lot := range []string{"A", "B", "C"} {
		for _, p := range simPoints(rng, 2, 0.06, 0) {
			p.Lot = lot
			p.ID = lot + "-" + p.ID
			p.LnD += math.Log([]float64{1, ratioB, ratioC}[k])
			pts = append(pts, p)
		}
	}
	return pts
}

// TestComparePairsThreeLots: with C identical to A and B 1.5 times faster,
// every pair is reported; A–C does not differ and the others do, the
// adjusted p-values are Holm's of the raw ones, and the verdict says so
// pair by pair (the single "differ" of the overall test no longer speaks
// for every pair).
func TestComparePairsThreeLots(t *testing.T) {
	c, err := Compare(threeLots(11, 1.5, 1), &CompareOptions{TRef: 1198.15})
	if err != nil {
		t.Fatal(err)
	}
	if len(c.Pairs) != 3 {
		t.Fatalf("%d pairs, want 3", len(c.Pairs))
	}
	var raw []float64
	for _, p := range c.Pairs {
		raw = append(raw, p.P)
	}
	adj := stats.Holm(raw)
	got := map[string]Pair{}
	for i, p := range c.Pairs {
		got[p.A+p.B] = p
		if p.PAdjusted != adj[i] || p.PAdjusted < p.P || p.Differ != (p.PAdjusted < c.Alpha) {
			t.Errorf("pair %s–%s: p %g adjusted %g (Holm %g) differ %v", p.A, p.B, p.P, p.PAdjusted, adj[i], p.Differ)
		}
	}
	if !got["AB"].Differ || !got["BC"].Differ || got["AC"].Differ {
		t.Errorf("pairs %+v", c.Pairs)
	}
	if r := got["AC"].Ratio; math.Abs(r-1) > 0.15 || !(got["AC"].CI.Lo < 1 && got["AC"].CI.Hi > 1) {
		t.Errorf("A–C ratio %g %v", r, got["AC"].CI)
	}
	v := tempfmt.Plain(c.Verdict)
	for _, want := range []string{"do not all follow one Arrhenius line", "adjusted for 3 comparisons (Holm)",
		"A and B differ", "A and C: no significant difference", "B and C differ", "at 1198.15 K"} {
		if !strings.Contains(v, want) {
			t.Errorf("verdict lacks %q:\n%s", want, v)
		}
	}
	if strings.Contains(v, " 1 times") {
		t.Errorf("verdict rounds a ratio to 1: %s", v)
	}
	// Two lots keep the single ratio and no pairs.
	c2, err := Compare(twoLots(3, 1.2), nil)
	if err != nil {
		t.Fatal(err)
	}
	if c2.Pairs != nil || len(c2.JSON().Pairs) != 0 {
		t.Errorf("two lots gave pairs %+v", c2.Pairs)
	}
}

// TestComparePairsSelfCheck: self-check by simulation. With three lots on
// one true line, the Holm-adjusted pairwise decisions declare at least one
// false difference in at most about 5 % of 600 replicates (family-wise
// error rate; accepted ≤ 7 %).
func TestComparePairsSelfCheck(t *testing.T) {
	fwer := coverage(600, func(i int) bool {
		c, err := Compare(threeLots(uint64(9000+i), 1, 1), &CompareOptions{TRef: 1198.15})
		if err != nil {
			t.Fatal(err)
		}
		for _, p := range c.Pairs {
			if p.Differ {
				return true
			}
		}
		return false
	})
	t.Logf("self-check: family-wise false-difference rate %.3f (nominal ≤ 0.05), 600 replicates", fwer)
	if fwer > 0.07 {
		t.Errorf("family-wise error rate %.3f", fwer)
	}
}
