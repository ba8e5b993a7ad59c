package profile

import (
	"bytes"
	"fmt"
	"os"
	"path/filepath"
	"runtime"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/fickfit/fickfit/internal/badinput"
	"github.com/fickfit/fickfit/internal/longtable"
	"github.com/fickfit/fickfit/internal/measure"
	"github.com/xuri/excelize/v2"
)

// longCSV generates a long table of profiles × points rows (invented
// numbers: a smooth decay with a per-row wobble).
func longCSV(profiles, points int) []byte {
	var b bytes.Buffer
	b.WriteString("specimen,lot,temperature_C,time_h,depth_um,C_wt%,sigma\n")
	row := make([]byte, 0, 96)
	for p := 0; p < profiles; p++ {
		id := "S" + strconv.Itoa(p)
		T := strconv.Itoa(850 + p%150)
		for i := 0; i < points; i++ {
			row = append(row[:0], id...)
			row = append(row, ",L"...)
			row = strconv.AppendInt(row, int64(p%7), 10)
			row = append(row, ',')
			row = append(row, T...)
			row = append(row, ",4,"...)
			row = strconv.AppendInt(row, int64(20*(i+1)), 10)
			row = append(row, ',')
			row = strconv.AppendFloat(row, 0.2+0.7/float64(1+i)+0.001*float64((i*7+p)%5), 'f', 4, 64)
			row = append(row, ",0.01\n"...)
			b.Write(row)
		}
	}
	return b.Bytes()
}

// BenchmarkReadLongCSV reads a long table of 10⁴ profiles × 50 points
// (and 2·10⁴ × 50 = 10⁶ points). Reported: ns per point, the heap the
// result keeps (live-MB) and the largest heap seen while reading
// (peak-heap-MB, sampled every ms, input bytes included).
func BenchmarkReadLongCSV(b *testing.B) {
	for _, size := range []struct{ profiles, points int }{{10000, 50}, {20000, 50}} {
		n := size.profiles * size.points
		b.Run(fmt.Sprintf("%dpoints", n), func(b *testing.B) {
			data := longCSV(size.profiles, size.points)
			b.SetBytes(int64(len(data)))
			runtime.GC()
			var before runtime.MemStats
			runtime.ReadMemStats(&before)
			sampler := measure.StartPeakHeap()
			var ps []Profile
			b.ResetTimer()
			for b.Loop() {
				var err error
				if ps, err = ReadCSV(bytes.NewReader(data), "long.csv"); err != nil {
					b.Fatal(err)
				}
			}
			b.StopTimer()
			peak := sampler.Stop()
			runtime.GC()
			var after runtime.MemStats
			runtime.ReadMemStats(&after)
			runtime.KeepAlive(ps)
			if len(ps) != size.profiles {
				b.Fatalf("%d profiles", len(ps))
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(n), "ns/point")
			b.ReportMetric(float64(after.HeapAlloc-min(before.HeapAlloc, after.HeapAlloc))/(1<<20), "live-MB")
			b.ReportMetric(float64(peak)/(1<<20), "peak-heap-MB")
			runtime.KeepAlive(data)
		})
	}
}

// BenchmarkParseTemperature measures one metadata conversion.
func BenchmarkParseTemperature(b *testing.B) {
	for b.Loop() {
		if _, err := ParseTemperature("925,5 °C"); err != nil {
			b.Fatal(err)
		}
	}
}

