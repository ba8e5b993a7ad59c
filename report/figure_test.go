package report

import (
	"bytes"
	"encoding/json"
	"encoding/xml"
	"fmt"
	"image"
	"image/color"
	"image/png"
	"io"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"gonum.org/v1/plot"

	"github.com/fickfit/fickfit/arrhenius"
	"github.com/fickfit/fickfit/fit"
)

// wellFormed fails the test unless b is well-formed XML.
func wellFormed(t *testing.T, name string, b []byte) {
	t.Helper()
	d := xml.NewDecoder(bytes.NewReader(b))
	for {
		_, err := d.Token()
		if err == io.EOF {
			return
		}
		if err != nil {
			t.Fatalf("%s is not well-formed XML: %v", name, err)
		}
	}
}

func oneFit(t *testing.T) *fit.Result {
	t.Helper()
	rng := rand.New(rand.NewPCG(21, 22))
	p := synth{id: "F1", lot: "L1", tempC: 925, hours: 4, cs: 0.95, c0: 0.2}.profile(rng)
	p.Meta["quantity"] = "C"
	r, err := fit.Fit(&p, fit.Options{CI: "wald"})
	if err != nil {
		t.Fatal(err)
	}
	return r
}

func TestProfileFigureSVG(t *testing.T) {
	r := oneFit(t)
	f, err := ProfileFigure(r, FigureOptions{})
	if err != nil {
		t.Fatal(err)
	}
	var b bytes.Buffer
	if err := f.WriteSVG(&b); err != nil {
		t.Fatal(err)
	}
	wellFormed(t, "profile SVG", b.Bytes())
	s := b.String()
	for _, want := range []string{
		"<title>Profile F1", "depth (mm)", "C (wt%)", "residual (wt%)", // axes with units
		"measured", "fitted (erf)", "95 % confidence band",
		"925 °C · 4 h · lot L1",
		`style="font-size:`, // superscripts as tspans: "10⁻¹¹" in the subtitle
		"'Liberation Sans',Arimo,Arial",
	} {
		if !strings.Contains(s, want) {
			t.Errorf("profile SVG lacks %q", want)
		}
	}
	// One ring per measured point, and one dot per residual, all paths.
	if n := strings.Count(s, "<path"); n < 2*len(r.Residuals) {
		t.Errorf("%d paths for %d points", n, len(r.Residuals))
	}
	for _, bad := range []string{"NaN", "Inf", "⁻"} {
		if strings.Contains(s, bad) {
			t.Errorf("profile SVG contains %q", bad)
		}
	}
}

func TestProfileFigureWithoutModel(t *testing.T) {
	// A result read back from JSON has no model: the curve goes through the
	// fitted values, without a band.
	b, _ := json.Marshal(oneFit(t))
	var r fit.Result
	if err := json.Unmarshal(b, &r); err != nil {
		t.Fatal(err)
	}
	f, err := ProfileFigure(&r, FigureOptions{})
	if err != nil {
		t.Fatal(err)
	}
	var svg bytes.Buffer
	if err := f.WriteSVG(&svg); err != nil {
		t.Fatal(err)
	}
	if strings.Contains(svg.String(), "confidence band") {
		t.Error("a band is claimed without a model to compute it")
	}
	if _, err := ProfileFigure(&fit.Result{ID: "empty"}, FigureOptions{}); err == nil {
		t.Error("no points: no error")
	}
}

