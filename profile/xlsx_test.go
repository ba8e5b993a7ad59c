package profile

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/xuri/excelize/v2"
)

// workbook builds an in-memory workbook from sheets of rows (cells are
// written as given: float64 as numbers, string as text).
func workbook(t testing.TB, sheets []string, rows map[string][][]any, hidden ...string) []byte {
	t.Helper()
	f := excelize.NewFile()
	defer f.Close()
	for i, name := range sheets {
		if i == 0 {
			if err := f.SetSheetName("Sheet1", name); err != nil {
				t.Fatal(err)
			}
		} else if _, err := f.NewSheet(name); err != nil {
			t.Fatal(err)
		}
		for r, row := range rows[name] {
			cell, _ := excelize.CoordinatesToCellName(1, r+1)
			if err := f.SetSheetRow(name, cell, &row); err != nil {
				t.Fatal(err)
			}
		}
	}
	for _, h := range hidden {
		if err := f.SetSheetVisible(h, false); err != nil {
			t.Fatal(err)
		}
	}
	buf, err := f.WriteToBuffer()
	if err != nil {
		t.Fatal(err)
	}
	return buf.Bytes()
}

func TestXLSXLayouts(t *testing.T) {
	data := workbook(t, []string{"A3", "notes", "long", "scratch"}, map[string][][]any{
		"A3": {
			{"Case-hardened coupon"},
			{"temperature:", "925 C"},
			{"time_h", 4.0},
			{"thickness: 0,5 in"},
			{"material", "18CrNiMo7-6"},
			{},
			{"depth_um", "C_wt%", "sigma"},
			{50.0, 0.85, "0,02"},
			{},
			{"100", "0,80", 0.02},
		},
		"notes": {{"some text"}, {"more: text"}},
		"long": {
			{"ID", "temperature_K", "time_min", "depth_mm", "N_wt%"},
			{"L-2", 843.0, 600.0, 0.05, 0.4},
			{"L-1", 853.0, 600.0, 0.05, 0.5},
			{"L-2", 843.0, 600.0, 0.1, 0.3},
		},
		"scratch": {{"depth_mm", "C_wt%"}, {"broken", "x"}},
	}, "scratch")
	ps, err := readXLSXBytes(data, "book.xlsx")
	if err != nil {
		t.Fatal(err)
	}
	if len(ps) != 3 || ps[0].ID != "A3" || ps[1].ID != "L-2" || ps[2].ID != "L-1" {
		t.Fatalf("got %d profiles", len(ps))
	}
	a := ps[0]
	if a.Source != "book.xlsx:A3" || a.Temperature != 1198.15 || a.Time != 14400 || !near(a.Thickness, 0.0127, 1e-15) ||
		a.Material != "18CrNiMo7-6" || !sameFloats(a.Depth, []float64{5e-5, 1e-4}) ||
		!sameFloats(a.Value, []float64{0.85, 0.8}) || !sameFloats(a.Sigma, []float64{0.02, 0.02}) ||
		a.Line[0] != 8 || a.Line[1] != 10 {
		t.Errorf("A3: %+v", a)
	}
	if l := ps[1]; l.Temperature != 843 || l.Time != 36000 || l.Quantity != "N" || !sameFloats(l.Depth, []float64{5e-5, 1e-4}) ||
		l.Source != "book.xlsx:long" {
		t.Errorf("L-2: %+v", l)
	}
}

func TestXLSXErrors(t *testing.T) {
	tests := []struct {
		rows [][]any
		kind error
		cell string
		frag string
	}{
		{[][]any{{"depth_mm", "C_wt%"}, {0.1, "#DIV/0!"}}, ErrNumber, "cell B2", "not a number"},
		{[][]any{{"depth_mm", "C_wt%"}, {-0.1, 0.5}}, ErrValue, "cell A2", "negative"},
		{[][]any{{"temperature", 925.0}, {"depth_mm", "C_wt%"}, {0.1, 0.5}}, ErrUnit, "cell B1", "no unit"},
		{[][]any{{"temperature", "-300 C"}, {"depth_mm", "C_wt%"}, {0.1, 0.5}}, ErrValue, "cell B1", "absolute zero"},
		{[][]any{{"time", "4 h"}, {"time", "5 h"}, {"depth_mm", "C_wt%"}, {0.1, 0.5}}, ErrMetadata, "cell B2", "twice"},
		{[][]any{{"depth", "C_wt%"}, {0.1, 0.5}}, ErrUnit, "cell A1", "no unit"},
		{[][]any{{"depth_mm", "C_wt%"}}, ErrNoData, "row 1", "no data rows"},
		{[][]any{{"temperature", "925 C"}}, ErrNoData, "cell B1", "no header row"},
		{[][]any{{"depth_mm", "C_wt%"}, {0.1, 0.5, 7.0}}, ErrColumn, "cell C2", "cells but the header"},
	}
	for i, tt := range tests {
		data := workbook(t, []string{"S"}, map[string][][]any{"S": tt.rows})
		_, err := readXLSXBytes(data, "w.xlsx")
		var e *Error
		if !errors.As(err, &e) || !errors.Is(err, tt.kind) || e.Sheet != "S" ||
			!strings.Contains(err.Error(), `w.xlsx [Sheet "S"] `+tt.cell) || !strings.Contains(err.Error(), tt.frag) {
			t.Errorf("case %d: got %v; want %v at %s with %q", i, err, tt.kind, tt.cell, tt.frag)
		}
	}
	// Only a notes sheet: nothing to read.
	data := workbook(t, []string{"notes"}, map[string][][]any{"notes": {{"text"}}})
	if _, err := readXLSXBytes(data, "w.xlsx"); !errors.Is(err, ErrNoData) {
		t.Errorf("notes only: %v", err)
	}
}

// TestXLSXFiles reads the committed example workbook and the bomb.
func TestXLSXFiles(t *testing.T) {
	ps, err := Read(filepath.Join("..", "testdata", "profile", "campaign.xlsx"))
	if err != nil {
		t.Fatal(err)
	}
	ids := make([]string, len(ps))
	for i, p := range ps {
		ids[i] = p.ID
	}
	if strings.Join(ids, " ") != "A3 B1 C1 C2" {
		t.Errorf("ids %v (hidden Scratch sheet and Notes must be skipped)", ids)
	}
	if b1 := ps[1]; b1.Temperature != 1173.15 || b1.Time != 14400 || b1.Lot != "L2" || b1.Value[0] != 0.842 {
		t.Errorf("B1: %+v", b1)
	}
	bomb, err := os.ReadFile(filepath.Join("..", "testdata", "bad", "zipbomb.xlsx"))
	if err != nil {
		t.Fatal(err)
	}
	if len(bomb) > 64<<10 {
		t.Errorf("committed bomb is %d bytes; keep it small", len(bomb))
	}
	if _, err := readXLSXBytes(bomb, "bomb.xlsx"); !errors.Is(err, ErrTooLarge) {
		t.Errorf("bomb: %v", err)
	}
	if _, err := readXLSXBytes(nil, "nil.xlsx"); !errors.Is(err, ErrFormat) {
		t.Errorf("empty workbook bytes: %v", err)
	}
}
