package profile

import (
	"bytes"
	"path/filepath"
	"strings"
)

// MaxFileSize is the largest file ReadBytes takes (256 MiB): a workbook
// can unpack to no more (MaxUnzipSize), and a text table that size holds
// millions of points. A server bounds uploads by it.
const MaxFileSize = MaxUnzipSize

// ReadBytes reads the profiles of one file held in memory (an upload),
// by the extension of name as Read does, with the same readers, limits
// and messages. name is used in messages and Source, its base name
// without extension as the default id.
func ReadBytes(data []byte, name string) ([]Profile, error) {
	if len(data) > MaxFileSize {
		return nil, &Error{File: name, Err: errorf(ErrTooLarge, "the file is larger than %d MiB", MaxFileSize>>20),
			Hint: "split it into smaller files"}
	}
	ext := strings.ToLower(filepath.Ext(name))
	var ps []Profile
	var err error
	switch {
	case ext == ".xlsx" || ext == ".xlsm":
		ps, err = readXLSXBytes(data, name)
	case readable[ext]:
		ps, err = readTable(bytes.NewReader(data), name, baseID(name))
	case ext == ".xls" || ext == ".ods" || ext == ".numbers":
		return nil, &Error{File: name, Err: errorf(ErrFormat, "%s workbooks are not read", ext),
			Hint: "save the workbook as .xlsx, or export the sheets as CSV"}
	default:
		return nil, &Error{File: name, Err: errorf(ErrFormat, "unknown file type %s", quote(ext)),
			Hint: "give .csv, .tsv, .txt or .xlsx files"}
	}
	if err != nil {
		return nil, err
	}
	return ps, checkUnique(ps)
}

// Files lists the files ReadAll reads for paths: a file as given, a
// folder replaced by the readable files directly in it, in name order
// (hidden files and spreadsheet lock files skipped).
func Files(paths []string) ([]string, error) { return expand(paths) }
