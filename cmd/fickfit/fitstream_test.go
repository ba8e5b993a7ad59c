package main

import (
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/fickfit/fickfit/internal/longtable"
)

// bothWays runs a fit command streamed and read whole (noStream) and
// asserts the same exit status, standard output, standard error and
// output file (common practice, no source: the streamed pipeline is a
// faster way to the same answer).
func bothWays(t *testing.T, outFile string, args ...string) (int, string, string) {
	t.Helper()
	read := func() (int, string, string, string) {
		if outFile != "" {
			os.Remove(outFile)
		}
		code, stdout, stderr := runCLI(t, args...)
		file := "<absent>"
		if outFile != "" {
			if b, err := os.ReadFile(outFile); err == nil {
				file = string(b)
			}
		}
		return code, stdout, stderr, file
	}
	noStream = true
	wc, wout, werr, wfile := read()
	noStream = false
	gc, gout, gerr, gfile := read()
	if gc != wc || gout != wout || gerr != werr || gfile != wfile {
		t.Fatalf("%v: streamed and whole differ:\nexit %d / %d\nstderr %q\n   /  %q\nstdout %.300q\n   /  %.300q\nfile %.300q\n / %.300q",
			args, gc, wc, gerr, werr, gout, wout, gfile, wfile)
	}
	return gc, gout, gerr
}

