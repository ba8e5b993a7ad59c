package arrhenius

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat/distuv"

	"github.com/fickfit/fickfit/fit"
	"github.com/fickfit/fickfit/internal/jsonx"
	"github.com/fickfit/fickfit/internal/stats"
	"github.com/fickfit/fickfit/internal/tempfmt"
)

// CompareOptions control a lot comparison. The zero value groups by lot,
// compares every lot with the first one met, at the temperature where the
// data are centred, with 95 % intervals and a 5 % significance level.
type CompareOptions struct {
	// Options: Level, TemperatureSigma, NoBirge, ColdOK as for TwoStage.
	Options
	// By is the grouping column; "" means "lot".
	By string
	// Reference is the group the others are compared with; "" means the
	// first group met.
	Reference string
	// TRef is the temperature (K) of the D ratio; 0 means the temperature
	// at the weighted centre of 1/T of all points.
	TRef float64
	// Alpha is the significance level of the verdict; 0 means 1 − Level.
	Alpha float64
}

// FTest is one extra-sum-of-squares F-test between nested weighted
// Arrhenius regressions: F = ((S_r − S_f)/df1)/(S_f,full/df2), with the
// denominator from the most general model fitted (Draper & Smith, Applied
// Regression Analysis, 3rd ed., 1998, §6.x, extra sum of squares; section
// from memory).
type FTest struct {
	// Name is "separate-vs-common" (separate lines vs one common line),
	// "common-Q-vs-common" (separate D0 with a shared Q vs one line) or
	// "separate-vs-common-Q" (separate Q given separate D0).
	Name        string  `json:"test"`
	Description string  `json:"description"`
	F           float64 `json:"F"`
	DF1         int     `json:"df1"`
	DF2         int     `json:"df2"`
	P           float64 `json:"p"`
	// RSSReduced and RSSFull are the weighted residual sums of squares.
	RSSReduced float64 `json:"rss_reduced"`
	RSSFull    float64 `json:"rss_full"`
}

// Ratio is the ratio of D of one group to D of the reference group at TRef.
type Ratio struct {
	Group     string       `json:"group"`
	Reference string       `json:"reference"`
	TRef      float64      `json:"temperature_K"`
	Value     float64      `json:"value"`
	CI        fit.Interval `json:"ci"`
	// P is the two-sided p-value of the Wald t-test of ratio = 1.
	P float64 `json:"p"`
	// Model is "separate lines" or "common Q" (when a group has a single
	// temperature and cannot have its own line).
	Model string `json:"model"`
}

// Pair compares two groups at TRef: the ratio of D of B to D of A, its
// interval at the comparison's level, the two-sided p-value of the Wald
// t-test of ratio = 1 and the p-value adjusted for the number of pairs by
// Holm's step-down method. Differ tells whether the adjusted p-value is
// below the comparison's Alpha. The interval is that of the pair alone
// (not simultaneous); the adjustment is for the decision.
type Pair struct {
	A, B      string
	TRef      float64
	Ratio     float64
	CI        fit.Interval
	P         float64
	PAdjusted float64
	Differ    bool
	// Model is "separate lines" or "common Q", as for Ratio.
	Model string
}

// Comparison is the result of Compare.
type Comparison struct {
	By      string   `json:"by"`
	Groups  []string `json:"groups"`
	NPoints []int    `json:"n_points"`
	Tests   []FTest  `json:"tests"`
	Ratios  []Ratio  `json:"ratios"`
	// Pairs compares every pair of groups when there are three or more
	// (nil for two groups, whose one pair is Ratios[0]).
	Pairs []Pair `json:"pairs,omitempty"`
	// Differ tells whether the main test rejects "one common line" at
	// Alpha. With three or more groups it says that not all groups share a
	// line, not which differ: see Pairs.
	Differ  bool    `json:"differ"`
	PMain   float64 `json:"p"`
	Alpha   float64 `json:"alpha"`
	Level   float64 `json:"ci_level"`
	Verdict string  `json:"verdict"`
	// Scale is the factor applied to the covariance of the ratio (squared
	// Birge ratio of the most general model when above 1).
	Scale    float64       `json:"scale"`
	Warnings []fit.Warning `json:"warnings"`
}

