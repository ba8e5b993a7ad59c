package main

import (
	"io"
	"path/filepath"
	"strconv"
	"strings"

	"github.com/spf13/cobra"

	"github.com/fickfit/fickfit/fit/matano"
	"github.com/fickfit/fickfit/profile"
	"github.com/fickfit/fickfit/report"
)

func init() { addCommands(newMatanoCmd) }

func newMatanoCmd() *cobra.Command {
	var out outFlags
	var method, tm, figure, terms string
	var at []float64
	var level float64
	var resamples int
	var seed uint64
	c := &cobra.Command{
		Use:   "matano FILE...",
		Short: "D(C) from a diffusion-couple profile (Boltzmann–Matano or Sauer–Freise)",
		Long: `Estimate the concentration-dependent diffusivity D(C) from the profile of a
diffusion couple: the depth column is the position across the couple. The
measured profile is first smoothed by a monotone sum of error functions
(--terms auto: one term more than AICc chooses, so that the smoother's bias
stays small against the band; --terms N fixes N), then D is evaluated at the
requested concentrations by the Boltzmann–Matano method (Matano plane from
equal areas) or by Sauer–Freise (no Matano plane). The band is a seeded
bootstrap of the whole procedure, including the choice of the number of
terms. Near the end compositions the method is ill-conditioned and says
so.`,
		Example: `  fickfit matano couple-NiCu.csv --time 100h
  fickfit matano couple.csv --method sauer-freise --at 0.2,0.4,0.6 --format json
  fickfit matano couple.csv --terms 4`,
		Args: cobra.MinimumNArgs(1),
		RunE: func(c *cobra.Command, args []string) error {
			if err := out.check(args); err != nil {
				return err
			}
			if err := atMost("--resamples", resamples, maxResamples); err != nil {
				return err
			}
			ps, err := profile.ReadAll(args)
			if err != nil {
				return err
			}
			var t float64
			if tm != "" {
				if t, err = profile.ParseDuration(tm); err != nil {
					return usagef("--time: %v", err)
				}
			}
			nterms := 0
			if t := strings.TrimSpace(terms); t != "auto" {
				n, err := strconv.Atoi(t)
				if err != nil || n < 1 {
					return usagef("--terms %s: give a number of error-function terms (1 to 8) or auto", terms)
				}
				nterms = n
			}
			var results []*matano.Result
			for i := range ps {
				tt := t
				if tt == 0 {
					tt = ps[i].Time
				}
				if !(tt > 0) {
					return usagef("profile %s: the couple's annealing time is needed (--time or a '# time:' line)", ps[i].ID)
				}
				r, err := matano.Analyze(&ps[i], tt, matano.Options{
					Method: method, Concentrations: at, Terms: nterms, Level: level, Resamples: resamples, Seed: seed,
				})
				if err != nil {
					return err
				}
				results = append(results, r)
			}
			if figure != "" {
				if err := writeMatanoFigures(figure, results, ps, out.output()); err != nil {
					return err
				}
			}
			return out.emit(c, report.Matano(results))
		},
	}
	out.register(c, true)
	fl := c.Flags()
	fl.StringVar(&method, "method", "boltzmann-matano", "boltzmann-matano or sauer-freise")
	fl.StringVar(&tm, "time", "", "annealing time of the couple (overrides the file)")
	fl.StringVar(&terms, "terms", "auto", "error-function terms of the smoother: 1 to 8, or auto (one more than AICc chooses)")
	fl.Float64SliceVar(&at, "at", nil, "concentrations at which to report D (default: 5 %…95 % of the way between the end compositions)")
	fl.Float64Var(&level, "level", 0.95, "confidence level of the bootstrap band")
	fl.IntVar(&resamples, "resamples", 1000, "bootstrap resamples for the band (at most 100000; negative: no band)")
	fl.Uint64Var(&seed, "seed", 1, "bootstrap seed: the same seed gives the same band")
	fl.StringVar(&figure, "figure", "", "also draw the profile and D(C) to this .svg or .png file (one file per couple: the id is added when there are several)")
	markOutput(c, "figure")
	return c
}

// figureExt refuses a --figure path that is not .svg or .png.
func figureExt(path string) error {
	if ext := strings.ToLower(filepath.Ext(path)); ext != ".svg" && ext != ".png" {
		return usagef("--figure %s: name an .svg or .png file", path)
	}
	return nil
}

// writeFigure writes f to path, SVG or PNG by extension, whole or not at
// all, never over an input.
func writeFigure(path string, f *report.Figure, o report.Output) error {
	return o.WriteFile(path, func(w io.Writer) error {
		if strings.EqualFold(filepath.Ext(path), ".png") {
			return f.WritePNG(w, 0)
		}
		return f.WriteSVG(w)
	})
}

// writeMatanoFigures draws each analysis to path (SVG or PNG by extension),
// never over an input.
func writeMatanoFigures(path string, results []*matano.Result, ps []profile.Profile, o report.Output) error {
	if err := figureExt(path); err != nil {
		return err
	}
	ext := strings.ToLower(filepath.Ext(path))
	for i, r := range results {
		f, err := report.MatanoFigure(r, &ps[i], report.FigureOptions{})
		if err != nil {
			return err
		}
		target := path
		if len(results) > 1 {
			target = strings.TrimSuffix(path, filepath.Ext(path)) + "-" + f.Name + ext
		}
		if err := writeFigure(target, f, o); err != nil {
			return err
		}
	}
	return nil
}
