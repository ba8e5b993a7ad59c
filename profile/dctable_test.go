package profile

import (
	"errors"
	"strings"
	"testing"
)

// TestReadDiffusivityTable reads D(C) tables in several units and refuses
// malformed ones with the line named (common practice, no source).
func TestReadDiffusivityTable(t *testing.T) {
	c, d, err := ReadDiffusivityTableCSV(strings.NewReader("# D(C) of carbon, invented fixture\nC_wt%,D_cm2/s\n0.2,1e-7\n0.8,3e-7\n"), "dc.csv")
	if err != nil {
		t.Fatal(err)
	}
	if len(c) != 2 || c[1] != 0.8 || d[0] != 1e-11 || d[1] != 3e-11 {
		t.Errorf("got %v %v", c, d)
	}
	for _, tc := range []struct{ in, frag string }{
		{"C_wt%,D\n0.2,1e-11\n", "no known unit"},
		{"C_wt%,D_m2/s\n0.2,1e-11\n0.2,2e-11\n", ":3:"},
		{"C_wt%,D_m2/s\n0.2,-1e-11\n0.4,2e-11\n", "not a positive number"},
		{"C_wt%,D_m2/s\n0.2,1e-11\n", "at least 2"},
		{"", "empty"},
	} {
		_, _, err := ReadDiffusivityTableCSV(strings.NewReader(tc.in), "dc.csv")
		var pe *Error
		if !errors.As(err, &pe) || !strings.Contains(err.Error(), tc.frag) || !strings.Contains(err.Error(), "dc.csv") {
			t.Errorf("%q: error %v, want *Error with %q", tc.in, err, tc.frag)
		}
	}
}
