package main

import (
	"fmt"
	"io"
	"strings"

	"github.com/spf13/cobra"

	"github.com/fickfit/fickfit/fit"
	"github.com/fickfit/fickfit/fit/numeric"
	"github.com/fickfit/fickfit/profile"
)

// fitFlags are the options shared by every command that fits profiles.
type fitFlags struct {
	temperature, time, thickness string
	model                        string
	fix, free                    []string
	level                        float64
	ci                           string
	resamples                    int
	seed                         uint64
	cases, percentile            bool
	absoluteSigma                bool
	faces                        int
	caseThreshold                string
	decarbFraction               float64
	hardnessCal                  string
	cal                          *profile.Calibration
	dc, dcTable                  string
	surface                      string
	belowLimit                   string
	calMargin                    string
	exclude                      string
	excl                         *profile.Exclusions
	applied                      *profile.Applied
}

func (f *fitFlags) register(c *cobra.Command) {
	fl := c.Flags()
	fl.StringVar(&f.temperature, "temperature", "", "hold temperature, overrides the files (e.g. 925C, 1198K, 1700F)")
	fl.StringVar(&f.time, "time", "", "hold time, overrides the files (e.g. 4h, 90min, 3600s)")
	fl.StringVar(&f.thickness, "thickness", "", "specimen thickness for the slab model and the thin-section check (e.g. 12mm)")
	fl.StringVar(&f.model, "model", "erf", "model: "+strings.Join(fit.ModelNames(), ", ")+", numeric (Crank–Nicolson, with --dc) or auto (best by AICc)")
	fl.StringSliceVar(&f.fix, "fix", nil, "hold a parameter at a value, e.g. --fix Cs=1.05 --fix C0=0.2 (D in m²/s, depths in m or with a unit)")
	fl.StringSliceVar(&f.free, "free", nil, "fit a parameter that is fixed by default, e.g. --free x0")
	fl.Float64Var(&f.level, "level", 0.95, "confidence level of the intervals")
	fl.StringVar(&f.ci, "ci", "profile", "interval method: profile, wald or bootstrap")
	fl.IntVar(&f.resamples, "resamples", 2000, "bootstrap resamples (with --ci bootstrap; at most 100000)")
	fl.Uint64Var(&f.seed, "seed", 1, "bootstrap random seed: the same seed gives the same interval")
	fl.BoolVar(&f.cases, "cases", false, "bootstrap whole points (case resampling) instead of residuals")
	fl.BoolVar(&f.percentile, "percentile", false, "plain percentile bootstrap intervals instead of BCa")
	fl.BoolVar(&f.absoluteSigma, "absolute-sigma", false, "take the sigma column as known uncertainties (covariance not scaled by the reduced χ²)")
	fl.IntVar(&f.faces, "faces", 2, "slab model: 2 = both faces exposed, 1 = far face sealed")
	fl.StringVar(&f.caseThreshold, "case-threshold", "", "effective case depth at this level: 550HV1 (absolute hardness), core+50HV (margin over core), 0.35wt% (concentration)")
	fl.Float64Var(&f.decarbFraction, "decarb-fraction", 0, "decarburization depth: where the profile has recovered this fraction of the way to the base level (e.g. 0.95)")
	fl.StringVar(&f.dc, "dc", "const", "numeric model: concentration dependence of D: const, exp (D(C) = D·exp(k·(C − C0))) or table (--dc-table)")
	fl.StringVar(&f.dcTable, "dc-table", "", "numeric model with --dc table: CSV of D against concentration (e.g. C_wt%,D_m2/s); its shape is kept and its scale fitted")
	fl.StringVar(&f.surface, "surface", "fixed", "numeric model: surface condition: fixed (Cs) or masstransfer (beta, Cp)")
	fl.StringVar(&f.hardnessCal, "hardness-calibration", "", "CSV of hardness–concentration pairs for this material: hardness profiles are converted to concentration before fitting")
	fl.StringVar(&f.calMargin, "calibration-margin", "", "with --hardness-calibration: readings beyond the calibration's ends by at most this much are clamped to the end value (with a warning), further out they are left out: a hardness (10HV) or a share of the calibrated range (5%, the default)")
	fl.StringVar(&f.belowLimit, "below-limit", "omit", "values written below a detection limit (<0.01, n.d.): omit (leave the points out, listed, with a warning) or refuse (stop with an error naming the line)")
	_ = c.RegisterFlagCompletionFunc("below-limit", fixed("omit", "refuse"))
	fl.StringVar(&f.exclude, "exclude", "", "exclusions file (CSV: file, profile, depth_um, line, reason; as fickfit serve saves it): points left out of the fits, profiles without a depth left out of the Arrhenius lines")
	_ = c.RegisterFlagCompletionFunc("model", fixed(append(fit.ModelNames(), "numeric", "auto")...))
	_ = c.RegisterFlagCompletionFunc("ci", fixed(fit.CIMethods()...))
	_ = c.RegisterFlagCompletionFunc("dc", fixed(numeric.Laws()...))
	_ = c.RegisterFlagCompletionFunc("surface", fixed("fixed", "masstransfer"))
	_ = c.RegisterFlagCompletionFunc("faces", fixed("1", "2"))
}

