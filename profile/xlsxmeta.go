package profile

import (
	"fmt"
	"strings"
)

// sheetMetaReader reads the rows above a worksheet's header. A row holds
// metadata as "key: value" in one cell, or a key cell followed by a value
// cell (and, for a quantity, a unit cell: temperature | 925 | C). Cells
// between them may be blank (a merged key cell leaves its other cells
// blank), and a label may stand before an interpreted key (Hold |
// temperature | 925 C). Metadata the package interprets (temperature,
// time…) is read or refused, never dropped: a key with more cells than it
// can use, two such keys in one row, a key with nothing beside it ("key:"
// alone gives it blank, as in a text file) and a value beside a key cell
// merged over several rows are errors. Rows that name no key (titles,
// notes) are skipped.
type sheetMetaReader struct {
	org    origin
	meta   metaSet
	merged map[[2]int]cellRange // merged ranges by their first cell (row, column)
	// keyed are the ranges merged over several rows whose first cell holds
	// an interpreted key.
	keyed []keyedRange
}

type keyedRange struct {
	cellRange
	key string
}

// indexMerged indexes merged ranges by their first cell.
func indexMerged(merged []cellRange) map[[2]int]cellRange {
	m := make(map[[2]int]cellRange, len(merged))
	for _, r := range merged {
		m[[2]int{r.r0, r.c0}] = r
	}
	return m
}

// metaKey reads a cell as a metadata key: "key: value" (colon true, value
// set) or a bare key ("temperature", "time:", "# id"). ok is false for
// other text.
func metaKey(c xcell) (key, value string, colon, ok bool) {
	if c.kind != kindText {
		return "", "", false, false
	}
	s := strings.TrimSpace(strings.TrimLeft(strings.TrimSpace(c.text), "#"))
	if k, v, ok := splitKeyValue(s); ok && !strings.HasSuffix(s, ":") {
		return k, v, true, true
	}
	k := strings.TrimSpace(strings.TrimSuffix(s, ":"))
	return k, "", false, isKey(k)
}

// read interprets one row above the header.
func (m *sheetMetaReader) read(r sheetRow) error {
	cells := r.cells
	numbers := 0
	for _, c := range cells {
		if c.kind == kindNumber {
			numbers++
		} else if _, err := parseNumber(c.text, true); err == nil && c.kind == kindText {
			numbers++
		}
	}
	if numbers >= 2 {
		return m.org.errAt(r.line, cells[0].col, "", errorf(ErrColumn, "numbers in row %d above any header row", r.line),
			"put a header row above the data, with a depth column such as depth_mm and the value name such as C_wt%")
	}
	// The first interpreted key of the row, else a key in its first cell.
	for i, c := range cells {
		if key, value, colon, ok := metaKey(c); ok {
			if canon, _ := meaning(key); canon != "" {
				return m.entry(r.line, c, cells[i+1:], key, value, colon, canon)
			}
		}
	}
	if err := m.beside(r); err != nil {
		return err
	}
	if key, value, colon, ok := metaKey(cells[0]); ok {
		return m.entry(r.line, cells[0], cells[1:], key, value, colon, "")
	}
	return nil
}

