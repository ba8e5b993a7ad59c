package report

import (
	"bytes"
	"fmt"
	"image/color"
	"image/png"
	"io"
	"math"
	"regexp"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgsvg"
)

// The house style of fickfit's figures: white ground, ink-coloured axes on
// the left and bottom only, faint horizontal rules, one sans-serif face in
// three sizes, and a small palette of muted pigments — slate teal for
// measurements, copper for fitted curves, their pale tints for confidence
// bands. Colours are opaque (bands are pre-blended tints) so that figures
// print the same on every device.

func rgbHex(v uint32) color.NRGBA {
	return color.NRGBA{R: uint8(v >> 16), G: uint8(v >> 8), B: uint8(v), A: 255}
}

// tint blends c with white: f = 0 gives white, 1 gives c.
func tint(c color.Color, f float64) color.NRGBA {
	r, g, b, _ := c.RGBA()
	mix := func(v uint32) uint8 { return uint8(math.Round(255 - f*(255-float64(v>>8)))) }
	return color.NRGBA{R: mix(r), G: mix(g), B: mix(b), A: 255}
}

var (
	colInk   = rgbHex(0x1d2a33) // text and axes
	colMuted = rgbHex(0x5c6a74) // secondary text
	colRule  = rgbHex(0xe2e6e9) // grid rules
	colData  = rgbHex(0x22606c) // measured points
	colFit   = rgbHex(0xa4452c) // fitted curves
	colBand  = tint(colFit, 0.3)
	colRef   = rgbHex(0x7d8a94) // reference-table lines
	// seriesColors tell groups (lots) apart, in order: eight colours that
	// stay apart for readers with a colour-vision deficiency. The hue
	// families are those of the colour set of M. Okabe & K. Ito, Color
	// Universal Design (CUD): how to make figures and presentations that
	// are friendly to colorblind people, 2008 (blue, vermillion, bluish
	// green, reddish purple, orange, sky blue, black), darkened so that each
	// has a contrast of at least 3:1 on white (thin lines and small marks
	// stay visible) and shifted by us until every pair differs by ΔE*ab ≥ 14
	// for normal vision and for simulated protanopia, deuteranopia and
	// tritanopia (Machado, Oliveira & Fernandes 2009; figure_test.go checks
	// it). The first two are the house teal and copper; the order puts the
	// pairs that differ most in lightness early.
	seriesColors = []color.NRGBA{
		rgbHex(0x22606c), // teal
		rgbHex(0xa4452c), // copper
		rgbHex(0x5c4a9e), // violet
		rgbHex(0xb88a12), // ochre
		rgbHex(0x4e8fe0), // sky
		rgbHex(0x169e6a), // green
		rgbHex(0x5b4636), // umber
		rgbHex(0xc46a9c), // rose
	}
)

// seriesColor is the colour of group i; groups beyond the eighth repeat
// the colours (their marker shapes still differ from their namesakes'
// up to the twelfth).
func seriesColor(i int) color.NRGBA { return seriesColors[i%len(seriesColors)] }

// seriesGlyphs give each group its own marker shape as well as colour, so
// that groups stay apart in grey print: filled circle, square, triangle,
// diamond, inverted triangle, star, pentagon and cross.
var seriesGlyphs = []draw.GlyphDrawer{
	draw.CircleGlyph{}, draw.BoxGlyph{}, polyGlyph{n: 3}, diamondGlyph{}, polyGlyph{n: 3, down: true},
	polyGlyph{n: 5, star: true}, polyGlyph{n: 5}, crossGlyph{},
}

func seriesGlyph(i int) draw.GlyphDrawer { return seriesGlyphs[i%len(seriesGlyphs)] }

// Font sizes (points).
const (
	sizeTick  = 8
	sizeLabel = 9
	sizeTitle = 10.5
)

// weightBold is golang.org/x/image/font.WeightBold (font.Font.Weight's
// type), written as its value so as not to import that module directly.
const weightBold = 3

func textStyle(size vg.Length, col color.Color, bold bool) text.Style {
	f := font.Font{Typeface: "Liberation", Variant: "Sans", Size: size}
	if bold {
		f.Weight = weightBold
	}
	return text.Style{Color: col, Font: f, Handler: figText, XAlign: draw.XLeft, YAlign: draw.YBottom}
}

// newPlot returns a plot in the house style.
func newPlot() *plot.Plot {
	p := plot.New()
	p.BackgroundColor = color.White
	for _, a := range []*plot.Axis{&p.X, &p.Y} {
		a.LineStyle = draw.LineStyle{Color: colInk, Width: 0.6}
		a.Tick.LineStyle = draw.LineStyle{Color: colInk, Width: 0.6}
		a.Tick.Length = 3.5
		a.Padding = 0
		a.Label.TextStyle = textStyle(sizeLabel, colInk, false)
		a.Label.Padding = 3
		ts := textStyle(sizeTick, colInk, false)
		a.Tick.Label = ts
		a.Tick.Marker = linearTicks{}
	}
	p.X.Tick.Label.XAlign, p.X.Tick.Label.YAlign = draw.XCenter, draw.YTop
	p.Y.Tick.Label.XAlign, p.Y.Tick.Label.YAlign = draw.XRight, draw.YCenter
	p.X.Label.TextStyle.XAlign, p.X.Label.TextStyle.YAlign = draw.XCenter, draw.YBottom
	p.Y.Label.TextStyle.XAlign, p.Y.Label.TextStyle.YAlign = draw.XCenter, draw.YBottom
	p.TextHandler = figText
	p.Title.TextStyle.Handler = figText
	return p
}

