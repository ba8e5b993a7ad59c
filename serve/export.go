package serve

import (
	"archive/zip"
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"net/http"
	"os"
	"path/filepath"
	"strings"

	"github.com/fickfit/fickfit/report"
)

type exportRequest struct {
	// Folder is the report folder to write (absolute, or relative to the
	// folder the server was started in).
	Folder string `json:"folder"`
	// Replace lets an earlier report in the folder be replaced (--force).
	Replace bool `json:"replace"`
}

type exportView struct {
	Folder string   `json:"folder"`
	Files  []string `json:"files"`
	HTML   string   `json:"html"`
}

// handleExport writes the report folder `fickfit campaign --out` writes,
// with the session's options and exclusions, into the folder the user
// named: only inside it (report.WriteCampaign writes fixed names and
// figure names made safe), never over an input, never through a link.
func (s *session) handleExport(w http.ResponseWriter, r *http.Request) {
	var q exportRequest
	b, err := readBody(w, r, 1<<20)
	if err == nil {
		err = json.Unmarshal(b, &q)
	}
	if err == nil {
		var v *exportView
		if v, err = s.export(q); err == nil {
			writeJSON(w, http.StatusOK, v)
			return
		}
	}
	fail(w, http.StatusBadRequest, err)
}

func (s *session) export(q exportRequest) (*exportView, error) {
	folder := strings.TrimSpace(q.Folder)
	if folder == "" {
		return nil, errors.New("name the folder to write the report into")
	}
	dir, err := filepath.Abs(folder)
	if err != nil {
		return nil, err
	}
	for _, p := range []string{dir, filepath.Join(dir, report.DirFigures)} {
		if fi, err := os.Lstat(p); err == nil && fi.Mode()&fs.ModeSymlink != 0 {
			return nil, fmt.Errorf("%s is a link: name a real folder (a report is never written through a link)", p)
		} else if err == nil && !fi.IsDir() {
			return nil, fmt.Errorf("%s is a file, not a folder: name a folder for the report", p)
		}
	}
	if err := s.notAnInputFolder(dir); err != nil {
		return nil, err
	}
	res, u, err := s.campaignRun()
	if err != nil {
		return nil, err
	}
	files, err := report.WriteCampaign(dir, res, report.CampaignOptions{TempUnit: u, Force: q.Replace})
	if err != nil {
		if errors.Is(err, report.ErrExists) {
			return nil, fmt.Errorf("%s already holds a report or other files: tick \"replace an earlier report\" or choose an empty folder", dir)
		}
		return nil, err
	}
	v := &exportView{Folder: dir, HTML: filepath.Join(dir, report.FileHTML)}
	for _, f := range files {
		if rel, err := filepath.Rel(dir, f); err == nil {
			v.Files = append(v.Files, filepath.ToSlash(rel))
		}
	}
	return v, nil
}

// notAnInputFolder refuses to write a report into a folder that holds an
// input file given on the command line: a report beside the lab's files
// would mix outputs with inputs (and be read as inputs next time).
func (s *session) notAnInputFolder(dir string) error {
	s.mu.Lock()
	defer s.mu.Unlock()
	for _, f := range s.files {
		if f.path == "" {
			continue
		}
		if a, err := filepath.Abs(f.path); err == nil && filepath.Dir(a) == dir {
			return fmt.Errorf("%s holds the input %s: choose another folder for the report", dir, filepath.Base(f.path))
		}
	}
	return nil
}

// handleExportZip sends the same report folder as one zip archive.
func (s *session) handleExportZip(w http.ResponseWriter, r *http.Request) {
	b, err := s.exportZip()
	if err != nil {
		fail(w, http.StatusBadRequest, err)
		return
	}
	w.Header().Set("Content-Type", "application/zip")
	w.Header().Set("Content-Disposition", `attachment; filename="fickfit-report.zip"`)
	w.Write(b)
}

func (s *session) exportZip() ([]byte, error) {
	res, u, err := s.campaignRun()
	if err != nil {
		return nil, err
	}
	tmp, err := os.MkdirTemp("", "fickfit-export-*")
	if err != nil {
		return nil, err
	}
	defer os.RemoveAll(tmp)
	dir := filepath.Join(tmp, "fickfit-report")
	files, err := report.WriteCampaign(dir, res, report.CampaignOptions{TempUnit: u})
	if err != nil {
		return nil, err
	}
	var buf bytes.Buffer
	zw := zip.NewWriter(&buf)
	for _, f := range files {
		rel, err := filepath.Rel(tmp, f)
		if err != nil {
			return nil, err
		}
		h := &zip.FileHeader{Name: filepath.ToSlash(rel), Method: zip.Deflate}
		h.SetMode(0o644)
		zf, err := zw.CreateHeader(h)
		if err != nil {
			return nil, err
		}
		in, err := os.Open(f)
		if err != nil {
			return nil, err
		}
		_, err = io.Copy(zf, in)
		in.Close()
		if err != nil {
			return nil, err
		}
	}
	if err := zw.Close(); err != nil {
		return nil, err
	}
	return buf.Bytes(), nil
}
