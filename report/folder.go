package report

import (
	"bufio"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path"
	"path/filepath"
	"slices"
	"sort"
	"strings"

	"github.com/fickfit/fickfit/internal/cleanup"
)

// A report folder is whole or absent, and fickfit replaces only what it
// wrote there:
//
//   - The folder is locked while a run writes it: a second run into the
//     same folder fails at once (ErrFolderBusy).
//   - The report is built in a hidden temporary folder inside the target
//     (.fickfit-tmp-…) and moved into place only when every file is
//     complete. A run that fails or is interrupted removes the temporary
//     folder, and the folder itself when the run created it.
//   - The manifest (.fickfit-manifest.json) lists every file the report
//     holds with its size and SHA-256. A later run replaces and removes
//     only files the manifest lists and that are unchanged since; every
//     other file is the user's and is never replaced or removed. While
//     files are moved into place the manifest says "complete": false.

// ManifestName is the file of a report folder that lists what fickfit
// wrote there.
const ManifestName = ".fickfit-manifest.json"

const (
	tempPrefix = ".fickfit-tmp-"      // the temporary folder of a run in progress
	tempMarker = ".fickfit-temporary" // first file of every temporary folder
	lockName   = ".fickfit-lock"      // lock file where folders cannot be locked themselves
)

// Errors of report folders (besides ErrExists and ErrWouldOverwriteInput).
var (
	// ErrFolderBusy: another run is writing the folder.
	ErrFolderBusy = errors.New("another fickfit run is writing this report folder")
	// ErrNotOwned: a file the report would replace was not written by
	// fickfit, or was changed after fickfit wrote it.
	ErrNotOwned = errors.New("not written by fickfit")
)

// FolderOptions control how a report folder is opened.
type FolderOptions struct {
	// Force lets the report replace an earlier report in the folder and be
	// written beside files fickfit did not write (which stay untouched).
	Force bool
	// Command is the command writing the report ("campaign", "demo"),
	// recorded in the manifest.
	Command string
	// ReplaceOwn lets a run replace, without Force, an earlier report the
	// same Command wrote into a folder that holds nothing else (the demo
	// rewrites its own report).
	ReplaceOwn bool
	// Inputs are files and folders the report must never replace or
	// remove, compared by identity (os.SameFile); the report folder must
	// not be one of them.
	Inputs []string
	// Version is the fickfit version recorded in the manifest.
	Version string
}

// ReportFolder is a report folder opened for writing: checked, locked, and
// with the earlier report's manifest read. Write the report with
// WriteCampaign, then Close.
type ReportFolder struct {
	dir     string
	opts    FolderOptions
	unlock  func()
	created []string // folders this run created, innermost first
	forget  func()   // takes the created folders off the interrupt list
	old     map[string]manifestFile
	oldDirs []string
	inputs  []statted
	done    bool
}

// statted is a path with what os.Stat said of it.
type statted struct {
	name string
	fi   os.FileInfo
}

// reservedNames are the entries every report writes; a file of the user's
// under one of these names stops the run before any work.
var reservedNames = []string{FileJSON, FileCSV, FileResiduals, FileArrhenius, FileSummary, FileWorkbook, FileHTML, DirFigures}

