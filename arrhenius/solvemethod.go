package arrhenius

import (
	"fmt"
	"strings"
)

// SolveMethod is how a back-calculation's interval is obtained
// (SolveOptions.Method). Its text form (flags, JSON) is the constant's value.
type SolveMethod string

// Back-calculation interval methods.
const (
	// SolveAnalytic: Fieller's theorem (temperature), the Wald interval on ln t
	// (time) or test inversion (the level of a log). The default ("").
	SolveAnalytic SolveMethod = "analytic"
	// SolveMonteCarlo: the percentile interval of seeded simulations.
	SolveMonteCarlo SolveMethod = "monte-carlo"
	// SolveBoth: the analytic interval, with Monte Carlo beside it as a check.
	SolveBoth SolveMethod = "both"
)

// SolveMethods lists the methods, for flag help and completion.
func SolveMethods() []string {
	return []string{string(SolveAnalytic), string(SolveMonteCarlo), string(SolveBoth)}
}

// ParseSolveMethod reads a method (case-insensitive): "" and the names of
// the analytic intervals ("fieller", "wald") are SolveAnalytic, "mc" is
// MonteCarlo.
func ParseSolveMethod(s string) (SolveMethod, error) {
	switch m := strings.ToLower(strings.TrimSpace(s)); m {
	case "", "analytic", "fieller", "wald":
		return SolveAnalytic, nil
	case "monte-carlo", "mc":
		return SolveMonteCarlo, nil
	case "both":
		return SolveBoth, nil
	}
	return "", fmt.Errorf("unknown interval method %q (use analytic, monte-carlo or both)", s)
}

// String is the method's name.
func (m SolveMethod) String() string { return string(m) }

// MarshalText writes the method's name.
func (m SolveMethod) MarshalText() ([]byte, error) { return []byte(m), nil }

// UnmarshalText reads a method's name.
func (m *SolveMethod) UnmarshalText(b []byte) error {
	v, err := ParseSolveMethod(string(b))
	if err != nil {
		return err
	}
	*m = v
	return nil
}
