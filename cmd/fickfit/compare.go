package main

import (
	"github.com/spf13/cobra"

	"github.com/fickfit/fickfit/arrhenius"
	"github.com/fickfit/fickfit/profile"
	"github.com/fickfit/fickfit/report"
)

func init() { addCommands(newCompareCmd, newReferenceCmd) }

func newCompareCmd() *cobra.Command {
	var ff fitFlags
	var out outFlags
	var by, ref, tref, tsigma string
	var keepGoing bool
	c := &cobra.Command{
		Use:   "compare FILE...",
		Short: "Test whether alloy lots (or any groups) diffuse differently",
		Long: `Fit every profile (or read the JSON of 'fickfit fit'), group the D values by
lot (or --by COLUMN), and test by extra sums of squares whether the groups
need separate Arrhenius lines, or a common Q with separate D0, rather than
one common line. Reports the ratio of D between groups at a reference
temperature with its confidence interval and a plain verdict with the p-value.`,
		Example: `  fickfit compare coupons/ lims-export.csv --by lot --tref 925C`,
		Args:    cobra.MinimumNArgs(1),
		RunE: func(c *cobra.Command, args []string) error {
			if err := out.check(args); err != nil {
				return err
			}
			o := &arrhenius.CompareOptions{By: by, Reference: ref}
			o.Level = ff.level
			if tref != "" {
				v, err := profile.ParseTemperature(tref)
				if err != nil {
					return usagef("--tref: %v", err)
				}
				o.TRef = v
			}
			if tsigma != "" {
				v, err := profile.ParseTemperatureDelta(tsigma)
				if err != nil {
					return usagef("--temperature-uncertainty: %v", err)
				}
				o.TemperatureSigma = v
			}
			results, _, notUsed, err := fittedInputsKeepGoing(args, &ff, c.ErrOrStderr(), keepGoing)
			if err != nil {
				return err
			}
			pts, unused, err := pointsKeepGoing(ff.leaveOut(results), keepGoing)
			if err != nil {
				return err
			}
			notUsed = append(notUsed, unused...)
			cmp, err := arrhenius.Compare(pts, o)
			if err != nil {
				return err
			}
			if err := out.emit(c, report.Comparison{Comparison: cmp, NotUsed: notUsed}); err != nil {
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
	registerKeepGoing(c, &keepGoing)
	c.Flags().StringVar(&by, "by", "lot", "the column or metadata key that names the groups")
	c.Flags().StringVar(&ref, "reference-group", "", "the group the others are compared with (default: the first met)")
	c.Flags().StringVar(&tref, "tref", "", "temperature of the D ratio (default: the centre of the data in 1/T)")
	c.Flags().StringVar(&tsigma, "temperature-uncertainty", "", "standard uncertainty of every furnace temperature (e.g. 3K)")
	return c
}

func newReferenceCmd() *cobra.Command {
	var out outFlags
	c := &cobra.Command{
		Use:   "reference",
		Short: "List the built-in table of published D0 and Q",
		Long: `List the built-in reference rows (solute, host, D0, Q, the temperature range
where they apply, and the published table each row was checked against,
with that table's own source). A row written down without checking a copy
would be marked as such (none is today). Literature values are not your
material: a back-calculation or prediction from a row carries the row's
spread and says so; calibrate on your own coupons where it matters. Use a
row with --reference NAME in backcalc and predict.`,
		Args: cobra.NoArgs,
		RunE: func(c *cobra.Command, args []string) error {
			if err := out.check(nil); err != nil {
				return err
			}
			refs := arrhenius.References()
			return out.emit(c, report.References(refs))
		},
	}
	out.register(c, true)
	return c
}
