package profile

import (
	"encoding/csv"
	"errors"
	"io"
	"math"
	"os"
	"strconv"
	"strings"
)

// diffusivityUnits are the accepted units of a D column, in m²/s per unit.
var diffusivityUnits = map[string]float64{
	"m2/s": 1, "m2_s": 1, "m^2/s": 1, "m²/s": 1,
	"cm2/s": 1e-4, "cm2_s": 1e-4, "cm^2/s": 1e-4, "cm²/s": 1e-4,
	"um2/s": 1e-12, "um2_s": 1e-12, "µm2/s": 1e-12, "µm²/s": 1e-12, "μm²/s": 1e-12,
}

// ReadDiffusivityTable reads a table of D against concentration for the
// numerical model's tabulated D(C): a CSV with a concentration column (any
// name, e.g. C_wt%) and a D column whose header carries its unit (D_m2/s,
// D_cm2/s, "D (µm²/s)"). Concentrations must increase strictly and D be
// positive. It returns concentrations in the file's unit and D in m²/s.
func ReadDiffusivityTable(path string) (conc, d []float64, err error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, nil, &Error{File: path, Err: errorf(ErrOpen, "%v", err), Hint: "check the path"}
	}
	defer f.Close()
	return ReadDiffusivityTableCSV(f, path)
}

// ReadDiffusivityTableCSV reads a D(C) table from r; name is used in errors.
func ReadDiffusivityTableCSV(r io.Reader, name string) (conc, d []float64, err error) {
	fail := func(line int, col string, e error, hint string) error {
		return &Error{File: name, Line: line, Column: col, Err: e, Hint: hint}
	}
	cr := csv.NewReader(r)
	cr.Comment = '#'
	cr.FieldsPerRecord = -1
	cr.TrimLeadingSpace = true
	var cCol, dCol = -1, -1
	var dFactor float64
	var header []string
	for {
		rec, rerr := cr.Read()
		if errors.Is(rerr, io.EOF) {
			break
		}
		line, _ := cr.FieldPos(0)
		if rerr != nil {
			return nil, nil, fail(line, "", errorf(ErrFormat, "%v", rerr), "write the table as comma-separated values")
		}
		if header == nil {
			header = rec
			for i, h := range rec {
				h = strings.TrimSpace(strings.TrimPrefix(h, "\ufeff"))
				root, unit := splitHeader(h)
				if strings.EqualFold(root, "D") {
					f, ok := diffusivityUnits[strings.ToLower(strings.ReplaceAll(unit, " ", ""))]
					if !ok {
						return nil, nil, fail(line, h, errorf(ErrUnit, "the D column %s has no known unit", quote(h)), "name it D_m2/s, D_cm2/s or D_um2/s")
					}
					dCol, dFactor = i, f
				} else if cCol < 0 {
					cCol = i
				}
			}
			if dCol < 0 || cCol < 0 {
				return nil, nil, fail(line, "", errorf(ErrColumn, "the table needs a concentration column and a D column"), "write a header such as C_wt%,D_m2/s")
			}
			continue
		}
		if len(rec) <= dCol || len(rec) <= cCol {
			return nil, nil, fail(line, "", errorf(ErrColumn, "the row has %d cells", len(rec)), "give a concentration and a D on every row")
		}
		c, e1 := strconv.ParseFloat(strings.TrimSpace(rec[cCol]), 64)
		v, e2 := strconv.ParseFloat(strings.TrimSpace(rec[dCol]), 64)
		if e1 != nil || math.IsNaN(c) || math.IsInf(c, 0) {
			return nil, nil, fail(line, header[cCol], errorf(ErrNumber, "%s is not a number", quote(rec[cCol])), "fix the cell")
		}
		if e2 != nil || !(v > 0) || math.IsInf(v, 0) {
			return nil, nil, fail(line, header[dCol], errorf(ErrValue, "D %s is not a positive number", quote(rec[dCol])), "D must be positive")
		}
		if err := checkMeasured(c, "concentration", clip(strings.TrimSpace(rec[cCol]))); err != nil {
			return nil, nil, fail(line, header[cCol], err, "fix the cell")
		}
		if dd := v * dFactor; dd > maxDiffusivity || dd < minDiffusivity {
			return nil, nil, fail(line, header[dCol], errorf(ErrValue, "D %s is %s m²/s, outside %g–%g m²/s",
				quote(rec[dCol]), fmtNum(dd), minDiffusivity, maxDiffusivity), "check the number and the unit in the header")
		}
		if n := len(conc); n > 0 && !(c > conc[n-1]) {
			return nil, nil, fail(line, header[cCol], errorf(ErrValue, "concentration %g does not increase", c), "sort the table by concentration and remove repeats")
		}
		conc = append(conc, c)
		d = append(d, v*dFactor)
	}
	if header == nil {
		return nil, nil, fail(0, "", errorf(ErrEmpty, "the D(C) table is empty"), "write a header and at least two rows")
	}
	if len(conc) < 2 {
		return nil, nil, fail(0, "", errorf(ErrNoData, "the D(C) table has %d rows; at least 2 are needed", len(conc)), "add rows")
	}
	return conc, d, nil
}
