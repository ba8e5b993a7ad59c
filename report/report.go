// Package report writes fickfit's results for people and for programs:
// aligned text for the terminal, JSON and CSV for scripts and lab
// databases, SVG/PNG figures, an XLSX workbook with native charts and a
// self-contained HTML report. Every result kind is a Document (WriteText,
// WriteJSON, WriteCSV; see document.go and docs/output.md); WriteCampaign
// writes the report folder of a campaign computed by package campaign.
//
// Internal units are SI; report converts only on the way out (see
// format.go). Machine outputs (JSON, CSV) carry SI numbers in full
// precision, with the unit in the key; text, HTML, figures and the
// workbook carry numbers rounded to what their intervals support.
//
// Identical inputs give byte-identical JSON and CSV: no timestamps, maps
// written with sorted keys, profiles in a fixed order.
package report

import (
	"fmt"
	"sort"
	"strings"

	"github.com/fickfit/fickfit"

	"github.com/fickfit/fickfit/fit"
	"github.com/fickfit/fickfit/profile"
)

// DefaultVersion is written as the software version when the caller gives none.
const DefaultVersion = fickfit.Version

// Fits is what the fit writers take: the fitted profiles and the ones that
// gave no answer, each in input order.
type Fits struct {
	Results []*fit.Result
	Failed  []fit.Failure
	// NotRead are the inputs that could not be read (--keep-going).
	NotRead []NotUsed
	// Version is the software version written into JSON; "" means DefaultVersion.
	Version string
}

// NewFits pairs FitAll's output with its profiles: results[i] and errs[i]
// belong to ps[i].
func NewFits(ps []profile.Profile, results []*fit.Result, errs []error) Fits {
	var f Fits
	for i := range ps {
		switch {
		case i < len(errs) && errs[i] != nil:
			f.Failed = append(f.Failed, fit.NewFailure(&ps[i], errs[i]))
		case i < len(results) && results[i] != nil:
			f.Results = append(f.Results, results[i])
		}
	}
	return f
}

func versionOr(v string) string {
	if strings.TrimSpace(v) == "" {
		return DefaultVersion
	}
	return v
}

// ModelDescription is the model's title in words from the fit registry
// ("constant surface concentration (erf solution)"), or the flag name when
// the model is not registered.
func ModelDescription(name string) string {
	if in, ok := fit.Lookup(name); ok && in.Title != "" {
		return in.Title
	}
	return name
}

// ciMethodNames describes the interval methods.
var ciMethodNames = map[fit.CIMethod]string{
	fit.CIWald:                "Wald (Student t)",
	fit.CIProfile:             "profile likelihood",
	fit.CIBootstrapPercentile: "bootstrap percentile",
	fit.CIBootstrapBCa:        "bootstrap BCa",
}

// CIMethodDescription is the interval method in words.
func CIMethodDescription(m fit.CIMethod) string {
	if d, ok := ciMethodNames[m]; ok {
		return d
	}
	return string(m)
}

// paramNames returns the names of every parameter in rs in the order of
// the fit registry (models by rank, each model's parameters in its own
// order), then the parameters of unregistered models sorted by name.
func paramNames(rs []*fit.Result) []string {
	seen := map[string]bool{}
	for _, r := range rs {
		for _, e := range r.Params {
			seen[e.Name] = true
		}
	}
	var out []string
	for _, in := range fit.Models() {
		for _, pa := range in.Params {
			if seen[pa.Name] {
				out = append(out, pa.Name)
				delete(seen, pa.Name)
			}
		}
	}
	var rest []string
	for n := range seen {
		rest = append(rest, n)
	}
	sort.Strings(rest)
	return append(out, rest...)
}

// warningTarget tells next to which number a warning belongs: a parameter
// name, "stats", or "" for the profile as a whole.
func warningTarget(r *fit.Result, w fit.Warning) string {
	switch w.Code {
	case "time-missing", "d-uncertain", "penetration-beyond-data", "penetration-below-first-step", "thin-section":
		if r.Param("D") != nil {
			return "D"
		}
	case "plateau-not-reached":
		if r.Param("C0") != nil {
			return "C0"
		}
	case "residual-pattern", "ill-conditioned":
		return "stats"
	case "ci-open":
		for _, e := range r.Params {
			if strings.HasPrefix(w.Message, e.Name+" ") || strings.Contains(w.Message, " bound "+e.Name+" ") {
				return e.Name
			}
		}
	}
	return ""
}

// errorf is fmt.Errorf, named for symmetry with the other packages.
func errorf(format string, args ...any) error { return fmt.Errorf(format, args...) }
