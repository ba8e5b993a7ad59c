package matano

import (
	"fmt"
	"math"
	"sort"

	"github.com/fickfit/fickfit/fit"
)

// scaling maps the measured couple to the unit-free problem the smoother
// is fitted on: positions u = ±(x − xc)/xs in [−1, 1] and values
// v = (y − a)/b, with a and b taken from the data so that v runs from about
// 0 to about 1, and the sign of u chosen so that v rises with u, whatever
// the unit and the direction of the profile. Every decision of the smoother
// (starts, damping, stops, admissibility, the choice of the number of
// terms) is made on (u, v), so the curve found for a profile in at% is the
// one found in fractions scaled by 100, and positions in µm or mm, from any
// origin and in either direction, give the same curve in metres.
type scaling struct {
	xc, xs, a, b float64
	flip         bool // u = −(x − xc)/xs: the profile falls with depth
}

// grid is the resolution of u and v: the unit-free data are rounded to it
// (2⁻⁴⁰ ≈ 9e-13 of the range, far below any measurement's resolution) so
// that the same couple written in other units, whose scaled values differ
// in the last bits, gives bit-identical data and so the very same
// decisions — a fit accepted or not, the number of terms — here and in
// every bootstrap replicate.
const grid = 0x1p-40

// scale returns the scaling of the depth-ordered couple (x, y) and the
// unit-free positions and values, ordered by u: xc and xs put the first
// and last point at ±1; a and b come from the means of the outer sixths of
// the points (at most five) at either end, so that v goes from about 0 to
// about 1.
func scale(x, y []float64) (sc scaling, u, v []float64, err error) {
	n := len(x)
	sc.xc, sc.xs = (x[0]+x[n-1])/2, (x[n-1]-x[0])/2
	k := max(1, min(n/6, 5))
	end := func(from, step int) float64 {
		var m float64
		for i := 0; i < k; i++ {
			m += y[from+i*step]
		}
		return m / float64(k)
	}
	lo, hi := end(0, 1), end(n-1, -1)
	if !(lo != hi) {
		return sc, nil, nil, fmt.Errorf("%w: both ends of the profile have the same level (%g): not a diffusion couple", fit.ErrBadInput, lo)
	}
	sc.flip = hi < lo
	sc.a, sc.b = lo, hi-lo
	if sc.flip {
		sc.a, sc.b = hi, lo-hi
	}
	u, v = make([]float64, n), make([]float64, n)
	for i := range x {
		j := i
		if sc.flip {
			j = n - 1 - i
		}
		ui := (x[j] - sc.xc) / sc.xs
		if sc.flip {
			ui = -ui
		}
		u[i] = math.Round(ui/grid) * grid
		v[i] = math.Round((y[j]-sc.a)/sc.b/grid) * grid
	}
	return sc, u, v, nil
}

// smooth returns the curve of internal parameters p (k terms, unit-free)
// in the data's units. With u = −(x − xc)/xs, Φ((u − m)/s) =
// 1 − Φ((x − (xc − xs·m))/(xs·s)): the terms keep their weights, the end
// levels change places.
func (sc scaling) smooth(k int, p []float64) *Smooth {
	s := erfSum{k: k}.unpack(p)
	s.CL, s.CR = sc.a+sc.b*s.CL, sc.a+sc.b*s.CR
	sign := 1.0
	if sc.flip {
		s.CL, s.CR = s.CR, s.CL
		sign = -1
	}
	for j := range s.M {
		s.M[j] = sc.xc + sign*sc.xs*s.M[j]
		s.S[j] *= sc.xs
	}
	return s
}

// pipeline is the whole smoothing procedure applied to one set of values
// on fixed positions: the data-derived starts, the fits adding one term at
// a time, the admissibility rules and the choice of the number of terms.
// The band runs it unchanged on each bootstrap replicate.
type pipeline struct {
	u []float64 // positions, unit-free, increasing
	// terms > 0 fixes the number of terms; 0 chooses it (see run).
	terms int
	// kmax is the largest number of terms fitted when choosing.
	kmax int
	// smin and smax bound the width of a term of a curve with two or
	// more terms (unit-free); see admissible.
	smin, smax float64
}

