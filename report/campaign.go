package report

import (
	"math"

	"github.com/fickfit/fickfit/arrhenius"
	"github.com/fickfit/fickfit/campaign"
)

// CampaignOptions control how a campaign's report folder is written
// (WriteCampaign). The zero value writes temperatures in °C, refuses to
// replace files and draws PNG figures at DefaultDPI.
type CampaignOptions struct {
	// TempUnit is the user's temperature unit for text, figures and
	// reports; "" means °C.
	TempUnit TempUnit
	// Digits is TextOptions.Digits for summary.txt; 0 means DefaultDigits.
	Digits int
	// Progress, when not nil, is called as the work proceeds with a stage
	// name and the count done out of total: WriteCampaign runs the stages
	// "figures", "workbook" and "write", each once and in that order. It is
	// called from one goroutine at a time.
	Progress func(stage string, done, total int)
	// Force lets WriteCampaign replace the files of an earlier report in
	// the output folder (never an input).
	Force bool
	// DPI is the resolution of PNG figures; 0 means DefaultDPI.
	DPI int
	// NoPNG leaves PNG figures out (SVG only).
	NoPNG bool
}

func (o CampaignOptions) progress(stage string, done, total int) {
	if o.Progress != nil {
		o.Progress(stage, done, total)
	}
}

// CampaignReport writes a campaign's result (campaign.Result). It is the
// Document of the campaign: its JSON is results.json, its CSV results.csv
// (one row per profile, as fickfit fit writes it) and its text the summary
// printed after a run. WriteCampaign writes the whole report folder.
type CampaignReport struct {
	*campaign.Result
	// TempUnit is the user's temperature unit of the text (and the one
	// recorded in results.json); "" means °C.
	TempUnit TempUnit
}

// fits is the campaign's fit results as the fit writers take them.
func (res *CampaignReport) fits() Fits {
	return Fits{Results: res.Results, Failed: res.Failed, Version: res.Version}
}

// audit is the options of the audit trail, with the temperature unit of
// the output.
func (res *CampaignReport) audit() campaign.AuditOptions {
	a := res.Options
	a.TempUnit = res.TempUnit.Symbol()
	return a
}

// Calibration points of the figures.
func (res *CampaignReport) arrheniusPlot() ArrheniusPlot {
	var a ArrheniusPlot
	if res.Lines != nil {
		a.Lines = res.Lines.Lines
	}
	for _, pt := range res.Parts {
		s := pt.Solution
		if s == nil || s.SolveFor != "temperature" || !(s.Temperature.Value > 0) || !(s.Time.Value > 0) {
			continue
		}
		a.Parts = append(a.Parts, PartPoint{ID: pt.ID, D: math.Exp(s.LnDt) / s.Time.Value, T: s.Temperature.Value, CI: s.Temperature.CI})
	}
	for _, name := range res.Options.References {
		if ref, err := arrhenius.LookupReference(name); err == nil {
			a.References = append(a.References, ref)
		}
	}
	return a
}
