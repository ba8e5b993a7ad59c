// Package campaign runs the whole job on a campaign: it reads every input,
// fits each profile (fit.FitAll), fits an Arrhenius line per group,
// compares the groups and back-calculates the parts marked unknown. It
// computes and returns a Result; it writes nothing. Package report writes
// a Result (the report folder, results.json, the summary), and a caller
// such as an HTTP handler may run a campaign and choose its own writers.
//
// Imports: cmd/fickfit → report → campaign → arrhenius → fit → profile.
package campaign

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path"
	"path/filepath"
	"sort"
	"strings"

	"github.com/fickfit/fickfit"
	"github.com/fickfit/fickfit/arrhenius"
	"github.com/fickfit/fickfit/fit"
	"github.com/fickfit/fickfit/profile"
)

// Options control a campaign. The zero value fits the erf model
// with 95 % profile-likelihood intervals, groups by lot, fits one
// two-stage Arrhenius line per lot, compares the lots at the temperature
// where the data are centred, back-calculates the parts marked unknown
// with analytic intervals.
type Options struct {
	// Fit is passed to every profile fit (model, fixed and freed
	// parameters, interval method and level, σ handling…).
	Fit fit.Options
	// Adjust, when not nil, is called for every profile after reading and
	// before fitting; the command line applies its overrides of file
	// metadata (--temperature, --time…) here. An error stops the campaign.
	Adjust func(p *profile.Profile) error
	// By is the grouping column for Arrhenius lines and the comparison:
	// "lot" (the default when ""), "material" or any metadata key. "none"
	// fits one line through every profile.
	By string
	// Method is the Arrhenius method: "two-stage" (default when "") or "global".
	Method string
	// Arrhenius holds the regression options (level, temperature
	// uncertainty, Birge scaling…); a zero Level takes Fit.Level.
	Arrhenius arrhenius.Options
	// TRef is the temperature (K) of the lot comparison's D ratio; 0 means
	// where the data are centred.
	TRef float64
	// ReferenceGroup is the group the others are compared with; "" means the first.
	ReferenceGroup string
	// References names rows of the reference table to draw on the
	// Arrhenius plot (see arrhenius.ReferenceNames).
	References []string
	// Solve controls back-calculation of the unknown parts (method, Monte
	// Carlo draws and seed); a zero Level takes Fit.Level.
	Solve arrhenius.SolveOptions
	// Version is the software version written into every output; "" means DefaultVersion.
	Version string
	// KeepGoing leaves out inputs that cannot be read (recorded in
	// Result.NotRead, with where and why) instead of stopping.
	KeepGoing bool
	// Progress, when not nil, is called as the work proceeds with a stage
	// name and the count done out of total: the stages "read", "fit" and
	// "arrhenius", each once and in that order. It is called from one
	// goroutine at a time.
	Progress func(stage string, done, total int)
	// Exclusions, when not nil, takes points out of the profiles before
	// they are fitted (after reading, before Adjust) and leaves the
	// profiles named without a depth out of the Arrhenius lines and the
	// comparison (profile.Exclusions). Result.Excluded records what was done.
	Exclusions *profile.Exclusions
	// Fitter, when not nil, fits the profiles instead of fit.FitAll (a
	// server that keeps fits of unchanged profiles). It must return what
	// fit.FitAll would: results and errors in the order of ps.
	Fitter func(ps []profile.Profile, o fit.Options, progress func(done, total int)) ([]*fit.Result, []error)
}

func (o Options) progress(stage string, done, total int) {
	if o.Progress != nil {
		o.Progress(stage, done, total)
	}
}

func (o Options) level() float64 {
	if o.Fit.Level > 0 {
		return o.Fit.Level
	}
	return 0.95
}

func (o Options) by() string {
	b := strings.TrimSpace(o.By)
	switch strings.ToLower(b) {
	case "":
		return "lot"
	case "none":
		return ""
	}
	return b
}

// InputFile is one input file of the audit trail.
type InputFile struct {
	// Name is the path as given (or as found in a folder).
	Name string `json:"file"`
	// SHA256 is the hex digest of the file's bytes, Bytes its size.
	SHA256 string `json:"sha256"`
	Bytes  int64  `json:"bytes"`
}

