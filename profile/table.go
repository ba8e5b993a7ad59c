package profile

import (
	"errors"
	"fmt"
	"maps"
	"math"
	"strings"
)

// origin says where rows come from, to build errors that point at them.
type origin struct {
	file  string // file name as given by the caller
	sheet string // worksheet name, "" for text files
}

// source is the Profile.Source of profiles from this origin.
func (o origin) source() string {
	if o.sheet != "" {
		return o.file + ":" + o.sheet
	}
	return o.file
}

// cell returns the worksheet reference of 0-based column col in row line.
func (o origin) cell(line, col int) string {
	if o.sheet == "" || line <= 0 || col < 0 {
		return ""
	}
	return cellName(line, col)
}

// place names a position in a message: "line 4" or "cell B4".
func (o origin) place(line, col int) string {
	if c := o.cell(line, col); c != "" {
		return "cell " + c
	}
	if o.sheet != "" {
		return fmt.Sprintf("row %d", line)
	}
	return fmt.Sprintf("line %d", line)
}

// errAt builds an *Error at line (row) and 0-based column col (-1: none).
func (o origin) errAt(line, col int, column string, err error, hint string) *Error {
	return &Error{File: o.file, Sheet: o.sheet, Line: line, Cell: o.cell(line, col),
		Column: column, Err: err, Hint: hint}
}

// table turns a header and data rows into profiles. It serves the
// per-profile layout (no id column: every row belongs to one profile) and
// the long layout (an id column groups rows into profiles), for text files
// and worksheets alike.
type table struct {
	org        origin
	cols       []column
	headerLine int
	idCol      int
	depthCol   int
	valueCol   int // -1 until the first data row decides it
	sigmaCol   int
	comma      bool          // a decimal comma is accepted in cells
	marks      *decimalMarks // watches decimal marks of text numbers; nil when not needed
	kept       *textBudget   // text the profiles keep, for the whole file; nil: not counted
	metaCost   int64         // text of the metadata every new profile copies
	// kinds are the cell kinds of the row being added (worksheets; nil for
	// text files, whose cells are all text); rowText and rowKinds are the
	// buffers a worksheet row is laid out in.
	kinds    []cellKind
	rowText  []string
	rowKinds []cellKind
	sepComma bool      // columns are separated by ',' (for hints)
	valueKey metaEntry // "value" metadata naming the value column
	template Profile   // metadata applied once, copied into every profile
	profiles []*building
	index    map[string]int
	rows     int
	// cur is the profile of the last row and curRaw its id cell as
	// written (trimmed): rows usually come grouped by profile, and a row of
	// the same profile needs no look-up.
	cur        *building
	curRaw     string
	lastLen    int   // points of the profile before cur: a capacity hint
	perProfile []int // the per-profile columns, known with the value column
	cellBuf    []string
	trimmed    [][]byte // addFast's trimmed cells
	// stream, when not nil, receives each profile as soon as its rows are
	// read (see Each); the table then keeps no finished profile.
	stream   *stream
	deferred error // the first validation error of a profile met while streaming
}

// building is a profile being assembled.
type building struct {
	p     Profile
	fixed []fixedCell // per column: the value of a per-profile column
}

// fixedCell remembers the first non-blank cell of a per-profile column.
type fixedCell struct {
	set  bool
	text string
	v    float64
	line int
}

// tableOptions describe the input around the header.
type tableOptions struct {
	org        origin
	meta       *metaSet
	headerLine int
	defaultID  string
	comma      bool
	sepComma   bool
	marks      *decimalMarks // see table.marks
	kept       *textBudget   // see table.kept
}

// newTable classifies the header cells and applies the metadata.
func newTable(header []string, o tableOptions) (*table, error) {
	t := &table{org: o.org, headerLine: o.headerLine, comma: o.comma, sepComma: o.sepComma, marks: o.marks, kept: o.kept,
		idCol: -1, depthCol: -1, valueCol: -1, sigmaCol: -1, index: map[string]int{}}
	if err := t.classifyHeader(header); err != nil {
		return nil, err
	}
	if err := t.applyMeta(o.meta, o.defaultID); err != nil {
		return nil, err
	}
	for k, v := range t.template.Meta {
		t.metaCost += int64(len(k) + len(v))
	}
	if t.idCol < 0 {
		b, err := t.newBuilding(t.template.ID, t.headerLine)
		if err != nil {
			return nil, err
		}
		t.profiles = []*building{b}
		t.cur = b
	}
	return t, nil
}

