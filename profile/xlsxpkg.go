package profile

import (
	"archive/zip"
	"bytes"
	"compress/flate"
	"encoding/xml"
	"errors"
	"fmt"
	"hash/crc32"
	"io"
	"path"
	"strconv"
	"strings"
	"unicode/utf8"
)

// A workbook (.xlsx, Office Open XML SpreadsheetML, ECMA-376 Part 1) is a
// zip archive of XML parts. It is read here with archive/zip and
// encoding/xml rather than a spreadsheet library, so that nothing is read
// from a damaged archive, every cell comes with its type (a logical TRUE is
// not the number 1, a formula without a stored result is not a blank
// cell), malformed XML is an error rather than the end of a sheet, and the
// work and text a small file can demand are bounded.

// Workbook limits. MaxUnzipSize bounds the total unpacked size of a
// workbook's parts, as their headers declare it: larger workbooks (zip
// bombs among them) are refused before anything is unpacked. A sheet of
// 10⁶ points unpacks to roughly 100–150 MB, well inside. The parts that
// are not read (styles, drawings, images…) may declare at most
// maxInMemory bytes together; they are unpacked once, to verify them, and
// not kept. A worksheet is held in memory while it is read.
const (
	MaxUnzipSize = 256 << 20
	maxInMemory  = 64 << 20
	// maxUnzipRatio bounds how many times its own size a workbook may
	// unpack to (beyond minUnzipRatioCheck bytes): real workbooks unpack to
	// 3–15 times their size, and the time to read a sheet follows its
	// unpacked size, so a small file cannot ask for a long read.
	maxUnzipRatio      = 100
	minUnzipRatioCheck = 8 << 20
	// maxCellChars is the most characters a cell may hold: Excel's own
	// limit, so no workbook written by Excel exceeds it.
	maxCellChars = 32767
	// maxWorkbookText bounds the text the cells of one workbook deliver,
	// counting each cell once more for itself and a shared string at
	// every cell that uses it: a small file cannot make the reader go
	// through more text than the largest workbook it accepts could hold.
	maxWorkbookText = MaxUnzipSize
	// maxSheetRows and maxSheetColumns are the size of an Excel sheet.
	maxSheetRows    = 1 << 20
	maxSheetColumns = 1 << 14
)

// cfbSignature starts an OLE compound file: an old binary .xls workbook,
// or an .xlsx workbook encrypted with a password (MS-OFFCRYPTO).
var cfbSignature = []byte{0xD0, 0xCF, 0x11, 0xE0, 0xA1, 0xB1, 0x1A, 0xE1}

// damagedHint tells what to do about a damaged workbook.
const damagedHint = "the file was damaged, perhaps in a copy or a transfer: take it again from its source; " +
	"if this is the only copy, open it in a spreadsheet program, check every value against the lab record and save it again"

// xlsxPackage is an opened workbook whose every part has been verified.
type xlsxPackage struct {
	org    origin
	files  map[string]*zip.File // by lower-case part name
	sheets []sheetRef           // worksheets in workbook order
	shared []string             // the shared-strings table
	long   map[int]bool         // shared strings longer than maxCellChars (kept empty in shared)
	text   int64                // characters (and cells) delivered so far, for maxWorkbookText
}

// sheetRef is a worksheet listed by the workbook.
type sheetRef struct {
	name, part string
	hidden     bool
}

// openPackage checks that r holds a readable, undamaged workbook: not a
// compound file, a zip archive within the size limits, each part once,
// each part's checksum and size as its header declares, the same worksheet
// part listed once. It reads the sheet list and the shared strings.
func openPackage(r io.ReaderAt, size int64, org origin) (*xlsxPackage, error) {
	head := make([]byte, len(cfbSignature))
	if n, _ := r.ReadAt(head, 0); n == len(head) && bytes.Equal(head, cfbSignature) {
		return nil, compoundFileError(r, size, org)
	}
	zr, err := zip.NewReader(r, size)
	if err != nil {
		return nil, org.errAt(0, -1, "", errorf(ErrFormat, "not a readable .xlsx workbook (damaged, truncated, or not a zip archive)"),
			"open and re-save it in a spreadsheet program; if it is a text table, give it the extension .csv")
	}
	if err := checkZipSizes(zr, size, org); err != nil {
		return nil, err
	}
	p := &xlsxPackage{org: org, files: make(map[string]*zip.File, len(zr.File))}
	for _, f := range zr.File {
		name := partName(f.Name)
		if strings.HasSuffix(name, "/") {
			continue
		}
		key := strings.ToLower(name)
		if _, dup := p.files[key]; dup {
			return nil, org.errAt(0, -1, "", errorf(ErrFormat, "the workbook is damaged: the archive holds the part %s twice",
				quote(name)), damagedHint)
		}
		p.files[key] = f
	}
	for _, f := range zr.File {
		if err := verifyEntry(f); err != nil {
			return nil, damagedPart(org, f, err)
		}
	}
	if err := p.readStructure(); err != nil {
		return nil, err
	}
	return p, nil
}

