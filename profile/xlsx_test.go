package profile

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/fickfit/fickfit/internal/badinput"
	"github.com/xuri/excelize/v2"
)

// workbook builds an in-memory workbook from sheets of rows (cells are
// written as given: float64 as numbers, string as text).
func workbook(t testing.TB, sheets []string, rows map[string][][]any, hidden ...string) []byte {
	t.Helper()
	f := excelize.NewFile()
	defer f.Close()
	for i, name := range sheets {
		if i == 0 {
			if err := f.SetSheetName("Sheet1", name); err != nil {
				t.Fatal(err)
			}
		} else if _, err := f.NewSheet(name); err != nil {
			t.Fatal(err)
		}
		for r, row := range rows[name] {
			cell, _ := excelize.CoordinatesToCellName(1, r+1)
			if err := f.SetSheetRow(name, cell, &row); err != nil {
				t.Fatal(err)
			}
		}
	}
	for _, h := range hidden {
		if err := f.SetSheetVisible(h, false); err != nil {
			t.Fatal(err)
		}
	}
	buf, err := f.WriteToBuffer()
	if err != nil {
		t.Fatal(err)
	}
	return buf.Bytes()
}

func TestXLSXLayouts(t *testing.T) {
	data := workbook(t, []string{"A3", "notes", "long", "scratch"}, map[string][][]any{
		"A3": {
			{"Case-hardened coupon"},
			{"temperature:", "925 C"},
			{"time_h", 4.0},
			{"thickness: 0,5 in"},
			{"material", "18CrNiMo7-6"},
			{},
			{"depth_um", "C_wt%", "sigma"},
			{50.0, 0.85, "0,02"},
			{},
			{"100", "0,80", 0.02},
		},
		"notes": {{"some text"}, {"more: text"}},
		"long": {
			{"ID", "temperature_K", "time_min", "depth_mm", "N_wt%"},
			{"L-2", 843.0, 600.0, 0.05, 0.4},
			{"L-1", 853.0, 600.0, 0.05, 0.5},
			{"L-2", 843.0, 600.0, 0.1, 0.3},
		},
		"scratch": {{"depth_mm", "C_wt%"}, {"broken", "x"}},
	}, "scratch")
	ps, err := readXLSXBytes(data, "book.xlsx")
	if err != nil {
		t.Fatal(err)
	}
	if len(ps) != 3 || ps[0].ID != "A3" || ps[1].ID != "L-2" || ps[2].ID != "L-1" {
		t.Fatalf("got %d profiles", len(ps))
	}
	a := ps[0]
	if a.Source != "book.xlsx:A3" || a.Temperature != 1198.15 || a.Time != 14400 || !near(a.Thickness, 0.0127, 1e-15) ||
		a.Material != "18CrNiMo7-6" || !sameFloats(a.Depth, []float64{5e-5, 1e-4}) ||
		!sameFloats(a.Value, []float64{0.85, 0.8}) || !sameFloats(a.Sigma, []float64{0.02, 0.02}) ||
		a.Line[0] != 8 || a.Line[1] != 10 {
		t.Errorf("A3: %+v", a)
	}
	if l := ps[1]; l.Temperature != 843 || l.Time != 36000 || l.Quantity != "N" || !sameFloats(l.Depth, []float64{5e-5, 1e-4}) ||
		l.Source != "book.xlsx:long" {
		t.Errorf("L-2: %+v", l)
	}
}

