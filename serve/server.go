// Package serve is fickfit's local workbench: an HTTP server on the
// user's own machine and the page it serves (embedded: no script, style
// or font comes from anywhere else). The page loads profile files, shows
// every fit, lets the user exclude points by clicking them, draws the
// Arrhenius lines by lot, back-calculates parts and exports the same
// report folder `fickfit campaign --out` writes.
//
// It computes through the same packages as the command line (profile,
// fit, campaign, arrhenius) and writes through report, so the page's
// numbers and the command line's agree to the last digit; exclusions are
// kept as a profile.Exclusions, the sidecar file --exclude reads.
//
// Safety: every request must carry the session token in its path
// (/s/TOKEN/…, compared in constant time) and a Host header naming this
// server by IP address or "localhost" (no DNS rebinding); every answer
// carries a Content-Security-Policy that allows only the page's own
// scripts, styles and images. Inputs are read, never written; exports go
// only inside the folder the user names.
//
// Nothing imports this package but cmd/fickfit.
package serve

import (
	"crypto/rand"
	"crypto/subtle"
	"embed"
	"encoding/hex"
	"errors"
	"io/fs"
	"net"
	"net/http"
	"strconv"
	"strings"
	"time"

	"github.com/fickfit/fickfit/profile"
)

//go:embed static
var static embed.FS

// Options configure a workbench server.
type Options struct {
	// Inputs are files or folders loaded at start (read as the command
	// line reads them; folders stand for the profile files in them).
	Inputs []string
	// Exclusions is an exclusions file to start from ("" for none).
	Exclusions string
	// Version is written into exports.
	Version string
	// Token is the session token; "" makes a random one (tests set it).
	Token string
}

// Server is a workbench: the session (files, fits, exclusions) and its
// HTTP handler.
type Server struct {
	token string
	ses   *session
	mux   *http.ServeMux
	// port is the listening port the Host header must name ("" until Listen).
	port     string
	loopback bool
}

// New makes a server and loads the inputs. A file that cannot be read is
// listed with its error, as an upload would be; New itself fails only on
// an unreadable exclusions file.
func New(o Options) (*Server, error) {
	tok := o.Token
	if tok == "" {
		b := make([]byte, 24)
		if _, err := rand.Read(b); err != nil {
			return nil, err
		}
		tok = hex.EncodeToString(b)
	}
	s := &Server{token: tok, ses: newSession(o.Version), loopback: true}
	if o.Exclusions != "" {
		x, err := profile.ReadExclusions(o.Exclusions)
		if err != nil {
			return nil, err
		}
		s.ses.setExclusions(x)
	}
	if err := s.ses.loadPaths(o.Inputs); err != nil {
		return nil, err
	}
	s.routes()
	return s, nil
}

// Listen opens the listening socket. addr "" means 127.0.0.1:0 (loopback,
// a free port). It reports whether the address is loopback only: the
// caller warns when it is not.
func (s *Server) Listen(addr string) (net.Listener, error) {
	if addr == "" {
		addr = "127.0.0.1:0"
	}
	ln, err := net.Listen("tcp", addr)
	if err != nil {
		return nil, err
	}
	tcp := ln.Addr().(*net.TCPAddr)
	s.port = strconv.Itoa(tcp.Port)
	s.loopback = tcp.IP.IsLoopback()
	return ln, nil
}

// Loopback tells whether the server listens on a loopback address only.
func (s *Server) Loopback() bool { return s.loopback }

// URL is the page's address with the session token, for the listener ln.
func (s *Server) URL(ln net.Listener) string {
	tcp := ln.Addr().(*net.TCPAddr)
	host := "127.0.0.1"
	if !tcp.IP.IsUnspecified() {
		host = tcp.IP.String()
	}
	return "http://" + net.JoinHostPort(host, s.port) + "/s/" + s.token + "/"
}

// Serve answers requests on ln until it is closed.
func (s *Server) Serve(ln net.Listener) error {
	hs := &http.Server{Handler: s, ReadHeaderTimeout: 10 * time.Second, IdleTimeout: 2 * time.Minute}
	err := hs.Serve(ln)
	if errors.Is(err, http.ErrServerClosed) {
		return nil
	}
	return err
}

// Close stops background fitting.
func (s *Server) Close() { s.ses.close() }

