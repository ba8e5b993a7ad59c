package arrhenius

import (
	"math"

	"github.com/fickfit/fickfit/internal/phys"
	"github.com/fickfit/fickfit/internal/stats"
	"github.com/fickfit/fickfit/internal/tempfmt"
)

// R is the molar gas constant in J mol⁻¹ K⁻¹ (CODATA 2018; exact in the SI
// since 2019 as N_A·k).
const R = phys.R

// Cautions accompany every back-calculated or predicted number: such
// numbers feed decisions about parts.
var Cautions = []string{
	"Model assumptions: D follows a single Arrhenius line over the temperatures concerned, does not depend on concentration or depth, the part behaved as a semi-infinite body with a constant surface level, and the calibration specimens represent the part's material, condition and atmosphere.",
	"The interval covers only the stated statistical uncertainties (profile fit and calibration); it does not cover model error, sampling of the part, or bias of the measurement method.",
	"Verify by metallography (microstructure, microhardness traverse or chemical profile) on the part or on a witness coupon before acting on this number.",
	"The applicable specifications decide acceptance; defer to local codes and to licensed engineering judgement.",
}

// Calibration is what back-calculation and prediction need from an
// Arrhenius line: ln D0, Q and their covariance. It comes from a fitted
// Line (Line.Calibration), from explicit values (Explicit) or from the
// reference table (Reference.Calibration).
type Calibration struct {
	LnD0 float64 // ln(D0 / (m²/s))
	Q    float64 // J/mol
	// Cov is the covariance of (ln D0, Q) as used for intervals (already
	// scaled by the squared Birge ratio where that applied). All zero when
	// no uncertainty is known: intervals then cover only the profile's.
	Cov [2][2]float64
	// DOF is the degrees of freedom of the Student-t quantile used with
	// Cov; 0 means the covariance is taken as known (normal quantile).
	DOF int
	// NoInterval is true when the calibration supports estimates but no
	// interval (an Arrhenius line from only two temperatures).
	NoInterval bool
	// Method says where the calibration came from: "two-stage", "global",
	// "explicit" or "reference".
	Method string
	// Source describes it in words (reference name and book, file, group).
	Source string
	// TMin and TMax bound the temperatures behind the calibration (K); 0
	// when unknown. Results outside are flagged as extrapolations.
	TMin, TMax float64
	// PartVar is the variance of ln D of a single new part about the line
	// (Line.PartVar): it widens a prediction for one part beyond the band
	// of the mean line. 0 when unknown.
	PartVar float64
	// ExcessVar is the part of PartVar beyond the points' stated errors
	// ((B² − 1)·mean Var ln D when the Birge ratio B exceeds 1): the real
	// scatter of single coupons about the line, which a back-calculated
	// part carries as well. 0 when the points scatter as stated.
	ExcessVar float64
	// Spread says, for a reference row, what spread was put on it and on
	// what basis ("" otherwise).
	Spread string
}

// D0 returns the pre-exponential factor in m²/s.
func (c Calibration) D0() float64 { return math.Exp(c.LnD0) }

// CalibrationJSON is the wire form of a calibration inside a
// back-calculation or prediction: {"method","source","D0","Q",
// "cov_lnD0_Q","dof","part_var_lnD","excess_var_lnD","spread"}.
type CalibrationJSON struct {
	Method    string        `json:"method"`
	Source    string        `json:"source"`
	D0        float64       `json:"D0"`
	Q         float64       `json:"Q"`
	Cov       [2][2]float64 `json:"cov_lnD0_Q"`
	DOF       int           `json:"dof"`
	PartVar   float64       `json:"part_var_lnD"`
	ExcessVar float64       `json:"excess_var_lnD"`
	Spread    string        `json:"spread,omitempty"`
}

// JSON returns the calibration's wire form.
func (c Calibration) JSON() CalibrationJSON {
	return CalibrationJSON{Method: c.Method, Source: c.Source, D0: c.D0(), Q: c.Q, Cov: c.Cov, DOF: c.DOF,
		PartVar: c.PartVar, ExcessVar: c.ExcessVar, Spread: tempfmt.Plain(c.Spread)}
}

// LnD returns ln D at temperature T (K) and its variance from the
// calibration: Var = Var(ln D0) + x²Var(Q) − 2x Cov(ln D0, Q), x = 1/(RT).
func (c Calibration) LnD(T float64) (lnD, variance float64) {
	x := 1 / (R * T)
	lnD = c.LnD0 - c.Q*x
	variance = c.Cov[0][0] + x*x*c.Cov[1][1] - 2*x*c.Cov[0][1]
	return lnD, math.Max(variance, 0)
}

// D returns D (m²/s) at temperature T (K).
func (c Calibration) D(T float64) float64 {
	l, _ := c.LnD(T)
	return math.Exp(l)
}

// quantile returns the two-sided quantile for the level with the
// calibration's degrees of freedom.
func (c Calibration) quantile(level float64) float64 { return quantile(level, c.DOF) }