// classifyHeader classifies every header cell and checks that the
// columns make one table: one depth column, no duplicates.
func (t *table) classifyHeader(header []string) error {
	seen := map[string]int{}
	byKind := map[colKind]int{}
	for i, h := range header {
		c, err := classify(h)
		if err != nil {
			return t.org.errAt(t.headerLine, i, c.name, err, unitHint(c.kind))
		}
		if c.kind == colIgnore {
			t.cols = append(t.cols, c)
			continue
		}
		if j, dup := seen[c.key]; dup {
			return t.org.errAt(t.headerLine, i, c.name, errorf(ErrColumn,
				"duplicate column (also column %d)", j+1), "rename or remove one of them")
		}
		seen[c.key] = i
		if j, dup := byKind[c.kind]; dup && c.kind != colUnknown && c.kind != colText {
			return t.twoColumns(t.cols[j], c, i)
		}
		byKind[c.kind] = i
		t.cols = append(t.cols, c)
	}
	t.idCol, t.depthCol, t.sigmaCol = kindIndex(byKind, colID), kindIndex(byKind, colDepth), kindIndex(byKind, colSigma)
	if t.depthCol < 0 {
		return t.org.errAt(t.headerLine, -1, "", errorf(ErrColumn, "no depth column in the header %s",
			quote(strings.Join(trimAll(header), " | "))), t.depthHint())
	}
	return nil
}

func kindIndex(m map[colKind]int, k colKind) int {
	if i, ok := m[k]; ok {
		return i
	}
	return -1
}

func trimAll(s []string) []string {
	out := make([]string, len(s))
	for i, v := range s {
		out[i] = strings.TrimSpace(latin1(v))
	}
	return out
}

// twoColumns reports two columns of the same kind.
func (t *table) twoColumns(a, b column, i int) error {
	if a.kind == colDepth && !strings.EqualFold(a.unit, b.unit) {
		return t.org.errAt(t.headerLine, i, b.name, errorf(ErrUnit,
			"depth columns in two units, %s and %s (mixed units)", quote(a.name), quote(b.name)),
			"keep one depth column, in one unit")
	}
	return t.org.errAt(t.headerLine, i, b.name, errorf(ErrColumn,
		"two %s columns, %s and %s", a.kind.describe(), quote(a.name), quote(b.name)), "keep one of them")
}

// depthHint suggests a depth header, pointing at a column that looks like
// one, or says what else the table looks like.
func (t *table) depthHint() string {
	kinds := map[colKind]bool{}
	hardness, conc := 0, 0
	for _, c := range t.cols {
		kinds[c.kind] = true
		if c.kind == colUnknown && c.quantity == "hardness" {
			hardness++
		} else if c.kind == colUnknown && c.valueUnit != "" {
			conc++
		}
	}
	numeric := true
	for _, c := range t.cols {
		if _, err := parseNumber(c.name, true); err != nil && c.kind != colIgnore {
			numeric = false
		}
	}
	switch {
	case numeric:
		return "the first row holds numbers: add a header row such as depth_mm,C_wt% above the data"
	case kinds[colTime] && kinds[colTemp]:
		return "this looks like a temperature history (time and temperature columns), not a depth profile"
	case hardness == 1 && conc == 1:
		return "this looks like a hardness–concentration calibration table, not a depth profile"
	}
	for _, c := range t.cols {
		if c.kind != colUnknown {
			continue
		}
		if _, u := splitHeader(c.name); u != "" {
			if _, err := LengthUnit(u); err == nil {
				return fmt.Sprintf("rename %s to %s for a depth measured from the surface, or to %s for a position across a diffusion couple's interface (which may be negative)",
					quote(c.name), quote("depth_"+u), quote("position_"+u))
			}
		}
	}
	return "name the depth column depth_<unit>, e.g. depth_mm, depth_um or depth (in)"
}

