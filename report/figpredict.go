package report

import (
	"fmt"
	"math"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"github.com/fickfit/fickfit/arrhenius"
	"github.com/fickfit/fickfit/fit"
)

// colPart is the pale band of a single part's prediction interval, wider
// than (and drawn under) the band of the mean line.
var colPart = tint(colFit, 0.09)

// PredictionFigure draws a predicted profile (fickfit predict --figure):
// the profile of the schedule with the band of the mean Arrhenius line and,
// beneath it, the wider prediction interval of a single part; with a case
// depth, the threshold level and the depth with both intervals. Only
// profile predictions can be drawn (not a time to reach a depth).
func PredictionFigure(p *arrhenius.Prediction, o FigureOptions) (*Figure, error) {
	if p == nil || len(p.Profile) < 2 {
		return nil, fmt.Errorf("prediction figure: there is no predicted profile to draw (a figure shows the profile of a schedule: give --temperature and --time, or --history)")
	}
	n := len(p.Profile)
	xs, ys := make([]float64, n), make([]float64, n)
	lo, hi, plo, phi := make([]float64, n), make([]float64, n), make([]float64, n), make([]float64, n)
	xmax := 0.0
	for _, pp := range p.Profile {
		xmax = math.Max(xmax, pp.Depth)
	}
	f, unit := DepthScale(xmax)
	havePart := false
	for i, pp := range p.Profile {
		xs[i], ys[i], lo[i], hi[i], plo[i], phi[i] = pp.Depth/f, pp.Value, pp.Lo, pp.Hi, pp.PartLo, pp.PartHi
		havePart = havePart || finite(pp.PartLo)
	}
	ymin, ymax := math.Min(p.Cs, p.C0), math.Max(p.Cs, p.C0)
	span := ymax - ymin
	pl := newPlot()
	pl.X.Min, pl.X.Max = 0, xmax/f
	pl.Y.Min, pl.Y.Max = ymin-0.06*span, ymax+0.08*span
	pl.X.Label.Text = "depth (" + unit + ")"
	pl.Y.Label.Text = "predicted level (unit of Cs and C0)"
	line := draw.LineStyle{Color: colFit, Width: 1.4}
	var marks []depthMark
	if cd := p.CaseDepth; cd != nil && finite(p.Threshold) {
		e := &fit.DepthEstimate{Depth: cd.Value, CI: cd.CI}
		marks = append(marks, depthMark{level: p.Threshold, depth: cd.Value / f, lo: cd.CI.Lo / f, hi: cd.CI.Hi / f,
			label: "case depth at " + viewGiven(p.Threshold) + " (mean line): " + depthShort(e)})
	}
	pl.Add(rules{}, plotFunc(func(c draw.Canvas, pp *plot.Plot) {
		if havePart {
			band(c, pp, xs, plo, phi, colPart)
		}
		band(c, pp, xs, lo, hi, colBand)
		if cd := p.CaseDepth; cd != nil && cd.PI != nil {
			tx, _ := pp.Transforms(&c)
			x0, x1 := tx(math.Max(cd.PI.Lo/f, pp.X.Min)), tx(math.Min(cd.PI.Hi/f, pp.X.Max))
			if x1 > x0 {
				c.FillPolygon(colPart, c.ClipPolygonXY([]vg.Point{{X: x0, Y: c.Min.Y}, {X: x1, Y: c.Min.Y}, {X: x1, Y: c.Max.Y}, {X: x0, Y: c.Max.Y}}))
			}
		}
		drawDepthMarks(c, pp, marks)
		polyline(c, pp, xs, ys, line)
	}))
	level := Level(p.Level)
	entries := []legendEntry{{"predicted profile (erf, constant surface level)", lineSymbol(line)},
		{level + " band of the mean Arrhenius line", bandSymbol(colBand, &line)}}
	if havePart {
		entries = append(entries, legendEntry{level + " prediction interval of a single part", bandSymbol(colPart, nil)})
	}
	entries = append(entries, depthLegend(marks, level)...)
	if cd := p.CaseDepth; cd != nil && cd.PI != nil {
		entries = append(entries, legendEntry{"single part: case depth " + viewLengthInterval(cd.Value, *cd.PI), bandSymbol(colPart, nil)})
	}
	hold := TemperatureShort(p.Temperature.Value, o.TempUnit) + " for " + Duration(p.Time.Value)
	if p.HistorySource != "" {
		hold = "log " + p.HistorySource + " (" + Duration(p.Time.Value) + ")"
	}
	sub := []string{hold, "Cs " + viewGiven(p.Cs), "C0 " + viewGiven(p.C0)}
	if p.Calibration.Method == "reference" {
		sub = append(sub, "literature values, not this lab's calibration")
	}
	fig := &Figure{Name: "prediction", Width: figWidth, Height: figHeight,
		Title: "Predicted profile after " + hold + " with the band of the mean Arrhenius line" +
			map[bool]string{true: " and the prediction interval of a single part", false: ""}[havePart]}
	fig.paint = func(c draw.Canvas) {
		c = drawTitle(c, "Predicted profile", strings.Join(sub, " · "))
		pl.Draw(c)
		drawLegend(pl.DataCanvas(c), entries, false, false)
	}
	return fig, nil
}
