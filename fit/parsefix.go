package fit

import (
	"fmt"
	"strconv"
	"strings"

	"github.com/fickfit/fickfit/profile"
)

// ParseFixed reads a held parameter written NAME=VALUE ("Cs=1.05",
// "x0=0.02mm"): VALUE is a plain number in the reported unit (D in m²/s,
// levels in the profile's unit, positions in m) or a length with its unit.
// The command line's --fix and the workbench read it here.
func ParseFixed(s string) (name string, value float64, err error) {
	name, val, ok := strings.Cut(s, "=")
	name, val = strings.TrimSpace(name), strings.TrimSpace(val)
	if !ok || name == "" {
		return "", 0, fmt.Errorf("%w: %q: write NAME=VALUE, e.g. Cs=1.05", ErrBadInput, s)
	}
	if v, err := strconv.ParseFloat(val, 64); err == nil {
		return name, v, nil
	}
	if v, err := profile.ParseLength(val); err == nil {
		return name, v, nil
	}
	return "", 0, fmt.Errorf("%w: %s: %q is not a number (or a length with a unit such as 0.02mm)", ErrBadInput, s, val)
}