// linearTicks place five to seven labelled ticks at steps of 1, 2, 2.5 or 5
// times a power of ten, with unlabelled minor ticks between, written the
// house way (true minus sign, decimals set by the step). hide keeps the
// marks but leaves the labels out (a panel sharing the x axis of the one
// below).
type linearTicks struct {
	hide bool
	// n is the number of steps aimed at; 0 means 6.
	n int
}

func (t linearTicks) Ticks(min, max float64) []plot.Tick {
	if !(max > min) || !finite(min) || !finite(max) {
		return nil
	}
	n := t.n
	if n <= 0 {
		n = 6
	}
	step, minor := niceStep((max - min) / float64(n))
	last := stepDecimals(step)
	var ts []plot.Tick
	start := math.Ceil(min/minor-1e-9) * minor
	for i := 0; ; i++ {
		v := start + float64(i)*minor
		if v > max+1e-9*(max-min) {
			break
		}
		if i > 1000 {
			break
		}
		k := v / step
		if math.Abs(k-math.Round(k)) < 1e-6 {
			v = math.Round(k) * step
			label := Number(v, last)
			if v == 0 {
				label = Number(0, last)
			}
			if useSci(v) {
				label = Sig(v, 3)
			}
			if t.hide {
				label = " " // keeps the tick mark, draws nothing
			}
			ts = append(ts, plot.Tick{Value: v, Label: label})
			continue
		}
		ts = append(ts, plot.Tick{Value: v})
	}
	return ts
}

// niceStep rounds raw up to 1, 2, 2.5 or 5 times a power of ten and gives
// the minor step that divides it.
func niceStep(raw float64) (step, minor float64) {
	mag := math.Pow(10, math.Floor(math.Log10(raw)))
	for _, m := range []struct{ major, minor float64 }{{1, 0.2}, {2, 0.5}, {2.5, 0.5}, {5, 1}, {10, 2}} {
		if m.major*mag >= raw*(1-1e-9) {
			return m.major * mag, m.minor * mag
		}
	}
	return 10 * mag, 2 * mag
}

// stepDecimals returns the decimal place (power of ten) that writes every
// multiple of step exactly: 0.25 → −2, 5 → 0, 200 → 0.
func stepDecimals(step float64) int {
	step = math.Abs(step)
	for k := 0; k <= 12; k++ {
		v := step * math.Pow(10, float64(k))
		if math.Abs(v-math.Round(v)) < 1e-6*v {
			return -k
		}
	}
	return -12
}

// logTicks label every decade ("10⁻¹¹") and, between decades, 2× and 5×,
// so that at least three labelled ticks fall in each decade the axis spans
// and a point can be read against labelled values rather than among bare
// minor ticks; the other integer multiples get unlabelled minor ticks.
// Under 1.2 decades 3× and 7× are labelled too; under 0.7 decade the
// labels fall at even steps (narrowLogTicks). Beyond logWideDecades only decades are
// labelled: more labels would collide on a figure's axis.
type logTicks struct{}

// logWideDecades is the widest span (decades) labelled at 1, 2 and 5.
const logWideDecades = 6

// narrowLogTicks label a logarithmic axis of less than 0.7 decade at even
// steps (1, 2, 2.5 or 5 times a power of ten, three to six labels), written
// with the digits the step needs: "1.5 × 10⁻¹⁵".
func narrowLogTicks(min, max float64) []plot.Tick {
	// A step of at most a third of the range: three labels or more.
	step, minor := niceStep((max - min) / 6)
	last := exp10(step)
	if m := step / math.Pow(10, float64(last)); math.Abs(m-math.Round(m)) > 1e-6 {
		last-- // 2.5 × 10ᵏ
	}
	var ts []plot.Tick
	start := math.Ceil(min/minor-1e-9) * minor
	for i := 0; i <= 1000; i++ {
		v := start + float64(i)*minor
		if v > max*(1+1e-9) {
			break
		}
		if k := v / step; math.Abs(k-math.Round(k)) < 1e-6 {
			v = math.Round(k) * step
			ts = append(ts, plot.Tick{Value: v, Label: Number(v, last)})
			continue
		}
		ts = append(ts, plot.Tick{Value: v})
	}
	return ts
}

