package campaign

import (
	"errors"
	"fmt"
	"sort"
	"strconv"
	"strings"

	"github.com/fickfit/fickfit/arrhenius"
	"github.com/fickfit/fickfit/fit"
	"github.com/fickfit/fickfit/profile"
)

// unknownOf reads the "unknown" metadata: "temperature", "time", "auto"
// (yes/true/1: whichever is missing) or "" (not unknown).
func unknownOf(p *profile.Profile) (string, error) {
	v := ""
	for k, mv := range p.Meta {
		if strings.EqualFold(strings.TrimSpace(k), "unknown") {
			v = strings.ToLower(strings.TrimSpace(mv))
		}
	}
	switch v {
	case "", "no", "false", "0", "n":
		return "", nil
	case "temperature", "temp", "t", "temperature_k", "temperature_c":
		return "temperature", nil
	case "time", "duration", "hold time":
		return "time", nil
	case "yes", "true", "1", "y", "x":
		switch {
		case p.Temperature == 0 && p.Time > 0:
			return "temperature", nil
		case p.Time == 0 && p.Temperature > 0:
			return "time", nil
		case p.Time > 0 && p.Temperature > 0:
			return "temperature", nil
		}
		return "", fmt.Errorf("both the temperature and the time are missing: give one of them to back-calculate the other")
	}
	return "", fmt.Errorf("unknown = %q is not understood: write temperature, time, or yes", v)
}

// sortProfiles orders profiles by group, unknown parts last, then
// temperature, time and id.
func sortProfiles(ps []profile.Profile, by string) {
	key := func(p *profile.Profile) string {
		if by == "" {
			return ""
		}
		if strings.EqualFold(by, "lot") && p.Lot != "" {
			return p.Lot
		}
		if strings.EqualFold(by, "material") && p.Material != "" {
			return p.Material
		}
		for k, v := range p.Meta {
			if strings.EqualFold(k, by) {
				return v
			}
		}
		return ""
	}
	sort.SliceStable(ps, func(i, j int) bool {
		a, b := &ps[i], &ps[j]
		ua, _ := unknownOf(a)
		ub, _ := unknownOf(b)
		if (ua != "") != (ub != "") {
			return ub != ""
		}
		if ka, kb := key(a), key(b); ka != kb {
			return ka < kb
		}
		if a.Temperature != b.Temperature {
			return a.Temperature < b.Temperature
		}
		if a.Time != b.Time {
			return a.Time < b.Time
		}
		if a.ID != b.ID {
			return a.ID < b.ID
		}
		return a.Source < b.Source
	})
}

