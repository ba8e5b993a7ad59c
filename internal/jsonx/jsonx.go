// Package jsonx is the one JSON path of fickfit's machine outputs: numbers
// that are not determined (NaN, ±Inf) are written null and read back as
// NaN, and text is written as it is ('<', '>' and '&' are not escaped as
// they would be for embedding in HTML). Every MarshalJSON method and every
// document writer goes through it, so that a value is written with the
// same bytes wherever it appears.
package jsonx

import (
	"bufio"
	"bytes"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"slices"
)

// Num returns a pointer to v, or nil when v is NaN or ±Inf, so that a
// *float64 field writes an undetermined number as null.
func Num(v float64) *float64 {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return nil
	}
	return &v
}

// Val is the inverse of Num: nil (null in JSON) reads as NaN.
func Val(p *float64) float64 {
	if p == nil {
		return math.NaN()
	}
	return *p
}

// Marshal is json.Marshal without HTML escaping, for MarshalJSON methods:
// their bytes are copied verbatim into the enclosing document, so an
// escape made here would survive into every output.
func Marshal(v any) ([]byte, error) {
	var b bytes.Buffer
	enc := json.NewEncoder(&b)
	enc.SetEscapeHTML(false)
	if err := enc.Encode(v); err != nil {
		return nil, err
	}
	return bytes.TrimSuffix(b.Bytes(), []byte("\n")), nil
}

// Encode writes v as one JSON document: indented by two spaces, without
// HTML escaping, ending in a newline. Identical values give identical
// bytes (maps are written with sorted keys by encoding/json).
func Encode(w io.Writer, v any) error {
	bw := bufio.NewWriter(w)
	enc := json.NewEncoder(bw)
	enc.SetEscapeHTML(false)
	enc.SetIndent("", "  ")
	if err := enc.Encode(v); err != nil {
		return err
	}
	return bw.Flush()
}

// EncodeWithArray writes doc as Encode does, except that the array under
// doc's top-level key (which doc must hold empty) is written one element
// at a time, elem(0) … elem(n−1), each encoded as Encode would encode it
// in place: the same bytes as Encode of the full document, without ever
// holding the whole array's encoding, or the document's, in memory. For
// documents whose bulk is one long array of results.
func EncodeWithArray(w io.Writer, doc any, key string, n int, elem func(i int) any) error {
	var head bytes.Buffer
	enc := json.NewEncoder(&head)
	enc.SetEscapeHTML(false)
	enc.SetIndent("", "  ")
	if err := enc.Encode(doc); err != nil {
		return err
	}
	name, err := Marshal(key)
	if err != nil {
		return err
	}
	marker := append(append([]byte("\n  "), name...), ": []"...)
	at := bytes.Index(head.Bytes(), marker)
	if at < 0 {
		return fmt.Errorf("jsonx: the document has no empty top-level array %s", name)
	}
	split := at + len(marker) - len("[]")
	bw := bufio.NewWriterSize(w, 64<<10)
	bw.Write(head.Bytes()[:split])
	if n == 0 {
		bw.WriteString("[]")
	} else {
		var b bytes.Buffer
		ee := json.NewEncoder(&b)
		ee.SetEscapeHTML(false)
		ee.SetIndent("    ", "  ")
		bw.WriteByte('[')
		for i := 0; i < n; i++ {
			b.Reset()
			if err := ee.Encode(elem(i)); err != nil {
				return err
			}
			bw.WriteString("\n    ")
			bw.Write(bytes.TrimSuffix(b.Bytes(), []byte("\n")))
			if i < n-1 {
				bw.WriteByte(',')
			}
		}
		bw.WriteString("\n  ]")
	}
	bw.Write(head.Bytes()[split+len("[]"):])
	return bw.Flush()
}

// ZeroAsNull rewrites a compact JSON object (as Marshal writes it) so that
// each of the named top-level keys whose value is exactly 0 reads null:
// for quantities where 0 means "not given" (a hold time, a temperature in
// kelvin), which a script must not take for a measured zero. Key order and
// every other byte are kept. It scans the bytes once (strings skipped,
// nesting counted), so that it costs little beside the marshalling.
func ZeroAsNull(obj []byte, keys ...string) ([]byte, error) {
	if len(obj) < 2 || obj[0] != '{' {
		return nil, fmt.Errorf("jsonx.ZeroAsNull: not a JSON object")
	}
	var out []byte
	last, depth := 0, 0
	for i := 0; i < len(obj); i++ {
		switch obj[i] {
		case '{', '[':
			depth++
		case '}', ']':
			depth--
		case '"':
			j := i + 1
			for j < len(obj) && obj[j] != '"' {
				if obj[j] == '\\' {
					j++
				}
				j++
			}
			if j >= len(obj) {
				return nil, fmt.Errorf("jsonx.ZeroAsNull: unterminated string")
			}
			v := j + 2 // the value after "key":
			if depth == 1 && v+1 < len(obj) && obj[j+1] == ':' && obj[v] == '0' && (obj[v+1] == ',' || obj[v+1] == '}') &&
				slices.Contains(keys, string(obj[i+1:j])) {
				out = append(out, obj[last:v]...)
				out = append(out, "null"...)
				last = v + 1
			}
			i = j
		}
	}
	if out == nil {
		return obj, nil
	}
	return append(out, obj[last:]...), nil
}
