package profile

import (
	"errors"
	"io/fs"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestReadCSVPerProfile reads small per-profile tables held in memory.
func TestReadCSVPerProfile(t *testing.T) {
	tests := []struct {
		name, in      string
		id            string
		depth, value  []float64
		sigma         []float64
		quantity, vu  string
		temp, time, L float64
	}{
		{name: "plain.csv", in: "depth_mm,C_wt%\n0.1,0.8\n0.2,0.7\n",
			id: "plain", depth: []float64{1e-4, 2e-4}, value: []float64{0.8, 0.7}, quantity: "C", vu: "wt%"},
		{name: "dir/meta.csv", in: "# ID: S-1\n# Temperature: 1198 K\n# time: 3600 s\n# thickness: 800 µm\ndepth (mm),HV0.5\n0.1,700\n",
			id: "S-1", depth: []float64{1e-4}, value: []float64{700}, quantity: "hardness", vu: "HV0.5",
			temp: 1198, time: 3600, L: 800e-6},
		{name: "x.txt", in: "Depth_mil\thardness_HV\tsigma\n1\t700\t5\n",
			id: "x", depth: []float64{25.4e-6}, value: []float64{700}, sigma: []float64{5}, quantity: "hardness", vu: "HV"},
		{name: "semi.csv", in: "distance [um];carbon (wt.%)\n10;0,9\n",
			id: "semi", depth: []float64{1e-5}, value: []float64{0.9}, quantity: "C", vu: "wt%"},
		{name: "neg.csv", in: "depth_mm,delta_value\n0.1,-0.3\n",
			id: "neg", depth: []float64{1e-4}, value: []float64{-0.3}, quantity: "delta_value"},
		{name: "ppm.csv", in: "depth_um,N (ppm)\n0,120\n",
			id: "ppm", depth: []float64{0}, value: []float64{120}, quantity: "N", vu: "ppm"},
		{name: "hrc.csv", in: "depth_mm,HRC\n0.5,60\n",
			id: "hrc", depth: []float64{5e-4}, value: []float64{60}, quantity: "hardness", vu: "HRC"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			ps, err := ReadCSV(strings.NewReader(tt.in), tt.name)
			if err != nil {
				t.Fatal(err)
			}
			if len(ps) != 1 {
				t.Fatalf("%d profiles", len(ps))
			}
			p := ps[0]
			if p.ID != tt.id || p.Source != tt.name || p.Quantity != tt.quantity || p.ValueUnit != tt.vu {
				t.Errorf("got id %q source %q quantity %q unit %q", p.ID, p.Source, p.Quantity, p.ValueUnit)
			}
			if !sameFloats(p.Depth, tt.depth) || !sameFloats(p.Value, tt.value) || !sameFloats(p.Sigma, tt.sigma) {
				t.Errorf("depth %v value %v sigma %v", p.Depth, p.Value, p.Sigma)
			}
			if !near(p.Temperature, tt.temp, 1e-15) || p.Time != tt.time || !near(p.Thickness, tt.L, 1e-15) {
				t.Errorf("T %v t %v L %v", p.Temperature, p.Time, p.Thickness)
			}
		})
	}
}

func sameFloats(a, b []float64) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if !near(a[i], b[i], 1e-15) {
			return false
		}
	}
	return true
}

