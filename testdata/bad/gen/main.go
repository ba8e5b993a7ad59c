// Command gen writes the workbook fixtures of the profile package:
// testdata/bad/*.xlsx (damaged, bomb, bad cells), testdata/odd/workbook.xlsx
// and testdata/profile/campaign.xlsx. The numbers are invented fixtures,
// not check values. Run from the module root:
//
//	go run ./testdata/bad/gen
//
// (Directories named testdata are outside ./..., so this program is not
// part of the build or of go vet ./...)
package main

import (
	"bytes"
	"compress/flate"
	"encoding/binary"
	"fmt"
	"hash/crc32"
	"log"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"

	"github.com/xuri/excelize/v2"
)

func main() {
	log.SetFlags(0)
	must(campaign("testdata/profile/campaign.xlsx"))
	must(oddWorkbook("testdata/odd/workbook.xlsx"))
	must(badCell("testdata/bad/xlsx_bad_cell.xlsx"))
	must(noHeader("testdata/bad/xlsx_no_header.xlsx"))
	must(mixedUnits("testdata/bad/xlsx_mixed_units.xlsx"))
	must(tempChanges("testdata/bad/xlsx_long_temperature_changes.xlsx"))
	must(truncated("testdata/bad/truncated.xlsx"))
	must(bomb("testdata/bad/zipbomb.xlsx"))
	must(os.WriteFile("testdata/bad/not_zip.xlsx", []byte("depth_mm,C_wt%\n0.1,0.8\n"), 0o644))
}

func must(err error) {
	if err != nil {
		log.Fatal(err)
	}
}

// set writes rows of cells starting at A1 of sheet; numbers stay numbers.
func set(f *excelize.File, sheet string, rows [][]any) error {
	if idx, _ := f.GetSheetIndex(sheet); idx < 0 {
		if _, err := f.NewSheet(sheet); err != nil {
			return err
		}
	}
	for r, row := range rows {
		cell, _ := excelize.CoordinatesToCellName(1, r+1)
		if err := f.SetSheetRow(sheet, cell, &row); err != nil {
			return err
		}
	}
	return nil
}

func save(f *excelize.File, path string, first string) error {
	if idx, _ := f.GetSheetIndex("Sheet1"); idx >= 0 && first != "Sheet1" {
		if err := f.DeleteSheet("Sheet1"); err != nil {
			return err
		}
	}
	if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
		return err
	}
	return f.SaveAs(path)
}

// campaign: a sheet per profile with metadata in A/B cells ("A3") and in
// "key: value" cells with text numbers and decimal commas ("B1"), one long
// sheet ("Long"), a notes sheet and a hidden scratch sheet.
func campaign(path string) error {
	f := excelize.NewFile()
	defer f.Close()
	a3 := [][]any{
		{"Carbon profile, invented demonstration data"},
		{"temperature", "925 C"},
		{"time_h", 4},
		{"lot", "L1"},
		{"material", "20MnCr5"},
		{},
		{"depth_mm", "C_wt%"},
	}
	for _, p := range [][2]float64{{0.05, 0.865}, {0.1, 0.839}, {0.2, 0.767}, {0.3, 0.703}, {0.4, 0.637},
		{0.6, 0.547}, {0.8, 0.446}, {1.0, 0.377}, {1.5, 0.258}, {2.0, 0.215}} {
		a3 = append(a3, []any{p[0], p[1]})
	}
	b1 := [][]any{
		{"temperature: 900 C"},
		{"time: 240 min"},
		{"lot: L2"},
		{"depth (µm)", "C (wt%)", "sigma"},
	}
	for _, p := range [][2]string{{"50", "0,842"}, {"100", "0,827"}, {"200", "0,743"}, {"400", "0,572"},
		{"600", "0,455"}, {"1000", "0,302"}, {"2000", "0,196"}} {
		b1 = append(b1, []any{p[0], p[1], "0,01"})
	}
	long := [][]any{{"specimen", "temperature_C", "time_h", "lot", "depth_mm", "C_wt%"}}
	for _, s := range []struct {
		id string
		T  float64
		v  []float64
	}{{"C1", 950, []float64{0.869, 0.838, 0.79, 0.686, 0.604, 0.442}}, {"C2", 875, []float64{0.81, 0.77, 0.66, 0.48, 0.37, 0.25}}} {
		for i, x := range []float64{0.05, 0.1, 0.2, 0.4, 0.6, 1.0} {
			long = append(long, []any{s.id, s.T, 4, "L3", x, s.v[i]})
		}
	}
	for _, step := range []struct {
		name string
		rows [][]any
	}{{"A3", a3}, {"B1", b1}, {"Long", long}, {"Notes", [][]any{{"Invented data for the examples."}, {"Etched and polished; GDOES."}}},
		{"Scratch", [][]any{{"depth_mm", "C_wt%"}, {"x", "y"}}}} {
		if err := set(f, step.name, step.rows); err != nil {
			return err
		}
	}
	if err := f.SetSheetVisible("Scratch", false); err != nil {
		return err
	}
	return save(f, path, "A3")
}

