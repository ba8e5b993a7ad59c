package main

import (
	"io"

	"github.com/fickfit/fickfit/fit"
	"github.com/fickfit/fickfit/profile"
	"github.com/fickfit/fickfit/report"
)

// writeFits writes fit results (and the profiles that failed) in the chosen format.
func writeFits(w io.Writer, format string, f report.Fits) error {
	switch format {
	case "json":
		return f.WriteJSON(w)
	case "csv":
		return f.WriteCSV(w)
	}
	return f.WriteText(w, report.TextOptions{})
}

// writeValue writes the result of a decision command (Arrhenius line,
// back-calculation, prediction, comparison, reference table) in the chosen
// format.
func writeValue(w io.Writer, format string, v any) error {
	switch format {
	case "json":
		return report.JSON(w, v)
	case "csv":
		return report.CSV(w, v)
	}
	return report.Text(w, v, report.TextOptions{})
}

// fitsOf pairs results with their profiles for the writers.
func fitsOf(ps []profile.Profile, rs []*fit.Result, errs []error) report.Fits {
	return report.NewFits(ps, rs, errs)
}