// OpenReportFolder checks and locks dir for a new report, creating it when
// it does not exist. It refuses, before any work is done:
//
//   - an empty name, a path that is not a folder, a folder that is one of
//     the inputs;
//   - a folder another run is writing (ErrFolderBusy);
//   - a folder holding an earlier report, unless Force or ReplaceOwn
//     (ErrExists), or files fickfit did not write, unless Force;
//   - a file of the user's (not in the manifest, or changed since fickfit
//     wrote it) where the report must write (ErrNotOwned), and a report
//     file that is an input (ErrWouldOverwriteInput), whatever Force says.
func OpenReportFolder(dir string, o FolderOptions) (*ReportFolder, error) {
	if strings.TrimSpace(dir) == "" {
		return nil, errors.New("no report folder given: name one (--out DIR)")
	}
	f := &ReportFolder{dir: filepath.Clean(dir), opts: o}
	for _, in := range o.Inputs {
		if fi, err := os.Stat(in); err == nil {
			f.inputs = append(f.inputs, statted{in, fi})
		}
	}
	fi, err := os.Stat(f.dir)
	switch {
	case errors.Is(err, fs.ErrNotExist):
		if err := f.create(); err != nil {
			return nil, err
		}
	case err != nil:
		return nil, fmt.Errorf("report folder %s: %w", dir, unwrapPath(err))
	case !fi.IsDir():
		return nil, fmt.Errorf("report folder %s: %w (%s): name a folder, or a path that does not exist yet", dir, ErrNotRegular, kindOf(fi.Mode()))
	default:
		if in := f.input(fi); in != "" {
			return nil, fmt.Errorf("report folder %s is the input folder %s: %w; choose another folder", dir, in, ErrWouldOverwriteInput)
		}
	}
	unlock, err := lockFolder(f.dir)
	if err != nil {
		f.Close()
		if errors.Is(err, ErrFolderBusy) {
			return nil, fmt.Errorf("report folder %s: %w; wait for it to finish or choose another folder", dir, err)
		}
		return nil, fmt.Errorf("report folder %s: cannot lock it: %w", dir, unwrapPath(err))
	}
	f.unlock = unlock
	if err := f.check(); err != nil {
		f.Close()
		return nil, err
	}
	return f, nil
}

// kindOf names a file's kind for messages ("a regular file" included).
func kindOf(m fs.FileMode) string {
	if m.IsRegular() {
		return "a file"
	}
	return fileKind(m)
}

// create makes the folder (and missing parents), remembering what it made
// so that a failed or interrupted run removes it again.
func (f *ReportFolder) create() error {
	var missing []string
	for d := f.dir; ; d = filepath.Dir(d) {
		if _, err := os.Lstat(d); err == nil || d == filepath.Dir(d) {
			break
		}
		missing = append(missing, d)
	}
	var err error
	f.forget, err = cleanup.Register(func() { removeEmpty(missing) })
	if err != nil {
		return err
	}
	if err := os.MkdirAll(f.dir, 0o755); err != nil {
		removeEmpty(missing)
		return fmt.Errorf("cannot create the report folder %s: %w", f.dir, unwrapPath(err))
	}
	f.created = missing
	return nil
}

// removeEmpty removes folders, innermost first, as long as they are empty.
func removeEmpty(dirs []string) {
	for _, d := range dirs {
		if os.Remove(d) != nil {
			return
		}
	}
}

// input returns the input that is the file fi, or "".
func (f *ReportFolder) input(fi os.FileInfo) string {
	for _, in := range f.inputs {
		if os.SameFile(fi, in.fi) {
			return in.name
		}
	}
	return ""
}

