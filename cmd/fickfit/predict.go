package main

import (
	"github.com/spf13/cobra"

	"github.com/fickfit/fickfit/arrhenius"
	"github.com/fickfit/fickfit/fit"
	"github.com/fickfit/fickfit/profile"
	"github.com/fickfit/fickfit/report"
)

func init() { addCommands(newPredictCmd) }

func newPredictCmd() *cobra.Command {
	var out outFlags
	var cal calFlags
	var temperature, tm, history, threshold, target, maxDepth, figure string
	var cs, c0, level float64
	var points int
	c := &cobra.Command{
		Use:   "predict",
		Short: "Predict the profile and case depth of a schedule, or the time to reach a case depth",
		Long: `Forward use for schedule planning, with the constant-surface (erf) model:
the profile C(x) after a hold (--temperature, --time) or a logged
treatment (--history), with a band from the calibration's uncertainty; the
case depth at a concentration threshold (--case-threshold); or, with
--target-depth, the hold time needed to reach that case depth.

A predicted case depth rests on the model's assumptions (constant surface
level Cs, D independent of concentration, a semi-infinite part, the
calibration's temperature range). Verify by metallography on the first
parts, let the applicable specifications decide, and defer to local codes
and licensed engineering judgement.`,
		Example: `  fickfit predict --calibration line.json:BAR-2291 --temperature 925C --time 5h --Cs 1.0 --C0 0.2 --case-threshold 0.35wt% --figure plan.svg
  fickfit predict --reference C-in-gamma-Fe --temperature 925C --Cs 1.0 --C0 0.2 --case-threshold 0.35wt% --target-depth 0.9mm`,
		Args: cobra.NoArgs,
		RunE: func(c *cobra.Command, args []string) error {
			if err := out.check(nil); err != nil {
				return err
			}
			if figure != "" {
				if err := figureExt(figure); err != nil {
					return err
				}
				if target != "" {
					return usagef("--figure draws the profile of a schedule; with --target-depth there is none: run predict again with --time set to the solved hold time")
				}
			}
			calib, err := cal.calibration()
			if err != nil {
				return err
			}
			var e arrhenius.Exposure
			if temperature != "" {
				if e.Temperature, err = profile.ParseTemperature(temperature); err != nil {
					return usagef("--temperature: %v", err)
				}
			}
			if tm != "" {
				if e.Time, err = profile.ParseDuration(tm); err != nil {
					return usagef("--time: %v", err)
				}
			}
			if e.History, err = readHistory(history); err != nil {
				return err
			}
			po := &arrhenius.PredictOptions{Level: level}
			th := 0.0
			if threshold != "" {
				t, err := fit.ParseThreshold(threshold)
				if err != nil {
					return usagef("--case-threshold: %v", err)
				}
				if t.Kind != fit.Absolute || t.Hardness() {
					return usagef("--case-threshold for predictions is a concentration in the unit of --Cs and --C0 (e.g. 0.35wt%%); hardness thresholds need a measured traverse ('fickfit fit --case-threshold')")
				}
				th = t.Value
			}
			var preds []*arrhenius.Prediction
			if target != "" {
				if threshold == "" || temperature == "" {
					return usagef("--target-depth needs --case-threshold and --temperature")
				}
				d, err := profile.ParseLength(target)
				if err != nil {
					return usagef("--target-depth: %v", err)
				}
				p, err := arrhenius.TimeToDepth(calib, e.Temperature, cs, c0, th, d, po)
				if err != nil {
					return err
				}
				preds = append(preds, p)
			} else {
				if e.History == nil && (temperature == "" || tm == "") {
					return usagef("give --temperature and --time, or --history")
				}
				xmax, err := profile.ParseLength(maxDepth)
				if err != nil {
					return usagef("--max-depth: %v", err)
				}
				if points < 2 {
					return usagef("--points must be at least 2")
				}
				if err := atMost("--points", points, maxPoints); err != nil {
					return err
				}
				depths := make([]float64, points)
				for i := range depths {
					depths[i] = xmax * float64(i) / float64(points-1)
				}
				p, err := arrhenius.PredictProfile(calib, e, cs, c0, depths, po)
				if err != nil {
					return err
				}
				if threshold != "" {
					q, err := arrhenius.PredictCaseDepth(calib, e, cs, c0, th, po)
					if err != nil {
						return err
					}
					p.CaseDepth, p.Threshold = q.CaseDepth, q.Threshold
				}
				preds = append(preds, p)
				if figure != "" {
					f, err := report.PredictionFigure(p, report.FigureOptions{TempUnit: out.unit})
					if err != nil {
						return err
					}
					if err := writeFigure(figure, f, out.output()); err != nil {
						return err
					}
				}
			}
			return out.emit(c, report.Predictions(preds))
		},
	}
	out.register(c, true)
	cal.register(c)
	fl := c.Flags()
	fl.StringVar(&temperature, "temperature", "", "hold temperature (e.g. 925C)")
	fl.StringVar(&tm, "time", "", "hold time (e.g. 5h)")
	fl.StringVar(&history, "history", "", "furnace log (CSV of time and temperature) instead of a hold")
	fl.Float64Var(&cs, "Cs", 0, "surface level (the furnace's carbon potential, in the unit of the threshold)")
	fl.Float64Var(&c0, "C0", 0, "base level of the steel")
	fl.StringVar(&threshold, "case-threshold", "", "concentration that defines the case depth (e.g. 0.35wt%)")
	fl.StringVar(&target, "target-depth", "", "solve for the hold time that reaches this case depth (e.g. 0.9mm)")
	fl.StringVar(&maxDepth, "max-depth", "2mm", "deepest point of the predicted profile")
	fl.IntVar(&points, "points", 41, "number of depths in the predicted profile (2 to 10000)")
	fl.Float64Var(&level, "level", 0.95, "confidence level of the bands")
	fl.StringVar(&figure, "figure", "", "also draw the predicted profile, its bands and the case depth to this .svg or .png file")
	markOutput(c, "figure")
	_ = c.MarkFlagRequired("Cs")
	_ = c.MarkFlagRequired("C0")
	return c
}