// design is a weighted linear model y = Xβ, fitted by least squares.
type design struct {
	beta []float64
	cov  *mat.SymDense // (XᵀWX)⁻¹
	rss  float64
	p    int
}

// wlsFit fits y = Xβ with weights w by the normal equations on a matrix
// whose columns are scaled to unit norm (rows × cols, row-major).
func wlsFit(X []float64, rows, cols int, y, w []float64) (*design, bool) {
	sc := make([]float64, cols)
	for j := 0; j < cols; j++ {
		var s float64
		for i := 0; i < rows; i++ {
			s += w[i] * X[i*cols+j] * X[i*cols+j]
		}
		if !(s > 0) {
			return nil, false
		}
		sc[j] = 1 / math.Sqrt(s)
	}
	a := mat.NewSymDense(cols, nil)
	rhs := mat.NewVecDense(cols, nil)
	for i := 0; i < rows; i++ {
		for j := 0; j < cols; j++ {
			xj := X[i*cols+j] * sc[j]
			rhs.SetVec(j, rhs.AtVec(j)+w[i]*xj*y[i])
			for k := 0; k <= j; k++ {
				a.SetSym(j, k, a.At(j, k)+w[i]*xj*X[i*cols+k]*sc[k])
			}
		}
	}
	var ch mat.Cholesky
	if !ch.Factorize(a) {
		return nil, false
	}
	var b mat.VecDense
	if err := ch.SolveVecTo(&b, rhs); err != nil {
		return nil, false
	}
	var inv mat.SymDense
	if err := ch.InverseTo(&inv); err != nil {
		return nil, false
	}
	d := &design{beta: make([]float64, cols), cov: mat.NewSymDense(cols, nil), p: cols}
	for j := 0; j < cols; j++ {
		d.beta[j] = b.AtVec(j) * sc[j]
		for k := 0; k <= j; k++ {
			d.cov.SetSym(j, k, inv.At(j, k)*sc[j]*sc[k])
		}
	}
	for i := 0; i < rows; i++ {
		f := 0.0
		for j := 0; j < cols; j++ {
			f += X[i*cols+j] * d.beta[j]
		}
		r := y[i] - f
		d.rss += w[i] * r * r
	}
	return d, true
}

