package arrhenius

import (
	"fmt"
	"strconv"
	"strings"

	"github.com/fickfit/fickfit/internal/phys"
)

// energyUnits are the units ParseEnergy reads, with their factor to J/mol.
// An electronvolt is per particle: 1 eV = N_A·e J/mol (phys.Faraday); a
// thermochemical kilocalorie is 4184 J.
var energyUnits = []struct {
	suffix string
	factor float64
}{{"kJ/mol", 1e3}, {"J/mol", 1}, {"eV", phys.Faraday}, {"kcal/mol", 4184}}

// ParseEnergy reads an activation energy and returns it in J/mol: a plain
// number is J/mol; "148kJ/mol", "148 kJ/mol", "1.53eV" and "35.4kcal/mol"
// carry their unit (case-insensitive). A decimal comma is accepted. The
// energy must be positive.
func ParseEnergy(s string) (float64, error) {
	t := strings.ReplaceAll(strings.TrimSpace(s), " ", "")
	factor := 1.0
	for _, u := range energyUnits {
		if strings.HasSuffix(strings.ToLower(t), strings.ToLower(u.suffix)) {
			t, factor = t[:len(t)-len(u.suffix)], u.factor
			break
		}
	}
	v, err := strconv.ParseFloat(strings.Replace(t, ",", ".", 1), 64)
	if err != nil || !(v > 0) {
		return 0, fmt.Errorf("%q is not a positive energy (write e.g. 148kJ/mol, 148000, 1.53eV)", s)
	}
	return v * factor, nil
}
