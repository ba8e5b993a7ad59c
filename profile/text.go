package profile

import (
	"bufio"
	"bytes"
	"encoding/csv"
	"errors"
	"io"
	"strings"
	"unicode/utf16"
	"unicode/utf8"
)

// maxLineBytes is the longest physical line the text readers accept. A
// table row is a few dozen bytes; a longer line means the file is not a
// table with one point per line (or has lost its line breaks).
const maxLineBytes = 1 << 20

// textReader reads a delimited text table: metadata lines, a header, rows.
type textReader struct {
	org        origin
	meta       metaSet
	header     []string
	headerLine int
	sep        rune
	comma      bool // decimal comma accepted (separator ';' or tab)
	// marks watches decimal marks when a decimal comma is accepted (nil otherwise).
	marks *decimalMarks
	// rows splits the data rows while they hold no quote (the usual
	// case); cr, when not nil, reads the rest of the file instead.
	rows   *rowScanner
	cells  []string // the cells next returns, reused
	cr     *csv.Reader
	lim    *lineLimiter
	offset int // lines before the first line cr reads
}

// openText reads r up to and including the header row. Accepted: UTF-8
// (with or without BOM), UTF-16 with BOM, Latin-1 in header and metadata,
// LF, CRLF or CR line ends, separators ',' ';' or tab (sniffed from the header).
func openText(r io.Reader, name string) (*textReader, error) {
	org := origin{file: name}
	br, err := decodeText(r, org)
	if err != nil {
		return nil, err
	}
	lim := &lineLimiter{r: br, max: maxLineBytes}
	in := bufio.NewReaderSize(lim, 64<<10)
	t := &textReader{org: org, lim: lim}
	header, err := t.scanToHeader(in)
	if err != nil {
		return nil, err
	}
	t.sep = sniffSeparator(header)
	t.comma = t.sep != ','
	if t.comma {
		t.marks = &decimalMarks{org: org}
	}
	t.rows = &rowScanner{in: in, sep: byte(t.sep), trim: t.sep != '\t', line: t.headerLine}
	if strings.Contains(header, `"`) {
		t.csvFrom(header, t.headerLine)
		rec, _, err := t.nextCSV()
		if err != nil {
			return nil, err
		}
		t.header = append([]string(nil), rec...)
	} else {
		t.header = t.rows.cells(t.rows.split(lineContent([]byte(header))), nil) // no quote: split gives the fields
	}
	if len(t.header) < 2 {
		return nil, org.errAt(t.headerLine, -1, "", errorf(ErrColumn,
			"the header %s has only one column", quote(strings.TrimSpace(latin1(header)))),
			"separate the columns with ',', ';' or tab; a title line above the header must start with '#'")
	}
	return t, nil
}

// scanToHeader reads metadata and comment lines and returns the header line.
func (t *textReader) scanToHeader(in *bufio.Reader) (string, error) {
	n, sawMeta := 0, false
	for {
		line, err := in.ReadString('\n')
		if err != nil && err != io.EOF {
			return "", t.readError(err, n+1)
		}
		if line == "" && err == io.EOF {
			break
		}
		n++
		s := strings.TrimSpace(latin1(line))
		switch {
		case s == "":
		case strings.HasPrefix(s, "#"):
			if k, v, ok := parseMetaLine(s); ok {
				sawMeta = true
				if err := t.meta.add(metaEntry{key: k, value: v, line: n, col: -1}, t.org); err != nil {
					return "", err
				}
			}
		default:
			t.headerLine = n
			return line, nil
		}
		if err == io.EOF {
			break
		}
	}
	if sawMeta {
		return "", t.org.errAt(0, -1, "", errorf(ErrNoData, "the file has metadata lines but no header row"),
			"add a header row such as depth_mm,C_wt% and the data below it")
	}
	if n == 0 {
		return "", t.org.errAt(0, -1, "", errorf(ErrEmpty, "the file is empty"), "give a file with a header row and data")
	}
	return "", t.org.errAt(0, -1, "", errorf(ErrEmpty, "the file has only blank or comment lines"),
		"add a header row and data")
}

// csvFrom lets encoding/csv read the rest of the file from the line text
// (line number line, with its line end) on.
func (t *textReader) csvFrom(text string, line int) {
	t.offset = line - 1
	cr := csv.NewReader(io.MultiReader(strings.NewReader(text), t.rows.in))
	cr.Comma, cr.Comment, cr.FieldsPerRecord, cr.ReuseRecord = t.sep, '#', -1, true
	cr.TrimLeadingSpace = t.sep != '\t'
	t.cr = cr
}

