package report

import (
	"bufio"
	"encoding/json"
	"io"

	"github.com/fickfit/fickfit/fit"
)

// fitsDoc is the JSON document of the fit command (docs/output.md, contract):
// {"fickfit_version", "fits":[…], "failed":[…], "cautions":[…]}. Keys are
// stable; numbers are SI with the unit in the key or a "unit" field; an
// open interval end is null.
type fitsDoc struct {
	Version  string        `json:"fickfit_version"`
	Fits     []*fit.Result `json:"fits"`
	Failed   []fit.Failure `json:"failed"`
	NotRead  []NotUsed     `json:"not_read,omitempty"`
	Cautions []string      `json:"cautions"`
}

// WriteJSON writes the fits as one JSON document, indented by two spaces.
// Identical input gives byte-identical output.
func (f Fits) WriteJSON(w io.Writer) error {
	return encodeJSON(w, fitsDoc{
		Version:  versionOr(f.Version),
		Fits:     jsonResults(f.Results),
		Failed:   nonNil(f.Failed),
		NotRead:  f.NotRead,
		Cautions: fit.Cautions,
	})
}

// jsonResults returns shallow copies with empty lists instead of null, so
// that scripts can always iterate.
func jsonResults(rs []*fit.Result) []*fit.Result {
	out := make([]*fit.Result, 0, len(rs))
	for _, r := range rs {
		if r == nil {
			continue
		}
		c := *r
		if c.Warnings == nil {
			c.Warnings = []fit.Warning{}
		}
		if c.Residuals == nil {
			c.Residuals = []fit.Residual{}
		}
		if c.Params == nil {
			c.Params = []fit.Estimate{}
		}
		out = append(out, &c)
	}
	return out
}

func nonNil[T any](s []T) []T {
	if s == nil {
		return []T{}
	}
	return s
}

// encodeJSON writes v indented, without HTML escaping, ending in a newline.
func encodeJSON(w io.Writer, v any) error {
	bw := bufio.NewWriter(w)
	enc := json.NewEncoder(bw)
	enc.SetEscapeHTML(false)
	enc.SetIndent("", "  ")
	if err := enc.Encode(v); err != nil {
		return errorf("writing JSON: %w", err)
	}
	return bw.Flush()
}