// quantileWith returns the two-sided quantile for an answer whose variance
// is vCal from the calibration (with the calibration's dof) plus vObs from
// the part's profile fit (taken as known: a profile has tens of points).
// The Student-t dof is Satterthwaite's effective value
// ν = (vCal + vObs)²/(vCal²/ν_cal) (F. E. Satterthwaite, Biometrics
// Bulletin 2 (1946) 110; from memory), which is ν_cal when the part adds
// nothing and tends to the normal quantile when the part dominates.
func (c Calibration) quantileWith(level, vCal, vObs float64) float64 {
	if c.DOF <= 0 || !(vCal > 0) {
		return quantile(level, 0)
	}
	nu := float64(c.DOF) * (vCal + vObs) * (vCal + vObs) / (vCal * vCal)
	if nu > 1e7 {
		return quantile(level, 0)
	}
	return stats.TwoSided(level, nu)
}

// hasCov reports whether any uncertainty of (ln D0, Q) is known.
func (c Calibration) hasCov() bool { return c.Cov[0][0] > 0 || c.Cov[1][1] > 0 }

// centered returns the calibration as ln D = b − Q·(x − xc) with xc chosen
// so that b and Q are uncorrelated: xc = Cov(ln D0, Q)/Var(Q),
// b = ln D0 − Q·xc, Var(b) = Var(ln D0) − Cov²/Var(Q). Working centred
// avoids the cancellation of the nearly ±1 correlation of ln D0 and Q.
func (c Calibration) centered() (xc, b, vb, vq float64) {
	vq = c.Cov[1][1]
	if vq > 0 {
		xc = c.Cov[0][1] / vq
	}
	b = c.LnD0 - c.Q*xc
	vb = math.Max(c.Cov[0][0]-xc*c.Cov[0][1], 0)
	return xc, b, vb, vq
}

// validate checks that the calibration can be used.
func (c Calibration) validate() error {
	if !finite(c.LnD0) || !finite(c.Q) {
		return badInput(c.Source, "calibration", "D0 and Q must be finite numbers (got ln D0 = %g, Q = %g J/mol)", c.LnD0, c.Q)
	}
	if !(c.Q > 0) {
		return badInput(c.Source, "Q", "Q = %g J/mol is not positive: D would not increase with temperature; give Q in J/mol (e.g. 148000 for 148 kJ/mol)", c.Q)
	}
	v00, v11, v01 := c.Cov[0][0], c.Cov[1][1], c.Cov[0][1]
	if !finite(v00) || !finite(v11) || !finite(v01) || v00 < 0 || v11 < 0 || v01*v01 > v00*v11*(1+1e-9)+1e-300 {
		return badInput(c.Source, "covariance", "the covariance of (ln D0, Q) is not a valid covariance matrix (variances %g, %g, covariance %g)", v00, v11, v01)
	}
	if c.DOF < 0 {
		return badInput(c.Source, "dof", "degrees of freedom %d must be ≥ 0", c.DOF)
	}
	return nil
}

// Explicit builds a calibration from a pre-exponential factor D0 (m²/s)
// and an activation energy Q (J/mol) with optional standard uncertainties
// uD0 (m²/s) and uQ (J/mol) and their correlation corr (−1…1; 0 when
// unknown). Zero uncertainties mean none is known. The covariance is taken
// as known (normal quantiles). Var(ln D0) = (uD0/D0)², first-order.
//
// Handbook uncertainties of D0 and Q are strongly correlated in truth;
// giving them as independent overstates the uncertainty of D inside the
// measured range and is said in the result's warnings by the caller.
func Explicit(D0, uD0, Q, uQ, corr float64) (Calibration, error) {
	if !(D0 > 0) || !finite(D0) {
		return Calibration{}, badInput("", "D0", "D0 = %g m²/s must be a positive number (m²/s; 1 cm²/s = 1e-4 m²/s)", D0)
	}
	if !(uD0 >= 0) || !(uQ >= 0) || !finite(uD0) || !finite(uQ) {
		return Calibration{}, badInput("", "uncertainty", "uncertainties must be ≥ 0 (got u(D0) = %g m²/s, u(Q) = %g J/mol)", uD0, uQ)
	}
	if !(corr >= -1 && corr <= 1) {
		return Calibration{}, badInput("", "correlation", "correlation %g must lie between −1 and 1", corr)
	}
	sl := uD0 / D0
	c := Calibration{LnD0: math.Log(D0), Q: Q, Method: "explicit", Source: "D0 and Q given explicitly"}
	c.Cov[0][0] = sl * sl
	c.Cov[1][1] = uQ * uQ
	c.Cov[0][1] = corr * sl * uQ
	c.Cov[1][0] = c.Cov[0][1]
	if err := c.validate(); err != nil {
		return Calibration{}, err
	}
	return c, nil
}

// quantile returns the two-sided quantile for level: Student-t with dof
// degrees of freedom, or the normal quantile when dof ≤ 0.
func quantile(level float64, dof int) float64 { return stats.T(level, dof) }

func levelOr(level float64) (float64, error) {
	if level == 0 {
		return 0.95, nil
	}
	if !(level > 0 && level < 1) {
		return 0, badInput("", "level", "confidence level %g must lie between 0 and 1 (e.g. 0.95)", level)
	}
	return level, nil
}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

var nan = math.NaN()

// tk marks an absolute temperature (K) in a message; the writer renders
// it in the reader's unit (package internal/tempfmt).
func tk(T float64) string { return tempfmt.Mark(T) }