func TestXLSXErrors(t *testing.T) {
	tests := []struct {
		rows [][]any
		kind error
		cell string
		frag string
	}{
		{[][]any{{"depth_mm", "C_wt%"}, {0.1, "#DIV/0!"}}, ErrNumber, "cell B2", "not a number"},
		{[][]any{{"depth_mm", "C_wt%"}, {-0.1, 0.5}}, ErrValue, "cell A2", "negative"},
		{[][]any{{"temperature", 925.0}, {"depth_mm", "C_wt%"}, {0.1, 0.5}}, ErrUnit, "cell B1", "no unit"},
		{[][]any{{"temperature", "-300 C"}, {"depth_mm", "C_wt%"}, {0.1, 0.5}}, ErrValue, "cell B1", "absolute zero"},
		{[][]any{{"time", "4 h"}, {"time", "5 h"}, {"depth_mm", "C_wt%"}, {0.1, 0.5}}, ErrMetadata, "cell B2", "twice"},
		{[][]any{{"depth", "C_wt%"}, {0.1, 0.5}}, ErrUnit, "cell A1", "no unit"},
		{[][]any{{"depth_mm", "C_wt%"}}, ErrNoData, "row 1", "no data rows"},
		{[][]any{{"temperature", "925 C"}}, ErrNoData, "cell B1", "no header row"},
		{[][]any{{"depth_mm", "C_wt%"}, {0.1, 0.5, 7.0}}, ErrColumn, "cell C2", "cells but the header"},
	}
	for i, tt := range tests {
		data := workbook(t, []string{"S"}, map[string][][]any{"S": tt.rows})
		_, err := readXLSXBytes(data, "w.xlsx")
		var e *Error
		if !errors.As(err, &e) || !errors.Is(err, tt.kind) || e.Sheet != "S" ||
			!strings.Contains(err.Error(), `w.xlsx [Sheet "S"] `+tt.cell) || !strings.Contains(err.Error(), tt.frag) {
			t.Errorf("case %d: got %v; want %v at %s with %q", i, err, tt.kind, tt.cell, tt.frag)
		}
	}
	// Only a notes sheet: nothing to read.
	data := workbook(t, []string{"notes"}, map[string][][]any{"notes": {{"text"}}})
	if _, err := readXLSXBytes(data, "w.xlsx"); !errors.Is(err, ErrNoData) {
		t.Errorf("notes only: %v", err)
	}
}

// TestXLSXFiles reads the committed example workbook and the bomb.
func TestXLSXFiles(t *testing.T) {
	ps, err := Read(filepath.Join("..", "testdata", "profile", "campaign.xlsx"))
	if err != nil {
		t.Fatal(err)
	}
	ids := make([]string, len(ps))
	for i, p := range ps {
		ids[i] = p.ID
	}
	if strings.Join(ids, " ") != "A3 B1 C1 C2" {
		t.Errorf("ids %v (hidden Scratch sheet and Notes must be skipped)", ids)
	}
	if b1 := ps[1]; b1.Temperature != 1173.15 || b1.Time != 14400 || b1.Lot != "L2" || b1.Value[0] != 0.842 {
		t.Errorf("B1: %+v", b1)
	}
	bomb, err := os.ReadFile(filepath.Join("..", "testdata", "bad", "zipbomb.xlsx"))
	if err != nil {
		t.Fatal(err)
	}
	if len(bomb) > 64<<10 {
		t.Errorf("committed bomb is %d bytes; keep it small", len(bomb))
	}
	if _, err := readXLSXBytes(bomb, "bomb.xlsx"); !errors.Is(err, ErrTooLarge) {
		t.Errorf("bomb: %v", err)
	}
	if _, err := readXLSXBytes(nil, "nil.xlsx"); !errors.Is(err, ErrFormat) {
		t.Errorf("empty workbook bytes: %v", err)
	}
}

// book writes a hand-made workbook (internal/badinput) and reads it.
func readBook(t *testing.T, b badinput.Book) ([]Profile, error) {
	t.Helper()
	data, err := badinput.Zip(b.Parts())
	if err != nil {
		t.Fatal(err)
	}
	return readXLSXBytes(data, "h.xlsx")
}

