package profile

import (
	"bufio"
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"math/rand/v2"
	"reflect"
	"strings"
	"testing"
)

// readTableReference reads a text table the way the reader did before its
// fast path (self-check reference): every data row through encoding/csv
// and table.add. The fast reader must give the same profiles and errors.
func readTableReference(r io.Reader, name string) ([]Profile, error) {
	tr, err := openText(r, name)
	if err != nil {
		return nil, err
	}
	t, err := newTable(tr.header, tableOptions{org: tr.org, meta: &tr.meta, headerLine: tr.headerLine,
		defaultID: baseID(name), comma: tr.comma, sepComma: tr.sep == ',', marks: tr.marks,
		kept: &textBudget{limit: maxKeptText, own: &tr.lim.total}})
	if err != nil {
		return nil, err
	}
	if tr.cr == nil {
		tr.csvFrom("", tr.headerLine+1)
	}
	for {
		rec, line, err := tr.nextCSV()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, err
		}
		if err := t.add(rec, line); err != nil {
			return nil, err
		}
	}
	ps, err := t.finish()
	if err != nil {
		return nil, err
	}
	return ps, checkUnique(ps)
}

// sameRead asserts that the fast reader, the reference reader and Each
// agree on data: the same profiles, or the same error.
func sameRead(t *testing.T, data []byte) {
	t.Helper()
	want, werr := readTableReference(bytes.NewReader(data), "t.csv")
	got, gerr := ReadCSV(bytes.NewReader(data), "t.csv")
	if fmt.Sprint(werr) != fmt.Sprint(gerr) {
		t.Fatalf("error\n got  %v\n want %v\ninput:\n%q", gerr, werr, data)
	}
	if !reflect.DeepEqual(normalise(got), normalise(want)) {
		t.Fatalf("profiles differ\n got  %+v\n want %+v\ninput:\n%q", got, want, data)
	}
	var each []Profile
	st := &stream{seen: map[string]string{}}
	st.emit = func(p *Profile) error { each = append(each, *p); return nil }
	_, eerr := scanTable(bytes.NewReader(data), "t.csv", "t", st)
	if errors.Is(eerr, ErrUngrouped) {
		return
	}
	if fmt.Sprint(werr) != fmt.Sprint(eerr) {
		t.Fatalf("streamed: error\n got  %v\n want %v\ninput:\n%q", eerr, werr, data)
	}
	if werr == nil && !reflect.DeepEqual(normalise(each), normalise(want)) {
		t.Fatalf("streamed profiles differ\n got  %+v\n want %+v\ninput:\n%q", each, want, data)
	}
}

// normalise drops what may legitimately differ: slice capacities (not
// seen by DeepEqual) and nil against empty slices.
func normalise(ps []Profile) []Profile {
	out := make([]Profile, len(ps))
	for i, p := range ps {
		if len(p.Depth) == 0 {
			p.Depth, p.Value, p.Line = nil, nil, nil
		}
		if len(p.Sigma) == 0 {
			p.Sigma = nil
		}
		out[i] = p
	}
	return out
}

// TestFastReaderMatchesReference reads generated long tables with the
// ways exports vary (separators, line ends, comments and blank lines,
// spaces, decimal commas and ambiguous marks, per-profile columns, quoted
// cells, bad cells, ungrouped rows) and checks that the fast path gives
// what the reference reader gives (self-check).
func TestFastReaderMatchesReference(t *testing.T) {
	rng := rand.New(rand.NewPCG(15, 1))
	for k := 0; k < 400; k++ {
		sameRead(t, randomTable(rng))
	}
}