// run does the work after reading.
func run(ps []profile.Profile, audit []InputFile, opts Options) (*Result, error) {
	if len(ps) == 0 {
		return nil, fmt.Errorf("%w: the inputs hold no profiles", fit.ErrBadInput)
	}
	for _, name := range opts.References {
		if _, err := arrhenius.LookupReference(name); err != nil {
			return nil, err
		}
	}
	res := &Result{Version: versionOr(opts.Version), Inputs: audit, By: opts.by(), Method: opts.method(),
		Options: auditOptions(opts)}
	// The fit cautions on models and intervals, then the Arrhenius ones
	// (which repeat "verify by metallography" and "specifications decide"
	// in the words for parts).
	res.Cautions = append(append([]string{}, fit.Cautions[:2]...), arrhenius.Cautions...)
	if opts.Exclusions != nil {
		a, err := opts.Exclusions.Apply(ps)
		if err != nil {
			return nil, err
		}
		res.Exclusions, res.Excluded = opts.Exclusions, a
		res.Notes = append(res.Notes, exclusionNotes(a, opts.Exclusions.Source)...)
	}
	for i := range ps {
		p := &ps[i]
		p.Meta = copyMeta(p.Meta)
		if q := strings.TrimSpace(p.Meta["quantity"]); q == "" {
			p.Meta["quantity"] = QuantityOf(p)
		}
		if opts.Adjust != nil {
			if err := opts.Adjust(p); err != nil {
				return nil, err
			}
		}
	}
	sortProfiles(ps, res.By)
	res.Profiles = ps

	fo := opts.Fit
	fitAll := func(ps []profile.Profile, o fit.Options, progress func(done, total int)) ([]*fit.Result, []error) {
		return fit.FitAll(ps, o, &fit.BatchOptions{Progress: progress})
	}
	if opts.Fitter != nil {
		fitAll = opts.Fitter
	}
	rs, errs := fitAll(ps, fo, func(done, total int) { opts.progress("fit", done, total) })
	for i := range ps {
		switch {
		case errs[i] != nil:
			res.Failed = append(res.Failed, fit.NewFailure(&ps[i], errs[i]))
		case rs[i] != nil:
			res.Results = append(res.Results, rs[i])
		}
	}

	// Calibration points: fitted, not unknown, with temperature and time.
	opts.progress("arrhenius", 0, 1)
	var pts []arrhenius.Point
	var calProfiles []profile.Profile
	type partIdx struct {
		i        int
		solveFor string
	}
	var parts []partIdx
	for i := range ps {
		p := &ps[i]
		u, uerr := unknownOf(p)
		if uerr != nil {
			res.Parts = append(res.Parts, Part{ID: p.ID, Lot: p.Lot, Error: uerr.Error(), Kind: fit.KindBadInput})
			continue
		}
		if u != "" {
			parts = append(parts, partIdx{i, u})
			if u == "time" && rs[i] != nil {
				// The time is what the campaign back-calculates: the fit's
				// "time missing" warning would only repeat the question.
				rs[i].Warnings = dropWarning(rs[i].Warnings, "time-missing")
			}
			continue
		}
		if rs[i] == nil {
			continue
		}
		if lo, ok := res.Excluded.IsLeftOut(p.ID); ok {
			res.Notes = append(res.Notes, fmt.Sprintf("%s is left out of the Arrhenius fit and the comparison by the exclusions file%s", p.ID, because(lo.Reason)))
			continue
		}
		pt, err := arrhenius.PointFromResult(rs[i])
		if err != nil {
			res.Notes = append(res.Notes, fmt.Sprintf("%s is left out of the Arrhenius fit: %s", p.ID, plainError(err)))
			continue
		}
		pts = append(pts, pt)
		calProfiles = append(calProfiles, *p)
	}
	aopt := opts.Arrhenius
	if aopt.Level == 0 {
		aopt.Level = opts.level()
	}
	res.Lines = &arrhenius.Report{By: res.By}
	if len(pts) > 0 {
		names, groups, gerr := arrhenius.GroupPoints(pts, res.By)
		if gerr != nil {
			res.LineErrors = append(res.LineErrors, GroupFailure{Error: plainError(gerr)})
		}
		var profGroups [][]profile.Profile
		if gerr == nil && res.Method == "global" {
			_, profGroups, gerr = arrhenius.GroupProfiles(calProfiles, res.By)
			if gerr != nil {
				res.LineErrors = append(res.LineErrors, GroupFailure{Error: plainError(gerr)})
			}
		}
		for gi := range groups {
			if gerr != nil {
				break
			}
			var l *arrhenius.Line
			var err error
			if res.Method == "global" {
				l, err = arrhenius.Global(profGroups[gi], &arrhenius.GlobalOptions{Options: aopt, Fit: fo})
			} else {
				l, err = arrhenius.TwoStage(groups[gi], &aopt)
			}
			if err != nil {
				res.LineErrors = append(res.LineErrors, GroupFailure{Group: names[gi], Error: plainError(err)})
				continue
			}
			l.Group, l.By = names[gi], res.By
			res.Lines.Lines = append(res.Lines.Lines, *l)
		}
		if gerr == nil && len(groups) > 1 {
			co := &arrhenius.CompareOptions{Options: aopt, By: res.By, Reference: opts.ReferenceGroup, TRef: opts.TRef}
			if cmp, err := arrhenius.Compare(pts, co); err != nil {
				res.ComparisonError = plainError(err)
			} else {
				res.Comparison = cmp
			}
		}
	} else {
		res.Notes = append(res.Notes, "No profile has both a temperature and a time with a fitted D: there is no Arrhenius calibration.")
	}

	// Back-calculation of the unknown parts.
	so := opts.Solve
	if so.Level == 0 {
		so.Level = opts.level()
	}
	for _, pi := range parts {
		p := &ps[pi.i]
		part := Part{ID: p.ID, Lot: p.Lot, SolveFor: pi.solveFor}
		r := rs[pi.i]
		if r == nil {
			part.Error = "the profile could not be fitted: " + plainError(errs[pi.i])
			part.Kind = fit.FailureKind(errs[pi.i])
			res.Parts = append(res.Parts, part)
			continue
		}
		line, group, err := lineFor(p, res)
		if err != nil {
			part.Error, part.Kind = err.Error(), fit.KindNoAnswer
			res.Parts = append(res.Parts, part)
			continue
		}
		part.Group = group
		obs, err := arrhenius.ObservationFromResult(r)
		if err == nil {
			if pi.solveFor == "temperature" {
				part.Solution, err = arrhenius.SolveTemperature(obs, line.Calibration(), &so)
			} else {
				part.Solution, err = arrhenius.SolveTime(obs, line.Calibration(), &so)
			}
		}
		if err != nil {
			part.Error, part.Kind = plainError(err), fit.FailureKind(err)
			part.Solution = nil
		}
		res.Parts = append(res.Parts, part)
	}
	sort.SliceStable(res.Parts, func(i, j int) bool { return res.Parts[i].ID < res.Parts[j].ID })
	opts.progress("arrhenius", 1, 1)
	return res, nil
}

