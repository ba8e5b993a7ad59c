package profile

import (
	"bytes"
	"math"
	"strconv"
)

// The fast path of a text table's data rows. A long table of a lab export
// has a million rows that all look alike: the same profile as the row
// before, numbers that parse, per-profile cells equal to the first ones.
// addFast reads such a row from the scanner's byte slices, with no string,
// map look-up or error built; any other row (the first one, a new profile,
// a blank or bad cell, a decimal mark to note) goes to add, which reads it
// exactly as before and gives the same profiles and the same errors.

// addFields adds one data row given as the raw fields of rs.
func (t *table) addFields(fields [][]byte, line int, rs *rowScanner) error {
	if t.addFast(fields, line) {
		return nil
	}
	t.cellBuf = rs.cells(fields, t.cellBuf)
	return t.add(t.cellBuf, line)
}

// trimmedAt returns cell i of a row ("" beyond the row).
func trimmedAt(cells [][]byte, i int) []byte {
	if i < len(cells) {
		return cells[i]
	}
	return nil
}

// addFast adds the row when it is an ordinary point of the profile of the
// row before and reports whether it did; when it reports false nothing has
// changed. What it accepts, add would accept with the same result.
func (t *table) addFast(fields [][]byte, line int) bool {
	if t.valueCol < 0 || t.kinds != nil {
		return false
	}
	cells := t.trimmed[:0] // the fields trimmed of white space, as cellAt trims
	blank := true
	for i, c := range fields {
		if n := len(c); n > 0 && !(c[0] > ' ' && c[0] < 0x80 && c[n-1] > ' ' && c[n-1] < 0x80) {
			c = bytes.TrimSpace(c) // only where an end may be white space
		}
		cells = append(cells, c)
		if len(c) == 0 {
			continue
		}
		if i >= len(t.cols) || t.cols[i].kind == colIgnore {
			return false
		}
		blank = false
	}
	t.trimmed = cells
	if blank {
		return true // add skips blank rows
	}
	b := t.cur
	if t.idCol >= 0 {
		id := trimmedAt(cells, t.idCol)
		if b == nil || len(id) == 0 || string(id) != t.curRaw {
			return false
		}
	}
	if b == nil {
		return false
	}
	dc := &t.cols[t.depthCol]
	d, ok := t.fastNumber(trimmedAt(cells, t.depthCol))
	if !ok {
		return false
	}
	depth := dc.size.si(d)
	if math.Abs(depth) > maxMetres || math.IsNaN(depth) || (d < 0 && !dc.signed) {
		return false
	}
	v, ok := t.fastNumber(trimmedAt(cells, t.valueCol))
	if !ok || math.Abs(v) > maxMeasured {
		return false
	}
	var s float64
	if t.sigmaCol >= 0 {
		if s, ok = t.fastNumber(trimmedAt(cells, t.sigmaCol)); !ok || !(s > 0) || s > maxMeasured || s < minSigma {
			return false
		}
	}
	for _, i := range t.perProfile {
		c := trimmedAt(cells, i)
		if len(c) == 0 {
			continue
		}
		if f := &b.fixed[i]; !f.set || string(c) != f.text {
			return false
		}
	}
	p := &b.p
	if t.sigmaCol >= 0 {
		p.Sigma = append(p.Sigma, s)
	}
	p.Depth = append(p.Depth, depth)
	p.Value = append(p.Value, v)
	p.Line = append(p.Line, line)
	t.rows++
	return true
}

// fastNumber parses a trimmed text cell as numberAt would, and reports
// false where numberAt would fail or would have to note a decimal mark
// (then add reads the row).
func (t *table) fastNumber(c []byte) (float64, bool) {
	v, ok := parseNumberBytes(c, t.comma)
	if !ok {
		return 0, false
	}
	if t.marks != nil && !t.marks.quiet(c) {
		return 0, false
	}
	return v, true
}

