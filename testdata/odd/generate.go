//go:build ignore

// Command generate writes the odd-but-valid catalogue of testdata/odd: each
// file keeps its oddity (byte-order mark, line ends, separators, decimal
// commas, encodings, units…) and holds 10–20 points of a constant-surface
// erf profile
//
//	C(x) = Cs + (C0 − Cs)·erf(x / (2√(Dt)))
//
// with a chosen D, hold time t (or no time: then only the product Dt is
// chosen), Cs and C0, rounded to 4 decimals and without noise (repeated.csv
// measures each depth twice, ±0.001 about the curve, so the pair means lie on
// it). It writes cases.tsv (what the reader must return, value by value) and
// truth.tsv (the generating parameters, fixtures for a self-check of the
// reading path through the fit; invented numbers, not check values).
//
// workbook.xlsx is written by testdata/bad/gen from the same grids and
// parameters (see oddWorkbook there; keep the two in step — TestOddCatalogue
// fails when they drift). Its cases and truth rows are written here.
//
// Run from the module root:
//
//	go run testdata/odd/generate.go
package main

import (
	"fmt"
	"log"
	"math"
	"math/big"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"unicode/utf16"
)

const dir = "testdata/odd"

// Metres per depth unit of the files.
const (
	mm  = 1e-3
	um  = 1e-6
	in  = 0.0254
	mil = 25.4e-6
)

// Depth grids, as written in the files (in the file's unit).
var (
	gridMM  = strings.Fields("0.05 0.1 0.2 0.3 0.4 0.5 0.6 0.8 1.0 1.2 1.5 1.8 2.2 2.6")
	gridUM  = strings.Fields("50 100 200 300 400 500 600 800 1000 1200 1500 1800 2200 2600")
	gridUM2 = strings.Fields("50 100 200 300 400 600 800 1000 1200 1500 1800 2200")
	gridN   = strings.Fields("5 10 20 30 40 50 60 80 100 130 160 200 250 300 400")
	gridIn  = strings.Fields("0.001 0.002 0.004 0.006 0.008 0.010 0.012 0.015 0.018 0.022 0.026 0.030 0.035 0.040 0.050 0.060")
	gridMil = strings.Fields("2 4 8 12 16 20 24 30 36 44 52 60 70 80 100")
	gridRep = strings.Fields("0.05 0.2 0.4 0.6 0.9 1.3 1.8 2.5")
)

// prof is one generated profile.
type prof struct {
	file, id string
	// D in m²/s with t in s; t == 0: no time is given and D is Dt in m².
	D, t   float64
	cs, c0 float64
	scale  float64 // metres per depth unit
}

// value is the rounded model value at depth text d (file unit, '.' decimals).
func (p prof) value(d string) string {
	x := num(d) * p.scale
	dt := p.D
	if p.t > 0 {
		dt *= p.t
	}
	c := p.cs + (p.c0-p.cs)*math.Erf(x/(2*math.Sqrt(dt)))
	return strconv.FormatFloat(c, 'f', 4, 64)
}

func num(s string) float64 {
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		log.Fatal(err)
	}
	return v
}

// exact is the depth text times the scale, rounded once to the nearest
// float64 (the value a careful reader gets, to within an ulp or two).
func exact(d string, scale float64) float64 {
	a, ok1 := new(big.Rat).SetString(d)
	b, ok2 := new(big.Rat).SetString(g(scale))
	if !ok1 || !ok2 {
		log.Fatalf("bad number %q or scale %v", d, scale)
	}
	v, _ := a.Mul(a, b).Float64()
	return v
}

