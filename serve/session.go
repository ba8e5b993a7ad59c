package serve

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"math"
	"os"
	"slices"
	"strings"
	"sync"
	"sync/atomic"

	"github.com/fickfit/fickfit/campaign"
	"github.com/fickfit/fickfit/fit"
	"github.com/fickfit/fickfit/fit/numeric"
	"github.com/fickfit/fickfit/internal/parallel"
	"github.com/fickfit/fickfit/profile"
	"github.com/fickfit/fickfit/report"
)

// settings are the page's fit options, one set for every profile (so that
// one command line reproduces the whole session). The zero value is
// completed by defaults() to the command line's defaults.
type settings struct {
	Model         string   `json:"model"`
	CI            string   `json:"ci"`
	Level         float64  `json:"level"`
	Fix           []string `json:"fix"`
	Free          []string `json:"free"`
	CaseThreshold string   `json:"case_threshold"`
	// Calibration is the name of the hardness–concentration table loaded
	// (read-only here: it is set by uploading the table).
	Calibration string `json:"calibration"`
	By          string `json:"by"`
	TempUnit    string `json:"temperature_unit"`
	// DC and Surface configure the numerical model (model "numeric"): the
	// concentration law of D (const or exp; a table law needs a file and
	// stays on the command line) and the surface condition (fixed or
	// masstransfer), as --dc and --surface do.
	DC      string `json:"dc"`
	Surface string `json:"surface"`
}

// Defaults of the command line (cmd/fickfit/fitflags.go): the page's
// numbers equal a command run without these flags.
const (
	defaultResamples = 2000
	defaultSeed      = 1
)

func (st *settings) defaults() {
	st.Model = strings.ToLower(strings.TrimSpace(st.Model))
	st.DC = strings.ToLower(strings.TrimSpace(st.DC))
	st.Surface = strings.ToLower(strings.TrimSpace(st.Surface))
	if st.Model == "" {
		st.Model = "erf"
	}
	if st.CI == "" {
		st.CI = string(fit.CIProfile)
	}
	if st.Level == 0 {
		st.Level = 0.95
	}
	if st.By == "" {
		st.By = "lot"
	}
	if st.TempUnit == "" {
		st.TempUnit = "C"
	}
	if st.DC == "" {
		st.DC = string(numeric.LawConst)
	}
	if st.Surface == "" {
		st.Surface = surfaceFixed
	}
	if st.Fix == nil {
		st.Fix = []string{}
	}
	if st.Free == nil {
		st.Free = []string{}
	}
}

// options turns the settings into fit options, refusing what the command
// line refuses, with messages for the page.
func (st settings) options(cal *profile.Calibration) (fit.Options, report.TempUnit, error) {
	var o fit.Options
	ci, err := fit.ParseCIMethod(st.CI)
	if err != nil {
		return o, "", err
	}
	if !(st.Level > 0 && st.Level < 1) {
		return o, "", fmt.Errorf("the confidence level %g must lie between 0 and 1, e.g. 0.95", st.Level)
	}
	m := st.Model
	if !slices.Contains(modelNames(), m) && m != "auto" {
		return o, "", fmt.Errorf("model %q: choose one of %s or auto", st.Model, strings.Join(modelNames(), ", "))
	}
	custom, err := st.numericModel(m)
	if err != nil {
		return o, "", err
	}
	o = fit.Options{Model: m, Custom: custom, Level: st.Level, CI: ci, Free: st.Free, Calibration: cal,
		Bootstrap: fit.BootstrapOptions{Resamples: defaultResamples, Seed: defaultSeed}}
	if len(st.Fix) > 0 {
		o.Fixed = map[string]float64{}
		for _, f := range st.Fix {
			name, v, err := fit.ParseFixed(f)
			if err != nil {
				return o, "", err
			}
			o.Fixed[name] = v
		}
	}
	if s := strings.TrimSpace(st.CaseThreshold); s != "" {
		th, err := fit.ParseThreshold(s)
		if err != nil {
			return o, "", err
		}
		o.CaseThreshold = &th
	}
	u, err := report.ParseTempUnit(st.TempUnit)
	return o, u, err
}

