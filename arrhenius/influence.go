package arrhenius

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"gonum.org/v1/gonum/stat/distuv"

	"github.com/fickfit/fickfit/fit"
)

// Regression diagnostics of the points of an Arrhenius line: how far each
// point lies from the line through the others, and how much it moves the
// line. For the weighted straight line ln Dᵢ = a − Q·xᵢ, xᵢ = 1/(RTᵢ),
// weights wᵢ (Cook & Weisberg, Residuals and Influence in Regression,
// Chapman & Hall, 1982, ch. 2 and 3; the definitions are those of R's
// hatvalues, rstudent and cooks.distance for a weighted lm, checked against
// an independent numpy computation in testdata/reference/influence.py):
//
//	leverage hᵢ = wᵢ(1/Σw + (xᵢ − x̄)²/Sxx),
//	eᵢ = √wᵢ·(yᵢ − ŷᵢ), s² = Σe²/(n − 2),
//	studentized (deleted) residual tᵢ = eᵢ/(s₍ᵢ₎√(1 − hᵢ)),
//	  s₍ᵢ₎² = (Σe² − eᵢ²/(1 − hᵢ))/(n − 3),
//	Cook's distance Dᵢ = eᵢ²hᵢ/(2s²(1 − hᵢ)²).
//
// tᵢ is also the distance of point i from the line fitted without it, in
// standard errors of that prediction, which is how the warnings say it.

// Influence is the regression diagnostics of one point; NaN where not
// defined (fewer than four points, or a point alone at its abscissa).
type Influence struct {
	Leverage    float64
	Studentized float64
	Cook        float64
	// OutlierP is the Bonferroni-adjusted p-value of the outlier test
	// min(1, 2n·P(t_{n−3} > |tᵢ|)) (Cook & Weisberg 1982, §2.2.2).
	OutlierP float64
}

// Usual range of activation energies of diffusion in metals and alloys at
// heat-treatment temperatures, J/mol. Basis: W. D. Callister & D. G.
// Rethwisch, Materials Science and Engineering: An Introduction, Table 5.2
// "A Tabulation of Diffusion Data" (printed page 150 of the copy seen)
// lists 77 kJ/mol (N in α-Fe) to 461 kJ/mol (Mo self-diffusion); the range
// is widened to 40–600 kJ/mol to cover systems that table does not list
// (common practice, no source). Hydrogen and some fast diffusers lie below.
const (
	qUsualLo = 40e3
	qUsualHi = 600e3
)

// wline is a weighted straight line y = b − q·(x − xc) fitted to points.
type wline struct {
	b, q, xc, sw, sxx, chi2 float64
	n                       int
}

func fitW(x, y, w []float64, skip int) wline {
	var f wline
	var sx, sy float64
	for i := range x {
		if i == skip {
			continue
		}
		f.sw += w[i]
		sx += w[i] * x[i]
		sy += w[i] * y[i]
		f.n++
	}
	f.xc = sx / f.sw
	yc := sy / f.sw
	var sxy float64
	for i := range x {
		if i == skip {
			continue
		}
		dx := x[i] - f.xc
		f.sxx += w[i] * dx * dx
		sxy += w[i] * dx * (y[i] - yc)
	}
	f.q = -sxy / f.sxx
	f.b = yc
	for i := range x {
		if i == skip {
			continue
		}
		r := y[i] - (f.b - f.q*(x[i]-f.xc))
		f.chi2 += w[i] * r * r
	}
	return f
}

// at returns the line's value at x and the variance factor of that value
// (to be multiplied by the residual variance).
func (f wline) at(x float64) (y, v float64) {
	return f.b - f.q*(x-f.xc), 1/f.sw + (x-f.xc)*(x-f.xc)/f.sxx
}

// influence computes the diagnostics of every point (x = 1/(RT), y = ln D,
// weights w).
func influence(x, y, w []float64) []Influence {
	n := len(x)
	out := make([]Influence, n)
	for i := range out {
		out[i] = Influence{Leverage: nan, Studentized: nan, Cook: nan, OutlierP: nan}
	}
	if n < 3 {
		return out
	}
	full := fitW(x, y, w, -1)
	if !(full.sxx > 0) {
		return out
	}
	s2 := full.chi2 / float64(n-2)
	var tdist distuv.StudentsT
	if n > 3 {
		tdist = distuv.StudentsT{Mu: 0, Sigma: 1, Nu: float64(n - 3)}
	}
	for i := range x {
		yh, v := full.at(x[i])
		h := w[i] * v
		e := math.Sqrt(w[i]) * (y[i] - yh)
		out[i].Leverage = h
		if !(1-h > 1e-12) {
			continue
		}
		if s2 > 0 {
			out[i].Cook = e * e * h / (2 * s2 * (1 - h) * (1 - h))
		}
		if n > 3 {
			si2 := (full.chi2 - e*e/(1-h)) / float64(n-3)
			if si2 > 0 {
				t := e / math.Sqrt(si2*(1-h))
				out[i].Studentized = t
				out[i].OutlierP = math.Min(1, float64(2*n)*tdist.Survival(math.Abs(t)))
			}
		}
	}
	return out
}