// GroupFailure is an Arrhenius line that could not be fitted for a group.
type GroupFailure struct {
	// Group is the group's name ("" when the grouping itself failed).
	Group string `json:"group"`
	// Error says why there is no line.
	Error string `json:"error"`
}

// Part is a profile marked unknown: its fit and the back-calculated
// temperature or time.
type Part struct {
	// ID and Lot name the part's profile.
	ID  string `json:"id"`
	Lot string `json:"lot,omitempty"`
	// SolveFor is "temperature" or "time".
	SolveFor string `json:"solve_for"`
	// Group is the calibration's group ("" for a single line).
	Group string `json:"calibration_group"`
	// Solution is the back-calculated exposure; nil when Error says why not.
	Solution *arrhenius.Solution `json:"result,omitempty"`
	// Error says why there is no solution; "" when there is one.
	Error string `json:"error,omitempty"`
	// Kind is the fit.Failure kind of Error (fit.KindBadInput or
	// fit.KindNoAnswer); "" when there is a solution.
	Kind string `json:"-"`
}

// Result is everything a campaign found.
type Result struct {
	// Version is the software version written into every output.
	Version string
	Inputs  []InputFile
	// Profiles as read (after Adjust), sorted by group, temperature, time and id.
	Profiles []profile.Profile
	// Results holds the fitted profiles and Failed the ones that gave no
	// fit, each in the order of Profiles.
	Results []*fit.Result
	Failed  []fit.Failure
	// By is the grouping column used ("" for one line).
	By string
	// Method is "two-stage" or "global".
	Method string
	// Lines are the Arrhenius lines per group (nil when none could be fitted).
	Lines      *arrhenius.Report
	LineErrors []GroupFailure
	// Comparison of the groups (nil with fewer than two groups or when it failed).
	Comparison      *arrhenius.Comparison
	ComparisonError string
	// Parts are the profiles marked unknown, back-calculated.
	Parts []Part
	// NotRead are the inputs left out because they could not be read
	// (Options.KeepGoing).
	NotRead []profile.Skipped
	// Notes are campaign-level remarks in plain words (profiles left out of
	// the calibration and why). Like the Error texts of GroupFailure and
	// Part and ComparisonError, they may hold absolute temperatures as
	// marks of internal/tempfmt, which package report renders in the
	// reader's unit (kelvin in JSON); tempfmt.Plain renders them in kelvin.
	Notes    []string
	Options  AuditOptions
	Cautions []string
	// Exclusions is the exclusions file applied (Options.Exclusions) and
	// Excluded what it did: the points taken out and the profiles left out
	// of the Arrhenius lines. Both nil without exclusions.
	Exclusions *profile.Exclusions
	Excluded   *profile.Applied
}

// AuditOptions records the options that shaped the results, for the audit trail.
type AuditOptions struct {
	Model         string   `json:"model"`
	CIMethod      string   `json:"ci_method"`
	Level         float64  `json:"ci_level"`
	AbsoluteSigma bool     `json:"absolute_sigma"`
	Fixed         []string `json:"fixed"`
	Free          []string `json:"free"`
	By            string   `json:"group_by"`
	Method        string   `json:"arrhenius_method"`
	TSigma        float64  `json:"temperature_sigma_K"`
	TRef          float64  `json:"comparison_temperature_K"`
	References    []string `json:"references"`
	SolveMethod   string   `json:"backcalc_method"`
	// CaseThreshold is the case-depth threshold asked for and
	// HardnessCalibration the hardness–concentration table's file ("" for none).
	CaseThreshold       string `json:"case_threshold,omitempty"`
	HardnessCalibration string `json:"hardness_calibration,omitempty"`
	// Exclusions names the exclusions file applied ("" for none).
	Exclusions string `json:"exclusions_file,omitempty"`
	// TempUnit is the temperature unit of the text and reports; the
	// writer fills it (report), since it shapes the output, not the numbers.
	TempUnit string `json:"temperature_unit"`
}