// check reads the manifest, removes temporary folders of runs that were
// killed, sorts the folder's entries into the report's own and the user's,
// and decides whether the run may go on.
func (f *ReportFolder) check() error {
	m, err := readManifest(f.dir)
	if err != nil {
		return err
	}
	f.old = map[string]manifestFile{}
	owned := map[string]bool{}
	if m != nil {
		for _, mf := range m.Files {
			f.old[mf.Path] = mf
		}
		for _, d := range m.Folders {
			owned[d] = true
		}
		f.oldDirs = m.Folders
	}
	f.removeStaleTemporaries()
	var foreign, changed []string
	var walk func(rel string) error
	walk = func(rel string) error {
		entries, err := os.ReadDir(filepath.Join(f.dir, filepath.FromSlash(rel)))
		if err != nil {
			return fmt.Errorf("report folder %s: %w", f.dir, unwrapPath(err))
		}
		for _, e := range entries {
			name := e.Name()
			p := path.Join(rel, name)
			if rel == "" && (name == ManifestName || name == lockName || strings.HasPrefix(name, tempPrefix)) {
				continue
			}
			if owned[p] && e.IsDir() {
				if err := walk(p); err != nil {
					return err
				}
				continue
			}
			mf, ok := f.old[p]
			if !ok {
				foreign = append(foreign, p)
				continue
			}
			if err := f.mayReplace(p, mf); err != nil {
				if errors.Is(err, ErrWouldOverwriteInput) {
					return err
				}
				changed = append(changed, p)
			}
		}
		return nil
	}
	if err := walk(""); err != nil {
		return err
	}
	if len(changed) > 0 {
		them := itThem(changed, "it", "them")
		return kindError{ErrNotOwned, fmt.Sprintf("report folder %s: %s changed after fickfit wrote %s (%s gives another size or checksum), so %s the user's now; move %s out of the folder to keep %s, or delete %s, then run again",
			f.dir, listSome(changed), them, ManifestName, itThem(changed, "it is", "they are"), them, them, them)}
	}
	for _, name := range reservedNames {
		if slices.Contains(foreign, name) {
			return f.notOwned(name)
		}
	}
	if f.opts.Force {
		return nil
	}
	if m != nil && !(f.opts.ReplaceOwn && m.Command == f.opts.Command && len(foreign) == 0) {
		return kindError{ErrExists, fmt.Sprintf("report folder %s holds an earlier fickfit report; add --force to replace it (files fickfit did not write are kept) or choose another folder", f.dir)}
	}
	if len(foreign) > 0 {
		return kindError{ErrExists, fmt.Sprintf("report folder %s already holds %s, which fickfit did not write; choose an empty folder, or add --force to write the report beside %s (%s left untouched)",
			f.dir, listSome(foreign), itThem(foreign, "it", "them"), itThem(foreign, "it is", "they are"))}
	}
	return nil
}

// notOwned is the error for a file of the user's where the report writes.
func (f *ReportFolder) notOwned(rel string) error {
	p := filepath.Join(f.dir, filepath.FromSlash(rel))
	if fi, err := os.Stat(p); err == nil {
		if in := f.input(fi); in != "" {
			return fmt.Errorf("%s: %w (%s); choose another report folder", p, ErrWouldOverwriteInput, in)
		}
	}
	return kindError{ErrNotOwned, fmt.Sprintf("%s was not written by fickfit (no manifest of a fickfit report lists it), and the report writes a file of that name: move it out of the folder or choose another folder (a report written before fickfit kept a manifest must be removed by hand)", p)}
}

// mayReplace tells whether the report's own file rel may be replaced or
// removed: it is a regular file with the size and checksum the manifest
// gives (an incomplete manifest gives no checksum), and not an input.
func (f *ReportFolder) mayReplace(rel string, mf manifestFile) error {
	p := filepath.Join(f.dir, filepath.FromSlash(rel))
	fi, err := os.Lstat(p)
	if errors.Is(err, fs.ErrNotExist) {
		return nil
	}
	if err != nil {
		return err
	}
	if !fi.Mode().IsRegular() {
		return fmt.Errorf("%s is %s", p, kindOf(fi.Mode()))
	}
	if in := f.input(fi); in != "" {
		return fmt.Errorf("%s: %w (%s); choose another report folder", p, ErrWouldOverwriteInput, in)
	}
	if mf.SHA256 == "" {
		return nil
	}
	if fi.Size() != mf.Bytes {
		return fmt.Errorf("%s changed size", p)
	}
	sum, err := hashFile(p)
	if err != nil {
		return err
	}
	if sum != mf.SHA256 {
		return fmt.Errorf("%s changed", p)
	}
	return nil
}

// hashFile returns the SHA-256 of a file in hex.
func hashFile(p string) (string, error) {
	fh, err := os.Open(p)
	if err != nil {
		return "", err
	}
	defer fh.Close()
	h := sha256.New()
	if _, err := io.Copy(h, fh); err != nil {
		return "", err
	}
	return hex.EncodeToString(h.Sum(nil)), nil
}