// randomTable writes a small long table with random variations.
func randomTable(rng *rand.Rand) []byte {
	seps := []string{",", ";", "\t"}
	sep := seps[rng.IntN(3)]
	comma := sep != "," && rng.IntN(2) == 0
	eol := []string{"\n", "\r\n"}[rng.IntN(2)]
	var b strings.Builder
	if rng.IntN(4) == 0 {
		b.WriteString("# lot: L9" + eol)
	}
	cols := []string{"specimen", "depth_um", "C_wt%"}
	if rng.IntN(2) == 0 {
		cols = append(cols, "temperature_C", "time_h")
	}
	if rng.IntN(3) == 0 {
		cols = append(cols, "sigma")
	}
	if rng.IntN(4) == 0 {
		cols = append(cols, "note")
	}
	rng.Shuffle(len(cols), func(i, j int) { cols[i], cols[j] = cols[j], cols[i] })
	b.WriteString(strings.Join(cols, sep) + eol)
	num := func(v float64, digits int) string {
		s := fmt.Sprintf("%.*f", digits, v)
		if comma {
			s = strings.Replace(s, ".", ",", 1)
		}
		return s
	}
	dirty := rng.IntN(2) == 0 // bad or odd cells here and there
	temps := []string{"925", "925", "925", "", "925.0"}
	if dirty {
		temps = append(temps, "930")
	}
	profiles := 1 + rng.IntN(5)
	for p := 0; p < profiles; p++ {
		points := 1 + rng.IntN(6)
		for i := 0; i < points; i++ {
			cells := make([]string, len(cols))
			for c, name := range cols {
				switch name {
				case "specimen":
					cells[c] = fmt.Sprintf("S%d", p)
				case "depth_um":
					cells[c] = num(float64(10*(i+1))+0.25*float64(rng.IntN(4)), rng.IntN(4))
				case "C_wt%":
					cells[c] = num(0.2+0.7/float64(1+i)+0.001*float64(rng.IntN(9)), 1+rng.IntN(4))
				case "temperature_C":
					cells[c] = temps[rng.IntN(len(temps))]
				case "time_h":
					cells[c] = []string{"4", "4", "", "4"}[rng.IntN(4)]
				case "sigma":
					cells[c] = num(0.01, 2)
				case "note":
					cells[c] = []string{"", "ok", "ok", "ok"}[rng.IntN(4)]
				}
				if !dirty {
					continue
				}
				switch rng.IntN(60) {
				case 0:
					cells[c] = " " + cells[c]
				case 1:
					cells[c] += " "
				case 2:
					cells[c] = "x" + cells[c]
				case 3:
					cells[c] = `"` + cells[c] + `"`
				case 4:
					cells[c] = ""
				case 5:
					cells[c] = "\u00a0" + cells[c]
				case 6:
					cells[c] = "−" + cells[c]
				case 7:
					cells[c] = []string{"<0.01", "n.d.", "< 0,05"}[rng.IntN(3)] // below a detection limit
				case 8:
					cells[c] += "\u00a0" // white space that is not ASCII, at the end
				case 9:
					cells[c] += "\u2003\r"
				}
			}
			b.WriteString(strings.Join(cells, sep))
			switch rng.IntN(30) {
			case 0:
				b.WriteString(sep)
			case 1:
				b.WriteString(eol + "# a comment")
			case 2:
				b.WriteString(eol)
			}
			b.WriteString(eol)
		}
		if rng.IntN(25) == 0 {
			p -= 2 // rows of an earlier profile again: not grouped
			if p < -1 {
				p = -1
			}
		}
	}
	return []byte(b.String())
}

// TestRowScannerMatchesCSV splits random lines without quotes, with every
// separator, white space and line end, and compares each record with
// what encoding/csv returns (self-check).
func TestRowScannerMatchesCSV(t *testing.T) {
	rng := rand.New(rand.NewPCG(15, 2))
	atoms := []string{"a", "1", "0,5", ",", ";", "\t", " ", "  ", "\r", "\u00a0", "\u0085", "\u2003", "#", "é", "\xe9", "x y"}
	for k := 0; k < 2000; k++ {
		var b strings.Builder
		lines := 1 + rng.IntN(6)
		for l := 0; l < lines; l++ {
			n := rng.IntN(8)
			for i := 0; i < n; i++ {
				b.WriteString(atoms[rng.IntN(len(atoms))])
			}
			if l < lines-1 || rng.IntN(2) == 0 {
				b.WriteString([]string{"\n", "\r\n"}[rng.IntN(2)])
			}
		}
		text := b.String()
		for _, sep := range []rune{',', ';', '\t'} {
			cr := csv.NewReader(strings.NewReader(text))
			cr.Comma, cr.Comment, cr.FieldsPerRecord = sep, '#', -1
			cr.TrimLeadingSpace = sep != '\t'
			rs := &rowScanner{in: bufioReader(text), sep: byte(sep), trim: sep != '\t'}
			for {
				want, werr := cr.Read()
				fields, raw, line, gerr := rs.next()
				if werr == io.EOF || gerr == io.EOF {
					if werr != gerr {
						t.Fatalf("sep %q: end: csv %v, scanner %v\n%q", sep, werr, gerr, text)
					}
					break
				}
				if werr != nil || gerr != nil || raw != nil {
					t.Fatalf("sep %q: csv %v, scanner %v %q\n%q", sep, werr, gerr, raw, text)
				}
				if got := rs.cells(fields, nil); !reflect.DeepEqual(got, want) {
					t.Fatalf("sep %q: record %q, csv %q\n%q", sep, got, want, text)
				}
				if wl, _ := cr.FieldPos(0); wl != line {
					t.Fatalf("sep %q: line %d, csv %d\n%q", sep, line, wl, text)
				}
			}
		}
	}
}

