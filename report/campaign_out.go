package report

import (
	"bufio"
	"fmt"
	"io"
	"strings"

	"github.com/fickfit/fickfit/arrhenius"
	"github.com/fickfit/fickfit/campaign"
	"github.com/fickfit/fickfit/fit"
	"github.com/fickfit/fickfit/internal/tempfmt"
	"github.com/fickfit/fickfit/profile"
)

// campaignDoc is results.json. Keys are stable; numbers are SI with the
// unit in the key or a "unit" field; no timestamps, so that a rerun with
// the same inputs writes the same bytes.
type campaignDoc struct {
	Version         string                `json:"fickfit_version"`
	Inputs          []campaign.InputFile  `json:"inputs"`
	Options         campaign.AuditOptions `json:"options"`
	Fits            []*fit.Result         `json:"fits"`
	Failed          []fit.Failure         `json:"failed"`
	NotRead         []NotUsed             `json:"not_read,omitempty"`
	Arrhenius       arrheniusDoc          `json:"arrhenius"`
	Comparison      *arrhenius.Comparison `json:"lot_comparison"`
	ComparisonError string                `json:"lot_comparison_error,omitempty"`
	Backcalc        []campaign.Part       `json:"backcalc"`
	Notes           []string              `json:"notes"`
	Cautions        []string              `json:"cautions"`
	// Exclusions are the points and profiles left out by an exclusions
	// file (omitted without one).
	Exclusions *profile.Applied `json:"exclusions,omitempty"`
}

type arrheniusDoc struct {
	Method string                  `json:"method"`
	By     string                  `json:"by"`
	Groups []arrhenius.Line        `json:"groups"`
	Failed []campaign.GroupFailure `json:"failed"`
}

// WriteJSON writes the whole campaign as one JSON document: inputs with
// SHA-256, options, every fit (as the fit command writes them), the
// Arrhenius lines per group, the lot comparison, the back-calculated parts,
// notes and cautions.
func (res *CampaignReport) WriteJSON(w io.Writer) error {
	// The campaign's sentences may hold temperature marks: kelvin in JSON.
	lineErrs := []campaign.GroupFailure{}
	for _, g := range res.LineErrors {
		g.Error = tempfmt.Plain(g.Error)
		lineErrs = append(lineErrs, g)
	}
	parts := []campaign.Part{}
	for _, p := range res.Parts {
		p.Error = tempfmt.Plain(p.Error)
		parts = append(parts, p)
	}
	notes := []string{}
	for _, n := range res.Notes {
		notes = append(notes, tempfmt.Plain(n))
	}
	doc := campaignDoc{
		Version: res.Version, Inputs: nonNil(res.Inputs), Options: res.audit(),
		Fits: []*fit.Result{}, Failed: nonNil(res.Failed), NotRead: NotUsedFromSkipped(res.NotRead),
		Arrhenius:  arrheniusDoc{Method: res.Method, By: res.By, Groups: []arrhenius.Line{}, Failed: lineErrs},
		Comparison: res.Comparison, ComparisonError: tempfmt.Plain(res.ComparisonError),
		Backcalc: parts, Notes: notes, Cautions: nonNil(res.Cautions),
		Exclusions: res.excludedDoc(),
	}
	if res.Lines != nil {
		doc.Arrhenius.Groups = nonNil(res.Lines.Lines)
	}
	return encodeWithFits(w, doc, res.Results) // the fits one at a time
}

// excludedDoc is the exclusions key of results.json: nil without an
// exclusions file, lists (never null) with one.
func (res *CampaignReport) excludedDoc() *profile.Applied {
	if res.Excluded == nil {
		return nil
	}
	return &profile.Applied{Points: nonNil(res.Excluded.Points), LeftOut: nonNil(res.Excluded.LeftOut)}
}

// Arrhenius is the Document of the campaign's Arrhenius lines, as
// fickfit arrhenius writes them (arrhenius.csv).
func (res *CampaignReport) Arrhenius() Arrhenius {
	if res.Lines == nil {
		return Arrhenius{Report: &arrhenius.Report{By: res.By}}
	}
	return Arrhenius{Report: res.Lines}
}

