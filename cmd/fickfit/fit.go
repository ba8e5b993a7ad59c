package main

import (
	"github.com/spf13/cobra"

	"github.com/fickfit/fickfit/arrhenius"
	"github.com/fickfit/fickfit/fit"
	"github.com/fickfit/fickfit/profile"
	"github.com/fickfit/fickfit/report"
)

func init() { addCommands(newFitCmd) }

func newFitCmd() *cobra.Command {
	var ff fitFlags
	var out outFlags
	var history, qText, tref string
	var keepGoing bool
	c := &cobra.Command{
		Use:   "fit FILE...",
		Short: "Fit D (with confidence intervals) to each measured profile",
		Long: `Fit a solution of Fick's second law to every profile in the given files
(per-profile CSV, long tables, XLSX workbooks or folders of them) and report
D, the surface and base levels, their standard errors and confidence
intervals, the fit statistics, the residuals and plain warnings.

Without a hold time D cannot be separated from time: the product Dt is
reported instead, and the output says so.

A part that saw ramps and holds: give its furnace log with --history and the
activation energy with --Q; D is then reported at --tref (default: the log's
highest temperature), exact when D does not depend on concentration.`,
		Example: `  fickfit fit coupon-A3.csv
  fickfit fit coupon-A3.csv --time 4h --temperature 925C --ci bootstrap --seed 7
  fickfit fit campaign.xlsx --format json -o results.json
  fickfit fit decarb.csv --fix C0=0.80 --model erf`,
		Args: cobra.MinimumNArgs(1),
		RunE: func(c *cobra.Command, args []string) error {
			if err := out.check(args); err != nil {
				return err
			}
			o, err := ff.options()
			if err != nil {
				return err
			}
			if streamable(&ff, history, qText, tref, keepGoing) {
				if handled, err := fitStreamed(c, args, &ff, o, &out); handled {
					return err
				}
			}
			ps, notRead, err := readProfiles(args, keepGoing)
			if err != nil {
				return err
			}
			if err := ff.checkBelowLimit(ps); err != nil {
				return err
			}
			if err := ff.excludePoints(ps, c.ErrOrStderr()); err != nil {
				return err
			}
			if err := ff.override(ps); err != nil {
				return err
			}
			if err := applyHistory(ps, history, qText, tref); err != nil {
				return err
			}
			batch := &fit.BatchOptions{Progress: progress(c, "fit", 1)}
			if ff.bootstrap() {
				o.Bootstrap.Progress, batch.Progress = progress(c, "bootstrap", len(ps)), nil
			}
			results, errs := fit.FitAll(ps, o, batch)
			f := report.NewFits(ps, results, errs)
			f.NotRead = notRead
			if len(f.Results) > 0 || keepGoing {
				if err := out.emit(c, f); err != nil {
					return err
				}
			}
			if keepGoing {
				if n := len(notRead) + len(f.Failed); n > 0 {
					return partialError{n}
				}
				return nil
			}
			return groupErrors(ps, errs)
		},
	}
	ff.register(c)
	registerKeepGoing(c, &keepGoing)
	out.register(c, true)
	c.Flags().StringVar(&history, "history", "", "furnace or service log (CSV of time and temperature) the part saw; needs --Q")
	c.Flags().StringVar(&qText, "Q", "", "activation energy for --history (e.g. 142kJ/mol)")
	c.Flags().StringVar(&tref, "tref", "", "temperature at which D is reported with --history (default: the log's highest)")
	return c
}

// applyHistory replaces each profile's hold by the equivalent time of the
// log at the reference temperature.
func applyHistory(ps []profile.Profile, history, qText, tref string) error {
	if history == "" {
		if qText != "" || tref != "" {
			return usagef("--Q and --tref go with --history")
		}
		return nil
	}
	if qText == "" {
		return usagef("--history needs the activation energy --Q to weigh the log's temperatures")
	}
	q, err := arrhenius.ParseEnergy(qText)
	if err == nil {
		err = arrhenius.CheckActivationEnergy(q)
	}
	if err != nil {
		return usagef("--Q: %v", err)
	}
	var tr float64
	if tref != "" {
		if tr, err = profile.ParseTemperature(tref); err != nil {
			return usagef("--tref: %v", err)
		}
	}
	h, err := profile.ReadHistory(history)
	if err != nil {
		return err
	}
	for i := range ps {
		p, err := arrhenius.WithHistory(ps[i], h, q, tr)
		if err != nil {
			return err
		}
		ps[i] = p
	}
	return nil
}

// firstError returns the most severe error: bad input before no answer.
func firstError(errs []error) error {
	var first error
	for _, e := range errs {
		if e == nil {
			continue
		}
		if first == nil || exitCode(e) > exitCode(first) {
			first = e
		}
	}
	return first
}