// partName normalises a zip entry name to a part name ("xl/workbook.xml").
func partName(name string) string {
	return strings.TrimPrefix(strings.ReplaceAll(name, "\\", "/"), "/")
}

// checkZipSizes refuses, from the zip directory alone (nothing is
// unpacked), a workbook whose parts declare more than MaxUnzipSize bytes
// in all, or more than maxInMemory bytes in the parts that are not read,
// or that unpacks to more than maxUnzipRatio times its own size (beyond
// a first minUnzipRatioCheck bytes). The declared sizes bind: an entry
// that unpacks to more is damaged.
func checkZipSizes(zr *zip.Reader, size int64, org origin) error {
	var total, other uint64
	for _, f := range zr.File {
		n := f.UncompressedSize64
		total += min(n, MaxUnzipSize+1)
		if !readPart(f.Name) {
			other += min(n, maxInMemory+1)
		}
		if total > MaxUnzipSize || other > maxInMemory {
			return org.errAt(0, -1, "", errorf(ErrTooLarge,
				"the workbook unpacks to more than the limit (%d MiB of sheets, %d MiB of other parts): a zip bomb, or far larger than a table of profiles; it was not read",
				MaxUnzipSize>>20, maxInMemory>>20), "export the data as CSV, or split the workbook")
		}
	}
	if total > minUnzipRatioCheck && total > maxUnzipRatio*uint64(max(size, 1)) {
		return org.errAt(0, -1, "", errorf(ErrTooLarge,
			"the workbook unpacks to %d times its own size (%s MiB from %s KiB); workbooks of measurements unpack to about 3–15 times their size, so it was not read",
			total/uint64(max(size, 1)), fmtNum(float64(total)/(1<<20)), fmtNum(float64(size)/(1<<10))),
			"open and re-save it in a spreadsheet program, or export the data as CSV")
	}
	return nil
}

// readPart reports the parts whose content is read (worksheets and the
// shared-strings table); the others are only verified.
func readPart(name string) bool {
	n := strings.ToLower(partName(name))
	return strings.HasPrefix(n, "xl/worksheets/") || n == "xl/sharedstrings.xml"
}

// errLonger is the archive/zip complaint about an entry longer than declared.
var errLonger = errors.New("longer than declared")

// verifyEntry unpacks one entry, checking its size and checksum against
// its header (archive/zip checks both at the end of the entry; the
// checksum is computed here too, since archive/zip skips a declared 0).
func verifyEntry(f *zip.File) error {
	if f.Flags&0x1 != 0 {
		return errEncryptedEntry
	}
	rc, err := f.Open()
	if err != nil {
		return fmt.Errorf("%w: %w", errLocalHeader, err)
	}
	defer rc.Close()
	h := crc32.NewIEEE()
	_, err = io.Copy(h, rc)
	switch {
	case errors.Is(err, zip.ErrFormat): // while reading: more data than declared
		return errLonger
	case err != nil:
		return err
	case h.Sum32() != f.CRC32:
		return zip.ErrChecksum
	}
	return nil
}

// errEncryptedEntry marks a zip entry encrypted with a password;
// errLocalHeader an entry whose own header cannot be read.
var (
	errEncryptedEntry = errors.New("encrypted entry")
	errLocalHeader    = errors.New("local header")
)

// damagedPart explains why entry f failed verification.
func damagedPart(org origin, f *zip.File, err error) error {
	name := quote(partName(f.Name))
	var why string
	var corrupt flate.CorruptInputError
	switch {
	case errors.Is(err, errEncryptedEntry):
		return org.errAt(0, -1, "", errorf(ErrFormat, "the workbook is password-protected (part %s is encrypted)", name),
			"open it in a spreadsheet program with its password and save a copy without one")
	case errors.Is(err, zip.ErrChecksum):
		why = "fails its checksum (its content is not what was written)"
	case errors.Is(err, errLonger):
		why = fmt.Sprintf("holds more data than the %d bytes its header declares", f.UncompressedSize64)
	case errors.Is(err, io.ErrUnexpectedEOF):
		why = fmt.Sprintf("is shorter than the %d bytes its header declares (truncated)", f.UncompressedSize64)
	case errors.As(err, &corrupt):
		why = "holds corrupt compressed data"
	case errors.Is(err, errLocalHeader) && !errors.Is(err, zip.ErrAlgorithm):
		why = "has a damaged header"
	case errors.Is(err, zip.ErrAlgorithm):
		return org.errAt(0, -1, "", errorf(ErrFormat, "part %s of the workbook is compressed with a method that cannot be read", name),
			"open and re-save it in a spreadsheet program, or export the sheets as CSV")
	default:
		why = "cannot be unpacked (" + clipN(err.Error(), 80) + ")"
	}
	return org.errAt(0, -1, "", errorf(ErrFormat, "the workbook is damaged: part %s %s; nothing was read from it", name, why),
		damagedHint)
}

