package profile

import (
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
)

// Exclusion is one row of an exclusions file: a measured point left out
// of its profile's fit, or, without a depth, a whole profile left out of
// the Arrhenius lines, the lot comparison and the calibration of parts.
//
// The exclusions file (a "sidecar" beside the inputs) is a CSV table:
//
//	# fickfit exclusions
//	file,profile,depth_um,line,reason
//	F7-2291-880-1.csv,F7-2291-880-1,50,9,oxide layer at the surface
//	lims-export-BAR-2307.csv,F7-2307-940-2,,,furnace door opened during the hold
//
// Columns, by header (case-insensitive, in any order): profile (or id,
// specimen) is required; depth_<unit> is required as a column (any length
// unit the profile readers take: um, mm, in…), its cell blank for a whole
// profile; file, line and reason are optional. A point is found by its
// depth (to 1 part in 10⁷) and, when line is given, by its source line or
// worksheet row, which tells apart two points at the same depth; without
// line every point at that depth is left out. file is the input file's
// name without its folder; when given it must be the file the profile
// came from. Rows for profiles that are not among the inputs are ignored
// (a file written for a whole campaign serves a command run on part of it);
// a row whose profile is there but whose point is not is an error.
type Exclusion struct {
	// File is the name of the input file (no folder, no sheet); "" for any.
	File string
	// Profile is the profile id.
	Profile string
	// Depth is the depth of the point in m; NaN leaves the whole profile
	// out of the Arrhenius lines and comparisons.
	Depth float64
	// Line is the point's line (text files) or row (worksheets) in its
	// input file; 0 means every point at Depth.
	Line int
	// Reason says why, in the user's words; may be "".
	Reason string
	// Row is the line of the exclusions file that holds this row (0 when
	// the exclusion was not read from a file).
	Row int
}

// Whole tells whether the row leaves a whole profile out of the
// Arrhenius lines and comparisons (it has no depth).
func (e Exclusion) Whole() bool { return math.IsNaN(e.Depth) }

// Exclusions is an exclusions file: its name and rows in file order.
type Exclusions struct {
	Source string
	Rows   []Exclusion
}

// Excluded is a point that an exclusion took out of a profile: what the
// audit trail lists.
type Excluded struct {
	File    string  `json:"file"`
	Profile string  `json:"profile"`
	Depth   float64 `json:"depth_m"`
	Value   float64 `json:"value"`
	Line    int     `json:"line,omitempty"`
	Reason  string  `json:"reason"`
}

// LeftOut is a profile that an exclusion left out of the Arrhenius lines
// and comparisons.
type LeftOut struct {
	File    string `json:"file"`
	Profile string `json:"profile"`
	Reason  string `json:"reason"`
}

// Applied is what Apply did: the points taken out, the profiles left out
// of the Arrhenius lines, and the rows that concern no input profile.
type Applied struct {
	Points  []Excluded `json:"points"`
	LeftOut []LeftOut  `json:"left_out"`
	// Unused are rows whose profile is not among the inputs.
	Unused []Exclusion `json:"-"`
}

// IsLeftOut tells whether the profile id is left out of the Arrhenius lines.
func (a *Applied) IsLeftOut(id string) (LeftOut, bool) {
	if a == nil {
		return LeftOut{}, false
	}
	for _, l := range a.LeftOut {
		if l.Profile == id {
			return l, true
		}
	}
	return LeftOut{}, false
}

// ReadExclusions reads an exclusions file (opened read-only); see Exclusion
// for the format.
func ReadExclusions(path string) (*Exclusions, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, openError(path, err)
	}
	defer f.Close()
	return ReadExclusionsCSV(f, path)
}

// exclusionColumns are the header columns of an exclusions file.
type exclusionColumns struct {
	file, profile, depth, line, reason int
	depthName                          string
	depthUnit                          linear
}

