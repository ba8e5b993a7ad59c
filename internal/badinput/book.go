package badinput

import (
	"archive/zip"
	"bytes"
	"compress/flate"
	"fmt"
	"hash/crc32"
	"html"
	"sort"
	"strings"
)

// Cell is one worksheet cell as it is stored in the sheet XML.
type Cell struct {
	Ref   string // "B5"
	XML   string // the cell element's content and type, built by the helpers below
	Type  string // the t attribute ("" for numbers)
	Blank bool   // no cell element at all
}

// Num is a cell holding a stored number (its text is the stored value).
func Num(v string) Cell { return Cell{XML: "<v>" + v + "</v>"} }

// Str is a cell holding inline text.
func Str(s string) Cell {
	return Cell{Type: "inlineStr", XML: `<is><t xml:space="preserve">` + html.EscapeString(s) + "</t></is>"}
}

// Shared is a cell holding entry i of the shared-strings table.
func Shared(i int) Cell { return Cell{Type: "s", XML: fmt.Sprintf("<v>%d</v>", i)} }

// Bool is a cell holding the logical value TRUE or FALSE.
func Bool(b bool) Cell {
	if b {
		return Cell{Type: "b", XML: "<v>1</v>"}
	}
	return Cell{Type: "b", XML: "<v>0</v>"}
}

// Formula is a cell holding a formula and no stored result, as programs
// that write workbooks without calculating them leave it.
func Formula(f string) Cell { return Cell{XML: "<f>" + html.EscapeString(f) + "</f>"} }

// ErrorValue is a cell holding a spreadsheet error such as #DIV/0!.
func ErrorValue(e string) Cell {
	return Cell{Type: "e", XML: "<f>1/0</f><v>" + html.EscapeString(e) + "</v>"}
}

// Empty leaves the cell out of the sheet XML.
var Empty = Cell{Blank: true}

// Sheet is one worksheet: a name, rows of cells from column A and merged ranges.
type Sheet struct {
	Name   string
	Rows   [][]Cell
	Merged []string // "A1:B1"
	// Part overrides the part name ("worksheets/sheet3.xml" below xl/).
	Part string
}

// Book is a minimal SpreadsheetML workbook written by hand, so that every
// byte of it is known (excelize adds parts and attributes of its own).
type Book struct {
	Sheets []Sheet
	Shared []string // the shared-strings table
	// ListAgain lists the first sheet this many more times in the
	// workbook (new names, the same part).
	ListAgain int
}

// Entry is one zip entry: name, data, and what the zip header declares.
type Entry struct {
	Name string
	Data []byte
	// Store writes the data uncompressed (so a changed byte stays readable).
	Store bool
	// CRC and Size, when not zero, are declared instead of the true values.
	CRC  uint32
	Size uint64
	// ZeroCRC declares a checksum of 0 (which archive/zip does not check).
	ZeroCRC bool
	// Mutate changes the data after the checksum and size are computed;
	// MutateRaw changes the entry's bytes as stored (compressed).
	Mutate, MutateRaw func([]byte) []byte
}

// Parts returns the package parts of b in a fixed order.
func (b Book) Parts() []Entry {
	const (
		ns   = `xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main"`
		rns  = `xmlns:r="http://schemas.openxmlformats.org/officeDocument/2006/relationships"`
		pkg  = `xmlns="http://schemas.openxmlformats.org/package/2006/relationships"`
		rel  = "http://schemas.openxmlformats.org/officeDocument/2006/relationships/"
		head = `<?xml version="1.0" encoding="UTF-8" standalone="yes"?>` + "\n"
	)
	var ct, wb, wrels strings.Builder
	ct.WriteString(head + `<Types xmlns="http://schemas.openxmlformats.org/package/2006/content-types">` +
		`<Default Extension="rels" ContentType="application/vnd.openxmlformats-package.relationships+xml"/>` +
		`<Default Extension="xml" ContentType="application/xml"/>` +
		`<Override PartName="/xl/workbook.xml" ContentType="application/vnd.openxmlformats-officedocument.spreadsheetml.sheet.main+xml"/>`)
	wb.WriteString(head + "<workbook " + ns + " " + rns + "><sheets>")
	wrels.WriteString(head + "<Relationships " + pkg + ">")
	var parts []Entry
	seen := map[string]bool{}
	for i, s := range b.Sheets {
		part := s.Part
		if part == "" {
			part = fmt.Sprintf("worksheets/sheet%d.xml", i+1)
		}
		fmt.Fprintf(&wb, `<sheet name="%s" sheetId="%d" r:id="rId%d"/>`, html.EscapeString(s.Name), i+1, i+1)
		fmt.Fprintf(&wrels, `<Relationship Id="rId%d" Type="%sworksheet" Target="%s"/>`, i+1, rel, part)
		if seen[part] {
			continue
		}
		seen[part] = true
		fmt.Fprintf(&ct, `<Override PartName="/xl/%s" ContentType="application/vnd.openxmlformats-officedocument.spreadsheetml.worksheet+xml"/>`, part)
		parts = append(parts, Entry{Name: "xl/" + part, Data: []byte(head + "<worksheet " + ns + ">" + sheetXML(s) + "</worksheet>")})
	}
	for k := 0; k < b.ListAgain; k++ {
		id := len(b.Sheets) + k + 1
		fmt.Fprintf(&wb, `<sheet name="%s %d" sheetId="%d" r:id="rId1"/>`, html.EscapeString(b.Sheets[0].Name), k+2, id)
	}
	n := len(b.Sheets) + 1
	if b.Shared != nil {
		var sst strings.Builder
		fmt.Fprintf(&sst, head+`<sst %s count="%d" uniqueCount="%d">`, ns, len(b.Shared), len(b.Shared))
		for _, s := range b.Shared {
			sst.WriteString(`<si><t xml:space="preserve">` + html.EscapeString(s) + "</t></si>")
		}
		sst.WriteString("</sst>")
		parts = append(parts, Entry{Name: "xl/sharedStrings.xml", Data: []byte(sst.String())})
		ct.WriteString(`<Override PartName="/xl/sharedStrings.xml" ContentType="application/vnd.openxmlformats-officedocument.spreadsheetml.sharedStrings+xml"/>`)
		fmt.Fprintf(&wrels, `<Relationship Id="rId%d" Type="%ssharedStrings" Target="sharedStrings.xml"/>`, n, rel)
	}
	ct.WriteString("</Types>")
	wb.WriteString("</sheets></workbook>")
	wrels.WriteString("</Relationships>")
	front := []Entry{
		{Name: "[Content_Types].xml", Data: []byte(ct.String())},
		{Name: "_rels/.rels", Data: []byte(head + "<Relationships " + pkg + `><Relationship Id="rId1" Type="` + rel +
			`officeDocument" Target="xl/workbook.xml"/></Relationships>`)},
		{Name: "xl/workbook.xml", Data: []byte(wb.String())},
		{Name: "xl/_rels/workbook.xml.rels", Data: []byte(wrels.String())},
	}
	return append(front, parts...)
}