func FuzzFastReader(f *testing.F) {
	rng := rand.New(rand.NewPCG(15, 3))
	for k := 0; k < 20; k++ {
		f.Add(randomTable(rng))
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		sameRead(t, data)
	})
}

// bufioReader reads text through a small buffer, so that long lines are
// assembled from several reads.
func bufioReader(text string) *bufio.Reader {
	return bufio.NewReaderSize(strings.NewReader(text), 16)
}

// TestParseNumberBytes: the fast number parser accepts what parseNumber
// accepts (ASCII text) and gives the same double, to the bit, on random
// numbers of every shape and on text that is not a number (self-check
// against strconv through parseNumber).
func TestParseNumberBytes(t *testing.T) {
	rng := rand.New(rand.NewPCG(15, 5))
	digits := func(n int) string {
		var b strings.Builder
		for i := 0; i < n; i++ {
			b.WriteByte(byte('0' + rng.IntN(10)))
		}
		return b.String()
	}
	fixed := []string{"0", "-0", "+0.0", ".5", "5.", "-.5e-3", "1e22", "1e23", "9007199254740993", "4503599627370497",
		"1234567890123456789", "12345678901234567890", "0.1", "1e-22", "1e-23", "2.2250738585072011e-308", "1e-400",
		"1e400", "1.7976931348623157e308", "1.7976931348623159e308", "e5", "1e", "1e+", "1.2.3", "1,5", "1,5,5", "1.5,5",
		"--1", "+-1", "0x10", "1_000", "Inf", "NaN", ".", "-", "", " 1", "1 ", "1e0x", "00000000000000000000001.5"}
	var cases []string
	cases = append(cases, fixed...)
	for k := 0; k < 20000; k++ {
		s := ""
		switch rng.IntN(3) {
		case 1:
			s = "-"
		case 2:
			s = "+"
		}
		s += digits(rng.IntN(22))
		if rng.IntN(2) == 0 {
			s += "." + digits(rng.IntN(22))
		}
		if rng.IntN(3) == 0 {
			s += []string{"e", "E", "e-", "e+"}[rng.IntN(4)] + digits(rng.IntN(4))
		}
		if rng.IntN(10) == 0 {
			s += string("x,.e"[rng.IntN(4)])
		}
		cases = append(cases, s)
	}
	for _, s := range cases {
		for _, comma := range []bool{false, true} {
			in := s
			if comma {
				in = strings.Replace(s, ".", ",", 1)
			}
			want, werr := parseNumber(in, comma)
			got, ok := parseNumberBytes([]byte(strings.TrimSpace(in)), comma)
			if ok != (werr == nil) && !(werr == nil && strings.TrimSpace(in) != in) {
				t.Fatalf("%q (comma %v): fast accepts %v, parseNumber error %v", in, comma, ok, werr)
			}
			if ok && math.Float64bits(got) != math.Float64bits(want) {
				t.Fatalf("%q (comma %v): %v, parseNumber %v", in, comma, got, want)
			}
		}
	}
}

