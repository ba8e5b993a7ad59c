package main

import (
	"github.com/spf13/cobra"

	"github.com/fickfit/fickfit/arrhenius"
	"github.com/fickfit/fickfit/profile"
	"github.com/fickfit/fickfit/report"
)

func init() { addCommands(newBackcalcCmd) }

func newBackcalcCmd() *cobra.Command {
	var ff fitFlags
	var out outFlags
	var cal calFlags
	var solve, history, method string
	var draws int
	c := &cobra.Command{
		Use:   "backcalc FILE...",
		Short: "Back-calculate the temperature or time a part saw from its profile",
		Long: `Fit the part's measured profile, then solve the Arrhenius relation for the
unknown exposure: --solve temperature (give the hold time with --time or in
the file) or --solve time (give the temperature with --temperature). D0 and Q
come from an Arrhenius result (--calibration), explicit values (--D0 --Q) or
the built-in table (--reference).

The interval propagates both the profile fit's uncertainty and the (ln D0, Q)
covariance: an inverse-prediction interval by Fieller's theorem (default) or
Monte Carlo (--method monte-carlo, seeded; --method both shows both).

With --history LOG (a furnace log of known shape but unknown level) the hold
temperature of the log is solved for instead.

A back-calculated temperature rests on the model's assumptions (constant
surface level, D independent of concentration, the calibration's range).
Confirm by metallography and the applicable specifications; defer to local
codes and licensed engineering judgement before deciding on parts.`,
		Example: `  fickfit backcalc pinion.csv --solve temperature --time 6h --calibration line.json:BAR-2291
  fickfit backcalc pinion.csv --solve time --temperature 880C --reference C-in-gamma-Fe
  fickfit backcalc pinion.csv --solve temperature --history furnace-log.csv --calibration line.json`,
		Args: cobra.MinimumNArgs(1),
		RunE: func(c *cobra.Command, args []string) error {
			if err := out.check(args); err != nil {
				return err
			}
			if err := atMost("--draws", draws, maxDraws); err != nil {
				return err
			}
			if solve != "temperature" && solve != "time" {
				return usagef("--solve must be temperature or time")
			}
			sm, err := arrhenius.ParseSolveMethod(method)
			if err != nil {
				return usagef("--method: %v", err)
			}
			calib, err := cal.calibration()
			if err != nil {
				return err
			}
			h, err := readHistory(history)
			if err != nil {
				return err
			}
			if h != nil && solve != "temperature" {
				return usagef("--history solves for the hold temperature of the log: use --solve temperature")
			}
			so := &arrhenius.SolveOptions{Level: ff.level, Method: sm, Draws: draws, Seed: ff.seed}
			// The known exposure is given to the solver, not to the fit:
			// the fit only needs Dt.
			known := ff.temperature
			if solve == "temperature" {
				known = ff.time
			}
			ff.temperature, ff.time = "", ""
			if solve == "temperature" && known != "" {
				v, err := profile.ParseDuration(known)
				if err != nil {
					return usagef("--time: %v", err)
				}
				so.Time = v
			}
			if solve == "time" && known != "" {
				v, err := profile.ParseTemperature(known)
				if err != nil {
					return usagef("--temperature: %v", err)
				}
				so.Temperature = v
			}
			results, _, err := fittedInputs(args, &ff, c.ErrOrStderr())
			if err != nil {
				return err
			}
			var sols []*arrhenius.Solution
			for _, r := range results {
				obs, err := arrhenius.ObservationFromResult(r)
				if err != nil {
					return err
				}
				var s *arrhenius.Solution
				switch {
				case h != nil:
					s, err = arrhenius.SolveHistoryLevel(obs, calib, h, arrhenius.Shift, so)
				case solve == "temperature":
					s, err = arrhenius.SolveTemperature(obs, calib, so)
				default:
					s, err = arrhenius.SolveTime(obs, calib, so)
				}
				if err != nil {
					return err
				}
				sols = append(sols, s)
			}
			return out.emit(c, report.Backcalc{Solutions: sols})
		},
	}
	ff.register(c)
	out.register(c, true)
	cal.register(c)
	c.Flags().StringVar(&solve, "solve", "temperature", "what to solve for: temperature or time")
	c.Flags().StringVar(&history, "history", "", "furnace or service log (CSV of time and temperature) of known shape but unknown level")
	c.Flags().StringVar(&method, "method", "analytic", "interval: analytic (Fieller), monte-carlo, or both")
	c.Flags().IntVar(&draws, "draws", 10000, "Monte Carlo draws (at most 1000000)")
	_ = c.RegisterFlagCompletionFunc("solve", fixed("temperature", "time"))
	_ = c.RegisterFlagCompletionFunc("method", fixed(arrhenius.SolveMethods()...))
	return c
}