// Compare tests whether groups (lots) of points follow one Arrhenius line,
// with weighted regressions consistent with TwoStage: weights
// 1/(Var ln Dᵢ + (Q/(RTᵢ²))²σ_Tᵢ²) with Q of the common line, the same in
// every model so that the models are nested. Three models: one common line
// (2 parameters), a common Q with separate D0 (G + 1), separate lines (2G).
// The main test is separate vs common when every group has two or more
// temperatures, else common-Q vs common.
//
// The ratio of D of each group to the reference group at TRef comes from
// the separate lines (else from the common-Q model), with a Wald interval
// on its log; as in TwoStage, the covariance is scaled by the full model's
// squared Birge ratio when above 1, with Student-t quantiles on its
// residual degrees of freedom, else normal quantiles.
func Compare(pts []Point, o *CompareOptions) (*Comparison, error) {
	var co CompareOptions
	if o != nil {
		co = *o
	}
	opt, err := co.Options.defaults()
	if err != nil {
		return nil, err
	}
	by := strings.TrimSpace(co.By)
	if by == "" {
		by = "lot"
	}
	alpha := co.Alpha
	if alpha == 0 {
		alpha = 1 - opt.Level
	}
	if !(alpha > 0 && alpha < 1) {
		return nil, badInput("", "alpha", "significance level %g must lie between 0 and 1 (e.g. 0.05)", alpha)
	}
	names, groups, err := GroupPoints(pts, by)
	if err != nil {
		return nil, err
	}
	G := len(groups)
	if G < 2 {
		return nil, badInput("", by, "all points belong to one %s (%q): a comparison needs two or more", by, names[0])
	}
	// The common line gives the weights (and checks the inputs).
	common, err := TwoStage(pts, &Options{Level: opt.Level, TemperatureSigma: opt.TemperatureSigma, ColdOK: opt.ColdOK, MaxIter: opt.MaxIter, Tol: opt.Tol})
	if err != nil {
		return nil, err
	}
	ref := 0
	if co.Reference != "" {
		ref = -1
		for i, n := range names {
			if n == co.Reference {
				ref = i
			}
		}
		if ref < 0 {
			return nil, badInput(co.Reference, by, "no such %s among the points (%s)", by, strings.Join(names, ", "))
		}
	}
	// Points in group order, weights and centred, scaled x.
	var x, y, w []float64
	var gi []int
	c := &Comparison{By: by, Groups: names, Alpha: alpha, Level: opt.Level, Warnings: []fit.Warning{}}
	sepOK := true
	for g, grp := range groups {
		c.NPoints = append(c.NPoints, len(grp))
		T := make([]float64, len(grp))
		for k, p := range grp {
			sT := p.SigmaT
			if sT == 0 {
				sT = opt.TemperatureSigma
			}
			gq := common.Q / (R * p.T * p.T)
			x = append(x, 1/(R*p.T))
			y = append(y, p.LnD)
			w = append(w, 1/(p.VarLnD+gq*gq*sT*sT))
			gi = append(gi, g)
			T[k] = p.T
		}
		if distinctTemperatures(T) < 2 {
			sepOK = false
		}
	}
	n := len(x)
	var sw, swx float64
	for i := range x {
		sw += w[i]
		swx += w[i] * x[i]
	}
	xm := swx / sw
	var sxx float64
	for i := range x {
		sxx += w[i] * (x[i] - xm) * (x[i] - xm)
	}
	xs := math.Sqrt(sxx / sw) // weighted spread of x, for conditioning
	u := make([]float64, n)
	for i := range x {
		u[i] = (x[i] - xm) / xs
	}
	tref := co.TRef
	if tref == 0 {
		tref = 1 / (R * xm)
	}
	if err := checkTemperatures([]string{"reference temperature"}, []string{""}, []float64{tref}, opt.ColdOK); err != nil {
		return nil, err
	}
	uref := (1/(R*tref) - xm) / xs

	// Model 0: one line [1, u]; model 1: [group indicators, u];
	// model 2: [indicators, u·indicators].
	build := func(cols int, row func(i int, r []float64)) *design {
		X := make([]float64, n*cols)
		for i := 0; i < n; i++ {
			row(i, X[i*cols:(i+1)*cols])
		}
		d, ok := wlsFit(X, n, cols, y, w)
		if !ok {
			return nil
		}
		return d
	}
	m0 := build(2, func(i int, r []float64) { r[0], r[1] = 1, u[i] })
	m1 := build(G+1, func(i int, r []float64) { r[gi[i]], r[G] = 1, u[i] })
	var m2 *design
	if sepOK {
		m2 = build(2*G, func(i int, r []float64) { r[gi[i]], r[G+gi[i]] = 1, u[i] })
	}
	if m0 == nil || m1 == nil || (sepOK && m2 == nil) {
		return nil, noAnswer("", "comparison", "the regressions cannot be solved (the temperatures do not separate the groups' lines)")
	}
	full, dfFull := m1, n-G-1
	if m2 != nil {
		full, dfFull = m2, n-2*G
	}
	if !sepOK {
		c.Warnings = append(c.Warnings, fit.Warning{Code: "no-separate-lines", Message: fmt.Sprintf("At least one %s has a single temperature, so it cannot have its own line: only a shared Q with separate D0 is tested, and the D ratio assumes a common Q.", by)})
	}
	if dfFull <= 0 {
		return nil, badInput("", "points", "%d points leave no degrees of freedom for the most general model (%d parameters): add profiles", n, n-dfFull)
	}
	ftest := func(name, desc string, red, fl *design, dfFull int) FTest {
		df1 := fl.p - red.p
		s2 := full.rss / float64(dfFull)
		F := math.Max(red.rss-fl.rss, 0) / float64(df1) / s2
		return FTest{Name: name, Description: desc, F: F, DF1: df1, DF2: dfFull,
			P: distuv.F{D1: float64(df1), D2: float64(dfFull)}.Survival(F), RSSReduced: red.rss, RSSFull: fl.rss}
	}
	if m2 != nil {
		c.Tests = append(c.Tests, ftest("separate-vs-common", "separate Arrhenius lines against one common line", m0, m2, dfFull))
	}
	c.Tests = append(c.Tests, ftest("common-Q-vs-common", "common Q with separate D0 against one common line", m0, m1, dfFull))
	if m2 != nil {
		c.Tests = append(c.Tests, ftest("separate-vs-common-Q", "separate Q against a common Q (each with its own D0)", m1, m2, dfFull))
	}
	c.PMain = c.Tests[0].P
	c.Differ = c.PMain < alpha

	// Ratios at TRef: ln D_g(uref) − ln D_ref(uref).
	c.Scale = 1
	if b2 := full.rss / float64(dfFull); !opt.NoBirge && b2 > 1 {
		c.Scale = b2
	}
	k := quantile(opt.Level, 0)
	if c.Scale > 1 {
		k = quantile(opt.Level, dfFull)
	}
	tdist := distuv.StudentsT{Mu: 0, Sigma: 1, Nu: float64(dfFull)}
	model := "separate lines"
	if m2 == nil {
		model = "common Q"
	}
	// contrast returns ln D_g − ln D_h at uref, its interval and p-value.
	contrast := func(g, h int) (est float64, ci fit.Interval, p float64) {
		cv := make([]float64, full.p)
		if m2 != nil {
			cv[g], cv[G+g] = 1, uref
			cv[h], cv[G+h] = -1, -uref
		} else {
			cv[g], cv[h] = 1, -1
		}
		var v float64
		for a := range cv {
			est += cv[a] * full.beta[a]
			for b := range cv {
				v += cv[a] * full.cov.At(a, b) * cv[b]
			}
		}
		se := math.Sqrt(v * c.Scale)
		p = 2 * tdist.Survival(math.Abs(est)/se)
		return est, fit.Interval{Lo: math.Exp(est - k*se), Hi: math.Exp(est + k*se)}, p
	}
	for g := range names {
		if g == ref {
			continue
		}
		est, ci, p := contrast(g, ref)
		c.Ratios = append(c.Ratios, Ratio{Group: names[g], Reference: names[ref], TRef: tref, Value: math.Exp(est),
			CI: ci, P: p, Model: model})
	}
	if G >= 3 {
		var ps []float64
		for a := 0; a < G; a++ {
			for b := a + 1; b < G; b++ {
				est, ci, p := contrast(b, a)
				c.Pairs = append(c.Pairs, Pair{A: names[a], B: names[b], TRef: tref, Ratio: math.Exp(est), CI: ci, P: p, Model: model})
				ps = append(ps, p)
			}
		}
		for i, pa := range stats.Holm(ps) {
			c.Pairs[i].PAdjusted = pa
			c.Pairs[i].Differ = pa < alpha
		}
	}
	c.Verdict = c.verdict(names[ref])
	return c, nil
}