// pointsRows are a header and three points below the given metadata rows.
func pointsRows(meta ...[]badinput.Cell) [][]badinput.Cell {
	S, N := badinput.Str, badinput.Num
	return append(meta, []badinput.Cell{S("depth_mm"), S("C_wt%")},
		[]badinput.Cell{N("0.1"), N("0.8")}, []badinput.Cell{N("0.2"), N("0.7")}, []badinput.Cell{N("0.4"), N("0.5")})
}

// TestSheetMetadataLayouts: metadata written over several cells is read,
// never dropped (common practice, no source).
func TestSheetMetadataLayouts(t *testing.T) {
	S, N, E := badinput.Str, badinput.Num, badinput.Empty
	for _, tc := range []struct {
		name   string
		meta   [][]badinput.Cell
		merged []string
		temp   float64 // K
		time   float64 // s
	}{
		{"key | value | unit", [][]badinput.Cell{{S("temperature"), N("925"), S("C")}, {S("time"), N("4"), S("h")}}, nil, 1198.15, 14400},
		{"key: value | unit", [][]badinput.Cell{{S("temperature: 925"), S("°C")}, {S("time:"), S("4 h")}}, nil, 1198.15, 14400},
		{"merged key cell", [][]badinput.Cell{{S("temperature"), E, S("925 C")}, {S("time"), E, N("4"), S("h")}},
			[]string{"A1:B1", "A2:B2"}, 1198.15, 14400},
		{"blank cell between", [][]badinput.Cell{{S("temperature"), E, E, S("925 C")}, {S("time_h"), E, N("4")}}, nil, 1198.15, 14400},
		{"label before key", [][]badinput.Cell{{S("Hold"), S("temperature"), S("925 C")}, {E, S("time"), S("4 h")}},
			[]string{"A1:A2"}, 1198.15, 14400},
		{"key: with nothing is blank", [][]badinput.Cell{{S("temperature:")}, {S("time"), S("4 h")}}, nil, 0, 14400},
		{"unit in key", [][]badinput.Cell{{S("Temperature (°F):"), N("1700")}, {S("time_min"), N("240")}}, nil, (1700-32)*5.0/9 + 273.15, 14400},
	} {
		ps, err := readBook(t, badinput.Book{Sheets: []badinput.Sheet{{Name: "A3", Rows: pointsRows(tc.meta...), Merged: tc.merged}}})
		if err != nil {
			t.Errorf("%s: %v", tc.name, err)
			continue
		}
		if p := ps[0]; !near(p.Temperature, tc.temp, 1e-12) || p.Time != tc.time || p.Len() != 3 {
			t.Errorf("%s: temperature %v K, time %v s, %d points", tc.name, p.Temperature, p.Time, p.Len())
		}
	}
	for _, tc := range []struct {
		name string
		meta [][]badinput.Cell
		cell string
		frag string
	}{
		{"two values for a key without unit", [][]badinput.Cell{{S("lot"), S("L1"), S("L2")}}, "cell B1", `metadata "lot" is followed by 2 cells`},
		{"value and sigma", [][]badinput.Cell{{S("temperature"), N("925"), N("3")}}, "cell A1", "numbers in row 1"},
		{"unit that is not one", [][]badinput.Cell{{S("temperature"), N("925"), S("deg")}}, "cell B1", `unknown temperature unit "deg"`},
		{"formula as value", [][]badinput.Cell{{S("temperature"), badinput.Formula("900+25"), S("C")}}, "cell B1", "formula with no stored result"},
		{"keys in a row, values below", [][]badinput.Cell{{S("temperature"), S("time")}, {S("925 C"), S("4 h")}}, "cell B1",
			`two metadata keys, "temperature" and "time"`},
		{"key alone", [][]badinput.Cell{{S("temperature")}, {S("925 C")}}, "cell A1", `metadata "temperature" has no value beside it`},
	} {
		_, err := readBook(t, badinput.Book{Sheets: []badinput.Sheet{{Name: "A3", Rows: pointsRows(tc.meta...)}}})
		if err == nil || !strings.Contains(err.Error(), `h.xlsx [Sheet "A3"] `+tc.cell) || !strings.Contains(err.Error(), tc.frag) {
			t.Errorf("%s: %v; want %s and %q", tc.name, err, tc.cell, tc.frag)
		}
	}
}

