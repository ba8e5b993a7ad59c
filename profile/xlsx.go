package profile

import (
	"bytes"
	"io"
	"os"
	"strings"
)

// readXLSX reads every visible sheet of a workbook file (opened read-only).
func readXLSX(path string) (ps []Profile, err error) {
	org := origin{file: path}
	defer recoverWorkbook(org, &ps, &err)
	f, err := os.Open(path)
	if err != nil {
		return nil, openError(path, err)
	}
	defer f.Close()
	fi, err := f.Stat()
	if err != nil {
		return nil, openError(path, err)
	}
	p, err := openPackage(f, fi.Size(), org)
	if err != nil {
		return nil, err
	}
	return readWorkbook(p, org)
}

// readXLSXBytes reads a workbook held in memory (for tests and fuzzing).
func readXLSXBytes(data []byte, name string) (ps []Profile, err error) {
	org := origin{file: name}
	defer recoverWorkbook(org, &ps, &err)
	p, err := openPackage(bytes.NewReader(data), int64(len(data)), org)
	if err != nil {
		return nil, err
	}
	return readWorkbook(p, org)
}

// recoverWorkbook turns a panic while reading a workbook into an error,
// so bad input never crashes the program.
func recoverWorkbook(org origin, ps *[]Profile, err *error) {
	if r := recover(); r != nil {
		*ps = nil
		*err = org.errAt(0, -1, "", errorf(ErrFormat, "the workbook is damaged and could not be read"),
			"open and re-save it in a spreadsheet program, or export the sheets as CSV")
	}
}

// readWorkbook reads the visible worksheets in workbook order. A sheet
// with no header row (no cell naming a depth column) is skipped, so notes
// and chart sheets may sit beside the data; hidden sheets are skipped.
// Every sheet's text counts against one budget for the file.
func readWorkbook(p *xlsxPackage, org origin) ([]Profile, error) {
	var all []Profile
	kept := &textBudget{limit: maxKeptText}
	for _, s := range p.sheets {
		if s.hidden {
			continue
		}
		data, err := p.part(s.part)
		if err != nil {
			return nil, err
		}
		sorg := origin{file: org.file, sheet: s.name}
		ps, err := readRows(newSheetReader(p, sorg, s.part, data), sorg, sheetOptions{
			merged: mergedRanges(data), work: &p.text, kept: kept})
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

// sheetOptions are what readRows needs besides the rows.
type sheetOptions struct {
	merged []cellRange // merged ranges of the sheet
	work   *int64      // the workbook's count of text and cells gone through (nil: not counted)
	kept   *textBudget // text the profiles keep, for the whole file (nil: not counted)
}

// readRows reads metadata rows, the header row (the first row with a
// depth column), then data rows.
func readRows(rows rowSource, org origin, o sheetOptions) ([]Profile, error) {
	m := &sheetMetaReader{org: org, merged: indexMerged(o.merged)}
	var t *table
	for {
		r, err := rows.next()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, err
		}
		switch {
		case t != nil:
			err = addSheetRow(t, r, o)
		case isHeaderRow(r.cells):
			t, err = newTable(denseRow(r.cells), tableOptions{org: org, meta: &m.meta, headerLine: r.line,
				defaultID: org.sheet, comma: true, marks: &decimalMarks{org: org}, kept: o.kept})
		default:
			err = m.read(r)
		}
		if err != nil {
			return nil, explainBlank(err, o.merged)
		}
	}
	if t == nil {
		return nil, orphanMeta(&m.meta, org)
	}
	return t.finish()
}

// addSheetRow passes a data row to the table as dense cells and kinds.
func addSheetRow(t *table, r sheetRow, o sheetOptions) error {
	width := len(t.cols)
	if o.work != nil {
		if *o.work += int64(width); *o.work > maxWorkbookText {
			return t.org.errAt(r.line, -1, "", errorf(ErrTooLarge,
				"the sheets hold more than %d MiB of cells and text to go through; it was not read", maxWorkbookText>>20),
				"export the data as CSV, or remove what lies far to the right of the table")
		}
	}
	if cap(t.rowText) < width {
		t.rowText, t.rowKinds = make([]string, width), make([]cellKind, width)
	}
	t.rowText, t.rowKinds = t.rowText[:width], t.rowKinds[:width]
	clear(t.rowText)
	clear(t.rowKinds)
	first, last := -1, -1
	for _, c := range r.cells {
		if c.col >= width {
			if c.text != "" {
				last = c.col
				if first < 0 {
					first = c.col
				}
			}
			continue
		}
		t.rowText[c.col], t.rowKinds[c.col] = c.text, c.kind
	}
	if first >= 0 {
		return t.beyondHeader(r.line, first, last)
	}
	t.kinds = t.rowKinds
	defer func() { t.kinds = nil }()
	return t.add(t.rowText, r.line)
}

// denseRow lays sparse cells out by column.
func denseRow(cells []xcell) []string {
	if len(cells) == 0 {
		return nil
	}
	out := make([]string, cells[len(cells)-1].col+1)
	for _, c := range cells {
		out[c.col] = c.text
	}
	return out
}

// explainBlank adds to a "blank cell" error the merged range the cell
// lies in: a merged range keeps its value in its first cell only.
func explainBlank(err error, merged []cellRange) error {
	e, ok := err.(*Error)
	if !ok || e.Cell == "" || !strings.Contains(e.Err.Error(), "is blank") {
		return err
	}
	col, row, _ := parseCellName(e.Cell)
	for _, m := range merged {
		if m.contains(row, col) && (row != m.r0 || col != m.c0) {
			e.Hint = "the cell lies in the merged range " + m.String() + ", whose value is in " + cellName(m.r0, m.c0) +
				" only: unmerge the cells and fill each one"
			break
		}
	}
	return err
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
func isHeaderRow(cells []xcell) bool {
	for _, c := range cells {
		if c.kind != kindText || strings.Contains(c.text, ":") {
			continue
		}
		root, _ := splitHeader(c.text)
		if r := normKey(root); r == "depth" || r == "distance" {
			return true
		}
	}
	return false
}
