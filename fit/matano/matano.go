// Package matano extracts a concentration-dependent diffusivity D(C) from
// the profile of a diffusion couple (two bodies of different composition
// joined and annealed), by the Boltzmann–Matano and Sauer–Freise analyses.
//
// Both rest on the Boltzmann transformation λ = x/√t, valid for an infinite
// couple with D depending on C alone and fixed end compositions. The
// measured profile is first replaced by a smooth monotone curve (a sum of
// error functions, see Smooth), whose slope and integrals are then exact.
//
// The confidence band is a seeded residual bootstrap of the whole procedure
// (B. Efron, "Estimation and accuracy after model selection", J. Amer.
// Statist. Assoc. 109 (2014) 991–1007): each replicate repeats the starts,
// the fits adding one term at a time, the admissibility rules and the
// choice of the number of terms, so the band holds the smoother's own
// uncertainty and not only the scatter of the points around one fixed
// curve. The number of terms is chosen one above the AICc optimum so that
// the smoother's bias is small against the band (see pipeline.run).
// Self-check by simulation (TestBandCoverage): over 200 couples computed by
// the Crank–Nicolson solver with exponential and tabulated D(C), the 95 %
// band held the true D at 94.5 % of the levels between 10 % and 90 % of
// the range (the test requires ≥ 90 %).
package matano

import (
	"encoding/json"
	"fmt"
	"math"
	"math/rand/v2"
	"runtime"
	"sort"
	"strings"

	"github.com/fickfit/fickfit/fit"
	"github.com/fickfit/fickfit/internal/parallel"
	"github.com/fickfit/fickfit/internal/stats"
	"github.com/fickfit/fickfit/profile"
)

// Method names, as written in Result.Method and accepted in Options.Method.
const (
	BoltzmannMatano = "boltzmann-matano"
	SauerFreise     = "sauer-freise"
)

// Options control an analysis. The zero value runs Boltzmann–Matano at 19
// levels between the end compositions, the number of smoother terms chosen
// from the data, with a 95 % bootstrap band of 1000 replicates, seed 0.
type Options struct {
	// Method is BoltzmannMatano (the default when "") or SauerFreise.
	Method string
	// Concentrations are the levels (profile unit) at which D is wanted;
	// nil means 5 %, 10 %, …, 95 % of the way from CL to CR (the fitted
	// end compositions).
	Concentrations []float64
	// Terms fixes the number of erf terms of the smoother, 1 to 8 (the
	// profile needs at least 3·Terms + 5 points); every bootstrap replicate
	// uses the same number. 0 chooses it from the data: AICc among 1 to
	// MaxTerms terms, then one term more when the data support it (see
	// pipeline.run), repeated on every replicate.
	Terms int
	// MaxTerms is the largest number of terms tried when Terms is 0, 1 to
	// 8; 0 means 5.
	MaxTerms int
	// Level is the confidence level of the band; 0 means 0.95.
	Level float64
	// Resamples is the number of bootstrap replicates; 0 means 1000; a
	// negative value gives no band (ci null).
	Resamples int
	// Seed seeds the bootstrap: replicate b draws from PCG(Seed, b), so the
	// band does not depend on the number of workers.
	Seed uint64
	// Workers is the number of goroutines for the bootstrap; 0 means
	// runtime.GOMAXPROCS(0).
	Workers int
}

// resolution is the number of point spacings below which the local length
// of the profile, |CR − CL|/|dC/dx|, counts as under-resolved. Self-check
// on 24 simulated couples with 60 points and 0.5 % scatter whose D rises
// ×30: at 10–40 % of the range, where that length is 4.7–6 spacings, the
// 95 % band held the true D at 58 of 96 levels; with 120 points (twice the
// length) at 86 of 96. Where it is 7.8 spacings or more (D rising ×10) the
// bands held 95 %.
const resolution = 7

