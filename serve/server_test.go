package serve

import (
	"bytes"
	"crypto/sha256"
	"encoding/json"
	"io"
	"io/fs"
	"net/http"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"github.com/fickfit/fickfit/fit"
	"github.com/fickfit/fickfit/fit/numeric"
	"github.com/fickfit/fickfit/profile"
)

const token = "0123456789abcdef0123456789abcdef"

// start runs a server on loopback and returns it with its port.
func start(t *testing.T, o Options) (*Server, string) {
	t.Helper()
	o.Token = token
	s, err := New(o)
	if err != nil {
		t.Fatal(err)
	}
	ln, err := s.Listen("127.0.0.1:0")
	if err != nil {
		t.Fatal(err)
	}
	go s.Serve(ln)
	t.Cleanup(func() { ln.Close(); s.Close() })
	return s, s.port
}

// call sends a request with the given Host header and path.
func call(t *testing.T, port, method, host, path string, body []byte, hdr ...string) (int, http.Header, []byte) {
	t.Helper()
	req, err := http.NewRequest(method, "http://127.0.0.1:"+port+path, bytes.NewReader(body))
	if err != nil {
		t.Fatal(err)
	}
	req.Host = host
	for i := 0; i+1 < len(hdr); i += 2 {
		req.Header.Set(hdr[i], hdr[i+1])
	}
	resp, err := http.DefaultClient.Do(req)
	if err != nil {
		t.Fatal(err)
	}
	defer resp.Body.Close()
	b, _ := io.ReadAll(resp.Body)
	return resp.StatusCode, resp.Header, b
}

func get(t *testing.T, port, path string) (int, []byte) {
	t.Helper()
	code, _, b := call(t, port, "GET", "127.0.0.1:"+port, path, nil)
	return code, b
}

func post(t *testing.T, port, path string, body []byte) (int, []byte) {
	t.Helper()
	code, _, b := call(t, port, "POST", "127.0.0.1:"+port, path, body)
	return code, b
}

// The session token and the Host header (common practice, no source:
// the defences of a local web tool against other pages and DNS rebinding).
func TestTokenAndHost(t *testing.T) {
	_, port := start(t, Options{})
	local := "127.0.0.1:" + port
	cases := []struct {
		name, host, path string
		want             int
	}{
		{"with token", local, "/s/" + token + "/api/state", 200},
		{"page with token", local, "/s/" + token + "/", 200},
		{"page without the slash (redirected)", local, "/s/" + token, 200},
		{"localhost", "localhost:" + port, "/s/" + token + "/api/state", 200},
		{"no token", local, "/api/state", 403},
		{"root", local, "/", 403},
		{"wrong token", local, "/s/" + strings.Repeat("0", len(token)) + "/api/state", 403},
		{"token prefix", local, "/s/" + token[:10] + "/api/state", 403},
		{"token longer", local, "/s/" + token + "0/api/state", 403},
		{"token in the query", local, "/api/state?token=" + token, 403},
		{"dns name", "evil.example:" + port, "/s/" + token + "/api/state", 421},
		{"other port", "127.0.0.1:1", "/s/" + token + "/api/state", 421},
		{"no port", "127.0.0.1", "/s/" + token + "/api/state", 421},
		{"lan address", "192.168.1.20:" + port, "/s/" + token + "/api/state", 421},
		{"rebound localhost name", "localhost.evil.example:" + port, "/s/" + token + "/", 421},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			code, h, body := call(t, port, "GET", c.host, c.path, nil)
			if code != c.want {
				t.Errorf("status %d, want %d (%s)", code, c.want, body)
			}
			if code != 200 && bytes.Contains(body, []byte("workbench")) {
				t.Errorf("a refused request got the page")
			}
			if h.Get("Content-Security-Policy") != csp || h.Get("X-Content-Type-Options") != "nosniff" {
				t.Errorf("security headers missing: %v", h)
			}
		})
	}
	// A state-changing request from another origin is refused even with the token.
	code, _, _ := call(t, port, "POST", local, "/s/"+token+"/api/settings", []byte(`{}`), "Origin", "http://evil.example")
	if code != 403 {
		t.Errorf("cross-origin POST: status %d", code)
	}
	code, _, _ = call(t, port, "POST", local, "/s/"+token+"/api/settings", []byte(`{}`), "Origin", "http://"+local)
	if code != 200 {
		t.Errorf("same-origin POST: status %d", code)
	}
}

