package arrhenius

import (
	"math"
	"strings"
	"testing"
)

// Unit factors: 1 kJ = 1000 J; 1 eV per particle = 96 485.332 12 J/mol
// (CODATA 2018, N_A·e exact); 1 thermochemical kcal = 4184 J (NIST SP 811,
// 2008, B.8).
func TestParseEnergy(t *testing.T) {
	for _, tc := range []struct {
		in   string
		want float64
	}{
		{"148000J/mol", 148000}, {"148kJ/mol", 148000}, {"148 kJ/mol", 148000}, {"1.5eV", 1.5 * 96485.33212},
		{"35kcal/mol", 35 * 4184}, {"148,5kJ/mol", 148500}, {"2J/MOL", 2},
	} {
		got, err := ParseEnergy(tc.in)
		if err != nil || math.Abs(got-tc.want) > 1e-6*tc.want {
			t.Errorf("ParseEnergy(%q) = %v, %v; want %v", tc.in, got, err, tc.want)
		}
	}
	for _, bad := range []string{"", "-5kJ/mol", "0", "fast", "kJ/mol", "142", "148000", "1e400kJ/mol"} {
		if _, err := ParseEnergy(bad); err == nil {
			t.Errorf("ParseEnergy(%q) gave no error", bad)
		}
	}
	if _, err := ParseEnergy("142"); err == nil || !strings.Contains(err.Error(), "142kJ/mol") {
		t.Errorf("a bare number: %v", err)
	}
	for q, ok := range map[float64]bool{142: false, 142e3: true, 2e6: false, 5e3: true} {
		if err := CheckActivationEnergy(q); (err == nil) != ok {
			t.Errorf("CheckActivationEnergy(%g): %v", q, err)
		}
	}
}
