package report

import (
	"io"

	"github.com/fickfit/fickfit/fit"
	"github.com/fickfit/fickfit/internal/jsonx"
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
	return encodeWithFits(w, fitsDoc{
		Version:  versionOr(f.Version),
		Fits:     []*fit.Result{},
		Failed:   nonNil(f.Failed),
		NotRead:  f.NotRead,
		Cautions: fit.Cautions,
	}, f.Results)
}

// encodeWithFits writes doc, whose "fits" array is empty, as jsonx.Encode
// would write it holding the results rs: the results, the bulk of the
// document, are encoded one at a time (jsonx.EncodeWithArray).
func encodeWithFits(w io.Writer, doc any, rs []*fit.Result) error {
	rs = nonNilPtrs(rs)
	if err := jsonx.EncodeWithArray(w, doc, "fits", len(rs), func(i int) any { return jsonResult(rs[i]) }); err != nil {
		return errorf("writing JSON: %w", err)
	}
	return nil
}

// jsonResult is a shallow copy of r with empty lists instead of null, so
// that scripts can always iterate.
func jsonResult(r *fit.Result) *fit.Result {
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
	return &c
}

func nonNil[T any](s []T) []T {
	if s == nil {
		return []T{}
	}
	return s
}
