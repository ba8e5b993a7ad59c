// Package fit fits solutions of Fick's second law to one measured depth
// profile by weighted nonlinear least squares and says how far the answer
// can be trusted.
//
// A Model is a small value that knows its parameters, guesses a start from
// the data and evaluates the profile and its Jacobian (erf, masstransfer,
// thinfilm, slab, couple here; the numerical Crank–Nicolson model in
// fit/numeric). Each model registers itself with an Info (Register), so
// that auto-selection (SelectModel, --model auto), the diagnostics, report
// labels and CSV columns know it from one place.
//
// Fit and FitModel fit one profile; FitAll fits a batch in parallel, with
// a panic in a model kept to its profile. Solve is the Levenberg–Marquardt
// solver underneath, shaped like gonum's optimize (a Problem of funcs,
// Settings with documented zero values, a Solution with its status).
//
// A Result carries the estimates in reported units with standard errors
// and intervals (Wald, profile likelihood or bootstrap: CIMethod), the fit
// statistics (n, dof, RSS, RMSE, R², AICc, reduced χ², runs test,
// condition number), the residuals and plain-language warnings with stable
// codes; CaseDepth and DecarbDepth derive depths with intervals.
//
// Units are SI (m, s, m²/s) except measured values, which stay in the
// profile's own unit. Errors wrap ErrBadInput (the request or data must
// change) or ErrNoAnswer (the data cannot give an answer) and name the
// profile and file. The JSON form of a Result is the output contract of
// `fickfit fit --format json` (docs/output.md).
package fit
