package profile

import (
	"bytes"
	"errors"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/fickfit/fickfit/internal/badinput"
)

// addFiles adds every file of the given testdata folders as a seed.
func addFiles(f *testing.F, dirs ...string) {
	for _, d := range dirs {
		entries, err := os.ReadDir(filepath.Join("..", "testdata", d))
		if err != nil {
			f.Fatal(err)
		}
		for _, e := range entries {
			if e.IsDir() || strings.HasSuffix(e.Name(), ".md") {
				continue
			}
			b, err := os.ReadFile(filepath.Join("..", "testdata", d, e.Name()))
			if err != nil {
				f.Fatal(err)
			}
			f.Add(b)
		}
	}
}

// checkResult asserts the reader contract: an error is an *Error naming
// the file; a success gives valid profiles.
func checkResult(t *testing.T, ps []Profile, err error, name string) {
	t.Helper()
	if err != nil {
		var e *Error
		if !errors.As(err, &e) || e.File != name || e.Err == nil {
			t.Fatalf("error %v (%T) is not an *Error naming %s", err, err, name)
		}
		return
	}
	if len(ps) == 0 {
		t.Fatal("no profiles and no error")
	}
	for i := range ps {
		if err := ps[i].Validate(); err != nil {
			t.Fatalf("profile %d invalid: %v", i, err)
		}
	}
}

func FuzzReadCSV(f *testing.F) {
	addFiles(f, "odd", "bad", "profile")
	f.Add([]byte("depth_mm;C_wt%\n0,1;0,8\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		ps, err := ReadCSV(bytes.NewReader(data), "f.csv")
		checkResult(t, ps, err, "f.csv")
	})
}

func FuzzLongTable(f *testing.F) {
	f.Add("profile,depth_um,temperature_C,time_h,lot,C_wt%,sigma", "A,1,925,4,L1,0.8,0.1\nB,2,950,4,L2,0.7,0.1\nA,3,925,,L1,0.6,0.1")
	f.Add("ID;Distance (mm);Temperature (°F);Time (min);unknown;C (wt%)", "X;0,1;1700;240;yes;0,80\nY;0,1;1650;240;no;0,75")
	f.Add("specimen\tdepth_mm\tT_K\tHV0.5", "S\t0.1\t1200\t700\nS\t0.2\t1300\t600")
	f.Fuzz(func(t *testing.T, header, body string) {
		ps, err := ReadCSV(strings.NewReader(header+"\n"+body), "long.csv")
		checkResult(t, ps, err, "long.csv")
		seen := map[string]bool{}
		for _, p := range ps {
			if seen[p.ID] {
				t.Fatalf("id %q twice", p.ID)
			}
			seen[p.ID] = true
		}
	})
}

func FuzzMetadataLine(f *testing.F) {
	for _, s := range []string{"# temperature: 925 C", "# time (h): 4", "#id:A", "# thickness_mm: 1,5",
		"# see http://x", "# temperature_sigma: 5 F", "# value: C_wt%"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, line string) {
		k, v, ok := parseMetaLine(line)
		if !ok {
			if k != "" || v != "" {
				t.Fatal("key or value without ok")
			}
			return
		}
		if !isKey(k) {
			t.Fatalf("key %q accepted", k)
		}
		ps, err := ReadCSV(strings.NewReader(line+"\ndepth_mm,C_wt%\n0.1,0.8\n"), "m.csv")
		checkResult(t, ps, err, "m.csv")
	})
}

func FuzzUnits(f *testing.F) {
	for _, s := range []string{"925 C", "925°C", "1700 F", "1198 K", "4 h 30 min", "1,5 d", "800 µm", "0.5 in",
		"20 mil", "−40 °F", "1e3 s", "1,000 h", "3 K"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		if v, err := ParseTemperature(s); err == nil && !(v > 0 && !math.IsInf(v, 0)) {
			t.Fatalf("ParseTemperature(%q) = %v", s, v)
		}
		if v, err := ParseDuration(s); err == nil && !(v > 0 && !math.IsInf(v, 0)) {
			t.Fatalf("ParseDuration(%q) = %v", s, v)
		}
		if v, err := ParseLength(s); err == nil && !(v >= 0 && !math.IsInf(v, 0)) {
			t.Fatalf("ParseLength(%q) = %v", s, v)
		}
		if v, err := ParseTemperatureDelta(s); err == nil && !(v >= 0 && !math.IsInf(v, 0)) {
			t.Fatalf("ParseTemperatureDelta(%q) = %v", s, v)
		}
		if v, err := parseNumber(s, true); err == nil && (math.IsNaN(v) || math.IsInf(v, 0)) {
			t.Fatalf("parseNumber(%q) = %v", s, v)
		}
	})
}

