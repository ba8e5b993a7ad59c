package profile

import (
	"errors"
	"fmt"
	"os"
	"regexp"
	"strings"
)

// Note is a remark on how a profile was read or converted that its
// results must carry as a warning (a value below a detection limit left
// out, a hardness reading clamped to a calibration's end). Code is stable,
// for scripts; Message is for people.
type Note struct {
	Code    string `json:"code"`
	Message string `json:"message"`
}

// BelowLimit is a value written below a detection limit ("<0.01", "n.d."):
// not a number, so the point is left out of Depth and Value. Depth is in
// m; Text is the cell as written; Line the source line (row) and Cell the
// worksheet cell ("" for text files).
type BelowLimit struct {
	Depth float64 `json:"depth_m"`
	Text  string  `json:"text"`
	Line  int     `json:"line,omitempty"`
	Cell  string  `json:"cell,omitempty"`
}

// belowLimitRe matches the ways laboratories write a value below a
// detection or quantification limit: "<0.01", "< 0,01", "≤0.005",
// "<LOD", "<DL", "<LOQ", "n.d.", "ND", "n/d", "b.d.l.", "BDL",
// "not detected", "below detection limit".
var belowLimitRe = regexp.MustCompile(`(?i)^\s*(?:(?:<|≤|&lt;)\s*(?:[0-9][0-9.,]*(?:e[+-]?[0-9]+)?|lod|loq|dl|ql|mdl)\s*\S{0,6}|n\.?\s*d\.?|n/d|b\.?\s*d\.?\s*l\.?|not\s+detected|below\s+(?:the\s+)?(?:detection|quantification)(?:\s+limit)?|<\s*(?:detection|quantification)\s+limit)\s*$`)

// IsBelowLimit tells whether a cell says its value lies below a detection
// limit instead of giving a number.
func IsBelowLimit(s string) bool {
	// Every form starts with '<', '≤', "&lt;", n or b after white space: a
	// number (the first cell of every profile asks) needs no pattern.
	t := strings.TrimLeft(s, " \t\n\f\r")
	if t == "" {
		return false
	}
	switch t[0] {
	case '<', '&', 'n', 'N', 'b', 'B', "≤"[0]:
		return belowLimitRe.MatchString(s)
	}
	return false
}

// belowLimitNote is the warning a profile with values below a detection
// limit carries.
func belowLimitNote(p *Profile) Note {
	var at []string
	for i, b := range p.BelowLimit {
		if i == 6 {
			at = append(at, fmt.Sprintf("and %d more", len(p.BelowLimit)-6))
			break
		}
		where := fmt.Sprintf("line %d", b.Line)
		if b.Cell != "" {
			where = "cell " + b.Cell
		}
		at = append(at, fmt.Sprintf("%s at %s mm (%s)", quote(b.Text), fmtNum(b.Depth*1e3), where))
	}
	n := len(p.BelowLimit)
	what := "value was"
	if n > 1 {
		what = "values were"
	}
	return Note{Code: "below-detection-limit", Message: fmt.Sprintf("%d %s written below a detection limit and left out of the fit: %s. They are not numbers; reading them as zero or as the limit would bias the fit. Measure with a lower limit if the profile's tail matters.", n, what, strings.Join(at, ", "))}
}

// Skipped is an input left out by ReadAllKeepGoing: a file (or folder)
// that could not be read, or a profile whose id an earlier input already
// used. File, Sheet, Line and Cell say where; Reason what is wrong and what
// to do.
type Skipped struct {
	File   string `json:"file"`
	Sheet  string `json:"sheet,omitempty"`
	Line   int    `json:"line,omitempty"`
	Cell   string `json:"cell,omitempty"`
	ID     string `json:"id,omitempty"`
	Reason string `json:"error"`
	// Err is the error itself.
	Err error `json:"-"`
}

func skippedOf(path string, err error) Skipped {
	s := Skipped{File: path, Reason: err.Error(), Err: err}
	var pe *Error
	if errors.As(err, &pe) {
		s.File, s.Sheet, s.Line, s.Cell = pe.File, pe.Sheet, pe.Line, pe.Cell
		if s.File == "" {
			s.File = path
		}
		// The position is in the fields: the reason says what and what to do.
		c := *pe
		c.File, c.Sheet, c.Line, c.Cell = "", "", 0, ""
		s.Reason = c.Error()
	}
	return s
}

// ReadAllKeepGoing reads like ReadAll but does not stop at a bad input: a
// path that cannot be opened, a file that cannot be read and a profile
// whose id an earlier input already used are left out and returned in
// skipped, each with where and why; every other profile is returned.
func ReadAllKeepGoing(paths []string) (ps []Profile, skipped []Skipped) {
	var files []string
	for _, p := range paths {
		fi, err := os.Stat(p)
		if err != nil {
			skipped = append(skipped, skippedOf(p, openError(p, err)))
			continue
		}
		if !fi.IsDir() {
			files = append(files, p)
			continue
		}
		fs, err := listFolder(p)
		if err != nil {
			skipped = append(skipped, skippedOf(p, err))
			continue
		}
		files = append(files, fs...)
	}
	seen := map[string]string{}
	for _, f := range files {
		got, err := readFile(f)
		if err != nil {
			skipped = append(skipped, skippedOf(f, err))
			continue
		}
		for _, p := range got {
			if other, dup := seen[p.ID]; dup {
				file, sheet := splitSource(p.Source)
				e := &Error{File: file, Sheet: sheet, Err: errorf(ErrDuplicate, "profile id %s is also used by %s", quote(p.ID), other),
					Hint: "rename one of them (the id comes from an id metadata line, the id column, the sheet name or the file name)"}
				if len(p.Line) > 0 {
					e.Line = p.Line[0]
				}
				s := skippedOf(f, e)
				s.ID = p.ID
				skipped = append(skipped, s)
				continue
			}
			seen[p.ID] = p.Source
			ps = append(ps, p)
		}
	}
	return ps, skipped
}
