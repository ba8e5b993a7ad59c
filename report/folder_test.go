package report

import (
	"encoding/json"
	"errors"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/fickfit/fickfit/internal/cleanup"
)

// The report folder's life cycle (folder.go): common practice, no source.

// TestFolderInterruptedWhileBuilding: an interrupt that arrives while the
// report is being written removes the temporary folder, and closing
// removes the folder the run created: nothing is left.
func TestFolderInterruptedWhileBuilding(t *testing.T) {
	t.Cleanup(cleanup.Reset)
	parent := t.TempDir()
	dir := filepath.Join(parent, "a", "R")
	f, err := OpenReportFolder(dir, FolderOptions{Command: "campaign"})
	if err != nil {
		t.Fatal(err)
	}
	files := []reportFile{
		{"results.json", func(w io.Writer) error { _, err := io.WriteString(w, "{}\n"); return err }},
		{"figures/x.svg", func(w io.Writer) error {
			cleanup.Interrupt() // the signal arrives here
			_, err := io.WriteString(w, "<svg/>")
			return err
		}},
		{"summary.txt", func(w io.Writer) error { _, err := io.WriteString(w, "text"); return err }},
	}
	if _, _, _, err := f.build(files); err == nil {
		t.Error("build went on after the interrupt")
	}
	f.Close()
	if entries, _ := os.ReadDir(parent); len(entries) != 0 {
		t.Errorf("left behind: %v", entries)
	}
}

// TestFolderIncompleteAndStale: a folder whose manifest says it is
// incomplete (a run killed while moving files) is replaced with Force;
// temporary folders of killed runs are removed, a user's folder of a
// similar name is not; a damaged manifest is refused.
func TestFolderIncompleteAndStale(t *testing.T) {
	res, _ := runCampaign(t, 1)
	dir := filepath.Join(t.TempDir(), "R")
	if _, err := WriteCampaign(dir, res.Result, CampaignOptions{NoPNG: true}); err != nil {
		t.Fatal(err)
	}
	mpath := filepath.Join(dir, ManifestName)
	b, _ := os.ReadFile(mpath)
	var m manifest
	if err := json.Unmarshal(b, &m); err != nil || !m.Complete || len(m.Files) == 0 {
		t.Fatalf("manifest: %v %+v", err, m)
	}
	// As a killed commit leaves it: no checksums, complete false, a file
	// holding content the manifest does not know, and the temporary folder.
	m.Complete = false
	for i := range m.Files {
		m.Files[i].SHA256 = ""
	}
	b, _ = json.Marshal(m)
	os.WriteFile(mpath, b, 0o644)
	os.WriteFile(filepath.Join(dir, FileSummary), []byte("half of the new summary"), 0o644)
	stale := filepath.Join(dir, tempPrefix+"123")
	os.MkdirAll(filepath.Join(stale, DirFigures), 0o755)
	os.WriteFile(filepath.Join(stale, tempMarker), nil, 0o644)
	users := filepath.Join(dir, tempPrefix+"mine")
	os.Mkdir(users, 0o755)
	if _, err := WriteCampaign(dir, res.Result, CampaignOptions{NoPNG: true}); !errors.Is(err, ErrExists) {
		t.Errorf("without Force: %v, want ErrExists", err)
	}
	if _, err := WriteCampaign(dir, res.Result, CampaignOptions{NoPNG: true, Force: true}); err != nil {
		t.Fatalf("with Force: %v", err)
	}
	if _, err := os.Stat(stale); !errors.Is(err, fs.ErrNotExist) {
		t.Errorf("the temporary folder of a killed run is still there (%v)", err)
	}
	if _, err := os.Stat(users); err != nil {
		t.Errorf("a folder without the marker was removed: %v", err)
	}
	b, _ = os.ReadFile(mpath)
	if err := json.Unmarshal(b, &m); err != nil || !m.Complete || m.Files[0].SHA256 == "" {
		t.Errorf("manifest after the rewrite: %v %+v", err, m)
	}
	// A manifest that cannot be read stops the run before anything changes.
	os.WriteFile(mpath, []byte(`{"fickfit_manifest": 1, "files": [{"path": "../../etc/passwd"}]}`), 0o644)
	_, err := WriteCampaign(dir, res.Result, CampaignOptions{NoPNG: true, Force: true})
	if err == nil || !strings.Contains(err.Error(), "not a path inside the folder") {
		t.Errorf("damaged manifest: %v", err)
	}
}
