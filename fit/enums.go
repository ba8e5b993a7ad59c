package fit

import (
	"fmt"
	"strings"
)

// CIMethod is how the intervals of a fit are obtained. Options.CI takes
// one of CIProfile, CIWald or CIBootstrap ("" means CIProfile); a Result
// says which was used, a bootstrap as CIBootstrapBCa or
// CIBootstrapPercentile. Its text form (flags, JSON) is the constant's
// value.
type CIMethod string

// Interval methods.
const (
	// CIProfile: profile likelihood, signed root against Student t.
	CIProfile CIMethod = "profile"
	// CIWald: covariance s²(JᵀWJ)⁻¹ with Student-t quantiles.
	CIWald CIMethod = "wald"
	// CIBootstrap asks for a seeded bootstrap (BCa unless
	// BootstrapOptions.Percentile).
	CIBootstrap CIMethod = "bootstrap"
	// CIBootstrapBCa and CIBootstrapPercentile name the bootstrap used.
	CIBootstrapBCa        CIMethod = "bootstrap-bca"
	CIBootstrapPercentile CIMethod = "bootstrap-percentile"
)

// CIMethods lists the methods a fit can be asked for, for flag help and
// completion.
func CIMethods() []string { return []string{string(CIProfile), string(CIWald), string(CIBootstrap)} }

// ParseCIMethod reads a method a fit can be asked for (case-insensitive;
// "" is CIProfile).
func ParseCIMethod(s string) (CIMethod, error) {
	switch m := CIMethod(strings.ToLower(strings.TrimSpace(s))); m {
	case "":
		return CIProfile, nil
	case CIProfile, CIWald, CIBootstrap:
		return m, nil
	}
	return "", fmt.Errorf("%w: unknown interval method %q (use profile, wald or bootstrap)", ErrBadInput, s)
}

// String is the method's name.
func (m CIMethod) String() string { return string(m) }

// MarshalText writes the method's name.
func (m CIMethod) MarshalText() ([]byte, error) { return []byte(m), nil }

// UnmarshalText reads any method name a result may carry.
func (m *CIMethod) UnmarshalText(b []byte) error {
	switch v := CIMethod(strings.ToLower(strings.TrimSpace(string(b)))); v {
	case CIProfile, CIWald, CIBootstrap, CIBootstrapBCa, CIBootstrapPercentile:
		*m = v
		return nil
	}
	return fmt.Errorf("unknown interval method %q", b)
}

// Covariance says how the covariance of a fit was scaled.
type Covariance string

// Covariance kinds.
const (
	// CovScaled: s²(JᵀWJ)⁻¹, scaled by the reduced χ² (the default).
	CovScaled Covariance = "scaled"
	// CovAbsolute: (JᵀWJ)⁻¹ with the σ column taken as known standard
	// uncertainties (Options.AbsoluteSigma).
	CovAbsolute Covariance = "absolute"
)

// ParseCovariance reads a covariance kind (case-insensitive).
func ParseCovariance(s string) (Covariance, error) {
	switch c := Covariance(strings.ToLower(strings.TrimSpace(s))); c {
	case CovScaled, CovAbsolute:
		return c, nil
	}
	return "", fmt.Errorf("unknown covariance kind %q (scaled or absolute)", s)
}

// String is the kind's name.
func (c Covariance) String() string { return string(c) }

// MarshalText writes the kind's name.
func (c Covariance) MarshalText() ([]byte, error) { return []byte(c), nil }

// UnmarshalText reads a kind's name.
func (c *Covariance) UnmarshalText(b []byte) error {
	v, err := ParseCovariance(string(b))
	if err != nil {
		return err
	}
	*c = v
	return nil
}