// oddWorkbook: odd but valid layouts, checked value by value in the tests.
// The values are a constant-surface erf profile C = Cs + (C0 − Cs)·erf(x/(2√(Dt)))
// rounded to 4 decimals, from the same grids and parameters as
// testdata/odd/generate.go (which writes the cases and truth rows of this
// workbook: keep the two in step).
func oddWorkbook(path string) error {
	f := excelize.NewFile()
	defer f.Close()
	gridIn := strings.Fields("0.001 0.002 0.004 0.006 0.008 0.010 0.012 0.015 0.018 0.022 0.026 0.030 0.035 0.040 0.050 0.060")
	gridUM := strings.Fields("50 100 200 300 400 500 600 800 1000 1200 1500 1800 2200 2600")
	gridUM2 := strings.Fields("50 100 200 300 400 600 800 1000 1200 1500 1800 2200")
	s1 := [][]any{
		{},
		{"# id: W-1"},
		{"Temperature (°F):", "1700"},
		{"time", "1,5 h"},
		{},
		{nil, "Depth [in]", "HV0.5", "note"},
	}
	// W-1: D = 2.8e-11 m²/s, t = 5400 s, Cs = 780, C0 = 290 HV0.5; a blank
	// row after the first point; every other point as text with a decimal comma.
	for i, x := range gridIn {
		v := erfText(x, 0.0254, 2.8e-11*5400, 780, 290)
		if i%2 == 1 {
			s1 = append(s1, []any{nil, strings.Replace(x, ".", ",", 1), strings.Replace(v, ".", ",", 1), "edge"})
		} else {
			s1 = append(s1, []any{nil, number(x), number(v), "edge"})
		}
		if i == 0 {
			s1 = append(s1, []any{})
		}
	}
	// W-3: D = 2.5e-11 m²/s, 4 h, Cs 800, C0 300; W-2: D = 4.0e-11 m²/s, 2 h, Cs 820, C0 310.
	s2 := [][]any{{"profile", "depth_um", "temperature_K", "time_s", "HV0.5"}}
	for i := 0; i < len(gridUM) || i < len(gridUM2); i++ {
		if i < len(gridUM) {
			s2 = append(s2, []any{"W-3", number(gridUM[i]), 1198.15, 14400, number(erfText(gridUM[i], 1e-6, 2.5e-11*14400, 800, 300))})
		}
		if i < len(gridUM2) {
			s2 = append(s2, []any{"W-2", number(gridUM2[i]), 1223.15, 7200, number(erfText(gridUM2[i], 1e-6, 4.0e-11*7200, 820, 310))})
		}
	}
	if err := set(f, "W-1 sheet", s1); err != nil {
		return err
	}
	if err := set(f, "long", s2); err != nil {
		return err
	}
	return save(f, path, "W-1 sheet")
}

// erfText is Cs + (C0 − Cs)·erf(x/(2√(Dt))) at depth text d (in units of
// scale metres), rounded to 4 decimals.
func erfText(d string, scale, dt, cs, c0 float64) string {
	x := number(d) * scale
	return strconv.FormatFloat(cs+(c0-cs)*math.Erf(x/(2*math.Sqrt(dt))), 'f', 4, 64)
}

func number(s string) float64 {
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		log.Fatal(err)
	}
	return v
}