func (logTicks) Ticks(min, max float64) []plot.Tick {
	if !(min > 0 && max > min) || !finite(min) || !finite(max) {
		return nil
	}
	span := math.Log10(max / min)
	if span < 0.7 {
		return narrowLogTicks(min, max)
	}
	lo, hi := int(math.Floor(math.Log10(min))), int(math.Ceil(math.Log10(max)))
	labelled := func(k int) bool {
		switch {
		case span < 1.2:
			return k == 1 || k == 2 || k == 3 || k == 5 || k == 7
		case span <= logWideDecades:
			return k == 1 || k == 2 || k == 5
		}
		return k == 1
	}
	var ts []plot.Tick
	for e := lo; e <= hi; e++ {
		base := math.Pow(10, float64(e))
		for k := 1; k <= 9; k++ {
			v := base * float64(k)
			if v < min*(1-1e-9) || v > max*(1+1e-9) {
				continue
			}
			label := ""
			switch {
			case !labelled(k):
			case k == 1:
				label = "10" + Superscript(e)
			default:
				label = fmt.Sprintf("%d × 10%s", k, Superscript(e))
			}
			ts = append(ts, plot.Tick{Value: v, Label: label})
		}
	}
	return ts
}

// rules draws faint horizontal rules at the labelled ticks of the y axis.
type rules struct{}

func (rules) Plot(c draw.Canvas, p *plot.Plot) {
	_, ty := p.Transforms(&c)
	sty := draw.LineStyle{Color: colRule, Width: 0.5}
	for _, tk := range p.Y.Tick.Marker.Ticks(p.Y.Min, p.Y.Max) {
		if tk.Label == "" || tk.Value < p.Y.Min || tk.Value > p.Y.Max {
			continue
		}
		y := ty(tk.Value)
		c.StrokeLine2(sty, c.Min.X, y, c.Max.X, y)
	}
}

// plotFunc adapts a function to plot.Plotter.
type plotFunc func(c draw.Canvas, p *plot.Plot)

func (f plotFunc) Plot(c draw.Canvas, p *plot.Plot) { f(c, p) }

// polyline draws a line through (x, y) in data units, clipped to the data area.
func polyline(c draw.Canvas, p *plot.Plot, xs, ys []float64, sty draw.LineStyle) {
	tx, ty := p.Transforms(&c)
	var pts []vg.Point
	flush := func() {
		if len(pts) > 1 {
			c.StrokeLines(sty, c.ClipLinesXY(pts)...)
		}
		pts = pts[:0]
	}
	for i := range xs {
		if !finite(xs[i]) || !finite(ys[i]) || (p.Y.Scale == plot.LogScale{} && ys[i] <= 0) {
			flush()
			continue
		}
		pts = append(pts, vg.Point{X: tx(xs[i]), Y: ty(ys[i])})
	}
	flush()
}

// band fills the area between lo and hi over xs, clipped to the data area.
func band(c draw.Canvas, p *plot.Plot, xs, lo, hi []float64, col color.Color) {
	bandAtLeast(c, p, xs, lo, hi, col, 0)
}

// bandAtLeast is band drawn at least minW tall at every x: where the band
// is thinner it is widened evenly about its middle, so that a band narrower
// than the line drawn over it still shows as a margin on both sides. It
// reports whether it widened the band anywhere.
func bandAtLeast(c draw.Canvas, p *plot.Plot, xs, lo, hi []float64, col color.Color, minW vg.Length) (widened bool) {
	tx, ty := p.Transforms(&c)
	var top, bottom []vg.Point
	flush := func() {
		if len(top) > 1 {
			poly := append([]vg.Point(nil), top...)
			for i := len(bottom) - 1; i >= 0; i-- {
				poly = append(poly, bottom[i])
			}
			c.FillPolygon(col, c.ClipPolygonXY(poly))
		}
		top, bottom = top[:0], bottom[:0]
	}
	logY := p.Y.Scale == plot.LogScale{}
	for i := range xs {
		if !finite(lo[i]) || !finite(hi[i]) || logY && (lo[i] <= 0 || hi[i] <= 0) {
			flush()
			continue
		}
		// Keep far-off values finite on the canvas; clipping does the rest.
		l, h := clampSpan(p.Y, lo[i]), clampSpan(p.Y, hi[i])
		yl, yh := ty(l), ty(h)
		if d := yh - yl; d < minW && d > -minW {
			mid := (yl + yh) / 2
			yl, yh = mid-minW/2, mid+minW/2
			widened = true
		}
		top = append(top, vg.Point{X: tx(xs[i]), Y: yh})
		bottom = append(bottom, vg.Point{X: tx(xs[i]), Y: yl})
	}
	flush()
	return widened
}

// clampSpan limits v to the axis range widened by its own span on each side.
func clampSpan(a plot.Axis, v float64) float64 {
	if a.Scale == (plot.LogScale{}) {
		lmin, lmax := math.Log10(a.Min), math.Log10(a.Max)
		s := lmax - lmin
		return math.Pow(10, math.Max(lmin-s, math.Min(lmax+s, math.Log10(v))))
	}
	s := a.Max - a.Min
	return math.Max(a.Min-s, math.Min(a.Max+s, v))
}

