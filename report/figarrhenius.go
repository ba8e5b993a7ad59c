package report

import (
	"errors"
	"fmt"
	"math"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"github.com/fickfit/fickfit/arrhenius"
	"github.com/fickfit/fickfit/fit"
)

// PartPoint is a back-calculated part drawn on the Arrhenius plot: its
// measured D at the solved temperature, with the temperature's interval.
type PartPoint struct {
	ID string
	D  float64      // m²/s
	T  float64      // K, solved
	CI fit.Interval // K
}

// ArrheniusPlot is what the Arrhenius figure shows.
type ArrheniusPlot struct {
	// Lines are the fitted lines, one per group, each with its points.
	Lines []arrhenius.Line
	// Parts are back-calculated parts (solved for temperature).
	Parts []PartPoint
	// References are published lines drawn for comparison.
	References []arrhenius.Reference
}

// invT is the abscissa of the Arrhenius plot: 10⁴/T in K⁻¹.
func invT(T float64) float64 { return 1e4 / T }

// pointCI returns the ends of a point's error bar at the line's level
// (arrhenius.Point.Interval), or NaN for both when the interval is open
// on either side: a bar needs both ends, and an open end is not invented.
func pointCI(p arrhenius.Point, level float64) (lo, hi float64) {
	ci := p.Interval(level)
	if ci.Lo > 0 && ci.Hi > 0 && finite(ci.Lo) && finite(ci.Hi) {
		return ci.Lo, ci.Hi
	}
	return math.NaN(), math.NaN()
}

// groupLabel names a line's group in a legend: "lot BAR-2291", or "all
// profiles" when not grouped.
func groupLabel(l arrhenius.Line) string {
	switch {
	case l.Group == "":
		return "all profiles"
	case l.By == "" || strings.EqualFold(l.By, "lot"):
		return "lot " + l.Group
	}
	return l.By + " " + l.Group
}

// QText writes an activation energy in kJ/mol with its interval:
// "142 kJ/mol (95 % CI 136–148)".
func QText(q float64, ci fit.Interval, level float64) string { return numFmt{}.qText(q, ci, level) }

func (n numFmt) qText(q float64, ci fit.Interval, level float64) string {
	v, iv := q/1e3, fit.Interval{Lo: ci.Lo / 1e3, Hi: ci.Hi / 1e3}
	if !finite(iv.Lo) && !finite(iv.Hi) {
		return n.general(v) + " kJ/mol"
	}
	last := n.lastDigit(v, iv)
	return Number(v, last) + " kJ/mol (" + Level(level) + " CI " + IntervalAt(v, iv, last) + ")"
}

