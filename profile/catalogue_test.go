package profile

import (
	"bufio"
	"errors"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/fickfit/fickfit/internal/badinput"
)

// readTSV reads a catalogue table; lines starting with '#' are comments.
func readTSV(t *testing.T, path string) [][]string {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	var rows [][]string
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		if line := sc.Text(); line != "" && !strings.HasPrefix(line, "#") {
			rows = append(rows, strings.Split(line, "\t"))
		}
	}
	if err := sc.Err(); err != nil {
		t.Fatal(err)
	}
	return rows
}

var kinds = map[string]error{
	"ErrEmpty": ErrEmpty, "ErrNoData": ErrNoData, "ErrFormat": ErrFormat, "ErrTooLarge": ErrTooLarge,
	"ErrUnit": ErrUnit, "ErrNumber": ErrNumber, "ErrColumn": ErrColumn, "ErrMetadata": ErrMetadata,
	"ErrValue": ErrValue, "ErrRange": ErrRange, "ErrDuplicate": ErrDuplicate, "ErrOpen": ErrOpen,
}

// TestBadCatalogue reads every file of testdata/bad as cases.tsv says and
// checks that the error is an *Error naming the file, the position, the
// kind and the expected words. Fit-stage files must read without error.
func TestBadCatalogue(t *testing.T) {
	dir := filepath.Join("..", "testdata", "bad")
	rows := readTSV(t, filepath.Join(dir, "cases.tsv"))
	if len(rows) < 30 {
		t.Fatalf("only %d cases", len(rows))
	}
	listed := map[string]bool{}
	for _, r := range rows {
		if len(r) != 6 {
			t.Fatalf("cases.tsv row %q: want 6 fields", r)
		}
		file, stage, kind, where, fragment := r[0], r[1], r[3], r[4], r[5]
		listed[file] = true
		t.Run(file, func(t *testing.T) {
			path := filepath.Join(dir, file)
			if badinput.Has(file) {
				var err error
				if path, err = badinput.Write(t.TempDir(), file); err != nil {
					t.Fatal(err)
				}
			}
			var err error
			switch stage {
			case "read":
				_, err = Read(path)
			case "calibration":
				_, err = ReadCalibration(path)
			case "history":
				_, err = ReadHistory(path)
			case "fit":
				ps, err := Read(path)
				if err != nil || len(ps) != 1 {
					t.Fatalf("fit-stage file must read: %d profiles, %v", len(ps), err)
				}
				return
			default:
				t.Fatalf("unknown stage %q", stage)
			}
			checkCatalogueError(t, err, file, kind, where, fragment)
		})
	}
	entries, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	for _, e := range entries {
		if n := e.Name(); !listed[n] && n != "README.md" && n != "cases.tsv" && n != "gen" {
			t.Errorf("%s is not listed in cases.tsv", n)
		}
		if badinput.Has(e.Name()) {
			t.Errorf("%s is both a file and a generated case", e.Name())
		}
	}
	for _, n := range badinput.Names() {
		if !listed[n] {
			t.Errorf("generated case %s is not listed in cases.tsv", n)
		}
	}
}

func checkCatalogueError(t *testing.T, err error, file, kind, where, fragment string) {
	t.Helper()
	var e *Error
	if !errors.As(err, &e) {
		t.Fatalf("error %v (%T) is not an *Error", err, err)
	}
	msg := err.Error()
	if !strings.Contains(msg, file) {
		t.Errorf("message %q does not name the file %s", msg, file)
	}
	if where != "-" && (!strings.Contains(msg, where) || e.Line == 0) {
		t.Errorf("message %q does not give the position %q (line %d)", msg, where, e.Line)
	}
	if !strings.Contains(msg, fragment) {
		t.Errorf("message %q lacks %q", msg, fragment)
	}
	if !errors.Is(err, kinds[kind]) {
		t.Errorf("error %q is not %s", msg, kind)
	}
	if e.Hint == "" {
		t.Errorf("error %q says nothing about what to do", msg)
	}
	if len(msg) > 600 {
		t.Errorf("message of %d bytes: a message quotes short excerpts only", len(msg))
	}
}