// marks draws glyphs at (x, y); points outside the data area are skipped.
func marks(c draw.Canvas, p *plot.Plot, xs, ys []float64, g draw.GlyphStyle) {
	tx, ty := p.Transforms(&c)
	for i := range xs {
		if !finite(xs[i]) || !finite(ys[i]) {
			continue
		}
		pt := vg.Point{X: tx(xs[i]), Y: ty(ys[i])}
		if c.Contains(pt) {
			c.DrawGlyph(g, pt)
		}
	}
}

// vbars draws vertical bars from lo to hi at xs with small caps.
func vbars(c draw.Canvas, p *plot.Plot, xs, lo, hi []float64, sty draw.LineStyle, capw vg.Length) {
	tx, ty := p.Transforms(&c)
	logY := p.Y.Scale == plot.LogScale{}
	for i := range xs {
		if !finite(xs[i]) || !finite(lo[i]) || !finite(hi[i]) || logY && (lo[i] <= 0 || hi[i] <= 0) {
			continue
		}
		x := tx(xs[i])
		y0, y1 := ty(clampSpan(p.Y, lo[i])), ty(clampSpan(p.Y, hi[i]))
		c.StrokeLines(sty, c.ClipLinesXY([]vg.Point{{X: x, Y: y0}, {X: x, Y: y1}})...)
		if capw > 0 {
			for _, y := range []vg.Length{y0, y1} {
				c.StrokeLines(sty, c.ClipLinesXY([]vg.Point{{X: x - capw/2, Y: y}, {X: x + capw/2, Y: y}})...)
			}
		}
	}
}

// hbars draws horizontal bars from lo to hi at ys with small caps.
func hbars(c draw.Canvas, p *plot.Plot, ys, lo, hi []float64, sty draw.LineStyle, capw vg.Length) {
	tx, ty := p.Transforms(&c)
	for i := range ys {
		if !finite(ys[i]) || !finite(lo[i]) || !finite(hi[i]) {
			continue
		}
		y := ty(ys[i])
		x0, x1 := tx(clampSpan(p.X, lo[i])), tx(clampSpan(p.X, hi[i]))
		c.StrokeLines(sty, c.ClipLinesXY([]vg.Point{{X: x0, Y: y}, {X: x1, Y: y}})...)
		if capw > 0 {
			for _, x := range []vg.Length{x0, x1} {
				c.StrokeLines(sty, c.ClipLinesXY([]vg.Point{{X: x, Y: y - capw/2}, {X: x, Y: y + capw/2}})...)
			}
		}
	}
}

// diamondGlyph is a filled diamond.
type diamondGlyph struct{}

func (diamondGlyph) DrawGlyph(c *draw.Canvas, sty draw.GlyphStyle, pt vg.Point) {
	c.SetColor(sty.Color)
	r := sty.Radius * 1.25
	var path vg.Path
	path.Move(vg.Point{X: pt.X, Y: pt.Y + r})
	path.Line(vg.Point{X: pt.X + r, Y: pt.Y})
	path.Line(vg.Point{X: pt.X, Y: pt.Y - r})
	path.Line(vg.Point{X: pt.X - r, Y: pt.Y})
	path.Close()
	c.Fill(path)
}

// polyGlyph is a filled regular polygon (point up, or down), or a star
// of n points, of about the area of a circle glyph of the same radius.
type polyGlyph struct {
	n          int
	down, star bool
}

func (g polyGlyph) DrawGlyph(c *draw.Canvas, sty draw.GlyphStyle, pt vg.Point) {
	c.SetColor(sty.Color)
	r := float64(sty.Radius) * 1.3
	if g.star {
		r *= 1.25
	}
	k, start := g.n, math.Pi/2
	if g.down {
		start = -math.Pi / 2
	}
	if g.star {
		k = 2 * g.n
	}
	var path vg.Path
	for i := 0; i < k; i++ {
		ri := r
		if g.star && i%2 == 1 {
			ri = r * 0.45
		}
		a := start + 2*math.Pi*float64(i)/float64(k)
		p := vg.Point{X: pt.X + vg.Length(ri*math.Cos(a)), Y: pt.Y + vg.Length(ri*math.Sin(a))}
		if i == 0 {
			path.Move(p)
		} else {
			path.Line(p)
		}
	}
	path.Close()
	c.Fill(path)
}

// crossGlyph is a filled diagonal cross (an "x" with thick arms).
type crossGlyph struct{}