func TestArrheniusAndLotsFigures(t *testing.T) {
	res, _ := runCampaign(t, 1)
	fs, problems := res.makeFigures(CampaignOptions{TempUnit: Celsius})
	if len(problems) > 0 {
		t.Fatalf("figure problems: %v", problems)
	}
	if fs.arrhenius == nil || fs.lots == nil {
		t.Fatal("Arrhenius or lots figure missing")
	}
	var a, l bytes.Buffer
	if err := fs.arrhenius.WriteSVG(&a); err != nil {
		t.Fatal(err)
	}
	if err := fs.lots.WriteSVG(&l); err != nil {
		t.Fatal(err)
	}
	wellFormed(t, "Arrhenius SVG", a.Bytes())
	wellFormed(t, "lots SVG", l.Bytes())
	for _, want := range []string{"/T (K", "temperature (°C)", "D (m", "lot L1: Q = ", "kJ/mol", "reference C-in-gamma-Fe",
		"part-1", "back-calculated part"} {
		if !strings.Contains(a.String(), want) {
			t.Errorf("Arrhenius SVG lacks %q", want)
		}
	}
	for _, want := range []string{"temperature (°C)", "D / D of lot L1 line", "ratio L2 / L1 at", "F-test p = "} {
		if !strings.Contains(l.String(), want) {
			t.Errorf("lots SVG lacks %q", want)
		}
	}
	// Kelvin users get a kelvin top axis.
	fk, _ := ArrheniusFigure(res.arrheniusPlot(), FigureOptions{TempUnit: Kelvin})
	var k bytes.Buffer
	fk.WriteSVG(&k)
	if !strings.Contains(k.String(), "temperature (K)") {
		t.Error("kelvin axis missing")
	}
	// ln D on a linear axis.
	fl, _ := ArrheniusFigure(res.arrheniusPlot(), FigureOptions{LnD: true})
	var ln bytes.Buffer
	fl.WriteSVG(&ln)
	if !strings.Contains(ln.String(), "ln(D / (m") {
		t.Error("ln D axis label missing")
	}
	if _, err := ArrheniusFigure(ArrheniusPlot{}, FigureOptions{}); err == nil {
		t.Error("empty Arrhenius plot: no error")
	}
}

func TestFigurePNG(t *testing.T) {
	f, err := ProfileFigure(oneFit(t), FigureOptions{})
	if err != nil {
		t.Fatal(err)
	}
	var b bytes.Buffer
	if err := f.WritePNG(&b, 100); err != nil {
		t.Fatal(err)
	}
	img, err := png.Decode(&b)
	if err != nil {
		t.Fatal(err)
	}
	wantW := int(f.Width.Points() / 72 * 100)
	if w := img.Bounds().Dx(); w < wantW-1 || w > wantW+1 {
		t.Errorf("width %d px at 100 dpi, want %d", w, wantW)
	}
	if frac, colours := inked(img); frac < 0.02 || colours < 20 {
		t.Errorf("PNG looks blank: %.3f of pixels inked, %d colours", frac, colours)
	}
}

// inked returns the fraction of pixels that are not white and the number
// of distinct colours.
func inked(img image.Image) (float64, int) {
	b := img.Bounds()
	colours := map[uint32]bool{}
	var n, dark int
	for y := b.Min.Y; y < b.Max.Y; y += 2 {
		for x := b.Min.X; x < b.Max.X; x += 2 {
			r, g, bb, _ := img.At(x, y).RGBA()
			colours[(r>>8)<<16|(g>>8)<<8|bb>>8] = true
			n++
			if r < 0xf000 || g < 0xf000 || bb < 0xf000 {
				dark++
			}
		}
	}
	return float64(dark) / float64(n), len(colours)
}

func TestLinearTicks(t *testing.T) {
	for _, c := range []struct {
		min, max float64
		n        int
		labels   string
	}{
		{0, 2.08, 0, "0.0 0.5 1.0 1.5 2.0"},
		{0.13, 1.02, 0, "0.2 0.4 0.6 0.8 1.0"},
		{-0.027, 0.027, 3, "−0.02 0.00 0.02"},
		{875, 975, 0, "880 900 920 940 960"},
	} {
		var got []string
		for _, tk := range (linearTicks{n: c.n}).Ticks(c.min, c.max) {
			if tk.Label != "" {
				got = append(got, tk.Label)
			}
		}
		if strings.Join(got, " ") != c.labels {
			t.Errorf("ticks(%g, %g) = %v, want %s", c.min, c.max, got, c.labels)
		}
	}
	if ts := (linearTicks{}).Ticks(1, 1); ts != nil {
		t.Error("empty range gave ticks")
	}
}

