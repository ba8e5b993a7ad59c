package fit

import (
	"fmt"

	"github.com/fickfit/fickfit/internal/parallel"
	"github.com/fickfit/fickfit/profile"
)

// BatchOptions control FitAll. The zero value (or nil) reports no progress.
type BatchOptions struct {
	// Progress, when not nil, is called after each finished profile with
	// the count done so far and the total. It is called from one goroutine
	// at a time.
	Progress func(done, total int)
}

// FitAll fits every profile with the options o, in parallel over the
// available cores, and returns the results in input order: errs[i] is the
// error of profile i (nil when it was fitted) and results[i] is nil where
// errs[i] is not. One profile's failure never stops the others: a panic
// inside a model is recovered and becomes that profile's error, wrapping
// ErrNoAnswer and naming the profile. The command line's fit and campaign
// both fit through here, so they treat every profile alike.
func FitAll(ps []profile.Profile, o Options, b *BatchOptions) (results []*Result, errs []error) {
	results = make([]*Result, len(ps))
	errs = make([]error, len(ps))
	var progress func(done, total int)
	if b != nil {
		progress = b.Progress
	}
	parallel.For(len(ps), func(i int) { results[i], errs[i] = fitRecovered(&ps[i], o) }, progress)
	return results, errs
}

// fitRecovered is Fit with a panic inside a model turned into an error.
func fitRecovered(p *profile.Profile, o Options) (r *Result, err error) {
	defer func() {
		if e := recover(); e != nil {
			r, err = nil, errAt(p, fmt.Errorf("%w: internal error while fitting: %v", ErrNoAnswer, e))
		}
	}()
	return Fit(p, o)
}
