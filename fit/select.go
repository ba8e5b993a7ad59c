package fit

import (
	"fmt"
	"math"
	"sort"
	"strings"

	"gonum.org/v1/gonum/stat/distuv"

	"github.com/fickfit/fickfit/internal/jsonx"
	"github.com/fickfit/fickfit/profile"
)

// Candidate is one model tried by SelectModel.
type Candidate struct {
	Model string `json:"model"`
	// Fitted is false when the model was not applicable or its fit gave no
	// answer; Note says why.
	Fitted bool    `json:"fitted"`
	K      int     `json:"k"` // free parameters
	RSS    float64 `json:"rss"`
	AICc   float64 `json:"aicc"`
	// DeltaAICc is AICc minus the smallest AICc among fitted candidates.
	DeltaAICc float64 `json:"delta_aicc"`
	// Weight is the Akaike weight exp(−Δ/2)/Σexp(−Δ/2).
	Weight float64 `json:"akaike_weight"`
	Note   string  `json:"note,omitempty"`
	// Result is the candidate's fit (Wald intervals), nil when not fitted.
	Result *Result `json:"-"`
}

// MarshalJSON writes non-finite numbers as null.
func (c Candidate) MarshalJSON() ([]byte, error) {
	return jsonx.Marshal(struct {
		Model     string   `json:"model"`
		Fitted    bool     `json:"fitted"`
		K         int      `json:"k"`
		RSS       *float64 `json:"rss"`
		AICc      *float64 `json:"aicc"`
		DeltaAICc *float64 `json:"delta_aicc"`
		Weight    *float64 `json:"akaike_weight"`
		Note      string   `json:"note,omitempty"`
	}{c.Model, c.Fitted, c.K, num(c.RSS), num(c.AICc), num(c.DeltaAICc), num(c.Weight), c.Note})
}

// NestedTest is an extra-sum-of-squares F-test of a reduced model against
// a full model that contains it.
type NestedTest struct {
	Reduced string  `json:"reduced"`
	Full    string  `json:"full"`
	F       float64 `json:"F"`
	DF1     int     `json:"df1"`
	DF2     int     `json:"df2"`
	P       float64 `json:"p"`
	Note    string  `json:"note"`
}

// MarshalJSON writes non-finite numbers as null.
func (t NestedTest) MarshalJSON() ([]byte, error) {
	return jsonx.Marshal(struct {
		Reduced string   `json:"reduced"`
		Full    string   `json:"full"`
		F       *float64 `json:"F"`
		DF1     int      `json:"df1"`
		DF2     int      `json:"df2"`
		P       *float64 `json:"p"`
		Note    string   `json:"note"`
	}{t.Reduced, t.Full, num(t.F), t.DF1, t.DF2, num(t.P), t.Note})
}

// Selection is the outcome of SelectModel.
type Selection struct {
	// Chosen is the model with the smallest AICc.
	Chosen string `json:"chosen"`
	// Criterion is "AICc".
	Criterion  string       `json:"criterion"`
	Candidates []Candidate  `json:"candidates"`
	Tests      []NestedTest `json:"tests,omitempty"`
	Notes      []string     `json:"notes,omitempty"`
	// Result is the chosen model refitted with the caller's options
	// (interval method, level…).
	Result *Result `json:"-"`
}

// SelectOptions control SelectModel. The zero value decides the candidates
// from the data.
type SelectOptions struct {
	// Candidates, when not empty, lists the models to try instead of the
	// automatic choice (each must be registered).
	Candidates []string
}

