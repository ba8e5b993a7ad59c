package main

import (
	"bufio"
	"bytes"
	"crypto/sha256"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/fickfit/fickfit/internal/badinput"
)

// runCLI runs the command line in-process and returns exit status, stdout and stderr.
func runCLI(t *testing.T, args ...string) (int, string, string) {
	t.Helper()
	var out, errb bytes.Buffer
	code := run(args, &out, &errb)
	return code, out.String(), errb.String()
}

func hashFile(t *testing.T, path string) [32]byte {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	return sha256.Sum256(b)
}

// hashTree hashes every file under dir (a case may be a folder).
func hashTree(t *testing.T, dir string) map[string][32]byte {
	t.Helper()
	h := map[string][32]byte{}
	filepath.Walk(dir, func(p string, fi os.FileInfo, err error) error {
		if err == nil && !fi.IsDir() {
			h[p] = hashFile(t, p)
		}
		return nil
	})
	return h
}

// TestBadCatalogue runs every file of testdata/bad through the command line
// (common practice, no source): each must end with the catalogue's exit
// status, a message naming the file and the line or cell, no output file,
// and the input unchanged.
func TestBadCatalogue(t *testing.T) {
	f, err := os.Open("../../testdata/bad/cases.tsv")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	good := "../../testdata/profile/A3.csv"
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		line := sc.Text()
		if strings.HasPrefix(line, "#") || strings.TrimSpace(line) == "" {
			continue
		}
		col := strings.Split(line, "\t")
		if len(col) < 6 {
			t.Fatalf("cases.tsv: short row %q", line)
		}
		file, stage, exit, where, frag := col[0], col[1], col[2], col[4], col[5]
		t.Run(file, func(t *testing.T) {
			path := filepath.Join("../../testdata/bad", file)
			if badinput.Has(file) { // generated at test time (internal/badinput)
				var err error
				if path, err = badinput.Write(t.TempDir(), file); err != nil {
					t.Fatal(err)
				}
			}
			before := hashTree(t, path)
			outPath := filepath.Join(t.TempDir(), "out.json")
			var args []string
			switch stage {
			case "read", "fit":
				args = []string{"fit", path}
			case "calibration":
				args = []string{"fit", good, "--hardness-calibration", path}
			case "history":
				args = []string{"fit", good, "--history", path, "--Q", "140kJ/mol"}
			default:
				t.Fatalf("unknown stage %q", stage)
			}
			args = append(args, "--format", "json", "-o", outPath)
			code, _, stderr := runCLI(t, args...)
			if want := exit; want != "" && want != string('0'+rune(code)) {
				t.Errorf("exit %d, want %s; stderr: %s", code, want, stderr)
			}
			base := filepath.Base(file)
			if !strings.Contains(stderr, base) {
				t.Errorf("message does not name the file %q: %s", base, stderr)
			}
			if where != "-" && !strings.Contains(stderr, strings.TrimPrefix(where, "b.csv")) {
				t.Errorf("message does not locate the problem (%q): %s", where, stderr)
			}
			if frag != "-" && !strings.Contains(stderr, frag) {
				t.Errorf("message lacks %q: %s", frag, stderr)
			}
			if _, err := os.Stat(outPath); err == nil {
				t.Errorf("an output file was created for bad input")
			}
			entries, _ := os.ReadDir(filepath.Dir(outPath))
			if len(entries) != 0 {
				t.Errorf("left files behind in the output folder: %v", entries)
			}
			after := hashTree(t, path)
			for p, h := range before {
				if after[p] != h {
					t.Errorf("input %s was modified", p)
				}
			}
		})
	}
}

// TestHelpEveryCommand: --help works for every command and names an example.
func TestHelpEveryCommand(t *testing.T) {
	for _, c := range newRoot().Commands() {
		if c.Name() == "help" || c.Name() == "completion" {
			continue
		}
		code, out, _ := runCLI(t, c.Name(), "--help")
		if code != 0 || !strings.Contains(out, "Usage:") {
			t.Errorf("%s --help: exit %d\n%s", c.Name(), code, out)
		}
	}
}

// TestUsageErrors: mistakes on the command line exit 2 with a clear message.
func TestUsageErrors(t *testing.T) {
	good := "../../testdata/profile/A3.csv"
	for _, tc := range []struct {
		args []string
		frag string
	}{
		{[]string{"fit"}, "requires at least 1 arg"},
		{[]string{"fit", good, "--format", "yaml"}, "use text, json or csv"},
		{[]string{"fit", good, "--level", "95"}, "between 0 and 1"},
		{[]string{"fit", good, "--fix", "Cs"}, "NAME=VALUE"},
		{[]string{"fit", good, "--fix", "Q=3"}, "has no parameter \"Q\""},
		{[]string{"fit", good, "--model", "parabolic"}, "unknown model"},
		{[]string{"fit", good, "--time", "-4h"}, "--time"},
		{[]string{"fit", good, "--temperature", "-300C"}, "--temperature"},
		{[]string{"fit", good, "-o", good}, "would overwrite an input"},
		{[]string{"fit", good, "--bogus"}, "unknown flag"},
		{[]string{"backcalc", good, "--solve", "pressure", "--reference", "C-in-gamma-Fe"}, "--solve"},
		{[]string{"backcalc", good, "--reference", "unobtainium"}, "C-in-gamma-Fe"},
		{[]string{"predict", "--Cs", "1", "--C0", "0.2"}, "at least one of the flags in the group [calibration D0 reference] is required"},
		{[]string{"predict", "--Cs", "1", "--C0", "0.2", "--reference", "C-in-gamma-Fe", "--D0", "1e-5", "--Q", "140kJ/mol"}, "none of the others can be"},
		{[]string{"backcalc", good, "--D0", "1e-5"}, "[D0 Q] are set they must all be set"},
		{[]string{"fit", good, "--ci", "jackknife"}, "--ci: unknown interval method"},
		{[]string{"fit", good, "--temperature-unit", "R"}, "--temperature-unit"},
		{[]string{"reference", "--format", "xml"}, "use text, json or csv"},
	} {
		code, _, stderr := runCLI(t, tc.args...)
		if code != 2 || !strings.Contains(stderr, tc.frag) {
			t.Errorf("%v: exit %d, stderr %q; want 2 and %q", tc.args, code, stderr, tc.frag)
		}
	}
}