func (crossGlyph) DrawGlyph(c *draw.Canvas, sty draw.GlyphStyle, pt vg.Point) {
	c.SetColor(sty.Color)
	r, w := float64(sty.Radius)*1.25, float64(sty.Radius)*0.42
	var path vg.Path
	for i := 0; i < 4; i++ {
		a := math.Pi/4 + math.Pi/2*float64(i)
		cos, sin := math.Cos(a), math.Sin(a)
		// Each arm: out along a, across by ±w, back to the centre notch.
		pts := []vg.Point{
			{X: pt.X + vg.Length(w*math.Cos(a-math.Pi/4)*math.Sqrt2), Y: pt.Y + vg.Length(w*math.Sin(a-math.Pi/4)*math.Sqrt2)},
			{X: pt.X + vg.Length(r*cos+w*sin), Y: pt.Y + vg.Length(r*sin-w*cos)},
			{X: pt.X + vg.Length(r*cos-w*sin), Y: pt.Y + vg.Length(r*sin+w*cos)},
		}
		for j, p := range pts {
			if i == 0 && j == 0 {
				path.Move(p)
			} else {
				path.Line(p)
			}
		}
	}
	path.Close()
	c.Fill(path)
}

// openDiamondGlyph is an outlined diamond, for back-calculated parts.
type openDiamondGlyph struct{}

func (openDiamondGlyph) DrawGlyph(c *draw.Canvas, sty draw.GlyphStyle, pt vg.Point) {
	c.SetLineStyle(draw.LineStyle{Color: sty.Color, Width: 1.1})
	r := sty.Radius * 1.4
	var path vg.Path
	path.Move(vg.Point{X: pt.X, Y: pt.Y + r})
	path.Line(vg.Point{X: pt.X + r, Y: pt.Y})
	path.Line(vg.Point{X: pt.X, Y: pt.Y - r})
	path.Line(vg.Point{X: pt.X - r, Y: pt.Y})
	path.Close()
	c.SetColor(color.White)
	c.Fill(path)
	c.SetColor(sty.Color)
	c.Stroke(path)
}

// ringGlyph is an outlined circle with a white centre, for measured points
// (an open mark lets the fitted curve show through).
type ringGlyph struct{}

func (ringGlyph) DrawGlyph(c *draw.Canvas, sty draw.GlyphStyle, pt vg.Point) {
	var path vg.Path
	path.Move(vg.Point{X: pt.X + sty.Radius, Y: pt.Y})
	path.Arc(pt, sty.Radius, 0, 2*math.Pi)
	path.Close()
	c.SetColor(color.White)
	c.Fill(path)
	c.SetLineStyle(draw.LineStyle{Color: sty.Color, Width: 0.9})
	c.Stroke(path)
}

// legendEntry is one line of a figure's key.
type legendEntry struct {
	label string
	// draw paints the symbol centred at pt, w wide.
	draw func(c *draw.Canvas, pt vg.Point, w vg.Length)
}

func lineSymbol(sty draw.LineStyle) func(c *draw.Canvas, pt vg.Point, w vg.Length) {
	return func(c *draw.Canvas, pt vg.Point, w vg.Length) {
		c.StrokeLine2(sty, pt.X-w/2, pt.Y, pt.X+w/2, pt.Y)
	}
}

func glyphSymbol(g draw.GlyphStyle) func(c *draw.Canvas, pt vg.Point, w vg.Length) {
	return func(c *draw.Canvas, pt vg.Point, w vg.Length) { c.DrawGlyphNoClip(g, pt) }
}

func bandSymbol(col color.Color, line *draw.LineStyle) func(c *draw.Canvas, pt vg.Point, w vg.Length) {
	return func(c *draw.Canvas, pt vg.Point, w vg.Length) {
		h := vg.Length(7)
		c.FillPolygon(col, []vg.Point{{X: pt.X - w/2, Y: pt.Y - h/2}, {X: pt.X + w/2, Y: pt.Y - h/2}, {X: pt.X + w/2, Y: pt.Y + h/2}, {X: pt.X - w/2, Y: pt.Y + h/2}})
		if line != nil {
			c.StrokeLine2(*line, pt.X-w/2, pt.Y, pt.X+w/2, pt.Y)
		}
	}
}

func combined(fs ...func(c *draw.Canvas, pt vg.Point, w vg.Length)) func(c *draw.Canvas, pt vg.Point, w vg.Length) {
	return func(c *draw.Canvas, pt vg.Point, w vg.Length) {
		for _, f := range fs {
			f(c, pt, w)
		}
	}
}

// drawLegend draws the key inside the data area dc at the top right (or
// bottom right when bottom), on a white ground.
func drawLegend(dc draw.Canvas, entries []legendEntry, bottom, left bool) {
	if len(entries) == 0 {
		return
	}
	ts := textStyle(sizeTick, colInk, false)
	ts.YAlign = draw.YCenter
	const symW, gap, pad, rowH = vg.Length(16), vg.Length(5), vg.Length(5), vg.Length(12)
	var textW vg.Length
	for _, e := range entries {
		if w := ts.Width(e.label); w > textW {
			textW = w
		}
	}
	w := pad + symW + gap + textW + pad
	h := pad + rowH*vg.Length(len(entries)) + pad/2
	x0 := dc.Max.X - w - 4
	if left {
		x0 = dc.Min.X + 4
	}
	y1 := dc.Max.Y - 4
	if bottom {
		y1 = dc.Min.Y + 4 + h
	}
	dc.FillPolygon(color.White, []vg.Point{{X: x0, Y: y1 - h}, {X: x0 + w, Y: y1 - h}, {X: x0 + w, Y: y1}, {X: x0, Y: y1}})
	for i, e := range entries {
		y := y1 - pad - rowH*vg.Length(i) - rowH/2
		e.draw(&dc, vg.Point{X: x0 + pad + symW/2, Y: y}, symW)
		dc.FillText(ts, vg.Point{X: x0 + pad + symW + gap, Y: y}, e.label)
	}
}

