package report

import (
	"fmt"
	"math"
	"sort"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"github.com/fickfit/fickfit/fit"
)

// FigureOptions control the figures. The zero value writes temperatures in
// °C and plots D on a logarithmic axis.
type FigureOptions struct {
	// TempUnit is the user's temperature unit; "" means °C.
	TempUnit TempUnit
	// LnD plots ln D (natural log, linear axis) in the Arrhenius figure
	// instead of D on a logarithmic axis.
	LnD bool
}

// Figure sizes.
const (
	figWidth  = 16 * vg.Centimeter
	figHeight = 11.5 * vg.Centimeter
)

// profileBandMin is the least drawn height of a profile's confidence band
// (points): the fitted line (1.4 pt) with a margin of about 1.5 pt of band
// on either side, visible on screen and in print.
const profileBandMin vg.Length = 4.5

// valueLabel is the y-axis label of a profile: "C (wt%)", "hardness (HV0.5)".
func valueLabel(r *fit.Result) string {
	q := ""
	if r.Meta != nil {
		q = strings.TrimSpace(r.Meta["quantity"])
	}
	unit := r.ValueUnit
	switch {
	case q == "" && strings.HasPrefix(strings.ToUpper(unit), "H"):
		q = "hardness"
	case q == "":
		q = "value"
	}
	if unit == "" {
		return q + " (unit not given)"
	}
	return q + " (" + unit + ")"
}

// ProfileFigure draws one fitted profile: the measured points, the fitted
// curve and its pointwise confidence band (Result.Curve), and beneath it a
// panel of residuals on the same depth axis. A result read back from JSON
// has no model: its curve is drawn through the fitted values at the
// measured depths, without a band.
func ProfileFigure(r *fit.Result, o FigureOptions) (*Figure, error) {
	if r == nil || len(r.Residuals) == 0 {
		return nil, fmt.Errorf("profile figure: the result has no points to draw")
	}
	n := len(r.Residuals)
	xs, ys, res := make([]float64, n), make([]float64, n), make([]float64, n)
	xmax := 0.0
	for i, p := range r.Residuals {
		xs[i], ys[i], res[i] = p.Depth, p.Observed, p.Residual
		xmax = math.Max(xmax, p.Depth)
	}
	f, depthUnit := DepthScale(xmax * 1.05)
	// Curve on a fine grid from the surface to just past the deepest point.
	const m = 161
	xEnd := xmax * 1.04
	if xEnd <= 0 {
		xEnd = 1e-6
	}
	gx := make([]float64, m)
	for i := range gx {
		gx[i] = xEnd * float64(i) / float64(m-1)
	}
	gy, glo, ghi, err := r.Curve(gx)
	haveBand := err == nil
	if !haveBand {
		gx, gy = sortedFitted(r)
	}
	scale := func(v []float64) []float64 {
		out := make([]float64, len(v))
		for i := range v {
			out[i] = v[i] / f
		}
		return out
	}
	sx, sgx := scale(xs), scale(gx)

	// y range from the data and the curve; the band may be wider and is clipped.
	ymin, ymax := math.Inf(1), math.Inf(-1)
	for _, v := range append(append([]float64(nil), ys...), gy...) {
		if finite(v) {
			ymin, ymax = math.Min(ymin, v), math.Max(ymax, v)
		}
	}
	if !(ymax > ymin) {
		ymin, ymax = ymin-1, ymax+1
	}
	span := ymax - ymin
	ymin -= 0.08 * span
	ymax += 0.1 * span

	level := Level(r.CILevel)
	top := newPlot()
	top.X.Min, top.X.Max = 0, xEnd/f
	top.Y.Min, top.Y.Max = ymin, ymax
	top.X.Tick.Marker = linearTicks{hide: true}
	top.Y.Label.Text = valueLabel(r)
	dataGlyph := draw.GlyphStyle{Color: colData, Radius: 2.6, Shape: ringGlyph{}}
	fitLine := draw.LineStyle{Color: colFit, Width: 1.4}
	dmarks := depthMarks(r, f)
	// A band thinner than the curve's line would hide under it: it is drawn
	// at least profileBandMin tall, and the legend says so when it is.
	widened := false
	top.Add(rules{}, plotFunc(func(c draw.Canvas, p *plot.Plot) {
		drawDepthMarks(c, p, dmarks)
		if haveBand {
			widened = bandAtLeast(c, p, sgx, glo, ghi, colBand, profileBandMin)
		}
		polyline(c, p, sgx, gy, fitLine)
		if r.Stats.N > 0 && hasSigma(r) {
			lo, hi := sigmaBars(r)
			vbars(c, p, sx, lo, hi, draw.LineStyle{Color: tint(colData, 0.55), Width: 0.7}, 0)
		}
		marks(c, p, sx, ys, dataGlyph)
	}))

	// Residual panel: symmetric about zero.
	rmax := 0.0
	for _, v := range res {
		rmax = math.Max(rmax, math.Abs(v))
	}
	if rmax == 0 {
		rmax = 1
	}
	bot := newPlot()
	bot.X.Min, bot.X.Max = 0, xEnd/f
	bot.Y.Min, bot.Y.Max = -1.2*rmax, 1.2*rmax
	bot.Y.Tick.Marker = linearTicks{n: 4}
	bot.X.Label.Text = "depth (" + depthUnit + ")"
	bot.Y.Label.Text = "residual"
	if r.ValueUnit != "" {
		bot.Y.Label.Text += " (" + r.ValueUnit + ")"
	}
	bot.Add(rules{}, plotFunc(func(c draw.Canvas, p *plot.Plot) {
		_, ty := p.Transforms(&c)
		c.StrokeLine2(draw.LineStyle{Color: colMuted, Width: 0.7, Dashes: []vg.Length{3, 2}}, c.Min.X, ty(0), c.Max.X, ty(0))
		zeros := make([]float64, len(res))
		vbars(c, p, sx, zeros, res, draw.LineStyle{Color: tint(colData, 0.45), Width: 0.8}, 0)
		marks(c, p, sx, res, draw.GlyphStyle{Color: colData, Radius: 2.1, Shape: draw.CircleGlyph{}})
	}))

	title := r.ID
	var sub []string
	if r.Temperature > 0 {
		sub = append(sub, TemperatureShort(r.Temperature, o.TempUnit))
	}
	if r.Time > 0 {
		sub = append(sub, Duration(r.Time))
	}
	if r.Lot != "" {
		sub = append(sub, "lot "+r.Lot)
	}
	if d := r.Param("D"); d != nil {
		name, unit := "D", "m2/s"
		if r.Time == 0 {
			name, unit = "Dt", "m2"
		}
		sub = append(sub, name+" = "+Number(d.Value, LastDigit(d.Value, d.CI))+" "+PrettyUnit(unit))
	}
	sub = append(sub, r.Model+" model")

	// Legend on the side away from the curve's far end.
	farHigh := false
	if len(gy) > 0 {
		farHigh = gy[len(gy)-1] > ymin+0.55*(ymax-ymin)
	}
	entries := []legendEntry{
		{"measured", glyphSymbol(dataGlyph)},
		{"fitted (" + r.Model + ")", lineSymbol(fitLine)},
	}
	bandEntry := func() legendEntry {
		label := level + " confidence band of the curve"
		if widened {
			label += " (widened to stay visible)"
		}
		return legendEntry{label, bandSymbol(colBand, &fitLine)}
	}

	fig := &Figure{
		Name:   "profile-" + fileSafe(r.ID),
		Title:  fmt.Sprintf("Profile %s: measured %s against depth with the fitted %s curve and the residuals", r.ID, valueLabel(r), r.Model),
		Width:  figWidth,
		Height: figHeight,
	}
	if haveBand {
		fig.Title = strings.Replace(fig.Title, " curve and", " curve, its "+level+" confidence band and", 1)
	}
	fig.paint = func(c draw.Canvas) {
		c = drawTitle(c, title, strings.Join(sub, " · "))
		h := c.Max.Y - c.Min.Y
		gap := vg.Length(6)
		cb := c
		cb.Max.Y = c.Min.Y + 0.3*h
		ct := c
		ct.Min.Y = cb.Max.Y + gap
		ct, cb = alignPair(top, bot, ct, cb)
		top.Draw(ct)
		bot.Draw(cb)
		legend := entries
		if haveBand {
			legend = append(legend[:len(legend):len(legend)], bandEntry())
		}
		legend = append(legend[:len(legend):len(legend)], depthLegend(dmarks, level)...)
		drawLegend(top.DataCanvas(ct), legend, farHigh, false)
	}
	return fig, nil
}

