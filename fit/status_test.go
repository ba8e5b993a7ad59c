package fit

import (
	"encoding/json"
	"testing"
)

// TestStatusText: every status has a stable name that round-trips through
// MarshalText/UnmarshalText (and JSON); an unknown value is an error, not a
// name. Only Certified counts as converged (common practice, no source).
func TestStatusText(t *testing.T) {
	seen := map[string]bool{}
	for s := NotTerminated; s <= Unidentified; s++ {
		b, err := s.MarshalText()
		if err != nil {
			t.Fatalf("%d: %v", int(s), err)
		}
		if string(b) != s.String() || seen[string(b)] {
			t.Errorf("%d: name %q (String %q), seen before %v", int(s), b, s.String(), seen[string(b)])
		}
		seen[string(b)] = true
		var back Status
		if err := back.UnmarshalText(b); err != nil || back != s {
			t.Errorf("%q reads back as %v (%v)", b, back, err)
		}
		if s.Converged() != (s == Certified) {
			t.Errorf("%v.Converged() = %v", s, s.Converged())
		}
	}
	j, err := json.Marshal(struct{ S Status }{IterationLimit})
	if err != nil || string(j) != `{"S":"iteration-limit"}` {
		t.Errorf("JSON %s (%v)", j, err)
	}
	if _, err := Status(99).MarshalText(); err == nil {
		t.Error("status 99 marshalled")
	}
	var s Status
	if err := s.UnmarshalText([]byte("converged")); err == nil {
		t.Error(`"converged" read as a status`)
	}
}
