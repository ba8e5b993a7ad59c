package arrhenius

import (
	"errors"
	"fmt"
	"strings"

	"github.com/fickfit/fickfit/fit"
	"github.com/fickfit/fickfit/internal/tempfmt"
)

// Error is an error from this package. It says what it concerns (file,
// line, profile or point, field), what is wrong and what to do, and
// unwraps to fit.ErrBadInput or fit.ErrNoAnswer so that the command line
// can choose its exit status with errors.Is.
type Error struct {
	Source string // file the value came from; "" when not from a file
	Line   int    // 1-based line or row in Source; 0 when not known
	ID     string // profile, point, group or reference name concerned
	Field  string // the quantity concerned: "temperature", "time", "Q"…
	Msg    string // what is wrong and what to do
	Kind   error  // fit.ErrBadInput or fit.ErrNoAnswer
}

// Error implements error. Temperatures in the message are written in kelvin.
func (e *Error) Error() string { return e.text(tempfmt.Plain(e.Msg)) }

// text is the message with its position, msg being the message proper.
func (e *Error) text(msg string) string {
	var b strings.Builder
	b.WriteString("arrhenius")
	if e.Source != "" {
		b.WriteString(": ")
		b.WriteString(e.Source)
		if e.Line > 0 {
			fmt.Fprintf(&b, ":%d", e.Line)
		}
	}
	if e.ID != "" {
		fmt.Fprintf(&b, ": %s", e.ID)
	}
	if e.Field != "" {
		fmt.Fprintf(&b, ": %s", e.Field)
	}
	b.WriteString(": ")
	b.WriteString(msg)
	return b.String()
}

// Render is Error with the temperatures of the message written by f
// (the reader's unit) instead of in kelvin.
func (e *Error) Render(f func(kelvin float64) string) string {
	return e.text(tempfmt.Render(e.Msg, f))
}

// MarkedText is err's message with the temperatures of an arrhenius
// Error in it kept as marks (internal/tempfmt), for a caller that stores
// the message and lets its writers render it in the reader's unit.
func MarkedText(err error) string {
	if err == nil {
		return ""
	}
	s := err.Error()
	var e *Error
	if errors.As(err, &e) {
		s = strings.Replace(s, e.Error(), e.text(e.Msg), 1)
	}
	return s
}

// Unwrap returns the error kind (fit.ErrBadInput or fit.ErrNoAnswer).
func (e *Error) Unwrap() error { return e.Kind }

func badInput(id, field, format string, args ...any) *Error {
	return &Error{ID: id, Field: field, Msg: fmt.Sprintf(format, args...), Kind: fit.ErrBadInput}
}

func noAnswer(id, field, format string, args ...any) *Error {
	return &Error{ID: id, Field: field, Msg: fmt.Sprintf(format, args...), Kind: fit.ErrNoAnswer}
}
