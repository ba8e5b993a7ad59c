package report

import (
	"bufio"
	"fmt"
	"html/template"
	"io"
	"strconv"
	"strings"

	"github.com/fickfit/fickfit/arrhenius"
	"github.com/fickfit/fickfit/campaign"
	"github.com/fickfit/fickfit/fit"
	"github.com/fickfit/fickfit/profile"
)

// htmlProfile is one profile's section of the HTML report.
type htmlProfile struct {
	ID, Anchor, Lot, Source, Conditions, Short, Model, ModelName, Interval string
	D, R2                                                                  string
	SVG                                                                    template.HTML
	Params                                                                 []paramText
	Stats                                                                  []string
	Warnings                                                               []string
	Unknown                                                                bool
	// Detail tells that the profile has its section (and figure); Figure
	// is its figure file, linked from the summary table of a large
	// campaign (profileDetail).
	Detail bool
	Figure string
	// Depths are the case and decarburization depths in words, CaseDepth
	// the case depth for the summary table.
	Depths    []htmlDepth
	CaseDepth string
}

type htmlDepth struct {
	Text  string
	Notes []string
}

type htmlLine struct {
	Group, D0, Q, Corr, Points, Birge string
	Warnings                          []string
}

type htmlRatio struct{ Text string }

type htmlNotUsed struct{ What, Why string }

type htmlPart struct {
	ID, Anchor, Lot, Result string
	Warnings                []string
	Failed                  bool
	Detail                  bool // the part's profile has its section
}

type htmlView struct {
	Title, Lead           string
	Version               string
	Facts                 [][2]string
	Profiles              []htmlProfile
	Failed                []fit.Failure
	ArrheniusSVG, LotsSVG template.HTML
	Lines                 []htmlLine
	LineErrors            []campaign.GroupFailure
	Verdict               string
	Tests                 [][4]string
	Ratios                []htmlRatio
	Pairs                 [][6]string
	PairHead              string
	ComparisonError       string
	Parts                 []htmlPart
	NotUsed               []htmlNotUsed
	PartCautions          []string
	Notes                 []string
	Methods               []MethodNote
	Cautions              []string
	Inputs                []campaign.InputFile
	Options               [][2]string
	Excluded              [][5]string
	Level                 string
	TempUnit              string
	DetailNote            string // which profiles have a section, in a large campaign
	// CaseThreshold is the case-depth criterion when any profile has a
	// case depth ("" otherwise: no column).
	CaseThreshold string
}

// figureSet holds the figures of a campaign, made once and written as
// files, inline SVG and workbook charts.
type figureSet struct {
	profiles  map[string]*Figure // by profile id
	arrhenius *Figure
	lots      *Figure
	svg       map[string]string // inline SVG by figure name
	detail    profileDetail     // which profiles have a figure (and a section)
}

// makeFigures builds every figure of the campaign: the Arrhenius and lots
// figures and those of the profiles shown one by one (details).
func (res *CampaignReport) makeFigures(o CampaignOptions) (*figureSet, []string) {
	fs := &figureSet{profiles: map[string]*Figure{}, svg: map[string]string{}, detail: res.details()}
	var problems []string
	fo := FigureOptions{TempUnit: o.TempUnit}
	used := map[string]bool{"arrhenius": true, "lots": true}
	for _, r := range res.Results {
		if !fs.detail.shows(r) {
			continue
		}
		f, err := ProfileFigure(r, fo)
		if err != nil {
			problems = append(problems, r.ID+": "+err.Error())
			continue
		}
		// Two ids may map to one file name ("A/1", "A_1"): keep names unique.
		base := f.Name
		for k := 2; used[strings.ToLower(f.Name)]; k++ {
			f.Name = fmt.Sprintf("%s-%d", base, k)
		}
		used[strings.ToLower(f.Name)] = true
		fs.profiles[r.ID] = f
	}
	a := res.arrheniusPlot()
	if len(a.Lines) > 0 || len(a.Parts) > 0 {
		if f, err := ArrheniusFigure(a, fo); err == nil {
			fs.arrhenius = f
		} else {
			problems = append(problems, err.Error())
		}
	}
	if res.Comparison != nil && res.Lines != nil {
		if f, err := LotsFigure(res.Comparison, res.Lines.Lines, fo); err == nil {
			fs.lots = f
		} else {
			problems = append(problems, err.Error())
		}
	}
	return fs, problems
}