// surfaceFixed and surfaceMassTransfer are the surface conditions of the
// numerical model, named as --surface names them.
const (
	surfaceFixed        = "fixed"
	surfaceMassTransfer = "masstransfer"
)

// numericModel builds the numerical model for model "numeric" as the
// command line builds it from --dc and --surface; nil for other models.
func (st settings) numericModel(model string) (fit.Model, error) {
	if model != numericName {
		return nil, nil
	}
	law, err := numeric.ParseLaw(st.DC)
	if err != nil {
		return nil, err
	}
	if law == numeric.LawTable {
		return nil, errors.New("a tabulated D(C) is read from a file: use the command line (--model numeric --dc table --dc-table FILE)")
	}
	cfg := numeric.Config{DC: law}
	switch st.Surface {
	case surfaceFixed:
	case surfaceMassTransfer:
		cfg.Surface = numeric.SurfaceMassTransfer
	default:
		return nil, fmt.Errorf("surface %q: use %s or %s", st.Surface, surfaceFixed, surfaceMassTransfer)
	}
	m, err := numeric.NewModel(cfg)
	if err != nil {
		return nil, err
	}
	return m, nil
}

// numericName is the name of the numerical model (package fit/numeric),
// which is built from settings of its own rather than from the registry.
const numericName = "numeric"

// modelNames are the models the page offers: the registered ones and the
// numerical model.
func modelNames() []string {
	return append(fit.ModelNames(), numericName)
}

// dcLaws are the concentration laws of D the page offers for the
// numerical model (a table needs a file: command line only).
func dcLaws() []string {
	return slices.DeleteFunc(numeric.Laws(), func(l string) bool { return l == string(numeric.LawTable) })
}

// file is one input file: read from disk at start or uploaded.
type file struct {
	Name   string   `json:"name"`
	Bytes  int64    `json:"bytes"`
	SHA256 string   `json:"sha256"`
	Error  string   `json:"error,omitempty"`
	IDs    []string `json:"profiles"`
	// path is the file on disk ("" for an upload): it is never written.
	path string
}

// fitKey tells which options and exclusions a cached fit was made with.
type fitKey struct{ opt, excl int }

// entry is one profile with its cached fit.
type entry struct {
	p    profile.Profile // as read
	file *file
	excl int // bumped when the exclusions of this profile change

	key     fitKey
	done    bool
	res     *fit.Result
	err     error
	used    profile.Profile // what was fitted: less exclusions, calibrated
	removed []int           // indices into p of the excluded points
}

// session is the state of the workbench.
type session struct {
	version string

	mu      sync.Mutex
	files   []*file
	entries []*entry
	byID    map[string]*entry
	st      settings
	fo      fit.Options
	unit    report.TempUnit
	cal     *profile.Calibration
	optGen  int
	excl    *profile.Exclusions // never changed in place: replaced
	running bool
	again   bool
	done    atomic.Int64
	total   atomic.Int64
	gen     atomic.Int64 // optGen, for workers to notice a change
	closed  atomic.Bool
	// maxUpload bounds an upload: the readers' limit (profile.MaxFileSize).
	maxUpload int64
}

func newSession(version string) *session {
	s := &session{version: version, byID: map[string]*entry{}, excl: &profile.Exclusions{Source: "exclusions.csv"},
		maxUpload: profile.MaxFileSize}
	s.st.defaults()
	s.fo, s.unit, _ = s.st.options(nil)
	return s
}

func (s *session) close() { s.closed.Store(true) }

// setExclusions replaces the exclusions (the session's copy is renamed
// exclusions.csv, the name it is saved under).
func (s *session) setExclusions(x *profile.Exclusions) {
	s.mu.Lock()
	defer s.mu.Unlock()
	c := &profile.Exclusions{Source: "exclusions.csv", Rows: slices.Clone(x.Rows)}
	s.excl = c
	for _, e := range s.entries {
		e.excl++
	}
}