// fmtP writes a p-value for people.
func fmtP(p float64) string {
	if p < 0.001 {
		return "p < 0.001"
	}
	return fmt.Sprintf("p = %.2g", p)
}

// fmtRatio writes a ratio and its interval with the digits the interval
// supports: the smaller half-width to two significant digits, the value
// and the ends at the same decimal place ("1.001", "0.951–1.053").
func fmtRatio(v float64, ci fit.Interval) (value, interval string) {
	h := math.Min(math.Abs(v-ci.Lo), math.Abs(ci.Hi-v))
	dec := 2
	if h > 0 && !math.IsInf(h, 0) && !math.IsNaN(h) {
		dec = 1 - int(math.Floor(math.Log10(h)))
	}
	dec = min(max(dec, 1), 6)
	f := func(x float64) string { return strconv.FormatFloat(x, 'f', dec, 64) }
	return f(v), f(ci.Lo) + "–" + f(ci.Hi)
}

// joinAnd writes "A", "A and B", "A, B and C".
func joinAnd(s []string) string {
	switch len(s) {
	case 0:
		return ""
	case 1:
		return s[0]
	}
	return strings.Join(s[:len(s)-1], ", ") + " and " + s[len(s)-1]
}

// verdict writes the plain-language conclusion. Temperatures are marks
// (internal/tempfmt): the writers render them in the reader's unit.
func (c *Comparison) verdict(ref string) string {
	var b strings.Builder
	r := []rune(c.By)
	label := strings.ToUpper(string(r[:1])) + string(r[1:]) + "s"
	list := joinAnd(c.Groups)
	pct := fmt.Sprintf("%.3g %%", 100*c.Level)
	if len(c.Groups) >= 3 && len(c.Pairs) > 0 {
		return c.verdictPairs(label, list, pct)
	}
	if c.Differ {
		fmt.Fprintf(&b, "%s %s differ (%s)", label, list, fmtP(c.PMain))
	} else {
		fmt.Fprintf(&b, "No significant difference between %s %s at the %.3g %% level (%s)", strings.ToLower(label), list, 100*c.Alpha, fmtP(c.PMain))
	}
	for i, r := range c.Ratios {
		sep := ": "
		if i > 0 {
			sep = "; "
		}
		v, iv := fmtRatio(r.Value, r.CI)
		fmt.Fprintf(&b, "%sD of %s is %s times D of %s at %s (%s CI %s)", sep, r.Group, v, ref, tk(r.TRef), pct, iv)
	}
	b.WriteString(".")
	if !c.Differ {
		b.WriteString(" This does not show that they are equal: the interval says how large a difference the data still allow.")
	}
	return b.String()
}

