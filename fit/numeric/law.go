package numeric

import (
	"fmt"
	"strings"

	"github.com/fickfit/fickfit/fit"
)

// Law is the concentration dependence of D in the numerical model
// (Config.DC). Its text form (flags) is the constant's value.
type Law string

// D(C) laws.
const (
	// LawConst: D(C) = D (the default when "").
	LawConst Law = "const"
	// LawExp: D(C) = D·exp(k·(C − C0)).
	LawExp Law = "exp"
	// LawTable: the shape of a measured table, scaled by the fitted D.
	LawTable Law = "table"
)

// Laws lists the laws, for flag help and completion.
func Laws() []string { return []string{string(LawConst), string(LawExp), string(LawTable)} }

// ParseLaw reads a law (case-insensitive; "" and "constant" are LawConst,
// "exponential" is LawExp).
func ParseLaw(s string) (Law, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "", "const", "constant":
		return LawConst, nil
	case "exp", "exponential":
		return LawExp, nil
	case "table":
		return LawTable, nil
	}
	return "", fmt.Errorf("%w: numeric model: unknown D(C) form %q (valid: const, exp, table)", fit.ErrBadInput, s)
}

// String is the law's name.
func (l Law) String() string { return string(l) }

// MarshalText writes the law's name.
func (l Law) MarshalText() ([]byte, error) { return []byte(l), nil }

// UnmarshalText reads a law's name.
func (l *Law) UnmarshalText(b []byte) error {
	v, err := ParseLaw(string(b))
	if err != nil {
		return err
	}
	*l = v
	return nil
}