// bootstrap tells whether the intervals are bootstrapped.
func (f *fitFlags) bootstrap() bool {
	m, err := fit.ParseCIMethod(f.ci)
	return err == nil && m == fit.CIBootstrap
}

// options turns the flags into fit.Options.
func (f *fitFlags) options() (fit.Options, error) {
	ci, err := fit.ParseCIMethod(f.ci)
	if err != nil {
		return fit.Options{}, usagef("--ci: %v", plain(err))
	}
	if err := checkModelName(f.model); err != nil {
		return fit.Options{}, err
	}
	if f.resamples < 100 {
		return fit.Options{}, usagef("--resamples %d: the bootstrap needs at least 100 resamples for a 95 %% interval (the default is 2000)", f.resamples)
	}
	if f.belowLimit != "omit" && f.belowLimit != "refuse" {
		return fit.Options{}, usagef("--below-limit %q: use omit or refuse", f.belowLimit)
	}
	o := fit.Options{
		Model: f.model, Level: f.level, CI: ci, AbsoluteSigma: f.absoluteSigma, Faces: f.faces,
		Free: f.free,
		Bootstrap: fit.BootstrapOptions{
			Resamples: f.resamples, Seed: f.seed, Cases: f.cases, Percentile: f.percentile,
		},
	}
	if !(f.level > 0 && f.level < 1) {
		return o, usagef("--level %g must be between 0 and 1, e.g. 0.95", f.level)
	}
	if err := atMost("--resamples", f.resamples, maxResamples); err != nil {
		return o, err
	}
	if f.faces != 1 && f.faces != 2 {
		return o, usagef("--faces must be 1 or 2, not %d", f.faces)
	}
	if f.thickness != "" {
		v, err := profile.ParseLength(f.thickness)
		if err != nil {
			return o, usagef("--thickness: %v", err)
		}
		o.Thickness = v
	}
	if strings.EqualFold(f.model, "numeric") {
		law, err := numeric.ParseLaw(f.dc)
		if err != nil {
			return o, usagef("--dc: %v", plain(err))
		}
		cfg := numeric.Config{DC: law}
		if law == numeric.LawTable {
			if f.dcTable == "" {
				return o, usagef("--dc table needs --dc-table FILE")
			}
			c, d, err := profile.ReadDiffusivityTable(f.dcTable)
			if err != nil {
				return o, err
			}
			if cfg.Table, err = numeric.NewTable(c, d); err != nil {
				return o, usagef("--dc-table: %v", err)
			}
		}
		switch f.surface {
		case "fixed":
		case "masstransfer":
			cfg.Surface = numeric.SurfaceMassTransfer
		default:
			return o, usagef("--surface %q: use fixed or masstransfer", f.surface)
		}
		m, err := numeric.NewModel(cfg)
		if err != nil {
			return o, usagef("--dc: %v", err)
		}
		o.Custom = m
	}
	if f.caseThreshold != "" {
		th, err := fit.ParseThreshold(f.caseThreshold)
		if err != nil {
			return o, usagef("--case-threshold: %v", err)
		}
		o.CaseThreshold = &th
	}
	if f.decarbFraction != 0 {
		if !(f.decarbFraction > 0 && f.decarbFraction < 1) {
			return o, usagef("--decarb-fraction %g must lie between 0 and 1, e.g. 0.95", f.decarbFraction)
		}
		o.DecarbFraction = f.decarbFraction
	}
	if f.exclude != "" && f.excl == nil {
		x, err := profile.ReadExclusions(f.exclude)
		if err != nil {
			return o, err
		}
		f.excl = x
	}
	if f.hardnessCal != "" {
		cal, err := profile.ReadCalibration(f.hardnessCal)
		if err != nil {
			return o, err
		}
		if err := cal.SetMargin(f.calMargin); err != nil {
			return o, usagef("--calibration-margin: %v", err)
		}
		f.cal, o.Calibration = cal, cal
	} else if f.calMargin != "" {
		return o, usagef("--calibration-margin goes with --hardness-calibration")
	}
	if len(f.fix) > 0 {
		o.Fixed = map[string]float64{}
		for _, s := range f.fix {
			name, v, err := fit.ParseFixed(s)
			if err != nil {
				return o, usagef("--fix %v", plain(err))
			}
			o.Fixed[name] = v
		}
	}
	return o, nil
}