// Point is D at one concentration, with its bootstrap interval.
type Point struct {
	C  float64      // concentration, profile unit
	D  float64      // m²/s; NaN (null in JSON) where it cannot be evaluated
	CI fit.Interval // bootstrap percentile interval; open ends are null
}

// MarshalJSON writes {"C", "D", "ci"} with null for a non-finite D.
func (p Point) MarshalJSON() ([]byte, error) {
	return json.Marshal(struct {
		C  float64      `json:"C"`
		D  *float64     `json:"D"`
		CI fit.Interval `json:"ci"`
	}{p.C, num(p.D), p.CI})
}

// UnmarshalJSON reads null D as NaN.
func (p *Point) UnmarshalJSON(b []byte) error {
	var v struct {
		C  float64      `json:"C"`
		D  *float64     `json:"D"`
		CI fit.Interval `json:"ci"`
	}
	if err := json.Unmarshal(b, &v); err != nil {
		return err
	}
	p.C, p.CI, p.D = v.C, v.CI, math.NaN()
	if v.D != nil {
		p.D = *v.D
	}
	return nil
}

// Result is D(C) from one couple. Its JSON form is
//
//	{"id", "method", "matano_plane_m", "points": [{"C", "D", "ci": [lo, hi]}], "warnings": [{"code", "message"}]}
//
// with D in m²/s. matano_plane_m is the position of the Matano plane in the
// profile's depth coordinate; it is null for Sauer–Freise, which does not
// use one.
type Result struct {
	ID          string        `json:"id"`
	Method      string        `json:"method"`
	MatanoPlane *float64      `json:"matano_plane_m"`
	Points      []Point       `json:"points"`
	Warnings    []fit.Warning `json:"warnings"`
	// Level is the confidence level of the bootstrap band.
	Level float64 `json:"-"`

	// Smooth is the fitted smoothing curve (for plots and checks).
	Smooth *Smooth `json:"-"`
	// Time is the anneal time used, s.
	Time float64 `json:"-"`
	// RMSE is the root-mean-square residual of the smoother (profile unit).
	RMSE float64 `json:"-"`
}

// warn appends a warning.
func (r *Result) warn(code, format string, args ...any) {
	r.Warnings = append(r.Warnings, fit.Warning{Code: code, Message: fmt.Sprintf(format, args...)})
}

// Analyze computes D(C) from the couple profile p (Depth in m, any origin
// and either orientation) after an anneal of t seconds (0 takes p.Time).
func Analyze(p *profile.Profile, t float64, o Options) (*Result, error) {
	if p == nil {
		return nil, fmt.Errorf("%w: no profile given", fit.ErrBadInput)
	}
	where := p.ID
	if p.Source != "" && p.Source != p.ID {
		where = fmt.Sprintf("%s (%s)", p.ID, p.Source)
	}
	r, err := analyze(p, t, o)
	if err != nil {
		return nil, fmt.Errorf("profile %s: %w", where, err)
	}
	return r, nil
}

