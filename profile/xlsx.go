package profile

import (
	"archive/zip"
	"bytes"
	"errors"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"strings"

	"github.com/xuri/excelize/v2"
)

// Workbook size limits. MaxUnzipSize bounds the total unpacked size of a
// workbook's parts: larger workbooks (zip bombs among them) are refused
// before anything is unpacked. A sheet of 10⁶ points unpacks to roughly
// 100–150 MB, well inside. Worksheets and the shared-string table larger
// than maxUnzipXMLSize are unpacked to a temporary file, not to memory;
// the other parts (styles, drawings, images…) are held in memory and may
// unpack to at most maxInMemory bytes together.
const (
	MaxUnzipSize    = 256 << 20
	maxUnzipXMLSize = 16 << 20
	maxInMemory     = 64 << 20
)

// xlsxOptions are the options every workbook is opened with: size limits,
// and raw cell values, so that numbers come as stored, not as displayed
// (a cell shown as "0.50" with two decimals may hold 0.4987).
func xlsxOptions() excelize.Options {
	return excelize.Options{UnzipSizeLimit: MaxUnzipSize, UnzipXMLSizeLimit: maxUnzipXMLSize, RawCellValue: true}
}

// readXLSX reads every visible sheet of a workbook file (opened read-only).
func readXLSX(path string) (ps []Profile, err error) {
	org := origin{file: path}
	defer recoverWorkbook(org, &ps, &err)
	if err := checkZipFile(path, org); err != nil {
		return nil, err
	}
	f, err := excelize.OpenFile(path, xlsxOptions())
	if err != nil {
		if f != nil {
			f.Close()
		}
		var pe *fs.PathError
		if errors.As(err, &pe) && pe.Path == filepath.Clean(path) {
			return nil, openError(path, err)
		}
		return nil, workbookError(org, err)
	}
	defer f.Close()
	return readWorkbook(f, org)
}

// readXLSXBytes reads a workbook held in memory (for tests and fuzzing).
func readXLSXBytes(data []byte, name string) (ps []Profile, err error) {
	org := origin{file: name}
	defer recoverWorkbook(org, &ps, &err)
	if err := checkZipSizes(bytes.NewReader(data), int64(len(data)), org); err != nil {
		return nil, err
	}
	f, err := excelize.OpenReader(bytes.NewReader(data), xlsxOptions())
	if err != nil {
		if f != nil {
			f.Close()
		}
		return nil, workbookError(org, err)
	}
	defer f.Close()
	return readWorkbook(f, org)
}

// checkZipFile checks the zip directory of the workbook at path.
func checkZipFile(path string, org origin) error {
	f, err := os.Open(path)
	if err != nil {
		return openError(path, err)
	}
	defer f.Close()
	fi, err := f.Stat()
	if err != nil {
		return openError(path, err)
	}
	return checkZipSizes(f, fi.Size(), org)
}

// checkZipSizes reads the zip directory (nothing is unpacked) and refuses
// a workbook whose parts declare more than MaxUnzipSize bytes in all, or
// more than maxInMemory bytes in parts that would be held in memory. The
// declared sizes bind: archive/zip fails on an entry that unpacks to more.
// excelize's own UnzipSizeLimit (set in xlsxOptions) is a second guard.
func checkZipSizes(r io.ReaderAt, size int64, org origin) error {
	zr, err := zip.NewReader(r, size)
	if err != nil {
		return workbookError(org, err)
	}
	var total, mem uint64
	for _, f := range zr.File {
		n := f.UncompressedSize64
		total += min(n, MaxUnzipSize+1)
		if !streamedPart(f.Name) {
			mem += min(n, maxInMemory+1)
		}
		if total > MaxUnzipSize || mem > maxInMemory {
			return workbookError(org, errors.New("unzip size exceeds the limit"))
		}
	}
	return nil
}

// streamedPart reports parts that excelize unpacks to a temporary file
// when they are large (worksheets and the shared-string table).
func streamedPart(name string) bool {
	n := strings.ToLower(strings.ReplaceAll(name, "\\", "/"))
	return strings.HasPrefix(n, "xl/worksheets/sheet") || n == "xl/sharedstrings.xml"
}

// recoverWorkbook turns a panic inside the workbook library (on a damaged
// file) into an error, so bad input never crashes the program.
func recoverWorkbook(org origin, ps *[]Profile, err *error) {
	if r := recover(); r != nil {
		*ps = nil
		*err = org.errAt(0, -1, "", errorf(ErrFormat, "the workbook is damaged and could not be read (%v)", r),
			"open and re-save it in a spreadsheet program, or export the sheets as CSV")
	}
}

// workbookError explains why a workbook could not be opened.
func workbookError(org origin, err error) error {
	msg := err.Error()
	switch {
	case strings.Contains(msg, "unzip size exceeds"):
		return org.errAt(0, -1, "", errorf(ErrTooLarge,
			"the workbook unpacks to more than the limit (%d MiB of sheets, %d MiB of other parts): a zip bomb, or far larger than a table of profiles; it was not read",
			MaxUnzipSize>>20, maxInMemory>>20), "export the data as CSV, or split the workbook")
	case errors.Is(err, zip.ErrFormat) || errors.Is(err, zip.ErrChecksum) || errors.Is(err, zip.ErrAlgorithm) ||
		errors.Is(err, io.ErrUnexpectedEOF) || errors.Is(err, io.EOF):
		return org.errAt(0, -1, "", errorf(ErrFormat, "not a readable .xlsx workbook (damaged, truncated, or not a zip archive)"),
			"open and re-save it in a spreadsheet program; if it is a text table, give it the extension .csv")
	case errors.Is(err, excelize.ErrWorkbookFileFormat) || errors.Is(err, excelize.ErrWorkbookPassword):
		return org.errAt(0, -1, "", errorf(ErrFormat, "the workbook is password-protected or not in .xlsx format"),
			"save it as an .xlsx workbook without a password")
	}
	return org.errAt(0, -1, "", errorf(ErrFormat, "the workbook could not be read: %v", err),
		"open and re-save it in a spreadsheet program, or export the sheets as CSV")
}

