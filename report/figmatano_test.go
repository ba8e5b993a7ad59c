package report

import (
	"bytes"
	"encoding/json"
	"image/png"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/fickfit/fickfit/fit"
	"github.com/fickfit/fickfit/fit/matano"
	"github.com/fickfit/fickfit/profile"
)

// matanoCouple is an invented couple for drawing (a fixture, not a check
// value), positions from −560 to +640 µm with seeded noise of 0.12 at%,
// 100 h at 1000 °C. Shape "erf" is the constant-D couple C = (CL + CR)/2 +
// (CR − CL)/2·erf((x − xm)/(2√(Dt))) with D = 4e-14 m²/s, the interface
// 40 µm right of the origin, rising from 2 to 30 at%; "falling" is the
// same from 30 to 2; "asymmetric" is an equal mix of two such profiles
// of widths 60 and 220 µm centred 80 µm apart, so that D varies with C.
func matanoCouple(shape string) *profile.Profile {
	const D, tm, xm = 4e-14, 100 * 3600.0, 40e-6
	cl, cr := 2.0, 30.0
	if shape == "falling" {
		cl, cr = cr, cl
	}
	y := func(x float64) float64 { return 0.5 * (1 + math.Erf((x-xm)/(2*math.Sqrt(D*tm)))) }
	if shape == "asymmetric" {
		y = func(x float64) float64 {
			return 0.25*(1+math.Erf((x-0)/60e-6)) + 0.25*(1+math.Erf((x-80e-6)/220e-6))
		}
	}
	rng := rand.New(rand.NewPCG(17, 18))
	p := &profile.Profile{ID: "couple-7", Source: "couple-7.csv", Time: tm, Temperature: 1273.15,
		ValueName: "C_at%", ValueUnit: "at%", Across: true}
	for i := 0; i <= 48; i++ {
		x := -560e-6 + 1200e-6*float64(i)/48
		p.Depth = append(p.Depth, x)
		p.Value = append(p.Value, cl+(cr-cl)*y(x)+0.12*rng.NormFloat64())
		p.Line = append(p.Line, i+2)
	}
	return p
}

func matanoFixture(t *testing.T, method, shape string) (*matano.Result, *profile.Profile) {
	t.Helper()
	p := matanoCouple(shape)
	r, err := matano.Analyze(p, 0, matano.Options{Method: method, Resamples: 200, Seed: 5, Workers: 1})
	if err != nil {
		t.Fatal(err)
	}
	return r, p
}

// saveFigure writes f's SVG and PNG to $FICKFIT_FIGDIR when that is set
// (for looking at the figures); otherwise it does nothing.
func saveFigure(t *testing.T, f *Figure) {
	t.Helper()
	dir := os.Getenv("FICKFIT_FIGDIR")
	if dir == "" {
		return
	}
	var s, p bytes.Buffer
	if err := f.WriteSVG(&s); err != nil {
		t.Fatal(err)
	}
	if err := f.WritePNG(&p, 0); err != nil {
		t.Fatal(err)
	}
	base := fileSafe(t.Name()) + "-" + f.Name
	for name, b := range map[string][]byte{base + ".svg": s.Bytes(), base + ".png": p.Bytes()} {
		if err := os.WriteFile(filepath.Join(dir, name), b, 0o644); err != nil {
			t.Fatal(err)
		}
	}
}

func TestMatanoFigureSVG(t *testing.T) {
	for _, c := range []struct {
		name    string
		method  string
		shape   string
		want    []string
		notWant []string
	}{
		{"boltzmann-matano rising", matano.BoltzmannMatano, "erf",
			[]string{"<title>Couple couple-7, Boltzmann–Matano analysis", "couple-7 · Boltzmann–Matano",
				"position (µm)", "C (at%)", "D (m", // axes with units ("m²/s" is split by the superscript tspans)
				"Matano plane", "measured", "smoothed (", "D with 95 % bootstrap band",
				"within 10 % of an end composition", "1000 °C · anneal 100 h"},
			nil},
		{"sauer-freise falling", matano.SauerFreise, "falling",
			[]string{"couple-7 · Sauer–Freise", "position (µm)", "C (at%)", "D (m", "D with 95 % bootstrap band"},
			[]string{"Matano plane"}},
		{"boltzmann-matano asymmetric", matano.BoltzmannMatano, "asymmetric",
			[]string{"couple-7 · Boltzmann–Matano", "position (µm)", "C (at%)", "D (m", " erf terms)"},
			nil},
	} {
		t.Run(c.name, func(t *testing.T) {
			r, p := matanoFixture(t, c.method, c.shape)
			f, err := MatanoFigure(r, p, FigureOptions{})
			if err != nil {
				t.Fatal(err)
			}
			saveFigure(t, f)
			var b bytes.Buffer
			if err := f.WriteSVG(&b); err != nil {
				t.Fatal(err)
			}
			wellFormed(t, "Matano SVG", b.Bytes())
			s := b.String()
			for _, w := range c.want {
				if !strings.Contains(s, w) {
					t.Errorf("Matano SVG lacks %q", w)
				}
			}
			for _, w := range c.notWant {
				if strings.Contains(s, w) {
					t.Errorf("Matano SVG contains %q", w)
				}
			}
			// Negative positions are written with a true minus sign.
			if !strings.Contains(s, ">−") {
				t.Error("no negative position tick label")
			}
			// A ring per measured point and a mark per D point, all paths.
			if n := strings.Count(s, "<path"); n < len(p.Depth)+len(r.Points) {
				t.Errorf("%d paths for %d measured and %d D points", n, len(p.Depth), len(r.Points))
			}
			for _, bad := range []string{"NaN", "Inf", "⁻"} {
				if strings.Contains(s, bad) {
					t.Errorf("Matano SVG contains %q", bad)
				}
			}
			if f.Name != "matano-couple-7" {
				t.Errorf("name %q", f.Name)
			}
		})
	}
}

