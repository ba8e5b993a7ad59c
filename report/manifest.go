package report

import (
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"sort"
	"strings"

	"github.com/fickfit/fickfit/internal/jsonx"
)

// The manifest of a report folder (ManifestName): what fickfit wrote
// there, so that a later run replaces exactly those files (folder.go).

// kindError is an error of a kind (errors.Is) with a message of its own.
type kindError struct {
	kind error
	msg  string
}

func (e kindError) Error() string { return e.msg }
func (e kindError) Unwrap() error { return e.kind }

// manifest is the content of ManifestName. No timestamps, so that a
// rerun writes the same bytes.
type manifest struct {
	Format   int            `json:"fickfit_manifest"`
	Version  string         `json:"fickfit_version"`
	Command  string         `json:"command"`
	Complete bool           `json:"complete"`
	Files    []manifestFile `json:"files"`
	Folders  []string       `json:"folders"`
}

// manifestFile is one file of a report, its path relative to the folder
// with '/' separators. SHA256 is empty while a report is moved into place
// (the file may hold the earlier or the new content).
type manifestFile struct {
	Path   string `json:"path"`
	Bytes  int64  `json:"bytes"`
	SHA256 string `json:"sha256"`
}

// readManifest reads the folder's manifest; nil when there is none.
func readManifest(dir string) (*manifest, error) {
	p := filepath.Join(dir, ManifestName)
	fi, err := os.Lstat(p)
	if errors.Is(err, fs.ErrNotExist) {
		return nil, nil
	}
	bad := func(why string) error {
		return fmt.Errorf("%s: the manifest of an earlier report cannot be used (%s): choose another folder, or remove the report's files and %s yourself", p, why, ManifestName)
	}
	if err != nil {
		return nil, bad(unwrapPath(err).Error())
	}
	if !fi.Mode().IsRegular() || fi.Size() > 64<<20 {
		return nil, bad("not a regular file of at most 64 MiB")
	}
	b, err := os.ReadFile(p)
	if err != nil {
		return nil, bad(unwrapPath(err).Error())
	}
	var m manifest
	if err := json.Unmarshal(b, &m); err != nil {
		return nil, bad(err.Error())
	}
	if m.Format != 1 {
		return nil, bad(fmt.Sprintf("format %d is not known to this version", m.Format))
	}
	for _, mf := range m.Files {
		if !localPath(mf.Path) {
			return nil, bad(fmt.Sprintf("it lists %q, which is not a path inside the folder", mf.Path))
		}
	}
	for _, d := range m.Folders {
		if !localPath(d) {
			return nil, bad(fmt.Sprintf("it lists %q, which is not a path inside the folder", d))
		}
	}
	return &m, nil
}

// localPath tells a clean relative slash path inside the folder that is
// not one of the folder's own control files.
func localPath(p string) bool {
	return p != "" && fs.ValidPath(p) && p != "." && p != ManifestName && p != lockName && !strings.HasPrefix(p, tempPrefix)
}

// writeManifest writes the manifest atomically, files sorted by path.
func (f *ReportFolder) writeManifest(m manifest) error {
	sort.Slice(m.Files, func(i, j int) bool { return m.Files[i].Path < m.Files[j].Path })
	if m.Files == nil {
		m.Files = []manifestFile{}
	}
	if m.Folders == nil {
		m.Folders = []string{}
	}
	return Output{Force: true}.WriteFile(filepath.Join(f.dir, ManifestName), func(w io.Writer) error { return jsonx.Encode(w, m) })
}
