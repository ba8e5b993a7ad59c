package profile

import (
	"bufio"
	"bytes"
	"io"
	"unicode"
)

// rowScanner splits the data rows of a delimited text table into fields
// without making a string per field: the fields are byte slices into its
// buffer, valid until the next call. It reads rows exactly as the
// encoding/csv settings of the text reader would (comment character '#',
// any number of fields, leading space trimmed unless tab-separated) as
// long as a row holds no quote character; at the first row that does, it
// hands the raw line back and the reader lets encoding/csv read that row
// and the rest of the file.
//
// What encoding/csv does to a line without quotes, and this scanner too:
// a trailing "\r\n" counts as "\n" (and a '\r' before the end of the file
// is dropped); empty lines and lines whose first character is '#' are
// skipped; the fields are the text between separators, the last one
// without the line end. Leading white space (unicode.IsSpace) of each
// field is trimmed when the separator is not a tab: the fields here keep
// it (the table trims every cell), and cells builds the strings
// encoding/csv would return.
type rowScanner struct {
	in   *bufio.Reader
	sep  byte
	trim bool
	// line is the number of the last line read (1-based, counting every
	// physical line of the file).
	line   int
	fields [][]byte
	long   []byte // a line longer than the buffer, assembled
}

// next returns the fields of the next row and its line number; io.EOF at
// the end. When the row holds a quote, fields is nil and raw is the line
// as read (with its line end), for encoding/csv.
func (s *rowScanner) next() (fields [][]byte, raw []byte, line int, err error) {
	for {
		b, err := s.readLine()
		if len(b) == 0 && err != nil {
			return nil, nil, 0, err
		}
		s.line++
		if err != nil && err != io.EOF {
			return nil, nil, 0, err
		}
		content := lineContent(b)
		if len(content) == 0 || content[0] == '#' {
			if err == io.EOF {
				return nil, nil, 0, io.EOF
			}
			continue
		}
		if fields := s.split(content); fields != nil {
			return fields, nil, s.line, nil
		}
		return nil, b, s.line, nil // a quote
	}
}

// lineContent is a line without its end: "\n", "\r\n", or a '\r' that
// ends the file.
func lineContent(b []byte) []byte {
	n := len(b)
	if n > 0 && b[n-1] == '\n' {
		n--
	}
	if n > 0 && b[n-1] == '\r' {
		n--
	}
	return b[:n]
}

// split splits the content of a line at the separator, in one pass (the
// fields of a table row are short: a loop beats a search per field); nil
// when the line holds a quote.
func (s *rowScanner) split(content []byte) [][]byte {
	fields := s.fields[:0]
	start := 0
	for i, c := range content {
		switch c {
		case s.sep:
			fields = append(fields, content[start:i])
			start = i + 1
		case '"':
			return nil
		}
	}
	fields = append(fields, content[start:])
	s.fields = fields
	return fields
}

// readLine reads one line with its end ('\n'), assembling lines longer
// than the buffer. At the end of the file it returns the last line, if
// any, with io.EOF.
func (s *rowScanner) readLine() ([]byte, error) {
	b, err := s.in.ReadSlice('\n')
	if err != bufio.ErrBufferFull {
		return b, err
	}
	s.long = append(s.long[:0], b...)
	for err == bufio.ErrBufferFull {
		b, err = s.in.ReadSlice('\n')
		s.long = append(s.long, b...)
	}
	return s.long, err
}

// cells returns the strings encoding/csv would return for the fields of a
// row without quotes.
func (s *rowScanner) cells(fields [][]byte, buf []string) []string {
	buf = buf[:0]
	for _, f := range fields {
		if s.trim {
			f = bytes.TrimLeftFunc(f, unicode.IsSpace)
		}
		buf = append(buf, string(f))
	}
	return buf
}