// verdictPairs writes the conclusion for three or more groups: the
// overall test, then every pair in words with its Holm-adjusted p-value.
func (c *Comparison) verdictPairs(label, list, pct string) string {
	var b strings.Builder
	if c.Differ {
		fmt.Fprintf(&b, "%s %s do not all follow one Arrhenius line (overall F-test, %s).", label, list, fmtP(c.PMain))
	} else {
		fmt.Fprintf(&b, "No significant difference among %s %s at the %.3g %% level (overall F-test, %s).", strings.ToLower(label), list, 100*c.Alpha, fmtP(c.PMain))
	}
	fmt.Fprintf(&b, " Pair by pair at %s, p-values adjusted for %d comparisons (Holm): ", tk(c.Pairs[0].TRef), len(c.Pairs))
	var differ []string
	for i, p := range c.Pairs {
		if i > 0 {
			b.WriteString("; ")
		}
		v, iv := fmtRatio(p.Ratio, p.CI)
		adj := "adjusted " + fmtP(p.PAdjusted)
		if p.Differ {
			differ = append(differ, p.A+"–"+p.B)
			fmt.Fprintf(&b, "%s and %s differ (D of %s is %s times D of %s, %s CI %s, %s)", p.A, p.B, p.B, v, p.A, pct, iv, adj)
		} else {
			fmt.Fprintf(&b, "%s and %s: no significant difference (D ratio %s/%s %s, %s CI %s, %s)", p.A, p.B, p.B, p.A, v, pct, iv, adj)
		}
	}
	b.WriteString(".")
	switch {
	case c.Differ && len(differ) == 0:
		b.WriteString(" No single pair differs significantly after the adjustment: the lines may differ in slope rather than at this temperature, or the data cannot tell which group departs.")
	case !c.Differ && len(differ) > 0:
		b.WriteString(" The overall test and the pairs disagree: treat the difference as unconfirmed.")
	}
	if len(differ) < len(c.Pairs) {
		b.WriteString(" No significant difference does not show that two groups are equal: the interval says how large a difference the data still allow.")
	}
	return b.String()
}