// legendBelow draws the key in a band at the bottom of c, entries flowing
// left to right and wrapping, and returns the canvas above the band. Used
// where no corner of the data area is reliably empty.
func legendBelow(c draw.Canvas, entries []legendEntry) draw.Canvas {
	if len(entries) == 0 {
		return c
	}
	ts := textStyle(sizeTick, colInk, false)
	ts.YAlign = draw.YCenter
	const symW, gap, sep, rowH = vg.Length(16), vg.Length(5), vg.Length(18), vg.Length(13)
	width := c.Max.X - c.Min.X
	type placed struct {
		e   legendEntry
		x   vg.Length
		row int
	}
	var items []placed
	x, row := vg.Length(0), 0
	for _, e := range entries {
		w := symW + gap + ts.Width(e.label)
		if x > 0 && x+w > width {
			x, row = 0, row+1
		}
		items = append(items, placed{e, x, row})
		x += w + sep
	}
	h := rowH*vg.Length(row+1) + 4
	for _, it := range items {
		y := c.Min.Y + h - 2 - rowH*vg.Length(it.row) - rowH/2
		it.e.draw(&c, vg.Point{X: c.Min.X + it.x + symW/2, Y: y}, symW)
		c.FillText(ts, vg.Point{X: c.Min.X + it.x + symW + gap, Y: y}, it.e.label)
	}
	c.Min.Y += h + 4
	return c
}

// Figure is a drawing ready to be written as SVG or PNG.
type Figure struct {
	// Name is the file name without extension ("profile-A3").
	Name string
	// Title says in words what the figure shows (alt text and caption).
	Title         string
	Width, Height vg.Length
	paint         func(c draw.Canvas)
}

// drawTitle writes a bold title and a grey subtitle at the top left of c
// and returns the canvas below them.
func drawTitle(c draw.Canvas, title, subtitle string) draw.Canvas {
	ts := textStyle(sizeTitle, colInk, true)
	ts.YAlign = draw.YTop
	c.FillText(ts, vg.Point{X: c.Min.X, Y: c.Max.Y}, title)
	if subtitle != "" {
		ss := textStyle(sizeTick+0.5, colMuted, false)
		ss.YAlign = draw.YTop
		c.FillText(ss, vg.Point{X: c.Min.X + ts.Width(title) + 8, Y: c.Max.Y - 1.5}, subtitle)
	}
	c.Max.Y -= ts.Height(title) + 8
	return c
}

// render paints the figure on a canvas, turning a panic of the drawing
// library into an error.
func (f *Figure) render(cv vg.CanvasWriterTo, w io.Writer) (err error) {
	defer func() {
		if r := recover(); r != nil {
			err = fmt.Errorf("drawing figure %s: %v", f.Name, r)
		}
	}()
	c := draw.New(textSafeCanvas{cv})
	c.SetColor(color.White)
	c.Fill(c.Rectangle.Path())
	f.paint(draw.Crop(c, 10, -12, 8, -10))
	_, err = cv.WriteTo(w)
	return err
}

// textSafeCanvas writes every text drawn with the control characters
// escaped (EscapeText): ids and lots reach titles, labels and legends, and
// an SVG file with a control character is not well-formed XML.
type textSafeCanvas struct{ vg.CanvasWriterTo }

func (c textSafeCanvas) FillString(f font.Face, pt vg.Point, s string) {
	c.CanvasWriterTo.FillString(f, pt, EscapeText(s))
}

var (
	svgFontFamily = regexp.MustCompile(`font-family:Liberation (Sans|Serif|Mono);`)
	svgText       = regexp.MustCompile(`(?s)<text [^>]*font-size:([0-9.]+)px[^>]*>[^<]*</text>`)
)