// applyMeta interprets the file's metadata into the template profile.
func (t *table) applyMeta(m *metaSet, defaultID string) error {
	if m == nil {
		m = &metaSet{}
	}
	t.template.ID = defaultID
	t.template.Source = t.org.source()
	if err := m.apply(&t.template, t.org); err != nil {
		return err
	}
	if e, ok := m.get("id"); ok && t.idCol >= 0 {
		return t.org.errAt(e.line, e.col, "", errorf(ErrMetadata,
			"metadata id %s in a table with a profile id column %s", quote(e.value), quote(t.cols[t.idCol].name)),
			"remove the id metadata; the column names the profiles")
	}
	if e, ok := m.get("value"); ok {
		t.valueKey = e
	}
	return nil
}

// newBuilding starts a profile from the template (first seen at line).
func (t *table) newBuilding(id string, line int) (*building, error) {
	if err := t.keep(int64(len(id))+t.metaCost, line); err != nil {
		return nil, err
	}
	b := &building{p: t.template, fixed: make([]fixedCell, len(t.cols))}
	b.p.ID = id
	if n := t.lastLen; n > 0 {
		b.p.Depth, b.p.Value, b.p.Line = make([]float64, 0, n), make([]float64, 0, n), make([]int, 0, n)
		if t.sigmaCol >= 0 {
			b.p.Sigma = make([]float64, 0, n)
		}
	}
	if t.template.Meta != nil {
		b.p.Meta = maps.Clone(t.template.Meta)
	}
	return b, nil
}

// keep counts n bytes of text that a profile keeps against the file's
// budget: each profile carries its metadata into every report, so a long
// metadata line over many profiles multiplies.
func (t *table) keep(n int64, line int) error {
	if t.kept == nil {
		return nil
	}
	limit, beyond := t.kept.limit, ""
	if t.kept.own != nil {
		limit += *t.kept.own
		beyond = " beyond the size of the file itself"
	}
	if t.kept.used += n; t.kept.used <= limit {
		return nil
	}
	return t.org.errAt(line, -1, "", errorf(ErrTooLarge,
		"the profiles of this file would keep more than %d MiB of text%s (ids, metadata and text columns, copied into every profile); it was not read",
		t.kept.limit>>20, beyond), "shorten the long metadata or text cells, or split the file")
}

// textBudget counts bytes against a limit. With own set (a text file),
// the limit grows by the bytes of the file read so far: ids and text
// cells that the rows themselves hold are never an amplification, however
// many profiles the file has; metadata copied into every profile is.
type textBudget struct {
	used, limit int64
	own         *int64
}

// maxKeptText bounds the text the profiles of one file keep (ids,
// metadata, text columns) beyond what the file itself holds: a report
// repeats it for every profile. A variable only so that a test can lower it.
var maxKeptText int64 = 16 << 20

// add reads one data row (cells may be fewer than the header: missing
// cells are blank). Blank rows are skipped.
func (t *table) add(cells []string, line int) error {
	if err := t.unreadCells(line); err != nil {
		return err
	}
	if blankRow(cells) {
		return nil
	}
	if err := t.checkWidth(cells, line); err != nil {
		return err
	}
	if t.valueCol < 0 {
		if err := t.decideValue(cells, line); err != nil {
			return err
		}
	}
	b, err := t.profileFor(cells, line)
	if err != nil {
		return err
	}
	if err := t.addPoint(b, cells, line); err != nil {
		return err
	}
	t.rows++
	return t.addFixed(b, cells, line)
}

func blankRow(cells []string) bool {
	for _, c := range cells {
		if strings.TrimSpace(c) != "" {
			return false
		}
	}
	return true
}

func cellAt(cells []string, i int) string {
	if i < len(cells) {
		return strings.TrimSpace(cells[i])
	}
	return ""
}

// checkWidth refuses cells beyond the header and cells under a blank header.
func (t *table) checkWidth(cells []string, line int) error {
	for i, c := range cells {
		if strings.TrimSpace(c) == "" {
			continue
		}
		if i >= len(t.cols) {
			return t.beyondHeader(line, i, lastNonBlank(cells))
		}
		if t.cols[i].kind == colIgnore {
			return t.org.errAt(line, i, "", errorf(ErrColumn,
				"cell %s is under a column without a header (column %d)", quote(c), i+1),
				"give the column a header or remove the cell")
		}
	}
	return nil
}

