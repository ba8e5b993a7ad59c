package report

import "github.com/fickfit/fickfit/fit"

// MethodNote is one paragraph of the method notes, with its published source.
type MethodNote struct {
	Topic  string
	Text   string
	Source string
}

// MethodNotes say how the numbers were obtained, each with the published
// source of the method. They are product text: a source is cited by work
// (author, title, edition, year) and by section only where the section was
// checked; notes_test.go records which parts of each citation were written
// from memory. The first note lists the closed-form models of the fit
// registry.
func MethodNotes() []MethodNote {
	var titles []string
	for _, in := range fit.Models() {
		if in.InAuto {
			titles = append(titles, in.Title)
		}
	}
	models := MethodNote{"Diffusion models",
		"Each profile is fitted with a closed-form solution of Fick's second law for a semi-infinite or finite body: " + orList(titles) +
			", with D independent of concentration and depth.",
		"J. Crank, The Mathematics of Diffusion, 2nd ed., Oxford University Press, 1975"}
	return append([]MethodNote{models}, methodNotes...)
}

var methodNotes = []MethodNote{
	{"Least squares",
		"Parameters are estimated by weighted nonlinear least squares (Levenberg–Marquardt with Moré's scaling), D on the logarithmic scale so that it stays positive; the solver is checked against the NIST Statistical Reference Datasets for nonlinear regression.",
		"J. J. Moré, The Levenberg–Marquardt algorithm: implementation and theory, in Numerical Analysis (ed. G. A. Watson), Springer LNM 630, 1978; NIST StRD, Nonlinear Regression"},
	{"Intervals of the parameters",
		"Standard errors come from the covariance s²(JᵀWJ)⁻¹ (scaled by the reduced χ² unless the σ are taken as known). Intervals are Wald intervals with Student-t quantiles, profile-likelihood intervals (signed root statistic against t), or seeded bootstrap intervals (percentile or BCa). An interval end the data do not determine is reported as open.",
		"D. M. Bates & D. G. Watts, Nonlinear Regression Analysis and Its Applications, Wiley, 1988; B. Efron & R. J. Tibshirani, An Introduction to the Bootstrap, Chapman & Hall, 1993"},
	{"Confidence band of a curve",
		"The band around a fitted profile is the pointwise interval of the mean curve by the delta method, Var f(x) = gᵀΣg with g the gradient of the model in its parameters.",
		"G. A. F. Seber & C. J. Wild, Nonlinear Regression, Wiley, 1989"},
	{"Diagnostics",
		"R², RMSE, the small-sample Akaike criterion AICc, the Wald–Wolfowitz runs test on the signs of the residuals in depth order, and the condition number of JᵀWJ. Warnings say where the data do not constrain D (plateau not reached, penetration beyond the data, section too thin for a semi-infinite model).",
		"A. Wald & J. Wolfowitz, Ann. Math. Statist. 11 (1940) 147–162; K. P. Burnham & D. R. Anderson, Model Selection and Multimodel Inference, 2nd ed., Springer, 2002"},
	{"Arrhenius law",
		"ln D = ln D0 − Q/(RT) with R = 8.314462618 J/(mol·K). Two-stage: weighted least squares of ln Dᵢ on 1/(RTᵢ) with weights 1/Var(ln Dᵢ), covariance scaled by the squared Birge ratio when the points scatter more than their errors allow. Global: one nonlinear fit of all profiles sharing ln D0 and Q.",
		"CODATA 2018 recommended values (R exact since the 2019 SI); R. T. Birge, Phys. Rev. 40 (1932) 207"},
	{"Points off the line",
		"Each point's leverage, studentized (deleted) residual and Cook's distance about the weighted line; a point the outlier test with Bonferroni adjustment flags is named with its distance from the line through the other points, and with the unit slip (Celsius, kelvin or Fahrenheit read as another) that would put it back on that line. The prediction interval of a single new part adds the variance of one point about the line to that of the mean line.",
		"R. D. Cook & S. Weisberg, Residuals and Influence in Regression, Chapman & Hall, 1982"},
	{"Lot comparison",
		"Extra-sum-of-squares F-tests of separate lines against one common line (and common Q with separate D0); the ratio of D between lots at one temperature with a Wald interval on its logarithm. With three or more lots every pair is compared, its p-value adjusted for the number of pairs by Holm's step-down method.",
		"N. R. Draper & H. Smith, Applied Regression Analysis, 3rd ed., Wiley, 1998 (the extra-sum-of-squares principle); S. Holm, A simple sequentially rejective multiple test procedure, Scand. J. Statist. 6 (1979) 65–70"},
	{"Back-calculation",
		"The temperature of a part is an inverse prediction, 1/T = R(ln D0 − ln D)/Q; its interval by Fieller's theorem propagates the part's Var(ln Dt) and the covariance of (ln D0, Q). A hold time is solved on the log scale, ln t = ln(Dt) − ln D0 + Q/(RT), with a Wald interval. Monte Carlo intervals are offered as a check.",
		"E. C. Fieller, Some problems in interval estimation, J. R. Stat. Soc. B 16 (1954)"},
	{"Rounding of reported numbers",
		"Values are written with the digits their interval supports: the uncertainty to one or two significant digits and the value to the same place. Machine-readable outputs (JSON, CSV) keep full precision.",
		"JCGM 100:2008 (GUM) §7.2.6; Particle Data Group, Review of Particle Physics (its rounding rule)"},
}
