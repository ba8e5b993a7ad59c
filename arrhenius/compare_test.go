package arrhenius

import (
	"errors"
	"math"
	"strings"
	"testing"

	"github.com/fickfit/fickfit/fit"
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
