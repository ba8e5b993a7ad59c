package profile

import (
	"errors"
	"fmt"
	"strconv"
	"strings"
)

// Error kinds. Every *Error wraps one of these, so callers can sort errors
// with errors.Is (for example to choose an exit status) without reading
// the message.
var (
	// ErrEmpty: the file holds nothing, or only blank and comment lines.
	ErrEmpty = errors.New("empty file")
	// ErrNoData: a header (or metadata) but no data rows, or a profile
	// with no points.
	ErrNoData = errors.New("no data")
	// ErrFormat: not a file this package reads (wrong extension, binary
	// content, damaged workbook, unbalanced quotes, overlong line).
	ErrFormat = errors.New("unreadable format")
	// ErrTooLarge: the input exceeds a size limit (a zip bomb, an overlong line).
	ErrTooLarge = errors.New("input too large")
	// ErrUnit: a unit is missing, unknown or inconsistent.
	ErrUnit = errors.New("unit problem")
	// ErrNumber: a cell that must hold a number does not.
	ErrNumber = errors.New("not a number")
	// ErrColumn: a column is missing, duplicated or ambiguous.
	ErrColumn = errors.New("column problem")
	// ErrMetadata: a metadata line or cell is malformed or contradicts another.
	ErrMetadata = errors.New("metadata problem")
	// ErrValue: a number is out of its physical domain (negative depth,
	// temperature ≤ 0 K, time ≤ 0, NaN…) or out of order.
	ErrValue = errors.New("value out of domain")
	// ErrRange: a value lies outside a calibrated range; no extrapolation is done.
	ErrRange = errors.New("outside calibrated range")
	// ErrDuplicate: two profiles share an id.
	ErrDuplicate = errors.New("duplicate id")
	// ErrOpen: the file or folder cannot be opened; the *Error also wraps
	// the operating system's error (errors.Is(err, fs.ErrNotExist) works).
	ErrOpen = errors.New("cannot open")
)

// Error is an input error with its position, in the spirit of
// encoding/csv.ParseError: which file (and sheet and cell for workbooks),
// which line, which column, what is wrong (Err) and what to do (Hint).
//
// Error() reads, for example,
//
//	coupon.csv:14: column "depth_mm": "0.4x" is not a number — fix the cell or remove the row
//	campaign.xlsx [Sheet "A3"] cell C14: column "C_wt%": "" is blank — fill the cell or remove the row
type Error struct {
	File  string // file name as given by the caller
	Sheet string // worksheet name; "" for text files
	// Line is the 1-based line (text files) or row (worksheets); 0 when the
	// error concerns the whole file.
	Line   int
	Cell   string // cell reference such as "C14" (worksheets only)
	Column string // column header as written in the file; "" when not about one column
	Err    error  // what is wrong; wraps one of the Err… kinds above
	Hint   string // what to do about it; may be ""
}

// Error formats the position, the problem and the hint on one line.
func (e *Error) Error() string {
	var b strings.Builder
	b.WriteString(e.where())
	if e.Column != "" {
		if b.Len() > 0 {
			b.WriteString(": ")
		}
		b.WriteString("column " + quote(e.Column))
	}
	if e.Err != nil {
		if b.Len() > 0 {
			b.WriteString(": ")
		}
		b.WriteString(e.Err.Error())
	}
	if e.Hint != "" {
		b.WriteString(" — ")
		b.WriteString(e.Hint)
	}
	return b.String()
}

// where formats "file:line", "file [Sheet "S"] cell C14" or "file [Sheet "S"] row 3".
func (e *Error) where() string {
	s := e.File
	if e.Sheet != "" {
		s += " [Sheet " + quote(e.Sheet) + "]"
		switch {
		case e.Cell != "":
			s += " cell " + e.Cell
		case e.Line > 0:
			s += fmt.Sprintf(" row %d", e.Line)
		}
		return s
	}
	if e.Line > 0 {
		s += fmt.Sprintf(":%d", e.Line)
	}
	return s
}

// Unwrap returns the underlying error, so errors.Is(err, ErrNumber) works.
func (e *Error) Unwrap() error { return e.Err }

// kindError is a message that wraps one of the Err… kinds without
// repeating the kind's own text.
type kindError struct {
	kind error
	msg  string
}

func (k *kindError) Error() string { return k.msg }
func (k *kindError) Unwrap() error { return k.kind }

// errorf makes an error of the given kind with a formatted message.
func errorf(kind error, format string, args ...any) error {
	return &kindError{kind: kind, msg: fmt.Sprintf(format, args...)}
}

// maxEcho is the number of characters of a cell, line or name that a
// message quotes at most: enough to recognise it, never a whole overlong
// cell (a workbook cell may hold 32 767 characters, a text line 1 MiB).
const maxEcho = 40

// quote returns s in double quotes, in Go syntax as %q writes it, cut to
// its first maxEcho characters and an ellipsis when it is longer.
func quote(s string) string {
	n := 0
	for i := range s {
		if n == maxEcho {
			return strconv.Quote(s[:i] + "…")
		}
		n++
	}
	return strconv.Quote(s)
}

// clip is s cut as quote cuts it, without the quotes (for numbers as
// written, which messages show bare: "time 0 is not positive").
func clip(s string) string { return clipN(s, maxEcho) }

// clipN cuts s to its first n characters and an ellipsis.
func clipN(s string, n int) string {
	k := 0
	for i := range s {
		if k == n {
			return s[:i] + "…"
		}
		k++
	}
	return s
}
