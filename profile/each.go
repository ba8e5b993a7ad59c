package profile

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
)

// ErrUngrouped is wrapped by the error Each returns when the rows of one
// profile in a long table are not together: such a profile is complete
// only at the end of its file, so it cannot be handed on while the file is
// being read. ReadAll reads such files.
var ErrUngrouped = errors.New("rows of a profile not together")

// Each reads the profiles that ReadAll(paths) returns, in the same order,
// and calls fn with each as soon as its rows are read (fn may keep p), so that a caller
// can work on the first profiles of a long table while the rest is still
// being read, and let go of them before the end: the memory Each holds is
// a few profiles and the set of ids met (to refuse a duplicate), not the
// files.
//
// A long table is read this way when its rows come grouped by profile (a
// lab export sorted by specimen): a profile is complete when the next one
// starts. When a profile's rows continue after rows of another, Each
// returns an error wrapping ErrUngrouped, after fn may have seen some of
// the file's profiles (one of them incomplete): read such input with
// ReadAll instead. Workbooks are read whole, then handed on.
//
// Errors are those ReadAll returns, and the same error for the same
// input: reading stops at the first bad row; problems found only at the
// end of a file (no data rows, an ambiguous decimal mark, a profile that
// fails Profile.Validate) are returned at the end of that file, and a
// duplicate id after every file is read. Once such an error is known fn
// is no longer called. An error returned by fn stops the reading and is
// returned as it is.
func Each(paths []string, fn func(p *Profile) error) error {
	files, err := expand(paths)
	if err != nil {
		return err
	}
	st := &stream{seen: map[string]string{}}
	st.emit = func(p *Profile) error {
		if st.dup != nil {
			return nil
		}
		if src, ok := st.seen[p.ID]; !ok {
			st.seen[p.ID] = p.Source
		} else if src != p.Source {
			st.dup = duplicateError(*p, src)
			return nil
		}
		return fn(p)
	}
	for _, f := range files {
		if err := st.file(f); err != nil {
			return err
		}
	}
	return st.dup
}

// stream is the state of Each across files.
type stream struct {
	emit func(*Profile) error
	// seen maps every id met to the source of its first profile.
	seen map[string]string
	dup  error // the first duplicate id
}

// file reads one file, handing on its profiles.
func (st *stream) file(path string) error {
	ext := strings.ToLower(filepath.Ext(path))
	if ext == ".xlsx" || ext == ".xlsm" || !readable[ext] {
		ps, err := readFile(path)
		if err != nil {
			return err
		}
		for i := range ps {
			if err := st.emit(&ps[i]); err != nil {
				return err
			}
		}
		return nil
	}
	f, err := os.Open(path)
	if err != nil {
		return openError(path, err)
	}
	defer f.Close()
	_, err = scanTable(f, path, baseID(path), st)
	return err
}

// streamProfileFor finds or starts the profile of a row while streaming:
// a new id starts a profile and completes the one before.
func (t *table) streamProfileFor(id, raw string, line int) (*building, error) {
	src, ok := t.stream.seen[id]
	switch {
	case ok && t.cur != nil && t.cur.p.ID == id:
		t.curRaw = raw
		return t.cur, nil
	case ok && src == t.template.Source:
		return nil, t.org.errAt(line, t.idCol, t.cols[t.idCol].name, errorf(ErrUngrouped,
			"rows of profile %s continue here, after rows of other profiles", quote(id)),
			"read the file whole")
	}
	if t.cur != nil && t.deferred == nil {
		if err := t.complete(t.cur); err != nil {
			return nil, err
		}
	}
	b, err := t.newProfile(id, raw, line)
	if err != nil {
		return nil, err
	}
	if !ok {
		t.stream.seen[b.p.ID] = t.template.Source
	}
	return b, nil
}

// complete hands on the profile b, whose rows are all read, or keeps its
// validation error for finish (an error in a later row comes first, as
// when the file is read whole).
func (t *table) complete(b *building) error {
	b.p = t.profile(b)
	if err := b.p.Validate(); err != nil {
		t.deferred = err
		return nil
	}
	return t.stream.emit(&b.p)
}

// duplicateError is checkUnique's error for p, whose id the profile from
// source other has.
func duplicateError(p Profile, other string) error {
	file, sheet := splitSource(p.Source)
	e := &Error{File: file, Sheet: sheet, Err: errorf(ErrDuplicate,
		"profile id %s is also used by %s", quote(p.ID), other),
		Hint: "rename one of them (the id comes from an id metadata line, the id column, the sheet name or the file name)"}
	if len(p.Line) > 0 {
		e.Line = p.Line[0]
	}
	return e
}
