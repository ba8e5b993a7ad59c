package main

import (
	"io"
	"strings"

	"github.com/fickfit/fickfit/arrhenius"
	"github.com/fickfit/fickfit/fit"
	"github.com/fickfit/fickfit/profile"
	"github.com/fickfit/fickfit/report"
)

// fittedInputs reads the arguments as profiles (fitted here with the fit
// flags, less the points of --exclude) or as JSON files that 'fickfit fit'
// wrote. It returns the results and, when profiles were read, the
// profiles (in the same order). The first unreadable input or unfittable
// profile stops it.
func fittedInputs(args []string, ff *fitFlags, stderr io.Writer) ([]*fit.Result, []profile.Profile, error) {
	rs, ps, _, err := fittedInputsKeepGoing(args, ff, stderr, false)
	return rs, ps, err
}

// fittedInputsKeepGoing is fittedInputs that, with keepGoing, leaves out
// unreadable files and profiles that cannot be fitted and lists them.
// The profiles returned are those whose fit is in the results, in order.
func fittedInputsKeepGoing(args []string, ff *fitFlags, stderr io.Writer, keepGoing bool) ([]*fit.Result, []profile.Profile, []report.NotUsed, error) {
	var jsonFiles, profFiles []string
	for _, a := range args {
		if strings.EqualFold(fileExt(a), ".json") {
			jsonFiles = append(jsonFiles, a)
		} else {
			profFiles = append(profFiles, a)
		}
	}
	var results []*fit.Result
	var notUsed []report.NotUsed
	for _, j := range jsonFiles {
		rs, err := fit.ReadResultsFile(j)
		if err != nil {
			if !keepGoing {
				return nil, nil, nil, err
			}
			notUsed = append(notUsed, report.NotUsed{File: j, Reason: err.Error()})
			continue
		}
		if err := savedFitsExcluded(rs, ff.excl); err != nil {
			return nil, nil, nil, err
		}
		results = append(results, rs...)
	}
	var ps []profile.Profile
	if len(profFiles) > 0 {
		o, err := ff.options()
		if err != nil {
			return nil, nil, nil, err
		}
		var skipped []report.NotUsed
		if ps, skipped, err = readProfiles(profFiles, keepGoing); err != nil {
			return nil, nil, nil, err
		}
		notUsed = append(notUsed, skipped...)
		if err := ff.checkBelowLimit(ps); err != nil {
			return nil, nil, nil, err
		}
		if err := ff.excludePoints(ps, stderr); err != nil {
			return nil, nil, nil, err
		}
		if err := ff.override(ps); err != nil {
			return nil, nil, nil, err
		}
		rs, errs := fit.FitAll(ps, o, nil)
		if !keepGoing {
			if err := groupErrors(ps, errs); err != nil {
				return nil, nil, nil, err
			}
		}
		notUsed = append(notUsed, failedProfiles(ps, errs)...)
		var kept []profile.Profile
		for i, r := range rs {
			if r != nil {
				results = append(results, r)
				kept = append(kept, ps[i])
			}
		}
		ps = kept
	}
	return results, ps, notUsed, nil
}

// pointsKeepGoing reads the Arrhenius point of every result; with
// keepGoing a result that gives none (no time, not converged, D fixed…)
// is left out and listed, else it stops.
func pointsKeepGoing(results []*fit.Result, keepGoing bool) ([]arrhenius.Point, []report.NotUsed, error) {
	if !keepGoing {
		pts, err := arrhenius.PointsFromResults(results)
		return pts, nil, err
	}
	var pts []arrhenius.Point
	var notUsed []report.NotUsed
	for _, r := range results {
		p, err := arrhenius.PointFromResult(r)
		if err != nil {
			notUsed = append(notUsed, report.NotUsed{File: r.Source, ID: r.ID, Reason: err.Error()})
			continue
		}
		pts = append(pts, p)
	}
	return pts, notUsed, nil
}

// savedFitsExcluded refuses exclusions of points of a saved fit: the
// points can only be left out of the profile itself.
func savedFitsExcluded(rs []*fit.Result, x *profile.Exclusions) error {
	if x == nil {
		return nil
	}
	for _, r := range rs {
		for _, e := range x.Rows {
			if !e.Whole() && e.Profile == r.ID {
				return usagef("%s:%d: profile %s comes from a saved fit (%s): its points cannot be excluded there; give the profile's file instead", x.Source, e.Row, r.ID, r.Source)
			}
		}
	}
	return nil
}

func fileExt(p string) string {
	if i := strings.LastIndex(p, "."); i >= 0 && !strings.ContainsAny(p[i:], `/\`) {
		return p[i:]
	}
	return ""
}
