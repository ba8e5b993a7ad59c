package profile

import (
	"fmt"
	"io"
	"os"
	"path/filepath"
	"sort"
	"strings"
)

// Extensions Read accepts. Text files (.csv, .tsv, .txt) are sniffed for
// their separator; .xlsx (and macro-enabled .xlsm) are read as workbooks.
var readable = map[string]bool{".csv": true, ".tsv": true, ".txt": true, ".xlsx": true, ".xlsm": true}

// Read reads the profiles in one file, chosen by extension: .csv, .tsv or
// .txt (per-profile or long table, see the package documentation) or .xlsx.
// A folder is read as ReadAll would. Files are opened read-only.
// Every error is an *Error naming the file and, where there is one, the
// line (or sheet and cell) and what to do.
func Read(path string) ([]Profile, error) {
	if fi, err := os.Stat(path); err == nil && fi.IsDir() {
		return ReadAll([]string{path})
	}
	ps, err := readFile(path)
	if err != nil {
		return nil, err
	}
	return ps, checkUnique(ps)
}

// ReadAll reads every file in paths; a path that is a folder stands for
// the .csv, .tsv, .txt and .xlsx files directly in it (not in subfolders),
// in name order, skipping hidden files and spreadsheet lock files ("~$…").
// Profiles come in the order of the paths. Two profiles with the same id
// are an error naming both sources: ids must be unique across the inputs.
func ReadAll(paths []string) ([]Profile, error) {
	files, err := expand(paths)
	if err != nil {
		return nil, err
	}
	var all []Profile
	for _, f := range files {
		ps, err := readFile(f)
		if err != nil {
			return nil, err
		}
		all = append(all, ps...)
	}
	return all, checkUnique(all)
}

// ReadCSV reads profiles from delimited text in memory; name is used in
// messages and Source, and its base name without extension is the default
// profile id.
func ReadCSV(r io.Reader, name string) ([]Profile, error) {
	ps, err := readTable(r, name, baseID(name))
	if err != nil {
		return nil, err
	}
	return ps, checkUnique(ps)
}

// baseID is the file's base name without its extension.
func baseID(name string) string {
	b := filepath.Base(name)
	if id := strings.TrimSuffix(b, filepath.Ext(b)); id != "" && id != "." && id != string(filepath.Separator) {
		return id
	}
	return "profile"
}

// readFile reads one file by its extension.
func readFile(path string) ([]Profile, error) {
	ext := strings.ToLower(filepath.Ext(path))
	switch {
	case ext == ".xlsx" || ext == ".xlsm":
		return readXLSX(path)
	case readable[ext]:
		f, err := os.Open(path)
		if err != nil {
			return nil, openError(path, err)
		}
		defer f.Close()
		return readTable(f, path, baseID(path))
	case ext == ".xls" || ext == ".ods" || ext == ".numbers":
		return nil, &Error{File: path, Err: errorf(ErrFormat, "%s workbooks are not read", ext),
			Hint: "save the workbook as .xlsx, or export the sheets as CSV"}
	}
	return nil, &Error{File: path, Err: errorf(ErrFormat, "unknown file type %s", quote(ext)),
		Hint: "give .csv, .tsv, .txt or .xlsx files"}
}

// openError wraps an operating-system error from opening path.
func openError(path string, err error) *Error {
	if pe, ok := err.(*os.PathError); ok {
		err = pe.Err
	}
	return &Error{File: path, Err: fmt.Errorf("%w: %w", ErrOpen, err), Hint: "check the path and the permissions"}
}

// expand replaces folders by the readable files in them.
func expand(paths []string) ([]string, error) {
	var out []string
	for _, p := range paths {
		fi, err := os.Stat(p)
		if err != nil {
			return nil, openError(p, err)
		}
		if !fi.IsDir() {
			out = append(out, p)
			continue
		}
		files, err := listFolder(p)
		if err != nil {
			return nil, err
		}
		out = append(out, files...)
	}
	return out, nil
}

// listFolder lists the readable files directly in dir, sorted by name.
func listFolder(dir string) ([]string, error) {
	entries, err := os.ReadDir(dir)
	if err != nil {
		return nil, openError(dir, err)
	}
	var out []string
	for _, e := range entries {
		n := e.Name()
		if e.IsDir() || strings.HasPrefix(n, ".") || strings.HasPrefix(n, "~$") ||
			!readable[strings.ToLower(filepath.Ext(n))] {
			continue
		}
		out = append(out, filepath.Join(dir, n))
	}
	sort.Strings(out)
	if len(out) == 0 {
		return nil, &Error{File: dir, Err: errorf(ErrNoData, "the folder has no .csv, .tsv, .txt or .xlsx files"),
			Hint: "give the folder that holds the profile files, or the files themselves"}
	}
	return out, nil
}

// checkUnique refuses two profiles with the same id.
func checkUnique(ps []Profile) error {
	seen := make(map[string]int, len(ps))
	for i, p := range ps {
		j, dup := seen[p.ID]
		if !dup {
			seen[p.ID] = i
			continue
		}
		return duplicateError(p, ps[j].Source)
	}
	return nil
}

// splitSource undoes origin.source for workbooks: "book.xlsx:A3" → ("book.xlsx", "A3").
func splitSource(s string) (file, sheet string) {
	lower := strings.ToLower(s)
	for _, ext := range []string{".xlsx:", ".xlsm:"} {
		if i := strings.LastIndex(lower, ext); i >= 0 {
			return s[:i+len(ext)-1], s[i+len(ext):]
		}
	}
	return s, ""
}