// loadPaths reads files and folders given on the command line, each file
// on its own so that one bad file does not stop the others.
func (s *session) loadPaths(paths []string) error {
	var names []string
	for _, p := range paths {
		got, err := profile.Files([]string{p})
		if err != nil {
			s.addFile(&file{Name: p, path: p, IDs: []string{}, Error: err.Error()}, nil)
			continue
		}
		names = append(names, got...)
	}
	for _, n := range names {
		b, err := os.ReadFile(n)
		if err != nil {
			s.addFile(&file{Name: n, path: n, IDs: []string{}, Error: (&profile.Error{File: n, Err: err, Hint: "check the path and the permissions"}).Error()}, nil)
			continue
		}
		s.load(n, n, b)
	}
	s.kick()
	return nil
}

// load reads one file's bytes with the command line's readers and adds
// its profiles; an error is kept beside the file. A file of the same
// name replaces the earlier one.
func (s *session) load(name, path string, data []byte) *file {
	sum := sha256.Sum256(data)
	f := &file{Name: name, path: path, Bytes: int64(len(data)), SHA256: hex.EncodeToString(sum[:]), IDs: []string{}}
	ps, err := profile.ReadBytes(data, name)
	if err != nil {
		f.Error = err.Error()
		ps = nil
	}
	s.addFile(f, ps)
	return f
}

func (s *session) addFile(f *file, ps []profile.Profile) {
	s.mu.Lock()
	defer s.mu.Unlock()
	if old := s.fileNamed(f.Name); old != nil {
		s.removeLocked(old)
	}
	for i := range ps {
		if e, dup := s.byID[ps[i].ID]; dup {
			err := &profile.Error{File: f.Name, Err: fmt.Errorf("%w: profile id %q is also used by %s", profile.ErrDuplicate, ps[i].ID, e.p.Source),
				Hint: "rename one of them (the id comes from an id metadata line, the id column, the sheet name or the file name)"}
			if len(ps[i].Line) > 0 {
				err.Line = ps[i].Line[0]
			}
			f.Error, ps = err.Error(), nil
			break
		}
	}
	s.files = append(s.files, f)
	for i := range ps {
		e := &entry{p: ps[i], file: f}
		s.entries = append(s.entries, e)
		s.byID[e.p.ID] = e
		f.IDs = append(f.IDs, e.p.ID)
	}
}

func (s *session) fileNamed(name string) *file {
	for _, f := range s.files {
		if f.Name == name {
			return f
		}
	}
	return nil
}

func (s *session) removeLocked(f *file) {
	s.files = slices.DeleteFunc(s.files, func(g *file) bool { return g == f })
	s.entries = slices.DeleteFunc(s.entries, func(e *entry) bool { return e.file == f })
	for _, id := range f.IDs {
		delete(s.byID, id)
	}
}

// prepare is what a profile is fitted as: the exclusions applied, then a
// hardness profile converted by the calibration (the command line's order:
// --exclude, then --hardness-calibration).
func prepare(p profile.Profile, x *profile.Exclusions, cal *profile.Calibration) (profile.Profile, []int, error) {
	q, idx, _, err := x.Exclude(p)
	if err != nil {
		return p, nil, err
	}
	if cal != nil {
		if _, ok := profile.HardnessScale(q.ValueUnit); ok {
			c, err := cal.Apply(&q)
			if err != nil {
				return q, idx, err
			}
			q = c
		}
	}
	return q, idx, nil
}

// job is a fit to do with a snapshot of what it depends on.
type job struct {
	e   *entry
	key fitKey
	x   *profile.Exclusions
	cal *profile.Calibration
	fo  fit.Options
}

func (s *session) jobLocked(e *entry) job {
	return job{e: e, key: fitKey{s.optGen, e.excl}, x: s.excl, cal: s.cal, fo: s.fo}
}

// run fits one job (no lock held) and stores it if still current.
func (s *session) run(j job) {
	used, idx, err := prepare(j.e.p, j.x, j.cal)
	var r *fit.Result
	if err == nil {
		r, err = fitRecovered(&used, j.fo)
	}
	s.mu.Lock()
	defer s.mu.Unlock()
	if j.e.key == j.key && j.e.done || j.key.opt != s.optGen || j.key.excl != j.e.excl {
		return
	}
	j.e.key, j.e.done, j.e.res, j.e.err, j.e.used, j.e.removed = j.key, true, r, err, used, idx
}

