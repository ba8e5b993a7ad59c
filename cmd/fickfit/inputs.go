package main

import (
	"io"
	"strings"

	"github.com/fickfit/fickfit/fit"
	"github.com/fickfit/fickfit/profile"
)

// fittedInputs reads the arguments as profiles (fitted here with the fit
// flags, less the points of --exclude) or as JSON files that 'fickfit fit'
// wrote. It returns the results and, when profiles were read, the
// profiles (in the same order).
func fittedInputs(args []string, ff *fitFlags, stderr io.Writer) ([]*fit.Result, []profile.Profile, error) {
	var jsonFiles, profFiles []string
	for _, a := range args {
		if strings.EqualFold(fileExt(a), ".json") {
			jsonFiles = append(jsonFiles, a)
		} else {
			profFiles = append(profFiles, a)
		}
	}
	var results []*fit.Result
	for _, j := range jsonFiles {
		rs, err := fit.ReadResultsFile(j)
		if err != nil {
			return nil, nil, err
		}
		if err := savedFitsExcluded(rs, ff.excl); err != nil {
			return nil, nil, err
		}
		results = append(results, rs...)
	}
	var ps []profile.Profile
	if len(profFiles) > 0 {
		o, err := ff.options()
		if err != nil {
			return nil, nil, err
		}
		if ps, err = profile.ReadAll(profFiles); err != nil {
			return nil, nil, err
		}
		if err := ff.excludePoints(ps, stderr); err != nil {
			return nil, nil, err
		}
		if err := ff.override(ps); err != nil {
			return nil, nil, err
		}
		rs, errs := fit.FitAll(ps, o, nil)
		if err := firstError(errs); err != nil {
			return nil, nil, err
		}
		results = append(results, rs...)
	}
	return results, ps, nil
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