func TestMatanoFigurePNG(t *testing.T) {
	r, p := matanoFixture(t, matano.BoltzmannMatano, "erf")
	f, err := MatanoFigure(r, p, FigureOptions{})
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

func TestMatanoFigureFromJSON(t *testing.T) {
	// A result read back from JSON has no smoothing curve and no anneal
	// time: the figure draws the points and D without them, and marks no
	// point as near an end (it cannot tell).
	r0, p := matanoFixture(t, matano.BoltzmannMatano, "erf")
	b, err := json.Marshal(r0)
	if err != nil {
		t.Fatal(err)
	}
	var r matano.Result
	if err := json.Unmarshal(b, &r); err != nil {
		t.Fatal(err)
	}
	f, err := MatanoFigure(&r, p, FigureOptions{})
	if err != nil {
		t.Fatal(err)
	}
	saveFigure(t, f)
	var svg bytes.Buffer
	if err := f.WriteSVG(&svg); err != nil {
		t.Fatal(err)
	}
	wellFormed(t, "Matano SVG from JSON", svg.Bytes())
	s := svg.String()
	for _, w := range []string{"Matano plane", "measured", "D with bootstrap band"} {
		if !strings.Contains(s, w) {
			t.Errorf("SVG lacks %q", w)
		}
	}
	for _, w := range []string{"smoothed (", "within 10 % of an end"} {
		if strings.Contains(s, w) {
			t.Errorf("SVG claims %q without a smoothing curve", w)
		}
	}
	// Without the profile, only the curve would be left: nothing here.
	if _, err := MatanoFigure(&r, nil, FigureOptions{}); err == nil {
		t.Error("no profile and no curve: no error")
	}
	// Without the profile but with the curve, the left panel shows the curve.
	if _, err := MatanoFigure(r0, nil, FigureOptions{}); err != nil {
		t.Errorf("curve without profile: %v", err)
	}
}

func TestMatanoFigureLevelsNotDrawn(t *testing.T) {
	// Levels outside the end compositions have no D; the subtitle says how
	// many were left out.
	p := matanoCouple("erf")
	r, err := matano.Analyze(p, 0, matano.Options{Concentrations: []float64{1, 8, 16, 24, 31}, Resamples: -1})
	if err != nil {
		t.Fatal(err)
	}
	f, err := MatanoFigure(r, p, FigureOptions{})
	if err != nil {
		t.Fatal(err)
	}
	var svg bytes.Buffer
	if err := f.WriteSVG(&svg); err != nil {
		t.Fatal(err)
	}
	s := svg.String()
	if !strings.Contains(s, "D (no band)") {
		t.Error("the key does not say that D has no band")
	}
	if !strings.Contains(s, "2 of 5 levels not drawn") {
		t.Error("levels left out are not counted in the subtitle")
	}
	if strings.Contains(s, "bootstrap band") {
		t.Error("a band is claimed with the bootstrap off")
	}
	// A negative D between two positive ones is left out and counted, not
	// drawn on the logarithmic axis.
	nan := math.NaN()
	open := fit.Interval{Lo: nan, Hi: nan}
	neg := &matano.Result{ID: "couple-7", Method: matano.SauerFreise, Smooth: r.Smooth, Points: []matano.Point{
		{C: 8, D: 3e-14, CI: open}, {C: 16, D: -2e-15, CI: open}, {C: 24, D: 5e-14, CI: open}}}
	f, err = MatanoFigure(neg, p, FigureOptions{})
	if err != nil {
		t.Fatal(err)
	}
	saveFigure(t, f)
	svg.Reset()
	if err := f.WriteSVG(&svg); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(svg.String(), "1 of 3 levels not drawn") {
		t.Error("a negative D is not counted in the subtitle")
	}
}

func TestMatanoFigureErrors(t *testing.T) {
	r, p := matanoFixture(t, matano.BoltzmannMatano, "erf")
	nan := math.NaN()
	other := *p
	other.ID = "couple-8"
	for _, c := range []struct {
		name string
		r    *matano.Result
		p    *profile.Profile
		want string
	}{
		{"nil result", nil, p, "no result"},
		{"no points", &matano.Result{ID: "couple-7", Smooth: r.Smooth}, p, "no point has a finite D"},
		{"all D n/a", &matano.Result{ID: "couple-7", Smooth: r.Smooth, Points: []matano.Point{{C: 1, D: nan}, {C: 40, D: nan}}}, p, "no point has a finite D"},
		{"D not positive", &matano.Result{ID: "couple-7", Points: []matano.Point{{C: 10, D: -1e-14, CI: fit.Interval{Lo: nan, Hi: nan}}}}, p, "positive D"},
		{"other profile", r, &other, "the profile given is couple-8"},
		{"nothing on the left", &matano.Result{ID: "couple-7", Points: r.Points}, nil, "neither measured points nor a smoothing curve"},
	} {
		t.Run(c.name, func(t *testing.T) {
			f, err := MatanoFigure(c.r, c.p, FigureOptions{})
			if err == nil {
				t.Fatalf("no error (figure %v)", f)
			}
			if !strings.Contains(err.Error(), c.want) {
				t.Errorf("error %q does not say %q", err, c.want)
			}
		})
	}
}