// parseNumberBytes is parseNumber on a trimmed cell, for the numbers it
// accepts written with ASCII characters only; ok is false for every cell
// parseNumber refuses (and for a leading minus sign U+2212, left to it).
func parseNumberBytes(c []byte, comma bool) (v float64, ok bool) {
	if len(c) == 0 || c[0] >= 0x80 {
		return 0, false
	}
	var buf [48]byte
	if comma {
		if i := bytes.IndexByte(c, ','); i >= 0 {
			if bytes.IndexByte(c[i+1:], ',') >= 0 || bytes.IndexByte(c, '.') >= 0 {
				return 0, false
			}
			c = append(buf[:0], c...) // on the heap when longer than buf
			c[i] = '.'
		}
	}
	return parseDecimal(c)
}

// parseDecimal reads [sign] digits [. digits] [e [sign] digits] with at
// least one digit before the exponent (the numbers plainDecimal accepts)
// as strconv.ParseFloat does, refusing an infinite result. A mantissa of
// at most 19 significant digits below 2^52 with a power of ten within ±22
// is converted by one multiplication or division of exact doubles, which
// rounds correctly and so gives the double strconv gives (the exact case
// strconv itself tries first; W. D. Clinger, PLDI 1990, from memory); any
// other number is left to strconv.
func parseDecimal(c []byte) (float64, bool) {
	i, neg := 0, false
	if len(c) > 0 && (c[0] == '+' || c[0] == '-') {
		neg, i = c[0] == '-', 1
	}
	var mant uint64
	digits, sig, exp := 0, 0, 0
	for ; i < len(c) && c[i] >= '0' && c[i] <= '9'; i++ {
		digits++
		if sig > 0 || c[i] != '0' {
			sig++
			mant = mant*10 + uint64(c[i]-'0')
		}
	}
	if i < len(c) && c[i] == '.' {
		for i++; i < len(c) && c[i] >= '0' && c[i] <= '9'; i++ {
			digits++
			if sig > 0 || c[i] != '0' {
				sig++
				mant = mant*10 + uint64(c[i]-'0')
			}
			exp--
		}
	}
	if digits == 0 {
		return 0, false
	}
	if i < len(c) && (c[i] == 'e' || c[i] == 'E') {
		i++
		eneg := false
		if i < len(c) && (c[i] == '+' || c[i] == '-') {
			eneg, i = c[i] == '-', i+1
		}
		e, ed := 0, 0
		for ; i < len(c) && c[i] >= '0' && c[i] <= '9'; i++ {
			if e < 1e6 {
				e = e*10 + int(c[i]-'0')
			}
			ed++
		}
		if ed == 0 {
			return 0, false
		}
		if eneg {
			e = -e
		}
		exp += e
	}
	if i != len(c) {
		return 0, false
	}
	if sig <= 19 && mant>>52 == 0 && exp >= -22 && exp <= 22 {
		f := float64(mant)
		if exp >= 0 {
			f *= pow10[exp]
		} else {
			f /= pow10[-exp]
		}
		if neg {
			f = -f
		}
		return f, true
	}
	v, err := strconv.ParseFloat(string(c), 64)
	if err != nil || math.IsInf(v, 0) || math.IsNaN(v) {
		return 0, false
	}
	return v, true
}

// pow10 holds the powers of ten that are exact doubles.
var pow10 = [...]float64{1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10,
	1e11, 1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22}

// quiet reports whether noting the number c (as written, trimmed, accepted
// by parseNumber) would change nothing and raise nothing: its mark is none,
// or a mark already seen with nothing against it.
func (d *decimalMarks) quiet(c []byte) bool {
	switch m := markOfBytes(c); m {
	case markNone:
		return true
	case markComma, markDot:
		k := 0
		if m == markDot {
			k = 1
		}
		return d.sure[k].line != 0 && d.amb[1-k].line == 0
	default:
		k := 0
		if m == markDotAmbiguous {
			k = 1
		}
		return d.sure[1-k].line == 0 && d.amb[k].line != 0
	}
}

// markOfBytes is markOf for a trimmed number with an ASCII sign.
func markOfBytes(c []byte) mark {
	for len(c) > 0 && (c[0] == '+' || c[0] == '-') {
		c = c[1:]
	}
	return markOfDigits(c)
}