// all lists the figures in report order.
func (fs *figureSet) all(res *CampaignReport) []*Figure {
	var out []*Figure
	for _, r := range res.Results {
		if f := fs.profiles[r.ID]; f != nil {
			out = append(out, f)
		}
	}
	if fs.arrhenius != nil {
		out = append(out, fs.arrhenius)
	}
	if fs.lots != nil {
		out = append(out, fs.lots)
	}
	return out
}

// WriteHTML writes the campaign as one self-contained HTML file: inline
// CSS and SVG, no scripts, no fonts or anything else fetched from a
// network; readable on screen and when printed.
func (res *CampaignReport) WriteHTML(w io.Writer, o CampaignOptions) error {
	fs, _ := res.makeFigures(o)
	for _, f := range fs.all(res) {
		s, err := f.inlineSVG()
		if err != nil {
			return err
		}
		fs.svg[f.Name] = s
	}
	return res.writeHTML(w, o, fs)
}

func (res *CampaignReport) writeHTML(w io.Writer, o CampaignOptions, fs *figureSet) error {
	v := res.htmlView(o, fs)
	// Control characters from the inputs are written as visible escapes
	// (EscapeText): html/template leaves them, and HTML does not allow them.
	e := newTextEscaper(w)
	bw := bufio.NewWriter(e)
	if err := htmlTemplate.Execute(bw, v); err != nil {
		return fmt.Errorf("writing the HTML report: %w", err)
	}
	if err := bw.Flush(); err != nil {
		return err
	}
	return e.Close()
}

