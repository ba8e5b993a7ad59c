// Package tempfmt lets the science packages write an absolute temperature
// into a sentence without choosing its unit: Mark(T) stands for "T kelvin"
// and the writer that knows the reader's unit renders it (Render), so that
// a warning reads "915.6 °F (764.04 K)" for a reader working in °F and
// "491.11 °C (764.04 K)" for one in °C. Every path that lets such a
// sentence leave the program renders it: fit.Warning's JSON, the errors of
// package arrhenius and package report's writers. Kelvin renders the
// machine form used in JSON: "764.04 K".
package tempfmt

import (
	"math"
	"strconv"
	"strings"
)

// The mark is "⟦T:<kelvin>⟧" with the kelvin value in Go's shortest
// round-trip form. The brackets (U+27E6, U+27E7) do not occur in any text
// fickfit reads or writes otherwise.
const (
	open  = "⟦T:"
	close = "⟧"
)

// Mark returns the mark of the absolute temperature k (kelvin).
func Mark(k float64) string {
	return open + strconv.FormatFloat(k, 'g', -1, 64) + close
}

// Render replaces every mark in s by f(kelvin). Text without marks is
// returned as it is; a damaged mark is left in place.
func Render(s string, f func(k float64) string) string {
	if !strings.Contains(s, open) {
		return s
	}
	var b strings.Builder
	for {
		i := strings.Index(s, open)
		if i < 0 {
			b.WriteString(s)
			return b.String()
		}
		j := strings.Index(s[i:], close)
		if j < 0 {
			b.WriteString(s)
			return b.String()
		}
		k, err := strconv.ParseFloat(s[i+len(open):i+j], 64)
		b.WriteString(s[:i])
		if err != nil {
			b.WriteString(s[i : i+j+len(close)])
		} else {
			b.WriteString(f(k))
		}
		s = s[i+j+len(close):]
	}
}

// Kelvin writes a temperature for machine outputs and for messages that
// do not know the reader's unit: at most two decimals, no trailing zeros,
// "1213.71 K"; beyond 10⁶ K in scientific notation ("1e+308 K"); a number
// that is not finite as "not a number".
func Kelvin(k float64) string {
	switch {
	case math.IsNaN(k) || math.IsInf(k, 0):
		return "not a number of kelvin"
	case math.Abs(k) >= 1e6:
		return strconv.FormatFloat(k, 'g', 3, 64) + " K"
	}
	s := strconv.FormatFloat(math.Round(k*100)/100, 'f', 2, 64)
	s = strings.TrimRight(strings.TrimRight(s, "0"), ".")
	if s == "-0" {
		s = "0"
	}
	return s + " K"
}

// Plain renders every mark of s in kelvin (Kelvin).
func Plain(s string) string { return Render(s, Kelvin) }
