package report

import (
	"errors"
	"fmt"
	"math"
	"sort"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"github.com/fickfit/fickfit/campaign"
	"github.com/fickfit/fickfit/fit/matano"
	"github.com/fickfit/fickfit/profile"
)

// matanoNearEnd is the fraction of the way between the end compositions
// within which fit/matano warns that D is poorly determined (warning code
// "near-end" of matano.Analyze: D is the ratio of two small numbers
// there). The figure marks such points apart; keep the two in step.
const matanoNearEnd = 0.1

// matanoMethodName writes a method as a metallurgist would say it.
func matanoMethodName(m string) string {
	switch m {
	case matano.BoltzmannMatano:
		return "Boltzmann–Matano"
	case matano.SauerFreise:
		return "Sauer–Freise"
	case "":
		return "method not given"
	}
	return m
}

// MatanoFigure draws a D(C) analysis of a diffusion couple in two panels
// side by side. Left: the measured profile p against position across the
// couple, the smoothing curve C(x) = CL + (CR − CL)·Σ wₖ·½(1 + erf((x −
// mₖ)/sₖ)) of r.Smooth, and the Matano plane x_M as a dashed vertical line
// (Boltzmann–Matano only; Sauer–Freise uses none). Right: D against C on a
// logarithmic axis, the points of r.Points joined by a thin line over their
// shaded bootstrap band; points within 10 % of an end composition, where
// the analysis is ill-conditioned, are drawn as open rings.
//
// p may be nil (the left panel then shows the smoothing curve alone) and
// r.Smooth may be nil, as in a result read back from JSON (no curve, and
// no points marked as near an end); not both. The error names what is
// missing when there is nothing to draw: no result, no point with a
// finite positive D, or a profile that is not the one analysed.
func MatanoFigure(r *matano.Result, p *profile.Profile, o FigureOptions) (*Figure, error) {
	if r == nil {
		return nil, errors.New("no Matano result to draw")
	}
	if p != nil && p.ID != "" && r.ID != "" && p.ID != r.ID {
		return nil, fmt.Errorf("figure of couple %s: the profile given is %s, not the one analysed; pass the profile the result came from", r.ID, p.ID)
	}
	s := r.Smooth
	if !usableSmooth(s) {
		s = nil // no curve, or not a usable one: draw without it
	}

	// Measured points (finite only).
	var px, py []float64
	if p != nil {
		for i := range p.Depth {
			if i < len(p.Value) && finite(p.Depth[i]) && finite(p.Value[i]) {
				px, py = append(px, p.Depth[i]), append(py, p.Value[i])
			}
		}
	}
	if len(px) == 0 && s == nil {
		return nil, fmt.Errorf("figure of couple %s: neither measured points nor a smoothing curve to draw; pass the couple's profile", r.ID)
	}

	// D(C) points sorted by C; the drawable ones have a finite positive D.
	pts := append([]matano.Point(nil), r.Points...)
	sort.SliceStable(pts, func(a, b int) bool { return pts[a].C < pts[b].C })
	var nOutside, nNonPositive int
	var dc, dd, dlo, dhi []float64
	var nearC, nearD, farC, farD []float64
	nearEnd := func(c float64) bool {
		if s == nil {
			return false
		}
		y := (c - s.CL) / (s.CR - s.CL)
		return y < matanoNearEnd || y > 1-matanoNearEnd
	}
	nDrawn := 0
	for _, pt := range pts {
		if !finite(pt.D) || pt.D <= 0 || !finite(pt.C) {
			if finite(pt.D) && pt.D <= 0 {
				nNonPositive++
			} else {
				nOutside++
			}
			if finite(pt.C) { // break the line and the band there
				dc, dd = append(dc, pt.C), append(dd, math.NaN())
				dlo, dhi = append(dlo, math.NaN()), append(dhi, math.NaN())
			}
			continue
		}
		nDrawn++
		lo, hi := pt.CI.Lo, pt.CI.Hi
		if !(lo > 0 && finite(lo) && hi > 0 && finite(hi)) {
			lo, hi = math.NaN(), math.NaN() // an open end breaks the band
		}
		dc, dd, dlo, dhi = append(dc, pt.C), append(dd, pt.D), append(dlo, lo), append(dhi, hi)
		if nearEnd(pt.C) {
			nearC, nearD = append(nearC, pt.C), append(nearD, pt.D)
		} else {
			farC, farD = append(farC, pt.C), append(farD, pt.D)
		}
	}
	if nDrawn == 0 {
		why := "no point has a finite D"
		if nNonPositive > 0 {
			why = "no point has a positive D (a logarithmic axis cannot show D ≤ 0)"
		}
		return nil, fmt.Errorf("figure of couple %s: %s; check the profile and the requested concentrations", r.ID, why)
	}
	haveBand := false
	for i := range dlo {
		haveBand = haveBand || finite(dlo[i])
	}

	// ---- Left panel: the profile against position.
	xmin, xmax := math.Inf(1), math.Inf(-1)
	for _, x := range px {
		xmin, xmax = math.Min(xmin, x), math.Max(xmax, x)
	}
	if !(xmax > xmin) && s != nil {
		// No measured span: show the smoother's diffusion zone.
		for k := range s.W {
			xmin, xmax = math.Min(xmin, s.M[k]-2.5*s.S[k]), math.Max(xmax, s.M[k]+2.5*s.S[k])
		}
	}
	if !(xmax > xmin) { // one measured point and no curve
		xmin, xmax = xmin-1e-6, xmax+1e-6
	}
	var plane float64
	havePlane := r.MatanoPlane != nil && finite(*r.MatanoPlane)
	if havePlane {
		plane = *r.MatanoPlane
		xmin, xmax = math.Min(xmin, plane), math.Max(xmax, plane)
	}
	pad := 0.03 * (xmax - xmin)
	xmin, xmax = xmin-pad, xmax+pad
	f, posUnit := DepthScale(math.Max(math.Abs(xmin), math.Abs(xmax)))
	const m = 201
	gx, gy := make([]float64, m), make([]float64, m)
	if s != nil {
		for i := range gx {
			x := xmin + (xmax-xmin)*float64(i)/float64(m-1)
			gx[i], gy[i] = x/f, s.At(x)
		}
	}
	sx := make([]float64, len(px))
	for i := range px {
		sx[i] = px[i] / f
	}
	cmin, cmax := math.Inf(1), math.Inf(-1)
	for _, v := range py {
		cmin, cmax = math.Min(cmin, v), math.Max(cmax, v)
	}
	if s != nil {
		cmin, cmax = math.Min(cmin, math.Min(s.CL, s.CR)), math.Max(cmax, math.Max(s.CL, s.CR))
	}
	if !(cmax > cmin) {
		cmin, cmax = cmin-1, cmax+1
	}
	cspan := cmax - cmin
	rising := true
	switch {
	case s != nil:
		rising = s.CR > s.CL
	case len(py) > 1:
		rising = py[len(py)-1] >= py[0] // p's file order; good enough for placing labels
	}

	cLabel := matanoValueLabel(p)
	left := newPlot()
	left.X.Min, left.X.Max = xmin/f, xmax/f
	left.Y.Min, left.Y.Max = cmin-0.06*cspan, cmax+0.08*cspan
	left.X.Label.Text = "position (" + posUnit + ")"
	left.Y.Label.Text = cLabel
	dataGlyph := draw.GlyphStyle{Color: colData, Radius: 2.3, Shape: ringGlyph{}}
	fitLine := draw.LineStyle{Color: colFit, Width: 1.4}
	planeLine := draw.LineStyle{Color: colMuted, Width: 0.8, Dashes: []vg.Length{4, 2.5}}
	left.Add(rules{}, plotFunc(func(c draw.Canvas, pl *plot.Plot) {
		tx, _ := pl.Transforms(&c)
		if havePlane {
			x := tx(plane / f)
			c.StrokeLine2(planeLine, x, c.Min.Y, x, c.Max.Y)
			// Labelled at the top, on the side the profile leaves empty.
			ts := textStyle(sizeTick, colMuted, false)
			ts.YAlign = draw.YTop
			const label = "Matano plane"
			w := ts.Width(label)
			onLeft := rising
			if onLeft && x-4-w < c.Min.X || !onLeft && x+4+w > c.Max.X {
				onLeft = !onLeft // no room on that side
			}
			at := vg.Point{X: x + 4, Y: c.Max.Y - 3}
			if onLeft {
				at.X, ts.XAlign = x-4, draw.XRight
			}
			c.FillText(ts, at, label)
		}
		if s != nil {
			polyline(c, pl, gx, gy, fitLine)
		}
		marks(c, pl, sx, py, dataGlyph)
	}))

	// ---- Right panel: D against C.
	var ccmin, ccmax float64
	if s != nil {
		ccmin, ccmax = math.Min(s.CL, s.CR), math.Max(s.CL, s.CR)
	} else {
		ccmin, ccmax = math.Inf(1), math.Inf(-1)
	}
	for i, c := range dc {
		if finite(dd[i]) {
			ccmin, ccmax = math.Min(ccmin, c), math.Max(ccmax, c)
		}
	}
	if !(ccmax > ccmin) {
		ccmin, ccmax = ccmin-0.5*math.Max(math.Abs(ccmin), 1), ccmax+0.5*math.Max(math.Abs(ccmax), 1)
	}
	ccpad := 0.03 * (ccmax - ccmin)
	dmin, dmax := math.Inf(1), math.Inf(-1)
	for _, d := range dd {
		if finite(d) {
			dmin, dmax = math.Min(dmin, d), math.Max(dmax, d)
		}
	}
	// The band widens the range by at most a factor 10 each way; beyond,
	// it runs off the panel (clipped) rather than squash the points.
	bmin, bmax := dmin, dmax
	for i := range dlo {
		if finite(dlo[i]) {
			bmin, bmax = math.Min(bmin, math.Max(dlo[i], dmin/10)), math.Max(bmax, math.Min(dhi[i], dmax*10))
		}
	}
	// At least 0.6 decade, so that a nearly constant D still gets three
	// labelled ticks (2, 3, 5 × 10ⁿ) to read it against.
	if l := math.Log10(bmax / bmin); l < 0.6 {
		g := math.Pow(10, (0.6-l)/2)
		bmin, bmax = bmin/g, bmax*g
	}
	lspan := math.Log10(bmax / bmin)
	right := newPlot()
	right.X.Min, right.X.Max = ccmin-ccpad, ccmax+ccpad
	right.X.Label.Text = cLabel
	right.Y.Min, right.Y.Max = bmin/math.Pow(10, 0.1*lspan), bmax*math.Pow(10, 0.1*lspan)
	right.Y.Scale = plot.LogScale{}
	right.Y.Tick.Marker = logTicks{}
	right.Y.Label.Text = "D (m²/s)"
	dLine := draw.LineStyle{Color: colFit, Width: 0.9}
	dGlyph := draw.GlyphStyle{Color: colFit, Radius: 2.3, Shape: draw.CircleGlyph{}}
	nearGlyph := draw.GlyphStyle{Color: colFit, Radius: 2.3, Shape: ringGlyph{}}
	right.Add(rules{}, plotFunc(func(c draw.Canvas, pl *plot.Plot) {
		if haveBand {
			band(c, pl, dc, dlo, dhi, colBand)
		}
		polyline(c, pl, dc, dd, dLine)
		marks(c, pl, farC, farD, dGlyph)
		marks(c, pl, nearC, nearD, nearGlyph)
	}))

	// ---- Key, title and words.
	var legend []legendEntry
	if len(px) > 0 {
		legend = append(legend, legendEntry{"measured", glyphSymbol(dataGlyph)})
	}
	if s != nil {
		terms := "terms"
		if s.Terms() == 1 {
			terms = "term"
		}
		legend = append(legend, legendEntry{fmt.Sprintf("smoothed (%d erf %s)", s.Terms(), terms), lineSymbol(fitLine)})
	}
	dSym := combined(lineSymbol(dLine), glyphSymbol(dGlyph))
	if haveBand {
		dSym = combined(bandSymbol(colBand, &dLine), glyphSymbol(dGlyph))
		legend = append(legend, legendEntry{"D with " + bandName(r.Level), dSym})
	} else {
		legend = append(legend, legendEntry{"D (no band)", dSym})
	}
	if len(nearC) > 0 {
		legend = append(legend, legendEntry{"D within 10 % of an end composition (poorly determined)", glyphSymbol(nearGlyph)})
	}

	method := matanoMethodName(r.Method)
	title := r.ID + " · " + method
	if r.ID == "" {
		title = method
	}
	var sub []string
	if p != nil && p.Temperature > 0 {
		sub = append(sub, TemperatureShort(p.Temperature, o.TempUnit))
	}
	if r.Time > 0 {
		sub = append(sub, "anneal "+Duration(r.Time))
	}
	if havePlane {
		sub = append(sub, "Matano plane at "+Number(plane/f, SigDigits(math.Max(math.Abs(xmax), math.Abs(xmin))/f, 3))+" "+posUnit)
	}
	if n := nOutside + nNonPositive; n > 0 {
		sub = append(sub, fmt.Sprintf("%d of %d levels not drawn (D n/a or ≤ 0)", n, len(r.Points)))
	}

	id := r.ID
	if id == "" {
		id = "couple"
	}
	fig := &Figure{
		Name:   "matano-" + fileSafe(id),
		Title:  fmt.Sprintf("Couple %s, %s analysis: measured %s against position with the smoothed curve", id, method, cLabel),
		Width:  figWidth,
		Height: 9.5 * vg.Centimeter,
	}
	if havePlane {
		fig.Title += " and the Matano plane"
	}
	fig.Title += "; D against " + cLabel + " on a logarithmic axis"
	if haveBand {
		fig.Title += " with its " + bandName(r.Level)
	}
	fig.paint = func(c draw.Canvas) {
		c = drawTitle(c, title, strings.Join(sub, " · "))
		c = legendBelow(c, legend)
		const gap = vg.Length(22)
		w := (c.Max.X - c.Min.X - gap) / 2
		cl, cr := c, c
		cl.Max.X = c.Min.X + w
		cr.Min.X = cl.Max.X + gap
		cl, cr = alignRow(left, right, cl, cr)
		left.Draw(cl)
		right.Draw(cr)
	}
	return fig, nil
}