// superscriptTspans rewrites one SVG text element so that runs of
// superscript characters become smaller, raised tspans with ordinary
// digits (the Liberation fonts lack some superscript glyphs, and a
// viewer's fallback font would not match).
func superscriptTspans(el string) string {
	open := strings.Index(el, ">") + 1
	closeAt := strings.LastIndex(el, "</text>")
	content := el[open:closeAt]
	rs := runs(content)
	if len(rs) == 1 && !rs[0].sup {
		return el
	}
	size := 10.0
	if m := svgText.FindStringSubmatch(el); m != nil {
		fmt.Sscan(m[1], &size)
	}
	raise := supRaise * size
	var b strings.Builder
	b.WriteString(el[:open])
	up := false
	for _, r := range rs {
		switch {
		case r.sup && !up:
			fmt.Fprintf(&b, `<tspan dy="%.3g" style="font-size:%.3gpx">%s</tspan>`, -raise, supScale*size, r.s)
			up = true
		case r.sup:
			fmt.Fprintf(&b, `<tspan style="font-size:%.3gpx">%s</tspan>`, supScale*size, r.s)
		case up:
			fmt.Fprintf(&b, `<tspan dy="%.3g">%s</tspan>`, raise, r.s)
			up = false
		default:
			b.WriteString(r.s)
		}
	}
	b.WriteString(el[closeAt:])
	return b.String()
}

// WriteSVG writes the figure as a standalone SVG document. Fonts are not
// embedded; Liberation Sans is named first, then metric-compatible
// fallbacks (Arimo, Arial, Helvetica), so that text keeps its size.
func (f *Figure) WriteSVG(w io.Writer) error {
	b, err := f.svgBytes()
	if err != nil {
		return err
	}
	_, err = w.Write(b)
	return err
}

func (f *Figure) svgBytes() ([]byte, error) {
	var buf bytes.Buffer
	if err := f.render(vgsvg.New(f.Width, f.Height), &buf); err != nil {
		return nil, err
	}
	s := buf.String()
	s = svgFontFamily.ReplaceAllStringFunc(s, func(m string) string {
		fam := svgFontFamily.FindStringSubmatch(m)[1]
		switch fam {
		case "Sans":
			return "font-family:'Liberation Sans',Arimo,Arial,Helvetica,sans-serif;"
		case "Serif":
			return "font-family:'Liberation Serif',Tinos,'Times New Roman',serif;"
		}
		return "font-family:'Liberation Mono',Cousine,'Courier New',monospace;"
	})
	s = strings.Replace(s, "<!-- Generated by SVGo and Plotinum VG -->\n", "", 1)
	s = svgText.ReplaceAllStringFunc(s, superscriptTspans)
	// A title element makes the figure accessible and names it in viewers.
	if i := strings.Index(s, ">\n"); i >= 0 && strings.HasPrefix(s, "<?xml") {
		if j := strings.Index(s[i+2:], ">\n"); j >= 0 {
			k := i + 2 + j + 2
			s = s[:k] + "<title>" + htmlEscape(f.Title) + "</title>\n" + s[k:]
		}
	}
	return []byte(s), nil
}

// inlineSVG returns the SVG for embedding in HTML: without the XML
// prelude, scaled to the width of its container.
func (f *Figure) inlineSVG() (string, error) {
	b, err := f.svgBytes()
	if err != nil {
		return "", err
	}
	s := string(b)
	if strings.HasPrefix(s, "<?xml") {
		s = s[strings.Index(s, "\n")+1:]
	}
	s = regexp.MustCompile(`^<svg width="[^"]*" height="[^"]*"`).ReplaceAllString(s,
		`<svg role="img" aria-label="`+htmlEscape(f.Title)+`" class="fig"`)
	return s, nil
}

// DefaultDPI is the resolution of PNG figures: about 950 pixels across a
// 16 cm figure, sharp on screens and adequate in print (the SVG is the
// figure for publication).
const DefaultDPI = 150

// WritePNG writes the figure as a PNG image at dpi dots per inch (0 means DefaultDPI).
func (f *Figure) WritePNG(w io.Writer, dpi int) error {
	if dpi <= 0 {
		dpi = DefaultDPI
	}
	cv := fastPNG{vgimg.NewWith(vgimg.UseWH(f.Width, f.Height), vgimg.UseDPI(dpi))}
	return f.render(cv, w)
}

// fastPNG encodes with the fastest deflate level: the figures are mostly
// flat colour, so the files stay small while encoding takes a third of
// the time of the default level.
type fastPNG struct{ *vgimg.Canvas }

func (c fastPNG) WriteTo(w io.Writer) (int64, error) {
	cw := &countWriter{w: w}
	enc := png.Encoder{CompressionLevel: png.BestSpeed}
	err := enc.Encode(cw, c.Image())
	return cw.n, err
}

type countWriter struct {
	w io.Writer
	n int64
}

func (c *countWriter) Write(b []byte) (int, error) {
	n, err := c.w.Write(b)
	c.n += int64(n)
	return n, err
}

// htmlEscape escapes text for SVG and HTML markup; control characters,
// which XML does not allow, are written as visible escapes (EscapeText).
func htmlEscape(s string) string {
	r := strings.NewReplacer("&", "&amp;", "<", "&lt;", ">", "&gt;", `"`, "&quot;", "'", "&#39;")
	return r.Replace(EscapeText(s))
}