// entry reads the metadata whose key is in cell k, followed by the cells rest.
func (m *sheetMetaReader) entry(line int, k xcell, rest []xcell, key, value string, colon bool, canon string) error {
	interpreted := canon != ""
	if interpreted {
		for _, c := range rest {
			if err := m.unreadable(line, c); err != nil {
				return err
			}
			if k2, _, _, ok := metaKey(c); ok {
				if c2, _ := meaning(k2); c2 != "" {
					return m.org.errAt(line, c.col, "", errorf(ErrMetadata,
						"the row holds two metadata keys, %s and %s; it cannot be told which value is whose", quote(key), quote(k2)),
						"write one key per row, with its value in the cell to its right (temperature | 925 C)")
				}
			}
		}
		if !colon && len(rest) == 0 && !strings.HasSuffix(strings.TrimSpace(k.text), ":") {
			return m.org.errAt(line, k.col, "", errorf(ErrMetadata, "metadata %s has no value beside it", quote(key)),
				fmt.Sprintf("write the value in the cell to its right, or key and value in one cell as %s; or remove the key",
					quote(metaExample(canon, true))))
		}
		if mr, ok := m.merged[[2]int{line, k.col}]; ok && mr.r1 > mr.r0 {
			m.keyed = append(m.keyed, keyedRange{mr, key})
		}
	}
	e := metaEntry{key: key, line: line, col: k.col}
	switch {
	case colon && len(rest) == 0, interpreted && len(rest) == 0: // "temperature:" alone: given blank
		e.value = value
	case colon && interpreted && len(rest) == 1:
		e.value, e.col = strings.TrimSpace(value+" "+rest[0].text), rest[0].col
	case !colon && len(rest) == 1 && (interpreted || m.adjacent(line, k, rest[0])):
		e.value, e.col = strings.TrimSpace(rest[0].text), rest[0].col
	case !colon && len(rest) == 2 && interpreted && metaHasUnit[canon]:
		e.value, e.col = strings.TrimSpace(rest[0].text)+" "+strings.TrimSpace(rest[1].text), rest[0].col
	case interpreted && len(rest) > 0:
		form := "key | value"
		if metaHasUnit[canon] {
			form = "key | value | unit"
		}
		return m.org.errAt(line, rest[0].col, "", errorf(ErrMetadata,
			"metadata %s is followed by %d cells (%s); it cannot be told which holds the value",
			quote(key), len(rest), cellList(line, rest)),
			fmt.Sprintf("write it as %s in adjacent cells, or as %s in one cell", form, quote(metaExample(canon, true))))
	default:
		return nil // a key with no value, or text that is not metadata
	}
	return m.meta.add(e, m.org)
}

// adjacent reports whether value cell v follows key cell k directly, or
// after the other cells of a range merged from k.
func (m *sheetMetaReader) adjacent(line int, k, v xcell) bool {
	if v.col == k.col+1 {
		return true
	}
	mr, ok := m.merged[[2]int{line, k.col}]
	return ok && mr.c1 >= v.col-1
}

// unreadable refuses, as the value of an interpreted key, a cell whose
// value is not stored.
func (m *sheetMetaReader) unreadable(line int, c xcell) error {
	switch c.kind {
	case kindFormula:
		return m.org.errAt(line, c.col, "", errorf(ErrMetadata, "the cell holds a formula with no stored result"), formulaHint)
	case kindErrorValue:
		return m.org.errAt(line, c.col, "", errorf(ErrMetadata, "the cell holds the error value %s", quote(c.text)),
			"correct the formula or type the value")
	}
	return nil
}

// beside refuses a row with no key of its own whose cells stand beside a
// key cell merged from an earlier row: the value of a merged key cannot
// be told from a second one.
func (m *sheetMetaReader) beside(r sheetRow) error {
	for _, k := range m.keyed {
		if r.line <= k.r0 || r.line > k.r1 {
			continue
		}
		for _, c := range r.cells {
			if c.col > k.c1 {
				return m.org.errAt(r.line, c.col, "", errorf(ErrMetadata,
					"the cell stands beside the key %s, whose cell is merged over rows %d–%d; it cannot be told which value the key has",
					quote(k.key), k.r0, k.r1),
					"unmerge the key cell and give each value its own key, or keep one value per key")
			}
		}
	}
	return nil
}

// cellList names the cells of a row: "B1, C1 and D1".
func cellList(line int, cells []xcell) string {
	names := make([]string, len(cells))
	for i, c := range cells {
		names[i] = cellName(line, c.col)
	}
	if len(names) == 1 {
		return names[0]
	}
	return strings.Join(names[:len(names)-1], ", ") + " and " + names[len(names)-1]
}

// formulaHint tells what to do about a formula without a stored result.
const formulaHint = "programs that write workbooks without calculating them leave formulas without results: " +
	"open the workbook in a spreadsheet program, let it calculate and save it, or type the value"
