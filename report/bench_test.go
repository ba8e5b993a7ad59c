package report

import (
	"fmt"
	"path/filepath"
	"testing"
	"time"

	"github.com/fickfit/fickfit/campaign"
	"github.com/fickfit/fickfit/fit"
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
