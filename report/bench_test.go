package report

import (
	"bytes"
	"fmt"
	"io"
	"path/filepath"
	"testing"
	"time"

	"github.com/fickfit/fickfit/campaign"
	"github.com/fickfit/fickfit/fit"
	"github.com/fickfit/fickfit/internal/longtable"
	"github.com/fickfit/fickfit/profile"
)

// BenchmarkCampaign runs the whole job on an invented demo-sized campaign
// (2 lots × 4 temperatures × 3 coupons + 1 unknown part = 25 profiles, 24
// points each): read, fit with profile-likelihood intervals, Arrhenius,
// comparison, back-calculation, and write the report folder with every
// figure as SVG and PNG, the workbook and the HTML report. It reports wall
// time and CPU time (all cores) per campaign.
func BenchmarkCampaign(b *testing.B) {
	for _, c := range []struct {
		name string
		opts campaign.Options
		out  CampaignOptions
	}{
		{"full", campaign.Options{}, CampaignOptions{}},
		{"wald-noPNG", campaign.Options{Fit: fit.Options{CI: "wald"}}, CampaignOptions{NoPNG: true}},
	} {
		b.Run(c.name, func(b *testing.B) {
			dir := b.TempDir()
			paths := writeCampaignFiles(b, dir, 31, 3)
			out := b.TempDir()
			b.ReportAllocs()
			b.ResetTimer()
			cpu0, t0 := cpuTime(), time.Now()
			for i := 0; i < b.N; i++ {
				res, err := campaign.Run(paths, c.opts)
				if err != nil {
					b.Fatal(err)
				}
				o := c.out
				o.Force = true
				if _, err := WriteCampaign(filepath.Join(out, fmt.Sprint(i)), res, o); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(time.Since(t0).Seconds()/float64(b.N), "s/campaign")
			if cpu := cpuTime(); cpu > 0 {
				b.ReportMetric((cpu-cpu0).Seconds()/float64(b.N), "cpu-s/campaign")
			}
		})
	}
}

// BenchmarkFigures draws one profile figure as SVG and as PNG.
func BenchmarkFigures(b *testing.B) {
	res, _ := runCampaign(b, 1)
	f, err := ProfileFigure(res.Results[0], FigureOptions{})
	if err != nil {
		b.Fatal(err)
	}
	b.Run("svg", func(b *testing.B) {
		b.ReportAllocs()
		for i := 0; i < b.N; i++ {
			if _, err := f.svgBytes(); err != nil {
				b.Fatal(err)
			}
		}
		b.ReportMetric(float64(b.Elapsed().Milliseconds())/float64(b.N), "ms/figure")
	})
	b.Run("png", func(b *testing.B) {
		b.ReportAllocs()
		for i := 0; i < b.N; i++ {
			if err := f.WritePNG(discard{}, 0); err != nil {
				b.Fatal(err)
			}
		}
		b.ReportMetric(float64(b.Elapsed().Milliseconds())/float64(b.N), "ms/figure")
	})
}

type discard struct{}

func (discard) Write(p []byte) (int, error) { return len(p), nil }

// BenchmarkWriteFitsCSV20k writes the fit table of the throughput
// comparison's 20,000 profiles (internal/longtable, fitted once with Wald
// intervals): whole (Fits.WriteCSV) and row by row (FitCSV, what fickfit
// fit streams), and with the encoding/csv writer it replaced (the same
// bytes: TestFitsCSVMatchesEncodingCSV). Reported: ns per row.
func BenchmarkWriteFitsCSV20k(b *testing.B) {
	var buf bytes.Buffer
	if err := longtable.Write(&buf, longtable.Options{Profiles: 20000, Points: 50, Seed: 5}); err != nil {
		b.Fatal(err)
	}
	ps, err := profile.ReadCSV(&buf, "long.csv")
	if err != nil {
		b.Fatal(err)
	}
	rs, errs := fit.FitAll(ps, fit.Options{CI: fit.CIWald}, nil)
	f := NewFits(ps, rs, errs)
	perRow := func(b *testing.B) {
		b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(len(f.Results)), "ns/row")
	}
	b.Run("whole", func(b *testing.B) {
		b.ReportAllocs()
		for b.Loop() {
			if err := f.WriteCSV(io.Discard); err != nil {
				b.Fatal(err)
			}
		}
		perRow(b)
	})
	b.Run("encodingcsv", func(b *testing.B) {
		b.ReportAllocs()
		for b.Loop() {
			if err := writeFitsCSVReference(f, io.Discard); err != nil {
				b.Fatal(err)
			}
		}
		perRow(b)
	})
	b.Run("rows", func(b *testing.B) {
		b.ReportAllocs()
		for b.Loop() {
			c := NewFitCSV(io.Discard)
			for _, r := range f.Results {
				if err := c.Add(r); err != nil {
					b.Fatal(err)
				}
			}
			if err := c.Close(); err != nil {
				b.Fatal(err)
			}
		}
		perRow(b)
	})
}