func badCell(path string) error {
	f := excelize.NewFile()
	defer f.Close()
	rows := [][]any{{"temperature", "925 C"}, {}, {"depth_mm", "remark", "C_wt%"},
		{0.1, "", 0.8}, {0.2, "", "abc"}, {0.4, "", 0.5}}
	if err := set(f, "A3", rows); err != nil {
		return err
	}
	return save(f, path, "A3")
}

func noHeader(path string) error {
	f := excelize.NewFile()
	defer f.Close()
	if err := set(f, "A3", [][]any{{"Carbon profile"}, {0.1, 0.8}, {0.2, 0.7}}); err != nil {
		return err
	}
	return save(f, path, "A3")
}

func mixedUnits(path string) error {
	f := excelize.NewFile()
	defer f.Close()
	if err := set(f, "A3", [][]any{{"depth_mm", "depth_um", "C_wt%"}, {0.1, 100, 0.8}}); err != nil {
		return err
	}
	return save(f, path, "A3")
}

func tempChanges(path string) error {
	f := excelize.NewFile()
	defer f.Close()
	rows := [][]any{{"profile", "temperature_C", "depth_mm", "C_wt%"},
		{"P1", 925, 0.1, 0.8}, {"P1", 925, 0.2, 0.7}, {"P1", 950, 0.4, 0.5}}
	if err := set(f, "Long", rows); err != nil {
		return err
	}
	return save(f, path, "Long")
}

// truncated: the first 60 % of a valid workbook.
func truncated(path string) error {
	f := excelize.NewFile()
	defer f.Close()
	if err := set(f, "Sheet1", [][]any{{"depth_mm", "C_wt%"}, {0.1, 0.8}, {0.2, 0.7}}); err != nil {
		return err
	}
	buf, err := f.WriteToBuffer()
	if err != nil {
		return err
	}
	b := buf.Bytes()
	return os.WriteFile(path, b[:len(b)*6/10], 0o644)
}

// bomb writes a zip whose central directory lists 64 parts of 16 MiB of
// zeros each (1 GiB in all), every one pointing at the same 16 KB deflate
// stream (overlapping entries). A reader without limits would unpack 1 GiB
// into memory from a file of about 20 KB.
func bomb(path string) error {
	const n, parts = 16 << 20, 64
	var z bytes.Buffer
	w, err := flate.NewWriter(&z, flate.BestCompression)
	if err != nil {
		return err
	}
	if _, err := w.Write(make([]byte, n)); err != nil {
		return err
	}
	if err := w.Close(); err != nil {
		return err
	}
	crc := crc32.ChecksumIEEE(make([]byte, n))
	var out bytes.Buffer
	le := binary.LittleEndian
	local := "xl/media/image1.bin"
	lh := make([]byte, 30)
	le.PutUint32(lh[0:], 0x04034b50)
	le.PutUint16(lh[4:], 20)
	le.PutUint16(lh[8:], 8)
	le.PutUint32(lh[14:], crc)
	le.PutUint32(lh[18:], uint32(z.Len()))
	le.PutUint32(lh[22:], n)
	le.PutUint16(lh[26:], uint16(len(local)))
	out.Write(lh)
	out.WriteString(local)
	out.Write(z.Bytes())
	cd := out.Len()
	for i := 0; i < parts; i++ {
		name := fmt.Sprintf("xl/media/image%d.bin", i+1)
		ch := make([]byte, 46)
		le.PutUint32(ch[0:], 0x02014b50)
		le.PutUint16(ch[4:], 20)
		le.PutUint16(ch[6:], 20)
		le.PutUint16(ch[10:], 8)
		le.PutUint32(ch[16:], crc)
		le.PutUint32(ch[20:], uint32(z.Len()))
		le.PutUint32(ch[24:], n)
		le.PutUint16(ch[28:], uint16(len(name)))
		out.Write(ch)
		out.WriteString(name)
	}
	end := make([]byte, 22)
	le.PutUint32(end[0:], 0x06054b50)
	le.PutUint16(end[8:], parts)
	le.PutUint16(end[10:], parts)
	le.PutUint32(end[12:], uint32(out.Len()-cd))
	le.PutUint32(end[16:], uint32(cd))
	out.Write(end)
	return os.WriteFile(path, out.Bytes(), 0o644)
}
