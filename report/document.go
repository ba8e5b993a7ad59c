package report

import (
	"bufio"
	"fmt"
	"io"
	"path/filepath"
	"strconv"
	"strings"

	"github.com/fickfit/fickfit/internal/jsonx"
)

// Document is a result that writes itself for people and for programs.
// Every result kind of fickfit implements it: fit results (Fits),
// Arrhenius lines (Arrhenius), back-calculations (Backcalc), predictions
// (Predictions), lot comparisons (Comparison), the reference table
// (References), Matano analyses (Matano) and a whole campaign
// (CampaignReport). A new output format derived from these three (see
// Format) needs no change to any kind; a new representation is a new
// method here, and the compiler then lists every kind that must learn it.
//
// The contract of the three forms (docs/output.md):
//
//   - JSON: one object, "fickfit_version" its first key, the result's wire
//     form beside it (the wire structs live in fit, arrhenius and
//     fit/matano). Indented by two spaces, '<', '>' and '&' not escaped,
//     open interval ends and undefined numbers null, a trailing newline;
//     identical input gives identical bytes.
//   - CSV: numbers SI in shortest round-trip form with the unit in the
//     column name, an empty cell for "not determined" or "not
//     applicable". Fits write one table; the other kinds write one or more
//     tables in one stream, every row (the header too) starting with the
//     table's name and an empty line between tables, so that a script can
//     read it with a CSV reader that allows a varying number of fields and
//     split on the first column.
//   - Text: for people; numbers rounded to what their intervals support
//     (format.go), units always written, temperatures in the user's unit
//     with kelvin beside, warnings under the number they concern and the
//     cautions at the end. The cautions of back-calculations and
//     predictions are written even with TextOptions.NoCautions: those
//     numbers feed decisions about parts.
type Document interface {
	// WriteText writes the result for people.
	WriteText(w io.Writer, o TextOptions) error
	// WriteJSON writes the result as one JSON document.
	WriteJSON(w io.Writer) error
	// WriteCSV writes the result as CSV.
	WriteCSV(w io.Writer) error
}

// Every result kind is a Document.
var (
	_ Document = Fits{}
	_ Document = Arrhenius{}
	_ Document = Backcalc{}
	_ Document = Predictions(nil)
	_ Document = Comparison{}
	_ Document = References(nil)
	_ Document = Matano(nil)
	_ Document = (*CampaignReport)(nil)
)

// Format is an output format of the stream-writing commands (--format).
type Format int

// The formats. The zero value is Text.
const (
	Text Format = iota
	JSON
	CSV
)

// formats describes every format: its name (the flag value) and how a
// Document is written in it. A format derived from the Document methods
// (another separator, another JSON layout) is one more row here.
var formats = []struct {
	name  string
	write func(w io.Writer, d Document, o TextOptions) error
}{
	Text: {"text", writeTextSafe},
	JSON: {"json", func(w io.Writer, d Document, _ TextOptions) error { return d.WriteJSON(w) }},
	CSV:  {"csv", func(w io.Writer, d Document, _ TextOptions) error { return d.WriteCSV(w) }},
}

// writeTextSafe writes d's text with the characters that could act on a
// terminal escaped (EscapeText).
func writeTextSafe(w io.Writer, d Document, o TextOptions) error {
	e := newTextEscaper(w)
	if err := d.WriteText(e, o); err != nil {
		return err
	}
	return e.Close()
}

// FormatNames lists the formats by name, in the order of the constants.
func FormatNames() []string {
	out := make([]string, len(formats))
	for i, f := range formats {
		out[i] = f.name
	}
	return out
}

// ParseFormat reads a format name (case-insensitive).
func ParseFormat(s string) (Format, error) {
	for i, f := range formats {
		if strings.EqualFold(strings.TrimSpace(s), f.name) {
			return Format(i), nil
		}
	}
	return 0, fmt.Errorf("unknown output format %q: use %s", s, orList(FormatNames()))
}

// FormatOfPath returns the format an output file's extension names:
// .txt text, .json JSON, .csv CSV (any case); ok is false for any other.
func FormatOfPath(path string) (f Format, ok bool) {
	ext := strings.ToLower(filepath.Ext(path))
	if ext == ".txt" {
		ext = ".text"
	}
	f, err := ParseFormat(strings.TrimPrefix(ext, "."))
	return f, err == nil && ext != ""
}

// String is the format's name.
func (f Format) String() string {
	if f < 0 || int(f) >= len(formats) {
		return "Format(" + strconv.Itoa(int(f)) + ")"
	}
	return formats[f].name
}

// MarshalText writes the format's name.
func (f Format) MarshalText() ([]byte, error) { return []byte(f.String()), nil }

// UnmarshalText reads a format name.
func (f *Format) UnmarshalText(b []byte) error {
	v, err := ParseFormat(string(b))
	if err != nil {
		return err
	}
	*f = v
	return nil
}

// Write writes d to w in the format f; o applies to the text form.
func Write(w io.Writer, f Format, d Document, o TextOptions) error {
	if f < 0 || int(f) >= len(formats) {
		return fmt.Errorf("report: no writer for %v", f)
	}
	return formats[f].write(w, d, o)
}

// orList joins names as "a, b or c".
func orList(names []string) string {
	if len(names) < 2 {
		return strings.Join(names, "")
	}
	return strings.Join(names[:len(names)-1], ", ") + " or " + names[len(names)-1]
}

// envelope is the head of every JSON document: the software version,
// written first. Each document embeds it beside its result's wire form.
type envelope struct {
	Version string `json:"fickfit_version"`
}

// writeJSON writes one JSON document through the project's single JSON
// path (internal/jsonx).
func writeJSON(w io.Writer, v any) error {
	if err := jsonx.Encode(w, v); err != nil {
		return errorf("writing JSON: %w", err)
	}
	return nil
}

// writeTextWithCautions runs body on a buffered writer, then writes the
// cautions (always when always is set, else unless o.NoCautions).
func writeTextWithCautions(w io.Writer, o TextOptions, cautions []string, always bool, body func(*bufio.Writer)) error {
	bw := bufio.NewWriter(w)
	body(bw)
	if len(cautions) > 0 && (always || !o.NoCautions) {
		bw.WriteString("\n")
		writeCautions(bw, cautions, o.width())
	}
	return bw.Flush()
}

// writeCSVTables writes the tables body adds to one CSV stream.
func writeCSVTables(w io.Writer, body func(*viewCSV)) error {
	c := newViewCSV(w)
	body(c)
	return c.close()
}

// nonNilPtrs drops nil pointers and never returns nil.
func nonNilPtrs[T any](s []*T) []*T {
	out := make([]*T, 0, len(s))
	for _, x := range s {
		if x != nil {
			out = append(out, x)
		}
	}
	return out
}