// FTestJSON is the wire form of an FTest; undefined numbers are null.
type FTestJSON struct {
	Name        string   `json:"test"`
	Description string   `json:"description"`
	F           *float64 `json:"F"`
	DF1         int      `json:"df1"`
	DF2         int      `json:"df2"`
	P           *float64 `json:"p"`
	RSSReduced  float64  `json:"rss_reduced"`
	RSSFull     float64  `json:"rss_full"`
}

// RatioJSON is the wire form of a Ratio; an undefined p is null.
type RatioJSON struct {
	Group     string       `json:"group"`
	Reference string       `json:"reference"`
	TRef      float64      `json:"temperature_K"`
	Value     float64      `json:"value"`
	CI        fit.Interval `json:"ci"`
	P         *float64     `json:"p"`
	Model     string       `json:"model"`
}

// PairJSON is the wire form of a Pair: {a, b, temperature_K, ratio, ci,
// p, p_adjusted, differ, model}.
type PairJSON struct {
	A         string       `json:"a"`
	B         string       `json:"b"`
	TRef      float64      `json:"temperature_K"`
	Ratio     float64      `json:"ratio"`
	CI        fit.Interval `json:"ci"`
	P         *float64     `json:"p"`
	PAdjusted *float64     `json:"p_adjusted"`
	Differ    bool         `json:"differ"`
	Model     string       `json:"model"`
}

// ComparisonJSON is the wire form of a Comparison. It has no MarshalJSON
// of its own, so that a document can embed it beside keys of its own.
type ComparisonJSON struct {
	By       string        `json:"by"`
	Groups   []string      `json:"groups"`
	NPoints  []int         `json:"n_points"`
	Tests    []FTestJSON   `json:"tests"`
	Ratios   []RatioJSON   `json:"ratios"`
	Pairs    []PairJSON    `json:"pairs,omitempty"`
	Differ   bool          `json:"differ"`
	PMain    *float64      `json:"p"`
	Alpha    float64       `json:"alpha"`
	Level    float64       `json:"ci_level"`
	Verdict  string        `json:"verdict"`
	Scale    float64       `json:"scale"`
	Warnings []fit.Warning `json:"warnings"`
}

// JSON returns the comparison's wire form: undefined numbers null,
// tests, ratios and warnings [] when empty.
func (c Comparison) JSON() ComparisonJSON {
	out := ComparisonJSON{By: c.By, Groups: c.Groups, NPoints: c.NPoints, Differ: c.Differ, PMain: num(c.PMain),
		Alpha: c.Alpha, Level: c.Level, Verdict: tempfmt.Plain(c.Verdict), Scale: c.Scale, Warnings: c.Warnings,
		Tests: []FTestJSON{}, Ratios: []RatioJSON{}}
	for _, t := range c.Tests {
		out.Tests = append(out.Tests, FTestJSON{t.Name, t.Description, num(t.F), t.DF1, t.DF2, num(t.P), t.RSSReduced, t.RSSFull})
	}
	for _, r := range c.Ratios {
		out.Ratios = append(out.Ratios, RatioJSON{r.Group, r.Reference, r.TRef, r.Value, r.CI, num(r.P), r.Model})
	}
	for _, p := range c.Pairs {
		out.Pairs = append(out.Pairs, PairJSON{p.A, p.B, p.TRef, p.Ratio, p.CI, num(p.P), num(p.PAdjusted), p.Differ, p.Model})
	}
	if out.Warnings == nil {
		out.Warnings = []fit.Warning{}
	}
	return out
}

// MarshalJSON writes the comparison's wire form (JSON).
func (c Comparison) MarshalJSON() ([]byte, error) { return jsonx.Marshal(c.JSON()) }