func (res *CampaignReport) htmlView(o CampaignOptions, fs *figureSet) htmlView {
	u := o.TempUnit
	level := res.Options.Level
	v := htmlView{Title: "Diffusion campaign report", Version: res.Version, Level: Level(level), TempUnit: u.Symbol(),
		Failed: res.Failed, ComparisonError: Temps(res.ComparisonError, u), Methods: MethodNotes(), Cautions: res.Cautions, Inputs: res.Inputs, Options: auditPairs(res.audit()),
		PartCautions: arrhenius.Cautions, DetailNote: fs.detail.note()}
	v.Excluded = excludedRows(res.Excluded)
	detailed := map[string]bool{}
	v.Lead = fmt.Sprintf("%d profiles from %d input files; %d fitted with the %s model, %s intervals by %s.",
		len(res.Profiles), len(res.Inputs), len(res.Results), res.Options.Model, Level(level), CIMethodDescription(fit.CIMethod(res.Options.CIMethod)))
	unknown := map[string]bool{}
	for _, p := range res.Parts {
		unknown[p.ID] = true
	}
	anchors := profileAnchors(res.Results)
	for _, r := range res.Results {
		hp := htmlProfile{ID: r.ID, Anchor: anchors[r.ID], Lot: r.Lot, Source: r.Source,
			Conditions: conditionsText(r, u), Short: shortConditions(r, u), Model: ModelDescription(r.Model), ModelName: r.Model,
			Interval: Level(r.CILevel) + " CI by " + CIMethodDescription(r.CIMethod), R2: r2Text(r.Stats.R2),
			Stats: statsParts(r), Unknown: unknown[r.ID], Detail: fs.detail.shows(r)}
		detailed[r.ID] = hp.Detail
		if d := r.Param("D"); d != nil {
			last := LastDigit(d.Value, d.CI)
			hp.D = Number(d.Value, last) + " (" + IntervalAt(d.Value, d.CI, last) + ")"
			if r.Time == 0 {
				hp.D += " Dt in m²"
			}
		}
		for _, e := range r.Params {
			pt := formatParam(e, numFmt{})
			if e.Name == "D" && r.Time == 0 {
				pt.Name = "Dt"
			}
			hp.Params = append(hp.Params, pt)
		}
		for _, wn := range r.Warnings {
			hp.Warnings = append(hp.Warnings, warnText(wn, u))
		}
		for _, e := range []*fit.DepthEstimate{r.CaseDepth, r.DecarbDepth} {
			if e != nil {
				text, notes := depthSentence(r, e, numFmt{})
				hp.Depths = append(hp.Depths, htmlDepth{Text: strings.ToUpper(text[:1]) + text[1:], Notes: notes})
			}
		}
		if e := r.CaseDepth; e != nil {
			hp.CaseDepth = depthShort(e)
			v.CaseThreshold = e.Threshold
		}
		if f := fs.profiles[r.ID]; f != nil {
			hp.SVG = template.HTML(fs.svg[f.Name]) // generated by this package from escaped text
			if !fs.detail.every {
				hp.Figure = DirFigures + "/" + f.Name + ".svg"
			}
		}
		v.Profiles = append(v.Profiles, hp)
	}
	if fs.arrhenius != nil {
		v.ArrheniusSVG = template.HTML(fs.svg[fs.arrhenius.Name])
	}
	if fs.lots != nil {
		v.LotsSVG = template.HTML(fs.svg[fs.lots.Name])
	}
	if res.Lines != nil {
		for i := range res.Lines.Lines {
			l := &res.Lines.Lines[i]
			hl := htmlLine{Group: groupLabel(*l), D0: D0Text(l), Q: QText(l.Q, l.QCI(), l.Level),
				Corr: Number(l.Corr(), -4), Points: fmt.Sprintf("%d at %d temperatures", len(l.Points), l.NTemperatures),
				Birge: Number(l.BirgeRatio, -2)}
			if l.Scaled {
				hl.Birge += " (covariance scaled)"
			}
			for _, wn := range l.Warnings {
				hl.Warnings = append(hl.Warnings, warnText(wn, u))
			}
			v.Lines = append(v.Lines, hl)
			v.Facts = append(v.Facts, [2]string{"Arrhenius, " + hl.Group, "D0 = " + hl.D0 + "; Q = " + hl.Q})
		}
	}
	if c := res.Comparison; c != nil {
		v.Verdict = Temps(c.Verdict, u)
		for _, t := range c.Tests {
			v.Tests = append(v.Tests, [4]string{t.Description, Number(t.F, -2), fmt.Sprintf("%d, %d", t.DF1, t.DF2), Sig(t.P, 2)})
		}
		for _, r := range c.Ratios {
			txt := fmt.Sprintf("D(%s) / D(%s) at %s = %s; p = %s (%s)", r.Group, r.Reference, Temperature(r.TRef, u),
				ratioText(r.Value, r.CI, c.Level), Sig(r.P, 2), r.Model)
			v.Ratios = append(v.Ratios, htmlRatio{txt})
			if len(c.Pairs) == 0 {
				v.Facts = append(v.Facts, [2]string{"Lot comparison", txt})
			}
		}
		if len(c.Pairs) > 0 {
			v.Facts = append(v.Facts, [2]string{"Lot comparison", v.Verdict})
			v.PairHead = fmt.Sprintf("Every pair at %s: ratio of D (second to first); p-values adjusted for %d comparisons by Holm's method, each interval for its pair alone.", Temperature(c.Pairs[0].TRef, u), len(c.Pairs))
			for _, p := range c.Pairs {
				v.Pairs = append(v.Pairs, [6]string{p.A + " – " + p.B, ratioText(p.Ratio, p.CI, c.Level), viewP(p.P), viewP(p.PAdjusted), pairVerdict(p), p.Model})
			}
		}
	}
	for _, g := range res.LineErrors {
		g.Error = Temps(g.Error, u)
		v.LineErrors = append(v.LineErrors, g)
	}
	for _, n := range res.Notes {
		v.Notes = append(v.Notes, Temps(n, u))
	}
	for _, n := range res.NotUsed() {
		v.NotUsed = append(v.NotUsed, htmlNotUsed{n.where(), Temps(n.Reason, u)})
	}
	for _, n := range res.Notes {
		v.NotUsed = append(v.NotUsed, htmlNotUsed{"calibration", Temps(n, u)})
	}
	for _, p := range res.Parts {
		hp := htmlPart{ID: p.ID, Anchor: anchors[p.ID], Lot: p.Lot, Result: PartText(p, u), Failed: p.Solution == nil,
			Detail: detailed[p.ID]}
		if p.Solution != nil {
			for _, wn := range p.Solution.Warnings {
				hp.Warnings = append(hp.Warnings, warnText(wn, u))
			}
		}
		v.Parts = append(v.Parts, hp)
		v.Facts = append(v.Facts, [2]string{"Back-calculated " + p.ID, hp.Result})
	}
	return v
}