// FuzzXLSX drives the worksheet logic (metadata rows, header detection,
// per-profile and long layouts, cell positions) with a fuzzed grid: rows
// split by '\n', cells by '\t', as excelize's row iterator would yield
// them. FuzzXLSXBytes covers the workbook container itself.
func FuzzXLSX(f *testing.F) {
	f.Add("temperature\t925 C\ntime_h\t4\n\ndepth_mm\tC_wt%\n0.1\t0.8\n0.2\t0,7")
	f.Add("# id: W\n\tDepth [in]\tHV0.5\tnote\n\t0.002\t801\tx\n\n\t0,004\t776\tx")
	f.Add("profile\tdepth_um\ttemperature_K\tHV0.5\nA\t50\t1200\t800\nB\t50\t1300\t700")
	f.Add("title\n1\t2")
	f.Add("Temperature (°F):\t1700\nthickness: 0,5 in\ndistance_mil\tsigma\tN (ppm)\n1\t2\t300")
	f.Add("temperature\t925\tC\ntime:\t4 h\nHold\t\tlot\tL1\ndepth_mm\tC_wt%\n0.1\t0.8\n1.025\t0,7")
	f.Add("temperature\ttime\n925 C\t4 h\ndepth_mm\tC_wt%\n0.1\t0.8")
	f.Add("temperature\nlot\tL1\tL2\ndepth_um;x\tHV0.5\n1,025\t650\n2,5\t600")
	f.Fuzz(func(t *testing.T, grid string) {
		ps, err := readRows(gridRows(grid), origin{file: "f.xlsx", sheet: "S"}, sheetOptions{})
		if err == nil && ps == nil {
			return // a sheet without a header is skipped
		}
		checkResult(t, ps, err, "f.xlsx")
	})
}

// sliceRows is a rowSource over rows held in memory: rows split by '\n',
// cells by '\t', all text, as a worksheet of text cells would yield them.
type sliceRows struct {
	rows [][]string
	i    int
}

func (s *sliceRows) next() (sheetRow, error) {
	for s.i < len(s.rows) {
		s.i++
		r := sheetRow{line: s.i}
		for c, text := range s.rows[s.i-1] {
			if text != "" {
				r.cells = append(r.cells, xcell{col: c, text: text})
			}
		}
		if len(r.cells) > 0 {
			return r, nil
		}
	}
	return sheetRow{}, io.EOF
}

func gridRows(grid string) *sliceRows {
	s := &sliceRows{}
	for _, line := range strings.Split(grid, "\n") {
		s.rows = append(s.rows, strings.Split(line, "\t"))
	}
	return s
}

// TestXLSXGridPositions: the grid path gives the same cell positions as a
// real workbook would.
func TestXLSXGridPositions(t *testing.T) {
	_, err := readRows(gridRows("\n\tdepth_mm\tC_wt%\n\t0.1\tx"), origin{file: "g.xlsx", sheet: "S"}, sheetOptions{})
	if err == nil || !strings.Contains(err.Error(), `g.xlsx [Sheet "S"] cell C3`) {
		t.Errorf("got %v", err)
	}
}

// FuzzXLSXBytes feeds raw bytes to the workbook reader: damaged zips and
// XML must give errors, never panics.
func FuzzXLSXBytes(f *testing.F) {
	for _, name := range []string{"odd/workbook.xlsx", "profile/campaign.xlsx", "bad/xlsx_bad_cell.xlsx",
		"bad/truncated.xlsx", "bad/zipbomb.xlsx"} {
		b, err := os.ReadFile(filepath.Join("..", "testdata", name))
		if err != nil {
			f.Fatal(err)
		}
		f.Add(b)
	}
	for _, name := range badinput.Names() {
		if strings.HasSuffix(name, ".xlsx") {
			b, err := badinput.Bytes(name)
			if err != nil {
				f.Fatal(err)
			}
			if len(b) <= 64<<10 { // larger seeds only slow the fuzzer
				f.Add(b)
			}
		}
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		ps, err := readXLSXBytes(data, "f.xlsx")
		checkResult(t, ps, err, "f.xlsx")
	})
}

func FuzzCalibration(f *testing.F) {
	f.Add([]byte("HV0.5,C_wt%\n200,0.15\n400,0.35\n880,0.95\n"))
	f.Add([]byte("C (wt%);hardness_HRC\n0,5;55\n0,2;30\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		c, err := ReadCalibrationCSV(bytes.NewReader(data), "c.csv")
		if err != nil {
			var e *Error
			if !errors.As(err, &e) || e.File != "c.csv" {
				t.Fatalf("error %v is not an *Error naming the file", err)
			}
			return
		}
		for i, h := range c.Hardness {
			v, err := c.ToConcentration(h)
			if err != nil || math.Abs(v-c.Concentration[i]) > 1e-9*math.Max(1, math.Abs(v)) {
				t.Fatalf("node %d: %v, %v", i, v, err)
			}
			if _, err := c.ToHardness(c.Concentration[i]); err != nil {
				t.Fatalf("ToHardness at node %d: %v", i, err)
			}
		}
	})
}

