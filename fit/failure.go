package fit

import (
	"errors"

	"github.com/fickfit/fickfit/profile"
)

// Cautions accompany every set of fitted diffusion coefficients, in every
// output that reports them.
var Cautions = []string{
	"Each D is the estimate of a model: the stated solution of Fick's second law (D constant, or the stated function of concentration; the stated boundary condition and geometry) is assumed to describe the profile. The warnings say where these data do not support that.",
	"Intervals cover the statistical scatter of the measured points only, not bias of the measurement method, surface preparation or the depth scale.",
	"Verify by metallography (microstructure, microhardness traverse or chemical profile) before acting on a number.",
	"The applicable specifications decide acceptance; defer to local codes and to licensed engineering judgement.",
}

// Failure kinds, as written in Failure.Kind.
const (
	// KindBadInput: the request or the data must be changed (exit status 2).
	KindBadInput = "bad input"
	// KindNoAnswer: the data could not give an answer (exit status 1).
	KindNoAnswer = "no answer"
)

// Failure is a profile (or a part) that gave no answer, in the wire form
// of the "failed" lists of fickfit's documents.
type Failure struct {
	// ID, Source and Lot name the profile (or part) and its file.
	ID     string `json:"id"`
	Source string `json:"source,omitempty"`
	Lot    string `json:"lot,omitempty"`
	// Kind is KindBadInput or KindNoAnswer.
	Kind string `json:"kind"`
	// Error says what went wrong and what to do.
	Error string `json:"error"`
}

// FailureKind is the Failure kind of err: KindBadInput when it wraps
// ErrBadInput, KindNoAnswer otherwise.
func FailureKind(err error) string {
	if errors.Is(err, ErrBadInput) {
		return KindBadInput
	}
	return KindNoAnswer
}

// NewFailure describes the error of fitting profile p.
func NewFailure(p *profile.Profile, err error) Failure {
	return Failure{ID: p.ID, Source: p.Source, Lot: p.Lot, Kind: FailureKind(err), Error: err.Error()}
}