// maxTerms is the largest number of erf terms a smoother may have.
const maxTerms = 8

// candidate is an admissible fit with k terms (the first its starts gave).
type candidate struct {
	k    int
	p    []float64 // internal parameters, unit-free
	rss  float64
	aicc float64
	// aiccFit is the fit AICc chose: the candidate itself, or the one
	// with a term fewer (see run); itself when the number is fixed.
	aiccFit *candidate
}

// newPipeline sets the admissibility bounds from the positions: a term of a
// curve with several terms must be at least as wide as the median spacing
// of the points (narrower, it rises between two neighbours and fits the
// scatter of one point) and at most half the half-range of the data (wider,
// it is a slope across the plateaus and moves the extrapolated end levels).
func newPipeline(u []float64, terms, kmax int) *pipeline {
	gaps := make([]float64, 0, len(u)-1)
	for i := 1; i < len(u); i++ {
		gaps = append(gaps, u[i]-u[i-1])
	}
	sort.Float64s(gaps)
	h := gaps[len(gaps)/2]
	if !(h > 0) {
		h = 2 / float64(len(u)-1)
	}
	return &pipeline{u: u, terms: terms, kmax: kmax, smin: h, smax: 0.5}
}

// admissible tells whether s (unit-free) is a curve the data can support:
// with two or more terms every term has its centre within the data, a
// width between smin and smax and a weight of at least 1e-4.
func (pl *pipeline) admissible(s *Smooth) bool {
	if len(s.W) == 1 {
		return s.S[0] > 0 && finite(s.M[0]) && finite(s.S[0])
	}
	for j := range s.W {
		if !(s.M[j] >= -1 && s.M[j] <= 1 && s.S[j] >= pl.smin && s.S[j] <= pl.smax && s.W[j] >= 1e-4) {
			return false
		}
	}
	return true
}

// hopeless tells whether an iterate has left the admissible region so far
// that the fit is not worth finishing: a term at half the smallest or twice
// the largest width, centred well outside the data, or with a weight below
// the admissible one. (A fit that ends there would be rejected; stopping
// early only saves the iterations.)
func (pl *pipeline) hopeless(s *Smooth) bool {
	if len(s.W) == 1 {
		return !(s.S[0] > 1e-6 && s.S[0] < 1e3 && math.Abs(s.M[0]) < 1e3)
	}
	for j := range s.W {
		if !(math.Abs(s.M[j]) < 1.5 && s.S[j] > pl.smin/2 && s.S[j] < 2*pl.smax && s.W[j] > 1e-5) {
			return true
		}
	}
	return false
}

// fitK returns the first admissible fit with k terms from the starts, in
// order, or nil.
func (pl *pipeline) fitK(v []float64, k int, p0s [][]float64, w *lmWork) *candidate {
	n, np := len(v), 3*k+1
	for _, p0 := range p0s {
		p, rss, ok := lmFit(pl.u, v, k, p0, w, pl.hopeless)
		if !ok {
			continue
		}
		m := erfSum{k: k}
		m.fill(p, &w.s)
		if !pl.admissible(&w.s) {
			continue
		}
		// Hurvich & Tsai, Biometrika 76 (1989) 297–307:
		// AICc = n ln(RSS/n) + 2p + 2p(p + 1)/(n − p − 1).
		aicc := float64(n)*math.Log(math.Max(rss, 1e-300)/float64(n)) + 2*float64(np) + 2*float64(np*(np+1))/float64(n-np-1)
		return &candidate{k: k, p: append([]float64(nil), p...), rss: rss, aicc: aicc}
	}
	return nil
}

