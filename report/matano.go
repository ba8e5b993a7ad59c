package report

import (
	"bufio"
	"fmt"
	"io"
	"math"

	"github.com/fickfit/fickfit/fit/matano"
)

// Matano is the Document of D(C) analyses of diffusion couples (fickfit
// matano). Its JSON is {"matano": […]}, each result in its own wire form
// (fit/matano.Result).
type Matano []*matano.Result

// WriteJSON writes the analyses.
func (m Matano) WriteJSON(w io.Writer) error {
	return writeJSON(w, struct {
		envelope
		Matano []*matano.Result `json:"matano"`
	}{envelope{versionOr("")}, nonNilPtrs(m)})
}

// WriteCSV writes the tables matano and point.
func (m Matano) WriteCSV(w io.Writer) error {
	return writeCSVTables(w, func(c *viewCSV) { viewMatanoCSV(c, nonNilPtrs(m)) })
}

// WriteText writes each analysis for people, then the cautions of D(C).
func (m Matano) WriteText(w io.Writer, o TextOptions) error {
	return writeTextWithCautions(w, o, viewMatanoCautions, false, func(bw *bufio.Writer) { viewMatanoText(bw, nonNilPtrs(m), o) })
}

// viewMatanoCautions accompany every D(C) analysis.
var viewMatanoCautions = []string{
	"D(C) rests on the Boltzmann transformation: an infinite couple, D a function of concentration alone, fixed end compositions and no change of volume on diffusion.",
	"The band is a bootstrap of the whole smoothing procedure, including the choice of the number of terms: it covers the scatter of the measured points and the smoother's own uncertainty, not a bias of the measurement method.",
	"Verify by metallography before acting on a number; the applicable specifications decide acceptance; defer to local codes and to licensed engineering judgement.",
}

func viewMatanoCSV(c *viewCSV, rs []*matano.Result) {
	c.table("matano", "id", "method", "matano_plane_m", "time_s", "smoother_terms", "smoother_rmse", "C_left", "C_right", "warnings")
	for _, r := range rs {
		plane := ""
		if r.MatanoPlane != nil {
			plane = csvNumber(*r.MatanoPlane)
		}
		terms, cl, cr := "", "", ""
		if s := r.Smooth; s != nil {
			terms, cl, cr = viewInt(s.Terms()), csvNumber(s.CL), csvNumber(s.CR)
		}
		c.add("matano", r.ID, r.Method, plane, csvNumber(r.Time), terms, csvNumber(r.RMSE), cl, cr, viewCodes(r.Warnings))
	}
	c.table("point", "id", "C", "D_m2_s", "D_ci_lo_m2_s", "D_ci_hi_m2_s")
	for _, r := range rs {
		for _, p := range r.Points {
			c.add("point", r.ID, csvNumber(p.C), csvNumber(p.D), csvNumber(p.CI.Lo), csvNumber(p.CI.Hi))
		}
	}
}

func viewMatanoText(w *bufio.Writer, rs []*matano.Result, o TextOptions) {
	t := viewText{w, o}
	if len(rs) == 0 {
		w.WriteString("No Matano analysis.\n")
		return
	}
	for i, r := range rs {
		if i > 0 {
			w.WriteString("\n")
		}
		method := r.Method
		switch r.Method {
		case matano.BoltzmannMatano:
			method = "Boltzmann–Matano"
		case matano.SauerFreise:
			method = "Sauer–Freise"
		}
		head := "D(C) of couple " + r.ID + ": " + method
		if r.Time > 0 {
			head += ", anneal " + Duration(r.Time)
		}
		t.line("", head)
		if r.MatanoPlane != nil {
			t.field("Matano plane", "at depth "+Depth(*r.MatanoPlane)+" in the profile's depth coordinate")
		}
		if s := r.Smooth; s != nil {
			terms := "terms"
			if s.Terms() == 1 {
				terms = "term"
			}
			t.field("smoother", fmt.Sprintf("%d erf %s, end levels %s and %s, RMSE %s", s.Terms(), terms,
				Sig(s.CL, 4), Sig(s.CR, 4), Sig(r.RMSE, 2)))
		}
		t.warn(r.Warnings)
		last := 0
		if s := r.Smooth; s != nil && s.CR != s.CL {
			last = SigDigits(math.Abs(s.CR-s.CL), 4)
		}
		ciHead := "CI (bootstrap percentile)"
		if r.Level > 0 && r.Level < 1 {
			ciHead = Level(r.Level) + " CI (bootstrap percentile)"
		}
		tb := Table{Header: []string{"C", "D (m²/s)", ciHead}, Align: []Align{Right, Right, Left}, Indent: "  "}
		for _, p := range r.Points {
			c := Sig(p.C, 4)
			if r.Smooth != nil && r.Smooth.CR != r.Smooth.CL {
				c = Number(p.C, last)
			}
			if !finite(p.D) {
				tb.Add(c, "n/a", "outside the end compositions")
				continue
			}
			dl := t.n().lastDigit(p.D, p.CI)
			civ := ""
			if finite(p.CI.Lo) || finite(p.CI.Hi) {
				civ = IntervalAt(p.D, p.CI, dl)
			}
			tb.Add(c, Number(p.D, dl), civ)
		}
		w.WriteString("\n")
		tb.WriteTo(w)
	}
}