// TestLineLimiter: the limiter counts lines and stops at the byte that
// makes a line longer than its limit, whatever the reads' sizes (self-check
// against a byte-by-byte count).
func TestLineLimiter(t *testing.T) {
	rng := rand.New(rand.NewPCG(15, 6))
	for k := 0; k < 500; k++ {
		var b strings.Builder
		for b.Len() < 300 {
			if rng.IntN(8) == 0 {
				b.WriteByte('\n')
			} else {
				b.WriteString(strings.Repeat("x", rng.IntN(12)))
			}
		}
		text := b.String()
		max := 1 + rng.IntN(40)
		// Reference: the offset of the first byte beyond max in a line, and
		// the line count up to it.
		wantN, wantLine, run := len(text), 1, 0
		for i := 0; i < len(text); i++ {
			if text[i] == '\n' {
				run = 0
				wantLine++
				continue
			}
			if run++; run > max {
				wantN = i
				break
			}
		}
		l := &lineLimiter{r: &chunkReader{s: text, rng: rng}, max: max}
		got, err := io.ReadAll(l)
		if len(got) != wantN || (wantN < len(text)) != (err == errLineTooLong) || l.line != wantLine {
			t.Fatalf("max %d: read %d bytes (want %d), line %d (want %d), error %v\n%q", max, len(got), wantN, l.line, wantLine, err, text)
		}
	}
}

// chunkReader reads s in chunks of random sizes.
type chunkReader struct {
	s   string
	rng *rand.Rand
}

func (c *chunkReader) Read(p []byte) (int, error) {
	if c.s == "" {
		return 0, io.EOF
	}
	n := copy(p[:min(len(p), 1+c.rng.IntN(20))], c.s)
	c.s = c.s[n:]
	return n, nil
}

// TestIsBelowLimitQuickReject: the first-character check before the
// pattern changes no answer (self-check against the pattern alone).
func TestIsBelowLimitQuickReject(t *testing.T) {
	rng := rand.New(rand.NewPCG(15, 7))
	atoms := []string{"<", "≤", "&lt;", "n", "N", ".", "d", "D", "/", "b", "l", "L", "0", "1", ",", "e-3", " ", "\t", "\u00a0", "lod", "LOQ",
		"not detected", "below detection limit", "x", "-", "+"}
	for k := 0; k < 20000; k++ {
		var b strings.Builder
		for n := rng.IntN(5); n >= 0; n-- {
			b.WriteString(atoms[rng.IntN(len(atoms))])
		}
		s := b.String()
		if got, want := IsBelowLimit(s), belowLimitRe.MatchString(s); got != want {
			t.Fatalf("%q: %v, pattern %v", s, got, want)
		}
	}
}

// TestKeptTextBeyondFile: ids and text cells of the rows themselves may
// exceed the kept-text limit (a long table of a million profiles keeps
// tens of MiB of ids), a metadata line copied into every profile may not.
// The limit is lowered to 1 KiB here to keep the files small.
func TestKeptTextBeyondFile(t *testing.T) {
	defer func(v int64) { maxKeptText = v }(maxKeptText)
	maxKeptText = 1 << 10
	table := func(meta string) []byte {
		var b bytes.Buffer
		if meta != "" {
			fmt.Fprintf(&b, "# material: %s\n", meta)
		}
		b.WriteString("specimen,temperature_C,time_h,depth_um,C_wt%\n")
		for p := 0; p < 200; p++ {
			id := fmt.Sprintf("coupon-%033d", p) // 40 bytes: 8000 bytes of ids
			for i := 0; i < 4; i++ {
				fmt.Fprintf(&b, "%s,925,4,%d,%.3f\n", id, 50*i, 0.9-0.1*float64(i))
			}
		}
		return b.Bytes()
	}
	ps, err := ReadCSV(bytes.NewReader(table("")), "ids.csv")
	if err != nil || len(ps) != 200 {
		t.Fatalf("a table whose ids exceed the limit but not the file: %d profiles, %v", len(ps), err)
	}
	// 200 copies of a 400-character material: 80 000 bytes, more than the
	// file (about 45 kB) and the limit together.
	_, err = ReadCSV(bytes.NewReader(table(strings.Repeat("m", 400))), "meta.csv")
	if !errors.Is(err, ErrTooLarge) || !strings.Contains(err.Error(), "beyond the size of the file itself") {
		t.Fatalf("metadata copied into every profile: %v, want ErrTooLarge", err)
	}
	// The same text once is no amplification.
	var b bytes.Buffer
	b.WriteString("# material: " + strings.Repeat("m", 400) + "\n")
	b.WriteString("depth_um,C_wt%\n0,0.9\n50,0.8\n100,0.7\n")
	if _, err := ReadCSV(bytes.NewReader(b.Bytes()), "once.csv"); err != nil {
		t.Fatal(err)
	}
}