// ArrheniusFigure draws D against 10⁴/T with a temperature axis on top:
// each group's points with their intervals, its fitted line with the
// confidence band of the mean line (dashed where it extrapolates), the
// back-calculated parts with their temperature intervals, and reference
// lines. D is on a logarithmic axis, or ln D on a linear one (LnD).
func ArrheniusFigure(a ArrheniusPlot, o FigureOptions) (*Figure, error) {
	var Ts, Ds []float64
	for _, l := range a.Lines {
		for _, p := range l.Points {
			Ts = append(Ts, p.T)
			Ds = append(Ds, math.Exp(p.LnD))
			if lo, hi := pointCI(p.Point, l.Level); finite(lo) {
				Ds = append(Ds, lo, hi)
			}
		}
	}
	for _, pp := range a.Parts {
		Ts = append(Ts, pp.T)
		Ds = append(Ds, pp.D)
		for _, t := range []float64{pp.CI.Lo, pp.CI.Hi} {
			if t > 0 && finite(t) {
				Ts = append(Ts, t)
			}
		}
	}
	if len(Ts) == 0 {
		return nil, errors.New("no points to draw in the Arrhenius figure")
	}
	xmin, xmax := math.Inf(1), math.Inf(-1)
	for _, T := range Ts {
		xmin, xmax = math.Min(xmin, invT(T)), math.Max(xmax, invT(T))
	}
	pad := 0.08 * (xmax - xmin)
	if pad == 0 {
		pad = 0.05 * xmax
	}
	xmin, xmax = xmin-pad, xmax+pad
	dmin, dmax := math.Inf(1), math.Inf(-1)
	for _, d := range Ds {
		if d > 0 && finite(d) {
			dmin, dmax = math.Min(dmin, d), math.Max(dmax, d)
		}
	}
	lspan := math.Log10(dmax) - math.Log10(dmin)
	if lspan < 0.5 {
		lspan = 0.5
	}
	dmin, dmax = dmin/math.Pow(10, 0.12*lspan), dmax*math.Pow(10, 0.1*lspan)

	p := newPlot()
	p.X.Min, p.X.Max = xmin, xmax
	p.X.Label.Text = "10⁴/T (K⁻¹)"
	yv := func(d float64) float64 { return d }
	if o.LnD {
		p.Y.Min, p.Y.Max = math.Log(dmin), math.Log(dmax)
		p.Y.Label.Text = "ln(D / (m²/s))"
		yv = func(d float64) float64 {
			if !(d > 0) {
				return math.NaN()
			}
			return math.Log(d)
		}
	} else {
		p.Y.Min, p.Y.Max = dmin, dmax
		p.Y.Scale = plot.LogScale{}
		p.Y.Tick.Marker = logTicks{}
		p.Y.Label.Text = "D (m²/s)"
	}
	mapY := func(v []float64) []float64 {
		out := make([]float64, len(v))
		for i := range v {
			out[i] = yv(v[i])
		}
		return out
	}
	// Temperature grid across the plot (K), for lines and bands.
	const m = 120
	gridT := func(x0, x1 float64) []float64 {
		ts := make([]float64, m)
		for i := range ts {
			ts[i] = 1e4 / (x0 + (x1-x0)*float64(i)/float64(m-1))
		}
		return ts
	}
	var legend []legendEntry
	var pointLayers []plot.Plotter // drawn after every line and band
	p.Add(rules{})
	for i := range a.References {
		ref := a.References[i]
		sty := draw.LineStyle{Color: colRef, Width: 0.9, Dashes: []vg.Length{5, 2.5}}
		lo, hi := xmin, xmax
		if ref.TMax > 0 {
			lo = math.Max(lo, invT(ref.TMax))
		}
		if ref.TMin > 0 {
			hi = math.Min(hi, invT(ref.TMin))
		}
		if !(hi > lo) {
			continue
		}
		ts := gridT(lo, hi)
		xs, ds := make([]float64, m), make([]float64, m)
		for k, T := range ts {
			xs[k], ds[k] = invT(T), ref.D(T)
		}
		p.Add(plotFunc(func(c draw.Canvas, p *plot.Plot) { polyline(c, p, xs, mapY(ds), sty) }))
		legend = append(legend, legendEntry{"reference " + ref.Name, lineSymbol(sty)})
	}
	for gi := range a.Lines {
		l := a.Lines[gi]
		col := seriesColor(gi)
		tlo, thi := l.TRange()
		xs := make([]float64, m)
		ys, lo, hi := make([]float64, m), make([]float64, m), make([]float64, m)
		for k, T := range gridT(xmin, xmax) {
			xs[k] = invT(T)
			ys[k], _ = l.DAt(T)
			_, ci := l.DAt(T)
			lo[k], hi[k] = ci.Lo, ci.Hi
		}
		var inX, inY []float64
		for k := range xs {
			if xs[k] >= invT(thi)-1e-12 && xs[k] <= invT(tlo)+1e-12 {
				inX, inY = append(inX, xs[k]), append(inY, ys[k])
			}
		}
		px, py, plo, phi := make([]float64, len(l.Points)), make([]float64, len(l.Points)), make([]float64, len(l.Points)), make([]float64, len(l.Points))
		for k, pt := range l.Points {
			px[k], py[k] = invT(pt.T), math.Exp(pt.LnD)
			plo[k], phi[k] = pointCI(pt.Point, l.Level)
		}
		solid := draw.LineStyle{Color: col, Width: 1.3}
		dashed := draw.LineStyle{Color: col, Width: 0.8, Dashes: []vg.Length{2, 2}}
		g := draw.GlyphStyle{Color: col, Radius: 2.4, Shape: seriesGlyph(gi)}
		bandCol := tint(col, 0.16)
		p.Add(plotFunc(func(c draw.Canvas, p *plot.Plot) {
			if l.HasCI {
				band(c, p, xs, mapY(lo), mapY(hi), bandCol)
			}
			polyline(c, p, xs, mapY(ys), dashed)
			polyline(c, p, inX, mapY(inY), solid)
		}))
		pointLayers = append(pointLayers, plotFunc(func(c draw.Canvas, p *plot.Plot) {
			vbars(c, p, px, mapY(plo), mapY(phi), draw.LineStyle{Color: col, Width: 0.7}, 3)
			marks(c, p, px, mapY(py), g)
		}))
		label := groupLabel(l) + ": Q = " + QText(l.Q, l.QCI(), l.Level)
		sym := combined(bandSymbol(bandCol, &solid), glyphSymbol(g))
		if !l.HasCI {
			sym = combined(lineSymbol(solid), glyphSymbol(g))
		}
		legend = append(legend, legendEntry{label, sym})
	}
	p.Add(pointLayers...)
	if len(a.Parts) > 0 {
		partG := draw.GlyphStyle{Color: colInk, Radius: 2.6, Shape: openDiamondGlyph{}}
		px, py, plo, phi := make([]float64, len(a.Parts)), make([]float64, len(a.Parts)), make([]float64, len(a.Parts)), make([]float64, len(a.Parts))
		for k, pp := range a.Parts {
			px[k], py[k] = invT(pp.T), pp.D
			plo[k], phi[k] = math.NaN(), math.NaN()
			if pp.CI.Lo > 0 && pp.CI.Hi > 0 {
				plo[k], phi[k] = invT(pp.CI.Hi), invT(pp.CI.Lo)
			}
		}
		parts := a.Parts
		p.Add(plotFunc(func(c draw.Canvas, p *plot.Plot) {
			hbars(c, p, mapY(py), plo, phi, draw.LineStyle{Color: colInk, Width: 0.8}, 4)
			marks(c, p, px, mapY(py), partG)
			tx, ty := p.Transforms(&c)
			ts := textStyle(sizeTick, colInk, false)
			ts.YAlign = draw.YTop
			for k, pp := range parts {
				if !finite(yv(py[k])) {
					continue
				}
				pt := vg.Point{X: tx(px[k]) + 6, Y: ty(yv(py[k])) - 7}
				if c.Contains(pt) {
					c.FillText(ts, pt, pp.ID)
				}
			}
		}))
		legend = append(legend, legendEntry{"back-calculated part (temperature interval)", glyphSymbol(partG)})
	}

	title := "Arrhenius plot"
	var sub []string
	if n := len(a.Lines); n > 1 {
		sub = append(sub, fmt.Sprintf("%d groups", n))
	}
	if len(a.Lines) > 0 {
		sub = append(sub, Level(a.Lines[0].Level)+" confidence bands of the mean lines")
	}
	sub = append(sub, "dashed: extrapolated")
	fig := &Figure{
		Name:   "arrhenius",
		Title:  "Arrhenius plot: diffusion coefficient D against inverse temperature, with fitted lines, confidence bands and temperature axis on top",
		Width:  figWidth,
		Height: 12 * vg.Centimeter,
	}
	fig.paint = func(c draw.Canvas) {
		c = drawTitle(c, title, strings.Join(sub, " · "))
		c.Max.Y -= 30 // room for the temperature axis
		p.Draw(c)
		dc := p.DataCanvas(c)
		drawTempAxis(dc, p, o.TempUnit)
		drawLegend(dc, legend, false, false)
	}
	return fig, nil
}