func analyze(p *profile.Profile, t float64, o Options) (*Result, error) {
	bad := func(format string, args ...any) error {
		return fmt.Errorf("%w: "+format, append([]any{fit.ErrBadInput}, args...)...)
	}
	method := strings.ToLower(strings.TrimSpace(o.Method))
	switch method {
	case "", "matano", BoltzmannMatano:
		method = BoltzmannMatano
	case "sauer", SauerFreise:
		method = SauerFreise
	default:
		return nil, bad("unknown method %q (use %s or %s)", o.Method, BoltzmannMatano, SauerFreise)
	}
	if t == 0 {
		t = p.Time
	}
	if !(t > 0) || math.IsInf(t, 0) {
		return nil, bad("the anneal time is not given (%g s); set it in the file (# time: 4 h) or on the command line", t)
	}
	n := len(p.Depth)
	if len(p.Value) != n {
		return nil, bad("%d depths but %d values", n, len(p.Value))
	}
	kmax := o.MaxTerms
	if kmax == 0 {
		kmax = 5
	}
	if kmax < 1 || kmax > maxTerms {
		return nil, bad("at most %d smoother terms tried; use 1 to %d (0 gives 5)", o.MaxTerms, maxTerms)
	}
	if o.Terms < 0 || o.Terms > maxTerms {
		return nil, bad("%d smoother terms; use 1 to %d, or let the data choose them (auto)", o.Terms, maxTerms)
	}
	if n < 8 {
		return nil, bad("%d points are too few for a Matano analysis; measure at least 8 (better 30 or more) across the couple", n)
	}
	if o.Terms > 0 && n < 3*o.Terms+5 {
		return nil, bad("%d points are too few for a smoother of %d terms (%d parameters); use at most %d terms, or auto", n, o.Terms, 3*o.Terms+1, (n-5)/3)
	}
	level := o.Level
	if level == 0 {
		level = 0.95
	}
	if !(level > 0 && level < 1) {
		return nil, bad("confidence level %g must lie between 0 and 1", o.Level)
	}
	line := func(i int) string {
		if i < len(p.Line) && p.Line[i] > 0 {
			return fmt.Sprintf(" (line %d)", p.Line[i])
		}
		return ""
	}
	idx := make([]int, n)
	for i := range idx {
		idx[i] = i
		if !finite(p.Depth[i]) || !finite(p.Value[i]) {
			return nil, bad("point %d%s is not a finite number", i+1, line(i))
		}
	}
	for _, c := range o.Concentrations {
		if !finite(c) {
			return nil, bad("requested concentration %g is not a finite number", c)
		}
	}
	sort.SliceStable(idx, func(a, b int) bool { return p.Depth[idx[a]] < p.Depth[idx[b]] })
	x, y := make([]float64, n), make([]float64, n)
	for k, i := range idx {
		x[k], y[k] = p.Depth[i], p.Value[i]
	}
	if x[n-1] == x[0] {
		return nil, bad("all points are at the same depth %g m", x[0])
	}

	sc, u, v, err := scale(x, y)
	if err != nil {
		return nil, err
	}
	pl := newPipeline(u, o.Terms, kmax)
	var work lmWork
	sel := pl.run(v, &work)
	if sel == nil {
		if o.Terms > 0 {
			return nil, fmt.Errorf("%w: no smooth monotone curve of %d error-function terms fits the profile with every term resolved by the points (wider than their spacing, centred within the data); try fewer terms or --terms auto", fit.ErrNoAnswer, o.Terms)
		}
		return nil, fmt.Errorf("%w: no smooth monotone curve (sum of error functions) could be fitted to the profile; check that it is a diffusion-couple profile that rises or falls from one end composition to the other", fit.ErrNoAnswer)
	}
	smooth := sc.smooth(sel.k, sel.p)
	r := &Result{ID: p.ID, Method: method, Smooth: smooth, Time: t, Points: []Point{}, Warnings: []fit.Warning{}, Level: level}
	r.RMSE = math.Abs(sc.b) * math.Sqrt(sel.rss/float64(n-(3*sel.k+1)))
	if method == BoltzmannMatano {
		xm := smooth.MatanoPlane()
		r.MatanoPlane = &xm
	}
	cs := o.Concentrations
	if cs == nil {
		for k := 1; k <= 19; k++ {
			cs = append(cs, smooth.CL+float64(k)*0.05*(smooth.CR-smooth.CL))
		}
	}
	dAt := func(s *Smooth, c float64) float64 {
		yy := (c - s.CL) / (s.CR - s.CL)
		xx, ok := s.Position(yy)
		if !ok {
			return math.NaN()
		}
		if method == BoltzmannMatano {
			return s.boltzmannMatano(xx, t, s.MatanoPlane())
		}
		return s.sauerFreise(xx, t)
	}
	// The median spacing of the points, for the resolution warning.
	gaps := make([]float64, n-1)
	for i := 1; i < n; i++ {
		gaps[i-1] = x[i] - x[i-1]
	}
	sort.Float64s(gaps)
	spacing := gaps[(n-1)/2]
	var outside, nearEnd, coarse []string
	for _, c := range cs {
		pt := Point{C: c, D: dAt(smooth, c), CI: fit.Interval{Lo: math.NaN(), Hi: math.NaN()}}
		yy := (c - smooth.CL) / (smooth.CR - smooth.CL)
		switch {
		case !(yy > 0 && yy < 1):
			outside = append(outside, fmt.Sprintf("%g", c))
		case yy < 0.1 || yy > 0.9:
			nearEnd = append(nearEnd, fmt.Sprintf("%.4g", c))
		}
		if xx, ok := smooth.Position(yy); ok && smooth.slopeY(xx) > 1/(resolution*spacing) {
			coarse = append(coarse, fmt.Sprintf("%.4g", c))
		}
		r.Points = append(r.Points, pt)
	}

	// Warnings on the data.
	if n < 20 {
		r.warn("few-points", "only %d points: the smoother and D(C) rest on little data; 30 or more across the couple are advisable", n)
	}
	if y0, y1 := smooth.Y(x[0]), smooth.Y(x[n-1]); y0 > 0.03 || y1 < 0.97 {
		side := []string{}
		// Said the same way at both ends: the share of the step from one end
		// composition to the other not yet covered at the outermost point.
		if y0 > 0.03 {
			side = append(side, fmt.Sprintf("shallow end (%.0f %% of the step short at the first point)", 100*y0))
		}
		if y1 < 0.97 {
			side = append(side, fmt.Sprintf("deep end (%.0f %% of the step short at the last point)", 100*(1-y1)))
		}
		r.warn("ends-not-reached", "the profile does not reach the end composition at the %s: the end levels %.4g and %.4g are extrapolated by the smoother, so the Matano plane and D near that end are uncertain; measure further out", strings.Join(side, " and the "), smooth.CL, smooth.CR)
	}
	switch {
	case sel.k == 1:
		r.warn("constant-d", "one error-function term describes the profile: D comes out the same at every concentration (%.3g m²/s); the data do not resolve a variation of D with C", dAt(smooth, (smooth.CL+smooth.CR)/2))
	case sel.aiccFit.k == 1:
		// AICc prefers the constant-D curve; the one used has a term more
		// (see pipeline.run), so its D varies a little with C.
		one := sc.smooth(1, sel.aiccFit.p)
		r.warn("constant-d", "AICc prefers a single error-function term, i.e. the same D at every concentration (%.3g m²/s): the data do not resolve a variation of D with C. The D(C) reported uses %d terms so that its band also allows for the variation the data cannot exclude", dAt(one, (one.CL+one.CR)/2), sel.k)
	}
	if o.Terms == 0 && sel.aiccFit.k == kmax && kmax < maxTerms {
		r.warn("terms-at-limit", "AICc chose the most smoother terms tried (%d): the profile may have more structure than the smoother follows, so D(C) and its band may be biased; a fixed number of terms above %d lets it follow more (--terms)", kmax, kmax)
	}
	if len(outside) > 0 {
		r.warn("outside-range", "D cannot be evaluated at %s: outside the range between the end compositions %.4g and %.4g (D is null there)", strings.Join(outside, ", "), smooth.CL, smooth.CR)
	}
	if len(nearEnd) > 0 {
		r.warn("near-end", "at %s, within 10 %% of an end composition, D is the ratio of two small numbers (the integral and the gradient) and is poorly determined; read it with its interval", strings.Join(nearEnd, ", "))
	}
	if len(coarse) > 0 {
		r.warn("under-resolved", "at %s the profile would cross the whole range within %d point spacings at its local slope: the points are too far apart there for the smoother to follow D(C) (no term may be narrower than the spacing), so D and its band may be biased; measure with a finer step across the steep part", strings.Join(coarse, ", "), resolution)
	}

	if o.Resamples >= 0 {
		if err := r.bootstrap(pl, sc, v, sel, cs, level, o, dAt); err != nil {
			return nil, err
		}
	}
	return r, nil
}