func TestLogTicks(t *testing.T) {
	labels := func(ts []plot.Tick) string {
		var out []string
		for _, tk := range ts {
			if tk.Label != "" {
				out = append(out, tk.Label)
			}
		}
		return strings.Join(out, " ")
	}
	for _, c := range []struct {
		min, max float64
		want     string
	}{
		// The range of the demo's Arrhenius figure: the points at 7–9 × 10⁻¹²
		// sit beside a labelled 7 × 10⁻¹².
		{5.6e-12, 3.3e-11, "7 × 10⁻¹² 10⁻¹¹ 2 × 10⁻¹¹ 3 × 10⁻¹¹"},
		{3e-14, 2e-11, "5 × 10⁻¹⁴ 10⁻¹³ 2 × 10⁻¹³ 5 × 10⁻¹³ 10⁻¹² 2 × 10⁻¹² 5 × 10⁻¹² 10⁻¹¹ 2 × 10⁻¹¹"},
		{7e-12, 1.9e-11, "8 × 10⁻¹² 1.0 × 10⁻¹¹ 1.2 × 10⁻¹¹ 1.4 × 10⁻¹¹ 1.6 × 10⁻¹¹ 1.8 × 10⁻¹¹"},
		{1e-20, 1e-10, "10⁻²⁰ 10⁻¹⁹ 10⁻¹⁸ 10⁻¹⁷ 10⁻¹⁶ 10⁻¹⁵ 10⁻¹⁴ 10⁻¹³ 10⁻¹² 10⁻¹¹ 10⁻¹⁰"},
	} {
		if got := labels(logTicks{}.Ticks(c.min, c.max)); got != c.want {
			t.Errorf("ticks(%g, %g) = %q, want %q", c.min, c.max, got, c.want)
		}
	}
	// Density on every span a figure draws (up to logWideDecades): from 0.7
	// decade on, each decade and its 2× and 5× inside the range are
	// labelled; a span under 1.2 decades has at least three labels.
	// Seeded random ranges.
	rng := rand.New(rand.NewPCG(17, 3))
	for i := 0; i < 1000; i++ {
		span := 0.25 + rng.Float64()*(logWideDecades-0.25)
		lo := math.Pow(10, -20+10*rng.Float64())
		hi := lo * math.Pow(10, span)
		ts := logTicks{}.Ticks(lo, hi)
		var have []float64
		for _, tk := range ts {
			if tk.Label != "" {
				have = append(have, tk.Value)
			}
		}
		n := len(have)
		labelledAt := func(v float64) bool {
			for _, h := range have {
				if math.Abs(h-v) <= 1e-9*v {
					return true
				}
			}
			return false
		}
		for e := math.Floor(math.Log10(lo)); span >= 0.7 && e <= math.Ceil(math.Log10(hi)); e++ {
			for _, k := range []float64{1, 2, 5} {
				v := k * math.Pow(10, e)
				if v >= lo*(1+1e-9) && v <= hi*(1-1e-9) && !labelledAt(v) {
					t.Errorf("ticks(%g, %g): %g is not labelled (%s)", lo, hi, v, labels(ts))
				}
			}
		}
		if span < 1.2 && n < 3 {
			t.Errorf("ticks(%g, %g) over %.2f decades: %d labels (%s), want at least 3", lo, hi, span, n, labels(ts))
		}
	}
}

