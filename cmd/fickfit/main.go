// Command fickfit fits Fick's-second-law solutions to measured diffusion
// profiles and turns the fitted D into Arrhenius parameters, back-calculated
// exposures, lot comparisons, predictions and reports.
//
// It only parses flags, calls the packages and chooses the writer; all the
// science lives in profile, fit, arrhenius and report.
package main

import (
	"errors"
	"fmt"
	"io"
	"os"
	"os/signal"
	"runtime/debug"
	"strings"
	"syscall"

	"github.com/fickfit/fickfit/arrhenius"
	"github.com/fickfit/fickfit/fit"
	"github.com/fickfit/fickfit/internal/cleanup"
	"github.com/fickfit/fickfit/profile"
	"github.com/fickfit/fickfit/report"
	"github.com/spf13/cobra"
)

// Exit statuses (docs/output.md, "Exit status").
const (
	exitOK       = 0
	exitNoAnswer = 1 // the computation could not give an answer
	exitBadInput = 2 // bad input or usage
	exitInternal = 3 // a fault of fickfit itself (a recovered panic)
	// A run stopped by SIGINT or SIGTERM exits 128 + the signal's number
	// (130, 143) after removing its temporary files; a crash of the Go
	// runtime (out of memory, an unrecovered panic in a goroutine) ends
	// with SIGABRT (134 in a shell), never with 2.
)

func main() {
	crashBySignal()
	sigs := make(chan os.Signal, 1)
	signal.Notify(sigs, os.Interrupt, syscall.SIGTERM)
	go func() { os.Exit(interrupted(<-sigs, os.Stderr)) }()
	os.Exit(run(os.Args[1:], os.Stdout, os.Stderr))
}

// crashBySignal makes the Go runtime end a fatal error (out of memory, an
// unrecovered panic outside run's goroutine) with SIGABRT instead of its
// usual exit status 2, which is fickfit's status for bad input. The
// traceback still goes to standard error; core dumps stay off (limitCore)
// unless the user set GOTRACEBACK.
func crashBySignal() {
	if os.Getenv("GOTRACEBACK") == "" {
		limitCore()
	}
	debug.SetTraceback("crash")
}

// interrupted is what main does on SIGINT or SIGTERM: remove every
// temporary file and folder of the run (internal/cleanup; a report being
// moved into place is finished first) and return 128 + the signal's
// number as the exit status.
func interrupted(s os.Signal, stderr io.Writer) int {
	cleanup.Interrupt()
	fmt.Fprintf(stderr, "\nfickfit: stopped by %v; its temporary files are removed\n", s)
	if n, ok := s.(syscall.Signal); ok {
		return 128 + int(n)
	}
	return 128 + 2
}

// run executes the command line and returns the exit status. A panic in a
// command (or in a worker, which internal/parallel hands back) is a fault
// of fickfit, not of the input: it is reported as an internal error with
// its stack and exits exitInternal.
func run(args []string, stdout, stderr io.Writer) (code int) {
	defer func() {
		if r := recover(); r != nil {
			fmt.Fprintf(stderr, "fickfit: internal error (a fault of fickfit, not of your input): %v\n"+
				"Please report it with the command line and, if you can, the input files.\n\n%s", r, debug.Stack())
			code = exitInternal
		}
	}()
	root := newRoot()
	root.SetArgs(args)
	root.SetOut(stdout)
	root.SetErr(stderr)
	err := root.Execute()
	if err == nil {
		return exitOK
	}
	fmt.Fprintln(stderr, "fickfit:", report.EscapeText(errorText(root, args, err)))
	return exitCode(err)
}

// errorText is err's message with the temperatures of an Arrhenius error
// in the unit of the command's --temperature-unit (°C when not given or
// not understood).
func errorText(root *cobra.Command, args []string, err error) string {
	msg := err.Error()
	var ae *arrhenius.Error
	if !errors.As(err, &ae) {
		return msg
	}
	u := report.Celsius
	if c, _, ferr := root.Find(args); ferr == nil {
		if f := c.Flags().Lookup("temperature-unit"); f != nil {
			if pu, perr := report.ParseTempUnit(f.Value.String()); perr == nil {
				u = pu
			}
		}
	}
	return strings.Replace(msg, ae.Error(), ae.Render(func(k float64) string { return report.Temperature(k, u) }), 1)
}

// usageError marks errors in the command line itself.
type usageError struct{ msg string }

func (e usageError) Error() string { return e.msg }

func usagef(format string, args ...any) error {
	return usageError{fmt.Sprintf(format, args...)}
}

// exitCode maps an error to the exit status: answers the data cannot give
// are 1, everything the user can fix in the input or the command is 2.
func exitCode(err error) int {
	var pe *profile.Error
	var partial partialError
	switch {
	case errors.As(err, &partial):
		return exitPartial
	case errors.Is(err, fit.ErrNoAnswer):
		return exitNoAnswer
	case errors.As(err, &pe), errors.Is(err, fit.ErrBadInput):
		return exitBadInput
	}
	var ue usageError
	if errors.As(err, &ue) {
		return exitBadInput
	}
	return exitBadInput
}

// plain drops the "bad input: " kind that a library puts before its
// message, for a message that already names the flag.
func plain(err error) string {
	return strings.TrimPrefix(err.Error(), fit.ErrBadInput.Error()+": ")
}