// Backcalc is the Document of the parts marked unknown, as fickfit
// backcalc writes them (backcalc.csv), with the parts that could not be
// back-calculated as failures.
func (res *CampaignReport) Backcalc() Backcalc {
	var b Backcalc
	for _, p := range res.Parts {
		if p.Solution != nil {
			b.Solutions = append(b.Solutions, p.Solution)
			continue
		}
		b.Failed = append(b.Failed, fit.Failure{ID: p.ID, Lot: p.Lot, Kind: p.Kind, Error: tempfmt.Plain(p.Error)})
	}
	return b
}

// D0Text writes a pre-exponential factor with its interval, in m²/s with cm²/s beside.
func D0Text(l *arrhenius.Line) string { return numFmt{}.d0Text(l) }

func (n numFmt) d0Text(l *arrhenius.Line) string {
	ci := l.D0CI()
	s := n.estimate(l.D0(), ci, l.Level, "m2/s")
	if !finite(ci.Lo) && !finite(ci.Hi) {
		s = n.general(l.D0()) + " m²/s (no interval: fewer than three temperatures)"
	}
	return s
}

// PartText writes a back-calculated result in one line.
func PartText(p campaign.Part, u TempUnit) string { return numFmt{}.partText(p, u) }

func (n numFmt) partText(p campaign.Part, u TempUnit) string {
	if p.Solution == nil {
		return "not back-calculated: " + Temps(p.Error, u)
	}
	s := p.Solution
	if p.SolveFor == "time" {
		return "t = " + n.durationEstimate(s.Time.Value, s.Time.CI, s.Level) + " at " + Temperature(s.Temperature.Value, u)
	}
	return "T = " + n.temperatureEstimate(s.Temperature.Value, s.Temperature.CI, s.Level, u) + " for " + Duration(s.Time.Value)
}

// NotUsed lists everything the campaign's results were computed without:
// inputs not read, profiles not fitted, profiles left out of the
// calibration (from the notes) and parts not back-calculated.
func (res *CampaignReport) NotUsed() []NotUsed {
	out := NotUsedFromSkipped(res.NotRead)
	out = append(out, NotUsedFromFailures(res.Failed)...)
	for _, p := range res.Parts {
		if p.Solution == nil {
			out = append(out, NotUsed{ID: p.ID, Reason: "not back-calculated: " + p.Error})
		}
	}
	return out
}

// LeftOut counts the inputs the results were computed without (not read,
// not fitted, parts not back-calculated): the exit status of a campaign
// run with --keep-going says whether there were any.
func (res *CampaignReport) LeftOut() int { return len(res.NotUsed()) }