// run applies the pipeline to the values v (unit-free, on pl.u) and returns
// the chosen fit, or nil when no admissible curve was found.
//
// With a fixed number of terms that number is fitted. Otherwise terms are
// added one at a time, k = 1, 2, … up to kmax, as long as each lowers AICc;
// k̂ is the last that did, and the curve used is the first that did not —
// k̂ + 1 terms — when it is admissible, the k̂-term curve otherwise. Why
// one term more than AICc: AICc balances the smoother's bias against its
// variance for the profile, but D(C) depends on the slope and on an
// integral of the curve, and for those the bias left at the AICc choice is
// of the order of the standard error, so a band around it misses the truth
// far more often than its level says. Choosing a richer curve than the
// criterion's optimum so that the bias becomes small against the spread
// ("undersmoothing": P. Hall, "Effect of bias estimation on coverage
// accuracy of bootstrap confidence intervals for a probability density",
// Ann. Statist. 20 (1992) 675–694; L. Wasserman, All of Nonparametric
// Statistics, Springer 2006, §5.7) is the standard remedy. For this basis
// one term more cuts the bias of D by a factor of two to five (largest bias
// over 10–90 % of the range for a noise-free couple whose D rises ×10:
// 5.8 % with three terms, 2.3 % with four, 0.4 % with five) while the
// spread grows by about a third; TestBandCoverage checks the coverage that
// results.
func (pl *pipeline) run(v []float64, w *lmWork) *candidate {
	n := len(v)
	cl, cr, m, s, err := oneTermStart(pl.u, v)
	if err != nil {
		return nil
	}
	kmax := pl.kmax
	if pl.terms > 0 {
		kmax = pl.terms
	}
	var prev, best *candidate
	for k := 1; k <= kmax && n >= 3*k+1+4; k++ {
		// Grow the previous curve by splitting a term; when that fails,
		// spread k terms over the one-term curve. (Two further starts,
		// widths growing or shrinking across the profile, found an
		// admissible curve these missed in 5 of 148 fits on simulated ×10
		// couples, for 40 % more work in the whole pipeline.)
		var p0s [][]float64
		if k > 1 && prev != nil {
			p0s = append(p0s, split(prev.p, k-1))
		}
		p0s = append(p0s, start(k, cl, cr, m, s))
		f := pl.fitK(v, k, p0s, w)
		if k == 1 && f != nil {
			// Later starts build on the one-term fit.
			cl, cr, m, s = f.p[0], f.p[1], f.p[2], math.Exp(f.p[3])
		}
		prev = f
		if pl.terms > 0 {
			if k == pl.terms && f != nil {
				f.aiccFit = f
				return f
			}
			continue
		}
		if f != nil && (best == nil || f.aicc < best.aicc) {
			best = f
			continue
		}
		if best != nil {
			// k terms do not lower AICc: k̂ = k − 1.
			if f != nil {
				f.aiccFit = best
				return f
			}
			break
		}
	}
	if best != nil {
		best.aiccFit = best
	}
	return best
}

// split returns a start for k+1 terms from a fit with k terms (internal
// parameters p): the term carrying the largest weight × width is replaced by
// two of half its weight, 0.7 of its width, half a width either side of its
// centre — the usual way to grow a mixture one component at a time.
func split(p []float64, k int) []float64 {
	m := erfSum{k: k}
	s := m.unpack(p)
	j := 0
	for i := range s.W {
		if s.W[i]*s.S[i] > s.W[j]*s.S[j] {
			j = i
		}
	}
	q := make([]float64, 3*(k+1)+1)
	q[0], q[1] = p[0], p[1]
	w := make([]float64, 0, k+1)
	put := func(i int, mm, ss, ww float64) {
		q[2+2*i], q[3+2*i] = mm, math.Log(ss)
		w = append(w, ww)
	}
	i := 0
	for t := range s.W {
		if t == j {
			put(i, s.M[t]-0.5*s.S[t], 0.7*s.S[t], s.W[t]/2)
			put(i+1, s.M[t]+0.5*s.S[t], 0.7*s.S[t], s.W[t]/2)
			i += 2
			continue
		}
		put(i, s.M[t], s.S[t], s.W[t])
		i++
	}
	// Softmax logits relative to the first term.
	for t := 1; t <= k; t++ {
		q[2+2*(k+1)+t-1] = math.Log(w[t] / w[0])
	}
	return q
}