// csp allows the page's own scripts, styles, images and requests, and
// nothing else: no inline script or style, no frames, no forms, no
// plug-ins, no other origin.
const csp = "default-src 'none'; script-src 'self'; style-src 'self'; img-src 'self'; connect-src 'self'; " +
	"base-uri 'none'; form-action 'none'; frame-ancestors 'none'"

// ServeHTTP checks the Host header and the token, then routes.
func (s *Server) ServeHTTP(w http.ResponseWriter, r *http.Request) {
	h := w.Header()
	h.Set("Content-Security-Policy", csp)
	h.Set("X-Content-Type-Options", "nosniff")
	h.Set("Referrer-Policy", "no-referrer")
	h.Set("X-Frame-Options", "DENY")
	h.Set("Cross-Origin-Resource-Policy", "same-origin")
	h.Set("Cache-Control", "no-store")
	if !s.hostOK(r.Host) {
		http.Error(w, "fickfit serve: unexpected Host header", http.StatusMisdirectedRequest)
		return
	}
	rest, ok := s.strip(r.URL.Path)
	if !ok {
		http.Error(w, "forbidden", http.StatusForbidden)
		return
	}
	if rest == "/" && !strings.HasSuffix(r.URL.Path, "/") {
		// The page's relative links need the slash after the token.
		http.Redirect(w, r, r.URL.Path+"/", http.StatusMovedPermanently)
		return
	}
	if r.Method != http.MethodGet && r.Method != http.MethodHead && !s.originOK(r) {
		http.Error(w, "fickfit serve: request from another origin refused", http.StatusForbidden)
		return
	}
	r2 := r.Clone(r.Context())
	r2.URL.Path = rest
	r2.URL.RawPath = ""
	s.mux.ServeHTTP(w, r2)
}

// strip removes "/s/TOKEN" from the path, comparing the token in
// constant time; ok is false without the right token.
func (s *Server) strip(p string) (rest string, ok bool) {
	const pre = "/s/"
	if !strings.HasPrefix(p, pre) {
		return "", false
	}
	tok, rest, _ := strings.Cut(p[len(pre):], "/")
	if subtle.ConstantTimeCompare([]byte(tok), []byte(s.token)) != 1 {
		return "", false
	}
	return "/" + rest, true
}

// hostOK accepts a Host header naming this server's port and, as host,
// "localhost" or an IP address (a loopback one when listening on
// loopback). A DNS name that resolves here (DNS rebinding) is refused.
func (s *Server) hostOK(host string) bool {
	h, port, err := net.SplitHostPort(host)
	if err != nil || s.port == "" || port != s.port {
		return false
	}
	if strings.EqualFold(h, "localhost") {
		return true
	}
	ip := net.ParseIP(h)
	if ip == nil {
		return false
	}
	return ip.IsLoopback() || !s.loopback
}

// originOK refuses a state-changing request whose Origin header names
// another site (the token already stops them; this is a second lock).
func (s *Server) originOK(r *http.Request) bool {
	o := r.Header.Get("Origin")
	if o == "" {
		return true
	}
	rest, ok := strings.CutPrefix(o, "http://")
	return ok && s.hostOK(rest)
}

// routes registers the page and the API (paths after /s/TOKEN).
func (s *Server) routes() {
	m := http.NewServeMux()
	sub, _ := fs.Sub(static, "static")
	files := http.FileServer(http.FS(sub))
	m.Handle("GET /", files)
	m.HandleFunc("GET /api/state", s.ses.handleState)
	m.HandleFunc("GET /api/profiles", s.ses.handleProfiles)
	m.HandleFunc("GET /api/profile", s.ses.handleProfile)
	m.HandleFunc("POST /api/files", s.ses.handleUpload)
	m.HandleFunc("DELETE /api/files", s.ses.handleRemove)
	m.HandleFunc("POST /api/settings", s.ses.handleSettings)
	m.HandleFunc("POST /api/calibration", s.ses.handleCalibration)
	m.HandleFunc("POST /api/exclude", s.ses.handleExclude)
	m.HandleFunc("POST /api/exclusions", s.ses.handleLoadExclusions)
	m.HandleFunc("GET /api/exclusions.csv", s.ses.handleSaveExclusions)
	m.HandleFunc("GET /api/arrhenius", s.ses.handleArrhenius)
	m.HandleFunc("POST /api/backcalc", s.ses.handleBackcalc)
	m.HandleFunc("POST /api/export", s.ses.handleExport)
	m.HandleFunc("GET /api/export.zip", s.ses.handleExportZip)
	s.mux = m
}