// bootstrap fills the intervals by residual resampling (Efron &
// Tibshirani, An Introduction to the Bootstrap, 1993, ch. 9): the centred
// residuals of the chosen curve, inflated by √(n/(n−p)), are drawn with
// replacement and added to it; the whole pipeline pl (starts, fits of every
// number of terms, admissibility, choice of the number of terms) runs on
// each replicate and D is recomputed at the same concentrations. Intervals
// are plain percentiles. Replicate b draws from PCG(Seed, b) and its
// result is stored at b, so the band does not depend on the workers.
func (r *Result) bootstrap(pl *pipeline, sc scaling, v []float64, sel *candidate, cs []float64, level float64, o Options, dAt func(*Smooth, float64) float64) error {
	B := o.Resamples
	if B == 0 {
		B = 1000
	}
	if B < 100 {
		return fmt.Errorf("%w: %d bootstrap resamples are too few for an interval (use at least 100; 1000 is the default; a negative number turns the band off)", fit.ErrBadInput, B)
	}
	workers := o.Workers
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	workers = min(workers, B)
	n, np := len(v), 3*sel.k+1
	fitted := make([]float64, n)
	res := make([]float64, n)
	s := erfSum{k: sel.k}.unpack(sel.p)
	var mean float64
	for i, u := range pl.u {
		fitted[i] = s.At(u)
		res[i] = v[i] - fitted[i]
		mean += res[i]
	}
	mean /= float64(n)
	infl := math.Sqrt(float64(n) / float64(n-np))
	for i := range res {
		res[i] = (res[i] - mean) * infl
	}
	reps := make([][]float64, B) // D at each concentration, per replicate; nil = failed
	type scratch struct {
		ys   []float64
		work lmWork
	}
	newScratch := func() *scratch { return &scratch{ys: make([]float64, n)} }
	parallel.Scratch(B, workers, newScratch, func(b int, w *scratch) {
		rng := rand.New(rand.NewPCG(o.Seed, uint64(b)))
		for i := range w.ys {
			w.ys[i] = fitted[i] + res[rng.IntN(n)]
		}
		c := pl.run(w.ys, &w.work)
		if c == nil {
			return
		}
		s := sc.smooth(c.k, c.p)
		d := make([]float64, len(cs))
		for j, c := range cs {
			d[j] = dAt(s, c)
		}
		reps[b] = d
	}, nil)
	failed := 0
	for _, d := range reps {
		if d == nil {
			failed++
		}
	}
	if failed > B/20 {
		r.warn("bootstrap-failures", "in %d of %d bootstrap replicates no admissible smoother was found; the band is built from the others and may be too narrow", failed, B)
	}
	alpha := (1 - level) / 2
	var wide []string
	vals := make([]float64, 0, B)
	for j := range cs {
		vals = vals[:0]
		for _, d := range reps {
			if d != nil && finite(d[j]) {
				vals = append(vals, d[j])
			}
		}
		// A replicate whose end compositions moved past the level gives
		// no D there; fewer than 90 % usable leaves the band open.
		if len(vals) < (B-failed)*9/10 || len(vals) < 50 {
			continue
		}
		sort.Float64s(vals)
		iv := fit.Interval{Lo: stats.BootstrapQuantile(vals, alpha), Hi: stats.BootstrapQuantile(vals, 1-alpha)}
		r.Points[j].CI = iv
		if yy := (cs[j] - r.Smooth.CL) / (r.Smooth.CR - r.Smooth.CL); yy >= 0.1 && yy <= 0.9 && iv.Hi > 3*iv.Lo {
			wide = append(wide, fmt.Sprintf("%.4g", cs[j]))
		}
	}
	if len(wide) > 0 {
		r.warn("wide-band", "the %.0f %% band spans more than a factor 3 at %s: the profile does not determine D there", 100*level, strings.Join(wide, ", "))
	}
	return nil
}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

func num(v float64) *float64 {
	if !finite(v) {
		return nil
	}
	return &v
}