func FuzzHistory(f *testing.F) {
	f.Add([]byte("time_h,temperature_C\n0,20\n1,925\n4,925\n"))
	f.Add([]byte("# furnace: F1\nT_K;elapsed_min\n1000;0\n1100,5;30\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		h, err := ReadHistoryCSV(bytes.NewReader(data), "h.csv")
		if err != nil {
			var e *Error
			if !errors.As(err, &e) || e.File != "h.csv" {
				t.Fatalf("error %v is not an *Error naming the file", err)
			}
			return
		}
		if h.Len() < 2 || len(h.Temp) != h.Len() || len(h.Line) != h.Len() {
			t.Fatalf("bad history %+v", h)
		}
		for i := range h.Time {
			if !(h.Temp[i] > 0) || math.IsInf(h.Temp[i], 0) || math.IsNaN(h.Time[i]) || (i > 0 && !(h.Time[i] > h.Time[i-1])) {
				t.Fatalf("row %d: t %v T %v", i, h.Time[i], h.Temp[i])
			}
		}
	})
}

// FuzzWorkbookXML feeds fuzzed worksheet and shared-strings XML inside an
// otherwise valid workbook to the reader: malformed or odd XML must give
// an *Error or valid profiles, never a panic.
func FuzzWorkbookXML(f *testing.F) {
	ns := `xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main"`
	sst := `<sst ` + ns + `><si><t>depth_mm</t></si><si><r><t>C_</t></r><r><t>wt%</t></r><rPh><t>x</t></rPh></si><si><t>0,5</t></si></sst>`
	f.Add(`<worksheet `+ns+`><sheetData><row r="1"><c r="A1" t="s"><v>0</v></c><c r="B1" t="s"><v>1</v></c></row>`+
		`<row r="2"><c r="A2"><v>0.1</v></c><c r="B2" t="s"><v>2</v></c></row><row r="3"><c r="A3"><v>0.2</v></c><c r="B3"><f>B2*2</f><v>1</v></c></row>`+
		`</sheetData><mergeCells count="1"><mergeCell ref="C1:D1"/></mergeCells></worksheet>`, sst)
	f.Add(`<x:worksheet xmlns:x="http://schemas.openxmlformats.org/spreadsheetml/2006/main"><x:sheetData><x:row><x:c t="inlineStr"><x:is><x:t>temperature</x:t></x:is></x:c>`+
		`<x:c t="inlineStr"><x:is><x:t>925 C</x:t></x:is></x:c></x:row><x:row><x:c t="s"><x:v>0</x:v></x:c><x:c t="b"><x:v>1</x:v></x:c></x:row>`+
		`<x:row><x:c><x:v>0.1</x:v></x:c><x:c t="e"><x:v>#N/A</x:v></x:c></x:row></x:sheetData></x:worksheet>`, sst)
	f.Add(`<worksheet `+ns+`><sheetData><row r="3"><c r="XFD3"><v>1</v></c></row><row r="2"/></sheetData></worksheet>`, `<sst/>`)
	f.Fuzz(func(t *testing.T, sheet, shared string) {
		parts := badinput.Book{Sheets: []badinput.Sheet{{Name: "S", Rows: [][]badinput.Cell{{badinput.Str("x")}}}},
			Shared: []string{"x"}}.Parts()
		for i := range parts {
			parts[i].Store = true // no deflate: fuzzing time goes to the reader
			switch parts[i].Name {
			case "xl/worksheets/sheet1.xml":
				parts[i].Data = []byte(sheet)
			case "xl/sharedStrings.xml":
				parts[i].Data = []byte(shared)
			}
		}
		data, err := badinput.Zip(parts)
		if err != nil {
			t.Fatal(err)
		}
		ps, err := readXLSXBytes(data, "f.xlsx")
		checkResult(t, ps, err, "f.xlsx")
	})
}

// FuzzDecimalMark: in a file whose decimals use a comma (a ';' table) or
// a point (a tab table), a number is either refused as ambiguous or read
// as the file's convention reads it (common practice, no source).
func FuzzDecimalMark(f *testing.F) {
	for _, s := range []string{"1.025", "1,025", "0,5", "12.5", "−2.500", "1e3", "100", "999,999", "1000.25"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		if strings.ContainsAny(s, "\n\r\t;\"#") {
			return
		}
		want, err := parseNumber(s, true)
		if err != nil {
			return
		}
		for _, file := range []string{"depth_mm;C_wt%\n0,5;" + s + "\n", "depth_mm\tC_wt%\n0.5\t" + s + "\n"} {
			ps, err := ReadCSV(strings.NewReader(file), "m.csv")
			ambiguous := markOf(s) == markDotAmbiguous && file[8] == ';' || markOf(s) == markCommaAmbiguous && file[8] == '\t'
			switch {
			case ambiguous && (err == nil || !strings.Contains(err.Error(), "ambiguous")):
				t.Fatalf("%q in %q: %v", s, file, err)
			case !ambiguous && err == nil && ps[0].Value[0] != want:
				t.Fatalf("%q in %q read as %v, want %v", s, file, ps[0].Value[0], want)
			}
		}
	})
}