// TestOddCatalogue reads every file of testdata/odd and compares each
// profile with cases.tsv value by value (depth to 1e-15 relative: the
// conversion is exact up to the rounding of one division or product).
func TestOddCatalogue(t *testing.T) {
	dir := filepath.Join("..", "testdata", "odd")
	rows := readTSV(t, filepath.Join(dir, "cases.tsv"))
	byFile := map[string][][]string{}
	var order []string
	for _, r := range rows {
		if len(r) != 16 {
			t.Fatalf("cases.tsv row %q: want 16 fields", r)
		}
		if byFile[r[0]] == nil {
			order = append(order, r[0])
		}
		byFile[r[0]] = append(byFile[r[0]], r)
	}
	for _, file := range order {
		t.Run(file, func(t *testing.T) {
			ps, err := Read(filepath.Join(dir, file))
			if err != nil {
				t.Fatal(err)
			}
			want := byFile[file]
			if len(ps) != len(want) {
				t.Fatalf("%d profiles, want %d", len(ps), len(want))
			}
			for i, w := range want {
				checkOdd(t, &ps[i], w)
			}
		})
	}
	entries, _ := os.ReadDir(dir)
	for _, e := range entries {
		if n := e.Name(); byFile[n] == nil && !oddSupport[n] {
			t.Errorf("%s is not listed in cases.tsv", n)
		}
	}
	// Every profile is long enough to be fitted (cmd/fickfit's odd test
	// fits them) and has its generating parameters in truth.tsv.
	truth := map[string]bool{}
	for _, r := range readTSV(t, filepath.Join(dir, "truth.tsv")) {
		if len(r) != 6 {
			t.Fatalf("truth.tsv row %q: want 6 fields", r)
		}
		truth[r[0]+"\t"+r[1]] = true
	}
	for _, r := range rows {
		if n, _ := strconv.Atoi(r[3]); n < 10 || n > 20 {
			t.Errorf("%s %s: %s points, want 10–20", r[0], r[1], r[3])
		}
		if !truth[r[0]+"\t"+r[1]] {
			t.Errorf("%s %s is not in truth.tsv", r[0], r[1])
		}
	}
	if len(truth) != len(rows) {
		t.Errorf("truth.tsv has %d profiles, cases.tsv %d", len(truth), len(rows))
	}
}

// oddSupport are the files of testdata/odd that are not inputs.
var oddSupport = map[string]bool{"README.md": true, "cases.tsv": true, "truth.tsv": true, "generate.go": true}

func checkOdd(t *testing.T, p *Profile, w []string) {
	t.Helper()
	if p.ID != w[1] {
		t.Errorf("id %q, want %q", p.ID, w[1])
	}
	if sheet := w[2]; sheet != "-" && !strings.HasSuffix(p.Source, ":"+sheet) {
		t.Errorf("%s: source %q, want sheet %q", p.ID, p.Source, sheet)
	}
	nums := []struct {
		got  float64
		want string
		what string
	}{{p.Temperature, w[4], "temperature"}, {p.Time, w[5], "time"}, {p.Thickness, w[6], "thickness"},
		{p.TemperatureSigma, w[7], "temperature sigma"}}
	for _, n := range nums {
		if v := mustFloat(t, n.want); !near(n.got, v, 1e-15) {
			t.Errorf("%s: %s %v, want %v", p.ID, n.what, n.got, v)
		}
	}
	if p.Quantity != w[8] || p.ValueUnit != w[9] {
		t.Errorf("%s: quantity %q unit %q, want %q %q", p.ID, p.Quantity, p.ValueUnit, w[8], w[9])
	}
	if lot := dash(w[10]); p.Lot != lot {
		t.Errorf("%s: lot %q, want %q", p.ID, p.Lot, lot)
	}
	checkList(t, p.ID+" depth", p.Depth, w[11])
	checkList(t, p.ID+" value", p.Value, w[12])
	if w[13] == "-" && p.Sigma != nil {
		t.Errorf("%s: sigma %v, want none", p.ID, p.Sigma)
	} else if w[13] != "-" {
		checkList(t, p.ID+" sigma", p.Sigma, w[13])
	}
	lines := make([]float64, len(p.Line))
	for i, l := range p.Line {
		lines[i] = float64(l)
	}
	checkList(t, p.ID+" line", lines, w[14])
	if w[15] != "-" {
		for _, kv := range strings.Split(w[15], "|") {
			k, v, _ := strings.Cut(kv, "=")
			if p.Meta[k] != v {
				t.Errorf("%s: Meta[%q] = %q, want %q", p.ID, k, p.Meta[k], v)
			}
		}
	}
	if err := p.Validate(); err != nil {
		t.Errorf("%s: Validate: %v", p.ID, err)
	}
}

func dash(s string) string {
	if s == "-" {
		return ""
	}
	return s
}

func mustFloat(t *testing.T, s string) float64 {
	t.Helper()
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		t.Fatal(err)
	}
	return v
}

func checkList(t *testing.T, what string, got []float64, want string) {
	t.Helper()
	f := strings.Fields(want)
	if len(got) != len(f) {
		t.Errorf("%s: %v, want %s", what, got, want)
		return
	}
	for i, s := range f {
		w := mustFloat(t, s)
		if math.Abs(got[i]-w) > 1e-15*math.Abs(w) {
			t.Errorf("%s[%d] = %v, want %v", what, i, got[i], w)
		}
	}
}

// TestLongLine: a 10 MB file without line breaks is refused with a clear
// error and without reading it whole (generated at run time, not committed).
func TestLongLine(t *testing.T) {
	path := filepath.Join(t.TempDir(), "oneline.csv")
	b := []byte(strings.Repeat("0.1,", 10<<20/4))
	if err := os.WriteFile(path, b, 0o644); err != nil {
		t.Fatal(err)
	}
	_, err := Read(path)
	var e *Error
	if !errors.As(err, &e) || !errors.Is(err, ErrTooLarge) || e.Line != 1 ||
		!strings.Contains(err.Error(), "oneline.csv:1:") || !strings.Contains(err.Error(), "longer than") {
		t.Fatalf("got %v", err)
	}
}
