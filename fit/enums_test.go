package fit

import (
	"encoding/json"
	"errors"
	"testing"
)

// The text forms are the JSON contract (docs/output.md); common practice,
// no source.
func TestEnumsRoundTrip(t *testing.T) {
	for _, s := range []string{"profile", "wald", "bootstrap", "PROFILE", ""} {
		m, err := ParseCIMethod(s)
		if err != nil {
			t.Errorf("ParseCIMethod(%q): %v", s, err)
		}
		b, _ := m.MarshalText()
		var back CIMethod
		if err := back.UnmarshalText(b); err != nil || back != m {
			t.Errorf("%q: round trip %q, %v", s, back, err)
		}
	}
	if _, err := ParseCIMethod("jackknife"); !errors.Is(err, ErrBadInput) {
		t.Errorf("unknown method: %v", err)
	}
	var r struct {
		M CIMethod   `json:"m"`
		C Covariance `json:"c"`
	}
	if err := json.Unmarshal([]byte(`{"m":"bootstrap-bca","c":"absolute"}`), &r); err != nil || r.M != CIBootstrapBCa || r.C != CovAbsolute {
		t.Errorf("JSON: %+v, %v", r, err)
	}
	if err := json.Unmarshal([]byte(`{"c":"sometimes"}`), &r); err == nil {
		t.Error("unknown covariance kind read")
	}
}
