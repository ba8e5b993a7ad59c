package profile

import "strings"

// Where a decimal comma is allowed (text files separated by ';' or tab,
// and numbers typed as text in worksheets), "1.025" may be one and a
// fortieth or, with a thousands dot, one thousand and twenty-five; "1,025"
// likewise. A number is ambiguous when its integer part has 1–3 digits
// without a leading zero and its fraction exactly 3 digits, with no
// exponent. Such a number is read only when the file's other numbers show
// the same mark as its decimal mark; it is refused, at its own line and
// column, when they show the other mark or none at all.

// mark is the decimal mark of a number as written.
type mark int

const (
	markNone           mark = iota // no ',' or '.' (an integer, "1e-3")
	markComma                      // a comma that can only be a decimal comma ("0,861", "12,5")
	markDot                        // a point that can only be a decimal point
	markCommaAmbiguous             // "1,025"
	markDotAmbiguous               // "1.025"
)

// markOf classifies a number that parseNumber accepted.
func markOf(s string) mark {
	return markOfDigits(strings.TrimLeft(strings.TrimSpace(s), "+-−"))
}

// markOfDigits classifies a number without white space or sign by its
// first comma or point: "1,025" and "1.025" are ambiguous (a decimal mark
// or a thousands separator), "1,5" and "0.025" are not.
func markOfDigits[T ~string | ~[]byte](t T) mark {
	i := 0
	for i < len(t) && t[i] != ',' && t[i] != '.' {
		i++
	}
	if i == len(t) {
		return markNone
	}
	comma := t[i] == ','
	whole, frac := t[:i], t[i+1:]
	ambiguous := len(whole) >= 1 && len(whole) <= 3 && whole[0] != '0' && len(frac) == 3 && allDigits(frac)
	switch {
	case comma && ambiguous:
		return markCommaAmbiguous
	case comma:
		return markComma
	case ambiguous:
		return markDotAmbiguous
	}
	return markDot
}

func allDigits[T ~string | ~[]byte](s T) bool {
	for i := 0; i < len(s); i++ {
		if s[i] < '0' || s[i] > '9' {
			return false
		}
	}
	return true
}

// markCell is a number as written and where it was read.
type markCell struct {
	text   string
	line   int
	col    int
	column string
}

// decimalMarks watches the numbers of one file or sheet in reading order.
type decimalMarks struct {
	org  origin
	sure [2]markCell // first number whose mark can only be decimal: [0] comma, [1] point
	amb  [2]markCell // first ambiguous number: [0] with a comma, [1] with a point
}

// note records the number s (accepted by parseNumber) read in column col
// of line; it fails when s, or an ambiguous number read earlier, is now
// known to be ambiguous.
func (d *decimalMarks) note(s string, line, col int, column string) error {
	c := markCell{text: strings.TrimSpace(s), line: line, col: col, column: column}
	switch m := markOf(s); m {
	case markComma, markDot:
		k := 0
		if m == markDot {
			k = 1
		}
		if d.sure[k].line == 0 {
			d.sure[k] = c
		}
		if a := d.amb[1-k]; a.line != 0 {
			return d.ambiguous(a, 1-k)
		}
	case markCommaAmbiguous, markDotAmbiguous:
		k := 0
		if m == markDotAmbiguous {
			k = 1
		}
		if d.sure[1-k].line != 0 {
			return d.ambiguous(c, k)
		}
		if d.amb[k].line == 0 {
			d.amb[k] = c
		}
	}
	return nil
}

// finish refuses an ambiguous number when no other number of the file
// showed its mark to be the decimal mark.
func (d *decimalMarks) finish() error {
	for k, a := range d.amb {
		if a.line != 0 && d.sure[k].line == 0 {
			return d.ambiguous(a, k)
		}
	}
	return nil
}

// ambiguous explains the ambiguous number a, whose mark is [0] a comma or
// [1] a point.
func (d *decimalMarks) ambiguous(a markCell, k int) error {
	sep, name, other := ",", "comma", "."
	if k == 1 {
		sep, name, other = ".", "point", ","
	}
	whole := strings.Replace(a.text, sep, "", 1)
	why := "and no other number in the file shows which"
	decimal := a.text + "0" // a fourth decimal makes the mark a decimal mark
	if o := d.sure[1-k]; o.line != 0 {
		why = "and this file writes decimals with " + map[bool]string{true: "a point", false: "a comma"}[k == 0] +
			" (" + quote(o.text) + " at " + d.org.place(o.line, o.col) + ")"
		decimal = strings.Replace(a.text, sep, other, 1)
	}
	return d.org.errAt(a.line, a.col, a.column, errorf(ErrNumber,
		"%s is ambiguous: the %s may be a thousands separator (%s) or a decimal %s (%s), %s",
		quote(a.text), name, clip(whole), name, clip(strings.Replace(a.text, sep, ".", 1)), why),
		"write "+clip(decimal)+" if it is a decimal, or "+clip(whole)+" if it is a whole number (no thousands separators)")
}
