package main

import (
	"errors"
	"fmt"
	"io"
	"os"
	"strings"

	"github.com/spf13/cobra"

	"github.com/fickfit/fickfit/fit"
	"github.com/fickfit/fickfit/internal/cleanup"
	"github.com/fickfit/fickfit/profile"
	"github.com/fickfit/fickfit/report"
)

// fitStreamed runs `fickfit fit` as a pipeline: the files are read
// profile by profile (profile.Each), fitted on every core while reading
// goes on (fit.FitEach) and, for --format csv, written row by row as the
// fits finish (report.FitStream), so that the memory held is a window of
// profiles. It gives the same output, errors and exit status as reading
// everything first. It reports handled = false, having written nothing,
// when the input needs that other way: a long table whose rows of one
// profile are not together, or --model auto with CSV columns that differ
// between profiles. The caller checks the cases it does not take
// (bootstrap intervals, a furnace history, override flags that do not
// parse) before calling it.
func fitStreamed(c *cobra.Command, args []string, ff *fitFlags, o fit.Options, out *outFlags) (handled bool, err error) {
	adjust := ff.adjuster()
	// Errors found in a profile are reported after the reading errors, and
	// those of --below-limit refuse before the overrides', as when every
	// file is read first; after one, no profile is fitted.
	var belowErr, adjustErr error
	read := func(yield func(*profile.Profile) error) error {
		err := profile.Each(args, func(p *profile.Profile) error {
			if belowErr != nil || adjustErr != nil {
				return nil
			}
			if err := ff.checkBelowLimit([]profile.Profile{*p}); err != nil {
				belowErr = err
				return nil
			}
			if err := adjust(p); err != nil {
				adjustErr = err
				return nil
			}
			return yield(p)
		})
		switch {
		case err != nil:
			return err
		case belowErr != nil:
			return belowErr
		}
		return adjustErr
	}
	batch := &fit.BatchOptions{Progress: progress(c, "fit", 1)}
	var failed []profile.Profile // id and source of the profiles that gave no fit
	var errs []error
	doc := &report.FitStream{
		Gather: strings.EqualFold(strings.TrimSpace(o.Model), "auto") && o.Custom == nil,
		Run: func(keep bool, each func(*profile.Profile, *fit.Result, error) error) error {
			batch.Reuse = !keep
			return fit.FitEach(read, o, batch, func(p *profile.Profile, r *fit.Result, err error) error {
				if err != nil {
					failed = append(failed, profile.Profile{ID: p.ID, Source: p.Source})
					errs = append(errs, err)
				}
				return each(p, r, err)
			})
		},
	}
	err = out.emitWhole(c, doc)
	switch {
	case errors.Is(doc.RunErr, profile.ErrUngrouped), errors.Is(err, report.ErrColumnsChanged):
		return false, nil
	case doc.RunErr != nil:
		return true, doc.RunErr
	case err != nil && !errors.Is(err, report.ErrNoFits):
		return true, err
	}
	return true, groupErrors(failed, errs)
}

// noStream turns fitStreamed off: the tests compare both ways.
var noStream bool

// streamable tells whether fitStreamed takes the run: not for bootstrap
// intervals (their progress counts the profiles in advance), nor with a
// furnace history or --exclude (applied to the profiles read, reporting
// the rows that matched none), nor with --keep-going (whose table lists the
// inputs not read), nor when an override flag does not parse
// (the error is then reported in its usual order, after the reading
// errors).
func streamable(ff *fitFlags, history, qText, tref string, keepGoing bool) bool {
	return !noStream && !ff.bootstrap() && history == "" && qText == "" && tref == "" && ff.excl == nil &&
		!keepGoing && ff.override(nil) == nil
}

// adjuster returns what override does, for one profile at a time.
func (f *fitFlags) adjuster() func(p *profile.Profile) error {
	if f.cal == nil && f.temperature == "" && f.time == "" && f.thickness == "" {
		return func(*profile.Profile) error { return nil }
	}
	return func(p *profile.Profile) error {
		one := []profile.Profile{*p}
		if err := f.override(one); err != nil {
			return err
		}
		*p = one[0]
		return nil
	}
}

// emitWhole writes d like emit, but whole or not at all on standard output
// too: what d writes is held (in memory up to spillLimit, then in a
// temporary file) and copied out only when d has been written without
// error. A Document that reads while it writes (report.FitStream) may
// find bad input after writing rows; those rows must not reach a pipe.
func (o *outFlags) emitWhole(c *cobra.Command, d report.Document) error {
	write := func(w io.Writer) error { return emit(w, o.fmt, o.textOptions(), d) }
	if !o.toStdout() {
		return o.output().WriteFile(o.path, write)
	}
	s := &spill{limit: spillLimit}
	defer s.discard()
	if err := write(s); err != nil {
		return err
	}
	return s.commit(c.OutOrStdout())
}

// spillLimit is how much output emitWhole holds in memory before it goes
// on in a temporary file.
const spillLimit = 32 << 20

// spill holds written bytes in memory up to limit, in chunks (no copy as
// it grows), then in a temporary file.
type spill struct {
	limit  int
	chunks [][]byte
	held   int
	file   *os.File
	forget func() // takes the file off the interrupt's cleanup list
}

// spillChunk is the size of the chunks spill holds in memory.
const spillChunk = 256 << 10

func (s *spill) Write(p []byte) (int, error) {
	if s.file == nil && s.held+len(p) > s.limit {
		f, forget, err := cleanup.CreateTemp("", "fickfit-output-*") // removed on SIGINT/SIGTERM too
		if err != nil {
			return 0, fmt.Errorf("holding the output in a temporary file: %w", err)
		}
		s.file, s.forget = f, forget
		for _, c := range s.chunks {
			if _, err := f.Write(c); err != nil {
				return 0, fmt.Errorf("holding the output in a temporary file: %w", err)
			}
		}
		s.chunks = nil
	}
	if s.file != nil {
		n, err := s.file.Write(p)
		if err != nil {
			err = fmt.Errorf("holding the output in a temporary file: %w", err)
		}
		return n, err
	}
	for rest := p; len(rest) > 0; {
		if len(s.chunks) == 0 || len(s.chunks[len(s.chunks)-1]) == spillChunk {
			s.chunks = append(s.chunks, make([]byte, 0, spillChunk))
		}
		c := &s.chunks[len(s.chunks)-1]
		n := copy((*c)[len(*c):spillChunk], rest)
		*c = (*c)[:len(*c)+n]
		rest = rest[n:]
	}
	s.held += len(p)
	return len(p), nil
}

// commit copies everything written to w.
func (s *spill) commit(w io.Writer) error {
	if s.file == nil {
		for _, c := range s.chunks {
			if _, err := w.Write(c); err != nil {
				return err
			}
		}
		return nil
	}
	if _, err := s.file.Seek(0, io.SeekStart); err != nil {
		return err
	}
	_, err := io.Copy(w, s.file)
	return err
}

// discard removes the temporary file, if any.
func (s *spill) discard() {
	if s.file != nil {
		s.file.Close()
		os.Remove(s.file.Name())
		s.forget()
		s.file = nil
	}
}