// removeStaleTemporaries removes the temporary folders of runs that were
// killed before they could clean up (the lock is held, so no run is using
// them). Only folders holding the marker are removed.
func (f *ReportFolder) removeStaleTemporaries() {
	entries, _ := os.ReadDir(f.dir)
	for _, e := range entries {
		if !e.IsDir() || !strings.HasPrefix(e.Name(), tempPrefix) {
			continue
		}
		p := filepath.Join(f.dir, e.Name())
		if fi, err := os.Lstat(filepath.Join(p, tempMarker)); err == nil && fi.Mode().IsRegular() {
			os.RemoveAll(p)
		}
	}
}

// builtFile is a file of the new report, complete in the temporary folder.
type builtFile struct {
	manifestFile
	tmp string // where it is now
}

// build writes the report's files into a temporary folder inside the
// report folder, each through write, and returns them with their sizes and
// checksums. The temporary folder is removed on error and at an interrupt;
// on success the caller commits and then removes it.
func (f *ReportFolder) build(files []reportFile) (tmp string, forget func(), built []builtFile, err error) {
	tmp, forget, err = cleanup.MkdirTemp(f.dir, tempPrefix+"*")
	if err != nil {
		return "", nil, nil, fmt.Errorf("cannot write in the report folder %s: %w", f.dir, unwrapPath(err))
	}
	fail := func(err error) (string, func(), []builtFile, error) {
		os.RemoveAll(tmp)
		forget()
		return "", nil, nil, err
	}
	if err = os.WriteFile(filepath.Join(tmp, tempMarker), nil, 0o644); err != nil {
		return fail(err)
	}
	made := map[string]bool{}
	for _, rf := range files {
		if d := path.Dir(rf.rel); d != "." && !made[d] {
			if err = os.MkdirAll(filepath.Join(tmp, filepath.FromSlash(d)), 0o755); err != nil {
				return fail(err)
			}
			made[d] = true
		}
		p := filepath.Join(tmp, filepath.FromSlash(rf.rel))
		mf, err := writeHashed(p, rf.write)
		if err != nil {
			return fail(fmt.Errorf("%s: %w", filepath.Join(f.dir, filepath.FromSlash(rf.rel)), err))
		}
		mf.Path = rf.rel
		built = append(built, builtFile{manifestFile: mf, tmp: p})
	}
	return tmp, forget, built, nil
}

// reportFile is one file to write, by its path relative to the folder.
type reportFile struct {
	rel   string
	write func(io.Writer) error
}

// writeHashed writes a new file and returns its size and SHA-256.
func writeHashed(p string, write func(io.Writer) error) (manifestFile, error) {
	fh, err := os.OpenFile(p, os.O_WRONLY|os.O_CREATE|os.O_EXCL, 0o644)
	if err != nil {
		return manifestFile{}, err
	}
	h := sha256.New()
	cw := &countWriter{w: io.MultiWriter(newWriteback(fh), h)}
	bw := bufio.NewWriterSize(cw, 64<<10)
	if err := write(bw); err != nil {
		fh.Close()
		return manifestFile{}, err
	}
	if err := bw.Flush(); err != nil {
		fh.Close()
		return manifestFile{}, err
	}
	if err := fh.Sync(); err != nil {
		fh.Close()
		return manifestFile{}, err
	}
	if err := fh.Close(); err != nil {
		return manifestFile{}, err
	}
	return manifestFile{Bytes: cw.n, SHA256: hex.EncodeToString(h.Sum(nil))}, nil
}