// alignPair crops two canvases so that their data areas share left and
// right edges (a panel stacked above another).
func alignPair(p1, p2 *plot.Plot, c1, c2 draw.Canvas) (draw.Canvas, draw.Canvas) {
	d1, d2 := p1.DataCanvas(c1), p2.DataCanvas(c2)
	left := vg.Length(math.Max(float64(d1.Min.X), float64(d2.Min.X)))
	right := vg.Length(math.Min(float64(d1.Max.X), float64(d2.Max.X)))
	c1 = draw.Crop(c1, left-d1.Min.X, right-d1.Max.X, 0, 0)
	c2 = draw.Crop(c2, left-d2.Min.X, right-d2.Max.X, 0, 0)
	return c1, c2
}

// figText is the text handler of the figures. The Liberation fonts lack
// some superscript glyphs (⁰, ⁹, ⁻), so runs of superscript characters
// written by this package's formatting ("10⁻¹¹", "m²/s") are drawn as
// ordinary digits at 70 % size, raised: the same strings serve text
// reports and figures.
var figText = supText{Plain: text.Plain{Fonts: font.DefaultCache}}

type supText struct{ text.Plain }

const (
	supScale = 0.7
	supRaise = 0.36
)

var supDigits = map[rune]rune{
	'⁰': '0', '¹': '1', '²': '2', '³': '3', '⁴': '4', '⁵': '5', '⁶': '6', '⁷': '7', '⁸': '8', '⁹': '9', '⁻': '−',
}

type textRun struct {
	s   string
	sup bool
}

// runs splits a line into ordinary and superscript runs, the latter
// mapped to ordinary characters.
func runs(line string) []textRun {
	var out []textRun
	var b strings.Builder
	cur := false
	flush := func() {
		if b.Len() > 0 {
			out = append(out, textRun{b.String(), cur})
			b.Reset()
		}
	}
	for _, r := range line {
		d, sup := supDigits[r]
		if sup != cur {
			flush()
			cur = sup
		}
		if sup {
			b.WriteRune(d)
		} else {
			b.WriteRune(r)
		}
	}
	flush()
	return out
}

func (h supText) width(line string, fnt font.Font) vg.Length {
	face := h.Fonts.Lookup(fnt, fnt.Size)
	sup := h.Fonts.Lookup(fnt, fnt.Size*supScale)
	var w vg.Length
	for _, r := range runs(line) {
		if r.sup {
			w += sup.Width(r.s)
		} else {
			w += face.Width(r.s)
		}
	}
	return w
}

// Box returns the extent of one line of text with its superscripts.
func (h supText) Box(txt string, fnt font.Font) (width, height, depth vg.Length) {
	face := h.Fonts.Lookup(fnt, fnt.Size)
	ext := face.Extents()
	return h.width(txt, fnt), ext.Ascent, ext.Descent
}

// isSVGCanvas unwraps draw.Canvas layers to tell whether c draws SVG.
func isSVGCanvas(c vg.Canvas) bool {
	for i := 0; i < 16; i++ {
		switch cv := c.(type) {
		case *vgsvg.Canvas:
			return true
		case *draw.Canvas:
			c = cv.Canvas
		case draw.Canvas:
			c = cv.Canvas
		case textSafeCanvas:
			c = cv.CanvasWriterTo
		default:
			return false
		}
	}
	return false
}

// Draw draws the text as text.Plain does, superscript runs raised and smaller.
func (h supText) Draw(c vg.Canvas, txt string, sty text.Style, pt vg.Point) {
	txt = strings.TrimRight(txt, "\n")
	if len(txt) == 0 {
		return
	}
	face := h.Fonts.Lookup(sty.Font, sty.Font.Size)
	sup := h.Fonts.Lookup(sty.Font, sty.Font.Size*supScale)
	c.SetColor(sty.Color)
	if sty.Rotation != 0 {
		c.Push()
		c.Rotate(sty.Rotation)
	}
	sin64, cos64 := math.Sincos(sty.Rotation)
	cos, sin := vg.Length(cos64), vg.Length(sin64)
	pt.X, pt.Y = pt.Y*sin+pt.X*cos, pt.Y*cos-pt.X*sin
	lines := h.Lines(txt)
	ht := sty.Height(txt)
	pt.Y += ht*vg.Length(sty.YAlign) - face.Extents().Ascent
	isSVG := isSVGCanvas(c)
	for i, line := range lines {
		x := vg.Length(sty.XAlign) * h.width(line, sty.Font)
		n := vg.Length(len(lines) - i)
		at := pt.Add(vg.Point{X: x, Y: n * sty.Font.Size})
		if isSVG {
			// One text element; svgBytes turns the superscript runs into
			// raised tspans, so that the viewer lays the line out itself.
			c.FillString(face, at, line)
			continue
		}
		for _, r := range runs(line) {
			if r.sup {
				c.FillString(sup, at.Add(vg.Point{Y: supRaise * sty.Font.Size}), r.s)
				at.X += sup.Width(r.s)
				continue
			}
			c.FillString(face, at, r.s)
			at.X += face.Width(r.s)
		}
	}
	if sty.Rotation != 0 {
		c.Pop()
	}
}
