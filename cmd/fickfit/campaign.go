package main

import (
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
	"sync"

	"github.com/schollz/progressbar/v3"
	"github.com/spf13/cobra"
	"golang.org/x/term"

	"github.com/fickfit/fickfit"
	"github.com/fickfit/fickfit/campaign"
	"github.com/fickfit/fickfit/profile"
	"github.com/fickfit/fickfit/report"
)

// campaignFlags are the options of campaign and demo.
type campaignFlags struct {
	ff         fitFlags
	out        string
	force      bool
	by, method string
	tref       string
	tsigma     string
	refs       []string
	noPNG      bool
	keepGoing  bool
	output     outFlags
}

func (cf *campaignFlags) register(c *cobra.Command, defaultOut string) {
	cf.ff.register(c)
	fl := c.Flags()
	fl.StringVar(&cf.out, "out", defaultOut, "report folder to write")
	fl.BoolVar(&cf.force, "force", false, "replace an earlier report in the folder, and write beside files fickfit did not write (those are never touched)")
	fl.StringVar(&cf.by, "by", "lot", "group profiles for Arrhenius lines and the comparison by this column or metadata key (none: one line)")
	fl.StringVar(&cf.method, "arrhenius", "two-stage", "Arrhenius method: two-stage or global")
	fl.StringVar(&cf.tref, "tref", "", "temperature of the lot comparison's D ratio (default: the centre of the data)")
	fl.StringVar(&cf.tsigma, "temperature-uncertainty", "", "standard uncertainty of every furnace temperature not given in the files (e.g. 3K)")
	fl.StringSliceVar(&cf.refs, "reference-lines", nil, "draw these rows of the reference table on the Arrhenius plot")
	fl.BoolVar(&cf.noPNG, "no-png", false, "write SVG figures only")
	_ = c.RegisterFlagCompletionFunc("arrhenius", fixed("two-stage", "global"))
	cf.output.register(c, false)
	markOutput(c, "out")
}

// options turns the flags into the campaign's options (what to compute)
// and the report's (how to write it).
func (cf *campaignFlags) options(c *cobra.Command, args []string) (campaign.Options, report.CampaignOptions, error) {
	var o campaign.Options
	var ro report.CampaignOptions
	fo, err := cf.ff.options()
	if err != nil {
		return o, ro, err
	}
	if cf.ff.bootstrap() {
		fo.Bootstrap.Progress = nil
	}
	if err := cf.output.check(args); err != nil {
		return o, ro, err
	}
	if strings.TrimSpace(cf.out) == "" {
		return o, ro, usagef("--out: name the report folder (it is created if it does not exist)")
	}
	progress := stageProgress()
	ro = report.CampaignOptions{TempUnit: cf.output.unit, Digits: cf.output.digits, Force: cf.force, NoPNG: cf.noPNG, Progress: progress}
	o = campaign.Options{
		Fit: fo, By: cf.by, Method: cf.method, References: cf.refs, Version: fickfit.Version, Progress: progress, KeepGoing: cf.keepGoing,
		Adjust: func(p *profile.Profile) error {
			ps := []profile.Profile{*p}
			if err := cf.ff.override(ps); err != nil {
				return err
			}
			*p = ps[0]
			return nil
		},
	}
	o.Solve.Seed = cf.ff.seed
	o.Exclusions = cf.ff.excl
	if cf.tref != "" {
		if o.TRef, err = profile.ParseTemperature(cf.tref); err != nil {
			return o, ro, usagef("--tref: %v", err)
		}
	}
	if cf.tsigma != "" {
		if o.Arrhenius.TemperatureSigma, err = profile.ParseTemperatureDelta(cf.tsigma); err != nil {
			return o, ro, usagef("--temperature-uncertainty: %v", err)
		}
	}
	return o, ro, nil
}

// stageProgress draws one bar per stage on a terminal; nil otherwise.
func stageProgress() func(stage string, done, total int) {
	if !term.IsTerminal(int(os.Stderr.Fd())) {
		return nil
	}
	var mu sync.Mutex
	var bar *progressbar.ProgressBar
	var cur string
	return func(stage string, done, total int) {
		mu.Lock()
		defer mu.Unlock()
		if stage != cur || bar == nil {
			if bar != nil {
				_ = bar.Finish()
			}
			cur = stage
			bar = progressbar.NewOptions(total, progressbar.OptionSetWriter(os.Stderr),
				progressbar.OptionSetDescription(fmt.Sprintf("%-10s", stage)), progressbar.OptionClearOnFinish())
		}
		_ = bar.Set(done)
	}
}