// SelectModel fits every applicable closed-form model to the profile and
// picks the one with the smallest AICc (Burnham & Anderson, Model Selection
// and Multimodel Inference, 2nd ed., 2002, §2.4–2.9: ΔAICc and Akaike
// weights; from memory). Which models apply:
//
//   - the surface models erf, masstransfer and thinfilm whenever the depths
//     do not cross zero;
//   - slab only when the thickness is known (profile or Options.Thickness);
//   - couple when the position axis crosses zero (at least two points on
//     each side: then it is the only candidate, since a surface model needs
//     depths ≥ 0), or when the values step between two plateaus inside the
//     data (both end stretches flat, the half-way crossing in the middle
//     half of the range).
//
// Fixed and freed parameters in o apply to the candidates that have them.
// Candidates are fitted with Wald intervals; the chosen one is refitted
// with o's interval method. For the nested pair erf ⊂ masstransfer (erf is
// the limit β → ∞) an extra-sum-of-squares F-test is reported,
// F = ((RSS_r − RSS_f)/(df_r − df_f)) / (RSS_f/df_f) with p from the F
// distribution (Bates & Watts, Nonlinear Regression Analysis, 1988, §3.5;
// from memory); the null value β = ∞ sits on the boundary of the parameter
// space, so the p-value is approximate, which the test's note says.
//
// When no candidate gives an answer the error wraps ErrNoAnswer and lists
// each model's reason.
func SelectModel(p *profile.Profile, o Options, so SelectOptions) (*Selection, error) {
	if p.Len() == 0 {
		return nil, errAt(p, fmt.Errorf("%w: the profile has no data points", ErrBadInput))
	}
	sel := &Selection{Criterion: "AICc"}
	names := so.Candidates
	if len(names) == 0 {
		names = sel.applicable(p, o)
	}
	best := -1
	for _, name := range names {
		c := Candidate{Model: name, RSS: math.NaN(), AICc: math.NaN(), DeltaAICc: math.NaN(), Weight: math.NaN()}
		m, err := NewModel(name)
		if err != nil {
			return nil, errAt(p, err)
		}
		oc := forModel(o, m)
		oc.CI = CIWald
		r, err := FitModel(p, m, oc)
		if err != nil {
			c.Note = trimProfilePrefix(err.Error())
			sel.Candidates = append(sel.Candidates, c)
			continue
		}
		c.Fitted, c.Result = true, r
		c.K, c.RSS, c.AICc = len(r.FreeNames), r.Stats.RSS, r.Stats.AICc
		sel.Candidates = append(sel.Candidates, c)
		if finite(c.AICc) && (best < 0 || c.AICc < sel.Candidates[best].AICc) {
			best = len(sel.Candidates) - 1
		}
	}
	if best < 0 {
		var why []string
		for _, c := range sel.Candidates {
			why = append(why, c.Model+": "+c.Note)
		}
		return nil, errAt(p, fmt.Errorf("%w: no model could be fitted (%s)", ErrNoAnswer, strings.Join(why, "; ")))
	}
	var wsum float64
	for i := range sel.Candidates {
		c := &sel.Candidates[i]
		if c.Fitted && finite(c.AICc) {
			c.DeltaAICc = c.AICc - sel.Candidates[best].AICc
			c.Weight = math.Exp(-c.DeltaAICc / 2)
			wsum += c.Weight
		}
	}
	for i := range sel.Candidates {
		if c := &sel.Candidates[i]; finite(c.Weight) {
			c.Weight /= wsum
		}
	}
	sel.Chosen = sel.Candidates[best].Model
	for _, c := range sel.Candidates {
		if c.Fitted && c.Model != sel.Chosen && c.DeltaAICc < 2 {
			sel.Notes = append(sel.Notes, fmt.Sprintf("%s is within 2 AICc units of %s (Δ = %.2f): the data hardly prefer one over the other; choose by the physics of the treatment.", c.Model, sel.Chosen, c.DeltaAICc))
		}
	}
	if t, ok := sel.nested("erf", "masstransfer"); ok {
		sel.Tests = append(sel.Tests, t)
	}

	m, _ := NewModel(sel.Chosen)
	r, err := FitModel(p, m, forModel(o, m))
	if err != nil {
		return nil, err
	}
	sel.Result = r
	return sel, nil
}

// applicable decides the candidates from the data and notes why: the
// registered models marked InAuto, in Rank order; only the Couple ones
// when the positions cross zero; each one's Applies rule otherwise.
func (sel *Selection) applicable(p *profile.Profile, o Options) []string {
	var neg, pos int
	for _, x := range p.Depth {
		switch {
		case x < 0:
			neg++
		case x > 0:
			pos++
		}
	}
	crossing := neg >= 2 && pos >= 2
	thick := p.Thickness
	if o.Thickness > 0 {
		thick = o.Thickness
	}
	var names, couples []string
	for _, in := range Models() {
		if !in.InAuto {
			continue
		}
		if in.Couple {
			couples = append(couples, in.Name)
		}
		if crossing {
			continue
		}
		if in.Applies != nil {
			ok, note := in.Applies(&Data{X: p.Depth, Y: p.Value, Thickness: thick})
			if note != "" {
				sel.Notes = append(sel.Notes, note)
			}
			if !ok {
				continue
			}
		}
		names = append(names, in.Name)
	}
	if crossing {
		sel.Notes = append(sel.Notes, fmt.Sprintf("The positions cross zero (%d points below, %d above): the profile is treated as a diffusion couple; the surface models need depths ≥ 0.", neg, pos))
		return couples
	}
	return names
}

