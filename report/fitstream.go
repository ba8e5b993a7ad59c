package report

import (
	"bufio"
	"errors"
	"io"
	"slices"

	"github.com/fickfit/fickfit/fit"
	"github.com/fickfit/fickfit/profile"
)

// ErrColumnsChanged is returned by FitCSV.Add for a result whose
// parameters differ from the first result's (profiles fitted with
// different models): the table's columns then depend on every result, and
// it must be written whole, with Fits.WriteCSV.
var ErrColumnsChanged = errors.New("the results have different parameters: the table is written whole")

// ErrNoFits is returned by the writers of a FitStream when no profile
// could be fitted: nothing has been written (the command writes no
// output then, as for an empty Fits).
var ErrNoFits = errors.New("no profile could be fitted")

// FitCSV writes the table of Fits.WriteCSV row by row, as the results
// arrive (in input order): each row is formatted into one reused buffer,
// and nothing of a result is kept once its row is written. The header
// goes out with the first row and takes its parameter and depth columns,
// and their units, from the first result: the table Fits.WriteCSV writes
// whenever every result has the first one's parameters and depths, which
// holds when one model fits every profile with one set of options. The profiles that gave no fit are written last, at
// Close, as Fits.WriteCSV does.
type FitCSV struct {
	w      *bufio.Writer
	t      *fitTable
	names  []string // the parameter names of the first result, in its order
	depths [2]bool  // whether the first result has a case, a decarburization depth
	buf    []byte
	failed []fit.Failure
	rows   int
}

// NewFitCSV writes the table to w.
func NewFitCSV(w io.Writer) *FitCSV {
	return &FitCSV{w: bufio.NewWriterSize(w, 64<<10)}
}

// Add writes the row of r (after the header, when r is the first). It
// returns ErrColumnsChanged, writing nothing, when r's parameters or depth
// kinds are not the first result's.
func (c *FitCSV) Add(r *fit.Result) error {
	buf := c.buf[:0]
	depths := [2]bool{r.CaseDepth != nil, r.DecarbDepth != nil}
	if c.t == nil {
		c.t = newFitTable([]*fit.Result{r})
		for _, e := range r.Params {
			c.names = append(c.names, e.Name)
		}
		c.depths = depths
		buf = c.t.appendHeader(buf)
	} else if len(r.Params) != len(c.names) || depths != c.depths ||
		!slices.EqualFunc(r.Params, c.names, func(e fit.Estimate, n string) bool { return e.Name == n }) {
		return ErrColumnsChanged
	}
	buf = c.t.appendRow(buf, r)
	c.buf = buf
	c.rows++
	_, err := c.w.Write(buf)
	return err
}

// Fail keeps a profile that gave no fit for the end of the table.
func (c *FitCSV) Fail(f fit.Failure) { c.failed = append(c.failed, f) }

// Rows is the number of fitted profiles written so far.
func (c *FitCSV) Rows() int { return c.rows }

// Close writes the rows of the failed profiles and flushes. With no row
// written it writes nothing and returns ErrNoFits.
func (c *FitCSV) Close() error {
	if c.t == nil {
		return ErrNoFits
	}
	buf := c.buf[:0]
	for _, f := range c.failed {
		buf = c.t.appendFailed(buf, f)
	}
	if _, err := c.w.Write(buf); err != nil {
		return err
	}
	return c.w.Flush()
}

// FitStream is the Document of a fit run whose results arrive one at a
// time, in input order (fit.FitEach): its CSV is written as the profiles
// finish (FitCSV), so that the memory held is a window of profiles however
// many there are; its text and JSON gather every result first and are
// those of Fits. A FitStream runs its fits when it is written, once.
type FitStream struct {
	// Run runs the fits, calling each with every profile and its result
	// or error, in input order, and returns each's error or its own (a
	// reading error, say). With keep false each is through with a result
	// when it returns, and Run may lend its storage to a later fit
	// (fit.BatchOptions.Reuse).
	Run func(keep bool, each func(p *profile.Profile, r *fit.Result, err error) error) error
	// Gather writes the CSV whole after every fit: its columns depend on
	// every result when the profiles may be fitted with different models
	// (--model auto).
	Gather bool
	// Version is the software version written into JSON; "" means DefaultVersion.
	Version string

	// Set by the writers. RunErr is the error Run returned when it was
	// not one of the writer's. Errs holds the errors of the profiles that
	// gave no fit, in input order.
	RunErr error
	Errs   []error
}

// run runs the fits, handing each result to add and each failure to fail;
// keep tells whether add keeps the results.
func (s *FitStream) run(keep bool, add func(*fit.Result) error, fail func(fit.Failure)) error {
	var addErr error
	err := s.Run(keep, func(p *profile.Profile, r *fit.Result, err error) error {
		if err != nil {
			s.Errs = append(s.Errs, err)
			fail(fit.NewFailure(p, err))
			return nil
		}
		if addErr = add(r); addErr != nil {
			return addErr
		}
		return nil
	})
	if addErr != nil {
		return addErr
	}
	s.RunErr = err
	return err
}

// gather runs the fits and returns them as Fits; ErrNoFits when none
// could be fitted.
func (s *FitStream) gather() (Fits, error) {
	f := Fits{Version: s.Version}
	err := s.run(true, func(r *fit.Result) error { f.Results = append(f.Results, r); return nil },
		func(fl fit.Failure) { f.Failed = append(f.Failed, fl) })
	if err == nil && len(f.Results) == 0 {
		err = ErrNoFits
	}
	return f, err
}

// WriteCSV writes the fit table (Fits.WriteCSV) row by row as the fits
// finish, or whole with Gather.
func (s *FitStream) WriteCSV(w io.Writer) error {
	if s.Gather {
		f, err := s.gather()
		if err != nil {
			return err
		}
		return f.WriteCSV(w)
	}
	c := NewFitCSV(w)
	if err := s.run(false, c.Add, c.Fail); err != nil {
		return err
	}
	return c.Close()
}

// WriteJSON writes what Fits.WriteJSON writes, after every fit.
func (s *FitStream) WriteJSON(w io.Writer) error {
	f, err := s.gather()
	if err != nil {
		return err
	}
	return f.WriteJSON(w)
}

// WriteText writes what Fits.WriteText writes, after every fit.
func (s *FitStream) WriteText(w io.Writer, o TextOptions) error {
	f, err := s.gather()
	if err != nil {
		return err
	}
	return f.WriteText(w, o)
}

var _ Document = (*FitStream)(nil)