// usableSmooth tells whether s is a curve that can be drawn: distinct
// finite end levels and terms with finite weights, centres and positive
// widths.
func usableSmooth(s *matano.Smooth) bool {
	if s == nil || !finite(s.CL) || !finite(s.CR) || s.CL == s.CR || len(s.W) == 0 || len(s.M) != len(s.W) || len(s.S) != len(s.W) {
		return false
	}
	for k := range s.W {
		if !finite(s.W[k]) || !finite(s.M[k]) || !(s.S[k] > 0) || !finite(s.S[k]) {
			return false
		}
	}
	return true
}

// matanoValueLabel is the concentration axis label: "C (wt%)", the
// quantity named by the profile ("Ni (at%)") or "C" when it names none.
func matanoValueLabel(p *profile.Profile) string {
	q, unit := "", ""
	if p != nil {
		q, unit = campaign.QuantityOf(p), strings.TrimSpace(p.ValueUnit)
	}
	if q == "" {
		q = "C"
	}
	if unit == "" {
		return q + " (unit not given)"
	}
	return q + " (" + unit + ")"
}

// alignRow crops two canvases side by side so that their data areas share
// top and bottom edges.
func alignRow(p1, p2 *plot.Plot, c1, c2 draw.Canvas) (draw.Canvas, draw.Canvas) {
	d1, d2 := p1.DataCanvas(c1), p2.DataCanvas(c2)
	bottom := vg.Length(math.Max(float64(d1.Min.Y), float64(d2.Min.Y)))
	top := vg.Length(math.Min(float64(d1.Max.Y), float64(d2.Max.Y)))
	c1 = draw.Crop(c1, 0, 0, bottom-d1.Min.Y, top-d1.Max.Y)
	c2 = draw.Crop(c2, 0, 0, bottom-d2.Min.Y, top-d2.Max.Y)
	return c1, c2
}

// bandName names the bootstrap band with its level when known.
func bandName(level float64) string {
	if level > 0 && level < 1 {
		return Level(level) + " bootstrap band"
	}
	return "bootstrap band"
}