// drawTempAxis draws a temperature axis along the top of the data area dc
// of an Arrhenius plot whose x is 10⁴/T.
func drawTempAxis(dc draw.Canvas, p *plot.Plot, u TempUnit) {
	tx, _ := p.Transforms(&dc)
	line := draw.LineStyle{Color: colInk, Width: 0.6}
	y := dc.Max.Y
	dc.StrokeLine2(line, dc.Min.X, y, dc.Max.X, y)
	tHi, tLo := u.FromKelvin(1e4/p.X.Min), u.FromKelvin(1e4/p.X.Max)
	if !(tHi > tLo) {
		return
	}
	step, _ := niceStep((tHi - tLo) / 5)
	last := stepDecimals(step)
	ts := textStyle(sizeTick, colInk, false)
	ts.XAlign, ts.YAlign = draw.XCenter, draw.YBottom
	for v := math.Ceil(tLo/step) * step; v <= tHi+1e-9; v += step {
		x := tx(invT(u.ToKelvin(v)))
		if x < dc.Min.X-0.5 || x > dc.Max.X+0.5 {
			continue
		}
		dc.StrokeLine2(line, x, y, x, y+3.5)
		dc.FillText(ts, vg.Point{X: x, Y: y + 5}, Number(v, last))
	}
	ls := textStyle(sizeLabel, colInk, false)
	ls.XAlign, ls.YAlign = draw.XCenter, draw.YBottom
	dc.FillText(ls, vg.Point{X: (dc.Min.X + dc.Max.X) / 2, Y: y + 17}, "temperature ("+u.Symbol()+")")
}

