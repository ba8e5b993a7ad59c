package main

import (
	"fmt"
	"sort"
	"strings"

	"github.com/spf13/cobra"

	"github.com/fickfit/fickfit/fit"
	"github.com/fickfit/fickfit/profile"
	"github.com/fickfit/fickfit/report"
)

// exitPartial is the exit status of a run that wrote its results but left
// some inputs out under --keep-going (docs/output.md, "Exit status").
const exitPartial = 4

// partialError says that results were written without some inputs; they
// are listed in the output. It maps to exitPartial.
type partialError struct{ n int }

func (e partialError) Error() string {
	if e.n == 1 {
		return "1 input was left out (--keep-going); it is listed in the output with where and why, and everything else was computed"
	}
	return fmt.Sprintf("%d inputs were left out (--keep-going); they are listed in the output with where and why, and everything else was computed", e.n)
}

// registerKeepGoing declares --keep-going on c.
func registerKeepGoing(c *cobra.Command, kg *bool) {
	c.Flags().BoolVar(kg, "keep-going", false, "leave out unreadable files and profiles that cannot be fitted or used, list them (file, line or cell, why) in the output, compute the rest, and exit with status 4")
}

// readProfiles reads the profile files of args: all or nothing, or with
// keepGoing every readable one, the others listed.
func readProfiles(args []string, keepGoing bool) ([]profile.Profile, []report.NotUsed, error) {
	if !keepGoing {
		ps, err := profile.ReadAll(args)
		return ps, nil, err
	}
	ps, skipped := profile.ReadAllKeepGoing(args)
	return ps, report.NotUsedFromSkipped(skipped), nil
}

// groupedErrors is the error of a batch whose profiles failed: each
// message said once, with the profiles it concerns; it unwraps to the most
// severe one for the exit status.
type groupedErrors struct {
	msg   string
	worst error
}

func (g groupedErrors) Error() string { return g.msg }
func (g groupedErrors) Unwrap() error { return g.worst }

// groupErrors returns nil when no profile failed, the single error when
// one did, else the messages grouped by cause ("profiles A, B, C: …").
func groupErrors(ps []profile.Profile, errs []error) error {
	worst := firstError(errs)
	if worst == nil {
		return nil
	}
	type group struct {
		ids   []string
		first int
	}
	groups := map[string]*group{}
	var order []string
	n := 0
	for i, e := range errs {
		if e == nil {
			continue
		}
		n++
		msg := e.Error()
		prefix := "profile " + ps[i].ID
		if ps[i].Source != "" && ps[i].Source != ps[i].ID {
			prefix += " (" + ps[i].Source + ")"
		}
		msg = strings.TrimPrefix(strings.TrimPrefix(msg, prefix), ": ")
		g, ok := groups[msg]
		if !ok {
			g = &group{first: i}
			groups[msg] = g
			order = append(order, msg)
		}
		g.ids = append(g.ids, ps[i].ID)
	}
	if n == 1 {
		return worst
	}
	sort.SliceStable(order, func(a, b int) bool { return groups[order[a]].first < groups[order[b]].first })
	var b strings.Builder
	fmt.Fprintf(&b, "%d profiles could not be fitted", n)
	for _, m := range order {
		g := groups[m]
		who := "profile " + g.ids[0]
		if len(g.ids) > 1 {
			who = "profiles " + strings.Join(g.ids, ", ")
		}
		fmt.Fprintf(&b, "\n  %s: %s", who, m)
	}
	return groupedErrors{msg: b.String(), worst: worst}
}

// failedProfiles lists the profiles whose fit failed.
func failedProfiles(ps []profile.Profile, errs []error) []report.NotUsed {
	var fs []fit.Failure
	for i, e := range errs {
		if e != nil {
			fs = append(fs, fit.NewFailure(&ps[i], e))
		}
	}
	return report.NotUsedFromFailures(fs)
}