// CIE L*a*b* of an sRGB colour, optionally seen through a 3×3 matrix on
// linear RGB (a simulated colour-vision deficiency). sRGB transfer curve
// and RGB→XYZ matrix (D65): IEC 61966-2-1:1999; L*a*b*: CIE 15:2004.
func labOf(c color.NRGBA, m *[3][3]float64) [3]float64 {
	lin := func(v uint8) float64 {
		x := float64(v) / 255
		if x <= 0.04045 {
			return x / 12.92
		}
		return math.Pow((x+0.055)/1.055, 2.4)
	}
	rgb := [3]float64{lin(c.R), lin(c.G), lin(c.B)}
	if m != nil {
		var out [3]float64
		for i := range out {
			for j := range rgb {
				out[i] += m[i][j] * rgb[j]
			}
			out[i] = math.Max(0, math.Min(1, out[i]))
		}
		rgb = out
	}
	X := 0.4124564*rgb[0] + 0.3575761*rgb[1] + 0.1804375*rgb[2]
	Y := 0.2126729*rgb[0] + 0.7151522*rgb[1] + 0.0721750*rgb[2]
	Z := 0.0193339*rgb[0] + 0.1191920*rgb[1] + 0.9503041*rgb[2]
	f := func(t float64) float64 {
		if t > 216.0/24389 {
			return math.Cbrt(t)
		}
		return (24389.0/27*t + 16) / 116
	}
	fx, fy, fz := f(X/0.95047), f(Y/1.0), f(Z/1.08883)
	return [3]float64{116*fy - 16, 500 * (fx - fy), 200 * (fy - fz)}
}

// Simulated dichromacy, severity 1, on linear RGB: G. M. Machado, M. M.
// Oliveira & L. A. F. Fernandes, A physiologically-based model for
// simulation of color vision deficiency, IEEE Trans. Vis. Comput. Graph.
// 15 (2009) 1291–1298, the published matrices (values from memory, checked
// against the same matrices as reproduced in open-source colour libraries).
var cvdMatrices = map[string]*[3][3]float64{
	"protanopia":   {{0.152286, 1.052583, -0.204868}, {0.114503, 0.786281, 0.099216}, {-0.003882, -0.048116, 1.051998}},
	"deuteranopia": {{0.367322, 0.860646, -0.227968}, {0.280085, 0.672501, 0.047413}, {-0.011820, 0.042940, 0.968881}},
	"tritanopia":   {{1.255528, -0.076749, -0.178779}, {-0.078411, 0.930809, 0.147602}, {0.004733, 0.691367, 0.303900}},
	"normal":       nil,
}

func TestSeriesPalette(t *testing.T) {
	// Eight groups, eight colours, apart for every reader: CIE76 ΔE*ab of
	// every pair at least 14 (a difference seen at a glance on marks and
	// lines; common practice, no source) for normal vision and each
	// simulated dichromacy; each at least 3:1 in contrast on white
	// (WCAG 2.1, success criterion 1.4.11, non-text contrast).
	const groups, minDE = 8, 14.0
	for name, m := range cvdMatrices {
		for i := 0; i < groups; i++ {
			for j := i + 1; j < groups; j++ {
				a, b := labOf(seriesColor(i), m), labOf(seriesColor(j), m)
				if de := math.Hypot(math.Hypot(a[0]-b[0], a[1]-b[1]), a[2]-b[2]); de < minDE {
					t.Errorf("%s: groups %d and %d (%s, %s) differ by ΔE %.1f < %g", name, i+1, j+1,
						xlHex(seriesColor(i)), xlHex(seriesColor(j)), de, minDE)
				}
			}
		}
	}
	lum := func(c color.NRGBA) float64 { // WCAG 2.1 relative luminance
		lin := func(v uint8) float64 {
			x := float64(v) / 255
			if x <= 0.04045 {
				return x / 12.92
			}
			return math.Pow((x+0.055)/1.055, 2.4)
		}
		return 0.2126*lin(c.R) + 0.7152*lin(c.G) + 0.0722*lin(c.B)
	}
	for i := 0; i < groups; i++ {
		if cr := 1.05 / (lum(seriesColor(i)) + 0.05); cr < 3 {
			t.Errorf("group %d colour %s: contrast %.2f on white, want ≥ 3", i+1, xlHex(seriesColor(i)), cr)
		}
	}
	// Shapes differ too, for grey print.
	seen := map[string]bool{}
	for i := 0; i < groups; i++ {
		k := fmt.Sprintf("%#v", seriesGlyph(i))
		if seen[k] {
			t.Errorf("group %d reuses the marker %s", i+1, k)
		}
		seen[k] = true
	}
}