// interiorStep reports whether depth-ordered values step between two flat
// ends with the half-way crossing in the middle half of the range: the
// shape of a diffusion couple scanned on an all-positive axis, not of a
// profile from a surface (whose steepest part is at the surface). The
// thresholds (ends within 20 % of the step over the first and last eighth
// of the points, at least 2 each) are common practice, no source.
func interiorStep(depth, value []float64) bool {
	n := len(depth)
	if n < 8 || len(value) != n {
		return false
	}
	x, y := sortedByDepth(&Data{X: depth, Y: value})
	left, right := levels(y)
	step := right - left
	span := x[n-1] - x[0]
	if step == 0 || !(span > 0) {
		return false
	}
	xc := crossing(x, y, (left+right)/2)
	if f := (xc - x[0]) / span; !(f >= 0.25 && f <= 0.75) {
		return false
	}
	k := n / 8
	if k < 2 {
		k = 2
	}
	for i := 0; i < k; i++ {
		if math.Abs(y[i]-left) > 0.2*math.Abs(step) || math.Abs(y[n-1-i]-right) > 0.2*math.Abs(step) {
			return false
		}
	}
	return true
}

// nested runs the extra-sum-of-squares F-test of reduced ⊂ full when both
// candidates were tried.
func (sel *Selection) nested(reduced, full string) (NestedTest, bool) {
	var r, f *Candidate
	for i := range sel.Candidates {
		switch sel.Candidates[i].Model {
		case reduced:
			r = &sel.Candidates[i]
		case full:
			f = &sel.Candidates[i]
		}
	}
	if r == nil || f == nil || !r.Fitted {
		return NestedTest{}, false
	}
	t := NestedTest{Reduced: reduced, Full: full, F: math.NaN(), P: math.NaN()}
	if !f.Fitted {
		t.Note = fmt.Sprintf("%s gave no answer (%s): with these data the surface resistance is not resolved, which is consistent with %s.", full, f.Note, reduced)
		return t, true
	}
	n := r.Result.Stats.N
	t.F, t.DF1, t.DF2, t.P = extraSumF(r.RSS, n-r.K, f.RSS, n-f.K)
	t.Note = "β = ∞ (the erf model) lies on the boundary of masstransfer's parameter space, so the F reference distribution is approximate (Self & Liang, J. Am. Stat. Assoc. 82, 605–610, 1987; from memory); a small p says the surface resistance is resolved."
	return t, true
}

// extraSumF returns the extra-sum-of-squares F statistic of a reduced
// model (rssR, dfR residual degrees of freedom) against a full one, and
// its p-value P(F_{df1,df2} ≥ F). A full fit worse than the reduced one
// (a local minimum) gives F = 0, p = 1.
func extraSumF(rssR float64, dfR int, rssF float64, dfF int) (F float64, df1, df2 int, p float64) {
	df1, df2 = dfR-dfF, dfF
	if df1 <= 0 || df2 <= 0 || !(rssF > 0) {
		return math.NaN(), df1, df2, math.NaN()
	}
	F = (rssR - rssF) / float64(df1) / (rssF / float64(df2))
	if F < 0 {
		F = 0
	}
	return F, df1, df2, distuv.F{D1: float64(df1), D2: float64(df2)}.Survival(F)
}

// forModel keeps the fixed and freed parameters of o that model m has.
func forModel(o Options, m Model) Options {
	has := map[string]bool{}
	for _, pa := range m.Params() {
		has[strings.ToLower(pa.Name)] = true
	}
	oc := o
	oc.Model, oc.Custom = m.Name(), nil
	oc.Fixed = map[string]float64{}
	keys := make([]string, 0, len(o.Fixed))
	for k := range o.Fixed {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	for _, k := range keys {
		if has[strings.ToLower(strings.TrimSpace(k))] {
			oc.Fixed[k] = o.Fixed[k]
		}
	}
	oc.Free = nil
	for _, k := range o.Free {
		if has[strings.ToLower(strings.TrimSpace(k))] {
			oc.Free = append(oc.Free, k)
		}
	}
	return oc
}

// trimProfilePrefix drops the "profile X: " prefix that FitModel adds, for
// notes that already sit under the profile.
func trimProfilePrefix(s string) string {
	if strings.HasPrefix(s, "profile ") {
		if i := strings.Index(s, ": "); i > 0 {
			return s[i+2:]
		}
	}
	return s
}
