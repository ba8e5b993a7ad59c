package serve

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"net/http"
	"path/filepath"
	"strconv"
	"strings"

	"github.com/fickfit/fickfit/fit"
	"github.com/fickfit/fickfit/fit/numeric"
	"github.com/fickfit/fickfit/internal/jsonx"
	"github.com/fickfit/fickfit/profile"
	"github.com/fickfit/fickfit/report"
)

// writeJSON answers with v as JSON (undetermined numbers null).
func writeJSON(w http.ResponseWriter, status int, v any) {
	var b bytes.Buffer
	if err := jsonx.Encode(&b, v); err != nil {
		http.Error(w, "internal error: "+err.Error(), http.StatusInternalServerError)
		return
	}
	w.Header().Set("Content-Type", "application/json; charset=utf-8")
	w.WriteHeader(status)
	w.Write(b.Bytes())
}

// fail answers with {"error": message}: 400 for what the user can fix.
func fail(w http.ResponseWriter, status int, err error) {
	writeJSON(w, status, map[string]string{"error": err.Error()})
}

// readBody reads a request body of at most limit bytes.
func readBody(w http.ResponseWriter, r *http.Request, limit int64) ([]byte, error) {
	b, err := io.ReadAll(http.MaxBytesReader(w, r.Body, limit))
	var mb *http.MaxBytesError
	if errors.As(err, &mb) {
		return nil, fmt.Errorf("the file is larger than %d MiB, the most the readers take; split it into smaller files", limit>>20)
	}
	return b, err
}

