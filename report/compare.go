package report

import (
	"bufio"
	"io"
	"strings"

	"github.com/fickfit/fickfit/arrhenius"
	"github.com/fickfit/fickfit/internal/tempfmt"
)

// Comparison is the Document of a lot comparison (fickfit compare). Its
// JSON is the comparison's wire form (arrhenius.ComparisonJSON).
type Comparison struct {
	Comparison *arrhenius.Comparison
	// NotUsed are the inputs the comparison was made without (--keep-going).
	NotUsed []NotUsed
}

func (c Comparison) comparison() *arrhenius.Comparison {
	if c.Comparison == nil {
		return &arrhenius.Comparison{}
	}
	return c.Comparison
}

// WriteJSON writes the comparison with "fickfit_version" first.
func (c Comparison) WriteJSON(w io.Writer) error {
	return writeJSON(w, struct {
		envelope
		arrhenius.ComparisonJSON
		NotUsed []NotUsed `json:"not_used,omitempty"`
	}{envelope{versionOr("")}, c.comparison().JSON(), c.NotUsed})
}

// WriteCSV writes the tables comparison, test and ratio.
func (c Comparison) WriteCSV(w io.Writer) error {
	return writeCSVTables(w, func(t *viewCSV) {
		viewComparisonCSV(t, c.comparison())
		viewNotUsedCSV(t, c.NotUsed)
	})
}

// WriteText writes the comparison for people, then its cautions.
func (c Comparison) WriteText(w io.Writer, o TextOptions) error {
	return writeTextWithCautions(w, o, viewCompareCautions, false, func(bw *bufio.Writer) {
		viewComparisonText(bw, c.comparison(), o)
		writeNotUsedText(bw, "Not used:", c.NotUsed, o.width())
	})
}

// viewCompareCautions accompany every lot comparison.
var viewCompareCautions = []string{
	"The tests assume that each group follows a straight Arrhenius line and that the stated errors of ln D are right up to one common factor.",
	"A significant difference is not necessarily one that matters for the parts, and no significant difference does not show that the groups are equal: judge the size of the ratio and its interval.",
	"The applicable specifications decide acceptance; defer to local codes and to licensed engineering judgement.",
}

func viewComparisonCSV(c *viewCSV, cmp *arrhenius.Comparison) {
	c.table("comparison", "by", "groups", "n_points", "differ", "p", "alpha", "ci_level", "scale", "verdict", "warnings")
	np := make([]string, len(cmp.NPoints))
	for i, n := range cmp.NPoints {
		np[i] = viewInt(n)
	}
	c.add("comparison", cmp.By, strings.Join(cmp.Groups, ";"), strings.Join(np, ";"), viewBool(cmp.Differ),
		csvNumber(cmp.PMain), csvNumber(cmp.Alpha), csvNumber(cmp.Level), csvNumber(cmp.Scale), tempfmt.Plain(cmp.Verdict), viewCodes(cmp.Warnings))
	c.table("test", "test", "description", "F", "df1", "df2", "p", "rss_reduced", "rss_full")
	for _, t := range cmp.Tests {
		c.add("test", t.Name, t.Description, csvNumber(t.F), viewInt(t.DF1), viewInt(t.DF2), csvNumber(t.P),
			csvNumber(t.RSSReduced), csvNumber(t.RSSFull))
	}
	c.table("ratio", "group", "reference", "temperature_K", "D_ratio", "ci_lo", "ci_hi", "p", "model")
	for _, r := range cmp.Ratios {
		c.add("ratio", r.Group, r.Reference, csvNumber(r.TRef), csvNumber(r.Value), csvNumber(r.CI.Lo), csvNumber(r.CI.Hi),
			csvNumber(r.P), r.Model)
	}
	if len(cmp.Pairs) > 0 {
		c.table("pair", "a", "b", "temperature_K", "D_ratio_b_to_a", "ci_lo", "ci_hi", "p", "p_adjusted", "differ", "model")
		for _, p := range cmp.Pairs {
			c.add("pair", p.A, p.B, csvNumber(p.TRef), csvNumber(p.Ratio), csvNumber(p.CI.Lo), csvNumber(p.CI.Hi),
				csvNumber(p.P), csvNumber(p.PAdjusted), viewBool(p.Differ), p.Model)
		}
	}
}

func viewComparisonText(w *bufio.Writer, c *arrhenius.Comparison, o TextOptions) {
	t := viewText{w, o}
	u := o.TempUnit
	groups := make([]string, len(c.Groups))
	for i, g := range c.Groups {
		groups[i] = g
		if i < len(c.NPoints) {
			groups[i] += " (" + viewInt(c.NPoints[i]) + " points)"
		}
	}
	t.line("", "Comparison by "+c.By+": "+strings.Join(groups, ", "))
	w.WriteString("\n")
	t.line("  Verdict: ", Temps(c.Verdict, u))
	w.WriteString("\n")
	t.line("  ", "Extra-sum-of-squares F-tests at the "+trimmed(100*c.Alpha, 2)+" % significance level (the first is the main test)")
	tb := Table{Header: []string{"test", "F", "df", "p"}, Align: []Align{Left, Right, Left, Right}, Indent: "  "}
	for _, ft := range c.Tests {
		tb.Add(ft.Description, Sig(ft.F, 3), viewInt(ft.DF1)+", "+viewInt(ft.DF2), viewP(ft.P))
	}
	tb.WriteTo(w)
	if len(c.Ratios) > 0 {
		w.WriteString("\n")
		t.line("  ", "Ratio of D to the reference group")
		rt := Table{Header: []string{"group", "reference", "T", "D ratio", Level(c.Level) + " CI", "p", "model"},
			Align: []Align{Left, Left, Left, Right, Left, Right, Left}, Indent: "  "}
		for _, r := range c.Ratios {
			last := t.n().lastDigit(r.Value, r.CI)
			rt.Add(r.Group, r.Reference, Temperature(r.TRef, u), Number(r.Value, last), IntervalAt(r.Value, r.CI, last), viewP(r.P), r.Model)
		}
		rt.WriteTo(w)
	}
	if len(c.Pairs) > 0 {
		w.WriteString("\n")
		t.line("  ", "Every pair at "+Temperature(c.Pairs[0].TRef, u)+": ratio of D (second to first), p-values adjusted for "+viewInt(len(c.Pairs))+" comparisons by Holm's method; each interval is for its pair alone")
		pt := Table{Header: []string{"pair", "D ratio", Level(c.Level) + " CI", "p", "p adjusted", "verdict"},
			Align: []Align{Left, Right, Left, Right, Right, Left}, Indent: "  "}
		for _, p := range c.Pairs {
			last := LastDigit(p.Ratio, p.CI)
			pt.Add(p.A+" – "+p.B, Number(p.Ratio, last), IntervalAt(p.Ratio, p.CI, last), viewP(p.P), viewP(p.PAdjusted), pairVerdict(p))
		}
		pt.WriteTo(w)
	}
	if c.Scale > 1 {
		t.line("  ", "The covariance of the ratios was scaled by "+Sig(c.Scale, 3)+" (the squared Birge ratio of the most general model): the points scatter more than their stated errors.")
	}
	for _, wn := range c.Warnings {
		t.line("  ! ", warnText(wn, u))
	}
}

// pairVerdict says in words what a pair's adjusted test found.
func pairVerdict(p arrhenius.Pair) string {
	if p.Differ {
		return "differ"
	}
	return "no significant difference"
}