// ReadExclusionsCSV reads an exclusions table from r; name is used in
// messages. Every error is an *Error naming the file, the line and what
// to do.
func ReadExclusionsCSV(r io.Reader, name string) (*Exclusions, error) {
	tr, err := openText(r, name)
	if err != nil {
		return nil, err
	}
	cols, err := exclusionHeader(tr)
	if err != nil {
		return nil, err
	}
	x := &Exclusions{Source: name}
	for {
		rec, line, err := tr.next()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, err
		}
		if blankRow(rec) {
			continue
		}
		if n := lastNonBlank(rec); n >= len(tr.header) {
			return nil, tr.org.errAt(line, n, "", errorf(ErrColumn, "the row has more cells than the header"),
				"remove the extra cells, or enclose a reason that holds the separator in quotes")
		}
		e := Exclusion{Profile: cellAt(rec, cols.profile), Depth: math.NaN(), Row: line}
		if e.Profile == "" {
			return nil, tr.org.errAt(line, cols.profile, tr.header[cols.profile], errorf(ErrValue, "the profile id is blank"),
				"write the id of the profile the row concerns")
		}
		if cols.file >= 0 {
			e.File = cellAt(rec, cols.file)
		}
		if cols.reason >= 0 {
			e.Reason = cellAt(rec, cols.reason)
		}
		if s := cellAt(rec, cols.depth); s != "" {
			v, err := parseNumber(s, tr.comma)
			if err == nil {
				err = tr.noteMark(s, line, cols.depth, cols.depthName)
			}
			if err == nil {
				e.Depth = cols.depthUnit.si(v)
				err = checkMetres(e.Depth, "depth", clip(s))
			}
			if err != nil {
				return nil, tr.org.errAt(line, cols.depth, cols.depthName, err,
					"write the depth of the point as a number in the column's unit, or leave it blank to leave the whole profile out of the Arrhenius lines")
			}
		}
		if cols.line >= 0 {
			if s := cellAt(rec, cols.line); s != "" {
				n, err := strconv.Atoi(s)
				if err != nil || n < 1 {
					return nil, tr.org.errAt(line, cols.line, tr.header[cols.line], errorf(ErrNumber, "%s is not a line number", quote(s)),
						"write the point's line (or worksheet row) in its input file as a whole number, or leave it blank")
				}
				if e.Whole() {
					return nil, tr.org.errAt(line, cols.line, tr.header[cols.line], errorf(ErrValue, "a line is given without a depth"),
						"write the depth of the point too, or clear the line to leave the whole profile out of the Arrhenius lines")
				}
				e.Line = n
			}
		}
		x.Rows = append(x.Rows, e)
	}
	return x, tr.finishMarks()
}

// exclusionHeader finds the columns of an exclusions table.
func exclusionHeader(tr *textReader) (exclusionColumns, error) {
	c := exclusionColumns{file: -1, profile: -1, depth: -1, line: -1, reason: -1}
	set := func(p *int, i int, h string) error {
		if *p >= 0 {
			return tr.org.errAt(tr.headerLine, i, h, errorf(ErrColumn, "the column appears twice"), "keep one of them")
		}
		*p = i
		return nil
	}
	for i, raw := range tr.header {
		h := strings.TrimSpace(latin1(raw))
		key := normKey(h)
		var err error
		switch {
		case h == "":
			continue
		case key == "file" || key == "source":
			err = set(&c.file, i, h)
		case idNames[key]:
			err = set(&c.profile, i, h)
		case key == "line" || key == "row":
			err = set(&c.line, i, h)
		case key == "reason" || key == "note" || key == "comment":
			err = set(&c.reason, i, h)
		default:
			root, unit := splitHeader(h)
			if r := normKey(root); r != "depth" && r != "position" && r != "distance" {
				return c, tr.org.errAt(tr.headerLine, i, h, errorf(ErrColumn, "is not a column of an exclusions file"),
					"the columns are file, profile, depth_<unit> (e.g. depth_um), line and reason")
			}
			if unit == "" {
				return c, tr.org.errAt(tr.headerLine, i, h, errorf(ErrUnit, "the depth column has no unit"),
					"write the unit in the header, e.g. depth_um or depth_mm")
			}
			u, uerr := lengthUnit(unit)
			if uerr != nil {
				return c, tr.org.errAt(tr.headerLine, i, h, uerr, "write the unit in the header, e.g. depth_um or depth_mm")
			}
			if err = set(&c.depth, i, h); err == nil {
				c.depthName, c.depthUnit = h, u
			}
		}
		if err != nil {
			return c, err
		}
	}
	if c.profile < 0 || c.depth < 0 {
		return c, tr.org.errAt(tr.headerLine, -1, "", errorf(ErrColumn, "an exclusions file needs a profile column and a depth column"),
			"write the header file,profile,depth_um,line,reason")
	}
	return c, nil
}

// WriteCSV writes the exclusions in the format ReadExclusionsCSV reads,
// depths in µm to ten significant digits (a point is matched to 1 part in
// 10⁷, and by its line).
func (x *Exclusions) WriteCSV(w io.Writer) error {
	io.WriteString(w, "# fickfit exclusions: points left out of the fits; a row without a depth leaves the profile out of the Arrhenius lines and the lot comparison\n")
	cw := csv.NewWriter(w)
	cw.Write([]string{"file", "profile", "depth_um", "line", "reason"})
	for _, e := range x.Rows {
		depth, line := "", ""
		if !e.Whole() {
			depth = strconv.FormatFloat(e.Depth*1e6, 'g', 10, 64)
		}
		if e.Line > 0 {
			line = strconv.Itoa(e.Line)
		}
		cw.Write([]string{e.File, e.Profile, depth, line, csvSafe(e.Reason)})
	}
	cw.Flush()
	return cw.Error()
}

// csvSafe keeps a spreadsheet from reading a reason as a formula.
func csvSafe(s string) string {
	if s != "" && strings.ContainsRune("=+-@\t\r", rune(s[0])) {
		return "'" + s
	}
	return s
}

// FileName is the name an exclusion's file column holds for a profile
// source: the file name without folder or worksheet ("book.xlsx:A3" →
// "book.xlsx").
func FileName(source string) string {
	file, _ := splitSource(source)
	return filepath.Base(filepath.ToSlash(file))
}

