package arrhenius

import (
	"fmt"
	"math"
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

// ParseEnergy reads an energy with its unit and returns it in J/mol:
// "148kJ/mol", "148 kJ/mol", "148000 J/mol", "1.53eV", "35.4kcal/mol"
// (case-insensitive; a decimal comma is accepted). The unit is required:
// a bare "142" could be J/mol or kJ/mol, a factor of a thousand apart, and
// is refused. The energy must be a positive finite number.
func ParseEnergy(s string) (float64, error) {
	t := strings.ReplaceAll(strings.TrimSpace(s), " ", "")
	factor := 0.0
	for _, u := range energyUnits {
		if strings.HasSuffix(strings.ToLower(t), strings.ToLower(u.suffix)) {
			t, factor = t[:len(t)-len(u.suffix)], u.factor
			break
		}
	}
	v, err := strconv.ParseFloat(strings.Replace(t, ",", ".", 1), 64)
	if err != nil || !(v > 0) || math.IsInf(v, 0) {
		return 0, fmt.Errorf("%q is not a positive energy with its unit (write e.g. 148kJ/mol, 148000J/mol or 1.53eV)", s)
	}
	if factor == 0 {
		return 0, fmt.Errorf("%q has no unit: write %skJ/mol if that is what is meant (or J/mol, eV, kcal/mol); a number alone could be J/mol or kJ/mol, a factor of a thousand apart", s, t)
	}
	return v * factor, nil
}

// Bounds of an activation energy of diffusion in a solid: below 1 kJ/mol
// D would hardly change between room temperature and a furnace, and no
// published value reaches 1.5 MJ/mol (qAbsurd). Common practice, no source.
const qTiny = 1e3 // J/mol

// CheckActivationEnergy refuses an activation energy (J/mol) outside the
// range of diffusion in solids, with the likely slip.
func CheckActivationEnergy(q float64) error {
	switch {
	case !(q >= qTiny):
		return fmt.Errorf("%.4g J/mol is below any activation energy of diffusion in a solid (1 kJ/mol and more): was kJ/mol meant?", q)
	case q > qAbsurd:
		return fmt.Errorf("%.4g kJ/mol is beyond any published activation energy of diffusion in a solid (at most about 1500 kJ/mol): check the unit", q/1e3)
	}
	return nil
}
