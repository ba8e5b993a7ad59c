package report

import (
	"fmt"

	"github.com/fickfit/fickfit/fit"
)

// A campaign report shows every profile in its tables (report.html's
// summary, results.csv, results.json, the workbook's summary sheet,
// summary.txt). What it draws one by one — a figure, a section of
// report.html, a workbook sheet with its chart — costs time and bytes per
// profile: tens of milliseconds and tens of kilobytes each, which a lab's
// archive of thousands of profiles turns into minutes and a report.html
// no browser opens. So a campaign of at most EveryProfileLimit profiles
// is shown profile by profile; a larger one shows the profiles that ask
// for a look: the parts marked unknown (back-calculated), then the
// profiles with a warning, in table order, at most MaxDetailed of them,
// each figure as an SVG file (linked from the summary table and drawn in
// its section). The report says which rule was applied.
const (
	// EveryProfileLimit is the largest campaign shown profile by profile.
	EveryProfileLimit = 200
	// MaxDetailed bounds the profiles shown one by one in a larger campaign.
	MaxDetailed = 200
)

// everyProfileLimit and maxDetailed are the limits in force (tests lower
// them).
var everyProfileLimit, maxDetailed = EveryProfileLimit, MaxDetailed

// profileDetail is which profiles a campaign report shows one by one.
type profileDetail struct {
	every   bool                 // every profile (a campaign of at most EveryProfileLimit)
	shown   map[*fit.Result]bool // the profiles shown, when not every
	flagged int                  // profiles marked unknown or with a warning
	total   int                  // fitted profiles
}

// details applies the rule above to res.
func (res *CampaignReport) details() profileDetail {
	d := profileDetail{total: len(res.Results)}
	if d.total <= everyProfileLimit {
		d.every = true
		return d
	}
	d.shown = map[*fit.Result]bool{}
	unknown := map[string]bool{}
	for _, p := range res.Parts {
		unknown[p.ID] = true
	}
	var parts, warned []*fit.Result
	for _, r := range res.Results {
		switch {
		case unknown[r.ID]:
			parts = append(parts, r)
		case len(r.Warnings) > 0:
			warned = append(warned, r)
		}
	}
	d.flagged = len(parts) + len(warned)
	for _, r := range append(parts, warned...) {
		if len(d.shown) == maxDetailed {
			break
		}
		d.shown[r] = true
	}
	return d
}

// shows tells whether r is shown one by one.
func (d profileDetail) shows(r *fit.Result) bool { return d.every || d.shown[r] }

// pngFor tells whether a profile's figure is also drawn as PNG: every
// figure of a small campaign; SVG only in a large one.
func (d profileDetail) pngFor() bool { return d.every }

// note states the rule in words for the report; "" when every profile is
// shown.
func (d profileDetail) note() string {
	if d.every {
		return ""
	}
	s := fmt.Sprintf("This campaign has %d fitted profiles, more than %d: every one is in the tables above, results.csv, results.json and the workbook's summary sheet, but figures, sections below and workbook sheets are given only to the profiles that ask for a look — the parts marked unknown, then the profiles with a warning — at most %d of them (SVG figures in the figures folder, linked from the table).",
		d.total, everyProfileLimit, maxDetailed)
	switch {
	case d.flagged == 0:
		s += " No profile is marked unknown or has a warning."
	case d.flagged > len(d.shown):
		s += fmt.Sprintf(" %d profiles ask for a look; the first %d in table order are shown.", d.flagged, len(d.shown))
	default:
		s += fmt.Sprintf(" %d profiles ask for a look; all are shown.", d.flagged)
	}
	return s
}
