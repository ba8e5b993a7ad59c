package report

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
)

// ErrWouldOverwriteInput is returned when an output path is one of the
// inputs: fickfit never replaces an input file.
var ErrWouldOverwriteInput = errors.New("output would overwrite an input file")

// ErrExists is returned when an output file exists and replacing it was
// not asked for (--force).
var ErrExists = errors.New("output file exists")

// Output writes output files safely: each file goes to a temporary file in
// the target folder and is renamed over the target only when completely
// written, so that a reader never sees a half-written output and a failed
// run leaves the old file in place. The zero value refuses to replace an
// existing file and protects no inputs.
type Output struct {
	// Force allows replacing existing files (never inputs).
	Force bool
	// Inputs are files that must never be replaced, whatever Force says.
	// They are compared by identity (os.SameFile), so another spelling of
	// the same path, or a link to it, is caught too.
	Inputs []string
}

// check tells whether path may be written: not a folder, not an input,
// not an existing file unless Force.
func (o Output) check(path string) error {
	fi, err := os.Stat(path)
	if errors.Is(err, fs.ErrNotExist) {
		return nil
	}
	if err != nil {
		return fmt.Errorf("%s: %w", path, err)
	}
	if fi.IsDir() {
		return fmt.Errorf("%s: is a folder, not a file: choose another output name", path)
	}
	for _, in := range o.Inputs {
		if ii, e := os.Stat(in); e == nil && os.SameFile(fi, ii) {
			return fmt.Errorf("%s: %w (%s); choose another output folder", path, ErrWouldOverwriteInput, in)
		}
	}
	if !o.Force {
		return fmt.Errorf("%s: %w; use --force to replace it or choose another output folder", path, ErrExists)
	}
	return nil
}

// WriteFile writes path atomically with write. On any error the target is
// untouched and the temporary file removed.
func (o Output) WriteFile(path string, write func(io.Writer) error) (err error) {
	dir := filepath.Dir(path)
	if err := o.check(path); err != nil {
		return err
	}
	tmp, err := os.CreateTemp(dir, "."+filepath.Base(path)+".tmp-*")
	if err != nil {
		return fmt.Errorf("cannot write in %s: %w", dir, err)
	}
	name := tmp.Name()
	defer func() {
		if err != nil {
			tmp.Close()
			os.Remove(name)
		}
	}()
	bw := bufio.NewWriterSize(tmp, 64<<10)
	if err = write(bw); err != nil {
		return fmt.Errorf("%s: %w", path, err)
	}
	if err = bw.Flush(); err != nil {
		return fmt.Errorf("%s: %w", path, err)
	}
	if err = tmp.Sync(); err != nil {
		return fmt.Errorf("%s: %w", path, err)
	}
	if err = tmp.Close(); err != nil {
		return fmt.Errorf("%s: %w", path, err)
	}
	if err = os.Chmod(name, 0o644); err != nil {
		return fmt.Errorf("%s: %w", path, err)
	}
	if err = os.Rename(name, path); err != nil {
		return fmt.Errorf("%s: %w", path, err)
	}
	return nil
}

// WriteFileAtomic writes path through a temporary file in the same folder
// and a rename, replacing an existing file. Use Output to refuse replacing
// existing files or inputs.
func WriteFileAtomic(path string, write func(io.Writer) error) error {
	return Output{Force: true}.WriteFile(path, write)
}