// nextRow returns the next data row and its 1-based line; io.EOF at the
// end. A row without quotes comes as raw fields (rowScanner), any other
// as the cells encoding/csv reads.
func (t *textReader) nextRow() (fields [][]byte, cells []string, line int, err error) {
	if t.cr == nil {
		fields, raw, line, err := t.rows.next()
		if err == io.EOF {
			return nil, nil, 0, io.EOF
		}
		if err != nil {
			return nil, nil, 0, t.readError(err, 0)
		}
		if raw == nil {
			return fields, nil, line, nil
		}
		t.csvFrom(string(raw), line)
	}
	cells, line, err = t.nextCSV()
	return nil, cells, line, err
}

// next returns the cells of the next data row and its 1-based line;
// io.EOF at the end.
func (t *textReader) next() ([]string, int, error) {
	fields, cells, line, err := t.nextRow()
	if fields != nil {
		t.cells = t.rows.cells(fields, t.cells)
		return t.cells, line, nil
	}
	return cells, line, err
}

// nextCSV returns the next record that encoding/csv reads and its 1-based
// line; io.EOF at the end.
func (t *textReader) nextCSV() ([]string, int, error) {
	rec, err := t.cr.Read()
	if err == io.EOF {
		return nil, 0, io.EOF
	}
	if err != nil {
		return nil, 0, t.readError(err, 0)
	}
	line, _ := t.cr.FieldPos(0)
	return rec, line + t.offset, nil
}

// readError turns a reading error into an *Error at the right line.
func (t *textReader) readError(err error, line int) error {
	var pe *csv.ParseError
	switch {
	case errors.Is(err, errLineTooLong):
		return t.org.errAt(t.lim.line, -1, "", errorf(ErrTooLarge,
			"line %d is longer than %d bytes", t.lim.line, maxLineBytes),
			"this is not a table with one point per line; check that the file has line breaks")
	case errors.As(err, &pe):
		return t.org.errAt(pe.StartLine+t.offset, -1, "", errorf(ErrFormat, "%v", pe.Err),
			`check the quotes: a field with a quote inside must be enclosed in quotes and its quotes doubled ("")`)
	}
	return t.org.errAt(line, -1, "", errorf(ErrFormat, "read error: %v", err), "check that the file is readable")
}

// sniffSeparator picks the separator that occurs most often outside quotes
// in the header line; ties go to tab, then ';', then ','.
func sniffSeparator(header string) rune {
	count := map[rune]int{}
	quoted := false
	for _, r := range header {
		switch {
		case r == '"':
			quoted = !quoted
		case !quoted && (r == ',' || r == ';' || r == '\t'):
			count[r]++
		}
	}
	best := ','
	for _, r := range []rune{';', '\t'} {
		if count[r] >= count[best] && count[r] > 0 {
			best = r
		}
	}
	return best
}

// decodeText checks the first bytes of a text file and returns a reader
// of UTF-8 text with LF or CRLF line ends (BOM removed). Binary files,
// workbooks given as text and UTF-16 without BOM are refused.
func decodeText(r io.Reader, org origin) (io.Reader, error) {
	br := bufio.NewReaderSize(r, 64<<10)
	head, _ := br.Peek(64 << 10)
	if len(head) == 0 {
		return nil, org.errAt(0, -1, "", errorf(ErrEmpty, "the file is empty"), "give a file with a header row and data")
	}
	switch {
	case bytes.HasPrefix(head, []byte{0xFF, 0xFE}) || bytes.HasPrefix(head, []byte{0xFE, 0xFF}):
		return decodeUTF16(br, head[0] == 0xFF), nil
	case bytes.HasPrefix(head, []byte("PK\x03\x04")):
		return nil, org.errAt(0, -1, "", errorf(ErrFormat, "this is a zip archive (an .xlsx workbook?), not a text table"),
			"give workbooks the extension .xlsx, or export the sheet as CSV")
	case bytes.HasPrefix(head, []byte{0xD0, 0xCF, 0x11, 0xE0}):
		return nil, org.errAt(0, -1, "", errorf(ErrFormat, "this is an old binary Excel (.xls) or other OLE file, not a text table"),
			"save it as .xlsx or CSV")
	case bytes.IndexByte(head, 0) >= 0:
		return nil, org.errAt(0, -1, "", errorf(ErrFormat, "the file holds binary data, not a text table"),
			"export the measurements as CSV (comma, semicolon or tab separated UTF-8 text)")
	}
	if bytes.HasPrefix(head, []byte("\xEF\xBB\xBF")) {
		br.Discard(3)
		head = head[3:]
	}
	if bytes.IndexByte(head, '\r') >= 0 && bytes.IndexByte(head, '\n') < 0 {
		return &crReader{r: br}, nil // classic Mac line ends
	}
	return br, nil
}