func fitRecovered(p *profile.Profile, o fit.Options) (r *fit.Result, err error) {
	rs, errs := fit.FitAll([]profile.Profile{*p}, o, nil)
	return rs[0], errs[0]
}

// current reports whether e's cached fit matches the session's state.
func (s *session) currentLocked(e *entry) bool {
	return e.done && e.key == fitKey{s.optGen, e.excl}
}

// fitNow makes e's fit current, fitting it in this goroutine if needed.
func (s *session) fitNow(e *entry) {
	for i := 0; i < 3; i++ {
		s.mu.Lock()
		if s.currentLocked(e) {
			s.mu.Unlock()
			return
		}
		j := s.jobLocked(e)
		s.mu.Unlock()
		s.run(j)
	}
}

// kick starts fitting every profile whose fit is not current, in the
// background on all cores; a run already going picks the new work up.
func (s *session) kick() {
	s.mu.Lock()
	if s.running {
		s.again = true
		s.mu.Unlock()
		return
	}
	s.running = true
	s.mu.Unlock()
	go s.fitAll()
}

func (s *session) fitAll() {
	for !s.closed.Load() {
		s.mu.Lock()
		s.again = false
		var jobs []job
		for _, e := range s.entries {
			if !s.currentLocked(e) {
				jobs = append(jobs, s.jobLocked(e))
			}
		}
		gen := int64(s.optGen)
		s.gen.Store(gen)
		if len(jobs) == 0 {
			s.running = false
			s.mu.Unlock()
			return
		}
		s.done.Store(0)
		s.total.Store(int64(len(jobs)))
		s.mu.Unlock()
		parallel.For(len(jobs), func(i int) {
			if s.gen.Load() == gen && !s.closed.Load() {
				s.run(jobs[i])
			}
			s.done.Add(1)
		}, nil)
	}
}

// progress is the state of the background fitting.
func (s *session) progress() (done, total int64, running bool) {
	s.mu.Lock()
	running = s.running
	s.mu.Unlock()
	return s.done.Load(), s.total.Load(), running
}

// changeSettings applies new settings; every profile is fitted again.
func (s *session) changeSettings(st settings) error {
	st.defaults()
	s.mu.Lock()
	st.Calibration = s.st.Calibration
	fo, u, err := st.options(s.cal)
	if err != nil {
		s.mu.Unlock()
		return err
	}
	s.st, s.fo, s.unit = st, fo, u
	s.optGen++
	s.gen.Store(int64(s.optGen))
	s.mu.Unlock()
	s.kick()
	return nil
}

// setCalibration loads a hardness–concentration table (nil removes it).
func (s *session) setCalibration(cal *profile.Calibration) {
	s.mu.Lock()
	s.cal = cal
	s.st.Calibration = ""
	if cal != nil {
		s.st.Calibration = campaign.FileBase(cal.Source)
	}
	s.fo.Calibration = cal
	s.optGen++
	s.gen.Store(int64(s.optGen))
	s.mu.Unlock()
	s.kick()
}

// toggle excludes point i of profile id, or restores it when it is
// excluded; with whole it leaves the profile out of (or back in) the
// Arrhenius lines.
func (s *session) toggle(id string, i int, whole bool, reason string) error {
	s.mu.Lock()
	defer s.mu.Unlock()
	e := s.byID[id]
	if e == nil {
		return fmt.Errorf("there is no profile %q", id)
	}
	rows := slices.Clone(s.excl.Rows)
	if whole {
		n := len(rows)
		rows = slices.DeleteFunc(rows, func(r profile.Exclusion) bool { return r.Whole() && r.Profile == id })
		if len(rows) == n {
			rows = append(rows, profile.Exclusion{File: profile.FileName(e.p.Source), Profile: id, Depth: math.NaN(), Reason: reason})
		}
	} else {
		if i < 0 || i >= e.p.Len() {
			return fmt.Errorf("profile %s has no point %d", id, i)
		}
		n := len(rows)
		rows = slices.DeleteFunc(rows, func(r profile.Exclusion) bool {
			if r.Whole() || r.Profile != id {
				return false
			}
			_, idx, _, err := (&profile.Exclusions{Rows: []profile.Exclusion{r}}).Exclude(e.p)
			return err == nil && slices.Contains(idx, i)
		})
		if len(rows) == n {
			r := profile.Exclusion{File: profile.FileName(e.p.Source), Profile: id, Depth: e.p.Depth[i], Reason: strings.TrimSpace(reason)}
			if i < len(e.p.Line) {
				r.Line = e.p.Line[i]
			}
			rows = append(rows, r)
		}
		e.excl++
	}
	s.excl = &profile.Exclusions{Source: s.excl.Source, Rows: rows}
	return nil
}