// compoundFileError explains a compound file given as .xlsx: encrypted
// with a password when it holds an EncryptionInfo stream (MS-OFFCRYPTO
// §2.3.4), otherwise an old binary workbook with the wrong extension.
func compoundFileError(r io.ReaderAt, size int64, org origin) error {
	head := make([]byte, min(size, 1<<20))
	n, _ := r.ReadAt(head, 0)
	if bytes.Contains(head[:n], utf16le("EncryptionInfo")) || bytes.Contains(head[:n], utf16le("EncryptedPackage")) {
		return org.errAt(0, -1, "", errorf(ErrFormat, "the workbook is password-protected (encrypted), so it cannot be read"),
			"open it in a spreadsheet program with its password and save a copy without one (File › Info › Protect Workbook › Encrypt with Password, cleared)")
	}
	return org.errAt(0, -1, "", errorf(ErrFormat, "this is an old binary Excel workbook (.xls) or another OLE file, not an .xlsx workbook"),
		"open it in a spreadsheet program and save it as .xlsx, or export the sheets as CSV")
}

// utf16le encodes an ASCII name as a compound file stores stream names.
func utf16le(s string) []byte {
	b := make([]byte, 0, 2*len(s))
	for i := 0; i < len(s); i++ {
		b = append(b, s[i], 0)
	}
	return b
}

// part returns the content of a verified part, nil when there is none.
func (p *xlsxPackage) part(name string) ([]byte, error) {
	f := p.files[strings.ToLower(name)]
	if f == nil {
		return nil, nil
	}
	rc, err := f.Open()
	if err != nil {
		return nil, damagedPart(p.org, f, err)
	}
	defer rc.Close()
	b := make([]byte, 0, f.UncompressedSize64)
	buf := bytes.NewBuffer(b)
	if _, err := io.Copy(buf, rc); err != nil {
		return nil, damagedPart(p.org, f, err)
	}
	return buf.Bytes(), nil
}

// relationship is one entry of a relationships part.
type relationship struct {
	ID         string `xml:"Id,attr"`
	Type       string `xml:"Type,attr"`
	Target     string `xml:"Target,attr"`
	TargetMode string `xml:"TargetMode,attr"`
}

// relationships reads the relationships part of source (nil when absent).
func (p *xlsxPackage) relationships(source string) ([]relationship, error) {
	relsName := path.Join(path.Dir(source), "_rels", path.Base(source)+".rels")
	if source == "" {
		relsName = "_rels/.rels"
	}
	data, err := p.part(relsName)
	if data == nil || err != nil {
		return nil, err
	}
	var rels struct {
		Rel []relationship `xml:"Relationship"`
	}
	if err := xml.Unmarshal(data, &rels); err != nil {
		return nil, p.malformed(relsName, err)
	}
	return rels.Rel, nil
}

// target resolves a relationship target against the part it belongs to.
func target(source, t string) string {
	if strings.HasPrefix(t, "/") {
		return path.Clean(strings.TrimPrefix(t, "/"))
	}
	return strings.TrimPrefix(path.Clean(path.Join(path.Dir(source), t)), "/")
}

// relType reports whether relationship type t is of the given kind
// ("worksheet", "sharedStrings", "officeDocument"), in the transitional
// or the strict namespace.
func relType(t, kind string) bool { return strings.HasSuffix(t, "/"+kind) }

// malformed reports a part whose XML cannot be read.
func (p *xlsxPackage) malformed(part string, err error) error {
	return p.org.errAt(0, -1, "", errorf(ErrFormat, "the workbook is damaged: the XML of part %s is malformed (%s)",
		quote(part), clipN(err.Error(), 80)), damagedHint)
}

