package profile

import (
	"bytes"
	"encoding/xml"
	"fmt"
	"io"
	"strconv"
	"strings"
	"unicode/utf8"
)

// cellKind is what a worksheet cell holds (ECMA-376 Part 1, §18.3.1.4,
// the cell's type attribute t, and whether it has a formula and a value).
type cellKind uint8

const (
	kindText       cellKind = iota // text: shared, inline, a formula's text result, a date as text
	kindNumber                     // a stored number (t="n" or no type)
	kindBool                       // a logical value TRUE or FALSE (t="b")
	kindErrorValue                 // an error value such as #DIV/0! (t="e")
	kindFormula                    // a formula with no stored result (no <v>)
)

// xcell is one non-blank cell of a worksheet row.
type xcell struct {
	col  int // 0-based column
	text string
	kind cellKind
}

// sheetRow is a worksheet row: its 1-based number and its non-blank
// cells (a formula without a stored result counts as non-blank) in
// column order.
type sheetRow struct {
	line  int
	cells []xcell
}

// rowSource yields the rows of one sheet; io.EOF after the last.
type rowSource interface {
	next() (sheetRow, error)
}

// cellRange is a merged range of cells, 0-based columns and 1-based rows.
type cellRange struct{ r0, c0, r1, c1 int }

func (m cellRange) contains(row, col int) bool {
	return row >= m.r0 && row <= m.r1 && col >= m.c0 && col <= m.c1
}

func (m cellRange) String() string {
	return cellName(m.r0, m.c0) + ":" + cellName(m.r1, m.c1)
}

// cellName is the reference of 0-based column col in 1-based row: "B5".
func cellName(row, col int) string {
	s := ""
	for c := col + 1; c > 0; c = (c - 1) / 26 {
		s = string(rune('A'+(c-1)%26)) + s
	}
	return s + strconv.Itoa(row)
}

// parseCellName reads "B5" (letters then digits; either may be missing
// in what a file holds) into a 0-based column and a 1-based row, each -1
// when absent.
func parseCellName(ref string) (col, row int, ok bool) {
	i, c := 0, 0
	for ; i < len(ref); i++ {
		ch := ref[i] | 0x20 // lower case
		if ch < 'a' || ch > 'z' {
			break
		}
		if c = c*26 + int(ch-'a'+1); c > maxSheetColumns {
			return 0, 0, false
		}
	}
	col, row = c-1, -1
	if i < len(ref) {
		n, err := strconv.Atoi(ref[i:])
		if err != nil || n < 1 || n > maxSheetRows {
			return 0, 0, false
		}
		row = n
	}
	return col, row, i > 0 || row > 0
}

// sheetReader streams the rows of one worksheet part held in memory.
type sheetReader struct {
	pkg    *xlsxPackage
	org    origin
	part   string
	d      *xml.Decoder
	row    int  // number of the last row read
	inData bool // inside <sheetData>
	inRow  bool // inside <row>
	done   bool
	cells  []xcell
}

func newSheetReader(p *xlsxPackage, org origin, part string, data []byte) *sheetReader {
	return &sheetReader{pkg: p, org: org, part: part, d: xml.NewDecoder(bytes.NewReader(data))}
}

// next returns the next row that has cells.
func (s *sheetReader) next() (sheetRow, error) {
	for !s.done {
		tok, err := s.d.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			return sheetRow{}, s.malformed(err)
		}
		switch el := tok.(type) {
		case xml.StartElement:
			switch {
			case el.Name.Local == "sheetData":
				s.inData = true
			case el.Name.Local == "row" && s.inData:
				r, err := s.readRow(el)
				if err != nil || len(r.cells) > 0 {
					return r, err
				}
			}
		case xml.EndElement:
			if el.Name.Local == "sheetData" {
				s.inData = false
			}
		}
	}
	s.done = true
	return sheetRow{}, io.EOF
}

// malformed reports XML that cannot be read, at the row reached.
func (s *sheetReader) malformed(err error) error {
	where := "before its first row"
	switch {
	case s.inRow:
		where = fmt.Sprintf("in row %d", s.row)
	case s.row > 0:
		where = fmt.Sprintf("after row %d", s.row)
	}
	return s.org.errAt(0, -1, "", errorf(ErrFormat, "the worksheet XML (part %s) is malformed %s (%s); nothing was read from the workbook",
		quote(s.part), where, clipN(err.Error(), 80)), damagedHint)
}

// damaged reports a cell or row that no spreadsheet program writes.
func (s *sheetReader) damaged(line, col int, what string) error {
	return s.org.errAt(line, col, "", errorf(ErrFormat, "the workbook is damaged: %s", what), damagedHint)
}