// checkModelName refuses an unknown --model at once, listing every model
// the flag takes (the registered ones, numeric and auto), before any file
// is read: a wrong name is one mistake, said once.
func checkModelName(name string) error {
	n := strings.ToLower(strings.TrimSpace(name))
	valid := append(fit.ModelNames(), "numeric", "auto")
	for _, v := range valid {
		if n == v {
			return nil
		}
	}
	return usagef("--model %q: unknown model; use one of %s", name, strings.Join(valid, ", "))
}

// checkBelowLimit refuses, with --below-limit refuse, a profile holding a
// value written below a detection limit, naming its line.
func (f *fitFlags) checkBelowLimit(ps []profile.Profile) error {
	if f.belowLimit != "refuse" {
		return nil
	}
	for _, p := range ps {
		if len(p.BelowLimit) > 0 {
			b := p.BelowLimit[0]
			where := fmt.Sprintf("%s:%d", p.Source, b.Line)
			if b.Cell != "" {
				where = p.Source + " cell " + b.Cell
			}
			return usagef("%s: profile %s: the value %q is written below a detection limit (--below-limit refuse): give a number, or leave the point out with --below-limit omit", where, p.ID, b.Text)
		}
	}
	return nil
}

// excludePoints takes the points of --exclude out of the profiles
// (options must have been called) and says on w which rows concern no
// input profile.
func (f *fitFlags) excludePoints(ps []profile.Profile, w io.Writer) error {
	if f.excl == nil {
		return nil
	}
	a, err := f.excl.Apply(ps)
	if err != nil {
		return err
	}
	f.applied = a
	if len(a.Unused) > 0 {
		ids := make([]string, len(a.Unused))
		for i, e := range a.Unused {
			ids[i] = e.Profile
		}
		fmt.Fprintf(w, "fickfit: %s: %d rows concern profiles not among the inputs (%s); they were not used\n",
			f.exclude, len(ids), strings.Join(ids, ", "))
	}
	return nil
}

// leftOut tells whether --exclude leaves the profile id out of the
// Arrhenius lines and comparisons (a row without a depth).
func (f *fitFlags) leftOut(id string) bool {
	if f.excl != nil {
		for _, e := range f.excl.Rows {
			if e.Whole() && e.Profile == id {
				return true
			}
		}
	}
	return false
}

// leaveOut drops the fits of the profiles that --exclude leaves out.
func (f *fitFlags) leaveOut(rs []*fit.Result) []*fit.Result {
	var out []*fit.Result
	for _, r := range rs {
		if !f.leftOut(r.ID) {
			out = append(out, r)
		}
	}
	return out
}

// override applies --temperature, --time and --thickness to every profile,
// and converts hardness profiles with --hardness-calibration.
func (f *fitFlags) override(ps []profile.Profile) error {
	if f.cal != nil {
		for i := range ps {
			if _, ok := profile.HardnessScale(ps[i].ValueUnit); !ok {
				continue
			}
			c, err := f.cal.Apply(&ps[i])
			if err != nil {
				return err
			}
			ps[i] = c
		}
	}
	if f.temperature != "" {
		v, err := profile.ParseTemperature(f.temperature)
		if err != nil {
			return usagef("--temperature: %v", err)
		}
		for i := range ps {
			ps[i].Temperature = v
		}
	}
	if f.time != "" {
		v, err := profile.ParseDuration(f.time)
		if err != nil {
			return usagef("--time: %v", err)
		}
		for i := range ps {
			ps[i].Time = v
		}
	}
	if f.thickness != "" {
		v, err := profile.ParseLength(f.thickness)
		if err != nil {
			return usagef("--thickness: %v", err)
		}
		for i := range ps {
			ps[i].Thickness = v
		}
	}
	return nil
}
