package fit

import "fmt"

// Status says how Solve ended. Callers switch on it; Solution.Reason says
// the same in words for people. Programs should not rely on the numeric
// values, only on the names.
type Status int

const (
	// NotTerminated is the zero value: Solve has not run.
	NotTerminated Status = iota
	// Certified: the first-order certificate holds at the final point (an
	// evaluated, accepted point): the largest scaled gradient component and
	// the predicted relative reduction of the residual sum are both below
	// tolerance, and the free parameters are identified. The only status
	// that counts as converged.
	Certified
	// IterationLimit: Settings.MaxIter iterations ran without a certificate.
	IterationLimit
	// NoDescent: no damped step reduces the residual sum any more, yet the
	// certificate does not hold (a small step alone proves nothing).
	NoDescent
	// NotFinite: the model or its Jacobian is not finite at the current point.
	NotFinite
	// Asymptote: a free parameter no longer changes the model (it ran off
	// towards an asymptote, 0 or infinity); Solution.Stuck names it.
	Asymptote
	// Unidentified: the certificate holds but the scaled JᵀWJ is too
	// ill-conditioned for the free parameters to be told apart.
	Unidentified
)

var statusNames = [...]string{
	NotTerminated:  "not-terminated",
	Certified:      "certified",
	IterationLimit: "iteration-limit",
	NoDescent:      "no-descent",
	NotFinite:      "not-finite",
	Asymptote:      "asymptote",
	Unidentified:   "unidentified",
}

// String returns the stable name of the status ("certified", "iteration-limit"…).
func (s Status) String() string {
	if s >= 0 && int(s) < len(statusNames) {
		return statusNames[s]
	}
	return fmt.Sprintf("status(%d)", int(s))
}

// Converged reports whether the status is a usable optimum (Certified).
func (s Status) Converged() bool { return s == Certified }

// MarshalText writes the stable name.
func (s Status) MarshalText() ([]byte, error) {
	if s < 0 || int(s) >= len(statusNames) {
		return nil, fmt.Errorf("fit: unknown solver status %d", int(s))
	}
	return []byte(statusNames[s]), nil
}

// UnmarshalText reads a name written by MarshalText.
func (s *Status) UnmarshalText(b []byte) error {
	for i, n := range statusNames {
		if n == string(b) {
			*s = Status(i)
			return nil
		}
	}
	return fmt.Errorf("fit: unknown solver status %q", b)
}