// readRow reads one <row> element.
func (s *sheetReader) readRow(start xml.StartElement) (sheetRow, error) {
	line := s.row + 1
	if v := attr(start, "r"); v != "" {
		n, err := strconv.Atoi(strings.TrimSpace(v))
		if err != nil || n <= s.row || n > maxSheetRows {
			return sheetRow{}, s.damaged(0, -1, fmt.Sprintf("row number %s after row %d", quote(v), s.row))
		}
		line = n
	}
	s.row, s.inRow = line, true
	s.cells = s.cells[:0]
	col := -1
	for {
		tok, err := s.d.Token()
		if err != nil {
			return sheetRow{}, s.malformed(unexpectedEOF(err))
		}
		switch el := tok.(type) {
		case xml.StartElement:
			if el.Name.Local != "c" {
				if err := s.d.Skip(); err != nil {
					return sheetRow{}, s.malformed(unexpectedEOF(err))
				}
				continue
			}
			c, err := s.readCell(el, line, col)
			if err != nil {
				return sheetRow{}, err
			}
			col = c.col
			if c.text != "" || c.kind == kindFormula {
				s.cells = append(s.cells, c)
			}
		case xml.EndElement:
			if el.Name.Local == "row" {
				s.inRow = false
				return sheetRow{line: line, cells: s.cells}, nil
			}
		}
	}
}

func unexpectedEOF(err error) error {
	if err == io.EOF {
		return io.ErrUnexpectedEOF
	}
	return err
}

func attr(el xml.StartElement, name string) string {
	for _, a := range el.Attr {
		if a.Name.Local == name {
			return a.Value
		}
	}
	return ""
}

// readCell reads one <c> element of row line; prev is the column of the
// previous cell of the row (-1 for none).
func (s *sheetReader) readCell(start xml.StartElement, line, prev int) (xcell, error) {
	col := prev + 1
	if ref := attr(start, "r"); ref != "" {
		c, r, ok := parseCellName(ref)
		if !ok || (r > 0 && r != line) {
			return xcell{}, s.damaged(line, -1, fmt.Sprintf("cell reference %s in row %d", quote(ref), line))
		}
		if c >= 0 {
			col = c
		}
	}
	if col <= prev || col >= maxSheetColumns {
		return xcell{}, s.damaged(line, max(col, 0), fmt.Sprintf("cell %s is given twice or out of order", cellName(line, max(col, 0))))
	}
	typ := attr(start, "t")
	var value, inline []byte
	hasValue, hasFormula := false, false
	for {
		tok, err := s.d.Token()
		if err != nil {
			return xcell{}, s.malformed(unexpectedEOF(err))
		}
		switch el := tok.(type) {
		case xml.StartElement:
			switch el.Name.Local {
			case "v":
				hasValue = true
				if value, err = s.text(value[:0]); err != nil {
					return xcell{}, err
				}
			case "f":
				hasFormula = true
				if err := s.d.Skip(); err != nil {
					return xcell{}, s.malformed(unexpectedEOF(err))
				}
			case "is":
				hasValue = true
				if inline, err = s.inlineText(); err != nil {
					return xcell{}, err
				}
			default:
				if err := s.d.Skip(); err != nil {
					return xcell{}, s.malformed(unexpectedEOF(err))
				}
			}
		case xml.EndElement:
			if el.Name.Local == "c" {
				return s.cellValue(line, col, typ, value, inline, hasValue, hasFormula)
			}
		}
	}
}

// text collects the character data of the element just started, up to
// its end, refusing more than a cell may hold.
func (s *sheetReader) text(buf []byte) ([]byte, error) {
	for depth := 1; ; {
		tok, err := s.d.Token()
		if err != nil {
			return nil, s.malformed(unexpectedEOF(err))
		}
		switch el := tok.(type) {
		case xml.StartElement:
			depth++
		case xml.EndElement:
			if depth--; depth == 0 {
				return buf, nil
			}
		case xml.CharData:
			if buf = append(buf, el...); len(buf) > 4*maxCellChars {
				return buf, nil // too long whatever the encoding; the caller refuses it
			}
		}
	}
}