// longWorkbook is a workbook with one long sheet of profiles × points
// rows (invented numbers, as longCSV), written by excelize's stream writer.
func longWorkbook(b *testing.B, profiles, points int) []byte {
	b.Helper()
	f := excelize.NewFile()
	defer f.Close()
	sw, err := f.NewStreamWriter("Sheet1")
	if err != nil {
		b.Fatal(err)
	}
	row := 1
	cell := func() string { c, _ := excelize.CoordinatesToCellName(1, row); row++; return c }
	if err := sw.SetRow(cell(), []any{"specimen", "lot", "temperature_C", "time_h", "depth_um", "C_wt%", "sigma"}); err != nil {
		b.Fatal(err)
	}
	for p := 0; p < profiles; p++ {
		for i := 0; i < points; i++ {
			if err := sw.SetRow(cell(), []any{"S" + strconv.Itoa(p), "L" + strconv.Itoa(p%7), 850 + p%150, 4, 20 * (i + 1),
				0.2 + 0.7/float64(1+i) + 0.001*float64((i*7+p)%5), 0.01}); err != nil {
				b.Fatal(err)
			}
		}
	}
	if err := sw.Flush(); err != nil {
		b.Fatal(err)
	}
	buf, err := f.WriteToBuffer()
	if err != nil {
		b.Fatal(err)
	}
	return buf.Bytes()
}

// BenchmarkReadWorkbook reads a long sheet of 2000 profiles × 50 points
// (10⁵ points): ns per point and the workbook's size.
func BenchmarkReadWorkbook(b *testing.B) {
	data := longWorkbook(b, 2000, 50)
	b.SetBytes(int64(len(data)))
	for b.Loop() {
		ps, err := readXLSXBytes(data, "long.xlsx")
		if err != nil || len(ps) != 2000 {
			b.Fatal(len(ps), err)
		}
	}
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/1e5, "ns/point")
}

// BenchmarkRefuseBadInput times the refusal of each generated bad input
// of the catalogue (internal/badinput): the amplifying ones must be
// refused in well under a second.
func BenchmarkRefuseBadInput(b *testing.B) {
	for _, name := range badinput.Names() {
		data, err := badinput.Bytes(name)
		if err != nil {
			b.Fatal(err)
		}
		b.Run(strings.TrimSuffix(strings.TrimSuffix(name, ".xlsx"), ".csv"), func(b *testing.B) {
			for b.Loop() {
				var err error
				if strings.HasSuffix(name, ".csv") {
					_, err = ReadCSV(bytes.NewReader(data), name)
				} else {
					_, err = readXLSXBytes(data, name)
				}
				if err == nil {
					b.Fatal("read without error")
				}
			}
			b.ReportMetric(float64(len(data))/1024, "file-KiB")
		})
	}
}

// BenchmarkReadLongTable20k reads the table of the throughput comparison
// (internal/longtable: 20,000 profiles × 50 points, 27.8 MB, the file
// fickfit fit and bench/scipy_loop.py read) whole with ReadCSV, and
// profile by profile with Each (what fickfit fit does). Reported: ns per
// point and MB/s; allocations per run.
func BenchmarkReadLongTable20k(b *testing.B) {
	var buf bytes.Buffer
	if err := longtable.Write(&buf, longtable.Options{Profiles: 20000, Points: 50, Seed: 5}); err != nil {
		b.Fatal(err)
	}
	data := buf.Bytes()
	path := filepath.Join(b.TempDir(), "long.csv")
	if err := os.WriteFile(path, data, 0o644); err != nil {
		b.Fatal(err)
	}
	var cpu0 time.Duration
	report := func(b *testing.B) {
		b.SetBytes(int64(len(data)))
		b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/1e6, "ns/point")
		if cpu := measure.CPU(); cpu > 0 {
			b.ReportMetric(float64((cpu-cpu0).Nanoseconds())/float64(b.N)/1e6, "cpu-ns/point")
		}
	}
	b.Run("ReadCSV", func(b *testing.B) {
		b.ReportAllocs()
		cpu0 = measure.CPU()
		for b.Loop() {
			ps, err := ReadCSV(bytes.NewReader(data), "long.csv")
			if err != nil || len(ps) != 20000 {
				b.Fatal(len(ps), err)
			}
		}
		report(b)
	})
	b.Run("Each", func(b *testing.B) {
		b.ReportAllocs()
		cpu0 = measure.CPU()
		for b.Loop() {
			n := 0
			if err := Each([]string{path}, func(p *Profile) error { n++; return nil }); err != nil || n != 20000 {
				b.Fatal(n, err)
			}
		}
		report(b)
	})
}