// beyondHeader refuses a row with cells from column first to column last
// (0-based) beyond the header.
func (t *table) beyondHeader(line, first, last int) error {
	hint := "remove the extra cells or give them a header"
	if t.sepComma {
		hint = "a decimal comma splits numbers in a comma-separated file: separate columns with ';' or tab, or write decimals with a point"
	}
	return t.org.errAt(line, first, "", errorf(ErrColumn,
		"the row has %d cells but the header has %d columns", last+1, len(t.cols)), hint)
}

func lastNonBlank(cells []string) int {
	for i := len(cells) - 1; i >= 0; i-- {
		if strings.TrimSpace(cells[i]) != "" {
			return i
		}
	}
	return -1
}

// decideValue picks the measured-value column on the first data row: the
// one undecided column that holds a number or names a known value unit.
// The other undecided columns hold text kept in Meta.
func (t *table) decideValue(cells []string, line int) error {
	var cand, open []int
	for i, c := range t.cols {
		if c.kind != colUnknown {
			continue
		}
		open = append(open, i)
		if t.valueKey.value != "" {
			if strings.EqualFold(c.name, t.valueKey.value) {
				cand = append(cand, i)
			}
			continue
		}
		if _, err := parseNumber(cellAt(cells, i), t.comma); err == nil || c.valueUnit != "" || IsBelowLimit(cellAt(cells, i)) {
			cand = append(cand, i)
		}
	}
	if len(cand) == 0 && len(open) == 1 && t.valueKey.value == "" {
		cand = open
	}
	if err := t.valueProblem(cand, open, line); err != nil {
		return err
	}
	t.valueCol = cand[0]
	for _, i := range open {
		t.cols[i].kind = colText
	}
	t.cols[t.valueCol].kind = colValue
	for i, c := range t.cols {
		if c.kind.perProfile() {
			t.perProfile = append(t.perProfile, i)
		}
	}
	return t.checkSigmaUnit()
}

// valueProblem explains why no single value column was found.
func (t *table) valueProblem(cand, open []int, line int) error {
	switch {
	case len(cand) == 1:
		return nil
	case t.valueKey.value != "":
		return t.org.errAt(t.valueKey.line, t.valueKey.col, "", errorf(ErrMetadata,
			"the metadata names the value column %s but the header has no such column", quote(t.valueKey.value)),
			"correct the value metadata to one of the column headers")
	case len(cand) > 1:
		names := make([]string, len(cand))
		for k, i := range cand {
			names[k] = quote(t.cols[i].name)
		}
		return t.org.errAt(t.headerLine, cand[1], t.cols[cand[1]].name, errorf(ErrColumn,
			"%s could each be the measured value", strings.Join(names, " and ")),
			"keep one value column per file: rename or remove the others, or name it with a \"value: <column>\" metadata line")
	case len(open) == 0:
		return t.org.errAt(t.headerLine, -1, "", errorf(ErrColumn, "no column for the measured value"),
			"add a value column such as C_wt% or HV0.5 next to the depth column")
	}
	return t.org.errAt(line, -1, "", errorf(ErrColumn,
		"no column on this row holds a number besides depth"), "the measured value must be a number; check the row")
}

// checkSigmaUnit refuses a sigma column in another unit than the value.
func (t *table) checkSigmaUnit() error {
	if t.sigmaCol < 0 {
		return nil
	}
	s, v := t.cols[t.sigmaCol], t.cols[t.valueCol]
	if s.unit != "" && (s.valueUnit == "" || v.valueUnit == "" || s.valueUnit != v.valueUnit) {
		return t.org.errAt(t.headerLine, t.sigmaCol, s.name, errorf(ErrUnit,
			"sigma unit %s does not match the value column %s", quote(s.unit), quote(v.name)),
			"give sigma in the unit of the value (or name the column just \"sigma\")")
	}
	return nil
}

