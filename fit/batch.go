package fit

import (
	"fmt"
	"runtime"
	"sync"

	"github.com/fickfit/fickfit/internal/parallel"
	"github.com/fickfit/fickfit/profile"
)

// BatchOptions control FitAll and FitEach. The zero value (or nil)
// reports no progress.
type BatchOptions struct {
	// Progress, when not nil, is called after each finished profile with
	// the count done so far and the total. It is called from one goroutine
	// at a time.
	Progress func(done, total int)
	// Reuse, for FitEach, tells that done is through with a result when
	// it returns (it writes a summary row, say): the storage of the result
	// (its parameters, residuals, correlations) is then lent to a later
	// fit. done must not keep r, or anything in it, after it returns.
	Reuse bool
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
	parallel.For(len(ps), func(i int) { results[i], errs[i] = fitRecovered(&ps[i], o, nil) }, progress)
	return results, errs
}

// EachWindow is how many profiles FitEach holds at most (read but not yet
// handed to done) per core.
const EachWindow = 64

// FitEach fits the profiles that read yields, in parallel over the
// available cores while read is still reading, and calls done with each
// profile, its result and its error in the order read yielded them, from
// the calling goroutine, as soon as the profiles before it are done:
// results can be written as they come, and only a window of profiles
// (EachWindow per core) is held at any time. read has the shape of
// profile.Each: FitEach(func(yield func(*profile.Profile) error) error {
// return profile.Each(paths, yield) }, …). Each profile is fitted as by
// FitAll, with the same result and error. b.Progress, when given, is
// called after each done with the count so far and a total of −1 (not
// known in advance).
//
// When done or read returns an error, the fits stop and that error is
// returned (done's first).
func FitEach(read func(yield func(*profile.Profile) error) error, o Options, b *BatchOptions, done func(p *profile.Profile, r *Result, err error) error) error {
	var progress func(done, total int)
	reuse := false
	if b != nil {
		progress, reuse = b.Progress, b.Reuse
	}
	type fitted struct {
		r   *Result
		err error
	}
	var spare sync.Pool // results done with, when reuse
	n := 0
	return parallel.Ordered(EachWindow*runtime.GOMAXPROCS(0), read,
		func(p *profile.Profile) fitted {
			var into *Result
			if reuse {
				into, _ = spare.Get().(*Result)
			}
			r, err := fitRecovered(p, o, into)
			if r != into && into != nil {
				spare.Put(into)
			}
			return fitted{r, err}
		},
		func(p *profile.Profile, f fitted) error {
			err := done(p, f.r, f.err)
			if reuse && f.r != nil {
				spare.Put(f.r)
			}
			if err != nil {
				return err
			}
			if n++; progress != nil {
				progress(n, -1)
			}
			return nil
		})
}

// fitRecovered is fitInto with a panic inside a model turned into an
// error.
func fitRecovered(p *profile.Profile, o Options, into *Result) (r *Result, err error) {
	defer func() {
		if e := recover(); e != nil {
			r, err = nil, errAt(p, fmt.Errorf("%w: internal error while fitting: %v", ErrNoAnswer, e))
		}
	}()
	return fitInto(p, o, into)
}