// profileAnchors gives every profile an anchor of its own: "p-" and the id
// made safe for a URL fragment, with "-2", "-3"… added where two ids come
// out alike ("A 1", "A_1" and "A/1" all give "p-A_1"), compared without
// case. Ids are unique, so the map is keyed by id.
func profileAnchors(rs []*fit.Result) map[string]string {
	out := make(map[string]string, len(rs))
	used := map[string]bool{}
	for _, r := range rs {
		if _, done := out[r.ID]; done {
			continue
		}
		base := "p-" + fileSafe(r.ID)
		a := base
		for k := 2; used[strings.ToLower(a)]; k++ {
			a = fmt.Sprintf("%s-%d", base, k)
		}
		used[strings.ToLower(a)] = true
		out[r.ID] = a
	}
	return out
}

var htmlTemplate = template.Must(template.New("report").Funcs(template.FuncMap{
	"join": strings.Join,
}).Parse(htmlSource))

// htmlSource is the report page. The palette and type are the house style
// of the figures: ink #1d2a33, slate teal #22606c, copper #a4452c.
const htmlSource = `<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<meta name="generator" content="fickfit {{.Version}}">
<title>{{.Title}}</title>
<style>
:root { --ink:#1d2a33; --muted:#5c6a74; --rule:#d5dbe0; --faint:#f3f5f6; --teal:#22606c; --copper:#a4452c; --warn:#8a4b12; --warnbg:#fbf3e9; }
* { box-sizing: border-box; }
html { font-size: 15px; }
body { margin: 0; color: var(--ink); background: #fff; font-family: "Liberation Sans", Arimo, "Helvetica Neue", Arial, sans-serif; line-height: 1.45; }
main { max-width: 62rem; margin: 0 auto; padding: 2rem 1.5rem 4rem; }
header.top { border-bottom: 3px solid var(--teal); padding-bottom: .8rem; margin-bottom: 1.2rem; }
h1 { font-size: 1.7rem; margin: 0 0 .3rem; letter-spacing: -.01em; }
h2 { font-size: 1.25rem; margin: 2.4rem 0 .6rem; padding-bottom: .25rem; border-bottom: 1px solid var(--rule); }
h3 { font-size: 1.05rem; margin: 0 0 .2rem; }
p.lead { color: var(--muted); margin: 0; }
nav.toc { font-size: .9rem; margin: 1rem 0 0; }
nav.toc a { color: var(--teal); margin-right: 1.1rem; text-decoration: none; border-bottom: 1px solid transparent; }
nav.toc a:hover { border-bottom-color: var(--teal); }
a { color: var(--teal); }
table { border-collapse: collapse; width: 100%; font-size: .88rem; margin: .5rem 0 1rem; font-variant-numeric: tabular-nums; }
th, td { text-align: left; padding: .28rem .55rem .28rem 0; vertical-align: top; border-bottom: 1px solid var(--rule); }
th { font-weight: 600; color: var(--muted); border-bottom: 1.5px solid var(--ink); white-space: nowrap; }
td.num, th.num { text-align: right; white-space: nowrap; }
td.nw { white-space: nowrap; }
td.mono, .mono { font-family: "Liberation Mono", Cousine, Menlo, Consolas, monospace; font-size: .8rem; word-break: break-all; }
dl.facts { display: grid; grid-template-columns: 14rem 1fr; gap: .35rem 1rem; margin: .6rem 0 0; }
dl.facts dt { color: var(--muted); }
dl.facts dd { margin: 0; }
figure { margin: .8rem 0 1rem; }
figure svg.fig { width: 100%; height: auto; display: block; }
figcaption { font-size: .82rem; color: var(--muted); margin-top: .2rem; }
article.profile { border-top: 1px solid var(--rule); padding-top: 1.1rem; margin-top: 1.4rem; }
p.cond { margin: 0 0 .4rem; color: var(--muted); font-size: .9rem; }
p.stats { font-size: .82rem; color: var(--muted); margin: .2rem 0 .6rem; }
ul.warn { list-style: none; padding: 0; margin: .4rem 0; }
ul.warn li { background: var(--warnbg); border-left: 3px solid var(--warn); padding: .35rem .6rem; margin: .3rem 0; font-size: .88rem; }
.tag { display: inline-block; font-size: .75rem; padding: 0 .4rem; border: 1px solid var(--copper); color: var(--copper); border-radius: 2px; margin-left: .4rem; vertical-align: middle; }
.caution { border: 1.5px solid var(--copper); padding: .7rem 1rem; margin: 1rem 0; background: #fdf8f6; }
.caution h3 { color: var(--copper); }
.caution ol { margin: .3rem 0 0 1.1rem; padding: 0; }
.notes p { margin: .35rem 0 .7rem; }
.notes .src { color: var(--muted); font-size: .85rem; }
footer { margin-top: 3rem; font-size: .8rem; color: var(--muted); border-top: 1px solid var(--rule); padding-top: .6rem; }
@media print {
  html { font-size: 10.5pt; }
  main { max-width: none; padding: 0; }
  nav.toc { display: none; }
  a { color: inherit; text-decoration: none; }
  h2 { break-after: avoid; page-break-after: avoid; }
  figure, table, .caution, ul.warn li, dl.facts { break-inside: avoid; page-break-inside: avoid; }
  article.profile { break-inside: avoid-page; page-break-inside: avoid; }
  section#profiles article.profile { break-before: auto; }
  .caution, ul.warn li { background: none; }
}
@page { size: A4; margin: 16mm 14mm; }
</style>
</head>
<body>
<main>
<header class="top">
<h1>{{.Title}}</h1>
<p class="lead">{{.Lead}}</p>
<nav class="toc"><a href="#summary">Summary</a>{{if .Lines}}<a href="#arrhenius">Arrhenius</a>{{end}}{{if .Verdict}}<a href="#lots">Lots</a>{{end}}{{if .Parts}}<a href="#parts">Back-calculation</a>{{end}}<a href="#profiles">Profiles</a>{{if .NotUsed}}<a href="#not-used">Not used</a>{{end}}<a href="#methods">Methods</a><a href="#cautions">Cautions</a><a href="#audit">Audit trail</a></nav>
</header>

<section id="summary">
<h2>Summary</h2>
{{if .Facts}}<dl class="facts">{{range .Facts}}<dt>{{index . 0}}</dt><dd>{{index . 1}}</dd>{{end}}</dl>{{end}}
<table>
<thead><tr><th>id</th><th>lot</th><th>T, t</th><th>model</th><th class="num">D (m²/s), {{.Level}} CI</th>{{if .CaseThreshold}}<th class="num">case depth at {{.CaseThreshold}}, {{.Level}} CI</th>{{end}}<th class="num">R²</th><th class="num">warnings</th></tr></thead>
<tbody>
{{$case := .CaseThreshold}}{{range .Profiles}}<tr><td class="nw">{{if .Detail}}<a href="#{{.Anchor}}">{{.ID}}</a>{{else}}{{.ID}}{{end}}{{if .Unknown}}<span class="tag">unknown</span>{{end}}{{if .Figure}} <a href="{{.Figure}}">figure</a>{{end}}</td><td class="nw">{{.Lot}}</td><td class="nw">{{.Short}}</td><td>{{.ModelName}}</td><td class="num">{{.D}}</td>{{if $case}}<td class="num">{{.CaseDepth}}</td>{{end}}<td class="num">{{.R2}}</td><td class="num">{{len .Warnings}}</td></tr>
{{end}}{{range .Failed}}<tr><td class="nw">{{.ID}}</td><td class="nw">{{.Lot}}</td><td colspan="{{if $case}}6{{else}}5{{end}}">not fitted: {{.Error}}</td></tr>
{{end}}</tbody>
</table>
{{range .Notes}}<p class="stats">{{.}}</p>{{end}}{{if .DetailNote}}
<p class="stats">{{.DetailNote}}</p>{{end}}
</section>

{{if or .Lines .LineErrors}}
<section id="arrhenius">
<h2>Arrhenius lines</h2>
{{if .ArrheniusSVG}}<figure>{{.ArrheniusSVG}}<figcaption>D against 10⁴/T with the temperature in {{.TempUnit}} on top. Bars: each profile's {{.Level}} interval of D; shaded: {{.Level}} confidence band of each fitted mean line; dashed: the line outside the temperatures measured.</figcaption></figure>{{end}}
{{if .Lines}}<table>
<thead><tr><th>group</th><th>D0</th><th>Q</th><th>corr(ln D0, Q)</th><th>points</th><th>Birge ratio</th></tr></thead>
<tbody>{{range .Lines}}<tr><td>{{.Group}}</td><td>{{.D0}}</td><td>{{.Q}}</td><td class="num">{{.Corr}}</td><td>{{.Points}}</td><td>{{.Birge}}</td></tr>
{{if .Warnings}}<tr><td></td><td colspan="5"><ul class="warn">{{range .Warnings}}<li>{{.}}</li>{{end}}</ul></td></tr>{{end}}{{end}}</tbody>
</table>{{end}}
{{range .LineErrors}}<ul class="warn"><li>No line{{if .Group}} for {{.Group}}{{end}}: {{.Error}}</li></ul>{{end}}
</section>
{{end}}

{{if or .Verdict .ComparisonError}}
<section id="lots">
<h2>Lot comparison</h2>
{{if .Verdict}}<p>{{.Verdict}}</p>
{{if .LotsSVG}}<figure>{{.LotsSVG}}<figcaption>Each point's D divided by the reference lot's fitted line at the point's temperature; diamonds: the estimated ratio at the comparison temperature with its {{.Level}} interval.</figcaption></figure>{{end}}
<table><thead><tr><th>test</th><th class="num">F</th><th class="num">df</th><th class="num">p</th></tr></thead>
<tbody>{{range .Tests}}<tr><td>{{index . 0}}</td><td class="num">{{index . 1}}</td><td class="num">{{index . 2}}</td><td class="num">{{index . 3}}</td></tr>{{end}}</tbody></table>
{{range .Ratios}}<p>{{.Text}}</p>{{end}}
{{if .Pairs}}<p>{{.PairHead}}</p>
<table><thead><tr><th>pair</th><th>D ratio, {{.Level}} CI</th><th class="num">p</th><th class="num">p adjusted</th><th>verdict</th><th>model</th></tr></thead>
<tbody>{{range .Pairs}}<tr><td class="nw">{{index . 0}}</td><td>{{index . 1}}</td><td class="num">{{index . 2}}</td><td class="num">{{index . 3}}</td><td>{{index . 4}}</td><td>{{index . 5}}</td></tr>{{end}}</tbody></table>{{end}}{{end}}
{{if .ComparisonError}}<ul class="warn"><li>No comparison: {{.ComparisonError}}</li></ul>{{end}}
</section>
{{end}}

{{if .Parts}}
<section id="parts">
<h2>Back-calculated parts</h2>
<p>Profiles marked <em>unknown</em> are left out of the calibration; their temperature (or time) is solved from the Arrhenius line of their group.</p>
<table><thead><tr><th>part</th><th>lot</th><th>result</th></tr></thead>
<tbody>{{range .Parts}}<tr><td>{{if and .Anchor .Detail}}<a href="#{{.Anchor}}">{{.ID}}</a>{{else}}{{.ID}}{{end}}</td><td>{{.Lot}}</td><td>{{.Result}}{{if .Warnings}}<ul class="warn">{{range .Warnings}}<li>{{.}}</li>{{end}}</ul>{{end}}</td></tr>{{end}}</tbody></table>
<div class="caution"><h3>Before acting on a back-calculated number</h3><ol>{{range .PartCautions}}<li>{{.}}</li>{{end}}</ol></div>
</section>
{{end}}

<section id="profiles">
<h2>Profiles</h2>
{{if .DetailNote}}<p class="stats">{{.DetailNote}}</p>
{{end}}{{range .Profiles}}{{if .Detail}}<article class="profile" id="{{.Anchor}}">
<h3>{{.ID}}{{if .Unknown}}<span class="tag">unknown — back-calculated</span>{{end}}</h3>
<p class="cond">{{.Conditions}} · {{.Model}} · {{.Interval}}{{if .Lot}} · lot {{.Lot}}{{end}}{{if .Source}} · <span class="mono">{{.Source}}</span>{{end}}</p>
{{if .SVG}}<figure>{{.SVG}}</figure>{{end}}
<table><thead><tr><th>parameter</th><th>estimate</th><th>std. error</th><th>interval</th></tr></thead>
<tbody>{{range .Params}}<tr><td>{{.Name}}</td><td>{{.Value}}</td><td class="num">{{.SE}}</td><td>{{.CI}}</td></tr>{{end}}</tbody></table>
<p class="stats">{{join .Stats " · "}}</p>
{{range .Depths}}<p>{{.Text}}</p>{{if .Notes}}<ul class="notes">{{range .Notes}}<li>{{.}}</li>{{end}}</ul>{{end}}{{end}}
{{if .Warnings}}<ul class="warn">{{range .Warnings}}<li>{{.}}</li>{{end}}</ul>{{end}}
</article>
{{end}}{{end}}
</section>

{{if .NotUsed}}
<section id="not-used">
<h2>Not used</h2>
<p>What the results above were computed without, with where and why.</p>
<table><thead><tr><th>input</th><th>why</th></tr></thead>
<tbody>{{range .NotUsed}}<tr><td class="mono">{{.What}}</td><td>{{.Why}}</td></tr>{{end}}</tbody></table>
</section>
{{end}}

<section id="methods" class="notes">
<h2>Methods and sources</h2>
{{range .Methods}}<p><strong>{{.Topic}}.</strong> {{.Text}} <span class="src">Source: {{.Source}}.</span></p>
{{end}}
</section>

<section id="cautions">
<h2>Cautions</h2>
<div class="caution"><ol>{{range .Cautions}}<li>{{.}}</li>{{end}}</ol></div>
</section>

<section id="audit">
<h2>Audit trail</h2>
<table><thead><tr><th>input file</th><th>SHA-256</th><th>bytes</th></tr></thead>
<tbody>{{range .Inputs}}<tr><td class="mono">{{.Name}}</td><td class="mono">{{.SHA256}}</td><td class="num">{{.Bytes}}</td></tr>{{end}}</tbody></table>
<table><thead><tr><th>option</th><th>value</th></tr></thead>
<tbody>{{range .Options}}<tr><td>{{index . 0}}</td><td>{{index . 1}}</td></tr>{{end}}</tbody></table>
{{if .Excluded}}<table><thead><tr><th>excluded (profile)</th><th>file, line</th><th>depth (µm)</th><th>value</th><th>reason</th></tr></thead>
<tbody>{{range .Excluded}}<tr><td>{{index . 0}}</td><td class="mono">{{index . 1}}</td><td class="num">{{index . 2}}</td><td class="num">{{index . 3}}</td><td>{{index . 4}}</td></tr>{{end}}</tbody></table>{{end}}
</section>

<footer>Written by fickfit {{.Version}}. The same inputs and options give the same numbers; the SHA-256 sums identify the input files.</footer>
</main>
</body>
</html>
`

