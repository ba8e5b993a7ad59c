package profile

import (
	"fmt"
	"math"
)

// Validate checks that p is usable: at least one point, slices of equal
// length, finite numbers, depth ≥ 0 (and not beyond a given thickness),
// sigma > 0, temperature, time, thickness and temperature sigma either
// 0 (not given) or positive. Fewer than three points is not an error here:
// whether a model can be fitted is for the fit to decide.
// The error is an *Error naming p.Source and the line of the bad point.
func (p *Profile) Validate() error {
	if err := p.validateShape(); err != nil {
		return err
	}
	if err := p.validateConditions(); err != nil {
		return err
	}
	for i := range p.Depth {
		if err := p.validatePoint(i); err != nil {
			return err
		}
	}
	return nil
}

// fail builds an *Error about p, at point i when i ≥ 0.
func (p *Profile) fail(i int, err error, hint string) *Error {
	file, sheet := splitSource(p.Source)
	e := &Error{File: file, Sheet: sheet, Err: fmt.Errorf("profile %s: %w", quote(p.ID), err), Hint: hint}
	if i >= 0 && i < len(p.Line) {
		e.Line = p.Line[i]
	}
	return e
}

func (p *Profile) validateShape() error {
	n := len(p.Depth)
	if n == 0 {
		return p.fail(-1, errorf(ErrNoData, "no points"), "give at least one depth and value")
	}
	if len(p.Value) != n || (p.Sigma != nil && len(p.Sigma) != n) || (p.Line != nil && len(p.Line) != n) {
		return p.fail(-1, errorf(ErrValue, "depth, value, sigma and line lists differ in length (%d, %d, %d, %d)",
			n, len(p.Value), len(p.Sigma), len(p.Line)), "build Depth, Value, Sigma and Line together")
	}
	return nil
}

func (p *Profile) validateConditions() error {
	checks := []struct {
		v    float64
		what string
	}{
		{p.Temperature, "temperature (K)"}, {p.TemperatureSigma, "temperature sigma (K)"},
		{p.Time, "time (s)"}, {p.Thickness, "thickness (m)"},
	}
	for _, c := range checks {
		if c.v < 0 || math.IsNaN(c.v) || math.IsInf(c.v, 0) {
			return p.fail(-1, errorf(ErrValue, "%s is %s", c.what, fmtNum(c.v)),
				"give a positive value, or 0 for not given")
		}
	}
	return nil
}

func (p *Profile) validatePoint(i int) error {
	d, v := p.Depth[i], p.Value[i]
	switch {
	case math.IsNaN(d) || math.IsInf(d, 0) || math.IsNaN(v) || math.IsInf(v, 0):
		return p.fail(i, errorf(ErrNumber, "point %d is not finite (depth %v, value %v)", i+1, d, v),
			"fix or remove the point")
	case d < 0 && !p.Across:
		return p.fail(i, errorf(ErrValue, "depth %s m is negative", fmtNum(d)), "check the sign of the depth")
	case p.Thickness > 0 && d > p.Thickness:
		return p.fail(i, errorf(ErrValue, "depth %s mm is beyond the thickness %s mm",
			fmtNum(d*1e3), fmtNum(p.Thickness*1e3)), "check the depth unit and the thickness")
	}
	if p.Sigma != nil {
		if s := p.Sigma[i]; !(s > 0) || math.IsInf(s, 0) {
			return p.fail(i, errorf(ErrValue, "sigma %v is not positive", s),
				"sigma is a standard uncertainty and must be > 0")
		}
	}
	return nil
}