// The CSP allows only the page's own resources, and the page asks for no
// other: no URL in the embedded files leaves the server (the SVG
// namespace is a name, not a request).
func TestPageLoadsNothingFromElsewhere(t *testing.T) {
	for _, bad := range []string{"'unsafe-inline'", "'unsafe-eval'", "http:", "https:", "data:", "*"} {
		if strings.Contains(csp, bad) {
			t.Errorf("the CSP allows %s", bad)
		}
	}
	url := regexp.MustCompile(`(?i)(https?:)?//[a-z0-9.-]+`)
	fs.WalkDir(static, "static", func(p string, d fs.DirEntry, err error) error {
		if d.IsDir() {
			return nil
		}
		b, _ := static.ReadFile(p)
		for _, m := range url.FindAllString(string(b), -1) {
			if m != "http://www.w3.org" {
				t.Errorf("%s refers to %s", p, m)
			}
		}
		if strings.HasSuffix(p, ".html") && regexp.MustCompile(`<script>|<style|style="| on[a-z]+=`).Match(b) {
			t.Errorf("%s has inline script or style, which the CSP refuses", p)
		}
		return nil
	})
}

func TestUploadErrorsStayBesideTheFile(t *testing.T) {
	s, port := start(t, Options{})
	base := "/s/" + token + "/api/files?name="
	good, _ := os.ReadFile("../testdata/demo/coupons/F7-2291-880-1.csv")
	code, b := post(t, port, base+"F7-2291-880-1.csv", good)
	if code != 200 || !bytes.Contains(b, []byte(`"F7-2291-880-1"`)) {
		t.Fatalf("good upload: %d %s", code, b)
	}
	// A bad file: the reader's message, naming the file and line.
	code, b = post(t, port, base+"bad.csv", []byte("depth_mm,C_wt%\n0.1,0.8\n0.2,x\n"))
	var f file
	json.Unmarshal(b, &f)
	if code != 200 || f.Error != `bad.csv:3: column "C_wt%": "x" is not a number — fix the cell or remove the row` {
		t.Errorf("bad upload: %d %q", code, f.Error)
	}
	// A second file with an id already loaded.
	code, b = post(t, port, base+"copy.csv", good)
	json.Unmarshal(b, &f)
	if !strings.Contains(f.Error, `profile id "F7-2291-880-1" is also used by F7-2291-880-1.csv`) {
		t.Errorf("duplicate id: %d %q", code, f.Error)
	}
	// A folder in the name is dropped: an upload is never a path.
	_, b = post(t, port, base+"..%2F..%2Fetc%2Fx.csv", good[:0])
	json.Unmarshal(b, &f)
	if f.Name != "x.csv" || !strings.Contains(f.Error, "x.csv: the file is empty") {
		t.Errorf("upload name: %q %q", f.Name, f.Error)
	}
	// Larger than the readers take.
	s.ses.maxUpload = 100
	code, b = post(t, port, base+"big.csv", bytes.Repeat([]byte("1"), 101))
	if code != http.StatusRequestEntityTooLarge || !strings.Contains(string(b), "big.csv: the file is larger than") {
		t.Errorf("large upload: %d %s", code, b)
	}
	if st := s.ses.state(); st.Profiles != 1 {
		t.Errorf("%d profiles loaded, want 1", st.Profiles)
	}
}