// commit moves the built files into the folder, removes the earlier
// report's files that the new one does not have, and writes the manifest.
// It runs with interrupts held off. Files fickfit did not write are never
// replaced or removed: a name taken by one since the folder was opened
// stops the commit before anything moves.
func (f *ReportFolder) commit(built []builtFile, folders []string) error {
	newSet := map[string]bool{}
	for _, b := range built {
		newSet[b.Path] = true
		if mf, ok := f.old[b.Path]; ok {
			if err := f.mayReplace(b.Path, mf); err != nil {
				if errors.Is(err, ErrWouldOverwriteInput) {
					return err
				}
				return kindError{ErrNotOwned, fmt.Sprintf("%s changed after fickfit wrote it, so it is the user's now; move it out of the folder to keep it, or delete it, then run again", filepath.Join(f.dir, filepath.FromSlash(b.Path)))}
			}
			continue
		}
		if _, err := os.Lstat(filepath.Join(f.dir, filepath.FromSlash(b.Path))); err == nil {
			return f.notOwned(b.Path)
		}
	}
	for _, d := range folders {
		fi, err := os.Lstat(filepath.Join(f.dir, filepath.FromSlash(d)))
		if err == nil && (!fi.IsDir() || !slices.Contains(f.oldDirs, d)) {
			return f.notOwned(d)
		}
	}
	// The interim manifest lists every file the folder may hold while
	// files move: a run stopped here by a crash leaves a folder that says
	// it is incomplete and that the next run may clean.
	interim := manifest{Format: 1, Version: f.opts.Version, Command: f.opts.Command, Folders: union(f.oldDirs, folders)}
	for _, b := range built {
		mf := b.manifestFile
		if _, ok := f.old[b.Path]; ok {
			mf.SHA256 = ""
		}
		interim.Files = append(interim.Files, mf)
	}
	for p, mf := range f.old {
		if !newSet[p] {
			interim.Files = append(interim.Files, mf)
		}
	}
	if err := f.writeManifest(interim); err != nil {
		return err
	}
	for _, d := range folders {
		if err := os.MkdirAll(filepath.Join(f.dir, filepath.FromSlash(d)), 0o755); err != nil {
			return f.incomplete(err)
		}
	}
	for _, b := range built {
		if err := os.Rename(b.tmp, filepath.Join(f.dir, filepath.FromSlash(b.Path))); err != nil {
			return f.incomplete(err)
		}
	}
	// The earlier report's files that this one does not write, when still
	// as fickfit wrote them; a changed one is the user's now and stays.
	for p, mf := range f.old {
		if newSet[p] {
			continue
		}
		if f.mayReplace(p, mf) == nil {
			os.Remove(filepath.Join(f.dir, filepath.FromSlash(p)))
		}
	}
	for _, d := range f.oldDirs {
		if !slices.Contains(folders, d) {
			os.Remove(filepath.Join(f.dir, filepath.FromSlash(d))) // only when empty
		}
	}
	final := manifest{Format: 1, Version: f.opts.Version, Command: f.opts.Command, Complete: true, Folders: folders}
	for _, b := range built {
		final.Files = append(final.Files, b.manifestFile)
	}
	if err := f.writeManifest(final); err != nil {
		return f.incomplete(err)
	}
	return nil
}

// incomplete is the error of a commit that stopped after files began to move.
func (f *ReportFolder) incomplete(err error) error {
	return fmt.Errorf("report folder %s is incomplete (its manifest says so): %w; run again with --force to replace it", f.dir, unwrapPath(err))
}

// Close unlocks the folder. When no report was committed, a folder this
// run created is removed again (when empty), so that a failed run leaves
// nothing behind.
func (f *ReportFolder) Close() error {
	if !f.done {
		removeEmpty(f.created)
	}
	if f.forget != nil {
		f.forget()
		f.forget = nil
	}
	if f.unlock != nil {
		f.unlock()
		f.unlock = nil
	}
	return nil
}

// Dir is the report folder's path.
func (f *ReportFolder) Dir() string { return f.dir }

func union(a, b []string) []string {
	out := append([]string{}, a...)
	for _, s := range b {
		if !slices.Contains(out, s) {
			out = append(out, s)
		}
	}
	sort.Strings(out)
	return out
}

// listSome names up to three entries: "a, b, c and 4 more".
func listSome(names []string) string {
	switch {
	case len(names) == 1:
		return names[0]
	case len(names) <= 3:
		return strings.Join(names[:len(names)-1], ", ") + " and " + names[len(names)-1]
	}
	return strings.Join(names[:3], ", ") + fmt.Sprintf(" and %d more", len(names)-3)
}

// itThem picks the singular or plural word for a list.
func itThem(names []string, one, many string) string {
	if len(names) == 1 {
		return one
	}
	return many
}