// checkExclusions applies x to every loaded profile and returns the first
// error (an exclusions file made for other inputs).
func (s *session) checkExclusions(x *profile.Exclusions) error {
	s.mu.Lock()
	defer s.mu.Unlock()
	for _, e := range s.entries {
		if _, _, _, err := x.Exclude(e.p); err != nil {
			return err
		}
	}
	return nil
}

// exclusionsCSV writes the exclusions as the sidecar file.
func (s *session) exclusionsCSV() []byte {
	s.mu.Lock()
	x := s.excl
	s.mu.Unlock()
	var b bytes.Buffer
	x.WriteCSV(&b)
	return b.Bytes()
}

// campaignRun runs the campaign on the loaded profiles with the session's
// options and exclusions, reusing the cached fits.
func (s *session) campaignRun() (*campaign.Result, report.TempUnit, error) {
	s.mu.Lock()
	var ps []profile.Profile
	var inputs []campaign.InputFile
	for _, f := range s.files {
		if f.Error == "" {
			inputs = append(inputs, campaign.InputFile{Name: f.Name, SHA256: f.SHA256, Bytes: f.Bytes})
		}
	}
	cache := map[string]*entry{}
	for _, e := range s.entries {
		ps = append(ps, e.p)
		if s.currentLocked(e) {
			cache[e.p.ID] = e
		}
	}
	o := campaign.Options{Fit: s.fo, By: s.st.By, Version: s.version}
	if len(s.excl.Rows) > 0 {
		o.Exclusions = s.excl
	}
	cal, unit := s.cal, s.unit
	s.mu.Unlock()
	if len(ps) == 0 {
		return nil, unit, fmt.Errorf("no profiles are loaded: drop profile files on the page first")
	}
	if cal != nil {
		o.Adjust = func(p *profile.Profile) error {
			if _, ok := profile.HardnessScale(p.ValueUnit); !ok {
				return nil
			}
			c, err := cal.Apply(p)
			*p = c
			return err
		}
	}
	o.Fitter = func(ps []profile.Profile, fo fit.Options, progress func(done, total int)) ([]*fit.Result, []error) {
		rs, errs := make([]*fit.Result, len(ps)), make([]error, len(ps))
		parallel.For(len(ps), func(i int) {
			if e := cache[ps[i].ID]; e != nil && sameData(e.used, ps[i]) {
				rs[i], errs[i] = e.res, e.err
				if e.res != nil {
					// The campaign adds metadata (the quantity) that the
					// fit only carries along: the numbers are the same.
					c := *e.res
					c.Meta = ps[i].Meta
					rs[i] = &c
				}
				return
			}
			rs[i], errs[i] = fitRecovered(&ps[i], fo)
		}, progress)
		return rs, errs
	}
	res, err := campaign.RunProfiles(ps, inputs, o)
	return res, unit, err
}

// sameData tells whether two profiles hold the same points and conditions
// (a cached fit of one is the fit of the other).
func sameData(a, b profile.Profile) bool {
	return a.ID == b.ID && a.Source == b.Source && a.Lot == b.Lot && a.Material == b.Material && a.Temperature == b.Temperature && a.TemperatureSigma == b.TemperatureSigma && a.Time == b.Time && a.Thickness == b.Thickness &&
		slices.Equal(a.Depth, b.Depth) && slices.Equal(a.Value, b.Value) && slices.Equal(a.Sigma, b.Sigma) &&
		a.ValueUnit == b.ValueUnit
}
