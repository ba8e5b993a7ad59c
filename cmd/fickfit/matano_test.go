package main

import (
	"encoding/json"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// coupleFile writes a couple profile across the interface: the constant-D
// couple C = 16 + 14·erf(x/(2√(Dt))) (Crank, The Mathematics of Diffusion,
// 2nd ed., 1975, ch. 2; from memory) with D = 4e-14 m²/s and 100 h, 50
// points with seeded scatter. A fixture for the command line, not a check
// value.
func coupleFile(t *testing.T) string {
	t.Helper()
	const D, tm = 4e-14, 100 * 3600.0
	w := 2 * math.Sqrt(D*tm)
	rng := rand.New(rand.NewPCG(11, 12))
	var b strings.Builder
	b.WriteString("# id: c1\n# time: 100 h\nposition_um,Ni_at%\n")
	for i := 0; i < 50; i++ {
		x := -4*w + 8*w*float64(i)/49
		fmt.Fprintf(&b, "%.4f,%.4f\n", x*1e6, 16+14*math.Erf(x/w)+0.1*rng.NormFloat64())
	}
	path := filepath.Join(t.TempDir(), "couple.csv")
	if err := os.WriteFile(path, []byte(b.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

// TestMatanoTerms: --terms N fixes the number of smoother terms, auto
// chooses it, anything else is a usage error (exit 2).
func TestMatanoTerms(t *testing.T) {
	path := coupleFile(t)
	for _, c := range []struct {
		terms string
		code  int
		want  string // in stdout (a JSON key) or stderr
	}{
		{"2", 0, ""},
		{"auto", 0, ""},
		{"x", 2, "--terms x"},
		{"0", 2, "--terms 0"},
		{"9", 2, "9 smoother terms"},
		{"20", 2, "20 smoother terms"},
	} {
		code, out, errs := runCLI(t, "matano", path, "--terms", c.terms, "--resamples", "100", "--at", "10,16,22", "--format", "json")
		if code != c.code {
			t.Errorf("--terms %s: exit %d, want %d; stderr %s", c.terms, code, c.code, errs)
			continue
		}
		if c.code != 0 {
			if !strings.Contains(errs, c.want) {
				t.Errorf("--terms %s: message %q does not contain %q", c.terms, errs, c.want)
			}
			continue
		}
		var v struct {
			Matano []struct {
				Points []struct {
					D  *float64    `json:"D"`
					CI [2]*float64 `json:"ci"`
				} `json:"points"`
			} `json:"matano"`
		}
		if err := json.Unmarshal([]byte(out), &v); err != nil || len(v.Matano) != 1 || len(v.Matano[0].Points) != 3 {
			t.Fatalf("--terms %s: %v\n%s", c.terms, err, out)
		}
		for _, p := range v.Matano[0].Points {
			if p.D == nil || p.CI[0] == nil || p.CI[1] == nil || !(*p.CI[0] <= *p.D && *p.D <= *p.CI[1]) {
				t.Errorf("--terms %s: D %v with band %v", c.terms, p.D, p.CI)
			}
		}
	}
	// The text output names the number of terms used.
	code, out, errs := runCLI(t, "matano", path, "--terms", "2", "--resamples", "-1")
	if code != 0 || !strings.Contains(out, "2 erf terms") {
		t.Errorf("--terms 2, text: exit %d, %s%s", code, out, errs)
	}
}
