package main

import (
	"io"
	"os"
	"path/filepath"
	"testing"

	"github.com/fickfit/fickfit/internal/longtable"
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
	cpu0 := cpuTime()
	for b.Loop() {
		if code := run([]string{"fit", path, "--ci", "wald", "--format", "csv", "-o", out}, io.Discard, os.Stderr); code != 0 {
			b.Fatalf("exit status %d", code)
		}
	}
	b.ReportMetric(b.Elapsed().Seconds()/float64(b.N), "s/command")
	if cpu := cpuTime(); cpu > 0 {
		b.ReportMetric((cpu-cpu0).Seconds()/float64(b.N), "cpu-s/command")
	}
}
