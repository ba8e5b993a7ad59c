package report

import (
	"encoding/csv"
	"fmt"
	"io"
	"strconv"
	"unicode/utf8"
)

// Text from the inputs (ids, lots, sources, metadata, messages quoting a
// cell) reaches outputs that other programs act on. Two rules keep it
// inert (docs/output.md, "Text from the inputs"):
//
//   - CSV: a text cell starting with '=', '+', '-', '@', a tab or a
//     carriage return is a formula to a spreadsheet program; it gets a
//     leading apostrophe ("'=HYPERLINK(…)"), which the program shows as
//     text. A cell that is a number (−0.012, -1.5e-11) is left alone, so
//     negative numbers stay numbers. (OWASP, "CSV Injection"; common
//     practice.)
//   - Text for people, and CSV cells: control characters other than newline and tab
//     (ESC, CR, BEL…, DEL, the C1 controls U+0080–U+009F), the bidirectional
//     overrides (U+202A–U+202E, U+2066–U+2069) and bytes that are not
//     UTF-8 are written as escapes (\x1b, \u009b, \u202e), so that an id
//     cannot move the cursor, retitle or clear a terminal, or reorder what
//     a reader sees.

// SafeCell returns s as a CSV cell that a spreadsheet program shows as
// text: with a leading apostrophe when it starts like a formula and is not
// a number.
func SafeCell(s string) string {
	if s == "" {
		return s
	}
	switch s[0] {
	case '=', '+', '-', '@', '\t', '\r':
		if _, err := strconv.ParseFloat(s, 64); err == nil {
			return s
		}
		return "'" + s
	}
	return s
}

// csvWriter is encoding/csv's writer with every cell through EscapeText
// and SafeCell: the one CSV writer of fickfit's outputs.
type csvWriter struct{ *csv.Writer }

func newCSVWriter(w io.Writer) *csvWriter { return &csvWriter{csv.NewWriter(w)} }

// Write writes one row, neutralising cells that would run as formulas or
// act on a terminal.
func (c *csvWriter) Write(row []string) error {
	safe, copied := row, false
	for i, cell := range row {
		if s := SafeCell(EscapeText(cell)); s != cell {
			if !copied {
				safe, copied = append([]string(nil), row...), true
			}
			safe[i] = s
		}
	}
	return c.Writer.Write(safe)
}

// EscapeText returns s with the characters that could act on a terminal
// written as escapes (see the rules above); newline and tab are kept.
func EscapeText(s string) string {
	if !needsEscape(s) {
		return s
	}
	var b []byte
	b, _ = appendEscaped(b, []byte(s), true)
	return string(b)
}

// needsEscape tells whether s holds anything EscapeText changes.
func needsEscape(s string) bool {
	for i := 0; i < len(s); {
		c := s[i]
		if c < utf8.RuneSelf {
			if unsafeByte(c) {
				return true
			}
			i++
			continue
		}
		r, n := utf8.DecodeRuneInString(s[i:])
		if r == utf8.RuneError && n == 1 || unsafeRune(r) {
			return true
		}
		i += n
	}
	return false
}

func unsafeByte(c byte) bool { return c < 0x20 && c != '\n' && c != '\t' || c == 0x7f }

func unsafeRune(r rune) bool {
	return r >= 0x80 && r <= 0x9f || r >= 0x202a && r <= 0x202e || r >= 0x2066 && r <= 0x2069
}

// appendEscaped appends p to b with the unsafe characters escaped. Unless
// final, an incomplete UTF-8 sequence at the end is not consumed: it is
// returned as rest, to be completed by the next write.
func appendEscaped(b, p []byte, final bool) (out, rest []byte) {
	for i := 0; i < len(p); {
		c := p[i]
		if c < utf8.RuneSelf {
			if unsafeByte(c) {
				b = fmt.Appendf(b, `\x%02x`, c)
				i++
				continue
			}
			j := i + 1 // copy a run of safe ASCII at once
			for j < len(p) && p[j] < utf8.RuneSelf && !unsafeByte(p[j]) {
				j++
			}
			b = append(b, p[i:j]...)
			i = j
			continue
		}
		if !final && !utf8.FullRune(p[i:]) {
			return b, p[i:]
		}
		r, n := utf8.DecodeRune(p[i:])
		switch {
		case r == utf8.RuneError && n == 1:
			b = fmt.Appendf(b, `\x%02x`, c)
		case unsafeRune(r):
			b = fmt.Appendf(b, `\u%04x`, r)
		default:
			b = append(b, p[i:i+n]...)
		}
		i += n
	}
	return b, nil
}

// textEscaper is a writer that escapes what EscapeText escapes, also when
// a character is split between two writes. Close writes what is left.
type textEscaper struct {
	w    io.Writer
	rest []byte
	buf  []byte
}

func newTextEscaper(w io.Writer) *textEscaper { return &textEscaper{w: w} }

func (t *textEscaper) Write(p []byte) (int, error) {
	in := p
	if len(t.rest) > 0 {
		in = append(t.rest, p...)
	}
	t.buf, t.rest = appendEscaped(t.buf[:0], in, false)
	t.rest = append([]byte(nil), t.rest...)
	if _, err := t.w.Write(t.buf); err != nil {
		return 0, err
	}
	return len(p), nil
}

// Close writes an incomplete character left at the end as escapes.
func (t *textEscaper) Close() error {
	if len(t.rest) == 0 {
		return nil
	}
	t.buf, _ = appendEscaped(t.buf[:0], t.rest, true)
	t.rest = nil
	_, err := t.w.Write(t.buf)
	return err
}