// WriteSummary writes the short text summary for the terminal: a table of
// the profiles, the Arrhenius lines, the lot comparison, the back-calculated
// parts, notes and cautions.
func (res *CampaignReport) WriteSummary(w io.Writer, o TextOptions) error {
	bw := bufio.NewWriter(w)
	u := o.TempUnit
	nfiles := len(res.Inputs)
	fmt.Fprintf(bw, "fickfit %s — %d profiles from %d files: %d fitted, %d not fitted\n\n",
		res.Version, len(res.Profiles), nfiles, len(res.Results), len(res.Failed))
	level := res.Options.Level
	tb := Table{Header: []string{"id", "lot", "T", "t", "model", "D (m²/s)", Level(level) + " CI", "R²", "warnings"},
		Align: []Align{Left, Left, Right, Right, Left, Right, Left, Right, Left, Left}, Indent: "  "}
	caseCol := false
	for _, r := range res.Results {
		d := r.Param("D")
		dv, ci := "", ""
		if d != nil {
			last := o.num().lastDigit(d.Value, d.CI)
			dv, ci = Number(d.Value, last), IntervalAt(d.Value, d.CI, last)
			if r.Time == 0 {
				dv += " (Dt, m²)"
			}
		}
		var codes []string
		for _, wn := range r.Warnings {
			codes = append(codes, wn.Code)
		}
		tb.Add(r.ID, r.Lot, TemperatureShort(r.Temperature, u), Duration(r.Time), r.Model, dv, ci, r2Text(r.Stats.R2), strings.Join(codes, ", "))
		if r.CaseDepth != nil {
			caseCol = true
			tb.Rows[len(tb.Rows)-1] = append(tb.Rows[len(tb.Rows)-1], depthShort(r.CaseDepth)+" at "+r.CaseDepth.Threshold)
		}
	}
	if caseCol {
		tb.Header = append(tb.Header, "case depth, "+Level(level)+" CI")
		for i := range tb.Rows {
			for len(tb.Rows[i]) < len(tb.Header) {
				tb.Rows[i] = append(tb.Rows[i], "")
			}
		}
	}
	bw.WriteString("Profiles\n")
	tb.WriteTo(bw)
	for _, f := range res.Failed {
		writeWrapped(bw, "  not fitted: "+f.ID+": ", f.Error, o.width())
	}
	if res.Lines != nil && len(res.Lines.Lines) > 0 {
		fmt.Fprintf(bw, "\nArrhenius lines (%s, %s CI)\n", res.Method, Level(level))
		for i := range res.Lines.Lines {
			l := &res.Lines.Lines[i]
			writeParts(bw, "  ", []string{groupLabel(*l) + ":", "D0 = " + o.num().d0Text(l) + ";", "Q = " + o.num().qText(l.Q, l.QCI(), l.Level) + ";",
				fmt.Sprintf("%d points at %d temperatures;", len(l.Points), l.NTemperatures), "Birge ratio " + Number(l.BirgeRatio, -2)}, " ", o.width())
			for _, wn := range l.Warnings {
				writeWrapped(bw, "      ! ", warnText(wn, u), o.width())
			}
		}
	}
	for _, f := range res.LineErrors {
		writeWrapped(bw, "  no line for "+f.Group+": ", Temps(f.Error, u), o.width())
	}
	if c := res.Comparison; c != nil {
		fmt.Fprintf(bw, "\nLot comparison by %s\n", c.By)
		writeWrapped(bw, "  ", Temps(c.Verdict, u), o.width())
		for _, p := range c.Pairs {
			writeWrapped(bw, "  ", fmt.Sprintf("%s – %s: D(%s) / D(%s) = %s, p = %s, adjusted p = %s (Holm): %s", p.A, p.B, p.B, p.A,
				ratioText(p.Ratio, p.CI, c.Level), viewP(p.P), viewP(p.PAdjusted), pairVerdict(p)), o.width())
		}
		for _, r := range c.Ratios {
			writeWrapped(bw, "  ", fmt.Sprintf("D(%s) / D(%s) at %s = %s, p = %s", r.Group, r.Reference, Temperature(r.TRef, u),
				ratioText(r.Value, r.CI, c.Level), Sig(r.P, 2)), o.width())
		}
	} else if res.ComparisonError != "" {
		writeWrapped(bw, "\nLot comparison not possible: ", Temps(res.ComparisonError, u), o.width())
	}
	if len(res.Parts) > 0 {
		bw.WriteString("\nBack-calculated parts (marked unknown; not used for the calibration)\n")
		for _, p := range res.Parts {
			head := "  " + p.ID
			if p.Lot != "" {
				head += " (lot " + p.Lot + ")"
			}
			writeWrapped(bw, head+": ", o.num().partText(p, u), o.width())
			if p.Solution != nil {
				for _, wn := range p.Solution.Warnings {
					writeWrapped(bw, "      ! ", warnText(wn, u), o.width())
				}
			}
		}
	}
	writeNotUsedText(bw, "Not read (left out)", NotUsedFromSkipped(res.NotRead), o.width())
	if len(res.Notes) > 0 {
		bw.WriteString("\nNotes\n")
		for _, n := range res.Notes {
			writeWrapped(bw, "  - ", Temps(n, u), o.width())
		}
	}
	if !o.NoCautions {
		bw.WriteString("\n")
		writeCautions(bw, res.Cautions, o.width())
	}
	return bw.Flush()
}

// WriteCSV writes results.csv: one row per profile, as fickfit fit writes it.
func (res *CampaignReport) WriteCSV(w io.Writer) error { return res.fits().WriteCSV(w) }

// WriteText writes the summary (WriteSummary).
func (res *CampaignReport) WriteText(w io.Writer, o TextOptions) error { return res.WriteSummary(w, o) }
