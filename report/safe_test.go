package report

import (
	"bytes"
	"strings"
	"testing"

	"github.com/fickfit/fickfit/fit"
)

// Common practice, no source (OWASP, "CSV Injection"): text cells that a
// spreadsheet would run get an apostrophe; numbers never change.
func TestSafeCell(t *testing.T) {
	for _, c := range []struct{ in, want string }{
		{"=1+1", "'=1+1"},
		{`=HYPERLINK("http://x","y")`, `'=HYPERLINK("http://x","y")`},
		{"+cmd|' /C calc'!A0", "'+cmd|' /C calc'!A0"},
		{"-2+3", "'-2+3"},
		{"@SUM(A1)", "'@SUM(A1)"},
		{"\t=1", "'\t=1"},
		{"\r=1", "'\r=1"},
		{"-0.012", "-0.012"},
		{"-1.5e-11", "-1.5e-11"},
		{"+3", "+3"},
		{"A=1", "A=1"},
		{"", ""},
		{"F7-2291", "F7-2291"},
	} {
		if got := SafeCell(c.in); got != c.want {
			t.Errorf("SafeCell(%q) = %q, want %q", c.in, got, c.want)
		}
	}
	var b bytes.Buffer
	w := newCSVWriter(&b)
	w.Write([]string{"=A1", "-3.5", "x\x1by"})
	w.Flush()
	if got := b.String(); got != "'=A1,-3.5,x\\x1by\n" {
		t.Errorf("csv row %q", got)
	}
}

// Common practice, no source: what could act on a terminal is escaped,
// also when a character is split between two writes.
func TestEscapeText(t *testing.T) {
	for _, c := range []struct{ in, want string }{
		{"plain µ × 10⁻¹¹ °C\n\tok", "plain µ × 10⁻¹¹ °C\n\tok"},
		{"\x1b]0;title\x07", `\x1b]0;title\x07`},
		{"a\rb", `a\x0db`},
		{"del\x7f", `del\x7f`},
		{"c1 \u009b2J", `c1 \u009b2J`},
		{"rlo \u202eevil", `rlo \u202eevil`},
		{"bad \xff byte", `bad \xff byte`},
	} {
		if got := EscapeText(c.in); got != c.want {
			t.Errorf("EscapeText(%q) = %q, want %q", c.in, got, c.want)
		}
		// Byte by byte through the writer: the same.
		var b bytes.Buffer
		e := newTextEscaper(&b)
		for i := 0; i < len(c.in); i++ {
			e.Write([]byte{c.in[i]})
		}
		e.Close()
		if b.String() != c.want {
			t.Errorf("escaper(%q) = %q, want %q", c.in, b.String(), c.want)
		}
	}
	// A truncated character at the very end is escaped by Close.
	var b bytes.Buffer
	e := newTextEscaper(&b)
	e.Write([]byte("µ"[:1]))
	e.Close()
	if !strings.HasPrefix(b.String(), `\xc2`) {
		t.Errorf("truncated character: %q", b.String())
	}
}

// Common practice, no source: ids that sanitise alike get anchors of their own.
func TestProfileAnchors(t *testing.T) {
	var rs []*fit.Result
	for _, id := range []string{"A 1", "A_1", "A/1", "A_1-2", "a_1"} {
		rs = append(rs, &fit.Result{ID: id})
	}
	got := profileAnchors(rs)
	seen := map[string]string{}
	for _, r := range rs {
		a := strings.ToLower(got[r.ID])
		if a == "" || seen[a] != "" {
			t.Errorf("id %q: anchor %q (also %q)", r.ID, got[r.ID], seen[a])
		}
		seen[a] = r.ID
	}
	if got["A 1"] != "p-A_1" || got["A_1"] != "p-A_1-2" {
		t.Errorf("anchors %v", got)
	}
}