// TestCampaignFolderSafety: a report folder holding other files is refused
// without --force and left as it was; the demo may rewrite its own report
// (common practice, no source).
func TestCampaignFolderSafety(t *testing.T) {
	dir := t.TempDir()
	mine := filepath.Join(dir, "notes.txt")
	if err := os.WriteFile(mine, []byte("lab notes"), 0o644); err != nil {
		t.Fatal(err)
	}
	code, _, stderr := runCLI(t, "demo", "--out", dir, "--no-png", "--ci", "wald")
	if code != 2 || !strings.Contains(stderr, "--force") {
		t.Fatalf("non-empty folder: exit %d, %s", code, stderr)
	}
	entries, _ := os.ReadDir(dir)
	if len(entries) != 1 {
		t.Errorf("files were written into a refused folder: %v", entries)
	}
	out := filepath.Join(t.TempDir(), "demo")
	for run := 0; run < 2; run++ {
		code, summary, stderr := runCLI(t, "demo", "--out", out, "--no-png", "--ci", "wald")
		if code != 0 {
			t.Fatalf("demo run %d: exit %d: %s", run+1, code, stderr)
		}
		// The demo reads each coupon's effective case depth at 0.35 wt% C.
		if !strings.Contains(summary, "case depth") || !strings.Contains(summary, "at 0.35wt%") {
			t.Errorf("demo run %d: no case depth in the summary:\n%s", run+1, summary)
		}
	}
}

// TestFlagCompletion: the enumerated flags complete to their values
// (cobra's hidden __complete command, as the shell scripts call it).
func TestFlagCompletion(t *testing.T) {
	for _, tc := range []struct {
		args []string
		want []string
	}{
		{[]string{"fit", "x.csv", "--ci", ""}, []string{"profile", "wald", "bootstrap"}},
		{[]string{"fit", "x.csv", "--format", ""}, []string{"text", "json", "csv"}},
		{[]string{"fit", "x.csv", "--model", ""}, []string{"erf", "masstransfer", "auto", "numeric"}},
		{[]string{"fit", "x.csv", "--dc", ""}, []string{"const", "exp", "table"}},
		{[]string{"backcalc", "x.csv", "--method", ""}, []string{"analytic", "monte-carlo", "both"}},
		{[]string{"predict", "--reference", ""}, []string{"C-in-gamma-Fe"}},
		{[]string{"campaign", "d", "--temperature-unit", ""}, []string{"C", "K", "F"}},
	} {
		_, out, _ := runCLI(t, append([]string{"__complete"}, tc.args...)...)
		lines := strings.Split(out, "\n")
		for _, w := range tc.want {
			found := false
			for _, l := range lines {
				found = found || l == w
			}
			if !found {
				t.Errorf("%v: %q not offered in\n%s", tc.args, w, out)
			}
		}
	}
}

// TestOutputFormatFromExtension: without --format, -o FILE.csv, .json or
// .txt (any case) chooses the format; any other name, or --format given,
// keeps --format. Each file holds the bytes the same command writes to
// standard output with that --format.
func TestOutputFormatFromExtension(t *testing.T) {
	in := filepath.Join("..", "..", "testdata", "demo", "coupons", "F7-2291-880-1.csv")
	stdout := map[string]string{}
	for _, f := range []string{"text", "json", "csv"} {
		code, out, errs := runCLI(t, "fit", in, "--ci", "wald", "--format", f)
		if code != 0 {
			t.Fatalf("--format %s: exit %d: %s", f, code, errs)
		}
		stdout[f] = out
	}
	dir := t.TempDir()
	for _, c := range []struct {
		name, format, want string
	}{
		{"a.csv", "", "csv"},
		{"b.JSON", "", "json"},
		{"c.txt", "", "text"},
		{"d.dat", "", "text"},
		{"e.csv", "text", "text"},
		{"f.json", "csv", "csv"},
	} {
		args := []string{"fit", in, "--ci", "wald", "-o", filepath.Join(dir, c.name)}
		if c.format != "" {
			args = append(args, "--format", c.format)
		}
		if code, _, errs := runCLI(t, args...); code != 0 {
			t.Fatalf("%v: exit %d: %s", args, code, errs)
		}
		got, err := os.ReadFile(filepath.Join(dir, c.name))
		if err != nil {
			t.Fatal(err)
		}
		if string(got) != stdout[c.want] {
			t.Errorf("-o %s --format %q: not the %s output:\n%.200s", c.name, c.format, c.want, got)
		}
	}
}
