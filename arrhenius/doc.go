// Package arrhenius turns fitted diffusion coefficients into decisions:
// Arrhenius parameters (D0, Q), back-calculated exposures of a part,
// thermal-history integrals, forward predictions for schedule planning,
// lot comparison and a small table of published reference values.
//
// The law is ln D = ln D0 − Q/(RT) with R = 8.314462618 J mol⁻¹ K⁻¹
// (CODATA 2018, exact since the 2019 SI redefinition). Everything inside
// is SI: D in m²/s, Dt in m², Q in J/mol, T in K, t in s.
//
// Which method gives which interval:
//
//   - TwoStage: weighted least squares of ln Dᵢ on 1/(RTᵢ) with weights
//     1/Var(ln Dᵢ) (effective variance when temperatures are uncertain);
//     Wald intervals. When the scatter exceeds the stated errors (Birge
//     ratio B > 1) the covariance is scaled by B² and the quantiles are
//     Student-t on n − 2 degrees of freedom; otherwise the stated errors are
//     taken as known and the quantiles are normal. D0's interval is exp of
//     the ln D0 interval.
//   - Global: one-stage nonlinear least squares over all profiles at once
//     (fit.Solve on a stacked problem); same interval rules, with the
//     Birge ratio taken from the extra sum of squares of the global fit
//     over the separate fits (n_profiles − 2 degrees of freedom).
//   - Line.DAt: confidence band of the mean line, ln D ± k·se, mapped by exp.
//   - SolveTemperature: Fieller's theorem on the ratio 1/T = (ln D0 − ln D)·R/Q
//     (exact for normal estimates; Student-t with Satterthwaite's effective
//     dof when the calibration was Birge-scaled), or Monte Carlo percentiles
//     with a stated seed; both are offered and tested against each other.
//   - SolveTime: ln t is linear in (ln D0, Q, ln Dt), so the Wald interval
//     on ln t is exact under normality; Monte Carlo is offered as well.
//   - SolveHistoryLevel: test inversion of the linearised equation, which
//     reduces to Fieller's interval for an isothermal log.
//   - Predictions (profile band, case depth, time to depth): the interval of
//     ln(Dt) from the calibration mapped through the monotone model.
//   - Compare: extra-sum-of-squares F-tests between nested weighted
//     Arrhenius regressions; D ratio by the Wald interval on its log.
//
// Thermal histories (furnace logs, profile.History) enter through ∫D(T(t))dt
// with T linear between rows (IntegralD, EquivalentTime, WithHistory,
// SolveHistoryLevel, Exposure.History). Reference values (LookupReference)
// come from a named handbook table.
//
// Back-calculated and predicted numbers feed decisions about parts: every
// such result carries the Cautions text.
package arrhenius
