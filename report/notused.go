package report

import (
	"bufio"
	"fmt"

	"github.com/fickfit/fickfit/fit"
	"github.com/fickfit/fickfit/profile"
)

// NotUsed is an input a result was computed without (--keep-going): a
// file that could not be read, a profile that could not be fitted, a fit
// that gave no usable point. File, Sheet, Line and Cell say where, ID which
// profile, Reason what is wrong and what to do.
type NotUsed struct {
	File   string `json:"file,omitempty"`
	Sheet  string `json:"sheet,omitempty"`
	Line   int    `json:"line,omitempty"`
	Cell   string `json:"cell,omitempty"`
	ID     string `json:"id,omitempty"`
	Reason string `json:"reason"`
}

// NotUsedFromSkipped lists files (or profiles) the reader left out.
func NotUsedFromSkipped(ss []profile.Skipped) []NotUsed {
	var out []NotUsed
	for _, s := range ss {
		out = append(out, NotUsed{File: s.File, Sheet: s.Sheet, Line: s.Line, Cell: s.Cell, ID: s.ID, Reason: s.Reason})
	}
	return out
}

// NotUsedFromFailures lists profiles that gave no fit.
func NotUsedFromFailures(fs []fit.Failure) []NotUsed {
	var out []NotUsed
	for _, f := range fs {
		out = append(out, NotUsed{File: f.Source, ID: f.ID, Reason: f.Error})
	}
	return out
}

// where says where an input left out is: "A3 (coupons/A3.csv:14)".
func (n NotUsed) where() string {
	pos := n.File
	switch {
	case n.Sheet != "" && n.Cell != "":
		pos += fmt.Sprintf(" [Sheet %q] cell %s", n.Sheet, n.Cell)
	case n.Sheet != "" && n.Line > 0:
		pos += fmt.Sprintf(" [Sheet %q] row %d", n.Sheet, n.Line)
	case n.Sheet != "":
		pos += fmt.Sprintf(" [Sheet %q]", n.Sheet)
	case n.Line > 0:
		pos += fmt.Sprintf(":%d", n.Line)
	}
	switch {
	case n.ID != "" && pos != "":
		return n.ID + " (" + pos + ")"
	case n.ID != "":
		return n.ID
	}
	return pos
}

// writeNotUsedText writes the list under a heading; nothing when empty.
func writeNotUsedText(w *bufio.Writer, head string, ns []NotUsed, width int) {
	if len(ns) == 0 {
		return
	}
	w.WriteString("\n" + head + "\n")
	for _, n := range ns {
		writeWrapped(w, "  "+n.where()+": ", n.Reason, width)
	}
}

// viewNotUsedCSV writes the table not_used; nothing when empty.
func viewNotUsedCSV(c *viewCSV, ns []NotUsed) {
	if len(ns) == 0 {
		return
	}
	c.table("not_used", "file", "sheet", "line", "cell", "id", "reason")
	for _, n := range ns {
		line := ""
		if n.Line > 0 {
			line = viewInt(n.Line)
		}
		c.add("not_used", n.File, n.Sheet, line, n.Cell, n.ID, n.Reason)
	}
}