// TestSheetCellKinds: cells are read by their type: a stored number as
// stored (no decimal-mark guessing), a formula by its stored result, text
// with a decimal comma, a logical value never as a number.
func TestSheetCellKinds(t *testing.T) {
	S, N := badinput.Str, badinput.Num
	formula := badinput.Cell{XML: "<f>B2*0.9</f><v>0.72</v>"}
	rows := [][]badinput.Cell{
		{S("depth_mm"), S("C_wt%"), S("etched")},
		{N("1.025"), N("0.8"), badinput.Bool(true)},
		{N("1.5"), formula, badinput.Bool(true)},
		{S("2,5"), S("0,55"), S("TRUE")},
	}
	ps, err := readBook(t, badinput.Book{Sheets: []badinput.Sheet{{Name: "A3", Rows: rows}}})
	if err != nil {
		t.Fatal(err)
	}
	p := ps[0]
	if !sameFloats(p.Value, []float64{0.8, 0.72, 0.55}) || !near(p.Depth[0], 1.025e-3, 1e-15) || p.Meta["etched"] != "TRUE" {
		t.Errorf("%+v", p)
	}
	// A text "1.025" beside decimal commas is ambiguous; a number cell 1.025 is not.
	rows[1][0] = S("1.025")
	if _, err := readBook(t, badinput.Book{Sheets: []badinput.Sheet{{Name: "A3", Rows: rows}}}); err == nil ||
		!strings.Contains(err.Error(), `cell A2`) || !strings.Contains(err.Error(), "ambiguous") {
		t.Errorf("text 1.025 among decimal commas: %v", err)
	}
	for _, tc := range []struct {
		cell badinput.Cell
		frag string
	}{
		{badinput.ErrorValue("#DIV/0!"), `the error value "#DIV/0!"`},
		{badinput.Formula("B2*0.9"), "formula with no stored result"},
		{badinput.Bool(false), "logical value FALSE"},
	} {
		rows := pointsRows()
		rows[2][1] = tc.cell
		if _, err := readBook(t, badinput.Book{Sheets: []badinput.Sheet{{Name: "S", Rows: rows}}}); err == nil ||
			!strings.Contains(err.Error(), `[Sheet "S"] cell B3`) || !strings.Contains(err.Error(), tc.frag) {
			t.Errorf("%s: %v", tc.frag, err)
		}
	}
	// A row of formulas without results is not a blank row.
	rows = pointsRows()
	rows[2] = []badinput.Cell{badinput.Formula("A2+0.1"), badinput.Formula("B2*0.9")}
	if _, err := readBook(t, badinput.Book{Sheets: []badinput.Sheet{{Name: "S", Rows: rows}}}); err == nil ||
		!strings.Contains(err.Error(), "cell A3") {
		t.Errorf("row of formulas: %v", err)
	}
	// A blank cell in a merged range says so.
	rows = pointsRows()
	rows[2][1] = badinput.Empty
	_, err = readBook(t, badinput.Book{Sheets: []badinput.Sheet{{Name: "S", Rows: rows, Merged: []string{"A3:B3"}}}})
	var e *Error
	if !errors.As(err, &e) || e.Cell != "B3" || !strings.Contains(e.Hint, "merged range A3:B3") {
		t.Errorf("blank merged cell: %v", err)
	}
}