// LotsFigure draws the lot comparison: every point's D divided by the
// reference group's fitted line at the point's temperature, against
// temperature, on a logarithmic axis (the reference group scatters about
// 1); and at the comparison temperature, each group's estimated ratio
// with its interval. The subtitle gives the verdict of the F-test.
func LotsFigure(cmp *arrhenius.Comparison, lines []arrhenius.Line, o FigureOptions) (*Figure, error) {
	if cmp == nil || len(cmp.Ratios) == 0 {
		return nil, fmt.Errorf("lot comparison figure: no comparison to draw")
	}
	refName := cmp.Ratios[0].Reference
	var ref *arrhenius.Line
	for i := range lines {
		if lines[i].Group == refName {
			ref = &lines[i]
		}
	}
	if ref == nil {
		return nil, fmt.Errorf("lot comparison figure: no fitted line for the reference group %q", refName)
	}
	u := o.TempUnit
	type series struct {
		name         string
		t, r, lo, hi []float64
	}
	var ss []series
	tmin, tmax := math.Inf(1), math.Inf(-1)
	rmin, rmax := 1.0, 1.0
	for _, l := range lines {
		s := series{name: groupLabel(l)}
		for _, pt := range l.Points {
			dref, _ := ref.DAt(pt.T)
			lo, hi := pointCI(pt.Point, l.Level)
			s.t = append(s.t, u.FromKelvin(pt.T))
			s.r = append(s.r, math.Exp(pt.LnD)/dref)
			s.lo, s.hi = append(s.lo, lo/dref), append(s.hi, hi/dref)
			tmin, tmax = math.Min(tmin, u.FromKelvin(pt.T)), math.Max(tmax, u.FromKelvin(pt.T))
			for _, v := range []float64{math.Exp(pt.LnD) / dref, lo / dref, hi / dref} {
				if v > 0 && finite(v) {
					rmin, rmax = math.Min(rmin, v), math.Max(rmax, v)
				}
			}
		}
		ss = append(ss, s)
	}
	tref := u.FromKelvin(cmp.Ratios[0].TRef)
	tmin, tmax = math.Min(tmin, tref), math.Max(tmax, tref)
	for _, r := range cmp.Ratios {
		for _, v := range []float64{r.Value, r.CI.Lo, r.CI.Hi} {
			if v > 0 && finite(v) {
				rmin, rmax = math.Min(rmin, v), math.Max(rmax, v)
			}
		}
	}
	span := tmax - tmin
	if span == 0 {
		span = 20
	}
	lspan := math.Max(math.Log10(rmax)-math.Log10(rmin), 0.3)
	p := newPlot()
	p.X.Min, p.X.Max = tmin-0.08*span, tmax+0.08*span
	p.X.Label.Text = "temperature (" + u.Symbol() + ")"
	p.Y.Min, p.Y.Max = rmin/math.Pow(10, 0.12*lspan), rmax*math.Pow(10, 0.12*lspan)
	p.Y.Scale = plot.LogScale{}
	p.Y.Tick.Marker = ratioTicks{}
	p.Y.Label.Text = "D / D of lot " + refName + " line"
	if ref.By != "" && !strings.EqualFold(ref.By, "lot") {
		p.Y.Label.Text = "D / D of " + ref.By + " " + refName + " line"
	}
	p.Add(rules{}, plotFunc(func(c draw.Canvas, p *plot.Plot) {
		tx, ty := p.Transforms(&c)
		c.StrokeLine2(draw.LineStyle{Color: colMuted, Width: 0.8, Dashes: []vg.Length{4, 2}}, c.Min.X, ty(1), c.Max.X, ty(1))
		// The comparison temperature: a dotted line, named at its top.
		c.StrokeLine2(draw.LineStyle{Color: colRef, Width: 0.7, Dashes: []vg.Length{1.2, 2}}, tx(tref), c.Min.Y, tx(tref), c.Max.Y)
		ts := textStyle(sizeTick, colMuted, false)
		ts.XAlign, ts.YAlign = draw.XCenter, draw.YBottom
		c.FillText(ts, vg.Point{X: tx(tref), Y: c.Max.Y + 2}, TemperatureShort(cmp.Ratios[0].TRef, u))
	}))
	var legend []legendEntry
	offset := 0.012 * span
	for gi, s := range ss {
		col := seriesColor(gi)
		g := draw.GlyphStyle{Color: col, Radius: 2.3, Shape: seriesGlyph(gi)}
		xs := make([]float64, len(s.t))
		for k := range s.t {
			xs[k] = s.t[k] + offset*(float64(gi)-float64(len(ss)-1)/2)
		}
		s := s
		p.Add(plotFunc(func(c draw.Canvas, p *plot.Plot) {
			vbars(c, p, xs, s.lo, s.hi, draw.LineStyle{Color: tint(col, 0.6), Width: 0.7}, 2.5)
			marks(c, p, xs, s.r, g)
		}))
		legend = append(legend, legendEntry{s.name + " (points)", glyphSymbol(g)})
	}
	// Estimated ratios at the comparison temperature, bold, on its line:
	// one ratio sits on it, several are set side by side centred on it.
	for i, r := range cmp.Ratios {
		gi := 0
		for k, l := range lines {
			if l.Group == r.Group {
				gi = k
			}
		}
		col := seriesColor(gi)
		shift := vg.Length(9) * vg.Length(float64(i)-float64(len(cmp.Ratios)-1)/2)
		r := r
		p.Add(plotFunc(func(c draw.Canvas, p *plot.Plot) {
			// The shift is in drawing units, so that it does not depend on
			// the temperature span.
			x := []float64{tref + float64(shift)*(p.X.Max-p.X.Min)/float64(c.Max.X-c.Min.X)}
			vbars(c, p, x, []float64{r.CI.Lo}, []float64{r.CI.Hi}, draw.LineStyle{Color: col, Width: 2}, 6)
			marks(c, p, x, []float64{r.Value}, draw.GlyphStyle{Color: col, Radius: 3.6, Shape: diamondGlyph{}})
		}))
		legend = append(legend, legendEntry{fmt.Sprintf("ratio %s / %s at %s: %s", r.Group, r.Reference, TemperatureShort(r.TRef, u),
			ratioText(r.Value, r.CI, cmp.Level)), glyphSymbol(draw.GlyphStyle{Color: col, Radius: 3.2, Shape: diamondGlyph{}})})
	}
	verdict := "lines differ"
	if !cmp.Differ {
		verdict = "no significant difference"
	}
	sub := fmt.Sprintf("%s (F-test p = %s, α = %s)", verdict, Sig(cmp.PMain, 2), trimmed(cmp.Alpha, 3))
	fig := &Figure{
		Name:   "lots",
		Title:  "Lot comparison: each point's D relative to the reference lot's Arrhenius line, with the estimated ratio at the comparison temperature",
		Width:  figWidth,
		Height: 11 * vg.Centimeter,
	}
	fig.paint = func(c draw.Canvas) {
		c = drawTitle(c, "Lot comparison", sub)
		c = legendBelow(c, legend)
		c.Max.Y -= 10 // room for the comparison temperature's name
		p.Draw(c)
	}
	return fig, nil
}