func init() { addCommands(newCampaignCmd, newDemoCmd) }

func newCampaignCmd() *cobra.Command {
	var cf campaignFlags
	c := &cobra.Command{
		Use:   "campaign INPUT...",
		Short: "Run the whole job on a campaign and write the report folder",
		Long: `Read every profile (files, folders, long tables, workbooks), fit each, fit
Arrhenius lines per lot, compare the lots, back-calculate the parts flagged
unknown (a metadata key or column 'unknown' naming what is unknown:
temperature or time), and write the report folder: results.json,
results.csv, residuals.csv, arrhenius.csv, backcalc.csv, summary.txt,
results.xlsx (with native charts), report.html (self-contained) and
figures/ (SVG and PNG).

A rerun with the same inputs gives byte-identical JSON and CSV.`,
		Example: `  fickfit campaign coupons/ lims-export.csv --out furnace-F7-report
  fickfit campaign campaign.xlsx --out report --ci bootstrap --seed 7 --force`,
		Args: cobra.MinimumNArgs(1),
		RunE: func(c *cobra.Command, args []string) error {
			o, ro, err := cf.options(c, args)
			if err != nil {
				return err
			}
			folder, err := cf.open("campaign", false)
			if err != nil {
				return err
			}
			defer folder.Close()
			res, err := campaign.Run(args, o)
			if err != nil {
				return err
			}
			if err := finishCampaign(c.OutOrStdout(), folder, res, ro); err != nil {
				return err
			}
			if n := (&report.CampaignReport{Result: res}).LeftOut(); cf.keepGoing && n > 0 {
				return partialError{n}
			}
			return nil
		},
	}
	cf.register(c, "fickfit-report")
	registerKeepGoing(c, &cf.keepGoing)
	return c
}

func newDemoCmd() *cobra.Command {
	var cf campaignFlags
	c := &cobra.Command{
		Use:   "demo",
		Short: "Run the whole job on the built-in demo campaign",
		Long: `Run 'campaign' on the invented demo campaign carried inside the binary: the
fictional Harrow Vale Gear Co. qualifies its pit furnace F7 for gas
carburizing two lots of case-hardening bar (coupons at 880–970 °C, three per
lot and temperature) and asks what temperature a pinion saw during a
controller fault; each coupon's effective case depth is given at 0.35 wt%
carbon (--case-threshold). All numbers are made up for the demonstration.`,
		Args: cobra.NoArgs,
		RunE: func(c *cobra.Command, args []string) error {
			o, ro, err := cf.options(c, nil)
			if err != nil {
				return err
			}
			// The demo may replace its own earlier report (its manifest says
			// the demo wrote it), never a file fickfit did not write.
			folder, err := cf.open("demo", true)
			if err != nil {
				return err
			}
			defer folder.Close()
			res, err := campaign.RunFS(fickfit.Demo(), o)
			if err != nil {
				return err
			}
			return finishCampaign(c.OutOrStdout(), folder, res, ro)
		},
	}
	cf.register(c, "fickfit-demo")
	// The demo shows the case depth a heat treater reads off a carburized
	// coupon: the depth where carbon falls to 0.35 wt%.
	ct := c.Flags().Lookup("case-threshold")
	ct.DefValue = "0.35wt%"
	_ = ct.Value.Set(ct.DefValue) // a string flag: Set cannot fail
	return c
}

// open checks and locks the report folder before any work is done: a
// folder another run is writing, or whose files fickfit did not write, is
// refused at once. replaceOwn lets the command replace its own earlier
// report without --force.
func (cf *campaignFlags) open(command string, replaceOwn bool) (*report.ReportFolder, error) {
	return report.OpenReportFolder(cf.out, report.FolderOptions{Force: cf.force, Command: command, ReplaceOwn: replaceOwn,
		Inputs: cf.output.inputs, Version: fickfit.Version})
}

// finishCampaign writes the report folder and prints where it went and a summary.
func finishCampaign(w io.Writer, folder *report.ReportFolder, res *campaign.Result, o report.CampaignOptions) error {
	files, err := folder.WriteCampaign(res, o)
	if err != nil {
		return err
	}
	dir := folder.Dir()
	summary := &report.CampaignReport{Result: res, TempUnit: o.TempUnit}
	if err := emit(w, report.Text, report.TextOptions{TempUnit: o.TempUnit, Digits: o.Digits}, summary); err != nil {
		return err
	}
	fmt.Fprintf(w, "\nReport written to %s (%d files); open %s in a browser.\n", dir, len(files), filepath.Join(dir, report.FileHTML))
	return nil
}
