package main

import (
	"slices"

	"github.com/spf13/cobra"

	"github.com/fickfit/fickfit/arrhenius"
	"github.com/fickfit/fickfit/profile"
	"github.com/fickfit/fickfit/report"
)

func init() { addCommands(newArrheniusCmd) }

func newArrheniusCmd() *cobra.Command {
	var ff fitFlags
	var out outFlags
	var by, tsigma string
	var global, noBirge, keepGoing bool
	c := &cobra.Command{
		Use:   "arrhenius FILE...",
		Short: "Estimate D0 and Q from profiles at several temperatures",
		Long: `Fit ln D = ln D0 − Q/(RT) to the D of profiles held at several temperatures
(R = 8.314462618 J/(mol·K)). FILE may be profiles (fitted here, with the
same options as 'fickfit fit') or the JSON written by 'fickfit fit'.

The default is a two-stage weighted regression (weights from each fit's
ln D variance; Birge-ratio scaling when the points scatter more than their
errors allow). --global fits all profiles at once, sharing ln D0 and Q while
each keeps its own surface and base levels (profiles only). --by groups the
profiles (lot by default when the files give one) and gives one line per group.`,
		Example: `  fickfit arrhenius coupons/ --by lot
  fickfit fit coupons/ --format json -o fits.json && fickfit arrhenius fits.json --format json -o line.json
  fickfit arrhenius coupons/ --global --temperature-uncertainty 3K`,
		Args: cobra.MinimumNArgs(1),
		RunE: func(c *cobra.Command, args []string) error {
			if err := out.check(args); err != nil {
				return err
			}
			o := arrhenius.Options{Level: ff.level, NoBirge: noBirge}
			if tsigma != "" {
				v, err := profile.ParseTemperatureDelta(tsigma)
				if err != nil {
					return usagef("--temperature-uncertainty: %v", err)
				}
				o.TemperatureSigma = v
			}
			results, ps, notUsed, err := fittedInputsKeepGoing(args, &ff, c.ErrOrStderr(), keepGoing)
			if err != nil {
				return err
			}
			var rep *arrhenius.Report
			if global {
				if len(ps) == 0 || len(ps) != len(results) {
					return usagef("--global needs the profiles themselves, not saved fits")
				}
				ps = slices.DeleteFunc(ps, func(p profile.Profile) bool { return ff.leftOut(p.ID) })
				fo, err := ff.options()
				if err != nil {
					return err
				}
				rep, err = arrhenius.GlobalGroups(ps, by, &arrhenius.GlobalOptions{Options: o, Fit: fo})
				if err != nil {
					return err
				}
			} else {
				pts, unused, err := pointsKeepGoing(ff.leaveOut(results), keepGoing)
				if err != nil {
					return err
				}
				notUsed = append(notUsed, unused...)
				if rep, err = arrhenius.TwoStageGroups(pts, by, &o); err != nil {
					return err
				}
			}
			if err := out.emit(c, report.Arrhenius{Report: rep, NotUsed: notUsed}); err != nil {
				return err
			}
			if len(notUsed) > 0 {
				return partialError{len(notUsed)}
			}
			return nil
		},
	}
	ff.register(c)
	out.register(c, true)
	c.Flags().StringVar(&by, "by", "", "group the profiles by this column or metadata key (e.g. lot) and fit one line per group")
	c.Flags().BoolVar(&global, "global", false, "one-stage global fit of all profiles (shared ln D0 and Q)")
	c.Flags().StringVar(&tsigma, "temperature-uncertainty", "", "standard uncertainty of every furnace temperature not given in the files (e.g. 3K)")
	registerKeepGoing(c, &keepGoing)
	c.Flags().BoolVar(&noBirge, "no-birge", false, "keep the stated errors even when the points scatter more (intervals may then be too narrow)")
	return c
}