func TestSettingsRefused(t *testing.T) {
	_, port := start(t, Options{})
	for body, want := range map[string]string{
		`{"model":"spline"}`:                     `model \"spline\": choose one of`,
		`{"ci":"jackknife"}`:                     `jackknife`,
		`{"level":1.5}`:                          `between 0 and 1`,
		`{"fix":["Cs"]}`:                         `NAME=VALUE`,
		`{"case_threshold":"deep"}`:              `case-depth threshold \"deep\" is not understood`,
		`{"temperature_unit":"R"}`:               `R`,
		`{"model":"erf","fix":["x0=1q"]}`:        `not a number`,
		`{"model":"numeric","dc":"table"}`:       `use the command line (--model numeric --dc table --dc-table FILE)`,
		`{"model":"numeric","dc":"cubic"}`:       `cubic`,
		`{"model":"numeric","surface":"porous"}`: `surface \"porous\": use fixed or masstransfer`,
	} {
		code, b := post(t, port, "/s/"+token+"/api/settings", []byte(body))
		if code != 400 || !strings.Contains(string(b), want) {
			t.Errorf("%s: %d %s", body, code, b)
		}
	}
}

// The numerical model chosen on the page gives the D that the command
// line's --model numeric --dc exp gives (the same model built from the
// same settings, fitted by fit.Fit), and the page's command line says so.
func TestNumericModelOnThePage(t *testing.T) {
	_, port := start(t, Options{Inputs: []string{"../testdata/demo/lims-export-BAR-2307.csv"}})
	code, b := post(t, port, "/s/"+token+"/api/settings", []byte(`{"model":"Numeric","dc":"exp","ci":"wald"}`))
	if code != 200 {
		t.Fatalf("settings: %d %s", code, b)
	}
	var st stateView
	if err := json.Unmarshal(b, &st); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(st.Command, " --model numeric --dc exp --ci wald") {
		t.Errorf("command line %q does not reproduce the numerical model's settings", st.Command)
	}
	if strings.Join(st.DCLaws, ",") != "const,exp" {
		t.Errorf("the page offers the laws %v", st.DCLaws)
	}
	const id = "F7-2307-940-2"
	code, b = get(t, port, "/s/"+token+"/api/profile?id="+id)
	if code != 200 {
		t.Fatalf("profile: %d %s", code, b)
	}
	var v struct {
		D     float64 `json:"D"`
		Model string  `json:"model"`
	}
	if err := json.Unmarshal(b, &v); err != nil {
		t.Fatal(err)
	}
	ps, err := profile.Read("../testdata/demo/lims-export-BAR-2307.csv")
	if err != nil {
		t.Fatal(err)
	}
	var p *profile.Profile
	for i := range ps {
		if ps[i].ID == id {
			p = &ps[i]
		}
	}
	m, err := numeric.NewModel(numeric.Config{DC: numeric.LawExp})
	if err != nil {
		t.Fatal(err)
	}
	r, err := fit.Fit(p, fit.Options{Model: "numeric", Custom: m, CI: fit.CIWald})
	if err != nil {
		t.Fatal(err)
	}
	if r.Param("k") == nil {
		t.Fatal("the exp law has no parameter k")
	}
	if d := r.Param("D").Value; v.D != d || v.Model != "numeric" {
		t.Errorf("page: D = %v (model %q); fit.Fit with the numerical model: %v", v.D, v.Model, d)
	}
}

// A point excluded on the page, saved as the sidecar and applied as the
// command line applies it, gives the page's fit exactly (self-check of
// the one rule in profile.Exclusions).
func TestExclusionRoundTrip(t *testing.T) {
	s, port := start(t, Options{Inputs: []string{"../testdata/demo/lims-export-BAR-2307.csv"}})
	const id = "F7-2307-940-2"
	code, b := post(t, port, "/s/"+token+"/api/exclude", []byte(`{"id":"`+id+`","index":3,"reason":"indent on a carbide"}`))
	if code != 200 {
		t.Fatalf("exclude: %d %s", code, b)
	}
	var v struct {
		D      float64 `json:"D"`
		Points []struct {
			Excluded bool
		} `json:"points"`
	}
	json.Unmarshal(b, &v)
	_, csv := get(t, port, "/s/"+token+"/api/exclusions.csv")
	x, err := profile.ReadExclusionsCSV(bytes.NewReader(csv), "exclusions.csv")
	if err != nil {
		t.Fatal(err)
	}
	ps, _ := profile.Read("../testdata/demo/lims-export-BAR-2307.csv")
	if _, err := x.Apply(ps); err != nil {
		t.Fatal(err)
	}
	var p profile.Profile
	for _, q := range ps {
		if q.ID == id {
			p = q
		}
	}
	r, err := fit.Fit(&p, fit.Options{})
	if err != nil {
		t.Fatal(err)
	}
	if d := r.Param("D").Value; d != v.D || v.D == 0 {
		t.Errorf("D after the exclusion: page %v, sidecar applied %v", v.D, d)
	}
	// Click again: the point is back and so is the original D.
	post(t, port, "/s/"+token+"/api/exclude", []byte(`{"id":"`+id+`","index":3}`))
	if n := len(s.ses.excl.Rows); n != 0 {
		t.Errorf("%d exclusions left after restoring the point", n)
	}
}