// sheetXML writes the sheetData (and mergeCells) of s.
func sheetXML(s Sheet) string {
	var b strings.Builder
	b.WriteString("<sheetData>")
	for r, row := range s.Rows {
		if len(row) == 0 {
			continue
		}
		fmt.Fprintf(&b, `<row r="%d">`, r+1)
		for c, cell := range row {
			if cell.Blank {
				continue
			}
			ref := cell.Ref
			if ref == "" {
				ref = colName(c) + fmt.Sprint(r+1)
			}
			t := ""
			if cell.Type != "" {
				t = ` t="` + cell.Type + `"`
			}
			fmt.Fprintf(&b, `<c r="%s"%s>%s</c>`, ref, t, cell.XML)
		}
		b.WriteString("</row>")
	}
	b.WriteString("</sheetData>")
	if len(s.Merged) > 0 {
		fmt.Fprintf(&b, `<mergeCells count="%d">`, len(s.Merged))
		for _, m := range s.Merged {
			fmt.Fprintf(&b, `<mergeCell ref="%s"/>`, m)
		}
		b.WriteString("</mergeCells>")
	}
	return b.String()
}

// colName is the column letters of 0-based column c.
func colName(c int) string {
	s := ""
	for c++; c > 0; c = (c - 1) / 26 {
		s = string(rune('A'+(c-1)%26)) + s
	}
	return s
}

// Zip writes entries as a zip archive, declaring the given checksums and
// sizes where they are set and applying each Mutate after they are computed.
func Zip(entries []Entry) ([]byte, error) {
	var out bytes.Buffer
	w := zip.NewWriter(&out)
	for _, e := range entries {
		h := &zip.FileHeader{Name: e.Name, Method: zip.Deflate, CRC32: crc32.ChecksumIEEE(e.Data),
			UncompressedSize64: uint64(len(e.Data))}
		h.SetMode(0o644)
		if e.Store {
			h.Method = zip.Store
		}
		if e.CRC != 0 {
			h.CRC32 = e.CRC
		}
		if e.Size != 0 {
			h.UncompressedSize64 = e.Size
		}
		if e.ZeroCRC {
			h.CRC32 = 0
		}
		data := e.Data
		if e.Mutate != nil {
			data = e.Mutate(append([]byte(nil), data...))
		}
		body, err := compress(data, h.Method)
		if err != nil {
			return nil, err
		}
		if e.MutateRaw != nil {
			body = e.MutateRaw(body)
		}
		h.CompressedSize64 = uint64(len(body))
		fw, err := w.CreateRaw(h)
		if err != nil {
			return nil, err
		}
		if _, err := fw.Write(body); err != nil {
			return nil, err
		}
	}
	if err := w.Close(); err != nil {
		return nil, err
	}
	return out.Bytes(), nil
}

// compress returns data as stored in a zip entry with the given method
// (Deflate is raw DEFLATE, RFC 1951).
func compress(data []byte, method uint16) ([]byte, error) {
	if method == zip.Store {
		return data, nil
	}
	var b bytes.Buffer
	w, err := flate.NewWriter(&b, flate.DefaultCompression)
	if err != nil {
		return nil, err
	}
	if _, err := w.Write(data); err != nil {
		return nil, err
	}
	if err := w.Close(); err != nil {
		return nil, err
	}
	return b.Bytes(), nil
}

// names returns the keys of m, sorted.
func names[T any](m map[string]T) []string {
	out := make([]string, 0, len(m))
	for k := range m {
		out = append(out, k)
	}
	sort.Strings(out)
	return out
}
