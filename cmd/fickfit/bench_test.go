package main

import (
	"bytes"
	"io"
	"os"
	"path/filepath"
	"runtime"
	"testing"

	"github.com/fickfit/fickfit/fit"
	"github.com/fickfit/fickfit/internal/longtable"
	"github.com/fickfit/fickfit/internal/measure"
	"github.com/fickfit/fickfit/profile"
	"github.com/fickfit/fickfit/report"
)

// writeTable writes a generated long table (internal/longtable) to dir.
func writeTable(tb testing.TB, dir string, o longtable.Options) string {
	tb.Helper()
	path := filepath.Join(dir, "long.csv")
	f, err := os.Create(path)
	if err != nil {
		tb.Fatal(err)
	}
	if err := longtable.Write(f, o); err != nil {
		tb.Fatal(err)
	}
	if err := f.Close(); err != nil {
		tb.Fatal(err)
	}
	return path
}

// BenchmarkFitCommand is the whole command `fickfit fit FILE --ci wald
// --format csv -o OUT` on a generated long table of 20,000 profiles × 50
// points (about 28 MB): read, fit on every core, write.
func BenchmarkFitCommand(b *testing.B) {
	dir := b.TempDir()
	path := writeTable(b, dir, longtable.Options{Profiles: 20000, Points: 50, Seed: 5})
	out := filepath.Join(dir, "out.csv")
	cpu0 := measure.CPU()
	for b.Loop() {
		if code := run([]string{"fit", path, "--ci", "wald", "--format", "csv", "-o", out}, io.Discard, os.Stderr); code != 0 {
			b.Fatalf("exit status %d", code)
		}
	}
	b.ReportMetric(b.Elapsed().Seconds()/float64(b.N), "s/command")
	if cpu := measure.CPU(); cpu > 0 {
		b.ReportMetric((cpu-cpu0).Seconds()/float64(b.N), "cpu-s/command")
	}
}

// BenchmarkStreamMillion streams one generated long table of 10⁶ profiles
// × 50 points (1.4 GB) through the pipeline of fickfit fit --ci wald
// --format csv: profile.Each, fit.FitEach with results reused,
// report.FitStream's CSV, written to io.Discard. Reported: the time per
// profile (compare BenchmarkFitCommand's), the largest heap seen (sampled
// every ms) and the input's size. Run alone, with -benchtime 1x.
func BenchmarkStreamMillion(b *testing.B) {
	const profiles = 1000000
	dir := b.TempDir()
	path := writeTable(b, dir, longtable.Options{Profiles: profiles, Points: 50, Seed: 5})
	fi, err := os.Stat(path)
	if err != nil {
		b.Fatal(err)
	}
	size := fi.Size()
	runtime.GC()
	peak := measure.StartPeakHeap()
	cpu0 := measure.CPU()
	rows := 0
	for b.Loop() {
		doc := &report.FitStream{Run: func(keep bool, each func(*profile.Profile, *fit.Result, error) error) error {
			read := func(yield func(*profile.Profile) error) error { return profile.Each([]string{path}, yield) }
			return fit.FitEach(read, fit.Options{CI: fit.CIWald}, &fit.BatchOptions{Reuse: !keep}, each)
		}}
		counter := &countWriter{}
		if err := doc.WriteCSV(counter); err != nil {
			b.Fatal(err)
		}
		if len(doc.Errs) > 0 {
			b.Fatalf("%d profiles failed, first: %v", len(doc.Errs), doc.Errs[0])
		}
		rows = counter.lines
	}
	if rows != profiles+1 {
		b.Fatalf("%d lines written, want %d", rows, profiles+1)
	}
	b.ReportMetric(b.Elapsed().Seconds()/float64(b.N)/profiles*1e6, "µs/profile")
	if cpu := measure.CPU(); cpu > 0 {
		b.ReportMetric((cpu-cpu0).Seconds()/float64(b.N)/profiles*1e6, "cpu-µs/profile")
	}
	b.ReportMetric(float64(peak.Stop())/(1<<20), "peak-heap-MB")
	b.ReportMetric(float64(size)/(1<<20), "input-MB")
}

// countWriter counts the lines written to it and drops them.
type countWriter struct{ lines int }

func (c *countWriter) Write(p []byte) (int, error) {
	c.lines += bytes.Count(p, []byte{'\n'})
	return len(p), nil
}