// readWorkbook reads the visible sheets in workbook order. A sheet with no
// header row (no cell naming a depth column) is skipped, so notes and
// chart sheets may sit beside the data; hidden sheets are skipped.
func readWorkbook(f *excelize.File, org origin) ([]Profile, error) {
	var all []Profile
	for _, sheet := range f.GetSheetList() {
		if visible, err := f.GetSheetVisible(sheet); err == nil && !visible {
			continue
		}
		ps, err := readSheet(f, origin{file: org.file, sheet: sheet})
		if err != nil {
			return nil, err
		}
		all = append(all, ps...)
	}
	if len(all) == 0 {
		return nil, org.errAt(0, -1, "", errorf(ErrNoData, "no visible sheet has a header row with a depth column"),
			"put a header row such as depth_mm | C_wt% above the data")
	}
	return all, nil
}

// readSheet streams the rows of one sheet through readRows.
func readSheet(f *excelize.File, org origin) ([]Profile, error) {
	rows, err := f.Rows(org.sheet)
	if err != nil {
		return nil, org.errAt(0, -1, "", errorf(ErrFormat, "the sheet could not be read: %v", err),
			"open and re-save the workbook in a spreadsheet program")
	}
	defer rows.Close()
	return readRows(rows, org)
}

// rowSource is a stream of worksheet rows (excelize.Rows satisfies it).
type rowSource interface {
	Next() bool
	Columns(opts ...excelize.Options) ([]string, error)
	Error() error
}

// readRows reads metadata rows, the header row (the first row with a
// depth column), then data rows. Row numbers count every Next.
func readRows(rows rowSource, org origin) ([]Profile, error) {
	var meta metaSet
	var t *table
	for row := 1; rows.Next(); row++ {
		cells, err := rows.Columns()
		if err != nil {
			return nil, org.errAt(row, -1, "", errorf(ErrFormat, "the row could not be read: %v", err),
				"open and re-save the workbook in a spreadsheet program")
		}
		switch {
		case t != nil:
			err = t.add(cells, row)
		case isHeaderRow(cells):
			t, err = newTable(cells, tableOptions{org: org, meta: &meta, headerLine: row,
				defaultID: org.sheet, comma: true})
		default:
			err = sheetMeta(&meta, cells, row, org)
		}
		if err != nil {
			return nil, err
		}
	}
	if err := rows.Error(); err != nil {
		return nil, org.errAt(0, -1, "", errorf(ErrFormat, "the sheet could not be read: %v", err),
			"open and re-save the workbook in a spreadsheet program")
	}
	if t == nil {
		return nil, orphanMeta(&meta, org)
	}
	return t.finish()
}

// orphanMeta refuses a sheet that sets profile metadata but has no header.
func orphanMeta(m *metaSet, org origin) error {
	for _, e := range m.entries {
		if c, _ := meaning(e.key); c != "" && c != "id" {
			return org.errAt(e.line, e.col, "", errorf(ErrNoData,
				"the sheet has metadata (%s) but no header row with a depth column", quote(e.key)),
				"add a header row such as depth_mm | C_wt% and the data below it")
		}
	}
	return nil
}

// isHeaderRow reports whether a row names a depth column.
func isHeaderRow(cells []string) bool {
	for _, c := range cells {
		if strings.Contains(c, ":") {
			continue
		}
		root, _ := splitHeader(c)
		if r := normKey(root); r == "depth" || r == "distance" {
			return true
		}
	}
	return false
}

// sheetMeta reads a row above the header: "key: value" in one cell, or a
// key cell followed by a value cell. Other text rows (titles) are ignored;
// a row of numbers above any header is an error.
func sheetMeta(m *metaSet, cells []string, row int, org origin) error {
	var idx []int
	numbers := 0
	for i, c := range cells {
		if s := strings.TrimSpace(c); s != "" {
			idx = append(idx, i)
			if _, err := parseNumber(s, true); err == nil {
				numbers++
			}
		}
	}
	if numbers >= 2 {
		return org.errAt(row, idx[0], "", errorf(ErrColumn, "numbers in row %d above any header row", row),
			"put a header row above the data, with a depth column such as depth_mm and the value name such as C_wt%")
	}
	if len(idx) == 0 || len(idx) > 2 {
		return nil
	}
	first := strings.TrimSpace(strings.TrimLeft(strings.TrimSpace(cells[idx[0]]), "#"))
	if k, v, ok := splitKeyValue(first); ok && len(idx) == 1 {
		return m.add(metaEntry{key: k, value: v, line: row, col: idx[0]}, org)
	}
	if len(idx) == 2 && idx[1] == idx[0]+1 {
		key := strings.TrimSpace(strings.TrimSuffix(first, ":"))
		if isKey(key) {
			return m.add(metaEntry{key: key, value: strings.TrimSpace(cells[idx[1]]), line: row, col: idx[1]}, org)
		}
	}
	return nil
}
