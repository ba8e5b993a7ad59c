package main

import (
	"fmt"
	"strconv"
	"strings"

	"github.com/spf13/cobra"

	"github.com/fickfit/fickfit/arrhenius"
	"github.com/fickfit/fickfit/profile"
)

// calFlags choose where D0 and Q come from: an Arrhenius result file, explicit
// values, or a row of the built-in reference table.
type calFlags struct {
	file      string
	d0, q     string
	d0u, qu   string
	corr      float64
	reference string
	refSpread float64
	refQU     string
}

func (c *calFlags) register(cmd *cobra.Command) {
	fl := cmd.Flags()
	fl.StringVar(&c.file, "calibration", "", "Arrhenius result written by 'fickfit arrhenius --format json' (FILE or FILE:GROUP for one lot)")
	fl.StringVar(&c.d0, "D0", "", "pre-exponential factor D0 in m²/s (with --Q)")
	fl.StringVar(&c.q, "Q", "", "activation energy Q with its unit: 148kJ/mol, 148000J/mol, 1.53eV")
	fl.StringVar(&c.d0u, "D0-stderr", "", "standard uncertainty of D0 in m²/s (optional)")
	fl.StringVar(&c.qu, "Q-stderr", "", "standard uncertainty of Q with its unit (optional, e.g. 5kJ/mol)")
	fl.Float64Var(&c.corr, "corr", 0, "correlation of ln D0 and Q (optional, with both uncertainties)")
	fl.StringVar(&c.reference, "reference", "", "a row of the built-in table (see 'fickfit reference')")
	fl.Float64Var(&c.refSpread, "reference-spread", arrhenius.DefaultSpreadFactor, "with --reference: D of the row known within this factor (one standard uncertainty; 1 = taken as exact)")
	fl.StringVar(&c.refQU, "reference-Q-uncertainty", "5%", "with --reference: standard uncertainty of the row's Q, relative (5%) or as an energy (7kJ/mol)")
	// Exactly one source of D0 and Q: the file, the explicit values or a row.
	cmd.MarkFlagsOneRequired("calibration", "D0", "reference")
	cmd.MarkFlagsMutuallyExclusive("calibration", "D0", "reference")
	cmd.MarkFlagsMutuallyExclusive("calibration", "Q", "reference")
	cmd.MarkFlagsRequiredTogether("D0", "Q")
	_ = cmd.RegisterFlagCompletionFunc("reference", fixed(arrhenius.ReferenceNames()...))
}

// calibration returns the chosen calibration; exactly one source must be given.
func (c *calFlags) calibration() (arrhenius.Calibration, error) {
	n := 0
	for _, set := range []bool{c.file != "", c.d0 != "" || c.q != "", c.reference != ""} {
		if set {
			n++
		}
	}
	if n != 1 {
		return arrhenius.Calibration{}, usagef("give exactly one source of D0 and Q: --calibration FILE, --D0 with --Q, or --reference NAME")
	}
	switch {
	case c.file != "":
		path, group := c.file, ""
		if i := strings.LastIndex(c.file, ":"); i > 1 { // keep "C:\..." whole
			path, group = c.file[:i], c.file[i+1:]
		}
		return arrhenius.LoadCalibration(path, group)
	case c.reference != "":
		ref, err := arrhenius.LookupReference(c.reference)
		if err != nil {
			return arrhenius.Calibration{}, err
		}
		qrel, err := relOrEnergy(c.refQU, ref.Q)
		if err != nil {
			return arrhenius.Calibration{}, usagef("--reference-Q-uncertainty: %v", err)
		}
		cal, err := ref.CalibrationWithSpread(c.refSpread, qrel)
		if err != nil {
			return arrhenius.Calibration{}, usagef("--reference-spread: %v", plain(err))
		}
		return cal, nil
	}
	if c.refSpread != arrhenius.DefaultSpreadFactor || c.refQU != "5%" {
		return arrhenius.Calibration{}, usagef("--reference-spread and --reference-Q-uncertainty go with --reference")
	}
	if c.d0 == "" || c.q == "" {
		return arrhenius.Calibration{}, usagef("--D0 and --Q go together")
	}
	d0, err := strconv.ParseFloat(c.d0, 64)
	if err != nil {
		return arrhenius.Calibration{}, usagef("--D0 %q is not a number (m²/s)", c.d0)
	}
	q, err := arrhenius.ParseEnergy(c.q)
	if err == nil {
		err = arrhenius.CheckActivationEnergy(q)
	}
	if err != nil {
		return arrhenius.Calibration{}, usagef("--Q: %v", err)
	}
	var d0u, qu float64
	if c.d0u != "" {
		if d0u, err = strconv.ParseFloat(c.d0u, 64); err != nil {
			return arrhenius.Calibration{}, usagef("--D0-stderr %q is not a number (m²/s)", c.d0u)
		}
	}
	if c.qu != "" {
		if qu, err = arrhenius.ParseEnergy(c.qu); err != nil {
			return arrhenius.Calibration{}, usagef("--Q-stderr: %v", err)
		}
	}
	return arrhenius.Explicit(d0, d0u, q, qu, c.corr)
}

// relOrEnergy reads a standard uncertainty of Q as a percentage ("5%")
// or an energy with its unit ("7kJ/mol") and returns it relative to q.
func relOrEnergy(s string, q float64) (float64, error) {
	t := strings.TrimSpace(s)
	if p, ok := strings.CutSuffix(t, "%"); ok {
		v, err := strconv.ParseFloat(strings.TrimSpace(p), 64)
		if err != nil || !(v >= 0) {
			return 0, fmt.Errorf("%q is not a percentage ≥ 0 (write e.g. 5%%)", s)
		}
		return v / 100, nil
	}
	e, err := arrhenius.ParseEnergy(t)
	if err != nil {
		return 0, err
	}
	return e / q, nil
}

// readHistory reads --history when given.
func readHistory(path string) (*profile.History, error) {
	if path == "" {
		return nil, nil
	}
	return profile.ReadHistory(path)
}