// readStructure finds the workbook part, its worksheets and its shared
// strings. A worksheet part listed twice is refused: reading it again for
// every listing is work without end for a small file.
func (p *xlsxPackage) readStructure() error {
	book := ""
	rels, err := p.relationships("")
	if err != nil {
		return err
	}
	for _, r := range rels {
		if relType(r.Type, "officeDocument") {
			book = target("", r.Target)
			break
		}
	}
	if book == "" {
		book = "xl/workbook.xml"
	}
	data, err := p.part(book)
	if err != nil {
		return err
	}
	if data == nil {
		return p.org.errAt(0, -1, "", errorf(ErrFormat, "not an .xlsx workbook: the archive has no workbook part"),
			"give an Excel workbook (.xlsx), or export the data as CSV")
	}
	var wb struct {
		Sheets []struct {
			Name  string `xml:"name,attr"`
			State string `xml:"state,attr"`
			RID   string `xml:"id,attr"`
		} `xml:"sheets>sheet"`
	}
	if err := xml.Unmarshal(data, &wb); err != nil {
		return p.malformed(book, err)
	}
	if rels, err = p.relationships(book); err != nil {
		return err
	}
	byID := make(map[string]relationship, len(rels))
	for _, r := range rels {
		byID[r.ID] = r
		if relType(r.Type, "sharedStrings") && p.shared == nil {
			if err := p.readShared(target(book, r.Target)); err != nil {
				return err
			}
		}
	}
	if p.shared == nil {
		if err := p.readShared("xl/sharedStrings.xml"); err != nil {
			return err
		}
	}
	names, parts := map[string]string{}, map[string]string{}
	for _, s := range wb.Sheets {
		if other, dup := names[strings.ToLower(s.Name)]; dup {
			return p.org.errAt(0, -1, "", errorf(ErrFormat, "the workbook is damaged: it lists two sheets named %s and %s",
				quote(other), quote(s.Name)), damagedHint)
		}
		names[strings.ToLower(s.Name)] = s.Name
		r, ok := byID[s.RID]
		if !ok || r.TargetMode == "External" {
			return p.org.errAt(0, -1, "", errorf(ErrFormat, "the workbook is damaged: sheet %s points at no part of the file",
				quote(s.Name)), damagedHint)
		}
		part := target(book, r.Target)
		if other, dup := parts[strings.ToLower(part)]; dup {
			return p.org.errAt(0, -1, "", errorf(ErrFormat,
				"the workbook lists the same part %s as sheet %s and as sheet %s; a workbook lists each sheet once, so it was not read",
				quote(part), quote(other), quote(s.Name)), damagedHint)
		}
		parts[strings.ToLower(part)] = s.Name
		if !relType(r.Type, "worksheet") {
			continue // chart sheets, dialog sheets, macro sheets hold no table
		}
		if p.files[strings.ToLower(part)] == nil {
			return p.org.errAt(0, -1, "", errorf(ErrFormat, "the workbook is damaged: sheet %s points at part %s, which the file does not hold",
				quote(s.Name), quote(part)), damagedHint)
		}
		p.sheets = append(p.sheets, sheetRef{name: s.Name, part: part, hidden: s.State == "hidden" || s.State == "veryHidden"})
	}
	return nil
}

// readShared reads the shared-strings table (ECMA-376 Part 1, §18.4): the
// text of each item is its <t> element, or the <t> elements of its rich
// text runs <r>, without the phonetic runs <rPh>. An item longer than
// maxCellChars is not kept: a cell that uses it is refused.
func (p *xlsxPackage) readShared(name string) error {
	data, err := p.part(name)
	if data == nil || err != nil {
		return err
	}
	p.shared, p.long = []string{}, map[int]bool{}
	d := xml.NewDecoder(bytes.NewReader(data))
	var cur []byte
	inItem, inText, long := false, false, false
	for {
		tok, err := d.Token()
		if err == io.EOF {
			return nil
		}
		if err != nil {
			return p.malformed(name, err)
		}
		switch el := tok.(type) {
		case xml.StartElement:
			switch el.Name.Local {
			case "si":
				inItem, cur, long = true, cur[:0], false
			case "rPh":
				if err := d.Skip(); err != nil {
					return p.malformed(name, err)
				}
			case "t":
				inText = inItem
			}
		case xml.EndElement:
			switch el.Name.Local {
			case "t":
				inText = false
			case "si":
				inItem = false
				if long || (len(cur) > maxCellChars && utf8.RuneCount(cur) > maxCellChars) {
					p.long[len(p.shared)] = true
					p.shared = append(p.shared, "")
				} else {
					p.shared = append(p.shared, string(cur))
				}
			}
		case xml.CharData:
			if inText && !long {
				cur = append(cur, el...)
				long = len(cur) > 4*maxCellChars // more characters than a cell may hold, whatever the encoding
				if long {
					cur = cur[:0]
				}
			}
		}
	}
}

// sharedString returns shared string i as cell ref's text.
func (p *xlsxPackage) sharedString(v string) (string, bool, error) {
	i, err := strconv.Atoi(strings.TrimSpace(v))
	if err != nil || i < 0 || i >= len(p.shared) {
		return "", false, errors.New("refers to a shared string the file does not hold")
	}
	return p.shared[i], p.long[i], nil
}
