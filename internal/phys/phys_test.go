package phys

import (
	"math"
	"testing"
)

// CODATA 2018 recommended values (exact since the 2019 SI): N_A =
// 6.02214076e23 /mol, k = 1.380649e-23 J/K, e = 1.602176634e-19 C.
func TestConstants(t *testing.T) {
	if r := 6.02214076e23 * 1.380649e-23; math.Abs(r-R) > 1e-9 {
		t.Errorf("R = %v, N_A·k = %v", R, r)
	}
	if math.Abs(Faraday-96485.33212) > 1e-5 {
		t.Errorf("Faraday = %v, want 96485.33212 (CODATA 2018)", Faraday)
	}
}