// crReader turns CR line ends into LF (the input has no LF at all).
type crReader struct{ r io.Reader }

func (c *crReader) Read(p []byte) (int, error) {
	n, err := c.r.Read(p)
	for i := range p[:n] {
		if p[i] == '\r' {
			p[i] = '\n'
		}
	}
	return n, err
}

// errLineTooLong is returned by lineLimiter.
var errLineTooLong = errors.New("line too long")

// lineLimiter fails once a physical line exceeds max bytes, and counts lines.
type lineLimiter struct {
	r    io.Reader
	max  int
	run  int // bytes since the last '\n'
	line int // 1-based number of the line being read
	err  error
	// total counts the bytes read: the profiles' kept text is allowed
	// this much beyond maxKeptText (textBudget.own).
	total int64
}

func (l *lineLimiter) Read(p []byte) (int, error) {
	if l.err != nil {
		return 0, l.err
	}
	if l.line == 0 {
		l.line = 1
	}
	n, err := l.r.Read(p)
	l.total += int64(n)
	for i := 0; i < n; {
		j := bytes.IndexByte(p[i:n], '\n')
		if j < 0 {
			j = n - i // no line end in the rest
		}
		if l.run+j > l.max { // the byte that makes the line too long
			l.err = errLineTooLong
			return i + l.max - l.run, l.err
		}
		if i += j; i < n { // at a line end
			l.run = 0
			l.line++
			i++
		} else {
			l.run += j
		}
	}
	return n, err
}

// utf16Reader yields the UTF-8 form of UTF-16 text after its BOM
// (Windows "Unicode text" exports). Unpaired surrogates become U+FFFD.
type utf16Reader struct {
	r      *bufio.Reader
	little bool
	out    []byte
	err    error
}

func decodeUTF16(r *bufio.Reader, little bool) io.Reader {
	r.Discard(2)
	return &utf16Reader{r: r, little: little}
}

func (u *utf16Reader) Read(p []byte) (int, error) {
	for len(u.out) == 0 {
		if u.err != nil {
			return 0, u.err
		}
		u.fill()
	}
	n := copy(p, u.out)
	u.out = u.out[n:]
	return n, nil
}

// fill decodes up to 4096 code units into u.out.
func (u *utf16Reader) fill() {
	for i := 0; i < 4096 && u.err == nil; i++ {
		c, ok := u.unit()
		if !ok {
			return
		}
		rn := rune(c)
		if utf16.IsSurrogate(rn) {
			c2, ok := u.unit()
			if !ok {
				rn = utf8.RuneError
			} else {
				rn = utf16.DecodeRune(rn, rune(c2))
			}
		}
		u.out = utf8.AppendRune(u.out, rn)
	}
}

// unit reads one code unit; at the end it sets u.err = io.EOF.
func (u *utf16Reader) unit() (uint16, bool) {
	var b [2]byte
	if _, err := io.ReadFull(u.r, b[:]); err != nil {
		u.err = io.EOF
		return 0, false
	}
	if u.little {
		return uint16(b[1])<<8 | uint16(b[0]), true
	}
	return uint16(b[0])<<8 | uint16(b[1]), true
}

// readTable reads a profile table from a text file.
func readTable(r io.Reader, name, defaultID string) ([]Profile, error) {
	return scanTable(r, name, defaultID, nil)
}

// scanTable reads a profile table from a text file. With st nil it
// returns the profiles; otherwise it hands them to st as their rows are
// read (Each) and returns none.
func scanTable(r io.Reader, name, defaultID string, st *stream) ([]Profile, error) {
	tr, err := openText(r, name)
	if err != nil {
		return nil, err
	}
	t, err := newTable(tr.header, tableOptions{org: tr.org, meta: &tr.meta, headerLine: tr.headerLine,
		defaultID: defaultID, comma: tr.comma, sepComma: tr.sep == ',', marks: tr.marks,
		kept: &textBudget{limit: maxKeptText, own: &tr.lim.total}})
	if err != nil {
		return nil, err
	}
	t.stream = st
	for {
		fields, cells, line, err := tr.nextRow()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, err
		}
		if fields != nil {
			err = t.addFields(fields, line, tr.rows)
		} else {
			err = t.add(cells, line)
		}
		if err != nil {
			return nil, err
		}
	}
	return t.finish()
}

// noteMark passes a number read in column col of line to the decimal-mark
// watch (when a decimal comma is accepted).
func (t *textReader) noteMark(s string, line, col int, column string) error {
	if t.marks == nil {
		return nil
	}
	return t.marks.note(s, line, col, column)
}

// finishMarks refuses an ambiguous number left undecided at the end.
func (t *textReader) finishMarks() error {
	if t.marks == nil {
		return nil
	}
	return t.marks.finish()
}