func hasSigma(r *fit.Result) bool {
	d := r.Data()
	return d != nil && d.W != nil
}

// sigmaBars returns value ± σ from the fit's weights.
func sigmaBars(r *fit.Result) (lo, hi []float64) {
	d := r.Data()
	lo, hi = make([]float64, len(d.Y)), make([]float64, len(d.Y))
	for i, y := range d.Y {
		s := 1 / math.Sqrt(d.W[i])
		lo[i], hi[i] = y-s, y+s
	}
	return lo, hi
}

// sortedFitted returns the fitted values at the measured depths, by depth.
func sortedFitted(r *fit.Result) (x, y []float64) {
	idx := make([]int, len(r.Residuals))
	for i := range idx {
		idx[i] = i
	}
	sort.SliceStable(idx, func(a, b int) bool { return r.Residuals[idx[a]].Depth < r.Residuals[idx[b]].Depth })
	for _, i := range idx {
		x = append(x, r.Residuals[i].Depth)
		y = append(y, r.Residuals[i].Fitted)
	}
	return x, y
}

// fileSafe turns an id into a file-name fragment: letters, digits, '-',
// '_' and '.' kept, anything else replaced by '_'.
func fileSafe(id string) string {
	var b strings.Builder
	for _, r := range id {
		switch {
		case r >= 'a' && r <= 'z', r >= 'A' && r <= 'Z', r >= '0' && r <= '9', r == '-', r == '_', r == '.':
			b.WriteRune(r)
		default:
			b.WriteByte('_')
		}
	}
	s := strings.Trim(b.String(), ".")
	if s == "" {
		s = "profile"
	}
	return s
}