// profileFor finds or starts the profile a row belongs to.
func (t *table) profileFor(cells []string, line int) (*building, error) {
	if t.idCol < 0 {
		return t.profiles[0], nil
	}
	raw := cellAt(cells, t.idCol)
	if t.cur != nil && raw == t.curRaw && raw != "" {
		return t.cur, nil
	}
	id := latin1(raw)
	if id == "" {
		return nil, t.org.errAt(line, t.idCol, t.cols[t.idCol].name,
			errorf(ErrValue, "the profile id is blank"), "fill the id cell or remove the row")
	}
	if t.stream != nil {
		return t.streamProfileFor(id, raw, line)
	}
	if k, ok := t.index[id]; ok {
		t.cur, t.curRaw = t.profiles[k], raw
		return t.cur, nil
	}
	b, err := t.newProfile(id, raw, line)
	if err != nil {
		return nil, err
	}
	t.index[b.p.ID] = len(t.profiles)
	t.profiles = append(t.profiles, b)
	return b, nil
}

// newProfile starts the profile id, whose id cell reads raw, at line and
// makes it the current one.
func (t *table) newProfile(id, raw string, line int) (*building, error) {
	if t.cur != nil {
		t.lastLen = len(t.cur.p.Depth)
	}
	b, err := t.newBuilding(strings.Clone(id), line)
	if err != nil {
		return nil, err
	}
	t.cur, t.curRaw = b, b.p.ID
	if raw != id {
		t.curRaw = strings.Clone(raw)
	}
	return b, nil
}

// number parses cell i of a row as a finite number.
func (t *table) number(cells []string, i, line int) (float64, error) {
	return t.numberAt(cellAt(cells, i), i, line)
}

// unreadCells refuses, in a worksheet row, a cell under a header that
// holds a formula without a stored result or an error value: its value
// cannot be read, and a row of such cells would otherwise pass for blank.
func (t *table) unreadCells(line int) error {
	for i, k := range t.kinds {
		if i >= len(t.cols) || t.cols[i].kind == colIgnore {
			continue
		}
		switch k {
		case kindFormula:
			return t.org.errAt(line, i, t.cols[i].name, errorf(ErrNumber,
				"the cell holds a formula with no stored result, not a value"), formulaHint)
		case kindErrorValue:
			return t.org.errAt(line, i, t.cols[i].name, errorf(ErrNumber,
				"the cell holds the error value %s (a formula that failed)", quote(t.rowText[i])),
				"correct the formula or type the value")
		}
	}
	return nil
}

// kindAt is the kind of cell i of the row being added.
func (t *table) kindAt(i int) cellKind {
	if i < len(t.kinds) {
		return t.kinds[i]
	}
	return kindText
}

// numberAt parses s, the cell in column i of row line, as a finite number.
// A worksheet's stored numbers are read as stored; a logical value is
// refused (TRUE is not the number 1); text may use a decimal comma.
func (t *table) numberAt(s string, i, line int) (float64, error) {
	switch t.kindAt(i) {
	case kindBool:
		return 0, t.org.errAt(line, i, t.cols[i].name, errorf(ErrNumber,
			"the cell holds the logical value %s, not a number", s),
			"type the measured number: a TRUE/FALSE cell is not read as 1/0")
	case kindNumber:
		v, err := parseNumber(s, false)
		if err != nil {
			return 0, t.org.errAt(line, i, t.cols[i].name, err, "fix the cell or remove the row")
		}
		return v, nil
	}
	v, err := parseNumber(s, t.comma)
	if err != nil {
		hint := "fix the cell or remove the row"
		if s == "" {
			hint = "fill the cell or remove the row"
		} else if !t.comma && strings.Contains(s, ",") {
			hint = "write decimals with a point, or separate columns with ';' or tab to use a decimal comma"
		}
		return 0, t.org.errAt(line, i, t.cols[i].name, err, hint)
	}
	if t.marks != nil {
		return v, t.marks.note(s, line, i, t.cols[i].name)
	}
	return v, nil
}