// unitSlip is a way a temperature may have been written in one unit and
// read in another: from gives the temperature (K) that was meant, and what
// says it in words, for the temperature T (K) as read.
type unitSlip struct {
	meant func(T float64) float64
	what  func(T float64) string
}

func num2(v float64) string {
	s := strconv.FormatFloat(math.Round(v*100)/100, 'f', 2, 64)
	return strings.TrimRight(strings.TrimRight(s, "0"), ".")
}

var unitSlips = []unitSlip{
	{func(T float64) float64 { return T + 273.15 }, func(T float64) string {
		return fmt.Sprintf("%s °C, not %s K", num2(T), num2(T))
	}},
	{func(T float64) float64 { return T - 273.15 }, func(T float64) string {
		return fmt.Sprintf("%s K, not %s °C", num2(T-273.15), num2(T-273.15))
	}},
	{func(T float64) float64 { return (T - 273.15 + 459.67) * 5 / 9 }, func(T float64) string {
		return fmt.Sprintf("%s °F, not %s °C", num2(T-273.15), num2(T-273.15))
	}},
	{func(T float64) float64 { return T*9/5 - 459.67 + 273.15 }, func(T float64) string {
		return fmt.Sprintf("%s °C, not %s °F", num2(T*9/5-459.67), num2(T*9/5-459.67))
	}},
}

// suspects names the points the outlier test flags at level alpha, each
// with its distance from the line through the others and, when reading
// its temperature in another unit puts it on that line, the likely slip.
func suspects(ids []string, T, y, w []float64, inf []Influence, alpha float64) []string {
	n := len(T)
	x := make([]float64, n)
	for i := range T {
		x[i] = 1 / (R * T[i])
	}
	var out []string
	for i := range ids {
		if !(inf[i].OutlierP < alpha) {
			continue
		}
		del := fitW(x, y, w, i)
		s := math.Sqrt(del.chi2 / float64(n-3))
		z := func(xx float64) float64 {
			yh, v := del.at(xx)
			return (y[i] - yh) / (s * math.Sqrt(1/w[i]+v))
		}
		msg := fmt.Sprintf("Profile %s at %s lies %.1f σ off the line through the other points (studentized residual; outlier test with Bonferroni adjustment, %s)",
			ids[i], tk(T[i]), math.Abs(inf[i].Studentized), fmtP(inf[i].OutlierP))
		best, bestZ := -1, math.Inf(1)
		for k, sl := range unitSlips {
			Tm := sl.meant(T[i])
			if !(Tm > coldLimit && Tm <= hotLimit) {
				continue
			}
			if az := math.Abs(z(1 / (R * Tm))); az < bestZ {
				best, bestZ = k, az
			}
		}
		if best >= 0 && bestZ < 3 && bestZ < math.Abs(inf[i].Studentized)/3 {
			sl := unitSlips[best]
			msg += fmt.Sprintf(". At %s it would lie %.1f σ off: was its temperature %s?", tk(sl.meant(T[i])), bestZ, sl.what(T[i]))
		} else {
			msg += ": check its temperature, time and profile fit, and leave it out only for a documented reason."
		}
		out = append(out, msg)
	}
	return out
}

// lineDiagnostics fills the points' influence and returns the warnings on
// suspect points, an unusual Q and an interval of Q reaching below zero.
func (l *Line) lineDiagnostics() []fit.Warning {
	n := len(l.Points)
	ids := make([]string, n)
	T, x, y, w := make([]float64, n), make([]float64, n), make([]float64, n), make([]float64, n)
	for i, p := range l.Points {
		ids[i], T[i], y[i], w[i] = p.ID, p.T, p.LnD, p.Weight
		x[i] = 1 / (R * p.T)
	}
	var ws []fit.Warning
	ok := true
	for _, v := range w {
		ok = ok && v > 0 && finite(v)
	}
	if ok {
		inf := influence(x, y, w)
		for i := range l.Points {
			l.Points[i].Influence = inf[i]
		}
		for _, m := range suspects(ids, T, y, w, inf, 1-l.Level) {
			ws = append(ws, fit.Warning{Code: "suspect-point", Message: m})
		}
	}
	if l.Q < qUsualLo || l.Q > qUsualHi {
		ws = append(ws, fit.Warning{Code: "q-unusual", Message: fmt.Sprintf("Q = %.3g kJ/mol lies outside the range usual for diffusion in metals at heat-treatment temperatures (about %.0f–%.0f kJ/mol: tabulated activation energies run from 77 kJ/mol for nitrogen in α-iron to 461 kJ/mol for molybdenum self-diffusion, Callister & Rethwisch, Table 5.2): look for a mislabelled temperature or time before using this line.", l.Q/1e3, qUsualLo/1e3, qUsualHi/1e3)})
	}
	if ci := l.QCI(); l.HasCI && ci.Lo <= 0 {
		ws = append(ws, fit.Warning{Code: "q-interval-below-zero", Message: fmt.Sprintf("Q's %s interval reaches %s kJ/mol, below zero: these data do not establish that D rises with temperature, and the line must not be used for back-calculation or prediction.", fmtLevel(l.Level), strings.Replace(fmt.Sprintf("%.3g", ci.Lo/1e3), "-", "−", 1))})
	}
	return ws
}

func fmtLevel(level float64) string { return strconv.FormatFloat(100*level, 'g', 4, 64) + " %" }