// uploadName is the base name of an uploaded file (no folder can be named).
func uploadName(r *http.Request) (string, error) {
	n := strings.TrimSpace(r.URL.Query().Get("name"))
	n = filepath.Base(filepath.FromSlash(strings.ReplaceAll(n, `\`, "/")))
	if n == "" || n == "." || n == ".." || n == string(filepath.Separator) {
		return "", errors.New("the upload has no file name")
	}
	return n, nil
}

// num is a nullable number: nil for NaN, ±Inf, and for 0 when zeroNull.
func num(v float64, zeroNull bool) *float64 {
	if zeroNull && v == 0 {
		return nil
	}
	return jsonx.Num(v)
}

// ---- state ----

type exclusionView struct {
	File    string   `json:"file"`
	Profile string   `json:"profile"`
	DepthUM *float64 `json:"depth_um"`
	Line    int      `json:"line,omitempty"`
	Reason  string   `json:"reason"`
}

type stateView struct {
	Version    string          `json:"version"`
	Files      []*file         `json:"files"`
	Profiles   int             `json:"profiles"`
	Settings   settings        `json:"settings"`
	Models     []string        `json:"models"`
	DCLaws     []string        `json:"dc_laws"`
	CIMethods  []string        `json:"ci_methods"`
	Done       int64           `json:"done"`
	Total      int64           `json:"total"`
	Running    bool            `json:"running"`
	Generation int             `json:"generation"`
	Exclusions []exclusionView `json:"exclusions"`
	Command    string          `json:"command"`
	MaxBytes   int64           `json:"max_file_bytes"`
}

func (s *session) state() stateView {
	done, total, running := s.progress()
	s.mu.Lock()
	defer s.mu.Unlock()
	v := stateView{Version: s.version, Files: append([]*file{}, s.files...), Profiles: len(s.entries), Settings: s.st,
		Models: append(modelNames(), "auto"), DCLaws: dcLaws(), CIMethods: fit.CIMethods(), Done: done, Total: total, Running: running,
		Generation: s.optGen, Exclusions: []exclusionView{}, MaxBytes: profile.MaxFileSize}
	for _, e := range s.excl.Rows {
		v.Exclusions = append(v.Exclusions, exclusionView{File: e.File, Profile: e.Profile, DepthUM: num(e.Depth*1e6, false), Line: e.Line, Reason: e.Reason})
	}
	v.Command = s.commandLocked()
	return v
}

// commandLocked is the command line that computes what the page shows.
func (s *session) commandLocked() string {
	args := []string{"fickfit", "campaign"}
	for _, f := range s.files {
		if f.Error == "" {
			args = append(args, shellQuote(f.Name))
		}
	}
	st := s.st
	if st.Model != "erf" {
		args = append(args, "--model", st.Model)
	}
	if st.Model == numericName {
		if st.DC != string(numeric.LawConst) {
			args = append(args, "--dc", st.DC)
		}
		if st.Surface != surfaceFixed {
			args = append(args, "--surface", st.Surface)
		}
	}
	if st.CI != string(fit.CIProfile) {
		args = append(args, "--ci", st.CI)
	}
	if st.Level != 0.95 {
		args = append(args, "--level", strconv.FormatFloat(st.Level, 'g', -1, 64))
	}
	for _, f := range st.Fix {
		args = append(args, "--fix", shellQuote(f))
	}
	for _, f := range st.Free {
		args = append(args, "--free", shellQuote(f))
	}
	if st.CaseThreshold != "" {
		args = append(args, "--case-threshold", shellQuote(st.CaseThreshold))
	}
	if st.Calibration != "" {
		args = append(args, "--hardness-calibration", shellQuote(st.Calibration))
	}
	if st.By != "lot" {
		args = append(args, "--by", shellQuote(st.By))
	}
	if len(s.excl.Rows) > 0 {
		args = append(args, "--exclude", "exclusions.csv")
	}
	if st.TempUnit != "C" {
		args = append(args, "--temperature-unit", st.TempUnit)
	}
	return strings.Join(args, " ")
}

// shellQuote quotes a word for a POSIX shell when it needs it.
func shellQuote(s string) string {
	if s != "" && strings.IndexFunc(s, func(r rune) bool {
		return !(r >= 'a' && r <= 'z' || r >= 'A' && r <= 'Z' || r >= '0' && r <= '9' || strings.ContainsRune("-_./=:+%,@", r))
	}) < 0 {
		return s
	}
	return "'" + strings.ReplaceAll(s, "'", `'\''`) + "'"
}

func (s *session) handleState(w http.ResponseWriter, r *http.Request) {
	writeJSON(w, http.StatusOK, s.state())
}

// ---- files ----

func (s *session) handleUpload(w http.ResponseWriter, r *http.Request) {
	name, err := uploadName(r)
	if err != nil {
		fail(w, http.StatusBadRequest, err)
		return
	}
	b, err := readBody(w, r, s.maxUpload)
	if err != nil {
		fail(w, http.StatusRequestEntityTooLarge, fmt.Errorf("%s: %w", name, err))
		return
	}
	f := s.load(name, "", b)
	s.kick()
	writeJSON(w, http.StatusOK, f)
}

func (s *session) handleRemove(w http.ResponseWriter, r *http.Request) {
	name := r.URL.Query().Get("name")
	s.mu.Lock()
	f := s.fileNamed(name)
	if f != nil {
		s.removeLocked(f)
	}
	s.mu.Unlock()
	if f == nil {
		fail(w, http.StatusNotFound, fmt.Errorf("no file %q is loaded", name))
		return
	}
	writeJSON(w, http.StatusOK, s.state())
}

// ---- settings, calibration, exclusions ----

func (s *session) handleSettings(w http.ResponseWriter, r *http.Request) {
	var st settings
	b, err := readBody(w, r, 1<<20)
	if err == nil {
		err = json.Unmarshal(b, &st)
	}
	if err == nil {
		err = s.changeSettings(st)
	}
	if err != nil {
		fail(w, http.StatusBadRequest, errors.New(strings.TrimPrefix(err.Error(), fit.ErrBadInput.Error()+": ")))
		return
	}
	writeJSON(w, http.StatusOK, s.state())
}

func (s *session) handleCalibration(w http.ResponseWriter, r *http.Request) {
	b, err := readBody(w, r, s.maxUpload)
	if err != nil {
		fail(w, http.StatusRequestEntityTooLarge, err)
		return
	}
	if len(b) == 0 {
		s.setCalibration(nil)
		writeJSON(w, http.StatusOK, s.state())
		return
	}
	name, err := uploadName(r)
	if err != nil {
		fail(w, http.StatusBadRequest, err)
		return
	}
	cal, err := profile.ReadCalibrationCSV(bytes.NewReader(b), name)
	if err != nil {
		fail(w, http.StatusBadRequest, err)
		return
	}
	s.setCalibration(cal)
	writeJSON(w, http.StatusOK, s.state())
}

type excludeRequest struct {
	ID     string `json:"id"`
	Index  int    `json:"index"`
	Whole  bool   `json:"whole"`
	Reason string `json:"reason"`
}

func (s *session) handleExclude(w http.ResponseWriter, r *http.Request) {
	var q excludeRequest
	b, err := readBody(w, r, 1<<20)
	if err == nil {
		err = json.Unmarshal(b, &q)
	}
	if err == nil {
		err = s.toggle(q.ID, q.Index, q.Whole, q.Reason)
	}
	if err != nil {
		fail(w, http.StatusBadRequest, err)
		return
	}
	s.kick()
	s.profileAnswer(w, q.ID)
}

func (s *session) handleLoadExclusions(w http.ResponseWriter, r *http.Request) {
	name, err := uploadName(r)
	if err != nil {
		fail(w, http.StatusBadRequest, err)
		return
	}
	b, err := readBody(w, r, s.maxUpload)
	if err != nil {
		fail(w, http.StatusRequestEntityTooLarge, err)
		return
	}
	x, err := profile.ReadExclusionsCSV(bytes.NewReader(b), name)
	if err == nil {
		err = s.checkExclusions(x)
	}
	if err != nil {
		fail(w, http.StatusBadRequest, err)
		return
	}
	s.setExclusions(x)
	s.kick()
	writeJSON(w, http.StatusOK, s.state())
}

func (s *session) handleSaveExclusions(w http.ResponseWriter, r *http.Request) {
	w.Header().Set("Content-Type", "text/csv; charset=utf-8")
	w.Header().Set("Content-Disposition", `attachment; filename="exclusions.csv"`)
	w.Write(s.exclusionsCSV())
}

// ---- the table of profiles ----

type rowView struct {
	ID       string        `json:"id"`
	File     string        `json:"file"`
	Lot      string        `json:"lot"`
	T        *float64      `json:"temperature_K"`
	Time     *float64      `json:"time_s"`
	TText    string        `json:"temperature"`
	TimeText string        `json:"time"`
	Model    string        `json:"model"`
	D        *float64      `json:"D"`
	DText    string        `json:"D_text"`
	CIText   string        `json:"ci_text"`
	Dt       bool          `json:"dt"`
	R2       *float64      `json:"r2"`
	R2Text   string        `json:"r2_text"`
	Warnings []fit.Warning `json:"warnings"`
	Status   string        `json:"status"`
	Error    string        `json:"error,omitempty"`
	Unknown  bool          `json:"unknown"`
	Excluded int           `json:"excluded"`
	LeftOut  bool          `json:"left_out"`
}

func (s *session) rowLocked(e *entry) rowView {
	p := &e.p
	v := rowView{ID: p.ID, File: e.file.Name, Lot: p.Lot, T: num(p.Temperature, true), Time: num(p.Time, true),
		Warnings: []fit.Warning{}, Status: "pending", Unknown: unknownMeta(p)}
	if p.Temperature > 0 {
		v.TText = report.TemperatureShort(p.Temperature, s.unit)
	}
	if p.Time > 0 {
		v.TimeText = report.Duration(p.Time)
	}
	for _, x := range s.excl.Rows {
		if x.Profile == p.ID {
			if x.Whole() {
				v.LeftOut = true
			} else {
				v.Excluded++
			}
		}
	}
	if !e.done {
		return v
	}
	if !s.currentLocked(e) {
		v.Status = "stale"
	}
	if e.err != nil {
		v.Status, v.Error = statusFailed(v.Status), report.Temps(e.err.Error(), s.unit)
		return v
	}
	rr := e.res
	if v.Status != "stale" {
		v.Status = "fitted"
	}
	v.Model = rr.Model
	if d := rr.Param("D"); d != nil {
		v.D = num(d.Value, false)
		v.DText, v.CIText = report.DText(rr)
	}
	v.Dt = rr.Time == 0
	v.R2, v.R2Text = num(rr.Stats.R2, false), report.R2Text(rr.Stats.R2)
	for _, w := range rr.Warnings {
		// Sentences for people: temperatures in the page's unit.
		v.Warnings = append(v.Warnings, fit.Warning{Code: w.Code, Message: report.Temps(w.Message, s.unit)})
	}
	return v
}

func statusFailed(st string) string {
	if st == "stale" {
		return "stale"
	}
	return "failed"
}

// unknownMeta tells whether a profile is a part marked unknown.
func unknownMeta(p *profile.Profile) bool {
	for k, v := range p.Meta {
		if strings.EqualFold(strings.TrimSpace(k), "unknown") {
			switch strings.ToLower(strings.TrimSpace(v)) {
			case "", "no", "false", "0", "n":
				return false
			}
			return true
		}
	}
	return false
}

func (s *session) handleProfiles(w http.ResponseWriter, r *http.Request) {
	s.mu.Lock()
	rows := make([]rowView, 0, len(s.entries))
	for _, e := range s.entries {
		rows = append(rows, s.rowLocked(e))
	}
	gen := s.optGen
	s.mu.Unlock()
	writeJSON(w, http.StatusOK, map[string]any{"generation": gen, "rows": rows})
}

// ---- one profile ----

type pointView struct {
	Depth    float64  `json:"depth_m"`
	Value    float64  `json:"value"`
	Sigma    *float64 `json:"sigma"`
	Line     int      `json:"line"`
	Excluded bool     `json:"excluded"`
	Reason   string   `json:"reason"`
}

type curveView struct {
	X  []float64  `json:"x"`
	Y  []*float64 `json:"y"`
	Lo []*float64 `json:"lo"`
	Hi []*float64 `json:"hi"`
}

type profileView struct {
	row
	Material  string          `json:"material"`
	Quantity  string          `json:"quantity"`
	ValueName string          `json:"value_name"`
	ValueUnit string          `json:"value_unit"`
	Points    []pointView     `json:"points"`
	Fit       json.RawMessage `json:"fit"`
	Curve     *curveView      `json:"curve"`
	Params    []report.ParamText
	Stats     []string `json:"stats"`
	Interval  string   `json:"interval"`
	Extra     string   `json:"extra"`
	Title     string   `json:"model_title"`
	LeftOutBy string   `json:"left_out_reason"`
}

type row = rowView

func (s *session) profileAnswer(w http.ResponseWriter, id string) {
	s.mu.Lock()
	e := s.byID[id]
	s.mu.Unlock()
	if e == nil {
		fail(w, http.StatusNotFound, fmt.Errorf("there is no profile %q", id))
		return
	}
	s.fitNow(e)
	v, err := s.profileView(e)
	if err != nil {
		fail(w, http.StatusInternalServerError, err)
		return
	}
	writeJSON(w, http.StatusOK, v)
}

func (s *session) handleProfile(w http.ResponseWriter, r *http.Request) {
	s.profileAnswer(w, r.URL.Query().Get("id"))
}

func (s *session) profileView(e *entry) (*profileView, error) {
	s.mu.Lock()
	v := &profileView{row: s.rowLocked(e), Material: e.p.Material, Quantity: e.p.Quantity, ValueName: e.p.ValueName,
		ValueUnit: e.p.ValueUnit, Fit: json.RawMessage("null")}
	reasons := map[int]string{}
	for _, x := range s.excl.Rows {
		if x.Profile != e.p.ID {
			continue
		}
		if x.Whole() {
			v.LeftOutBy = x.Reason
			continue
		}
		if _, idx, _, err := (&profile.Exclusions{Rows: []profile.Exclusion{x}}).Exclude(e.p); err == nil {
			for _, i := range idx {
				reasons[i] = x.Reason
			}
		}
	}
	excluded := map[int]bool{}
	for _, i := range e.removed {
		excluded[i] = true
	}
	for i := range e.p.Depth {
		pv := pointView{Depth: e.p.Depth[i], Value: e.p.Value[i], Excluded: excluded[i], Reason: reasons[i]}
		if i < len(e.p.Line) {
			pv.Line = e.p.Line[i]
		}
		if e.p.Sigma != nil {
			pv.Sigma = num(e.p.Sigma[i], false)
		}
		v.Points = append(v.Points, pv)
	}
	res, used := e.res, e.used
	s.mu.Unlock()
	if res == nil {
		return v, nil
	}
	// The fit exactly as 'fickfit fit --format json' writes it.
	var b bytes.Buffer
	if err := (report.Fits{Results: []*fit.Result{res}, Version: s.version}).WriteJSON(&b); err != nil {
		return nil, err
	}
	var doc struct {
		Fits []json.RawMessage `json:"fits"`
	}
	if err := json.Unmarshal(b.Bytes(), &doc); err != nil || len(doc.Fits) != 1 {
		return nil, fmt.Errorf("the fit could not be written: %v", err)
	}
	v.Fit = doc.Fits[0]
	v.Params, v.Stats, v.Extra = report.ParamTexts(res), report.StatsTexts(res), report.ExtraText(res)
	v.Interval = report.Level(res.CILevel) + " CI by " + report.CIMethodDescription(res.CIMethod)
	v.Title = report.ModelDescription(res.Model)
	v.Curve = curveOf(res, used)
	return v, nil
}

// curveOf evaluates the fitted curve and its band over the profile's depths.
func curveOf(r *fit.Result, p profile.Profile) *curveView {
	lo, hi := 0.0, 0.0
	for _, d := range p.Depth {
		lo, hi = math.Min(lo, d), math.Max(hi, d)
	}
	span := hi - lo
	if span <= 0 {
		span = 1e-6
	}
	const n = 161
	x := make([]float64, n)
	for i := range x {
		x[i] = lo + (span*1.04)*float64(i)/float64(n-1)
		if lo < 0 {
			x[i] = lo - span*0.02 + span*1.04*float64(i)/float64(n-1)
		}
	}
	y, blo, bhi, err := r.Curve(x)
	if err != nil {
		return nil
	}
	c := &curveView{X: x}
	for i := range x {
		c.Y = append(c.Y, num(y[i], false))
		c.Lo = append(c.Lo, num(blo[i], false))
		c.Hi = append(c.Hi, num(bhi[i], false))
	}
	return c
}
