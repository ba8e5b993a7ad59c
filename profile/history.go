package profile

import (
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"
)

// History is a furnace or service log: temperature against time.
type History struct {
	Source string
	Time   []float64 // s from the start of the log, strictly increasing
	Temp   []float64 // K
	Line   []int     // 1-based source line of each row
	// Meta holds the "# key: value" metadata lines (keys lower-case).
	Meta map[string]string
}

// Len returns the number of rows.
func (h *History) Len() int { return len(h.Time) }

// ReadHistory reads a furnace or service log from a CSV file (.csv, .tsv
// or .txt, opened read-only); see ReadHistoryCSV for the format.
func ReadHistory(path string) (*History, error) {
	switch strings.ToLower(filepath.Ext(path)) {
	case ".csv", ".tsv", ".txt":
	default:
		return nil, &Error{File: path, Err: errorf(ErrFormat, "a temperature history is read from a text table, not %s",
			quote(filepath.Ext(path))), Hint: "export the log as CSV with columns such as time_h and temperature_C"}
	}
	f, err := os.Open(path)
	if err != nil {
		return nil, openError(path, err)
	}
	defer f.Close()
	return ReadHistoryCSV(f, path)
}

// ReadHistoryCSV reads a temperature history: optional "# key: value"
// lines, a header with one time column (time_h, time_min, time_s,
// elapsed_h, t_h…: elapsed time, the unit in the header) and one
// temperature column (temperature_C, temp_F, T_K…), then one row per
// reading. Other columns (set points, atmosphere…) are ignored. Time must
// increase strictly, temperatures be above 0 K, and there must be at
// least 2 rows. Clock times and dates are not read.
func ReadHistoryCSV(r io.Reader, name string) (*History, error) {
	tr, err := openText(r, name)
	if err != nil {
		return nil, err
	}
	h := &History{Source: name}
	for _, e := range tr.meta.entries {
		if h.Meta == nil {
			h.Meta = map[string]string{}
		}
		h.Meta[strings.ToLower(e.key)] = e.value
	}
	ti, tc, err := historyColumns(tr)
	if err != nil {
		return nil, err
	}
	if err := h.readRows(tr, ti, tc); err != nil {
		return nil, err
	}
	if len(h.Time) < 2 {
		return nil, tr.org.errAt(tr.headerLine, -1, "", errorf(ErrNoData,
			"the history has %d row(s); at least 2 are needed", len(h.Time)),
			"give the temperature at two or more times")
	}
	return h, nil
}

// histColumn is a classified header cell and its position.
type histColumn struct {
	column
	idx int
}

// historyColumns finds the time and temperature columns.
func historyColumns(tr *textReader) (time, temp histColumn, err error) {
	time.idx, temp.idx = -1, -1
	for i, hd := range tr.header {
		c, cerr := classify(hd)
		if c.kind != colTime && c.kind != colTemp {
			continue
		}
		if cerr != nil {
			return time, temp, tr.org.errAt(tr.headerLine, i, c.name, cerr, unitHint(c.kind))
		}
		dst := &time
		if c.kind == colTemp {
			dst = &temp
		}
		if dst.idx >= 0 {
			return time, temp, tr.org.errAt(tr.headerLine, i, c.name, errorf(ErrColumn,
				"two %s columns, %s and %s", c.kind.describe(), quote(dst.name), quote(c.name)), "keep one of them")
		}
		*dst = histColumn{c, i}
	}
	if time.idx < 0 || temp.idx < 0 {
		return time, temp, tr.org.errAt(tr.headerLine, -1, "", errorf(ErrColumn,
			"a temperature history needs a time column and a temperature column"),
			"name them with their units, e.g. time_h and temperature_C")
	}
	return time, temp, nil
}

// readRows reads the (time, temperature) rows.
func (h *History) readRows(tr *textReader, ti, tc histColumn) error {
	for {
		rec, line, err := tr.next()
		if err == io.EOF {
			return tr.finishMarks()
		}
		if err != nil {
			return err
		}
		if blankRow(rec) {
			continue
		}
		t, err := histNumber(tr, rec, ti, line)
		if err != nil {
			return err
		}
		v, err := histNumber(tr, rec, tc, line)
		if err != nil {
			return err
		}
		t, k := ti.size.si(t), tc.scale.ToKelvin(v)
		if math.Abs(t) > maxSeconds {
			return tr.org.errAt(line, ti.idx, ti.name, errorf(ErrValue, "time %s is longer than 1e10 s (317 years)",
				clip(cellAt(rec, ti.idx))), "fix the cell or remove the row")
		}
		if err := checkKelvin(k, clip(cellAt(rec, tc.idx))); err != nil {
			return tr.org.errAt(line, tc.idx, tc.name, err, "fix the cell or remove the row")
		}
		if n := len(h.Time); n > 0 && !(t > h.Time[n-1]) {
			return tr.org.errAt(line, ti.idx, ti.name, errorf(ErrValue,
				"time %s does not increase (line %d has %s)", clip(strings.TrimSpace(rec[ti.idx])), h.Line[n-1],
				fmtNum(h.Time[n-1]/ti.size.factor())), "sort the log by time and remove repeated times")
		}
		h.Time, h.Temp, h.Line = append(h.Time, t), append(h.Temp, k), append(h.Line, line)
	}
}

// histNumber reads a number cell of a history row.
func histNumber(tr *textReader, rec []string, c histColumn, line int) (float64, error) {
	s := cellAt(rec, c.idx)
	v, err := parseNumber(s, tr.comma)
	if err == nil {
		return v, tr.noteMark(s, line, c.idx, c.name)
	}
	hint := "fix the cell or remove the row"
	if c.kind == colTime && strings.ContainsAny(s, ":-/T") && len(s) > 4 {
		hint = "clock times and dates are not read: give the elapsed time as a number, e.g. in a column time_h"
	}
	return 0, tr.org.errAt(line, c.idx, c.name, err, hint)
}