func g(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

// comma writes a number text with a decimal comma.
func comma(s string) string { return strings.Replace(s, ".", ",", 1) }

// row is one cases.tsv row.
type row struct {
	file, id, sheet            string
	T, t, thick, Tsig          string
	quantity, unit, lot        string
	depth, value, sigma, lines []string
	meta                       string
	truth                      prof
}

// point records a point read from line (or row) ln.
func (r *row) point(p prof, d, v string, ln int) {
	r.depth = append(r.depth, g(exact(d, p.scale)))
	r.value = append(r.value, g(num(v)))
	r.lines = append(r.lines, strconv.Itoa(ln))
}

func newRow(p prof, quantity, unit string) *row {
	return &row{file: p.file, id: p.id, sheet: "-", T: "0", t: "0", thick: "0", Tsig: "0",
		quantity: quantity, unit: unit, lot: "-", meta: "-", truth: p}
}

// doc collects text lines and their 1-based numbers.
type doc struct{ lines []string }

func (d *doc) add(s string) int { d.lines = append(d.lines, s); return len(d.lines) }

func (d *doc) text(eol string) string { return strings.Join(d.lines, eol) + eol }

func write(name string, b []byte) {
	if err := os.WriteFile(filepath.Join(dir, name), b, 0o644); err != nil {
		log.Fatal(err)
	}
}

// simple writes a per-profile file: metadata lines, a header, one row per
// depth made by cell(depth, value).
func simple(p prof, grid, meta []string, header string, cell func(i int, d, v string) string, r *row) *doc {
	var d doc
	for _, m := range meta {
		d.add(m)
	}
	d.add(header)
	for i, x := range grid {
		v := p.value(x)
		r.point(p, x, v, d.add(cell(i, x, v)))
	}
	return &d
}

func comma2(sep string) func(int, string, string) string {
	return func(_ int, d, v string) string { return d + sep + v }
}

func main() {
	log.SetFlags(0)
	var rows []*row
	add := func(r *row) { rows = append(rows, r) }

	// bom.csv: UTF-8 byte-order mark; no time, so Dt.
	{
		p := prof{file: "bom.csv", id: "odd-bom", D: 3.6e-7, cs: 0.90, c0: 0.20, scale: mm}
		r := newRow(p, "C", "wt%")
		d := simple(p, gridMM, []string{"# id: odd-bom"}, "depth_mm,C_wt%", comma2(","), r)
		write(p.file, []byte("\ufeff"+d.text("\n")))
		add(r)
	}
	// crlf.csv: CRLF line ends, temperature and time.
	{
		p := prof{file: "crlf.csv", id: "odd-crlf", D: 2.5e-11, t: 14400, cs: 0.85, c0: 0.18, scale: mm}
		r := newRow(p, "C", "wt%")
		r.T, r.t = "1198.15", "14400"
		d := simple(p, gridMM, []string{"# id: odd-crlf", "# temperature: 925 C", "# time: 4 h"}, "depth_mm,C_wt%", comma2(","), r)
		write(p.file, []byte(d.text("\r\n")))
		add(r)
	}
	// cr_only.csv: classic Mac CR-only line ends.
	{
		p := prof{file: "cr_only.csv", id: "odd-cr", D: 2.5e-7, cs: 0.95, c0: 0.22, scale: mm}
		r := newRow(p, "C", "wt%")
		d := simple(p, gridMM, []string{"# id: odd-cr"}, "depth_mm,C_wt%", comma2(","), r)
		write(p.file, []byte(d.text("\r")))
		add(r)
	}
	// quoted.csv: quoted headers and cells, a text column with a comma.
	{
		p := prof{file: "quoted.csv", id: "odd-quoted", D: 4.0e-7, cs: 0.88, c0: 0.15, scale: mm}
		r := newRow(p, "C", "wt%")
		r.meta = "note=edge, polished"
		q := func(s string) string { return `"` + s + `"` }
		d := simple(p, gridMM, []string{"# id: odd-quoted"}, `"depth (mm)","C (wt%)","note"`, func(i int, d, v string) string {
			switch i % 3 {
			case 0:
				return q(d) + "," + q(v) + `,"edge, polished"`
			case 1:
				return d + "," + q(v) + `,"edge, polished"`
			}
			return q(d) + "," + v + `,"edge, polished"`
		}, r)
		write(p.file, []byte(d.text("\n")))
		add(r)
	}
	// trailing_blank.csv: blank, whitespace-only and separator-only lines after the data.
	{
		p := prof{file: "trailing_blank.csv", id: "odd-trailing", D: 3.0e-7, cs: 0.80, c0: 0.20, scale: mm}
		r := newRow(p, "C", "wt%")
		d := simple(p, gridMM, []string{"# id: odd-trailing"}, "depth_mm,C_wt%", comma2(","), r)
		for _, s := range []string{"", "", "   ", ",", ""} {
			d.add(s)
		}
		write(p.file, []byte(d.text("\n")))
		add(r)
	}
	// comments.csv: comment lines before the header and between data rows.
	{
		p := prof{file: "comments.csv", id: "odd-comments", D: 3.6e-7, cs: 1.00, c0: 0.25, scale: mm}
		r := newRow(p, "C", "wt%")
		r.meta = "measured by=GDOES"
		var d doc
		for _, s := range []string{"# Invented fixture with comments between the data.", "# id: odd-comments", "#",
			"# measured by: GDOES", "depth_mm,C_wt%", "# first block"} {
			d.add(s)
		}
		for i, x := range gridMM {
			switch i {
			case 5:
				d.add("# a remark in the middle")
			case 10:
				d.add("# second block, after re-polishing")
			}
			v := p.value(x)
			r.point(p, x, v, d.add(x+","+v))
		}
		d.add("# end")
		write(p.file, []byte(d.text("\n")))
		add(r)
	}
	// decimal_comma.csv: ';' separator, decimal commas in cells and metadata.
	{
		p := prof{file: "decimal_comma.csv", id: "odd-comma", D: 4.0e-11, t: 5400, cs: 0.92, c0: 0.20, scale: mm}
		r := newRow(p, "C", "wt%")
		r.T, r.t = "1198.65", "5400"
		d := simple(p, gridMM, []string{"# id: odd-comma", "# temperature: 925,5 C", "# time: 1,5 h"}, "depth_mm;C_wt%",
			func(_ int, d, v string) string { return comma(d) + ";" + comma(v) }, r)
		write(p.file, []byte(d.text("\n")))
		add(r)
	}
	// tab.tsv: tab separator, nitrogen in at%, one cell with a decimal comma.
	{
		p := prof{file: "tab.tsv", id: "odd-tab", D: 1.0e-8, cs: 2.5, c0: 0.05, scale: um}
		r := newRow(p, "N", "at%")
		d := simple(p, gridN, []string{"# id: odd-tab"}, "depth_um\tN_at%", func(i int, d, v string) string {
			if i == 3 {
				v = comma(v)
			}
			return d + "\t" + v
		}, r)
		write(p.file, []byte(d.text("\n")))
		add(r)
	}
	// unsorted.csv: depths out of order (kept in file order).
	{
		p := prof{file: "unsorted.csv", id: "odd-unsorted", D: 3.6e-7, cs: 0.90, c0: 0.20, scale: mm}
		r := newRow(p, "C", "wt%")
		perm := make([]string, len(gridMM))
		for i := range gridMM {
			perm[i] = gridMM[(5*i+3)%len(gridMM)] // 5 and 14 are coprime: a permutation
		}
		d := simple(p, perm, []string{"# id: odd-unsorted"}, "depth_mm,C_wt%", comma2(","), r)
		write(p.file, []byte(d.text("\n")))
		add(r)
	}
	// repeated.csv: every depth measured twice (±0.001 about the curve).
	{
		p := prof{file: "repeated.csv", id: "odd-repeated", D: 3.6e-7, cs: 0.90, c0: 0.20, scale: mm}
		r := newRow(p, "C", "wt%")
		var d doc
		d.add("# id: odd-repeated")
		d.add("depth_mm,C_wt%")
		for _, x := range gridRep {
			m := num(p.value(x))
			for _, dv := range []float64{0.001, -0.001} {
				v := strconv.FormatFloat(m+dv, 'f', 4, 64)
				r.point(p, x, v, d.add(x+","+v))
			}
		}
		write(p.file, []byte(d.text("\n")))
		add(r)
	}
	// meta_F_min.csv: °F, min, in; temperature uncertainty in F; depth [in]; decimal comma.
	{
		p := prof{file: "meta_F_min.csv", id: "odd-F", D: 3.0e-11, t: 5400, cs: 800, c0: 300, scale: in}
		r := newRow(p, "hardness", "HV0.5")
		r.T, r.t, r.thick, r.Tsig = "1199.8166666666667", "5400", "0.0127", "5"
		r.meta = "unknown=yes"
		d := simple(p, gridIn, []string{"# id: odd-F", "# temperature: 1700 °F", "# time: 90 min", "# thickness: 0.5 in",
			"# temperature_sigma: 9 F", "# unknown: yes"}, "depth [in];HV0.5",
			func(_ int, d, v string) string { return comma(d) + ";" + comma(v) }, r)
		write(p.file, []byte(d.text("\n")))
		add(r)
	}
	// latin1.csv: Latin-1 bytes for ° and µ.
	{
		p := prof{file: "latin1.csv", id: "odd-latin1", D: 3.6e-7, cs: 0.90, c0: 0.20, scale: um}
		r := newRow(p, "C", "wt%")
		r.T = "1198.15"
		d := simple(p, gridUM, []string{"# id: odd-latin1", "# temperature: 925 °C"}, "depth (µm);C_wt%",
			func(_ int, d, v string) string { return d + ";" + comma(v) }, r)
		write(p.file, latin1(d.text("\n")))
		add(r)
	}
	// utf16.txt: UTF-16LE with BOM, tab-separated, CRLF.
	{
		p := prof{file: "utf16.txt", id: "odd-utf16", D: 3.6e-7, cs: 0.90, c0: 0.20, scale: um}
		r := newRow(p, "C", "wt%")
		d := simple(p, gridUM, []string{"# id: odd-utf16"}, "depth_µm\tC_wt%",
			func(_ int, d, v string) string { return d + "\t" + comma(v) }, r)
		write(p.file, utf16le(d.text("\r\n")))
		add(r)
	}
	// mil.csv: Depth_mil, carbon (wt%), sigma (wt%).
	{
		p := prof{file: "mil.csv", id: "odd-mil", D: 3.6e-7, cs: 0.90, c0: 0.20, scale: mil}
		r := newRow(p, "C", "wt%")
		d := simple(p, gridMil, []string{"# id: odd-mil"}, "Depth_mil,carbon (wt%),sigma (wt%)",
			func(_ int, d, v string) string { return d + "," + v + ",0.02" }, r)
		for range gridMil {
			r.sigma = append(r.sigma, "0.02")
		}
		write(p.file, []byte(d.text("\n")))
		add(r)
	}
	// long.csv: long table, P2 before P1, blank per-profile cells, text column furnace.
	{
		p2 := prof{file: "long.csv", id: "P2", D: 2.5e-11, t: 14400, cs: 800, c0: 300, scale: um}
		p1 := prof{file: "long.csv", id: "P1", D: 4.0e-11, t: 7200, cs: 820, c0: 310, scale: um}
		r2, r1 := newRow(p2, "hardness", "HV0.5"), newRow(p1, "hardness", "HV0.5")
		r2.T, r2.t, r2.lot, r2.meta = "1198.15", "14400", "L1", "furnace=F1"
		r1.T, r1.t, r1.lot, r1.meta = "1223.15", "7200", "L2", "furnace=F2"
		var d doc
		d.add("profile,depth_um,temperature_K,time_s,furnace,lot,HV0.5")
		for i := 0; i < len(gridUM) || i < len(gridUM2); i++ {
			if i < len(gridUM) {
				x, v := gridUM[i], p2.value(gridUM[i])
				T, t := "1198.15", "14400"
				if i%3 == 2 {
					T, t = "", "" // per-profile cells may be left blank after the first
				}
				r2.point(p2, x, v, d.add("P2,"+x+","+T+","+t+",F1,L1,"+v))
			}
			if i < len(gridUM2) {
				x, v := gridUM2[i], p1.value(gridUM2[i])
				r1.point(p1, x, v, d.add("P1,"+x+",1223.15,7200,F2,L2,"+v))
			}
		}
		write("long.csv", []byte(d.text("\n")))
		add(r2)
		add(r1)
	}
	// long_semicolon.csv: ID, Distance (mm), Temperature (°F), Time (min), decimal commas, file metadata.
	{
		px := prof{file: "long_semicolon.csv", id: "X", D: 2.2e-11, t: 14400, cs: 0.80, c0: 0.15, scale: mm}
		py := prof{file: "long_semicolon.csv", id: "Y", D: 1.6e-11, t: 14400, cs: 0.78, c0: 0.17, scale: mm}
		rx, ry := newRow(px, "C", "wt%"), newRow(py, "C", "wt%")
		rx.T, rx.t, rx.meta = "1199.8166666666667", "14400", "unknown=yes|material=16MnCr5"
		ry.T, ry.t, ry.meta = "1172.038888888889", "14400", "unknown=no"
		var d doc
		d.add("# material: 16MnCr5")
		d.add("ID;Distance (mm);Temperature (°F);Time (min);unknown;C (wt%)")
		for _, x := range gridMM {
			v := px.value(x)
			rx.point(px, x, v, d.add("X;"+comma(x)+";1700;240;yes;"+comma(v)))
		}
		for _, x := range gridMM[:12] {
			v := py.value(x)
			ry.point(py, x, v, d.add("Y;"+comma(x)+";1650;240;no;"+comma(v)))
		}
		write("long_semicolon.csv", []byte(d.text("\n")))
		add(rx)
		add(ry)
	}
	// metadata_units_in_key.csv: units written in the keys.
	{
		p := prof{file: "metadata_units_in_key.csv", id: "odd-keyunits", D: 2.5e-11, t: 14400, cs: 0.90, c0: 0.20, scale: mm}
		r := newRow(p, "C", "wt%")
		r.T, r.t, r.thick = "1198.15", "14400", "0.012"
		d := simple(p, gridMM, []string{"# id: odd-keyunits", "# temperature_C: 925", "# time (h): 4", "# thickness_mm: 12"},
			"depth_mm,C_wt%", comma2(","), r)
		write(p.file, []byte(d.text("\n")))
		add(r)
	}
	// value_metadata.csv: two numeric columns, the value one named by # value:.
	{
		p := prof{file: "value_metadata.csv", id: "odd-valuekey", D: 3.6e-7, cs: 0.90, c0: 0.20, scale: mm}
		r := newRow(p, "C", "wt%")
		r.meta = "furnace_no=3"
		d := simple(p, gridMM, []string{"# id: odd-valuekey", "# value: C_wt%"}, "depth_mm,furnace_no,C_wt%",
			func(_ int, d, v string) string { return d + ",3," + v }, r)
		write(p.file, []byte(d.text("\n")))
		add(r)
	}
	rows = append(rows, workbookRows()...)
	writeCases(rows)
	writeTruth(rows)
}

// workbookRows are the cases of workbook.xlsx, laid out as oddWorkbook in
// testdata/bad/gen writes it.
func workbookRows() []*row {
	w1 := prof{file: "workbook.xlsx", id: "W-1", D: 2.8e-11, t: 5400, cs: 780, c0: 290, scale: in}
	w3 := prof{file: "workbook.xlsx", id: "W-3", D: 2.5e-11, t: 14400, cs: 800, c0: 300, scale: um}
	w2 := prof{file: "workbook.xlsx", id: "W-2", D: 4.0e-11, t: 7200, cs: 820, c0: 310, scale: um}
	r1 := newRow(w1, "hardness", "HV0.5")
	r1.sheet, r1.T, r1.t, r1.meta = "W-1 sheet", "1199.8166666666667", "5400", "note=edge"
	// Sheet "W-1 sheet": metadata in rows 2–4, header in row 6, data from
	// row 7 with a blank row 8.
	rowNo := 7
	for i, x := range gridIn {
		r1.point(w1, x, w1.value(x), rowNo)
		rowNo++
		if i == 0 {
			rowNo++
		}
	}
	r3, r2 := newRow(w3, "hardness", "HV0.5"), newRow(w2, "hardness", "HV0.5")
	r3.sheet, r3.T, r3.t = "long", "1198.15", "14400"
	r2.sheet, r2.T, r2.t = "long", "1223.15", "7200"
	// Sheet "long": header in row 1, W-3 and W-2 interleaved from row 2.
	rowNo = 2
	for i := 0; i < len(gridUM) || i < len(gridUM2); i++ {
		if i < len(gridUM) {
			r3.point(w3, gridUM[i], w3.value(gridUM[i]), rowNo)
			rowNo++
		}
		if i < len(gridUM2) {
			r2.point(w2, gridUM2[i], w2.value(gridUM2[i]), rowNo)
			rowNo++
		}
	}
	return []*row{r1, r3, r2}
}

func writeCases(rows []*row) {
	var b strings.Builder
	b.WriteString("# file\tid\tsheet\tn\ttemperature_K\ttime_s\tthickness_m\ttemperature_sigma_K\tquantity\tvalue_unit\tlot\tdepth_m\tvalue\tsigma\tline\tmeta\n")
	b.WriteString("# written by generate.go (go run testdata/odd/generate.go); do not edit by hand\n")
	for _, r := range rows {
		sigma := "-"
		if r.sigma != nil {
			sigma = strings.Join(r.sigma, " ")
		}
		fmt.Fprintf(&b, "%s\t%s\t%s\t%d\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\n",
			r.file, r.id, r.sheet, len(r.depth), r.T, r.t, r.thick, r.Tsig, r.quantity, r.unit, r.lot,
			strings.Join(r.depth, " "), strings.Join(r.value, " "), sigma, strings.Join(r.lines, " "), r.meta)
	}
	write("cases.tsv", []byte(b.String()))
}

func writeTruth(rows []*row) {
	var b strings.Builder
	b.WriteString("# Generating parameters of each odd profile (generate.go): fixtures for a self-check of the\n")
	b.WriteString("# reading path through the fit, invented numbers, not external check values.\n")
	b.WriteString("# param is D (m2/s, the file gives a time) or Dt (m2, no time). Cs, C0 in the value unit.\n")
	b.WriteString("# file\tid\tparam\tvalue\tCs\tC0\n")
	for _, r := range rows {
		p := r.truth
		name := "D"
		if p.t == 0 {
			name = "Dt"
		}
		fmt.Fprintf(&b, "%s\t%s\t%s\t%s\t%s\t%s\n", p.file, p.id, name, g(p.D), g(p.cs), g(p.c0))
	}
	write("truth.tsv", []byte(b.String()))
}

func latin1(s string) []byte {
	var b []byte
	for _, r := range s {
		if r > 0xff {
			log.Fatalf("%q is not Latin-1", r)
		}
		b = append(b, byte(r))
	}
	return b
}

func utf16le(s string) []byte {
	b := []byte{0xff, 0xfe}
	for _, u := range utf16.Encode([]rune(s)) {
		b = append(b, byte(u), byte(u>>8))
	}
	return b
}