func auditOptions(o Options) AuditOptions {
	a := AuditOptions{Model: o.Fit.Model, CIMethod: string(o.Fit.CI), Level: o.level(), AbsoluteSigma: o.Fit.AbsoluteSigma,
		Fixed: []string{}, Free: append([]string{}, o.Fit.Free...), By: o.by(), Method: o.method(),
		TSigma: o.Arrhenius.TemperatureSigma, TRef: o.TRef, References: append([]string{}, o.References...),
		SolveMethod: string(o.Solve.Method)}
	if o.Fit.Custom != nil {
		a.Model = o.Fit.Custom.Name()
	}
	if o.Exclusions != nil {
		a.Exclusions = FileBase(o.Exclusions.Source)
	}
	if o.Fit.CaseThreshold != nil {
		a.CaseThreshold = o.Fit.CaseThreshold.String()
	}
	if o.Fit.Calibration != nil {
		a.HardnessCalibration = FileBase(o.Fit.Calibration.Source)
	}
	if a.Model == "" {
		a.Model = "erf"
	}
	if a.CIMethod == "" {
		a.CIMethod = "profile"
	}
	if a.SolveMethod == "" {
		a.SolveMethod = "analytic"
	}
	for k, v := range o.Fit.Fixed {
		a.Fixed = append(a.Fixed, fmt.Sprintf("%s=%g", k, v))
	}
	sort.Strings(a.Fixed)
	return a
}

func (o Options) method() string {
	if strings.EqualFold(strings.TrimSpace(o.Method), "global") {
		return "global"
	}
	return "two-stage"
}

// readable lists the extensions read from a folder (as profile.ReadAll does).
var readable = map[string]bool{".csv": true, ".tsv": true, ".txt": true, ".xlsx": true, ".xlsm": true}

// Run reads every input (files, folders, long tables, workbooks),
// fits each profile, fits an Arrhenius line per group, compares the
// groups, and back-calculates the parts marked unknown (metadata key or
// column "unknown": "temperature", "time", or yes/true/1 for whichever of
// the two is missing). Unknown parts stay out of the calibration.
//
// A profile that cannot be fitted is reported, not fatal; a group whose
// line cannot be fitted is reported too. Reading errors (a bad file) stop
// the campaign: the error names the file, line and column.
func Run(inputs []string, opts Options) (*Result, error) {
	if len(inputs) == 0 {
		return nil, fmt.Errorf("%w: no input files or folders given", fit.ErrBadInput)
	}
	opts.progress("read", 0, len(inputs))
	if opts.KeepGoing {
		ps, skipped := profile.ReadAllKeepGoing(inputs)
		audit := hashReadable(inputs)
		opts.progress("read", len(inputs), len(inputs))
		if len(ps) == 0 {
			if len(skipped) > 0 {
				return nil, fmt.Errorf("no input could be read; the first: %w", skipped[0].Err)
			}
			return nil, fmt.Errorf("%w: the inputs hold no profiles", fit.ErrBadInput)
		}
		res, err := run(ps, audit, opts)
		if res != nil {
			res.NotRead = skipped
		}
		return res, err
	}
	audit, err := hashInputs(inputs)
	if err != nil {
		return nil, err
	}
	ps, err := profile.ReadAll(inputs)
	if err != nil {
		return nil, err
	}
	opts.progress("read", len(inputs), len(inputs))
	return run(ps, audit, opts)
}

// RunProfiles runs a campaign on profiles already read (a server's
// uploads); inputs are the audit trail's files. The profiles are not
// changed (the campaign works on a copy).
func RunProfiles(ps []profile.Profile, inputs []InputFile, opts Options) (*Result, error) {
	return run(append([]profile.Profile(nil), ps...), inputs, opts)
}

// FileBase is a file name without its folder.
func FileBase(name string) string { return filepath.Base(filepath.ToSlash(name)) }

