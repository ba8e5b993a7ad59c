package report

import (
	"fmt"
	"os"
	"path/filepath"
	"runtime"
	"testing"
	"time"

	"github.com/fickfit/fickfit/campaign"
	"github.com/fickfit/fickfit/internal/longtable"
	"github.com/fickfit/fickfit/internal/measure"
)

// BenchmarkCampaignScale runs the whole campaign (read, fit with the
// default profile-likelihood intervals, Arrhenius lines per lot,
// comparison, back-calculation, the report folder with SVG and PNG
// figures, workbook and HTML) on a generated long table
// (internal/longtable, campaign layout: two lots, four temperatures, one
// part in 500 marked unknown, 50 points a profile) of 1,000, 4,000 and
// 10,000 profiles. Reported per size: s/campaign and cpu-s/campaign, the
// cost per profile (ms/profile: constant when the cost is linear), the
// largest heap seen (peak-heap-MB) and the size of report.html (html-MB).
// Run with -benchtime 1x: the 10,000 case takes tens of seconds.
func BenchmarkCampaignScale(b *testing.B) {
	for _, n := range campaignSizes {
		b.Run(fmt.Sprintf("%dprofiles", n), func(b *testing.B) {
			dir := b.TempDir()
			in := filepath.Join(dir, "campaign.csv")
			f, err := os.Create(in)
			if err != nil {
				b.Fatal(err)
			}
			if err := longtable.Write(f, longtable.Options{Profiles: n, Points: 50, Seed: 7, Campaign: true}); err != nil {
				b.Fatal(err)
			}
			if err := f.Close(); err != nil {
				b.Fatal(err)
			}
			runtime.GC()
			sampler := measure.StartPeakHeap()
			cpu0, t0 := measure.CPU(), time.Now()
			var html int64
			for i := 0; i < b.N; i++ {
				res, err := campaign.Run([]string{in}, campaign.Options{Version: "bench"})
				if err != nil {
					b.Fatal(err)
				}
				out := filepath.Join(dir, fmt.Sprint("out", i))
				if _, err := WriteCampaign(out, res, CampaignOptions{}); err != nil {
					b.Fatal(err)
				}
				if fi, err := os.Stat(filepath.Join(out, FileHTML)); err == nil {
					html = fi.Size()
				}
				os.RemoveAll(out)
			}
			wall := time.Since(t0).Seconds() / float64(b.N)
			peak := sampler.Stop()
			b.ReportMetric(wall, "s/campaign")
			if cpu := measure.CPU(); cpu > 0 {
				b.ReportMetric((cpu-cpu0).Seconds()/float64(b.N), "cpu-s/campaign")
			}
			b.ReportMetric(wall/float64(n)*1e3, "ms/profile")
			b.ReportMetric(float64(peak)/(1<<20), "peak-heap-MB")
			b.ReportMetric(float64(html)/(1<<20), "html-MB")
		})
	}
}

// campaignSizes are the sizes BenchmarkCampaignScale runs.
var campaignSizes = []int{1000, 4000, 10000}
