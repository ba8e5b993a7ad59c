package report

import (
	"bufio"
	"bytes"
	"strings"

	"github.com/fickfit/fickfit/fit"
)

// ParamText is one fitted parameter written for people, as the text and
// HTML reports write it: value with unit, standard error, interval (or
// "fixed").
type ParamText struct {
	Name, Value, SE, CI string
}

// ParamTexts writes the parameters of a fit for people (D as Dt when the
// time is not known), for a page that shows one profile.
func ParamTexts(r *fit.Result) []ParamText {
	out := make([]ParamText, 0, len(r.Params))
	for _, e := range r.Params {
		pt := formatParam(e, numFmt{})
		if e.Name == "D" && r.Time == 0 {
			pt.Name = "Dt"
		}
		out = append(out, ParamText(pt))
	}
	return out
}

// StatsTexts lists a fit's statistics, each "name value", as the reports do.
func StatsTexts(r *fit.Result) []string { return statsParts(r) }

// DText writes D of a fit rounded to what its interval supports, and the
// interval at the same digits; "" when the fit has no D.
func DText(r *fit.Result) (value, interval string) {
	d := r.Param("D")
	if d == nil {
		return "", ""
	}
	last := LastDigit(d.Value, d.CI)
	return Number(d.Value, last), IntervalAt(d.Value, d.CI, last)
}

// R2Text writes R² with four decimals.
func R2Text(v float64) string { return r2Text(v) }

// RatioText writes a ratio of D with its interval, as the reports do.
func RatioText(v float64, ci fit.Interval, level float64) string { return ratioText(v, ci, level) }

// ExtraText is what the text view writes below a fit's statistics: the
// case and decarburization depths and, with --model auto, the model
// comparison ("" when there is none).
func ExtraText(r *fit.Result) string {
	var b bytes.Buffer
	bw := bufio.NewWriter(&b)
	o := TextOptions{Width: 1 << 20} // one line per sentence; the page wraps
	for _, e := range []*fit.DepthEstimate{r.CaseDepth, r.DecarbDepth} {
		if e != nil {
			writeDepthText(bw, r, e, o)
		}
	}
	if r.Selection != nil {
		writeSelectionText(bw, r.Selection, o)
	}
	bw.Flush()
	lines := strings.Split(strings.TrimRight(b.String(), "\n"), "\n")
	for i, l := range lines {
		lines[i] = strings.TrimSpace(l)
	}
	return strings.Join(lines, "\n")
}