// addPoint appends depth, value and sigma of one row.
func (t *table) addPoint(b *building, cells []string, line int) error {
	d, err := t.number(cells, t.depthCol, line)
	if err != nil {
		return err
	}
	dc := &t.cols[t.depthCol]
	if err := checkMetres(dc.size.si(d), "depth", clip(cellAt(cells, t.depthCol))+" "+dc.unit); err != nil {
		return t.org.errAt(line, t.depthCol, dc.name, err, "check the number and the unit in the header")
	}
	if d < 0 && !t.cols[t.depthCol].signed {
		return t.org.errAt(line, t.depthCol, t.cols[t.depthCol].name,
			errorf(ErrValue, "depth %s is negative", fmtNum(d)),
			"depth is measured from the surface and cannot be negative; check the sign (positions across a couple's interface go in a column named position_<unit>)")
	}
	if s := cellAt(cells, t.valueCol); t.kindAt(t.valueCol) != kindNumber && IsBelowLimit(s) {
		// Not a number: listed, left out of the points, never read as one.
		b.p.BelowLimit = append(b.p.BelowLimit, BelowLimit{Depth: t.cols[t.depthCol].size.si(d), Text: clip(strings.TrimSpace(s)),
			Line: line, Cell: t.org.cell(line, t.valueCol)})
		return nil
	}
	v, err := t.number(cells, t.valueCol, line)
	if err != nil {
		return err
	}
	if err := checkMeasured(v, "value", clip(cellAt(cells, t.valueCol))); err != nil {
		return t.org.errAt(line, t.valueCol, t.cols[t.valueCol].name, err, "fix the cell or remove the row")
	}
	p := &b.p
	if t.sigmaCol >= 0 {
		s, err := t.number(cells, t.sigmaCol, line)
		if err != nil {
			return err
		}
		if !(s > 0) {
			return t.org.errAt(line, t.sigmaCol, t.cols[t.sigmaCol].name,
				errorf(ErrValue, "sigma %s is not positive", fmtNum(s)),
				"sigma is a standard uncertainty and must be > 0; fix the cell or remove the sigma column")
		}
		if err := checkSigma(s, clip(cellAt(cells, t.sigmaCol))); err != nil {
			return t.org.errAt(line, t.sigmaCol, t.cols[t.sigmaCol].name, err,
				"sigma is the standard uncertainty of one value, in the value's unit; fix the cell")
		}
		p.Sigma = append(p.Sigma, s)
	}
	p.Depth = append(p.Depth, t.cols[t.depthCol].size.si(d))
	p.Value = append(p.Value, v)
	p.Line = append(p.Line, line)
	return nil
}

// addFixed reads the per-profile columns (temperature, time, lot…) of a
// row; each must keep one value within a profile. Blank cells are skipped.
func (t *table) addFixed(b *building, cells []string, line int) error {
	for i := range t.cols {
		c := &t.cols[i]
		if !c.kind.perProfile() {
			continue
		}
		s := cellAt(cells, i)
		f := &b.fixed[i]
		if s == "" || (f.set && s == f.text) {
			continue
		}
		if err := t.setFixed(b, i, s, line); err != nil {
			return err
		}
	}
	return nil
}

// setFixed interprets a per-profile cell, or checks it against the first one.
func (t *table) setFixed(b *building, i int, s string, line int) error {
	c, f := &t.cols[i], &b.fixed[i]
	v := 0.0
	if c.kind.numeric() {
		var err error
		if v, err = t.numberAt(s, i, line); err != nil {
			return err
		}
	}
	if f.set {
		if c.kind.numeric() && v == f.v {
			return nil
		}
		return t.org.errAt(line, i, c.name, errorf(ErrValue,
			"profile %s has %s %s here but %s at %s", quote(b.p.ID), c.kind.describe(), quote(s), quote(f.text), t.org.place(f.line, i)),
			fmt.Sprintf("one profile has one %s: correct the cell, or give the other rows their own profile id", c.kind.describe()))
	}
	*f = fixedCell{set: true, text: s, v: v, line: line}
	if err := t.keep(int64(len(c.key)+len(s)), line); err != nil {
		return err
	}
	if b.p.Meta == nil {
		b.p.Meta = map[string]string{}
	}
	s = latin1(s)
	b.p.Meta[c.key] = s
	if err := setColumnField(&b.p, t.template, *c, s, v); err != nil {
		hint := "fix the cell"
		if errors.Is(err, ErrMetadata) {
			hint = "fix the cell, or remove the metadata line that disagrees"
		}
		return t.org.errAt(line, i, c.name, err, hint)
	}
	return nil
}

