package report

import (
	"bytes"
	"encoding/json"
	"encoding/xml"
	"image"
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
	if got := labels(logTicks{}.Ticks(3e-14, 2e-11)); got != "10⁻¹³ 10⁻¹² 10⁻¹¹" {
		t.Errorf("wide: %q", got)
	}
	if got := labels(logTicks{}.Ticks(6e-12, 3.5e-11)); got != "10⁻¹¹ 2 × 10⁻¹¹ 3 × 10⁻¹¹" {
		t.Errorf("one decade: %q", got)
	}
	if got := labels(logTicks{}.Ticks(7e-12, 1.9e-11)); !strings.Contains(got, "8 × 10⁻¹²") {
		t.Errorf("narrow: %q", got)
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
	if got := labels(ratioTicks{}.Ticks(1e-3, 10)); got != "0.001 0.01 0.1 1 10" {
		t.Errorf("ratio ticks wide: %q", got)
	}
	if got := labels(ratioTicks{}.Ticks(0.85, 1.3)); got != "0.9 1.0 1.1 1.2 1.3" {
		t.Errorf("ratio ticks narrow: %q", got)
	}
}