// TestReadCSVErrors checks kind, line and wording of errors from in-memory tables.
func TestReadCSVErrors(t *testing.T) {
	tests := []struct {
		in   string
		kind error
		line int
		frag string
	}{
		{"depth_mm,C_wt%\n0.1,0.8,0.3\n", ErrColumn, 2, "3 cells"},
		{"depth_mm,,C_wt%\n0.1,x,0.8\n", ErrColumn, 2, "without a header"},
		{"depth_mm,,C_wt%\n0.1,,0.8\n", nil, 0, ""}, // blank column under blank header is fine
		{"depth_mm,C_wt%\n\"0.1,0.8\n", ErrFormat, 2, "quote"},
		{"depth_mm,temperature,C_wt%\n0.1,925,0.8\n", ErrUnit, 1, "no unit"},
		{"depth_mm,temperature_X,C_wt%\n0.1,925,0.8\n", ErrUnit, 1, "unknown temperature unit"},
		{"depth_mm,T_C,t_h,C_wt%\n0.1,925,4,0.8\n0.2,925,5,0.7\n", ErrValue, 3, "time \"5\""},
		{"# temperature: 925 C\ndepth_mm,temperature_C,C_wt%\n0.1,930,0.8\n", ErrMetadata, 3, "disagrees"},
		{"# temperature: 925 C\ndepth_mm,temperature_C,C_wt%\n0.1,925,0.8\n", nil, 0, ""},
		{"# lot: L1\nid,lot,depth_mm,C_wt%\nA,L2,0.1,0.8\n", ErrMetadata, 3, "disagrees"},
		{"# id: A\nid,depth_mm,C_wt%\nA,0.1,0.8\n", ErrMetadata, 1, "id column"},
		{"depth_mm,C_wt%,sigma,sigma_wt%\n0.1,0.8,0.1,0.1\n", ErrColumn, 1, "two sigma columns"},
		{"depth_mm,distance_mm,C_wt%\n0.1,0.1,0.8\n", ErrColumn, 1, "two depth columns"},
		{"depth_mm\n", ErrColumn, 1, "only one column"},
		{"depth_mm,note\n0.1,x\n", ErrNumber, 2, "\"x\" is not a number"},
		{"depth_mm,a,b\n0.1,x,y\n", ErrColumn, 2, "holds a number"},
		{"id,depth_mm\nA,0.1\n", ErrColumn, 1, "no column for the measured value"},
		{"depth_mm,C_wt%\n0.1,1e400\n", ErrNumber, 2, "finite"},
		{"depth_mm,C_wt%\n0,1,0,8\n", ErrColumn, 2, "decimal comma"},
		{"depth_mm,C_wt%\n\"0,1\",0.8\n", ErrNumber, 2, "decimal"},
		{"# thickness: 0 mm\ndepth_mm,C_wt%\n0.1,0.8\n", ErrValue, 1, "zero"},
		{"# temperature_sigma: -3 K\ndepth_mm,C_wt%\n0.1,0.8\n", ErrValue, 1, "negative"},
		{"\xff\xfed\x00", ErrColumn, 1, "one column"},
		{"PK\x03\x04rest", ErrFormat, 0, "zip"},
		{"0.1,0.8\n0.2,0.7\n", ErrColumn, 1, "the first row holds numbers"},
		{"Carbon profile A3\ndepth_mm,C_wt%\n0.1,0.8\n", ErrColumn, 1, "title line"},
		{"id,depth_mm,C_wt%\nA\xe9,0.1,0.8\nA\xe9,0.2,x\n", ErrNumber, 3, "not a number"},
	}
	for _, tt := range tests {
		_, err := ReadCSV(strings.NewReader(tt.in), "t.csv")
		if tt.kind == nil {
			if err != nil {
				t.Errorf("%q: unexpected %v", tt.in, err)
			}
			continue
		}
		var e *Error
		if !errors.As(err, &e) || !errors.Is(err, tt.kind) || e.Line != tt.line || !strings.Contains(err.Error(), tt.frag) {
			t.Errorf("%q:\n got %v (line %d)\nwant %v at line %d with %q", tt.in, err, lineOf(e), tt.kind, tt.line, tt.frag)
		}
	}
}

func lineOf(e *Error) int {
	if e == nil {
		return -1
	}
	return e.Line
}