// excludedRows lists the exclusions for the audit trail: profile, file
// and line, depth in µm, value, reason; a profile left out of the
// Arrhenius lines has "whole profile" for its depth.
func excludedRows(a *profile.Applied) [][5]string {
	if a == nil {
		return nil
	}
	var out [][5]string
	for _, e := range a.Points {
		where := e.File
		if e.Line > 0 {
			where += fmt.Sprintf(":%d", e.Line)
		}
		// As written in the files (six significant digits at most), not rounded to an uncertainty.
		out = append(out, [5]string{e.Profile, where, strconv.FormatFloat(e.Depth*1e6, 'g', 6, 64), strconv.FormatFloat(e.Value, 'g', 6, 64), e.Reason})
	}
	for _, l := range a.LeftOut {
		out = append(out, [5]string{l.Profile, l.File, "whole profile (left out of the Arrhenius lines)", "", l.Reason})
	}
	return out
}

// shortConditions writes "880 °C, 5 h" for summary tables.
func shortConditions(r *fit.Result, u TempUnit) string {
	t := "T not given"
	if r.Temperature > 0 {
		t = TemperatureShort(r.Temperature, u)
	}
	d := "t not given"
	if r.Time > 0 {
		d = Duration(r.Time)
	}
	return t + ", " + d
}