func TestArrheniusFigureEightGroups(t *testing.T) {
	// Self-check on invented lines: eight groups drawn in eight colours,
	// each found in the picture.
	var lines []arrhenius.Line
	for g := 0; g < 8; g++ {
		var pts []arrhenius.Point
		for k, T := range []float64{1150, 1180, 1210, 1240} {
			lnD := math.Log(2e-5) - (140e3+2e3*float64(g))/(8.314462618*T) + 0.01*float64((k*7+g)%3-1)
			pts = append(pts, arrhenius.Point{ID: fmt.Sprintf("g%d-%d", g, k), Lot: fmt.Sprint("L", g), T: T, LnD: lnD, VarLnD: 0.002})
		}
		l, err := arrhenius.TwoStage(pts, nil)
		if err != nil {
			t.Fatal(err)
		}
		l.Group, l.By = fmt.Sprint("L", g), "lot"
		lines = append(lines, *l)
	}
	f, err := ArrheniusFigure(ArrheniusPlot{Lines: lines}, FigureOptions{})
	if err != nil {
		t.Fatal(err)
	}
	var b bytes.Buffer
	if err := f.WritePNG(&b, 100); err != nil {
		t.Fatal(err)
	}
	img, err := png.Decode(&b)
	if err != nil {
		t.Fatal(err)
	}
	count := map[color.NRGBA]int{}
	bd := img.Bounds()
	for y := bd.Min.Y; y < bd.Max.Y; y++ {
		for x := bd.Min.X; x < bd.Max.X; x++ {
			count[color.NRGBAModel.Convert(img.At(x, y)).(color.NRGBA)]++
		}
	}
	for g := 0; g < 8; g++ {
		// Four points, a line and a legend mark: dozens of pixels of the
		// exact colour at 100 dpi.
		if n := count[seriesColor(g)]; n < 40 {
			t.Errorf("group %d: %d pixels of its colour %s", g+1, n, xlHex(seriesColor(g)))
		}
	}
}

func TestProfileBandVisible(t *testing.T) {
	// The demo-like fit's band is thinner than the fitted line; drawn, it
	// still shows as band colour above and below the line at most depths.
	r := oneFit(t)
	x := []float64{1e-3}
	_, lo, hi, err := r.Curve(x)
	if err != nil {
		t.Fatal(err)
	}
	f, err := ProfileFigure(r, FigureOptions{})
	if err != nil {
		t.Fatal(err)
	}
	var svg bytes.Buffer
	if err := f.WriteSVG(&svg); err != nil {
		t.Fatal(err)
	}
	if span := hi[0] - lo[0]; span < 0.02 && !strings.Contains(svg.String(), "widened to stay visible") {
		t.Errorf("band %.4g wt%% wide at 1 mm: the legend does not say it was widened to stay visible", span)
	}
	var b bytes.Buffer
	if err := f.WritePNG(&b, 150); err != nil {
		t.Fatal(err)
	}
	img, err := png.Decode(&b)
	if err != nil {
		t.Fatal(err)
	}
	fitC, bandC := colFit, colBand
	bd := img.Bounds()
	var cols, framed int
	for x := bd.Min.X; x < bd.Max.X; x++ {
		fitTop, fitBot := -1, -1
		bandAbove, bandBelow := false, false
		// The top panel is the upper two thirds of the figure.
		for y := bd.Min.Y; y < bd.Min.Y+bd.Dy()*2/3; y++ {
			if color.NRGBAModel.Convert(img.At(x, y)).(color.NRGBA) == fitC {
				if fitTop < 0 {
					fitTop = y
				}
				fitBot = y
			}
		}
		if fitTop < 0 || fitBot-fitTop > 12 { // no curve here, or the legend's sample
			continue
		}
		for d := 1; d <= 8; d++ {
			if color.NRGBAModel.Convert(img.At(x, fitTop-d)).(color.NRGBA) == bandC {
				bandAbove = true
			}
			if color.NRGBAModel.Convert(img.At(x, fitBot+d)).(color.NRGBA) == bandC {
				bandBelow = true
			}
		}
		cols++
		if bandAbove && bandBelow {
			framed++
		}
	}
	if cols < 300 || float64(framed) < 0.8*float64(cols) {
		t.Errorf("band visible on both sides of the curve in %d of %d pixel columns, want ≥ 80 %%", framed, cols)
	}
}