// TestLongTable: grouping, order of first appearance, text columns in Meta,
// per-profile columns, blanks allowed in per-profile columns.
func TestLongTable(t *testing.T) {
	in := "# material: 16MnCr5\n" +
		"Specimen,depth_um,temperature_F,time_min,temperature_sigma_C,thickness_mm,lot,furnace,C_wt%,sigma\n" +
		"B,100,1700,90,3,10,L2,F1,0.7,0.01\n" +
		"A,100,1650,90,,10,L1,F2,0.6,0.01\n" +
		"B,200,,,,,L2,F1,0.5,0.02\n"
	ps, err := ReadCSV(strings.NewReader(in), "campaign.csv")
	if err != nil {
		t.Fatal(err)
	}
	if len(ps) != 2 || ps[0].ID != "B" || ps[1].ID != "A" {
		t.Fatalf("profiles %d, ids %v", len(ps), []string{ps[0].ID})
	}
	b := ps[0]
	if !near(b.Temperature, (1700-32)*5.0/9+273.15, 1e-15) || b.Time != 5400 || b.TemperatureSigma != 3 ||
		b.Thickness != 0.01 || b.Lot != "L2" || b.Material != "16MnCr5" || b.Meta["furnace"] != "F1" {
		t.Errorf("B: %+v", b)
	}
	if !sameFloats(b.Depth, []float64{1e-4, 2e-4}) || !sameFloats(b.Sigma, []float64{0.01, 0.02}) ||
		b.Line[0] != 3 || b.Line[1] != 5 {
		t.Errorf("B points: %v %v %v", b.Depth, b.Sigma, b.Line)
	}
	if a := ps[1]; a.TemperatureSigma != 0 || a.Lot != "L1" || a.Meta["furnace"] != "F2" || a.Len() != 1 {
		t.Errorf("A: %+v", a)
	}
	// Latin-1 text (spreadsheet exports on Windows) becomes UTF-8.
	ps, err = ReadCSV(strings.NewReader("id;depth_mm;Ofen;C_wt%\nA\xb5;0,1;\xd6l;0,8\n"), "latin1.csv")
	if err != nil || ps[0].ID != "Aµ" || ps[0].Meta["ofen"] != "Öl" {
		t.Errorf("latin-1: %+v, %v", ps, err)
	}
}

func TestParseMetaLine(t *testing.T) {
	tests := []struct {
		in, key, value string
		ok             bool
	}{
		{"# temperature: 925 C", "temperature", "925 C", true},
		{"#id:A3", "id", "A3", true},
		{"## Lot : L 1 ", "Lot", "L 1", true},
		{"# temperature (°C): 925", "temperature (°C)", "925", true},
		{"# time: 4:30", "time", "4:30", true},
		{"# a plain comment", "", "", false},
		{"# see http://example.org", "", "", false},
		{"# : nothing", "", "", false},
		{"# 1st: x", "", "", false},
		{"temperature: 925 C", "", "", false},
	}
	for _, tt := range tests {
		k, v, ok := parseMetaLine(tt.in)
		if k != tt.key || v != tt.value || ok != tt.ok {
			t.Errorf("parseMetaLine(%q) = %q, %q, %v", tt.in, k, v, ok)
		}
	}
}