// writeFile writes text to dir/name.
func writeFile(t *testing.T, dir, name, text string) string {
	t.Helper()
	p := filepath.Join(dir, name)
	if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

// TestFitStreamedSameAsWhole: every format, failures among the profiles,
// rows not grouped, errors late in the file, duplicates across files,
// --model auto and override flags give what reading everything first gives.
func TestFitStreamedSameAsWhole(t *testing.T) {
	dir := t.TempDir()
	var long strings.Builder
	if err := longtable.Write(&long, longtable.Options{Profiles: 40, Points: 12, Seed: 3}); err != nil {
		t.Fatal(err)
	}
	table := long.String()
	good := writeFile(t, dir, "long.csv", table)
	lines := strings.SplitAfter(table, "\n")
	// Profile S5's values all equal (no fit), S9 with two points (too few).
	var failing strings.Builder
	for _, l := range lines {
		switch {
		case strings.HasPrefix(l, "S5,"):
			f := strings.Split(strings.TrimSpace(l), ",")
			f[4] = "0.5"
			l = strings.Join(f, ",") + "\n"
		case strings.HasPrefix(l, "S9,") && !strings.Contains(l, ",0.000,") && !strings.Contains(l, ",4,5"):
			continue
		}
		failing.WriteString(l)
	}
	withFailures := writeFile(t, dir, "failing.csv", failing.String())
	// S3's first row moved to the end: not grouped.
	var moved string
	var rest strings.Builder
	for _, l := range lines {
		if moved == "" && strings.HasPrefix(l, "S3,") {
			moved = l
			continue
		}
		rest.WriteString(l)
	}
	ungrouped := writeFile(t, dir, "ungrouped.csv", rest.String()+moved)
	late := writeFile(t, dir, "late.csv", table+"S39,925,4,1x0,0.5\n")
	lateValidate := writeFile(t, dir, "latevalidate.csv", strings.Replace(table, "S0,925,4", "S0,925,-4", 1))
	// A's depth beyond its thickness is found only when A is complete; a
	// bad row after it comes first, as when the file is read whole.
	var thick strings.Builder
	thick.WriteString("specimen,thickness_mm,depth_mm,C_wt%\n")
	for _, id := range []string{"A", "B", "C"} {
		for i := 0; i < 8; i++ {
			fmt.Fprintf(&thick, "%s,0.5,%g,%g\n", id, 0.1*float64(i), 0.9-0.08*float64(i))
		}
	}
	beyond := writeFile(t, dir, "beyond.csv", thick.String())
	beyondThenBad := writeFile(t, dir, "beyondbad.csv", thick.String()+"C,0.5,0.8x,0.2\n")
	dup := writeFile(t, dir, "dup.csv", lines[0]+strings.Join(lines[len(lines)-13:], ""))
	// Values below a detection limit in S2 (a row's value) and S30 (a row
	// more): left out of the points, listed, with a warning.
	var belowRows strings.Builder
	s2 := 0
	for _, l := range lines {
		switch {
		case strings.HasPrefix(l, "S2,"):
			if s2++; s2 == 3 {
				f := strings.Split(strings.TrimSpace(l), ",")
				f[4] = "<0.01"
				l = strings.Join(f, ",") + "\n"
			}
		case strings.HasPrefix(l, "S30,") && !strings.Contains(belowRows.String(), "n.d."):
			belowRows.WriteString("S30,925,4,0.5,n.d.\n")
		}
		belowRows.WriteString(l)
	}
	below := writeFile(t, dir, "below.csv", belowRows.String())
	out := filepath.Join(dir, "out.csv")

	for _, c := range []struct {
		name string
		file string // -o target, "" for standard output
		args []string
		exit int
	}{
		{"csv", "", []string{"fit", good, "--ci", "wald", "--format", "csv"}, 0},
		{"csv -o", out, []string{"fit", good, "--ci", "wald", "--format", "csv", "-o", out}, 0},
		{"json", "", []string{"fit", good, "--ci", "wald", "--format", "json"}, 0},
		{"text profile CI", "", []string{"fit", good, "--format", "text"}, 0},
		{"failures csv", "", []string{"fit", withFailures, "--ci", "wald", "--format", "csv"}, 2},
		{"failures json -o", out, []string{"fit", withFailures, "--ci", "wald", "--format", "json", "-o", out}, 2},
		{"ungrouped", "", []string{"fit", ungrouped, "--ci", "wald", "--format", "csv"}, 0},
		{"ungrouped -o", out, []string{"fit", ungrouped, "--ci", "wald", "--format", "csv", "-o", out}, 0},
		{"bad row at the end", "", []string{"fit", late, "--ci", "wald", "--format", "csv"}, 2},
		{"bad row at the end -o", out, []string{"fit", late, "--ci", "wald", "--format", "csv", "-o", out}, 2},
		{"bad cell in the first profile", "", []string{"fit", lateValidate, "--ci", "wald", "--format", "csv"}, 2},
		{"bad profile found when complete", "", []string{"fit", beyond, "--ci", "wald", "--format", "csv"}, 2},
		{"bad profile, then bad row", "", []string{"fit", beyondThenBad, "--ci", "wald", "--format", "csv"}, 2},
		{"duplicate ids", "", []string{"fit", good, dup, "--ci", "wald", "--format", "csv"}, 2},
		{"auto", "", []string{"fit", good, "--model", "auto", "--ci", "wald", "--format", "csv"}, 0},
		{"overrides", "", []string{"fit", good, "--ci", "wald", "--format", "csv", "--time", "5h", "--temperature", "930C"}, 0},
		{"bad override", "", []string{"fit", late, "--ci", "wald", "--format", "csv", "--time", "5 parsecs"}, 2},
		{"all fail", "", []string{"fit", withFailures, "--ci", "wald", "--format", "csv", "--fix", "D=1e-30", "--fix", "Cs=1", "--fix", "C0=0"}, 2},
		{"below a detection limit json", "", []string{"fit", below, "--ci", "wald", "--format", "json"}, 0},
		{"below a detection limit csv", "", []string{"fit", below, "--ci", "wald", "--format", "csv"}, 0},
		{"below a detection limit refused", "", []string{"fit", below, "--ci", "wald", "--format", "csv", "--below-limit", "refuse", "--time", "5h"}, 2},
	} {
		t.Run(c.name, func(t *testing.T) {
			code, stdout, stderr := bothWays(t, c.file, c.args...)
			if code != c.exit {
				t.Errorf("exit %d, want %d; stderr %s", code, c.exit, stderr)
			}
			if code != 0 && c.file == "" && strings.Contains(c.name, "bad") && stdout != "" {
				t.Errorf("output written for bad input: %.200q", stdout)
			}
		})
	}
}

// TestSpill: output held in chunks comes out whole; beyond the memory
// limit it goes through a temporary file, removed afterwards.
func TestSpill(t *testing.T) {
	for _, limit := range []int{100, 1 << 30} {
		s := &spill{limit: limit}
		var want strings.Builder
		for i := 0; i < 50; i++ {
			line := fmt.Sprintf("row %d\n", i)
			if i == 20 {
				line = strings.Repeat("x", spillChunk+17) + "\n" // across chunks
			}
			want.WriteString(line)
			if _, err := s.Write([]byte(line)); err != nil {
				t.Fatal(err)
			}
		}
		if (s.file != nil) != (limit == 100) {
			t.Fatalf("limit %d: spilled to a file: %v", limit, s.file != nil)
		}
		name := ""
		if s.file != nil {
			name = s.file.Name()
		}
		var got strings.Builder
		if err := s.commit(&got); err != nil {
			t.Fatal(err)
		}
		s.discard()
		if got.String() != want.String() {
			t.Fatalf("limit %d: output differs (%d bytes, want %d)", limit, got.Len(), want.Len())
		}
		if name != "" {
			if _, err := os.Stat(name); !os.IsNotExist(err) {
				t.Errorf("temporary file %s left behind", name)
			}
		}
	}
}