// setColumnField stores a per-profile column value in its field, checking
// its domain and that it agrees with file metadata given for the same field.
func setColumnField(p *Profile, meta Profile, c column, s string, v float64) error {
	switch c.kind {
	case colTemp:
		k := c.scale.ToKelvin(v)
		if k > maxKelvin {
			return checkKelvin(k, clip(s))
		}
		return setNumber(&p.Temperature, meta.Temperature, k, "temperature", s, false)
	case colTempSigma:
		k := c.scale.DeltaToKelvin(v)
		if k > maxKelvin {
			return errorf(ErrValue, "temperature sigma %s is above %d K", clip(s), maxKelvin)
		}
		return setNumber(&p.TemperatureSigma, meta.TemperatureSigma, k, "temperature sigma", s, true)
	case colTime:
		if t := c.size.si(v); t > 0 {
			if err := checkSeconds(t, clip(s)); err != nil {
				return err
			}
		}
		return setNumber(&p.Time, meta.Time, c.size.si(v), "time", s, false)
	case colThickness:
		if err := checkMetres(c.size.si(v), "thickness", clip(s)); err != nil {
			return err
		}
		return setNumber(&p.Thickness, meta.Thickness, c.size.si(v), "thickness", s, false)
	case colLot:
		return setText(&p.Lot, meta.Lot, s, "lot")
	case colMaterial:
		return setText(&p.Material, meta.Material, s, "material")
	case colQuantity:
		return setText(&p.Quantity, meta.Quantity, s, "quantity")
	}
	return nil
}

// setNumber sets *dst = v after checking v > 0 (v ≥ 0 when zeroOK) and
// agreement with a metadata value (0: none) to 1e-9 relative.
func setNumber(dst *float64, meta, v float64, what, s string, zeroOK bool) error {
	if !(v > 0 || (zeroOK && v == 0)) || math.IsInf(v, 0) {
		if what == "temperature" {
			return errorf(ErrValue, "temperature %s is %s K, not above absolute zero", clip(s), fmtNum(v))
		}
		return errorf(ErrValue, "%s %s is not positive", what, clip(s))
	}
	if meta != 0 && math.Abs(v-meta) > 1e-9*math.Abs(meta) {
		return errorf(ErrMetadata, "%s %s disagrees with the file's metadata (%s in SI)", what, clip(s), fmtNum(meta))
	}
	*dst = v
	return nil
}

func setText(dst *string, meta, s, what string) error {
	if meta != "" && meta != s {
		return errorf(ErrMetadata, "%s %s disagrees with the file's metadata %s", what, quote(s), quote(meta))
	}
	*dst = s
	return nil
}

// finish returns the profiles in order of first appearance, each validated.
func (t *table) finish() ([]Profile, error) {
	if t.rows == 0 {
		what := "file"
		if t.org.sheet != "" {
			what = "sheet"
		}
		return nil, t.org.errAt(t.headerLine, -1, "", errorf(ErrNoData,
			"the %s has a header but no data rows", what), "add data rows below the header, or leave the "+what+" out")
	}
	if t.marks != nil {
		if err := t.marks.finish(); err != nil {
			return nil, err
		}
	}
	if t.stream != nil {
		if t.deferred == nil {
			if err := t.complete(t.cur); err != nil {
				return nil, err
			}
		}
		return nil, t.deferred
	}
	out := make([]Profile, 0, len(t.profiles))
	for _, b := range t.profiles {
		p := t.profile(b)
		if err := p.Validate(); err != nil {
			return nil, err
		}
		out = append(out, p)
	}
	return out, nil
}

// profile is the finished profile of b.
func (t *table) profile(b *building) Profile {
	v := t.cols[t.valueCol]
	p := b.p
	p.ValueName, p.ValueUnit = v.name, v.valueUnit
	p.Across = t.cols[t.depthCol].signed
	if p.Quantity == "" {
		p.Quantity = v.quantity
	}
	if len(p.BelowLimit) > 0 {
		p.Notes = append(p.Notes, belowLimitNote(&p))
	}
	return p
}