// TestSheetXML: what the XML may legally look like is read; what no
// writer produces is refused as damaged.
func TestSheetXML(t *testing.T) {
	ns := `xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main"`
	good := badinput.Book{Sheets: []badinput.Sheet{{Name: "A3", Rows: pointsRows()}}}
	replaceSheet := func(xml string) []badinput.Entry {
		parts := good.Parts()
		for i := range parts {
			if parts[i].Name == "xl/worksheets/sheet1.xml" {
				parts[i].Data = []byte(xml)
			}
		}
		return parts
	}
	read := func(parts []badinput.Entry) ([]Profile, error) {
		data, err := badinput.Zip(parts)
		if err != nil {
			t.Fatal(err)
		}
		return readXLSXBytes(data, "x.xlsx")
	}
	// Prefixed elements, rows and cells without references, rich text
	// with a phonetic run, an empty sheetData elsewhere.
	ok := `<x:worksheet xmlns:x="http://schemas.openxmlformats.org/spreadsheetml/2006/main"><x:sheetData>` +
		`<x:row><x:c t="inlineStr"><x:is><x:r><x:t>depth</x:t></x:r><x:r><x:t>_mm</x:t></x:r><x:rPh><x:t>ふりがな</x:t></x:rPh></x:is></x:c>` +
		`<x:c t="inlineStr"><x:is><x:t>C_wt%</x:t></x:is></x:c></x:row>` +
		`<x:row><x:c><x:v>0.1</x:v></x:c><x:c><x:v>0.8</x:v></x:c></x:row>` +
		`<x:row r="5"><x:c r="B5"><x:v>0.7</x:v></x:c><x:c r="A5" t="n"/></x:row></x:sheetData></x:worksheet>`
	if ps, err := read(replaceSheet(ok)); err == nil || !strings.Contains(err.Error(), "out of order") {
		t.Errorf("cells out of order: %v %v", ps, err)
	}
	ok = strings.Replace(ok, `<x:c r="B5"><x:v>0.7</x:v></x:c><x:c r="A5" t="n"/>`, `<x:c r="A5"><x:v>0.2</x:v></x:c><x:c r="B5"><x:v>0.7</x:v></x:c>`, 1)
	ps, err := read(replaceSheet(ok))
	if err != nil || ps[0].ValueName != "C_wt%" || !sameFloats(ps[0].Value, []float64{0.8, 0.7}) || ps[0].Line[1] != 5 {
		t.Fatalf("prefixed sheet: %v %+v", err, ps)
	}
	for _, tc := range []struct{ xml, frag string }{
		{`<worksheet ` + ns + `><sheetData><row r="2"><c r="A2"><v>1</v></c></row><row r="2"><c r="A2"><v>1</v></c></row></sheetData></worksheet>`, `row number "2" after row 2`},
		{`<worksheet ` + ns + `><sheetData><row r="2"><c r="A3"><v>1</v></c></row></sheetData></worksheet>`, `cell reference "A3" in row 2`},
		{`<worksheet ` + ns + `><sheetData><row r="1"><c r="A1"><v>1</v></c><c r="A1"><v>2</v></c></row></sheetData></worksheet>`, "cell A1 is given twice"},
		{`<worksheet ` + ns + `><sheetData><row r="1"><c r="A1" t="s"><v>7</v></c></row></sheetData></worksheet>`, "shared string the file does not hold"},
		{`<worksheet ` + ns + `><sheetData><row r="1"><c r="A1" t="b"><v>2</v></c></row></sheetData></worksheet>`, "neither TRUE nor FALSE"},
		{`<worksheet ` + ns + `><sheetData><row r="1"><c r="A1"><v>1</v></row></sheetData></worksheet>`, "malformed in row 1"},
		{`<worksheet ` + ns + `><sheetData><row r="1048577"/></sheetData></worksheet>`, "row number"},
	} {
		if _, err := read(replaceSheet(tc.xml)); !errors.Is(err, ErrFormat) || !strings.Contains(err.Error(), tc.frag) {
			t.Errorf("%s: %v", tc.frag, err)
		}
	}
}

