package fit

import "github.com/fickfit/fickfit/profile"

// Options control one fit. The zero value fits the erf model with its
// default free parameters, 95 % profile-likelihood intervals and the
// covariance scaled by the reduced χ².
type Options struct {
	// Model is the flag name of a registered model; "" means "erf".
	// Ignored when Custom is set.
	Model string
	// Custom, when not nil, is used instead of a registered model (for
	// example the numerical Crank–Nicolson model, which lives in a subpackage).
	Custom Model
	// Fixed holds parameters held at a value, in reported units
	// (D in m²/s, Cs in the profile's unit, x0 in m…).
	Fixed map[string]float64
	// Free names parameters to fit that are fixed by default (e.g. "x0").
	Free []string
	// Level is the confidence level of the intervals; 0 means 0.95.
	Level float64
	// CI is the interval method: CIProfile (the default when ""), CIWald
	// or CIBootstrap.
	CI CIMethod
	// Bootstrap settings, used when CI is "bootstrap".
	Bootstrap BootstrapOptions
	// AbsoluteSigma takes the σ column as known standard uncertainties: the
	// covariance is (JᵀWJ)⁻¹, not scaled by the reduced χ².
	AbsoluteSigma bool
	// Thickness overrides the profile's thickness (m); 0 keeps it.
	Thickness float64
	// Faces is the number of exposed faces for the slab model; 0 means 2.
	Faces int
	// Settings tune the least-squares solver; nil means DefaultSettings().
	Settings *Settings

	// CaseThreshold, when not nil, asks for the effective case depth at this
	// threshold (from the data and from the fitted curve, with its interval).
	CaseThreshold *Threshold
	// DecarbFraction, when above 0, asks for the decarburization depth: where
	// an out-diffusion profile has recovered this fraction of the way to the
	// base level (0.95 is the usual choice).
	DecarbFraction float64
	// Calibration converts between hardness and concentration for depth
	// thresholds stated in the other quantity; nil means none.
	Calibration *profile.Calibration
}

// BootstrapOptions control bootstrap intervals.
type BootstrapOptions struct {
	// Resamples is the number of bootstrap replicates; 0 means 2000.
	Resamples int
	// Seed seeds the generator; the same seed gives the same interval
	// whatever the number of workers.
	Seed uint64
	// Cases resamples whole (depth, value) points instead of residuals.
	Cases bool
	// Percentile reports plain percentile intervals instead of BCa.
	Percentile bool
	// Workers is the number of goroutines; 0 means runtime.GOMAXPROCS(0).
	Workers int
	// Progress, when not nil, is called after each finished replicate, from
	// one goroutine at a time.
	Progress func(done, total int)
}