func TestSuperscriptTspans(t *testing.T) {
	in := `<text x="1" y="2" style="font-size:10px;fill:#000">D = 2.9 × 10⁻¹¹ m²/s</text>`
	got := superscriptTspans(in)
	want := `<text x="1" y="2" style="font-size:10px;fill:#000">D = 2.9 × 10<tspan dy="-3.6" style="font-size:7px">−11</tspan><tspan dy="3.6"> m</tspan><tspan dy="-3.6" style="font-size:7px">2</tspan><tspan dy="3.6">/s</tspan></text>`
	if got != want {
		t.Errorf("got  %s\nwant %s", got, want)
	}
	plain := `<text x="1" style="font-size:10px">depth (mm)</text>`
	if superscriptTspans(plain) != plain {
		t.Error("plain text changed")
	}
}

func TestFileSafe(t *testing.T) {
	for in, want := range map[string]string{"A3": "A3", "lot 7/a": "lot_7_a", "..": "profile", "é1": "_1", "x.y": "x.y"} {
		if got := fileSafe(in); got != want {
			t.Errorf("fileSafe(%q) = %q, want %q", in, got, want)
		}
	}
}

func TestPointCIAndLabels(t *testing.T) {
	// With the fit's own interval it is used; without, a Wald interval on ln D.
	p := arrhenius.Point{LnD: math.Log(2e-11), VarLnD: 0.01, CI: fit.Interval{Lo: 1.8e-11, Hi: 2.3e-11}}
	if lo, hi := pointCI(p, 0.95); lo != 1.8e-11 || hi != 2.3e-11 {
		t.Errorf("own interval: %g %g", lo, hi)
	}
	p.CI = fit.Interval{}
	lo, hi := pointCI(p, 0.95)
	// exp(±1.959963984540054·0.1), normal 97.5 % quantile (common practice, no source).
	// The level is the line's: at 90 % the bar is exp(±1.644854·0.1).
	if lo, _ := pointCI(p, 0.90); math.Abs(lo/2e-11-math.Exp(-0.1644854)) > 1e-7 {
		t.Errorf("Wald interval at 90 %%: %g", lo)
	}
	if math.Abs(lo/2e-11-math.Exp(-0.1959963984540054)) > 1e-12 || math.Abs(hi/2e-11-math.Exp(0.1959963984540054)) > 1e-12 {
		t.Errorf("Wald interval: %g %g", lo, hi)
	}
	p.VarLnD = math.NaN()
	if lo, _ := pointCI(p, 0.95); !math.IsNaN(lo) {
		t.Error("no variance: interval should be undetermined")
	}
	for _, c := range []struct {
		l    arrhenius.Line
		want string
	}{
		{arrhenius.Line{}, "all profiles"},
		{arrhenius.Line{Group: "HV-1", By: "lot"}, "lot HV-1"},
		{arrhenius.Line{Group: "steel A", By: "material"}, "material steel A"},
	} {
		if got := groupLabel(c.l); got != c.want {
			t.Errorf("groupLabel = %q, want %q", got, c.want)
		}
	}
	labels := func(ts []plot.Tick) string {
		var out []string
		for _, tk := range ts {
			if tk.Label != "" {
				out = append(out, tk.Label)
			}
		}
		return strings.Join(out, " ")
	}
	if got := labels(ratioTicks{}.Ticks(0.3, 4)); got != "0.5 1 2" {
		t.Errorf("ratio ticks 0.3–4: %q", got)
	}
	if got := labels(ratioTicks{}.Ticks(1e-3, 10)); got != "0.001 0.002 0.005 0.01 0.02 0.05 0.1 0.2 0.5 1 2 5 10" {
		t.Errorf("ratio ticks wide: %q", got)
	}
	if got := labels(ratioTicks{}.Ticks(0.85, 1.3)); got != "0.9 1.0 1.1 1.2 1.3" {
		t.Errorf("ratio ticks narrow: %q", got)
	}
}