func TestClassify(t *testing.T) {
	tests := []struct {
		h        string
		kind     colKind
		quantity string
		unit     string
	}{
		{"depth_um", colDepth, "", ""}, {"depth_µm", colDepth, "", ""}, {"depth (mm)", colDepth, "", ""},
		{"depth [in]", colDepth, "", ""}, {"Depth_mil", colDepth, "", ""}, {"Distance/mm", colDepth, "", ""},
		{"C_wt%", colUnknown, "C", "wt%"}, {"N_at%", colUnknown, "N", "at%"}, {"HV0.5", colUnknown, "hardness", "HV0.5"},
		{"HV 0,5", colUnknown, "hardness", "HV0.5"}, {"hardness_HV", colUnknown, "hardness", "HV"},
		{"carbon (wt%)", colUnknown, "C", "wt%"}, {"HK0.1", colUnknown, "hardness", "HK0.1"},
		{"value", colUnknown, "", ""}, {"C_corr", colUnknown, "C_corr", ""},
		{"T_K", colTemp, "", ""}, {"t_h", colTime, "", ""}, {"temp_F", colTemp, "", ""}, {"elapsed_min", colTime, "", ""},
		{"Specimen", colID, "", ""}, {"profile", colID, "", ""}, {"LOT", colLot, "", ""}, {"sigma", colSigma, "", ""},
		{"temperature_sigma_K", colTempSigma, "", ""}, {"thickness_in", colThickness, "", ""}, {"", colIgnore, "", ""},
	}
	for _, tt := range tests {
		c, err := classify(tt.h)
		if err != nil || c.kind != tt.kind || c.quantity != tt.quantity || c.valueUnit != tt.unit {
			t.Errorf("classify(%q) = kind %d q %q u %q, %v", tt.h, c.kind, c.quantity, c.valueUnit, err)
		}
	}
	for _, bad := range []string{"depth", "depth_ft", "time", "temperature", "thickness", "time_weeks", "t_X"} {
		if _, err := classify(bad); !errors.Is(err, ErrUnit) {
			t.Errorf("classify(%q) = %v, want ErrUnit", bad, err)
		}
	}
}

func TestSniffSeparator(t *testing.T) {
	for in, want := range map[string]rune{
		"a,b,c": ',', "a;b;c": ';', "a\tb": '\t', `"a,b";c`: ';', "a;b,c": ';', "a": ',',
	} {
		if got := sniffSeparator(in); got != want {
			t.Errorf("sniffSeparator(%q) = %q, want %q", in, got, want)
		}
	}
}

