// Package badinput builds, at test time, the bad inputs of the catalogue
// (testdata/bad/cases.tsv) that are better generated than committed:
// workbooks with a damaged checksum or size, an encrypted workbook, and
// small files that would amplify into large amounts of text or work.
// Their numbers are invented fixtures, not check values.
//
// Tests call Write for a name listed in cases.tsv; Names lists them all.
package badinput

import (
	"bytes"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"

	"github.com/xuri/excelize/v2"
)

// cases maps a catalogue file name to its generator.
var cases = map[string]func() ([]byte, error){
	"damaged_crc.xlsx":             damagedCRC,
	"wrong_size.xlsx":              wrongSize,
	"truncated_sheet_xml.xlsx":     truncatedXML,
	"encrypted.xlsx":               encrypted,
	"binary_excel_as_xlsx.xlsx":    binaryExcel,
	"long_shared_string.xlsx":      longSharedString,
	"cell_too_long.xlsx":           cellTooLong,
	"shared_string_reused.xlsx":    sharedStringReused,
	"repeated_sheet_part.xlsx":     repeatedPart,
	"formula_no_value.xlsx":        formulaNoValue,
	"boolean_value.xlsx":           booleanValue,
	"metadata_four_cells.xlsx":     metadataFourCells,
	"metadata_merged_key.xlsx":     metadataMergedKey,
	"metadata_per_profile.csv":     metadataPerProfile,
	"duplicate_zip_entry.xlsx":     duplicateEntry,
	"far_column_above_header.xlsx": farColumn,
}

// Names lists the generated cases, sorted.
func Names() []string { return names(cases) }

// Has reports whether name is a generated case.
func Has(name string) bool { return cases[name] != nil }

// Bytes returns the content of the generated case name.
func Bytes(name string) ([]byte, error) {
	gen := cases[name]
	if gen == nil {
		return nil, fmt.Errorf("badinput: no generated case %q", name)
	}
	return gen()
}

// Write writes the generated case name into dir and returns its path.
func Write(dir, name string) (string, error) {
	b, err := Bytes(name)
	if err != nil {
		return "", err
	}
	path := filepath.Join(dir, name)
	return path, os.WriteFile(path, b, 0o644)
}

// Points is the invented 27-point profile of the damaged workbooks:
// depth in mm and carbon in wt%, a smooth decay from 0.85 to 0.20.
func Points() (depth, value []string) {
	for i := 1; i <= 27; i++ {
		x := 0.05 * float64(i)
		depth = append(depth, strconv.FormatFloat(x, 'f', 2, 64))
		value = append(value, strconv.FormatFloat(0.2+0.65*math.Erfc(x/0.8), 'f', 3, 64))
	}
	return depth, value
}

// profileSheet is sheet "A3": metadata, header depth_mm | C_wt% and the 27 points.
func profileSheet() Sheet {
	rows := [][]Cell{{Str("temperature"), Str("925 C")}, {Str("time"), Str("4 h")}, {},
		{Str("depth_mm"), Str("C_wt%")}}
	d, v := Points()
	for i := range d {
		rows = append(rows, []Cell{Num(d[i]), Num(v[i])})
	}
	return Sheet{Name: "A3", Rows: rows}
}

// ValidBook is the undamaged workbook the damaged ones are made from.
func ValidBook() ([]byte, error) { return Zip(Book{Sheets: []Sheet{profileSheet()}}.Parts()) }

// withSheetEntry applies change to the worksheet entry of the valid book.
func withSheetEntry(change func(*Entry)) ([]byte, error) {
	parts := Book{Sheets: []Sheet{profileSheet()}}.Parts()
	for i := range parts {
		if parts[i].Name == "xl/worksheets/sheet1.xml" {
			change(&parts[i])
		}
	}
	return Zip(parts)
}

// damagedCRC: the worksheet is stored uncompressed and one digit of a
// value is changed after its checksum was computed. The XML stays valid,
// so a reader that skips the checksum reads 0.912 where 0.812 was measured.
func damagedCRC() ([]byte, error) {
	_, v := Points()
	old := "<v>" + v[3] + "</v>"
	return withSheetEntry(func(e *Entry) {
		e.Store = true
		e.Mutate = func(b []byte) []byte {
			i := bytes.Index(b, []byte(old))
			b[i+3] ^= 0x01 // "0" → "1": the first digit of the value changes
			return b
		}
	})
}

// wrongSize: the worksheet's header declares half of its real size; a
// reader that ignores the mismatch sees only the first rows.
func wrongSize() ([]byte, error) {
	return withSheetEntry(func(e *Entry) { e.Size = uint64(len(e.Data) / 2) })
}

// truncatedXML: the worksheet XML stops in the middle of a row, with a
// matching checksum and size (as a writer that crashed would leave it).
func truncatedXML() ([]byte, error) {
	return withSheetEntry(func(e *Entry) {
		_, v := Points()
		e.Data = e.Data[:bytes.Index(e.Data, []byte(v[13]))]
	})
}

// encrypted: the valid workbook encrypted with a password (an OLE
// compound file holding EncryptionInfo and EncryptedPackage streams).
func encrypted() ([]byte, error) {
	b, err := ValidBook()
	if err != nil {
		return nil, err
	}
	return excelize.Encrypt(b, &excelize.Options{Password: "furnace-F7"})
}

