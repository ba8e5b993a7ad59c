package fit

import "errors"

// Error kinds. Every error from this package wraps one of these, so that
// the command line can choose its exit status with errors.Is: bad input
// exits 2, a computation that gives no answer exits 1.
var (
	// ErrBadInput: the request or the data cannot be fitted as given
	// (too few points, unknown parameter, impossible fixed value…).
	ErrBadInput = errors.New("bad input")
	// ErrNoAnswer: the computation ran but gives no trustworthy answer
	// (no convergence, singular Jacobian, parameters the data cannot identify).
	ErrNoAnswer = errors.New("no answer")
)