// ratioText writes a ratio with its interval: "1.32 (95 % CI 1.18–1.47)".
func ratioText(v float64, ci fit.Interval, level float64) string {
	last := LastDigit(v, ci)
	return Number(v, last) + " (" + Level(level) + " CI " + IntervalAt(v, ci, last) + ")"
}

// ratioTicks label a ratio axis at 0.5, 1, 2 and the like (plain numbers),
// falling back to decades for wide ranges.
type ratioTicks struct{}

func (ratioTicks) Ticks(min, max float64) []plot.Tick {
	if !(min > 0 && max > min) {
		return nil
	}
	if max/min > 200 {
		ts := logTicks{}.Ticks(min, max)
		for i := range ts {
			if v := ts[i].Value; ts[i].Label != "" && v >= 1e-4 && v <= 1e4 {
				ts[i].Label = trimmed(v, 4) // a ratio reads plainly: 0.01, 1, 10
			}
		}
		return ts
	}
	if max/min < 3 {
		return linearTicks{}.Ticks(min, max)
	}
	var ts []plot.Tick
	for e := int(math.Floor(math.Log10(min))); e <= int(math.Ceil(math.Log10(max))); e++ {
		for _, k := range []float64{1, 1.5, 2, 3, 5, 7} {
			v := k * math.Pow(10, float64(e))
			if v < min || v > max {
				continue
			}
			label := ""
			if k == 1 || k == 2 || k == 5 || max/min < 4 {
				label = trimmed(v, 3)
			}
			ts = append(ts, plot.Tick{Value: v, Label: label})
		}
	}
	return ts
}