// RunFS runs a campaign on the profile files in fsys (every .csv,
// .tsv and .txt file, walked in lexical order; the embedded demo campaign
// for instance). Workbooks inside an fs.FS are not read.
func RunFS(fsys fs.FS, opts Options) (*Result, error) {
	var names []string
	err := fs.WalkDir(fsys, ".", func(p string, d fs.DirEntry, err error) error {
		if err != nil {
			return err
		}
		base := path.Base(p)
		if d.IsDir() {
			if p != "." && strings.HasPrefix(base, ".") {
				return fs.SkipDir
			}
			return nil
		}
		ext := strings.ToLower(path.Ext(p))
		if strings.HasPrefix(base, ".") || strings.HasPrefix(base, "~$") || !readable[ext] {
			return nil
		}
		if ext == ".xlsx" || ext == ".xlsm" {
			return fmt.Errorf("%w: %s: workbooks inside an embedded or virtual file system are not read; export the sheets as CSV", fit.ErrBadInput, p)
		}
		names = append(names, p)
		return nil
	})
	if err != nil {
		return nil, err
	}
	if len(names) == 0 {
		return nil, fmt.Errorf("%w: no .csv, .tsv or .txt profile files found", fit.ErrBadInput)
	}
	var ps []profile.Profile
	var audit []InputFile
	seen := map[string]string{}
	for i, n := range names {
		opts.progress("read", i, len(names))
		b, err := fs.ReadFile(fsys, n)
		if err != nil {
			return nil, err
		}
		sum := sha256.Sum256(b)
		audit = append(audit, InputFile{Name: n, SHA256: hex.EncodeToString(sum[:]), Bytes: int64(len(b))})
		got, err := profile.ReadCSV(bytes.NewReader(b), n)
		if err != nil {
			return nil, err
		}
		for _, p := range got {
			if other, dup := seen[p.ID]; dup {
				return nil, &profile.Error{File: n, Err: fmt.Errorf("%w: profile id %q is also used by %s", profile.ErrDuplicate, p.ID, other),
					Hint: "rename one of them (the id comes from an id metadata line, the id column or the file name)"}
			}
			seen[p.ID] = p.Source
		}
		ps = append(ps, got...)
	}
	opts.progress("read", len(names), len(names))
	return run(ps, audit, opts)
}

// hashInputs records name, size and SHA-256 of every input file (folders
// expanded as profile.ReadAll does).
func hashInputs(inputs []string) ([]InputFile, error) {
	var files []string
	for _, in := range inputs {
		fi, err := os.Stat(in)
		if err != nil {
			return nil, &profile.Error{File: in, Err: err, Hint: "check the path and the permissions"}
		}
		if !fi.IsDir() {
			files = append(files, in)
			continue
		}
		entries, err := os.ReadDir(in)
		if err != nil {
			return nil, &profile.Error{File: in, Err: err, Hint: "check the path and the permissions"}
		}
		var sub []string
		for _, e := range entries {
			n := e.Name()
			if e.IsDir() || strings.HasPrefix(n, ".") || strings.HasPrefix(n, "~$") || !readable[strings.ToLower(filepath.Ext(n))] {
				continue
			}
			sub = append(sub, filepath.Join(in, n))
		}
		sort.Strings(sub)
		files = append(files, sub...)
	}
	out := make([]InputFile, 0, len(files))
	for _, f := range files {
		h := sha256.New()
		fh, err := os.Open(f)
		if err != nil {
			return nil, &profile.Error{File: f, Err: err, Hint: "check the path and the permissions"}
		}
		n, err := io.Copy(h, fh)
		fh.Close()
		if err != nil {
			return nil, &profile.Error{File: f, Err: err, Hint: "check that the file can be read"}
		}
		out = append(out, InputFile{Name: f, SHA256: hex.EncodeToString(h.Sum(nil)), Bytes: n})
	}
	return out, nil
}

// hashReadable is hashInputs for KeepGoing: a path or file that cannot be
// opened is left out of the audit (it is listed among the inputs not read).
func hashReadable(inputs []string) []InputFile {
	var out []InputFile
	for _, in := range inputs {
		got, err := hashInputs([]string{in})
		if err == nil {
			out = append(out, got...)
			continue
		}
		fi, serr := os.Stat(in)
		if serr != nil || !fi.IsDir() {
			continue
		}
		entries, _ := os.ReadDir(in)
		for _, e := range entries {
			n := e.Name()
			if e.IsDir() || strings.HasPrefix(n, ".") || strings.HasPrefix(n, "~$") || !readable[strings.ToLower(filepath.Ext(n))] {
				continue
			}
			if got, err := hashInputs([]string{filepath.Join(in, n)}); err == nil {
				out = append(out, got...)
			}
		}
	}
	return out
}

// DefaultVersion is the software version recorded when Options.Version is "".
const DefaultVersion = fickfit.Version

func versionOr(v string) string {
	if strings.TrimSpace(v) == "" {
		return DefaultVersion
	}
	return v
}