// Apply takes the excluded points out of the profiles (each changed
// profile gets fresh slices; the others are left as they are) and
// returns what it did. Errors are *Error at the exclusions file's line: a
// row whose profile is among ps but came from another file, or whose
// point the profile does not have.
func (x *Exclusions) Apply(ps []Profile) (*Applied, error) {
	a := &Applied{}
	if x == nil {
		return a, nil
	}
	byID := make(map[string]int, len(ps))
	for i := range ps {
		byID[ps[i].ID] = i
	}
	rows := map[int][]Exclusion{}
	var order []int
	for _, e := range x.Rows {
		i, ok := byID[e.Profile]
		if !ok {
			a.Unused = append(a.Unused, e)
			continue
		}
		if _, seen := rows[i]; !seen {
			order = append(order, i)
		}
		rows[i] = append(rows[i], e)
	}
	for _, i := range order {
		q, got, _, err := x.exclude(ps[i], rows[i])
		if err != nil {
			return nil, err
		}
		ps[i] = q
		a.Points = append(a.Points, got.Points...)
		a.LeftOut = append(a.LeftOut, got.LeftOut...)
	}
	return a, nil
}

// Exclude applies the rows that concern p and returns p without the
// excluded points (fresh slices when points were removed), the indices
// of the removed points in p, and what was done.
func (x *Exclusions) Exclude(p Profile) (Profile, []int, *Applied, error) {
	if x == nil {
		return p, nil, &Applied{}, nil
	}
	var mine []Exclusion
	for _, e := range x.Rows {
		if e.Profile == p.ID {
			mine = append(mine, e)
		}
	}
	q, a, idx, err := x.exclude(p, mine)
	if err != nil {
		return p, nil, nil, err
	}
	return q, idx, a, nil
}

// sameDepth tells whether a depth read from an exclusions file names the
// point at depth d: equal to 1 part in 10⁷ (the file writes ten digits).
func sameDepth(e, d float64) bool {
	return math.Abs(e-d) <= 1e-7*math.Max(math.Abs(d), 1e-9)
}

// exclude applies rows (all about p) to p; idx are the removed points.
func (x *Exclusions) exclude(p Profile, rows []Exclusion) (q Profile, a *Applied, idx []int, err error) {
	a = &Applied{}
	if len(rows) == 0 {
		return p, a, nil, nil
	}
	org := origin{file: x.Source}
	file := FileName(p.Source)
	drop := make([]bool, p.Len())
	reason := make([]string, p.Len())
	for _, e := range rows {
		if e.File != "" && p.Source != "" && !strings.EqualFold(e.File, file) {
			return p, nil, nil, org.errAt(e.Row, -1, "", errorf(ErrValue, "profile %s comes from %s, not from %s", quote(e.Profile), quote(file), quote(e.File)),
				"the exclusions were made for other input files: check the file column, or make the exclusions again on these inputs")
		}
		if e.Whole() {
			a.LeftOut = append(a.LeftOut, LeftOut{File: file, Profile: p.ID, Reason: e.Reason})
			continue
		}
		found := false
		for i, d := range p.Depth {
			if !sameDepth(e.Depth, d) {
				continue
			}
			if e.Line > 0 && (i >= len(p.Line) || p.Line[i] != e.Line) {
				continue
			}
			found = true
			if !drop[i] {
				drop[i], reason[i] = true, e.Reason
			}
		}
		if !found {
			where := ""
			if e.Line > 0 {
				where = fmt.Sprintf(" on line %d", e.Line)
			}
			return p, nil, nil, org.errAt(e.Row, -1, "", errorf(ErrValue, "profile %s has no point at depth %s µm%s",
				quote(p.ID), strconv.FormatFloat(e.Depth*1e6, 'g', 10, 64), where),
				"the exclusions were made for another version of the file: check the depth and line, or make the exclusions again")
		}
	}
	n := 0
	for _, d := range drop {
		if d {
			n++
		}
	}
	if n == 0 {
		return p, a, nil, nil
	}
	q = p
	q.Depth, q.Value, q.Line = nil, nil, nil
	if p.Sigma != nil {
		q.Sigma = make([]float64, 0, p.Len()-n)
	}
	for i := range p.Depth {
		if drop[i] {
			ex := Excluded{File: file, Profile: p.ID, Depth: p.Depth[i], Value: p.Value[i], Reason: reason[i]}
			if i < len(p.Line) {
				ex.Line = p.Line[i]
			}
			a.Points = append(a.Points, ex)
			idx = append(idx, i)
			continue
		}
		q.Depth = append(q.Depth, p.Depth[i])
		q.Value = append(q.Value, p.Value[i])
		if i < len(p.Line) {
			q.Line = append(q.Line, p.Line[i])
		}
		if p.Sigma != nil {
			q.Sigma = append(q.Sigma, p.Sigma[i])
		}
	}
	return q, a, idx, nil
}