// lineFor finds the calibration line of a part: its group's, or the only line.
func lineFor(p *profile.Profile, res *Result) (*arrhenius.Line, string, error) {
	if res.Lines == nil || len(res.Lines.Lines) == 0 {
		return nil, "", errors.New("there is no Arrhenius calibration to back-calculate from (no calibration profiles could be used)")
	}
	if res.By == "" {
		return &res.Lines.Lines[0], "", nil
	}
	pt := arrhenius.Point{Lot: p.Lot, Meta: map[string]string{}}
	for k, v := range p.Meta {
		pt.Meta[strings.ToLower(k)] = v
	}
	if strings.EqualFold(res.By, "material") && p.Material != "" {
		pt.Meta["material"] = p.Material
	}
	g, ok := pt.GroupKey(res.By)
	if !ok {
		if len(res.Lines.Lines) == 1 {
			return &res.Lines.Lines[0], res.Lines.Lines[0].Group, nil
		}
		return nil, "", fmt.Errorf("the part has no %s, so it is not known which calibration line applies; add a %q metadata line", res.By, res.By)
	}
	for i := range res.Lines.Lines {
		if res.Lines.Lines[i].Group == g {
			return &res.Lines.Lines[i], g, nil
		}
	}
	return nil, "", fmt.Errorf("there is no Arrhenius line for %s %s (its calibration profiles are missing or could not be fitted)", res.By, g)
}

// dropWarning returns ws without the warnings of the given code.
func dropWarning(ws []fit.Warning, code string) []fit.Warning {
	out := ws[:0:0]
	for _, w := range ws {
		if w.Code != code {
			out = append(out, w)
		}
	}
	return out
}

// exclusionNotes says in words what the exclusions did, for the notes.
func exclusionNotes(a *profile.Applied, source string) []string {
	var out []string
	for _, e := range a.Points {
		line := ""
		if e.Line > 0 {
			line = fmt.Sprintf(", line %d of %s", e.Line, e.File)
		}
		out = append(out, fmt.Sprintf("The point of %s at %s µm (value %g%s) is excluded from its fit%s.",
			e.Profile, strconv.FormatFloat(e.Depth*1e6, 'g', 6, 64), e.Value, line, because(e.Reason)))
	}
	if n := len(a.Unused); n > 0 {
		ids := make([]string, 0, n)
		for _, e := range a.Unused {
			ids = append(ids, e.Profile)
		}
		out = append(out, fmt.Sprintf("%d rows of the exclusions file %s concern profiles not among the inputs (%s); they were not used.",
			n, FileBase(source), strings.Join(ids, ", ")))
	}
	return out
}

// because is ": reason" or "".
func because(reason string) string {
	if strings.TrimSpace(reason) == "" {
		return ""
	}
	return " (" + reason + ")"
}

// plainError returns an error's message (empty for nil), with the
// temperatures in it kept as marks (internal/tempfmt): the writers render
// them in the reader's unit (report) or in kelvin (JSON).
func plainError(err error) string { return arrhenius.MarkedText(err) }

func copyMeta(m map[string]string) map[string]string {
	out := make(map[string]string, len(m)+1)
	for k, v := range m {
		out[k] = v
	}
	return out
}

// QuantityOf names what a profile measured for axis labels: its Quantity,
// else the value column's name before the unit ("C_wt%" → "C").
func QuantityOf(p *profile.Profile) string {
	if q := strings.TrimSpace(p.Quantity); q != "" {
		return q
	}
	n := p.ValueName
	if i := strings.IndexAny(n, "_ ([["); i > 0 {
		n = n[:i]
	}
	return strings.TrimSpace(n)
}