// TestReadAll: folders expand to their readable files in name order,
// skipping hidden and lock files; ids must be unique across files.
func TestReadAll(t *testing.T) {
	dir := t.TempDir()
	write := func(name, s string) {
		t.Helper()
		if err := os.WriteFile(filepath.Join(dir, name), []byte(s), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	write("b.csv", "depth_mm,C_wt%\n0.1,0.8\n")
	write("a.tsv", "depth_mm\tC_wt%\n0.1\t0.8\n")
	write(".hidden.csv", "garbage")
	write("~$book.xlsx", "lock")
	write("notes.md", "not data")
	if err := os.Mkdir(filepath.Join(dir, "sub"), 0o755); err != nil {
		t.Fatal(err)
	}
	ps, err := ReadAll([]string{dir})
	if err != nil {
		t.Fatal(err)
	}
	if len(ps) != 2 || ps[0].ID != "a" || ps[1].ID != "b" {
		t.Fatalf("got %d profiles: %+v", len(ps), ps)
	}
	if ps2, err := Read(dir); err != nil || len(ps2) != 2 {
		t.Errorf("Read(folder): %d, %v", len(ps2), err)
	}
	write("c.csv", "# id: a\ndepth_mm,C_wt%\n0.1,0.8\n")
	_, err = ReadAll([]string{dir})
	if !errors.Is(err, ErrDuplicate) || !strings.Contains(err.Error(), "a.tsv") || !strings.Contains(err.Error(), "c.csv") {
		t.Errorf("duplicate ids: %v", err)
	}
	_, err = ReadAll([]string{filepath.Join(dir, "missing.csv")})
	if !errors.Is(err, fs.ErrNotExist) || !errors.Is(err, ErrOpen) {
		t.Errorf("missing file: %v", err)
	}
	_, err = ReadAll([]string{filepath.Join(dir, "sub")})
	if !errors.Is(err, ErrNoData) {
		t.Errorf("empty folder: %v", err)
	}
}

// TestValidate checks the invariants on hand-built profiles.
func TestValidate(t *testing.T) {
	good := Profile{ID: "g", Source: "book.xlsx:S1", Depth: []float64{0, 1e-4}, Value: []float64{1, -1}, Line: []int{2, 3}}
	if err := good.Validate(); err != nil {
		t.Fatal(err)
	}
	mut := []struct {
		f    func(p *Profile)
		kind error
	}{
		{func(p *Profile) { p.Depth, p.Value, p.Line = nil, nil, nil }, ErrNoData},
		{func(p *Profile) { p.Value = p.Value[:1] }, ErrValue},
		{func(p *Profile) { p.Depth[1] = -1e-4 }, ErrValue},
		{func(p *Profile) { p.Value[0] = nan() }, ErrNumber},
		{func(p *Profile) { p.Sigma = []float64{1, 0} }, ErrValue},
		{func(p *Profile) { p.Temperature = -1 }, ErrValue},
		{func(p *Profile) { p.Thickness = 5e-5 }, ErrValue},
	}
	for i, m := range mut {
		p := good
		p.Depth, p.Value = append([]float64(nil), good.Depth...), append([]float64(nil), good.Value...)
		m.f(&p)
		err := p.Validate()
		var e *Error
		if !errors.As(err, &e) || !errors.Is(err, m.kind) || e.File != "book.xlsx" || e.Sheet != "S1" {
			t.Errorf("case %d: %v", i, err)
		}
	}
}

func nan() float64 { var z float64; return z / z }

// TestPositionAcrossCouple: a position column (a couple's profile across its
// interface) may hold negative values; a depth column may not.
func TestPositionAcrossCouple(t *testing.T) {
	ps, err := ReadCSV(strings.NewReader("position_um,Ni_at%\n-200,99.1\n-100,95\n0,50\n100,5\n200,0.2\n"), "couple.csv")
	if err != nil {
		t.Fatal(err)
	}
	if !ps[0].Across || ps[0].Depth[0] != -2e-4 {
		t.Errorf("Across %v, depth %v", ps[0].Across, ps[0].Depth)
	}
	if _, err := ReadCSV(strings.NewReader("depth_um,Ni_at%\n-200,99.1\n-100,95\n0,50\n"), "neg.csv"); err == nil {
		t.Error("negative depth accepted")
	}
}

// TestShortEcho: a message quotes at most maxEcho characters of a cell, a
// header or a name, with an ellipsis (common practice, no source).
func TestShortEcho(t *testing.T) {
	long := strings.Repeat("k", 5000)
	for _, tc := range []struct{ name, text string }{
		{"cell", "depth_mm,C_wt%\n0.1," + long + "\n"},
		{"one-column header", long + "\n0.1\n"},
		{"unit", "depth_" + long + ",C_wt%\n0.1,0.8\n"},
		{"metadata", "# temperature: 925 " + long + "\ndepth_mm,C_wt%\n0.1,0.8\n"},
		{"per-profile cell", "profile,lot,depth_mm,C_wt%\nA,L1,0.1,0.8\nA," + long + ",0.2,0.7\n"},
		{"id", "# id: " + long + "\n# thickness: 1 mm\ndepth_mm,C_wt%\n1.5,0.8\n"},
		{"header without depth", "x" + long + ",C_wt%\n0.1,0.8\n"},
	} {
		_, err := ReadCSV(strings.NewReader(tc.text), "e.csv")
		if err == nil {
			t.Errorf("%s: no error", tc.name)
			continue
		}
		if msg := err.Error(); len(msg) > 400 || !strings.Contains(msg, "kkkk…") {
			t.Errorf("%s: message of %d bytes: %.300s", tc.name, len(msg), msg)
		}
	}
	if got := quote("µµµµµµµµµµµµµµµµµµµµµµµµµµµµµµµµµµµµµµµµµµ"); got != `"`+strings.Repeat("µ", maxEcho)+`…"` {
		t.Errorf("quote cuts by bytes, not characters: %s", got)
	}
}