// inlineText reads an inline string <is>: its <t>, or the <t> of its rich
// text runs, without phonetic runs.
func (s *sheetReader) inlineText() ([]byte, error) {
	var buf []byte
	for depth := 1; ; {
		tok, err := s.d.Token()
		if err != nil {
			return nil, s.malformed(unexpectedEOF(err))
		}
		switch el := tok.(type) {
		case xml.StartElement:
			switch el.Name.Local {
			case "rPh":
				if err := s.d.Skip(); err != nil {
					return nil, s.malformed(unexpectedEOF(err))
				}
			case "t":
				if buf, err = s.text(buf); err != nil {
					return nil, err
				}
			default:
				depth++
			}
		case xml.EndElement:
			if depth--; depth == 0 {
				return buf, nil
			}
		}
	}
}

// cellValue turns what a <c> element held into a cell, checking the limit
// per cell and the workbook's text budget.
func (s *sheetReader) cellValue(line, col int, typ string, value, inline []byte, hasValue, hasFormula bool) (xcell, error) {
	c := xcell{col: col, kind: kindText}
	switch {
	case !hasValue && hasFormula:
		c.kind = kindFormula
	case !hasValue:
	case typ == "s":
		text, long, err := s.pkg.sharedString(string(value))
		if err != nil {
			return c, s.damaged(line, col, fmt.Sprintf("cell %s %v", cellName(line, col), err))
		}
		if long {
			return c, s.tooLong(line, col)
		}
		c.text = text
	case typ == "inlineStr":
		c.text = string(inline)
		if inline == nil {
			c.text = string(value)
		}
	case typ == "b":
		switch strings.TrimSpace(string(value)) {
		case "1":
			c.text = "TRUE"
		case "0":
			c.text = "FALSE"
		default:
			return c, s.damaged(line, col, fmt.Sprintf("cell %s holds a logical value that is neither TRUE nor FALSE", cellName(line, col)))
		}
		c.kind = kindBool
	case typ == "e":
		c.text, c.kind = strings.TrimSpace(string(value)), kindErrorValue
	case typ == "" || typ == "n":
		c.text, c.kind = strings.TrimSpace(string(value)), kindNumber
	default: // "str" (a formula's text), "d" (a date as ISO 8601 text)
		c.text = string(value)
	}
	if len(c.text) > maxCellChars && utf8.RuneCountInString(c.text) > maxCellChars {
		return c, s.tooLong(line, col)
	}
	if s.pkg.text += int64(len(c.text)) + 1; s.pkg.text > maxWorkbookText {
		return c, s.org.errAt(line, col, "", errorf(ErrTooLarge,
			"the cells of the workbook hold more than %d MiB of text (a shared text counts at every cell that uses it); it was not read",
			maxWorkbookText>>20), "export the data as CSV, or remove the long texts repeated in the sheets")
	}
	return c, nil
}

// tooLong refuses a cell holding more characters than a cell may hold.
func (s *sheetReader) tooLong(line, col int) error {
	return s.org.errAt(line, col, "", errorf(ErrTooLarge,
		"the cell holds more than %d characters, the most a spreadsheet cell may hold; it was not read", maxCellChars),
		"shorten the text in the cell, or export the data as CSV")
}

// mergedRanges finds the merged ranges of a worksheet (<mergeCells>,
// which follows <sheetData>) without reading the sheet's rows: from the
// end tag of sheetData on. A sheet without one has none.
func mergedRanges(data []byte) []cellRange {
	end := -1
	for i := len(data); ; {
		j := bytes.LastIndex(data[:i], []byte("sheetData>"))
		if j < 0 {
			break
		}
		k := j // "</sheetData>" or "</prefix:sheetData>"
		if k > 0 && data[k-1] == ':' {
			for k--; k > 0 && isNameByte(data[k-1]); k-- {
			}
		}
		if k >= 2 && data[k-1] == '/' && data[k-2] == '<' {
			end = j + len("sheetData>")
			break
		}
		i = j
	}
	if end < 0 {
		return nil
	}
	var out []cellRange
	d := xml.NewDecoder(bytes.NewReader(data[end:]))
	for {
		tok, err := d.RawToken()
		if err != nil {
			return out
		}
		if el, ok := tok.(xml.StartElement); ok && el.Name.Local == "mergeCell" {
			a, b, _ := strings.Cut(attr(el, "ref"), ":")
			c0, r0, ok0 := parseCellName(a)
			c1, r1, ok1 := c0, r0, ok0
			if b != "" {
				c1, r1, ok1 = parseCellName(b)
			}
			if ok0 && ok1 && r0 > 0 && r1 >= r0 && c0 >= 0 && c1 >= c0 {
				out = append(out, cellRange{r0, c0, r1, c1})
			}
		}
	}
}

func isNameByte(b byte) bool {
	return b == '_' || b == '-' || b == '.' || (b >= '0' && b <= '9') || (b|0x20 >= 'a' && b|0x20 <= 'z')
}
