package report

import (
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"github.com/fickfit/fickfit/fit"
)

// Case and decarburization depths drawn on a profile figure: the level
// searched for as a dashed horizontal line, the depth from the fitted
// curve as a vertical line, and its interval as a pale span.

var (
	colLevel = colMuted
	colSpan  = tint(colMuted, 0.14)
)

// depthMark is one depth to draw, in the figure's depth unit (scaled).
type depthMark struct {
	level, depth, lo, hi float64
	label                string
}

// depthMarks lists the depths of r to draw, depths divided by f.
func depthMarks(r *fit.Result, f float64) []depthMark {
	var out []depthMark
	for _, e := range []*fit.DepthEstimate{r.CaseDepth, r.DecarbDepth} {
		if e == nil || !finite(e.Level) {
			continue
		}
		name := "case depth"
		if e.Kind == "decarburization" {
			name = "decarburization depth"
		}
		label := name + " at " + e.Threshold + ": "
		if finite(e.Depth) {
			label += depthShort(e)
		} else {
			label += "not reached"
		}
		out = append(out, depthMark{level: e.Level, depth: e.Depth / f, lo: e.CI.Lo / f, hi: e.CI.Hi / f, label: label})
	}
	return out
}

// drawDepthMarks draws the marks on the data canvas of p.
func drawDepthMarks(c draw.Canvas, p *plot.Plot, marks []depthMark) {
	tx, ty := p.Transforms(&c)
	levelLine := draw.LineStyle{Color: colLevel, Width: 0.8, Dashes: []vg.Length{4, 2.5}}
	depthLine := draw.LineStyle{Color: colInk, Width: 1}
	for _, m := range marks {
		if finite(m.lo) && finite(m.hi) && m.hi > m.lo {
			x0, x1 := tx(math.Max(m.lo, p.X.Min)), tx(math.Min(m.hi, p.X.Max))
			if x1 > x0 {
				c.FillPolygon(colSpan, c.ClipPolygonXY([]vg.Point{{X: x0, Y: c.Min.Y}, {X: x1, Y: c.Min.Y}, {X: x1, Y: c.Max.Y}, {X: x0, Y: c.Max.Y}}))
			}
		}
		if m.level >= p.Y.Min && m.level <= p.Y.Max {
			y := ty(m.level)
			c.StrokeLine2(levelLine, c.Min.X, y, c.Max.X, y)
		}
		if finite(m.depth) && m.depth >= p.X.Min && m.depth <= p.X.Max {
			x := tx(m.depth)
			c.StrokeLine2(depthLine, x, c.Min.Y, x, c.Max.Y)
		}
	}
}

func vlineSymbol(sty draw.LineStyle) func(c *draw.Canvas, pt vg.Point, w vg.Length) {
	return func(c *draw.Canvas, pt vg.Point, w vg.Length) {
		c.StrokeLine2(sty, pt.X, pt.Y-3.5, pt.X, pt.Y+3.5)
	}
}

// depthLegend are the legend entries of the marks.
func depthLegend(marks []depthMark, level string) []legendEntry {
	var out []legendEntry
	for _, m := range marks {
		out = append(out, legendEntry{m.label + ", " + level + " CI shaded", combined(
			bandSymbol(colSpan, nil), vlineSymbol(draw.LineStyle{Color: colInk, Width: 1}))})
	}
	if len(marks) > 0 {
		out = append(out, legendEntry{"threshold level", lineSymbol(draw.LineStyle{Color: colLevel, Width: 0.8, Dashes: []vg.Length{4, 2.5}})})
	}
	return out
}