// TestWorkbookStructure: hidden and chart sheets are skipped; a sheet
// listed twice, two sheets of one name, and a sheet pointing nowhere are
// refused.
func TestWorkbookStructure(t *testing.T) {
	sheet := func(name string) badinput.Sheet { return badinput.Sheet{Name: name, Rows: pointsRows()} }
	b := badinput.Book{Sheets: []badinput.Sheet{sheet("A"), sheet("B")}}
	parts := b.Parts()
	for i := range parts {
		if parts[i].Name == "xl/workbook.xml" {
			parts[i].Data = []byte(strings.Replace(string(parts[i].Data), `name="B"`, `name="B" state="hidden"`, 1))
		}
	}
	data, _ := badinput.Zip(parts)
	if ps, err := readXLSXBytes(data, "s.xlsx"); err != nil || len(ps) != 1 || ps[0].ID != "A" {
		t.Errorf("hidden sheet: %v %v", ps, err)
	}
	for _, tc := range []struct {
		from, to, frag string
	}{
		{`name="B"`, `name="a"`, `two sheets named "A" and "a"`},
		{`r:id="rId2"`, `r:id="rId9"`, `sheet "B" points at no part`},
		{`Target="worksheets/sheet2.xml"`, `Target="worksheets/sheet9.xml"`, `points at part "xl/worksheets/sheet9.xml", which the file does not hold`},
		{`Target="worksheets/sheet2.xml"`, `Target="/xl/worksheets/sheet1.xml"`, `the same part "xl/worksheets/sheet1.xml" as sheet "A" and as sheet "B"`},
	} {
		parts := b.Parts()
		for i := range parts {
			parts[i].Data = []byte(strings.Replace(string(parts[i].Data), tc.from, tc.to, 1))
		}
		data, _ := badinput.Zip(parts)
		if _, err := readXLSXBytes(data, "s.xlsx"); !errors.Is(err, ErrFormat) || !strings.Contains(err.Error(), tc.frag) {
			t.Errorf("%s: %v", tc.frag, err)
		}
	}
}

// TestDamagedEntries: every way a zip entry can differ from its header is
// refused before anything is read, naming the part (the generated
// catalogue cases cover a changed stored byte and a short declared size).
func TestDamagedEntries(t *testing.T) {
	for _, tc := range []struct {
		name   string
		change func(*badinput.Entry)
		frag   string
	}{
		{"declared longer", func(e *badinput.Entry) { e.Size = uint64(2 * len(e.Data)) }, "is shorter than the"},
		{"checksum declared 0", func(e *badinput.Entry) { e.ZeroCRC = true }, "fails its checksum"},
		{"deflate stream corrupt", func(e *badinput.Entry) {
			e.MutateRaw = func(b []byte) []byte { b[len(b)/2] ^= 0xFF; b[len(b)/2+1] ^= 0xFF; return b }
		}, `part "xl/worksheets/sheet1.xml"`},
		{"deflate stream cut", func(e *badinput.Entry) { e.MutateRaw = func(b []byte) []byte { return b[:len(b)/2] } },
			`part "xl/worksheets/sheet1.xml"`},
		{"changed stored byte", func(e *badinput.Entry) {
			e.Store, e.Mutate = true, func(b []byte) []byte { b[len(b)-20] ^= 1; return b }
		}, "fails its checksum"},
	} {
		parts := badinput.Book{Sheets: []badinput.Sheet{{Name: "A3", Rows: pointsRows()}}}.Parts()
		for i := range parts {
			if parts[i].Name == "xl/worksheets/sheet1.xml" {
				tc.change(&parts[i])
			}
		}
		data, err := badinput.Zip(parts)
		if err != nil {
			t.Fatal(err)
		}
		ps, err := readXLSXBytes(data, "d.xlsx")
		if !errors.Is(err, ErrFormat) || ps != nil || !strings.Contains(err.Error(), "damaged") ||
			!strings.Contains(err.Error(), tc.frag) {
			t.Errorf("%s: %v", tc.name, err)
		}
	}
}