// binaryExcel: an OLE compound file (an old binary .xls) named .xlsx: the
// 512-byte header of an empty compound file.
func binaryExcel() ([]byte, error) {
	b := make([]byte, 512)
	copy(b, []byte{0xD0, 0xCF, 0x11, 0xE0, 0xA1, 0xB1, 0x1A, 0xE1})
	b[0x1A], b[0x1C], b[0x1E] = 0x3E, 0x03, 0x09 // version 3, sector shift 9
	return b, nil
}

// longSharedString: a shared-strings table holding one 10 MiB string
// (compressed to a few KB) used in a text column of every row.
func longSharedString() ([]byte, error) {
	s := profileSheet()
	s.Rows[3] = append(s.Rows[3], Str("note"))
	for i := 4; i < len(s.Rows); i++ {
		s.Rows[i] = append(s.Rows[i], Shared(0))
	}
	return Zip(Book{Sheets: []Sheet{s}, Shared: []string{strings.Repeat("x", 10<<20)}}.Parts())
}

// cellTooLong: a note cell holding 100 000 characters (a spreadsheet
// cell holds at most 32 767).
func cellTooLong() ([]byte, error) {
	s := profileSheet()
	s.Rows[3] = append(s.Rows[3], Str("note"))
	s.Rows[5] = append(s.Rows[5], Str(strings.Repeat("n", 100000)))
	return Zip(Book{Sheets: []Sheet{s}}.Parts())
}

// sharedStringReused: a shared string of 30 000 characters (under the
// limit per cell) used in 10 000 rows: 300 MB of text from a small file.
func sharedStringReused() ([]byte, error) {
	rows := [][]Cell{{Str("depth_um"), Str("C_wt%"), Str("note")}}
	for i := 0; i < 10000; i++ {
		rows = append(rows, []Cell{Num(strconv.Itoa(i + 1)), Num("0.5"), Shared(0)})
	}
	return Zip(Book{Sheets: []Sheet{{Name: "A3", Rows: rows}}, Shared: []string{strings.Repeat("y", 30000)}}.Parts())
}

// repeatedPart: the workbook lists the same worksheet part 500 times.
func repeatedPart() ([]byte, error) {
	rows := [][]Cell{{Str("profile"), Str("depth_mm"), Str("C_wt%")}}
	d, v := Points()
	for k := 0; k < 200; k++ {
		for i := range d {
			rows = append(rows, []Cell{Str("P" + strconv.Itoa(k)), Num(d[i]), Num(v[i])})
		}
	}
	return Zip(Book{Sheets: []Sheet{{Name: "Long", Rows: rows}}, ListAgain: 499}.Parts())
}

// formulaNoValue: a value cell holds a formula with no stored result (as
// written by a program that does not calculate).
func formulaNoValue() ([]byte, error) {
	s := profileSheet()
	s.Rows[8][1] = Formula("B8*0.95")
	return Zip(Book{Sheets: []Sheet{s}}.Parts())
}

// booleanValue: a value cell holds the logical value TRUE.
func booleanValue() ([]byte, error) {
	s := profileSheet()
	s.Rows[6][1] = Bool(true)
	return Zip(Book{Sheets: []Sheet{s}}.Parts())
}

// metadataFourCells: temperature written over four cells.
func metadataFourCells() ([]byte, error) {
	s := profileSheet()
	s.Rows[0] = []Cell{Str("temperature"), Num("925"), Str("C"), Str("3 K")}
	return Zip(Book{Sheets: []Sheet{s}}.Parts())
}

// metadataMergedKey: the key "lot" is merged over two rows, each with a value.
func metadataMergedKey() ([]byte, error) {
	s := profileSheet()
	s.Rows[2] = []Cell{Str("lot"), Str("L1")}
	s.Rows = append(s.Rows[:3], append([][]Cell{{Empty, Str("L2")}}, s.Rows[3:]...)...)
	s.Merged = []string{"A3:A4"}
	return Zip(Book{Sheets: []Sheet{s}}.Parts())
}

// metadataPerProfile: a long table of 1000 profiles under one metadata
// line of 30 000 characters, which every profile would carry (30 MB of
// text in every report from a 60 KB file).
func metadataPerProfile() ([]byte, error) {
	var b bytes.Buffer
	b.WriteString("# note: " + strings.Repeat("z", 30000) + "\n")
	b.WriteString("profile,depth_mm,C_wt%\n")
	for k := 0; k < 1000; k++ {
		fmt.Fprintf(&b, "P%d,0.1,0.8\nP%d,0.2,0.6\n", k, k)
	}
	return b.Bytes(), nil
}

// duplicateEntry: the zip holds the worksheet twice under one name, with
// different values: which one a reader sees depends on the reader.
func duplicateEntry() ([]byte, error) {
	parts := Book{Sheets: []Sheet{profileSheet()}}.Parts()
	for _, p := range parts {
		if p.Name == "xl/worksheets/sheet1.xml" {
			_, v := Points()
			p.Data = bytes.Replace(p.Data, []byte(v[3]), []byte("0.999"), 1)
			parts = append(parts, p)
			break
		}
	}
	return Zip(parts)
}

// farColumn: 30 000 rows above any header, each with one cell in the
// last column (XFD): a reader that fills every row out to that column
// goes through 5·10⁸ cells for a 100 KB file.
func farColumn() ([]byte, error) {
	var rows [][]Cell
	for i := 0; i < 30000; i++ {
		rows = append(rows, []Cell{{Ref: "XFD" + strconv.Itoa(i+1), XML: "<v>1</v>"}})
	}
	return Zip(Book{Sheets: []Sheet{{Name: "A3", Rows: rows}}}.Parts())
}