// Exports go only inside the folder named, never through a link, never
// into a folder of inputs, never over an earlier report without asking;
// inputs are never modified.
func TestExportStaysInItsFolder(t *testing.T) {
	in := t.TempDir()
	src, _ := os.ReadFile("../testdata/demo/lims-export-BAR-2307.csv")
	input := filepath.Join(in, "lims.csv")
	os.WriteFile(input, src, 0o644)
	sum := sha256.Sum256(src)
	_, port := start(t, Options{Inputs: []string{input}})
	exp := func(folder string, replace bool) (int, string) {
		body, _ := json.Marshal(exportRequest{Folder: folder, Replace: replace})
		code, b := post(t, port, "/s/"+token+"/api/export", body)
		return code, string(b)
	}
	out := filepath.Join(t.TempDir(), "report")
	if code, b := exp(out, false); code != 200 || !strings.Contains(b, "report.html") {
		t.Fatalf("export: %d %s", code, b)
	}
	if code, b := exp(out, false); code != 400 || !strings.Contains(b, "already holds") {
		t.Errorf("second export without replace: %d %s", code, b)
	}
	if code, b := exp(out, true); code != 200 {
		t.Errorf("second export with replace: %d %s", code, b)
	}
	if code, b := exp(in, true); code != 400 || !strings.Contains(b, "holds the input lims.csv") {
		t.Errorf("export into the inputs' folder: %d %s", code, b)
	}
	link := filepath.Join(t.TempDir(), "link")
	os.Symlink(t.TempDir(), link)
	if code, b := exp(link, true); code != 400 || !strings.Contains(b, "is a link") {
		t.Errorf("export through a link: %d %s", code, b)
	}
	if code, b := exp("", false); code != 400 || !strings.Contains(b, "name the folder") {
		t.Errorf("export without a folder: %d %s", code, b)
	}
	// Every file written is inside the folder.
	filepath.WalkDir(filepath.Dir(out), func(p string, d fs.DirEntry, err error) error {
		if rel, _ := filepath.Rel(out, p); strings.HasPrefix(rel, "..") && p != filepath.Dir(out) {
			t.Errorf("written outside the report folder: %s", p)
		}
		return nil
	})
	// The zip holds the same folder.
	code, b := get(t, port, "/s/"+token+"/api/export.zip")
	if code != 200 || !bytes.HasPrefix(b, []byte("PK")) || !bytes.Contains(b, []byte("fickfit-report/results.json")) {
		t.Errorf("zip: %d, %d bytes", code, len(b))
	}
	after, _ := os.ReadFile(input)
	if sha256.Sum256(after) != sum {
		t.Error("the input file was modified")
	}
	if ents, _ := os.ReadDir(in); len(ents) != 1 {
		t.Errorf("the inputs' folder holds %d entries", len(ents))
	}
}

func TestListenWarnsOffLoopback(t *testing.T) {
	s, err := New(Options{Token: token})
	if err != nil {
		t.Fatal(err)
	}
	defer s.Close()
	ln, err := s.Listen("127.0.0.1:0")
	if err != nil {
		t.Fatal(err)
	}
	ln.Close()
	if !s.Loopback() {
		t.Error("127.0.0.1 is loopback")
	}
	if ln, err := s.Listen("0.0.0.0:0"); err == nil {
		if s.Loopback() {
			t.Error("0.0.0.0 is not loopback only")
		}
		if u := s.URL(ln); !strings.Contains(u, "/s/"+token+"/") {
			t.Errorf("URL %s", u)
		}
		ln.Close()
	}
}
